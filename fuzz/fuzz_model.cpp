// Model loader and the model checks on whatever loads.
#include "fuzz_common.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/load.hpp"

#ifndef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY LLVMFuzzerTestOneInput
#endif
extern "C" int ZB_FUZZ_ENTRY(const uint8_t* data, size_t size) {
  if (size > 1 << 16) return 0;
  std::string text = fuzz_text(data, size);
  ZB_FUZZ_GUARD({
    zb::Model m = zb::parse_model(text, "fuzz.toml");
    zb::CheckOptions opt;
    opt.threads = 1;
    (void)zb::check_model(m, opt);
  });
  return 0;
}
