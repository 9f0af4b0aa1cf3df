// K(sqrt d1, ..., sqrt dm): arithmetic, dependence detection, conjugation, balls.
#include <doctest/doctest.h>

#include <random>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/field/square_test.hpp"

using namespace zb;

namespace {
Scalar eval(const FieldPtr& f, const std::string& s) { return parse_expression(s, f); }

Scalar random_scalar(const FieldPtr& f, std::mt19937_64& rng) {
  Scalar x(f);
  for (RadicalMask m = 0; m < (RadicalMask{1} << f->radicand_count()); ++m)
    if (rng() % 3 != 0) x += Scalar::monomial(f, zbtest::random_cyclo(f->cyclotomic(), rng, 3), m);
  return x;
}
}  // namespace

TEST_CASE("dependent radicands are reduced, never adjoined (Kummer theory: degree 2^m iff independent mod squares)") {
  FieldPtr f = Field::make(5);
  Scalar s2 = eval(f, "sqrt(2)"), s3 = eval(f, "sqrt(3)");
  CHECK(f->radicand_count() == 2);
  Scalar s6 = eval(f, "sqrt(6)");
  CHECK(f->radicand_count() == 2);  // sqrt(6) = sqrt(2) sqrt(3)
  CHECK(s6 == s2 * s3);
  Scalar s12 = eval(f, "sqrt(12)");
  CHECK(s12 == Scalar(f, 2) * s3);
  CHECK(f->radicand_count() == 2);
  // sqrt(10) = sqrt(2) * sqrt(5), and sqrt(5) lies in Q(zeta_5) already.
  Scalar s10 = eval(f, "sqrt(10)");
  CHECK(f->radicand_count() == 2);
  CHECK(s10 == s2 * eval(f, "sqrt(5)"));
  // phi = (1+sqrt5)/2 is not a square in Q(zeta_5) (its norm to Q(sqrt 5) is -1): adjoined.
  Scalar sphi = eval(f, "sqrt((1+sqrt(5))/2)");
  CHECK(f->radicand_count() == 3);
  CHECK(sphi * sphi == eval(f, "(1+sqrt(5))/2"));
  // 1/phi = phi - 1 differs from phi by a square factor: sqrt(1/phi) reduces to sqrt(phi)/phi.
  Scalar sinv = eval(f, "sqrt(2/(1+sqrt(5)))");
  CHECK(f->radicand_count() == 3);
  CHECK(sinv * sphi == Scalar(f, 1));
  // The positive root is always taken.
  CHECK(sinv.real_sign() == 1);
  CHECK(eval(f, "sqrt(6) - sqrt(2)*sqrt(3)").is_zero());
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

TEST_CASE("randomized arithmetic in Q(zeta_5)(sqrt 2, sqrt 3, sqrt phi) (fixed seed)") {
  FieldPtr f = Field::make(5);
  eval(f, "sqrt(2)");
  eval(f, "sqrt(3)");
  eval(f, "sqrt((1+sqrt(5))/2)");
  REQUIRE(f->radicand_count() == 3);
  std::mt19937_64 rng(11);
  for (int t = 0; t < 25; ++t) {
    Scalar a = random_scalar(f, rng), b = random_scalar(f, rng), c = random_scalar(f, rng);
    CAPTURE(a.str());
    CAPTURE(b.str());
    CHECK(a * (b + c) == a * b + a * c);
    CHECK((a * b) * c == a * (b * c));
    Scalar a2 = a;
    a2 *= a2;
    CHECK(a2 == a * a);
    if (!a.is_zero()) {
      CHECK(a * a.inverse() == Scalar(f, 1));
      CHECK((b / a) * a == b);
    }
    CHECK((a * b).conj() == a.conj() * b.conj());
    for (RadicalMask s = 1; s < 8; ++s) CHECK((a * b).flip(s) == a.flip(s) * b.flip(s));
    // a * conj(a) is real and non-negative; zero only for a = 0.
    Scalar n = a * a.conj();
    CHECK(n.is_real());
    if (!a.is_zero()) CHECK(n.real_sign() == 1);
    acb_t ba, bb, bab, prod;
    acb_init(ba); acb_init(bb); acb_init(bab); acb_init(prod);
    a.ball(ba, 90);
    b.ball(bb, 90);
    (a * b).ball(bab, 200);
    acb_mul(prod, ba, bb, 90);
    CHECK(acb_overlaps(prod, bab));
    acb_clear(ba); acb_clear(bb); acb_clear(bab); acb_clear(prod);
  }
}

TEST_CASE("canonical strings re-parse to the same number") {
  FieldPtr f = Field::make(20);
  std::mt19937_64 rng(5);
  eval(f, "sqrt(2 + zeta + zeta^-1)");
  for (int t = 0; t < 10; ++t) {
    Scalar a = random_scalar(f, rng);
    CHECK(eval(f, a.str()) == a);
  }
}

TEST_CASE("radicands must be real; negative ones use the principal branch") {
  FieldPtr f = Field::make(5);
  CHECK_THROWS_AS(eval(f, "sqrt(zeta)"), ExpressionError);
  Scalar s = eval(f, "sqrt(-2)");  // = (zeta - zeta^-1) * sqrt(2 / |zeta - zeta^-1|^2): i*sqrt(2)
  CHECK(s * s == Scalar(f, -2));
  acb_t b;
  acb_init(b);
  s.ball(b, 64);
  CHECK(arb_is_positive(acb_imagref(b)));
  acb_clear(b);
  FieldPtr q = Field::make(1);
  CHECK_THROWS_AS(eval(q, "sqrt(-1)"), ExpressionError);
}
