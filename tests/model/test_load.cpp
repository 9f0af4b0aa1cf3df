// Model files (model/load.hpp): loading, error messages, writing and re-loading, bounded regular input files,
// the SHA-256 of the parsed bytes.
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
