// Integer-polynomial matrices (linalg/poly_matrix.hpp): conversion from and to field matrices, products (plain and
// graded, direct and by evaluation) against the field product, and PolyContext's reduction against FLINT's
// generic remainder by Phi_N. Fixed seeds.
#include <doctest/doctest.h>

#include <random>

#include "support/matrices.hpp"
#include "support/random.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"
#include "zetabraid/linalg/word_product.hpp"

using namespace zb;
using zbtest::field_with_roots;

TEST_CASE("PolyContext::reduce is the field layer's reduction (Q(zeta_15))") {
  PolyContext ctx(Field::make(15));
  CHECK(ctx.reducer().degree() == 8);
  fmpz_poly_t p, q;
  fmpz_poly_init(p);
  fmpz_poly_init(q);
  for (long k = 0; k < 22; ++k) fmpz_poly_set_coeff_si(p, k, (k * 7919) % 101 - 50);
  fmpz_poly_rem(q, p, ctx.modulus());
  ctx.reduce(p);
  CHECK(fmpz_poly_equal(p, q));
  fmpz_poly_clear(p);
  fmpz_poly_clear(q);
}

TEST_CASE("poly matrix conversion round trip and denominators") {
  FieldPtr f = field_with_roots(12, {"3", "zeta + zeta^11 + 5"});
  std::mt19937_64 rng(11);
  PolyContext ctx(f);
  for (int t = 0; t < 5; ++t) {
    Matrix m = zbtest::random_matrix(f, 3, 2, rng);
    CHECK(PolyMatrix::from_matrix(m, ctx).to_matrix(ctx) == m);
  }
  // (1/2) * 2 = 1: the common denominator cancels.
  Matrix h(f, 1, 1), two(f, 1, 1);
  h(0, 0) = Scalar(f, Cyclo(f->cyclotomic(), 1, 2));
  two(0, 0) = Scalar(f, 2);
  PolyMatrix p = PolyMatrix::mul(PolyMatrix::from_matrix(two, ctx), PolyMatrix::from_matrix(h, ctx), ctx);
  CHECK(fmpz_is_one(p.denominator()));
  CHECK(p.to_matrix(ctx).is_identity());
}

TEST_CASE("poly matrix products equal the field product") {
  // PolyMatrix::mul (mask pairs combined by XOR, radicand products, common denominators) must equal the Matrix
  // product over the field (entry-wise Scalar arithmetic), with masks {0, S} only, with a radicand carrying a
  // denominator, and with two radicals.
  std::vector<FieldPtr> fields = {field_with_roots(5, {"zeta + zeta^4"}), field_with_roots(7, {"(zeta + zeta^6)/3 + 1"}),
                                  field_with_roots(12, {"3", "zeta + zeta^11 + 5"})};
  std::mt19937_64 rng(31337);
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    PolyContext ctx(f);
    for (int t = 0; t < 4; ++t) {
      Matrix a = zbtest::random_matrix(f, 3, 4, rng, 10), b = zbtest::random_matrix(f, 4, 2, rng, 10);
      if (f->radicand_count() == 2 && t % 2 == 0) {  // keep masks {0, 2} only
        for (Matrix* m : {&a, &b})
          for (size_t i = 0; i < m->rows(); ++i)
            for (size_t j = 0; j < m->cols(); ++j) {
              Scalar s(f);
              for (const auto& [mask, c] : (*m)(i, j).terms()) s += Scalar::monomial(f, c, mask & 2);
              (*m)(i, j) = s;
            }
      }
      PolyMatrix pa = PolyMatrix::from_matrix(a, ctx), pb = PolyMatrix::from_matrix(b, ctx);
      CHECK(PolyMatrix::mul(pa, pb, ctx).to_matrix(ctx) == a * b);
      // Negative control: a changed factor gives a different product.
      Matrix a2 = a;
      a2(0, 0) += Scalar(f, 1);
      CHECK(PolyMatrix::mul(PolyMatrix::from_matrix(a2, ctx), pb, ctx).to_matrix(ctx) != a * b);
    }
  }
}

TEST_CASE("graded poly matrix products: direct and by evaluation equal the reference and the field product") {
  // Graded factors (entry (i, j) in the single part g(i) ^ g(j), as braid letters are) take mul_graded; with and
  // without evaluation/interpolation it must equal mul_reference (one fmpz_poly_mat product per pair of parts) and
  // the Matrix product over the field. Fields: one radical, a radicand with a denominator, two radicals, degree 6.
  std::vector<FieldPtr> fields = {field_with_roots(5, {"zeta + zeta^4"}), field_with_roots(7, {"(zeta + zeta^6)/3 + 1"}),
                                  field_with_roots(12, {"3", "zeta + zeta^11 + 5"})};
  std::mt19937_64 rng(271828);
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    PolyContext ctx(f);
    REQUIRE(ctx.has_evaluation());
    RadicalMask all = (RadicalMask{1} << f->radicand_count()) - 1;
    auto graded = [&](size_t r, size_t c, const std::vector<RadicalMask>& gr, const std::vector<RadicalMask>& gc) {
      Matrix m(f, r, c);
      for (size_t i = 0; i < r; ++i)
        for (size_t j = 0; j < c; ++j)
          if (rng() % 4) m(i, j) = Scalar::monomial(f, zbtest::random_cyclo(f->cyclotomic(), rng, 3), gr[i] ^ gc[j]);
      return m;
    };
    for (int t = 0; t < 3; ++t) {
      std::vector<RadicalMask> g1, g2, g3;
      for (int i = 0; i < 5; ++i) {
        g1.push_back(static_cast<RadicalMask>(rng()) & all);
        g2.push_back(static_cast<RadicalMask>(rng()) & all);
        g3.push_back(static_cast<RadicalMask>(rng()) & all);
      }
      Matrix a = graded(4, 5, g1, g2), b = graded(5, 3, g2, g3);
      PolyMatrix pa = PolyMatrix::from_matrix(a, ctx), pb = PolyMatrix::from_matrix(b, ctx);
      REQUIRE(PolyMatrix::graded_pair(pa, pb));
      Matrix ab = a * b;
      CHECK(PolyMatrix::mul_graded(pa, pb, ctx, false).to_matrix(ctx) == ab);
      CHECK(PolyMatrix::mul_graded(pa, pb, ctx, true).to_matrix(ctx) == ab);
      CHECK(PolyMatrix::mul_reference(pa, pb, ctx).to_matrix(ctx) == ab);
      // Long coefficients (several limbs, where mul picks evaluation): powers of a graded square matrix.
      Matrix sq = graded(5, 5, g2, g2);
      PolyMatrix ps = PolyMatrix::from_matrix(sq, ctx);
      PolyMatrix big = PolyMatrix::pow(ps, 40, ctx), big2 = PolyMatrix::pow(ps, 33, ctx);
      CHECK(big.max_bits() > 80);
      PolyMatrix ref = PolyMatrix::mul_reference(big, big2, ctx);
      CHECK(PolyMatrix::mul_graded(big, big2, ctx, true).to_matrix(ctx) == ref.to_matrix(ctx));
      CHECK(PolyMatrix::mul_graded(big, big2, ctx, false).to_matrix(ctx) == ref.to_matrix(ctx));
      CHECK(PolyMatrix::mul(big, big2, ctx).to_matrix(ctx) == ref.to_matrix(ctx));
      // Negative controls: an entry with two parts is not graded; a changed factor changes the product.
      Matrix a2 = a;
      a2(0, 0) = Scalar::monomial(f, Cyclo(f->cyclotomic(), 2), g1[0] ^ g2[0]) +
                 Scalar::monomial(f, Cyclo(f->cyclotomic(), 1), (g1[0] ^ g2[0]) ^ 1);
      PolyMatrix pa2 = PolyMatrix::from_matrix(a2, ctx);
      CHECK_FALSE(PolyMatrix::graded_pair(pa2, pb));
      CHECK_THROWS_AS(PolyMatrix::mul_graded(pa2, pb, ctx, true), MathError);
      CHECK(PolyMatrix::mul(pa2, pb, ctx).to_matrix(ctx) == a2 * b);
      Matrix a3 = a;
      a3(1, 1) += Scalar::monomial(f, Cyclo(f->cyclotomic(), 1), g1[1] ^ g2[1]);
      CHECK(PolyMatrix::mul_graded(PolyMatrix::from_matrix(a3, ctx), pb, ctx, true).to_matrix(ctx) != ab);
    }
  }
}
