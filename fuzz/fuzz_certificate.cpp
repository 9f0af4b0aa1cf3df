// Certificate reader and checker: the input is written as a certificate beside a copy of the Fibonacci model.
// A rejected certificate is the expected outcome; the checker must never crash, hang or throw anything else.
#include <unistd.h>

#include <filesystem>
#include <fstream>

#include "fuzz_common.hpp"
#include "zetabraid/cert/checker/verify.hpp"

namespace {
std::string workdir() {
  static std::string d = [] {
    std::string p = "/tmp/zb_fuzz_cert_" + std::to_string(::getpid());
    std::filesystem::create_directories(p);
    std::filesystem::copy_file(ZB_SOURCE_DIR "/models/fibonacci.toml", p + "/fibonacci.toml",
                               std::filesystem::copy_options::overwrite_existing);
    return p;
  }();
  return d;
}
}  // namespace

#ifndef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY LLVMFuzzerTestOneInput
#endif
extern "C" int ZB_FUZZ_ENTRY(const uint8_t* data, size_t size) {
  if (size > 1 << 16) return 0;
  std::string path = workdir() + "/cert.json";
  {
    std::ofstream f(path, std::ios::binary | std::ios::trunc);
    f.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  }
  ZB_FUZZ_GUARD({ (void)zb::verify_certificate(path); });
  return 0;
}
