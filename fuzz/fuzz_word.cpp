// Braid-word parser, canonical text round trip and inverse.
#include <cstdlib>

#include "fuzz_common.hpp"
#include "zetabraid/braid/word.hpp"

#ifndef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY LLVMFuzzerTestOneInput
#endif
extern "C" int ZB_FUZZ_ENTRY(const uint8_t* data, size_t size) {
  if (size > 1 << 14) return 0;
  std::string text = fuzz_text(data, size);
  zb::WordLimits lim;
  lim.max_letters = 1 << 20;
  ZB_FUZZ_GUARD({
    zb::Word w = zb::parse_word(text, lim);
    std::string c = w.canonical();
    zb::Word again = zb::parse_word(c, lim);
    if (again.canonical() != c) std::abort();  // canonical text must read back to itself
    if (w.inverse().inverse().canonical() != c) std::abort();
  });
  return 0;
}
