// Every input the fuzzers ever found a problem with (tests/fuzz-regressions/<harness>/) and the seed corpora
// (fuzz/corpus/<harness>/) run through the same harness code in the normal build: none may crash, throw an
// undocumented exception type, or abort.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <iterator>

#define ZB_FUZZ_ENTRY zb_fuzz_expression
#include "../../fuzz/fuzz_expression.cpp"
#undef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY zb_fuzz_model
#include "../../fuzz/fuzz_model.cpp"
#undef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY zb_fuzz_word
#include "../../fuzz/fuzz_word.cpp"
#undef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY zb_fuzz_keep
#include "../../fuzz/fuzz_keep.cpp"
#undef ZB_FUZZ_ENTRY
#define ZB_FUZZ_ENTRY zb_fuzz_certificate
#include "../../fuzz/fuzz_certificate.cpp"
#undef ZB_FUZZ_ENTRY

namespace {

using Entry = int (*)(const uint8_t*, size_t);

size_t run_folder(const std::string& folder, Entry entry) {
  namespace fs = std::filesystem;
  size_t n = 0;
  if (!fs::is_directory(folder)) return 0;
  for (auto& e : fs::directory_iterator(folder)) {
    if (!e.is_regular_file()) continue;
    std::ifstream f(e.path(), std::ios::binary);
    std::string bytes((std::istreambuf_iterator<char>(f)), std::istreambuf_iterator<char>());
    INFO("input: " << e.path().string());
    CHECK(entry(reinterpret_cast<const uint8_t*>(bytes.data()), bytes.size()) == 0);
    ++n;
  }
  return n;
}

void run_harness(const std::string& name, Entry entry) {
  std::string src = ZB_SOURCE_DIR;
  size_t seeds = run_folder(src + "/fuzz/corpus/" + name, entry);
  run_folder(src + "/tests/fuzz-regressions/" + name, entry);
  CHECK(seeds > 0);  // every harness has a seed corpus
}

}  // namespace

TEST_CASE("fuzz seeds and regressions: expression parser") { run_harness("expression", zb_fuzz_expression); }
TEST_CASE("fuzz seeds and regressions: model loader") { run_harness("model", zb_fuzz_model); }
TEST_CASE("fuzz seeds and regressions: word parser") { run_harness("word", zb_fuzz_word); }
TEST_CASE("fuzz seeds and regressions: keep reader") { run_harness("keep", zb_fuzz_keep); }
TEST_CASE("fuzz seeds and regressions: certificate checker") { run_harness("certificate", zb_fuzz_certificate); }
