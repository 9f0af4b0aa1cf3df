// Internal: run two halves of a product tree, the first on a new thread when `parallel`, exceptions propagated.
#pragma once
#include <exception>
#include <thread>

#include "zetabraid/detail/flint.hpp"

namespace zb::detail {

template <class Left, class Right>
void fork_join(bool parallel, Left&& left, Right&& right) {
  if (!parallel) {
    left();
    right();
    return;
  }
  std::exception_ptr err;
  std::thread th([&] {
    try {
      left();
    } catch (...) {
      err = std::current_exception();
    }
    flint_cleanup();  // this thread's FLINT/Arb caches (values made here stay valid)
  });
  try {
    right();
  } catch (...) {
    th.join();
    throw;
  }
  th.join();
  if (err) std::rethrow_exception(err);
}

}  // namespace zb::detail
