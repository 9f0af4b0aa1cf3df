// Squares in Q(zeta_N) (field/square_test.hpp): decisions come with proofs (non-residue witnesses, verified roots);
// with denominators the non-residue witness must be taken on an integral representative.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <random>

#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/field/square_test.hpp"

using namespace zb;

namespace {

Scalar eval(const FieldPtr& f, const std::string& s) { return parse_expression(s, f); }

// A random element of Q(zeta_N) whose coefficients have random denominators up to 60 (primes included).
Cyclo random_fraction_cyclo(const CyclotomicFieldPtr& k, std::mt19937_64& rng) {
  std::uniform_int_distribution<long> num(-9, 9), den(1, 60);
  FmpqPolyT p;
  FmpqT q;
  for (long i = 0; i < k->degree(); ++i) {
    fmpq_set_si(q, num(rng), static_cast<unsigned long>(den(rng)));
    fmpq_poly_set_coeff_fmpq(p, i, q);
  }
  return Cyclo::from_poly(k, p);
}

// A random nonzero real element (u + conj(u)), or a random nonzero rational when that vanishes.
Cyclo random_real(const CyclotomicFieldPtr& k, std::mt19937_64& rng) {
  Cyclo u = random_fraction_cyclo(k, rng);
  Cyclo w = u + u.conj();
  if (w.is_zero()) w = Cyclo(k, static_cast<long>(rng() % 7) + 1, static_cast<long>(rng() % 11) + 1);
  return w;
}

// Slow, independent image of x at the witness: a(r) * den^-1 mod p by Horner on the coefficients a_k/den_k one by
// one (each coefficient inverted separately), then Euler's criterion through n_jacobi.
int slow_symbol(const Cyclo& x, const Witness& w) {
  FmpqPolyT poly;
  x.get_poly(poly);
  FmpqT c;
  ulong v = 0;
  for (long k = fmpq_poly_length(poly.get()) - 1; k >= 0; --k) {
    fmpq_poly_get_coeff_fmpq(c, poly, k);
    ulong d = fmpz_fdiv_ui(fmpq_denref(c.get()), w.p);
    REQUIRE(d != 0);
    ulong t = n_mulmod2(fmpz_fdiv_ui(fmpq_numref(c.get()), w.p), n_invmod(d, w.p), w.p);
    v = n_addmod(n_mulmod2(v, w.root, w.p), t, w.p);
  }
  return v == 0 ? 0 : n_jacobi(static_cast<mp_limb_signed_t>(v), w.p);
}

}  // namespace

TEST_CASE("legendre_at equals an independent slow evaluation, and is a character of the square class") {
  std::mt19937_64 rng(20261);
  for (unsigned long n : {3UL, 5UL, 8UL, 12UL, 15UL}) {
    auto k = CyclotomicField::make(n);
    WitnessList wl(n);
    for (int t = 0; t < 6; ++t) {
      Cyclo x = random_fraction_cyclo(k, rng);
      if (x.is_zero()) continue;
      FmpzT den;
      Cyclo y = integral_representative(x, den);
      for (size_t i = 0; i < 12; ++i) {
        const Witness& w = wl.at(i);
        CAPTURE(n);
        CAPTURE(x.str());
        int s = legendre_at(x, w);
        CHECK(s == slow_symbol(x, w));
        CHECK(s == legendre_at(y, w));
        CHECK(legendre_at(x * x, w) == (s == 0 ? 0 : 1));
      }
    }
  }
  // Negative control: a witness list for the rational 1/2 in Q(zeta_5) finds a non-residue (the numerator 1 alone
  // never would).
  auto k5 = CyclotomicField::make(5);
  WitnessList w5(5);
  SquareAnswer a = decide_square(Cyclo(k5, 1, 2), w5);
  CHECK(!a.is_square);
  REQUIRE(a.witness.has_value());
  CHECK(legendre_at(Cyclo(k5, 1, 2), *a.witness) == -1);
  CHECK(legendre_at(Cyclo(k5, 2), *a.witness) == -1);
}

TEST_CASE("sqrt(w^2) = |w| and sqrt(a^2 d) = |a| sqrt(d) never adjoin a radicand (random denominators, fixed seed)") {
  std::mt19937_64 rng(4242);
  for (unsigned long n : {3UL, 4UL, 5UL, 7UL, 8UL, 12UL, 15UL, 16UL, 20UL, 24UL}) {
    CAPTURE(n);
    FieldPtr f = Field::make(n);
    auto k = f->cyclotomic();
    for (int t = 0; t < 4; ++t) {
      Cyclo w = random_real(k, rng);
      CAPTURE(w.str());
      Scalar s = f->sqrt(w * w);
      CHECK(f->radicand_count() == 0);
      Scalar abs_w(f, w.real_sign() > 0 ? w : -w);
      CHECK(s == abs_w);
    }
    // Two radicands d1, d2 (positive reals with denominators), then products a^2 d1, a^2 d2, a^2 d1 d2.
    Cyclo c = Cyclo::zeta_power(k, 1) + Cyclo::zeta_power(k, -1);  // 2 cos(2 pi/N), in [-2, 2]
    Cyclo d1 = Cyclo(k, 2) + c / Cyclo(k, 3);                       // > 0
    Cyclo d2 = Cyclo(k, 7, 5) - c / Cyclo(k, 11);                   // > 0
    Scalar r1 = f->sqrt(d1), r2 = f->sqrt(d2);
    const int m = f->radicand_count();
    for (int t = 0; t < 3; ++t) {
      Cyclo a = random_real(k, rng);
      CAPTURE(a.str());
      Scalar abs_a(f, a.real_sign() > 0 ? a : -a);
      CHECK(f->sqrt(a * a * d1) == abs_a * r1);
      CHECK(f->sqrt(a * a * d2) == abs_a * r2);
      CHECK(f->sqrt(a * a * d1 * d2) == abs_a * r1 * r2);
      CHECK(f->sqrt(a * a / d1) == abs_a * r1 / Scalar(f, d1));
      CHECK(f->radicand_count() == m);
    }
  }
}

TEST_CASE("radicands with denominators: sqrt(4/3), sqrt(1/2), sqrt(3/4)") {
  FieldPtr f = Field::make(1);
  Scalar s = parse_expression("sqrt(4/3)", f);
  CHECK(s * s == parse_expression("4/3", f));
  CHECK(s.real_sign() == 1);
  CHECK(f->radicand_count() == 1);
  // sqrt(3) = (3/2) sqrt(4/3) and sqrt(12) = 3 sqrt(4/3): reductions, no new radicand.
  CHECK(parse_expression("sqrt(3)", f) == parse_expression("3/2", f) * s);
  CHECK(parse_expression("sqrt(12) - 3*sqrt(4/3)", f).is_zero());
  CHECK(parse_expression("sqrt(3/4) - sqrt(3)/2", f).is_zero());
  CHECK(f->radicand_count() == 1);
  Scalar h = parse_expression("sqrt(1/2)", f);
  CHECK(f->radicand_count() == 2);
  CHECK(parse_expression("sqrt(2) - 2*sqrt(1/2)", f).is_zero());
  CHECK(f->radicand_count() == 2);
  CHECK(h * h == parse_expression("1/2", f));
  // In Q(zeta_12) 4/3 is a square: sqrt(4/3) = 2/sqrt(3) lies in the base field.
  FieldPtr g = Field::make(12);
  CHECK(parse_expression("sqrt(4/3) * sqrt(3)", g) == Scalar(g, 2));
  CHECK(g->radicand_count() == 0);
}

TEST_CASE("square / non-square decisions agree with PARI/GP nfroots over nfinit(polcyclo(N))") {
  if (!zbtest::have_gp()) return;
  std::mt19937_64 rng(77);
  std::string prog;
  std::vector<bool> ours;
  for (unsigned long n : {5UL, 7UL, 8UL, 12UL}) {
    auto k = CyclotomicField::make(n);
    WitnessList wl(n);
    prog += fmt::format("K=nfinit(polcyclo({},y));\n", n);
    for (int t = 0; t < 4; ++t) {
      Cyclo u = random_fraction_cyclo(k, rng);
      if (u.is_zero()) continue;
      // Half of the cases squares times a small rational (which may or may not be a square in K).
      Cyclo x = (t % 2 == 0) ? u * u * Cyclo(k, t == 0 ? 1L : 3L, t == 0 ? 5L : 4L) : u;
      SquareAnswer a = decide_square(x, wl);
      if (a.is_square) {
        CHECK(*a.root * *a.root == x);
      } else {
        REQUIRE(a.witness.has_value());
        CHECK(slow_symbol(x, *a.witness) == -1);
      }
      ours.push_back(a.is_square);
      std::string xs = x.str();
      for (size_t p = xs.find("zeta"); p != std::string::npos; p = xs.find("zeta")) xs.replace(p, 4, "y");
      prog += fmt::format("print(#nfroots(K, x^2 - Mod({}, polcyclo({},y))) > 0);\n", xs, n);
    }
  }
  std::string out = zbtest::gp(prog);
  std::istringstream in(out);
  std::string line;
  size_t i = 0;
  for (; std::getline(in, line) && i < ours.size(); ++i) {
    CAPTURE(i);
    CHECK(line == (ours[i] ? "1" : "0"));
  }
  CHECK(i == ours.size());
}

TEST_CASE("square decisions come with proofs: witnesses for non-squares, verified roots for squares") {
  auto k = CyclotomicField::make(12);
  WitnessList w(12);
  FieldPtr f = Field::make(k);
  // sqrt(3) lies in Q(zeta_12) (common practice: Q(zeta_12) = Q(i, sqrt 3)).
  SquareAnswer a = decide_square(eval(f, "3").to_base(), w);
  CHECK(a.is_square);
  CHECK((*a.root) * (*a.root) == Cyclo(k, 3));
  SquareAnswer b = decide_square(Cyclo(k, 2), w);
  CHECK(!b.is_square);
  REQUIRE(b.witness.has_value());
  CHECK(legendre_at(Cyclo(k, 2), *b.witness) == -1);
  CHECK(b.witness->p % 12 == 1);
  // A square of a random element is always recognised.
  std::mt19937_64 rng(3);
  for (int t = 0; t < 5; ++t) {
    Cyclo x = zbtest::random_cyclo(k, rng);
    if (x.is_zero()) continue;
    SquareAnswer s = decide_square(x * x, w);
    CHECK(s.is_square);
    CHECK((*s.root) * (*s.root) == x * x);
  }
}

TEST_CASE("a rational non-square in a big cyclotomic field is decided by a witness, not the norm method") {
  // Found by fuzzing (tests/fuzz-regressions/model/timeout-*): sqrt(2) in Q(zeta_97) took minutes, because every
  // witness tried came from one prime p with (2|p) = 1. sqrt(2) is not in Q(zeta_97): its only quadratic
  // subfield is Q(sqrt(97)) (common practice: Q(zeta_p) contains exactly one quadratic field, Q(sqrt(+-p))).
  FieldPtr f = Field::make(97);
  Scalar s = parse_expression("sqrt(2)", f);
  CHECK(f->radicand_count() == 1);
  CHECK(s * s == Scalar(f, 2));
  // and sqrt(97) is found inside the field
  Scalar r = parse_expression("sqrt(97)", f);
  CHECK(f->radicand_count() == 1);
  CHECK(r * r == Scalar(f, 97));
}
