// Hostile inputs to the command line: every case has its documented exit code (README "Exit codes": 1 claim
// false, 2 input error, 3 resource limit) and a fragment of the message the user must see. No case may crash,
// hang (each runs under `timeout`), or leave a partial output file.
#include <doctest/doctest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/helpers.hpp"

namespace {

namespace fs = std::filesystem;
using json = nlohmann::json;

struct Case {
  std::string what;      // the attack
  std::string args;      // arguments after `zetabraid`
  int code;              // expected exit code
  std::string fragment;  // must occur in stdout+stderr
};

std::string dir() {
  static std::string d = [] {
    std::string p = zbtest::tmpdir("zb_hostile");
    for (auto& e : fs::directory_iterator(p)) fs::remove_all(e.path());
    return p;
  }();
  return d;
}
std::string path(const std::string& name) { return dir() + "/" + name; }
std::string fib() { return zbtest::source_dir() + "/models/fibonacci.toml"; }
std::string q(const std::string& s) { return "'" + s + "'"; }

void check_case(const Case& c) {
  INFO("case: " << c.what);
  INFO("args: " << c.args);
  zbtest::RunResult r = zbtest::run("cd " + dir() + " && timeout 30 " + zbtest::cli() + " " + c.args, true);
  INFO("output: " << r.out);
  CHECK(r.status != 124);  // timeout: a hang
  CHECK(r.status == c.code);
  CHECK(r.out.find(c.fragment) != std::string::npos);
  CHECK(r.out.find('\x1b') == std::string::npos);  // no terminal escape sequence from the input reaches the user
}

// A model file with `body` after a valid header (conductor 5, labels 1 and t as in the Fibonacci model).
std::string model_with(const std::string& name, const std::string& extra) {
  std::string text = zbtest::slurp(fib());
  std::string p = path(name);
  zbtest::spit(p, extra + "\n" + text);
  return p;
}

const std::string kCertifyFib = "certify --model " + std::string(ZB_SOURCE_DIR) +
                                "/models/fibonacci.toml --anyons 't t t t t t' --total t --keep '1-3:t,4-6:t' ";

}  // namespace

TEST_CASE("hostile model files") {
  ::mkfifo(path("fifo.toml").c_str(), 0600);
  fs::create_directories(path("dir.toml"));
  zbtest::spit(path("empty.toml"), "");
  zbtest::spit(path("junk.toml"), std::string("\x00\x01\xff\xfe[[[", 8));
  zbtest::spit(path("syntax.toml"), "format = \"zetabraid-model 1\"\nlabels = [\"1\", \n");
  zbtest::run("truncate -s 80M " + path("huge.toml"));
  std::string ansi = path("ansi.toml");
  {
    std::string text = zbtest::slurp(fib());
    auto at = text.find("\nname = ");
    REQUIRE(at != std::string::npos);
    auto end = text.find('\n', at + 1);
    text.replace(at + 1, end - at - 1, "name = \"\\u001b[2K\\rVERIFIED\"");
    zbtest::spit(ansi, text);
  }
  std::vector<Case> cases = {
      {"missing model file", "model check " + path("missing.toml"), 2, "missing.toml"},
      {"directory as model", "model check " + path("dir.toml"), 2, "directory"},
      {"FIFO as model (must not block)", "model check " + path("fifo.toml"), 2, "not a regular file"},
      {"/dev/zero as model (must not read forever)", "model check /dev/zero", 2, "not a regular file"},
      {"model larger than the limit", "model check " + path("huge.toml"), 2, "limit"},
      {"empty model file", "model check " + path("empty.toml"), 2, "empty.toml"},
      {"binary junk", "model check " + path("junk.toml"), 2, "junk.toml"},
      {"TOML syntax error names file:line", "model info " + path("syntax.toml"), 2, "syntax.toml:"},
      {"model name with a terminal escape sequence", "model info " + ansi, 0, "\\x1b"},
  };
  for (const Case& c : cases) check_case(c);
}

TEST_CASE("hostile expressions") {
  std::string deep(300, '(');
  deep += "1" + std::string(300, ')');
  std::string ok_depth(200, '(');
  ok_depth += "1" + std::string(200, ')');
  std::vector<Case> cases = {
      {"negative conductor", "field eval --conductor -5 1", 2, "conductor"},
      {"zero conductor", "field eval --conductor 0 1", 2, "conductor"},
      {"conductor with phi(N) > 1024", "field eval --conductor 2053 1", 3, "1024"},
      {"huge power of a huge power", "field eval --conductor 5 " + q("(2^100000)^100000"), 3, "bit"},
      {"repeated squaring", "field eval --conductor 5 " + q("((((((2^1000)^1000)^1000)^1000)^1000)^1000)"), 3, "bit"},
      {"nesting deeper than the limit", "field eval --conductor 5 " + q(deep), 2, "256"},
      {"nesting within the limit", "field eval --conductor 5 " + q(ok_depth), 0, "1"},
      {"decimals are not exact", "field eval --conductor 5 1.5", 2, "decimal"},
      {"division by zero", "field eval --conductor 5 " + q("1/(zeta^5-1)"), 2, "zero"},
      {"exponent beyond the limit", "field eval --conductor 5 " + q("zeta^1000001"), 2, "exponent"},
      {"empty expression", "field eval --conductor 5 ''", 2, "column"},
      {"i needs 4 | N", "field eval --conductor 5 i", 2, "i"},
      {"square root of a fraction", "field eval --conductor 12 " + q("sqrt(4/3)*sqrt(3) - 2"), 0, "0"},
      // (zeta + zeta^11) = sqrt(3) for N = 12, and ((sqrt3 - 1)/2)^2 = 1 - sqrt3/2: the difference is exactly 0.
      {"a square with a denominator is recognised",
       "field eval --conductor 12 " + q("sqrt(1 - (zeta+zeta^11)/2) - ((zeta+zeta^11)-1)/2"), 0, "[0 +/- 0]"},
  };
  for (const Case& c : cases) check_case(c);
}

TEST_CASE("hostile words, keep specs and options of certify") {
  ::mkfifo(path("fifo.word").c_str(), 0600);
  fs::create_directories(path("dir.word"));
  zbtest::spit(path("bad.word"), "# a comment\ns1 s2\ns1 s9 s2\n");
  zbtest::spit(path("bad.keep"), "1, 0, 0, 0, 0, 0, 0, 0\n0, , 1, 0, 0, 0, 0, 0\n");
  ::mkfifo(path("out.fifo").c_str(), 0600);
  std::string deep(300, '(');
  deep += "s1" + std::string(300, ')');
  std::string many_anyons, huge_anyons;
  for (int i = 0; i < 300; ++i) many_anyons += "t ";
  for (int i = 0; i < 20000; ++i) huge_anyons += "t ";
  const std::string& c = kCertifyFib;
  std::vector<Case> cases = {
      {"generator out of range", c + "--word 's1 s9'", 2, "column 4"},
      {"malformed word", c + "--word 's1 s2^'", 2, "column"},
      {"word longer than the letter limit", c + "--word '(s1 s2)^100000000'", 3, "letters"},
      {"word nesting deeper than the limit", c + "--word " + q(deep), 2, "nest"},
      {"word file is a directory", c + "--word-file " + path("dir.word"), 2, "directory"},
      {"word file is a FIFO (must not block)", c + "--word-file " + path("fifo.word"), 2, "not a regular file"},
      {"word-file error names file and line", c + "--word-file " + path("bad.word"), 2, "bad.word:3:"},
      {"keep file with an empty entry names line and column", c.substr(0, c.find("--keep")) +
                                                                  "--keep-file " + path("bad.keep") + " --word s1",
       2, "bad.keep:2: column 3: empty entry"},
      {"keep file is a directory", c.substr(0, c.find("--keep")) + "--keep-file " + path("dir.word") + " --word s1", 2,
       "directory"},
      {"overlapping keep groups", c.substr(0, c.find("--keep")) + "--keep '1-3:t,3-6:t' --word s1", 2, "overlaps"},
      {"keep and keep-file together", c + "--keep-file " + path("bad.keep") + " --word s1", 2, "not both"},
      {"unknown anyon label", "certify --model " + fib() + " --anyons 't x t' --total t --word s1", 2, "unknown label"},
      {"300 anyons", "certify --model " + fib() + " --anyons " + q(many_anyons) + " --total t --word s1", 3, "256"},
      {"20000 anyons", "certify --model " + fib() + " --anyons " + q(huge_anyons) + " --total t --word s1", 3, "anyons"},
      {"zero threads", c + "--word s1 --threads 0", 2, "--threads"},
      {"negative threads", c + "--word s1 --threads -1", 2, "--threads"},
      {"precision zero", c + "--word s1 --method interval --precision 0", 2, "--precision"},
      {"precision 10^8", c + "--word s1 --method interval --precision 100000000", 2, "--precision"},
      {"empty --out", c + "--word s1 --out ''", 2, "--out"},
      {"--out is a directory", c + "--word s1 --out " + path("dir.word"), 2, "not a regular file"},
      {"--out is a FIFO (must not block)", c + "--word s1 --out " + path("out.fifo"), 2, "not a regular file"},
      {"--out /dev/null discards", c + "--word s1 --out /dev/null", 0, "leak-free"},
      {"unknown method", c + "--word s1 --method fast", 2, "method"},
      {"su2 level above the maximum", "model make su2 --level 13", 2, "level"},
      {"su2 level zero", "model make su2 --level 0", 2, "level"},
      {"braid check on 300 anyons", "braid check --model " + fib() + " --anyons " + q(many_anyons) + " --total t", 3,
       "256"},
  };
  for (const Case& k : cases) check_case(k);
  struct stat st {};
  REQUIRE(::stat("/dev/null", &st) == 0);
  CHECK(S_ISCHR(st.st_mode));
  size_t leftovers = 0;
  for (auto& e : fs::directory_iterator(dir()))
    if (e.path().filename().string().rfind(".zetabraid-tmp-", 0) == 0) ++leftovers;
  CHECK(leftovers == 0);
}

TEST_CASE("hostile certificates") {
  // A genuine certificate to tamper with.
  fs::copy_file(fib(), path("fibonacci.toml"), fs::copy_options::overwrite_existing);
  zbtest::RunResult made = zbtest::run("cd " + dir() + " && " + zbtest::cli() +
                                       " certify --model fibonacci.toml --anyons 't t t t' --total t --word 's1 s3' "
                                       "--method interval --out good.json");
  REQUIRE(made.status == 0);
  json good = json::parse(zbtest::slurp(path("good.json")));
  auto tampered = [&](const std::string& name, auto&& edit) {
    json j = good;
    edit(j);
    zbtest::spit(path(name), j.dump(2));
    return path(name);
  };
  ::mkfifo(path("model.fifo").c_str(), 0600);
  fs::create_directories(path("certdir.json"));
  zbtest::spit(path("dup.json"), "{\"format\": \"zetabraid-certificate\", \"format\": \"x\"}");
  zbtest::spit(path("notjson.json"), "{\"format\": ");
  zbtest::spit(path("empty.json"), "{}");
  std::vector<Case> cases = {
      {"the genuine certificate verifies", "verify " + path("good.json"), 0, "VERIFIED"},
      {"empty object names missing keys", "verify " + path("empty.json"), 1, "format"},
      {"not JSON", "verify " + path("notjson.json"), 1, "REJECTED"},
      {"duplicate keys", "verify " + path("dup.json"), 1, "duplicate"},
      {"certificate is a directory", "verify " + path("certdir.json"), 2, "directory"},
      {"enclosure beyond double range",
       "verify " + tampered("big.json", [](json& j) { j["result"]["leakage"]["ball"] = "[1e400 +/- 1]"; }), 1,
       "REJECTED"},
      {"infinite radius",
       "verify " + tampered("inf.json", [](json& j) { j["result"]["leakage"]["ball"] = "[+/- inf]"; }), 1, "REJECTED"},
      {"NaN radius",
       "verify " + tampered("nan.json", [](json& j) { j["result"]["leakage"]["ball"] = "[1 +/- nan]"; }), 1,
       "REJECTED"},
      {"huge upper bound",
       "verify " + tampered("upper.json", [](json& j) { j["result"]["leakage"]["upper"] = "1e999999999999"; }), 1,
       "REJECTED"},
      {"model path outside the certificate's folder",
       "verify " + tampered("environ.json", [](json& j) { j["model"]["file"] = "/proc/self/environ"; }), 2, "model"},
      {"model path climbing out of the folder",
       "verify " + tampered("climb.json", [](json& j) { j["model"]["file"] = "../../etc/shadow"; }), 2, "model"},
      {"model path is a FIFO (must not block)",
       "verify " + tampered("fifo.json", [](json& j) { j["model"]["file"] = "model.fifo"; }), 2, "not a regular file"},
      {"model path is /dev/zero",
       "verify " + tampered("zero.json", [](json& j) { j["model"]["file"] = "/dev/zero"; }), 2, "model"},
      {"model path is a directory",
       "verify " + tampered("mdir.json", [](json& j) { j["model"]["file"] = "certdir.json"; }), 2, "directory"},
      {"terminal escape in the model path",
       "verify " + tampered("esc.json", [](json& j) { j["model"]["file"] = "\x1b[2K\rVERIFIED.toml"; }), 1, "\\x1b"},
      {"model hash mismatch",
       "verify " + tampered("sha.json", [](json& j) { j["model"]["sha256"] = std::string(64, '0'); }), 1, "REJECTED"},
      {"verdict flipped",
       "verify " + tampered("flip.json", [](json& j) { j["result"]["verdict"] = "leak-free"; }), 1, "REJECTED"},
  };
  for (const Case& c : cases) check_case(c);
}
