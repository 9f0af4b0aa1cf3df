// Keep files (explicit basis vectors) on V(t t t t; 1) of the Fibonacci model, and keep specs.
#include <memory>

#include "fuzz_common.hpp"
#include "zetabraid/braid/fusion_space.hpp"
#include "zetabraid/braid/subspace.hpp"
#include "zetabraid/model/load.hpp"

namespace {
const zb::Model& fib() {
  static std::unique_ptr<zb::Model> m = std::make_unique<zb::Model>(zb::load_model(ZB_SOURCE_DIR "/models/fibonacci.toml"));
  return *m;
}
}  // namespace

#ifndef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY LLVMFuzzerTestOneInput
#endif
extern "C" int ZB_FUZZ_ENTRY(const uint8_t* data, size_t size) {
  if (size < 1 || size > 1 << 14) return 0;
  const zb::Model& m = fib();
  static zb::FusionSpace space(m, zb::parse_anyons(m, "t t t t t t"), zb::parse_label(m, "t", "total"));
  std::string text = fuzz_text(data + 1, size - 1);
  if (data[0] & 1) {
    ZB_FUZZ_GUARD({ (void)zb::subspace_from_text(space, text, "fuzz.keep"); });
  } else {
    ZB_FUZZ_GUARD({
      auto groups = zb::parse_keep(m, text, 6);
      (void)zb::subspace_from_groups(space, groups);
    });
  }
  return 0;
}
