// The consistency checker: published models pass, damaged ones fail in the right check.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <fstream>
#include <map>
#include <random>
#include <sstream>

#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {
std::string read(const std::string& rel) {
  std::ifstream in(zbtest::source_dir() + "/" + rel);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}
std::string replace_once(std::string s, const std::string& from, const std::string& to) {
  size_t p = s.find(from);
  REQUIRE(p != std::string::npos);
  return s.replace(p, from.size(), to);
}
long failed(const CheckReport& r, const char* name) {
  const CheckCount* c = r.find(name);
  REQUIRE(c);
  return c->failed;
}
}  // namespace

TEST_CASE("Fibonacci F and R values are the published ones") {
  Model m = load_model(zbtest::source_dir() + "/models/fibonacci.toml");
  const FieldPtr& f = m.field;
  // Kitaev, Ann. Phys. 321 (2006) 2, and Nayak et al., Rev. Mod. Phys. 80 (2008) 1083:
  // F^{ttt}_t = [[phi^-1, phi^-1/2], [phi^-1/2, -phi^-1]], R^{tt}_1 = e^{-4 pi i/5}, R^{tt}_t = e^{3 pi i/5}.
  Scalar phi = parse_expression("(1 + sqrt(5))/2", f);
  Scalar inv = phi.inverse();
  const Scalar* s = m.f_symbol(1, 1, 1, 1, 0, 1);
  REQUIRE(s);
  CHECK(*s * *s == inv);
  CHECK(s->real_sign() > 0);
  CHECK(*m.f_symbol(1, 1, 1, 1, 0, 0) == inv);
  CHECK(*m.f_symbol(1, 1, 1, 1, 1, 1) == -inv);
  CHECK(*m.r_symbol(1, 1, 0) == parse_expression("exp(-4*pi*i/5)", f));
  CHECK(*m.r_symbol(1, 1, 1) == parse_expression("exp(3*pi*i/5)", f));
  CheckReport r = check_model(m);
  CHECK(r.ok);
  CHECK(r.find("pentagon")->count > 0);
  CHECK(r.find("hexagon")->count > 0);
  CHECK(r.find("unitarity")->count > 0);
}

TEST_CASE("Ising F and R values are the published ones") {
  Model m = load_model(zbtest::source_dir() + "/models/ising.toml");
  const FieldPtr& f = m.field;
  // Kitaev 2006 / Nayak et al. 2008: F^{sss}_s = (1/sqrt 2)[[1,1],[1,-1]], R^{ss}_1 = e^{-pi i/8},
  // R^{ss}_psi = e^{3 pi i/8}, R^{s psi}_s = -i, R^{psi psi}_1 = -1.
  Scalar h = parse_expression("1/sqrt(2)", f);
  CHECK(*m.f_symbol(1, 1, 1, 1, 0, 0) == h);
  CHECK(*m.f_symbol(1, 1, 1, 1, 2, 2) == -h);
  CHECK(*m.f_symbol(1, 2, 1, 2, 1, 1) == Scalar(f, -1));
  CHECK(*m.r_symbol(1, 1, 0) == parse_expression("exp(-pi*i/8)", f));
  CHECK(*m.r_symbol(1, 1, 2) == parse_expression("exp(3*pi*i/8)", f));
  CHECK(*m.r_symbol(1, 2, 1) == parse_expression("-i", f));
  CHECK(*m.r_symbol(2, 2, 0) == Scalar(f, -1));
  CHECK(check_model(m).ok);
}

TEST_CASE("every bundled model passes; the demo file fails") {
  for (const char* name : {"fibonacci", "ising", "su2_k1", "su2_k2", "su2_k3", "su2_k4", "su2_k3_even",
                           "su2_k4_cyclotomic", "z3", "z4", "z5", "toric_code", "three_fermion", "yang_lee",
                           "ising_nu3"}) {
    CAPTURE(name);
    CHECK(check_model(load_model(zbtest::source_dir() + "/models/" + name + ".toml")).ok);
  }
  CheckReport r = check_model(load_model(zbtest::source_dir() + "/models/demo/broken_fibonacci.toml"));
  CHECK(!r.ok);
  CHECK(failed(r, "pentagon") > 0);
}

TEST_CASE("negative controls: a flipped sign, a wrong phase, a missing entry, a false unitarity claim") {
  std::string fib = read("models/fibonacci.toml");
  // Flipped sign of one off-diagonal entry: still unitary up to sign pattern? No: F F^dagger changes, and the
  // pentagon fails.
  {
    Model m = parse_model(replace_once(fib, "[\"s\", \"-1/phi\"]", "[\"-s\", \"-1/phi\"]"), "flip");
    CheckReport r = check_model(m);
    CHECK(!r.ok);
    CHECK(failed(r, "pentagon") > 0);
    CHECK(failed(r, "f_invertible") == 0);
    REQUIRE(!r.failures.empty());
    CHECK(!r.failures[0].residual.empty());
    CHECK(r.failures[0].residual_ball.find("+/-") != std::string::npos);
  }
  // Wrong phase: R^{tt}_t = e^{-3 pi i/5} (complex conjugate). Pentagons do not see R; the hexagons fail.
  {
    Model m = parse_model(replace_once(fib, "\"exp(3*pi*i/5)\"", "\"exp(-3*pi*i/5)\""), "phase");
    CheckReport r = check_model(m);
    CHECK(!r.ok);
    CHECK(failed(r, "pentagon") == 0);
    CHECK(failed(r, "hexagon") > 0);
    CHECK(failed(r, "hexagon_reverse") > 0);
    CHECK(failed(r, "unitarity") == 0);
  }
  // The mirror image (every R conjugated) is consistent again: both hexagons hold.
  {
    std::string t = replace_once(fib, "\"exp(3*pi*i/5)\"", "\"exp(-3*pi*i/5)\"");
    t = replace_once(t, "\"exp(-4*pi*i/5)\"", "\"exp(4*pi*i/5)\"");
    CHECK(check_model(parse_model(t, "mirror")).ok);
  }
  // Ising with F^{sigma psi sigma}_psi = +1 (Nayak et al. list -1): pentagon fails.
  {
    Model m = parse_model(replace_once(read("models/ising.toml"), "\"sigma psi sigma psi\" = \"-1\"",
                                       "\"sigma psi sigma psi\" = \"1\""),
                          "ising+");
    CHECK(failed(check_model(m), "pentagon") > 0);
  }
  // A missing F entry (no f_unlisted): reported by f_admissible.
  {
    Model m = parse_model(replace_once(fib, "f_unlisted = \"1\"", ""), "missing");
    CheckReport r = check_model(m);
    CHECK(failed(r, "f_admissible") > 0);
  }
  // The cyclotomic gauge of SU(2)_3 is consistent but not unitary: claiming unitarity must fail.
  {
    Model m = make_su2(3, Su2Gauge::kCyclotomic);
    CHECK(check_model(m).ok);
    m.claims_unitary = true;
    CheckReport r = check_model(m);
    CHECK(failed(r, "unitarity") > 0);
    CHECK(failed(r, "pentagon") == 0);
  }
  // A non-admissible nonzero F entry.
  {
    std::string t = fib + "\n";
    t = replace_once(t, "[R]", "\"t t t 1 t 1\" = \"1\"\n\n[R]");
    CheckReport r = check_model(parse_model(t, "extra"));
    CHECK(failed(r, "f_admissible") == 1);
  }
  // Broken fusion rules: t x t = t only (no dual).
  {
    std::string t = replace_once(fib, "\"t t\" = [\"1\", \"t\"]\n\n[F]", "\"t t\" = [\"t\"]\n\n[F]");
    t = replace_once(t, "\"t t t t\" = [[\"1/phi\", \"s\"],\n             [\"s\", \"-1/phi\"]]", "");
    t = replace_once(t, "\"t t\" = [\"exp(-4*pi*i/5)\", \"exp(3*pi*i/5)\"]", "\"t t\" = \"1\"");
    CheckReport r = check_model(parse_model(t, "nodual"));
    CHECK(failed(r, "fusion_duals") > 0);
  }
}

TEST_CASE("hexagon failures agree between the integer and the number-field kernels") {
  Model m = make_su2(3);
  m.set_r_symbol(1, 1, 2, Scalar::zeta_power(m.field, 3));  // a wrong phase (the right one is zeta)
  CheckOptions a, b;
  b.force_field_kernel = true;
  CheckReport x = check_model(m, a), y = check_model(m, b);
  CHECK(x.find("hexagon")->failed > 0);
  CHECK(x.find("hexagon")->failed == y.find("hexagon")->failed);
  CHECK(x.find("hexagon_reverse")->failed == y.find("hexagon_reverse")->failed);
  REQUIRE(x.failures.size() == y.failures.size());
  for (size_t i = 0; i < x.failures.size(); ++i) CHECK(x.failures[i].residual == y.failures[i].residual);
}

TEST_CASE("failures are reported deterministically, whatever the thread count") {
  Model m = make_su2(4);
  // damage one pentagon-relevant entry
  const Scalar* v = m.f_symbol(1, 1, 1, 1, 0, 0);
  REQUIRE(v);
  m.set_f_symbol(1, 1, 1, 1, 0, 0, -*v);
  CheckOptions one, two;
  one.threads = 1;
  two.threads = 2;
  CheckReport a = check_model(m, one), b = check_model(m, two);
  REQUIRE(a.failures.size() == b.failures.size());
  CHECK(a.failures.size() > 0);
  for (size_t i = 0; i < a.failures.size(); ++i) {
    CHECK(a.failures[i].where == b.failures[i].where);
    CHECK(a.failures[i].residual == b.failures[i].residual);
  }
  CHECK(a.find("pentagon")->failed == b.find("pentagon")->failed);
}

namespace {
// Slow reference: every pentagon equation with Scalar arithmetic straight from the Model (no tables, no
// threads, no scaling), to compare with the fast kernel.
struct SlowResult {
  long count = 0, failed = 0;
  std::map<std::string, std::string> residuals;  // labels -> exact residual
};
SlowResult slow_pentagons(const Model& m) {
  SlowResult r;
  const int n = m.label_count();
  auto F = [&](int a, int b, int c, int d, int e, int f) {
    const Scalar* v = m.f_symbol(a, b, c, d, e, f);
    return v ? *v : Scalar(m.field);
  };
  auto N = [&](int a, int b, int c) { return m.fusion(a, b, c) > 0; };
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d)
          for (int e = 0; e < n; ++e)
            for (int f = 0; f < n; ++f)
              for (int g = 0; g < n; ++g) {
                if (!N(a, b, f) || !N(f, c, g) || !N(g, d, e)) continue;
                for (int l = 0; l < n; ++l)
                  for (int k = 0; k < n; ++k) {
                    if (!N(c, d, l) || !N(b, l, k) || !N(a, k, e)) continue;
                    Scalar res = F(f, c, d, e, g, l) * F(a, b, l, e, f, k);
                    for (int h = 0; h < n; ++h) res -= F(a, b, c, g, f, h) * F(a, h, d, e, g, k) * F(b, c, d, k, h, l);
                    ++r.count;
                    if (!res.is_zero()) {
                      ++r.failed;
                      auto L = [&](int x) { return m.labels[x]; };
                      r.residuals[fmt::format("a={} b={} c={} d={} e={} f={} g={} k={} l={}", L(a), L(b), L(c), L(d),
                                              L(e), L(f), L(g), L(k), L(l))] = res.str();
                    }
                  }
              }
  return r;
}
}  // namespace

TEST_CASE("the fast pentagon kernel agrees with a slow Scalar reference, residuals included") {
  std::mt19937_64 rng(20261202);  // fixed seed
  for (int k : {2, 3}) {
    for (bool cyc : {false, true}) {
      Model m = make_su2(k, cyc ? Su2Gauge::kCyclotomic : Su2Gauge::kUnitary);
      // damage one random stored F entry by adding a small random number
      auto it = m.f_symbols().begin();
      std::advance(it, static_cast<long>(rng() % m.f_symbols().size()));
      auto key = it->first;
      Scalar damaged = it->second + Scalar(m.field, zbtest::random_cyclo(m.field->cyclotomic(), rng, 2));
      m.set_f_symbol(key[0], key[1], key[2], key[3], key[4], key[5], damaged);
      SlowResult slow = slow_pentagons(m);
      for (bool field_kernel : {false, true}) {  // integer kernel (default here) and number-field kernel
      CAPTURE(field_kernel);
      CheckOptions opt;
      opt.max_failures = 100000;
      opt.force_field_kernel = field_kernel;
      CheckReport fast = check_model(m, opt);
      CAPTURE(k);
      CAPTURE(cyc);
      CHECK(fast.find("pentagon")->count == slow.count);
      CHECK(fast.find("pentagon")->failed == slow.failed);
      long compared = 0;
      for (const CheckFailure& f : fast.failures)
        if (f.check == "pentagon") {
          auto s = slow.residuals.find(f.where);
          REQUIRE(s != slow.residuals.end());
          CHECK(s->second == f.residual);
          ++compared;
        }
      CHECK(compared == slow.failed);
      CHECK(slow.failed > 0);  // the damage is seen
      }
    }
  }
}

TEST_CASE("hexagon counts and failures agree with a slow Scalar reference") {
  for (int k : {2, 3}) {
    Model m = make_su2(k);
    m.set_r_symbol(1, 1, 0, -*m.r_symbol(1, 1, 0));  // damage: flipped sign of R^{1/2 1/2}_0
    long count = 0, failed = 0;
    const int n = m.label_count();
    auto F = [&](int a, int b, int c, int d, int e, int f) {
      const Scalar* v = m.f_symbol(a, b, c, d, e, f);
      return v ? *v : Scalar(m.field);
    };
    auto R = [&](int a, int b, int c) {
      const Scalar* v = m.r_symbol(a, b, c);
      return v ? *v : Scalar(m.field);
    };
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d)
            for (int e = 0; e < n; ++e)
              for (int g = 0; g < n; ++g) {
                if (!m.fusion(a, c, e) || !m.fusion(e, b, d) || !m.fusion(c, b, g) || !m.fusion(a, g, d)) continue;
                Scalar res = R(c, a, e) * F(a, c, b, d, e, g) * R(c, b, g);
                for (int f = 0; f < n; ++f) res -= F(c, a, b, d, e, f) * R(c, f, d) * F(a, b, c, d, f, g);
                ++count;
                failed += !res.is_zero();
              }
    CheckReport r = check_model(m);
    CHECK(r.find("hexagon")->count == count);
    CHECK(r.find("hexagon")->failed == failed);
    CHECK(failed > 0);
  }
}

TEST_CASE("both arithmetics of the equation kernel agree with the slow reference on small fields and radicals") {
  // Q(zeta_3), Q(zeta_4) (antic's quadratic representation: reduced at every step), the Fibonacci file (a square
  // root of its own) and the Ising file (a generic field): one damaged F entry each, fixed seed.
  std::mt19937_64 rng(20270115);
  for (const char* name : {"z3", "z4", "fibonacci", "ising"}) {
    Model m = load_model(zbtest::source_dir() + "/models/" + name + ".toml");
    auto it = m.f_symbols().begin();
    std::advance(it, static_cast<long>(rng() % m.f_symbols().size()));
    auto key = it->first;
    Scalar damaged = it->second + Scalar(m.field, zbtest::random_cyclo(m.field->cyclotomic(), rng, 2));
    m.set_f_symbol(key[0], key[1], key[2], key[3], key[4], key[5], damaged);
    SlowResult slow = slow_pentagons(m);
    CHECK(slow.failed > 0);  // the damage is seen
    for (bool field_kernel : {false, true})
      for (int threads : {1, 2}) {
        CAPTURE(name);
        CAPTURE(field_kernel);
        CAPTURE(threads);
        CheckOptions opt;
        opt.max_failures = 100000;
        opt.force_field_kernel = field_kernel;
        opt.threads = threads;
        CheckReport fast = check_model(m, opt);
        CHECK(fast.find("pentagon")->count == slow.count);
        CHECK(fast.find("pentagon")->failed == slow.failed);
        for (const CheckFailure& f : fast.failures)
          if (f.check == "pentagon") {
            auto s = slow.residuals.find(f.where);
            REQUIRE(s != slow.residuals.end());
            CHECK(s->second == f.residual);
          }
      }
  }
}

TEST_CASE("thread counts follow the one thread policy") {
  Model m = load_model(zbtest::source_dir() + "/models/fibonacci.toml");
  CheckOptions opt;
  opt.threads = -1;
  CHECK_THROWS_AS(check_model(m, opt), InputError);  // negative counts are a usage error (detail/parallel.hpp)
  CHECK_THROWS_AS(check_equations_only(m, -2), InputError);
  opt.threads = 0;  // all cores, at most 8
  CHECK(check_model(m, opt).ok);
  CHECK(check_equations_only(m, 0).pentagons == check_model(m).find("pentagon")->count);
}
