// Expression parser: first byte picks the conductor, the rest is the expression.
#include "fuzz_common.hpp"
#include "zetabraid/field/expression.hpp"

#ifndef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY LLVMFuzzerTestOneInput
#endif
extern "C" int ZB_FUZZ_ENTRY(const uint8_t* data, size_t size) {
  if (size < 1 || size > 4096) return 0;
  static const unsigned long conductors[] = {1, 3, 4, 5, 8, 12, 15, 16, 20, 24, 5, 10};
  unsigned long n = conductors[data[0] % (sizeof conductors / sizeof conductors[0])];
  std::string text = fuzz_text(data + 1, size - 1);
  ZB_FUZZ_GUARD({
    auto f = zb::Field::make(n);
    zb::Scalar x = zb::parse_expression(text, f);
    (void)x.str();
  });
  return 0;
}
