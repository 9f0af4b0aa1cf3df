// K(sqrt d1, ..., sqrt dm): arithmetic, dependence detection, conjugation, balls.
#include <doctest/doctest.h>

#include <random>

#include "support/random.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"

using namespace zb;
using zbtest::random_scalar;

namespace {
Scalar eval(const FieldPtr& f, const std::string& s) { return parse_expression(s, f); }
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

TEST_CASE("products of sums of many distinct square roots stop at the term limit") {
  // Found by fuzzing (tests/fuzz-regressions/expression/timeout-*): sums of ~30 independent square roots raised
  // to powers grow like 2^30 terms. Beyond Scalar::kMaxTerms terms (or kMaxTermProducts products) a product is a
  // ResourceError, not a hang.
  FieldPtr f = Field::make(1);
  std::string sum = "0";
  for (int p : {2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71})
    sum += "+sqrt(" + std::to_string(p) + ")";
  CHECK_THROWS_AS(parse_expression("(" + sum + ")^6", f), ResourceError);
}
