// Shared pieces of the libFuzzer harnesses: every documented error type is an expected outcome; anything else
// (a crash, a sanitizer report, an uncaught exception of another type, a hang, unbounded memory) is a finding.
#pragma once
#include <cstddef>
#include <cstdint>
#include <string>

#include "zetabraid/error.hpp"

#define ZB_FUZZ_GUARD(body)                                                      \
  try {                                                                          \
    body;                                                                        \
  } catch (const zb::InputError&) {                                              \
  } catch (const zb::ResourceError&) {                                           \
  } catch (const zb::MathError&) {                                               \
  }

inline std::string fuzz_text(const uint8_t* data, size_t size) {
  return std::string(reinterpret_cast<const char*>(data), size);
}
