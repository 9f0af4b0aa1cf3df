// Invariants of braided models (model/invariants.hpp) for SU(2)_k, Fibonacci, Ising, Yang-Lee and the toric code,
// against closed forms and PARI/GP; gauge independence; FS indicators from F against the twist formula.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/model/invariants.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {
// [n]_q with q = exp(pi i/(k+2)) computed directly in the model's field (independently of the generator).
Scalar qint(const FieldPtr& f, int k, int n) {
  long step = static_cast<long>(f->conductor()) / (2 * (k + 2));
  Scalar q = Scalar::zeta_power(f, step), qi = Scalar::zeta_power(f, -step);
  return (q.pow(n) - qi.pow(n)) / (q - qi);
}
}  // namespace

TEST_CASE("SU(2)_k invariants match the closed forms") {
  for (int k = 1; k <= 6; ++k) {
    CAPTURE(k);
    Model m = make_su2(k);
    const FieldPtr& f = m.field;
    Invariants inv = compute_invariants(m);
    const int n = k + 1;
    for (int a = 0; a < n; ++a) {
      // Quantum dimension d_j = [2j+1]_q (e.g. Bonderson's thesis; Kirillov-Reshetikhin 1989).
      CHECK(inv.dims[a] == qint(f, k, a + 1));
      // Twist theta_j = exp(2 pi i j(j+1)/(k+2)); with 2j = a: exp(2 pi i a(a+2)/(4(k+2))) = zeta^{a(a+2)}
      // for conductor 4(k+2) (common practice, conformal weight h_j = j(j+1)/(k+2)).
      CHECK(inv.twists[a] == Scalar::zeta_power(f, static_cast<long>(a) * (a + 2)));
      // Frobenius-Schur indicator (-1)^{2j} (common practice).
      CHECK(inv.fs[a] == (a % 2 ? -1 : 1));
    }
    // S_ab = sqrt(2/(k+2)) sin(pi (2a+1)(2b+1)/(k+2)) (closed form, e.g. Bonderson's thesis / Kac-Peterson),
    // written exactly: sin(x) = (e^{ix} - e^{-ix})/(2i).
    long step = static_cast<long>(f->conductor()) / (2 * (k + 2));
    Scalar pref = f->sqrt(Cyclo(f->cyclotomic(), 2, k + 2));
    Scalar two_i = Scalar(f, 2) * Scalar::zeta_power(f, static_cast<long>(f->conductor() / 4));
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b) {
        long e = static_cast<long>(a + 1) * (b + 1) * step;
        Scalar sin = (Scalar::zeta_power(f, e) - Scalar::zeta_power(f, -e)) / two_i;
        CHECK((*inv.S)(a, b) == pref * sin);
      }
    // Central charge c = 3k/(k+2) mod 8 (common practice for SU(2)_k).
    REQUIRE(inv.central_charge_known);
    long num = 3 * k, den = k + 2;
    long g = std::gcd(num, den);
    CHECK(inv.c_num == num / g);
    CHECK(inv.c_den == den / g);
    CHECK(inv.modular);
    CHECK(inv.verlinde_ok);  // Verlinde formula reproduces N exactly
  }
}

TEST_CASE("invariants do not depend on the gauge") {
  for (int k : {2, 3, 4}) {
    Invariants u = compute_invariants(make_su2(k)), c = compute_invariants(make_su2(k, Su2Gauge::kCyclotomic));
    for (size_t a = 0; a < u.dims.size(); ++a) {
      CHECK(u.dims[a].str() == c.dims[a].str());
      CHECK(u.twists[a].str() == c.twists[a].str());
      CHECK(u.fs[a] == c.fs[a]);
    }
    CHECK(u.c_num == c.c_num);
  }
}

TEST_CASE("Fibonacci, Ising, Yang-Lee, toric code: invariants from outside sources") {
  std::string dir = zbtest::source_dir() + "/models/";
  {
    Model m = load_model(dir + "fibonacci.toml");
    Invariants inv = compute_invariants(m);
    // d_t = phi, theta_t = e^{4 pi i/5}, c = 14/5 (Nayak et al. 2008; Rowell-Stong-Wang 2009).
    CHECK(inv.dims[1] == parse_expression("(1 + sqrt(5))/2", m.field));
    CHECK(inv.twists[1] == parse_expression("exp(4*pi*i/5)", m.field));
    CHECK(inv.c_num == 14);
    CHECK(inv.c_den == 5);
    CHECK(inv.fs[1] == 1);
  }
  {
    Model m = load_model(dir + "ising.toml");
    Invariants inv = compute_invariants(m);
    // d_sigma = sqrt 2, theta_sigma = e^{pi i/8}, theta_psi = -1, c = 1/2 (Kitaev 2006, table 1).
    CHECK(inv.dims[1] == parse_expression("sqrt(2)", m.field));
    CHECK(inv.twists[1] == parse_expression("exp(pi*i/8)", m.field));
    CHECK(inv.twists[2] == Scalar(m.field, -1));
    CHECK(inv.c_num == 1);
    CHECK(inv.c_den == 2);
  }
  {
    Model m = load_model(dir + "yang_lee.toml");
    Invariants inv = compute_invariants(m);
    // Galois conjugate of Fibonacci: d_t = (1 - sqrt 5)/2 < 0 (from memory: the Yang-Lee model is non-unitary).
    CHECK(inv.dims[1] == parse_expression("(1 - sqrt(5))/2", m.field));
    CHECK(inv.modular);
  }
  {
    Model m = load_model(dir + "toric_code.toml");
    Invariants inv = compute_invariants(m);
    // Toric code: theta_f = -1, S = (1/2)[[1,1,1,1],[1,1,-1,-1],[1,-1,1,-1],[1,-1,-1,1]], c = 0 (Kitaev 2003).
    CHECK(inv.twists[3] == Scalar(m.field, -1));
    CHECK((*inv.S)(1, 2) == Scalar(m.field, Cyclo(m.field->cyclotomic(), -1, 2)));
    CHECK(inv.c_num == 0);
  }
  {
    Model m = load_model(dir + "three_fermion.toml");
    Invariants inv = compute_invariants(m);
    CHECK(inv.c_num == 4);  // three-fermion model: c = 4 mod 8 (from memory: SO(8)_1)
    CHECK(inv.c_den == 1);
  }
  {
    // Z_4 with R^{ab} = i^{ab} has a degenerate S (theta_2 = 1 and 2 braids trivially with all): not modular.
    Invariants inv = compute_invariants(load_model(dir + "z4.toml"));
    CHECK(!inv.modular);
    CHECK(!inv.central_charge_known);
  }
}

TEST_CASE("PARI/GP as an independent oracle for S-matrix entries") {
  if (!zbtest::have_gp()) {
    MESSAGE("gp not found: skipped");
    return;
  }
  for (int k : {3, 5}) {
    Model m = make_su2(k);
    Invariants inv = compute_invariants(m);
    for (auto [a, b] : {std::pair{0, 0}, {1, 2}, {2, 2}, {k, 1}}) {
      std::string v = zbtest::gp(fmt::format(
          "default(realprecision, 40); print(sqrt(2/{0})*sin(Pi*{1}*{2}/{0}))", k + 2, a + 1, b + 1));
      // gp prints a decimal; our exact S entry's ball must contain it (to 1e-30).
      acb_t ball;
      acb_init(ball);
      (*inv.S)(a, b).ball(ball, 200);
      arb_t g;
      arb_init(g);
      arb_set_str(g, v.c_str(), 200);
      mag_set_d(arb_radref(g), 1e-30);
      CAPTURE(v);
      CHECK(arb_overlaps(acb_realref(ball), g));
      CHECK(arb_contains_zero(acb_imagref(ball)));
      // negative control: the neighbouring entry differs
      arb_t h;
      arb_init(h);
      arb_set_str(h, zbtest::gp(fmt::format("default(realprecision, 40); print(sqrt(2/{0})*sin(Pi*{1}*{2}/{0}) + 1/1000)",
                                            k + 2, a + 1, b + 1)).c_str(), 200);
      mag_set_d(arb_radref(h), 1e-30);
      CHECK(!arb_overlaps(acb_realref(ball), h));
      arb_clear(h);
      arb_clear(g);
      acb_clear(ball);
    }
  }
}

TEST_CASE("the integer spins of SU(2)_3 form a Fibonacci-type model") {
  // SU(2)_3 restricted to spins 0 and 1 has 1 x 1 = 0 + 1, d_1 = [3]_q = phi, and the same
  // central charge 14/5 mod 8 as the Fibonacci model (from memory; e.g. Rowell-Stong-Wang 2009).
  Model m = load_model(zbtest::source_dir() + "/models/su2_k3_even.toml");
  Invariants inv = compute_invariants(m);
  CHECK(inv.dims[1] == parse_expression("(1 + sqrt(5))/2", m.field));
  CHECK(inv.c_num == 14);
  CHECK(inv.c_den == 5);
  CHECK(inv.fs_twist_formula_ok);
}

TEST_CASE("FS indicators from F agree with the twist formula; a damaged twist is caught") {
  for (int k = 1; k <= 5; ++k) CHECK(compute_invariants(make_su2(k)).fs_twist_formula_ok);
  // negative control: change R^{1/2 1/2}_0 so that theta_{1/2} changes; the two ways then disagree (or
  // the model stops being modular), so the cross-check can fail.
  Model m = make_su2(2);
  m.set_r_symbol(1, 1, 0, -*m.r_symbol(1, 1, 0));
  Invariants inv = compute_invariants(m);
  CHECK((!inv.fs_twist_formula_ok || !inv.modular || !inv.verlinde_ok));
}
