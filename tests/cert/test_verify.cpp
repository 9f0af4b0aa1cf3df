// The independent checker as a separate house (cert/checker/verify.hpp): its includes stay inside the trusted
// base, and every hostile certificate is refused with a reason (exit 1) or an input error (exit 2), never a crash,
// a hang, or a read of a file the certificate has no business naming. Oracles: the documented format
// (docs/certificate-format.md sections 6 and 7) and facts of the trade (POSIX file types, JSON object keys).
#include <doctest/doctest.h>
#include <fmt/format.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <functional>
#include <nlohmann/json.hpp>
#include <regex>
#include <set>

#include "support/helpers.hpp"
#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"

using namespace zb;
using ojson = nlohmann::ordered_json;
namespace fs = std::filesystem;

namespace {

std::string fib_file() { return zbtest::source_dir() + "/models/fibonacci.toml"; }

// A folder with a copy of the Fibonacci model (m.toml) and certificates naming it by the relative path "m.toml".
std::string cert_dir() {
  std::string d = zbtest::tmpdir("zb_test_verify");
  if (!fs::exists(d + "/m.toml")) fs::copy_file(fib_file(), d + "/m.toml");
  return d;
}

// Certifies a word on V(t t t t; 1) keeping "1-2:t" (dimension 2, kept 1) in folder d; returns the certificate.
ojson make_cert(const std::string& d, const std::string& word, const std::string& method) {
  const std::string out = fmt::format("c_{}_{}.json", method, word.size());
  zbtest::run(fmt::format("cd {} && {} certify --model m.toml --anyons 't t t t' --total 1 --keep '1-2:t' --word '{}' "
                          "--method {} --out {}",
                          d, zbtest::cli(), word, method, out));
  return ojson::parse(zbtest::slurp(d + "/" + out));
}

// Runs `verify` on the given certificate text written to d/t.json (stderr merged).
zbtest::RunResult verify_text(const std::string& d, const std::string& text, const std::string& extra = "") {
  zbtest::spit(d + "/t.json", text);
  return zbtest::run(fmt::format("timeout 20 {} verify {} {}/t.json", zbtest::cli(), extra, d), true);
}
zbtest::RunResult verify_json(const std::string& d, const ojson& j, const std::string& extra = "") {
  return verify_text(d, j.dump(2) + "\n", extra);
}

bool rejected(const zbtest::RunResult& r) { return r.status == 1 && r.out.rfind("REJECTED: ", 0) == 0; }

// ---- the include boundary

// The trusted base of the checker (docs/certificate-format.md section 7, keep the two lists equal).
bool trusted(const std::string& h) {
  static const std::set<std::string> files = {
      "zetabraid/linalg/matrix.hpp", "zetabraid/linalg/modular_base.hpp", "zetabraid/model/model.hpp",
      "zetabraid/model/load.hpp",    "zetabraid/error.hpp",                "zetabraid/cert/verdict.hpp"};
  for (const char* folder : {"zetabraid/field/", "zetabraid/io/", "zetabraid/detail/", "zetabraid/cert/checker/"})
    if (h.rfind(folder, 0) == 0) return true;
  return files.count(h) > 0;
}

// Project headers reached from `file` (transitively), as paths relative to include/ or, for the checker's private
// headers, "src/cert/checker/<name>". Third-party and system headers (<...> outside zetabraid/) are not followed.
void project_includes(const fs::path& file, std::set<std::string>* seen, std::vector<std::string>* bad) {
  static const std::regex inc(R"(^\s*#\s*include\s*([<"])([^>"]+)[>"])");
  std::ifstream in(file);
  std::string line;
  std::smatch m;
  while (std::getline(in, line)) {
    if (!std::regex_search(line, m, inc)) continue;
    const std::string name = m[2];
    fs::path next;
    std::string key;
    if (name.rfind("zetabraid/", 0) == 0) {
      key = name;
      next = fs::path(zbtest::source_dir()) / "include" / name;
      if (!trusted(name)) bad->push_back(fmt::format("{} includes {}", file.string(), name));
    } else if (m[1] == "\"") {
      next = file.parent_path() / name;
      key = fs::relative(next, zbtest::source_dir()).lexically_normal().string();
      if (key.rfind("src/cert/checker/", 0) != 0 && key.rfind("include/zetabraid/cert/checker/", 0) != 0)
        bad->push_back(fmt::format("{} includes {} (outside the checker)", file.string(), name));
    } else {
      continue;  // system or third-party
    }
    if (seen->insert(key).second && fs::exists(next)) project_includes(next, seen, bad);
  }
}

std::vector<std::string> boundary_violations(const std::vector<fs::path>& files) {
  std::set<std::string> seen;
  std::vector<std::string> bad;
  for (const auto& f : files) project_includes(f, &seen, &bad);
  return bad;
}

}  // namespace

TEST_CASE("the checker includes only its trusted base, transitively") {
  std::vector<fs::path> files;
  for (const char* dir : {"/src/cert/checker", "/include/zetabraid/cert/checker"})
    for (const auto& e : fs::directory_iterator(zbtest::source_dir() + dir)) files.push_back(e.path());
  REQUIRE(files.size() >= 10);
  std::vector<std::string> bad = boundary_violations(files);
  CAPTURE(fmt::format("{}", fmt::join(bad, "; ")));
  CHECK(bad.empty());
  // negative control: the producer's certify.cpp reaches the word-product engine, and the scanner says so
  std::vector<std::string> producer = boundary_violations({zbtest::source_dir() + "/src/cert/certify.cpp"});
  CHECK_FALSE(producer.empty());
}

TEST_CASE("verify: hostile numbers in an interval claim are rejected, never a crash") {
  const std::string d = cert_dir();
  ojson j0 = make_cert(d, "s1", "interval");
  REQUIRE(j0["claim"]["verdict"] == "leakage-bounded");
  REQUIRE(verify_json(d, j0).status == 0);
  // each would have reached Arb, GMP or a double conversion with an infinite or absurd value
  for (const std::string& ball : std::vector<std::string>{"[1e400 +/- 1]", "[+/- inf]", "[1 +/- nan]", "[nan +/- 1]", "[1e-99999999 +/- 1]",
                                 "[+/- 1e4000000]", "[0.5 +/- 1e-30", "[" + std::string(5000, '7') + " +/- 1]",
                                 "inf", "[+/- 1e-30] junk"}) {
    CAPTURE(ball);
    ojson j = j0;
    j["claim"]["leakage"]["ball"] = ball;
    CHECK(rejected(verify_json(d, j)));
  }
  for (const std::string upper : {"1e400000000", "inf", "nan", "-1", "1e-99999999", "0x10", ""}) {
    CAPTURE(upper);
    ojson j = j0;
    j["claim"]["leakage"]["upper"] = upper;
    CHECK(rejected(verify_json(d, j)));
  }
  ojson j = j0;
  j["method"]["precision_bits"] = 18446744073709551615ull;
  CHECK(rejected(verify_json(d, j)));
}

TEST_CASE("verify: modular proofs with overflowing positions or junk in informational fields are rejected") {
  const std::string d = cert_dir();
  ojson leak = make_cert(d, "s2", "modular");
  REQUIRE(leak["proof"]["kind"] == "nonzero-image");
  REQUIRE(verify_json(d, leak).status == 0);
  const std::vector<std::pair<std::string, std::function<void(ojson&)>>> leak_edits = {
      // row * columns + col wraps around 2^64 onto a real entry
      {"row 2^63", [](ojson& x) { x["proof"]["row"] = 9223372036854775808ull; }},
      {"row 2^64-1", [](ojson& x) { x["proof"]["row"] = 18446744073709551615ull; }},
      {"col 2^63", [](ojson& x) { x["proof"]["col"] = 9223372036854775808ull; }},
      {"value as text", [](ojson& x) { x["proof"]["value"] = x["proof"]["value"].dump(); }},
      {"value negative", [](ojson& x) { x["proof"]["value"] = -1; }},
      {"extra root", [](ojson& x) { x["proof"]["prime"]["roots"].push_back(1); }},
  };
  for (const auto& [what, edit] : leak_edits) {
    CAPTURE(what);
    ojson j = leak;
    edit(j);
    CHECK(rejected(verify_json(d, j)));
  }
  // four kept columns: row + 2^62 addresses the same entry once row * 4 + col wraps around 2^64
  zbtest::run(fmt::format("cd {} && {} certify --model m.toml --anyons 't t t t t t' --total 1 --keep '1-3:t,4-6:t' "
                          "--word s3 --method modular --out q.json",
                          d, zbtest::cli()));
  ojson wide = ojson::parse(zbtest::slurp(d + "/q.json"));
  REQUIRE(wide["keep"]["dimension"] == 4);
  wide["proof"]["row"] = wide["proof"]["row"].get<std::uint64_t>() + (std::uint64_t(1) << 62);
  CHECK(rejected(verify_json(d, wide)));
  ojson free = make_cert(d, "s1", "modular");
  REQUIRE(free["proof"]["kind"] == "norm-bound");
  REQUIRE(verify_json(d, free).status == 0);
  const std::vector<std::pair<std::string, std::function<void(ojson&)>>> free_edits = {
      {"multiplier junk", [](ojson& x) { x["proof"]["multiplier"] = "abc"; }},
      {"multiplier zero", [](ojson& x) { x["proof"]["multiplier"] = "0"; }},
      {"norm_bound junk", [](ojson& x) { x["proof"]["norm_bound"] = "junk"; }},
      {"norm_bound exponent", [](ojson& x) { x["proof"]["norm_bound"] = "1*2^x"; }},
      {"bound_bits text", [](ojson& x) { x["proof"]["bound_bits"] = "7"; }},
      {"bound_bits wrong", [](ojson& x) { x["proof"]["bound_bits"] = x["proof"]["bound_bits"].get<long>() + 1; }},
  };
  for (const auto& [what, edit] : free_edits) {
    CAPTURE(what);
    ojson j = free;
    edit(j);
    CHECK(rejected(verify_json(d, j)));
  }
}

TEST_CASE("verify: duplicate keys, missing keys and non-objects are rejected with a reason") {
  const std::string d = cert_dir();
  ojson j0 = make_cert(d, "s1", "exact");
  const std::string text = j0.dump(2) + "\n";
  REQUIRE(verify_text(d, text).status == 0);
  // JSON objects with a repeated name: the parser keeps the last one silently; a certificate must not
  std::string dup = text;
  dup.replace(dup.find("\"verdict\": \"leak-free\""), 22, "\"verdict\": \"leaks\", \"verdict\": \"leak-free\"");
  auto r = verify_text(d, dup);
  CHECK(rejected(r));
  CHECK(r.out.find("duplicate key 'verdict'") != std::string::npos);
  std::string dup_top = text;
  dup_top.insert(1, "\"version\": 2,");
  CHECK(rejected(verify_text(d, dup_top)));
  // {} names what is missing
  r = verify_text(d, "{}");
  CHECK(rejected(r));
  for (const char* key : {"format", "version", "model", "word", "claim", "proof"}) CHECK(r.out.find(key) != std::string::npos);
  CHECK(r.out.find("missing keys") != std::string::npos);
  for (const char* junk : {"[]", "null", "\"x\"", "1", ""}) CHECK(rejected(verify_text(d, junk)));
  // exact values only in the canonical form of section 6 (one text per value): "2/2" for 1 is a deviation
  ojson j = j0;
  REQUIRE(j["hints"]["image"][0][0].is_string());
  j["hints"]["image"][0][0] = "(" + j["hints"]["image"][0][0].get<std::string>() + ")*2/2";
  r = verify_json(d, j);
  CHECK(rejected(r));
  CHECK(r.out.find("canonical form") != std::string::npos);
  j = j0;
  j["claim"].erase("leakage");
  r = verify_json(d, j);
  CHECK(rejected(r));
  CHECK(r.out.find("missing key leakage in claim") != std::string::npos);
}

TEST_CASE("verify: the model is read only beside the certificate (or from --model), as a bounded regular file") {
  const std::string d = cert_dir();
  ojson j0 = make_cert(d, "s1", "exact");
  REQUIRE(j0["model"]["file"] == "m.toml");
  CHECK(verify_json(d, j0).status == 0);
  fs::create_directories(d + "/sub");
  fs::create_directories(d + "/dir");
  if (!fs::exists(d + "/fifo")) CHECK(::mkfifo((d + "/fifo").c_str(), 0600) == 0);
  if (!fs::is_symlink(d + "/zero")) fs::create_symlink("/dev/zero", d + "/zero");
  // named files the certificate may not reach, devices, FIFOs (would block), folders, missing files: exit 2
  for (const std::string& file : std::vector<std::string>{"/proc/self/environ", "/etc/shadow", "/dev/zero", "../m.toml", "sub/../m.toml",
                                 d + "/m.toml", "fifo", "zero", "dir", "missing.toml"}) {
    CAPTURE(file);
    ojson j = j0;
    j["model"]["file"] = file;
    auto r = verify_json(d, j);
    CHECK(r.status == 2);
    CHECK(r.out.find("VERIFIED") == std::string::npos);
  }
  // --model names the model explicitly: then the stored name is not used at all
  ojson j = j0;
  j["model"]["file"] = "/proc/self/environ";
  CHECK(verify_json(d, j, "--model " + d + "/m.toml").status == 0);
  CHECK(verify_json(d, j0, "--model " + d + "/dir").status == 2);
  // terminal escapes in names never reach the terminal: an ANSI sequence cannot redraw REJECTED as VERIFIED
  j = j0;
  j["model"]["file"] = "m\x1b[2K\rVERIFIED: fine.toml";
  auto r = verify_json(d, j);
  CHECK(r.status == 1);
  CHECK(r.out.find('\x1b') == std::string::npos);
  CHECK(r.out.find('\r') == std::string::npos);
  j = j0;
  j["space"]["anyons"][0] = "t\x1b[2K\r";
  r = verify_json(d, j);
  CHECK(rejected(r));
  CHECK(r.out.find('\x1b') == std::string::npos);
  r = zbtest::run(fmt::format("{} verify --model '{}/m\x1b[2K' {}/t.json", zbtest::cli(), d, d), true);
  CHECK(r.status == 2);
  CHECK(r.out.find('\x1b') == std::string::npos);
}

TEST_CASE("verify: certificate files are bounded regular files") {
  const std::string d = cert_dir();
  const std::string big = d + "/big.json";
  {
    std::ofstream(big).close();
    fs::resize_file(big, kMaxCertificateFileBytes + 1);  // sparse: no disk used
  }
  auto r = zbtest::run(fmt::format("timeout 20 {} verify {}", zbtest::cli(), big), true);
  CHECK(r.status == 2);
  CHECK(r.out.find("limit") != std::string::npos);
  fs::remove(big);
  if (!fs::exists(d + "/cfifo")) CHECK(::mkfifo((d + "/cfifo").c_str(), 0600) == 0);
  CHECK(zbtest::run(fmt::format("timeout 20 {} verify {}/cfifo", zbtest::cli(), d)).status == 2);
  CHECK(zbtest::run(fmt::format("timeout 20 {} verify {}", zbtest::cli(), d)).status == 2);
}

TEST_CASE("verify options: --plain-interval and --via") {
  const std::string d = cert_dir();
  ojson iv = make_cert(d, "s1 s2 s1", "interval");
  auto r = verify_json(d, iv);
  CHECK(r.status == 0);
  CHECK(r.out.find("one error bound per column") != std::string::npos);
  r = verify_json(d, iv, "--plain-interval");
  CHECK(r.status == 0);
  CHECK(r.out.find("plain ball product") != std::string::npos);
  CHECK(parse_route("modular") == RecheckRoute::kModular);
  CHECK(route_name(RecheckRoute::kExact) == "exact");
  CHECK_THROWS_AS(parse_route("Exact"), InputError);
  std::filesystem::remove_all(d);
}
