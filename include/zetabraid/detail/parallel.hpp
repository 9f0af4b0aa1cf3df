// The one thread policy of zetabraid: how many workers, how work is split, how workers end.
//
//  * thread_count(requested): 0 means "all cores, at most kMaxDefaultThreads"; negative is a usage error.
//    requested_thread_count(optional n): the same rule for a user's --threads option (given: 1..kMaxThreads).
//  * parallel_for(n, threads, f): calls f(i) for every i in [0, n), items handed out one at a time from a shared
//    counter; the calling thread works too. Results must be written per item (never depend on which thread ran
//    an item), so every engine gives identical values at any thread count. The first exception (by item index)
//    is rethrown after all workers joined.
//  * fork_join(parallel, left, right): the two halves of a product tree, left on a new thread when `parallel`.
// Every worker thread calls flint_cleanup() before it ends (FLINT/Arb keep per-thread caches).
#pragma once
#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "zetabraid/detail/flint.hpp"
#include "zetabraid/error.hpp"

namespace zb {

/// Threads used when the user asks for "all cores".
inline constexpr int kMaxDefaultThreads = 8;
/// Upper limit on an explicit thread count.
inline constexpr int kMaxThreads = 256;

/// The thread count for a request: 0 = all cores (at most kMaxDefaultThreads), n > 0 = n (at most kMaxThreads).
/// InputError for negative counts.
inline int thread_count(int requested) {
  if (requested < 0) throw InputError("thread count must be 0 (all cores) or positive, got " + std::to_string(requested));
  if (requested == 0) {
    unsigned h = std::thread::hardware_concurrency();
    return static_cast<int>(std::clamp<unsigned>(h == 0 ? 1u : h, 1u, static_cast<unsigned>(kMaxDefaultThreads)));
  }
  return std::min(requested, kMaxThreads);
}

/// The thread count of a user's explicit request (a front end's --threads option): absent means thread_count(0)
/// (all cores, at most kMaxDefaultThreads); given, it must be 1..kMaxThreads, else InputError.
inline int requested_thread_count(std::optional<int> requested) {
  if (!requested) return thread_count(0);
  if (*requested < 1 || *requested > kMaxThreads)
    throw InputError("--threads must be 1.." + std::to_string(kMaxThreads) + " (omit it for all cores, at most " +
                     std::to_string(kMaxDefaultThreads) + ")");
  return thread_count(*requested);
}

namespace detail {

/// Collects the exception of the lowest item index (deterministic error reports).
class FirstError {
 public:
  void record(size_t item, std::exception_ptr e) {
    std::lock_guard<std::mutex> g(m_);
    if (!err_ || item < item_) {
      err_ = e;
      item_ = item;
    }
  }
  bool any() const {
    std::lock_guard<std::mutex> g(m_);
    return static_cast<bool>(err_);
  }
  void rethrow() const {
    if (err_) std::rethrow_exception(err_);
  }

 private:
  mutable std::mutex m_;
  std::exception_ptr err_;
  size_t item_ = 0;
};

}  // namespace detail

/// f(i) for i in [0, n) on up to `threads` threads (the caller included); threads <= 1 runs inline.
template <class F>
void parallel_for(size_t n, int threads, F&& f) {
  size_t workers = std::min<size_t>(n, static_cast<size_t>(std::max(threads, 1)));
  if (workers <= 1) {
    for (size_t i = 0; i < n; ++i) f(i);
    return;
  }
  std::atomic<size_t> next{0};
  detail::FirstError err;
  auto work = [&] {
    for (;;) {
      size_t i = next.fetch_add(1, std::memory_order_relaxed);
      if (i >= n || err.any()) return;
      try {
        f(i);
      } catch (...) {
        err.record(i, std::current_exception());
      }
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(workers - 1);
  for (size_t t = 0; t + 1 < workers; ++t)
    pool.emplace_back([&] {
      work();
      flint_cleanup();  // this thread's FLINT/Arb caches (values made here stay valid)
    });
  work();
  for (auto& th : pool) th.join();
  err.rethrow();
}

/// Runs left and right, left on a new thread when `parallel`; exceptions propagated (left's first).
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
    flint_cleanup();
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

}  // namespace zb
