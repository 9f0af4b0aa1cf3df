// Model files: loading, error messages, writing and re-loading.
#include <doctest/doctest.h>

#include <fmt/format.h>
#include <sys/stat.h>

#include <chrono>
#include <filesystem>
#include <fstream>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/io/sha256.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {
const char* kFib = R"M(
labels = ["1", "t"]
f_unlisted = "1"
r_unlisted = "1"
[field]
conductor = 5
[constants]
phi = "1 + zeta + zeta^4"
[fusion]
"t t" = ["1", "t"]
[F]
"t t t t" = [["1/phi", "sqrt(1/phi)"], ["sqrt(1/phi)", "-1/phi"]]
[R]
"t t" = ["exp(-4*pi*i/5)", "exp(3*pi*i/5)"]
)M";

std::string error_of(const std::string& text) {
  try {
    parse_model(text, "m.toml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
}  // namespace

TEST_CASE("a small Fibonacci text loads with defaults filled in") {
  Model m = parse_model(kFib, "fib");
  CHECK(m.label_count() == 2);
  CHECK(m.fusion(1, 1, 0) == 1);
  CHECK(m.fusion(1, 1, 1) == 1);
  CHECK(m.fusion(0, 1, 1) == 1);  // unit default
  CHECK(m.fusion(1, 0, 1) == 1);
  REQUIRE(m.f_symbol(1, 1, 1, 1, 0, 0));
  // phi^-1 written independently as (sqrt(5) - 1)/2 (Kitaev 2006: F^{ttt}_t[1,1] = 1/phi).
  Scalar inv_phi = parse_expression("(sqrt(5) - 1)/2", m.field);
  CHECK(*m.f_symbol(1, 1, 1, 1, 0, 0) == inv_phi);
  REQUIRE(m.f_symbol(0, 1, 1, 0, 1, 0));  // [F^{1tt}_1]_{t1}: admissible, normalised to 1
  CHECK(m.f_symbol(0, 1, 1, 0, 1, 0)->is_one());
  CHECK(m.f_symbol(0, 1, 1, 0, 1, 1) == nullptr);  // f = t is not admissible (1 x t does not contain 1)
  CHECK(m.f_given.count({0, 1, 1, 1, 1, 1}) == 1);
  CHECK(check_model(m).ok);
}

TEST_CASE("loading errors name the file, the line and the key") {
  std::string e = error_of("labels = [\"1\"]\n[field]\nconductor = 5\n[fusion]\n[F]\n\"1 1 1 1\" = \"zeta +\"\n");
  CHECK(e.find("m.toml:6") != std::string::npos);
  CHECK(e.find("F.\"1 1 1 1\"") != std::string::npos);
  CHECK(e.find("column") != std::string::npos);

  e = error_of("labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t x\" = [\"1\"]\n");
  CHECK(e.find("m.toml:5") != std::string::npos);
  CHECK(e.find("unknown label \"x\"") != std::string::npos);

  e = error_of("labels = [\"1\"]\n[field]\nconductor = 0\n[fusion]\n");
  CHECK(e.find("m.toml:3: field.conductor") != std::string::npos);

  e = error_of("labels = [\"1\"]\n[fusion]\n");
  CHECK(e.find("field") != std::string::npos);

  e = error_of("labels = [\"1\", \"1\"]\n[field]\nconductor = 3\n[fusion]\n");
  CHECK(e.find("appears twice") != std::string::npos);

  // a 2x2 block given as 1x2
  e = error_of("labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t t\" = [\"1\", \"t\"]\n[F]\n"
               "\"t t t t\" = [[\"1\", \"2\"]]\n");
  CHECK(e.find("2x2 matrix") != std::string::npos);

  e = error_of("labels = [\"1\"]\n[field]\nconductor = 3\n[fusion]\n[bogus]\n");
  CHECK(e.find("bogus: unknown key") != std::string::npos);

  e = error_of("labels = [\"1\" \n[field]\n");
  CHECK(e.find("not valid TOML") != std::string::npos);

  e = error_of("labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t t\" = [\"1\", \"1\"]\n");
  CHECK(e.find("multiplicities") != std::string::npos);
}

TEST_CASE("written models load back to the same data") {
  for (int k : {1, 2, 3}) {
    Model m = make_su2(k);
    Model back = parse_model(model_to_toml(m), "written");
    REQUIRE(back.label_count() == m.label_count());
    CHECK(back.labels == m.labels);
    CHECK(back.f_given == m.f_given);
    CHECK(back.f_symbols().size() == m.f_symbols().size());
    for (const auto& [key, v] : m.f_symbols()) {
      const Scalar* w = back.f_symbol(key[0], key[1], key[2], key[3], key[4], key[5]);
      REQUIRE(w);
      // different Field objects: compare through the canonical text
      CHECK(w->str() == v.str());
    }
    for (const auto& [key, v] : m.r_symbols()) {
      const Scalar* w = back.r_symbol(key[0], key[1], key[2]);
      REQUIRE(w);
      CHECK(w->str() == v.str());
    }
  }
}

TEST_CASE("copies of a model keep working F lookups") {
  Model* m = new Model(make_su2(2));
  Model c = *m;
  delete m;
  REQUIRE(c.f_symbol(1, 1, 1, 1, 0, 0));
  CHECK(check_model(c).ok);
}

TEST_CASE("bundled model files load and the CLI rejects bad input with exit 2 and no output file") {
  std::string dir = zbtest::source_dir();
  for (const char* f : {"fibonacci", "ising", "su2_k3", "yang_lee", "toric_code", "three_fermion", "z5"})
    CHECK_NOTHROW(load_model(dir + "/models/" + f + ".toml"));
  auto r = zbtest::run(zbtest::cli() + " model check /nonexistent/file.toml");
  CHECK(r.status == 2);
  std::string bad = "/tmp/zb_model_test_bad.toml";
  std::ofstream(bad) << "labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t t\" = [\"1\", \"q\"]\n";
  r = zbtest::run(zbtest::cli() + " model check " + bad, true);
  CHECK(r.status == 2);
  CHECK(r.out.find(bad + ":5") != std::string::npos);
  std::remove(bad.c_str());
  std::string out = "/tmp/zb_model_test_out.toml";
  std::remove(out.c_str());
  r = zbtest::run(zbtest::cli() + " model make su2 --level 0 --out " + out);
  CHECK(r.status == 2);
  CHECK(!std::ifstream(out).good());
}

namespace {
double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}
std::string load_error(const std::string& path) {
  try {
    load_model(path);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
}  // namespace

TEST_CASE("model files are regular files of bounded size: FIFO, directory, /dev/zero and oversize are refused") {
  const std::string dir = zbtest::tmpdir("zb_load_test");
  const std::string fifo = dir + "/model.fifo";
  std::remove(fifo.c_str());
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  auto t0 = std::chrono::steady_clock::now();
  std::string e = load_error(fifo);  // nobody writes to it: a blocking open would hang here
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  CHECK(e.find("not a regular file") != std::string::npos);
  std::remove(fifo.c_str());
  CHECK(load_error(dir).find("is a directory") != std::string::npos);
  t0 = std::chrono::steady_clock::now();
  CHECK(load_error("/dev/zero").find("not a regular file") != std::string::npos);
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  const std::string big = dir + "/big.toml";
  std::ofstream(big) << "labels = [\"1\"]\n";
  std::filesystem::resize_file(big, kMaxModelFileBytes + 1);  // sparse: no disk space used
  t0 = std::chrono::steady_clock::now();
  CHECK(load_error(big).find("larger than the limit") != std::string::npos);
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  std::remove(big.c_str());
  // The CLI maps these to exit 2.
  auto r = zbtest::run(zbtest::cli() + " model check /dev/zero", true);
  CHECK(r.status == 2);
}

TEST_CASE("the model keeps the SHA-256 of exactly the bytes it parsed") {
  // FIPS 180-2, appendix B.1 (from memory): SHA-256("abc").
  CHECK(sha256_hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  const std::string path = zbtest::tmpdir("zb_load_test") + "/fib.toml";
  zbtest::spit(path, std::string(kFib) + "# trailing comment \xc3\xa9\n");
  Model m = load_model(path);
  CHECK(m.source_sha256.size() == 64);
  auto r = zbtest::run("sha256sum " + path);  // coreutils, outside the project
  if (r.status == 0) CHECK(r.out.substr(0, 64) == m.source_sha256);
  CHECK(parse_model(zbtest::slurp(path), "same").source_sha256 == m.source_sha256);
  CHECK(parse_model(kFib, "other").source_sha256 != m.source_sha256);  // negative control
  Model copy = m;
  CHECK(copy.source_sha256 == m.source_sha256);
  std::remove(path.c_str());
}

TEST_CASE("a duplicate TOML key is named with file:line (also quoted keys)") {
  std::string e = error_of("labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t t\" = [\"1\", \"t\"]\n"
                           "[R]\n\"t t 1\" = \"1\"\n\"t t t\" = \"zeta\"\n\"t t 1\" = \"zeta^2\"\n");
  CHECK(e.find("m.toml:9: R.\"t t 1\": this key is given twice") != std::string::npos);
  e = error_of("labels = [\"1\"]\n[field]\nconductor = 5\n[constants]\nab = \"1\"\nabc = \"2\"\nab = \"3\"\n[fusion]\n");
  CHECK(e.find("m.toml:7: constants.ab: this key is given twice") != std::string::npos);
  e = error_of("labels = [\"1\"]\n[field]\nconductor = 5\n[fusion]\n[field]\n");
  CHECK(e.find("m.toml:5: [field]: this table is given twice") != std::string::npos);
}

TEST_CASE("the bit budget bounds constants: chains of powers and of squarings exit 3 quickly") {
  const std::string head = "labels = [\"1\"]\n[field]\nconductor = 5\n[constants]\n";
  auto resource_error = [](const std::string& text, const ExpressionLimits& lim = {}) {
    auto t0 = std::chrono::steady_clock::now();
    std::string msg;
    try {
      parse_model(text, "m.toml", lim);
    } catch (const ResourceError& e) {
      msg = e.what();
    }
    CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
    return msg;
  };
  std::string e = resource_error(head + "a = \"2^100000\"\nb = \"a^100000\"\nc = \"b^100000\"\n[fusion]\n");
  CHECK(e.find("m.toml:6: constants.b: column 2: the power ^100000") != std::string::npos);
  CHECK(e.find(fmt::format("limit of {} bits", kDefaultMaxValueBits)) != std::string::npos);
  std::string sq = head + "c0 = \"3^60000\"\n";
  for (int i = 1; i < 30; ++i) sq += fmt::format("c{} = \"c{} * c{}\"\n", i, i - 1, i - 1);
  e = resource_error(sq + "[fusion]\n");
  CHECK(e.find("constants.c") != std::string::npos);
  CHECK(e.find("limit of") != std::string::npos);
  // A smaller limit through the loading API.
  ExpressionLimits small;
  small.max_bits = 5000;
  e = resource_error(head + "a = \"2^4000\"\nb = \"a * a\"\n[fusion]\n", small);
  CHECK(e.find("m.toml:6: constants.b") != std::string::npos);
  CHECK(e.find("limit of 5000 bits") != std::string::npos);
  CHECK_NOTHROW(parse_model(head + "a = \"2^4000\"\nb = \"a * a\"\n[fusion]\n", "m.toml"));
  // The CLI exits 3.
  const std::string path = zbtest::tmpdir("zb_load_test") + "/pow.toml";
  zbtest::spit(path, head + "a = \"2^100000\"\nb = \"a^100000\"\n[fusion]\n");
  auto r = zbtest::run(zbtest::cli() + " model check " + path, true);
  CHECK(r.status == 3);
  CHECK(r.out.find("limit of") != std::string::npos);
  std::remove(path.c_str());
}
