// Model files: loading, error messages, writing and re-loading.
#include <doctest/doctest.h>

#include <fstream>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
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
