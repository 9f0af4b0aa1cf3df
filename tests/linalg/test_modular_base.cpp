// The embeddings of L = Q(zeta_N)(sqrt(d_1), ..., sqrt(d_m)) up to conjugation (linalg/modular_base.hpp) with the
// enclosures under each (Scalar::ball_at). Oracle: exact norms computed in antic.
#include <doctest/doctest.h>

#include <random>

#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/modular_base.hpp"

using namespace zb;

namespace {

// N_{L/Q}(x) exactly: the product of the 2^m radical-sign flips lies in K, then antic's N_{K/Q}.
void exact_norm(fmpq_t out, const Scalar& x) {
  Scalar p(x.field(), 1);
  for (RadicalMask s = 0; s < (RadicalMask{1} << x.field()->radicand_count()); ++s) p = p * x.flip(s);
  REQUIRE(p.in_base());
  p.to_base().norm(out);
}

// Product over all embeddings of ball_at(x), as a complex ball.
void embedding_product(acb_t out, const Scalar& x) {
  acb_one(out);
  acb_t b;
  acb_init(b);
  for (const Embedding& e : embeddings_up_to_conjugation(*x.field())) {
    x.ball_at(b, 128, e.a, e.signs);
    if (e.weight == 2) {
      acb_t c;
      acb_init(c);
      acb_conj(c, b);
      acb_mul(b, b, c, 256);
      acb_clear(c);
    }
    acb_mul(out, out, b, 256);
  }
  acb_clear(b);
}}  // namespace

TEST_CASE("ball_at: the product over all embeddings is the exact norm N_{L/Q} (definition of the norm, common practice)") {
  FieldPtr f = Field::make(5);
  Scalar s = parse_expression("sqrt(zeta + zeta^4)", f);  // adjoins sqrt(1/phi)
  REQUIRE(f->radicand_count() == 1);
  std::mt19937_64 rng(11);
  auto rnd = [&] { return static_cast<long>(rng() % 41) - 20; };
  for (int trial = 0; trial < 12; ++trial) {
    Scalar x(f);
    for (int k = 0; k < 4; ++k) x += Scalar::zeta_power(f, k) * Scalar(f, rnd());
    for (int k = 0; k < 4; ++k) x += Scalar::zeta_power(f, k) * s * Scalar(f, rnd());
    if (x.is_zero()) continue;
    fmpq_t nq;
    fmpq_init(nq);
    exact_norm(nq, x);
    acb_t prod;
    acb_init(prod);
    embedding_product(prod, x);
    arb_t ref;
    arb_init(ref);
    arb_set_fmpq(ref, nq, 256);
    CHECK(arb_overlaps(acb_realref(prod), ref));
    CHECK(arb_contains_zero(acb_imagref(prod)));
    // Negative control: the norm of x + 1 is a different number.
    fmpq_t other;
    fmpq_init(other);
    exact_norm(other, x + Scalar(f, 1));
    if (!fmpq_equal(other, nq)) {
      arb_set_fmpq(ref, other, 256);
      CHECK(!arb_overlaps(acb_realref(prod), ref));
    }
    fmpq_clear(other);
    arb_clear(ref);
    acb_clear(prod);
    fmpq_clear(nq);
  }
  // The identity embedding is the standard one.
  acb_t a, b;
  acb_init(a);
  acb_init(b);
  s.ball(a, 64);
  s.ball_at(b, 64, 1, 0);
  CHECK(acb_equal(a, b));
  acb_clear(a);
  acb_clear(b);
  CHECK(embeddings_up_to_conjugation(*f).size() == 4);  // [L:Q] = 8 embeddings in 4 conjugate pairs
}
