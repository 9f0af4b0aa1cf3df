// The int64 sparse-letter kernel variants (src/linalg/sparse_kernel.hpp), each against the entry-by-entry reference
// kernel on random integral letters and operands (fixed seed), then whole words with each variant forced against
// the left-to-right product.
#include <doctest/doctest.h>

#include <random>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"
#include "zetabraid/linalg/word_product.hpp"
#include "../../src/linalg/sparse_kernel.hpp"

using namespace zb;

namespace {

FieldPtr field_with_root(unsigned long n, const char* radicand) {
  FieldPtr f = Field::make(n);
  if (radicand) f->sqrt(parse_expression(radicand, f).to_base());
  return f;
}

using Variant = void (*)(detail::SmallBlock*, const detail::SparseLetter&, const detail::SmallBlock&);

// Random integral letters (r x c, entries zeta^a * u + v with small u, v; some multipliers other than +-1) and
// random operands with 1 to 11 columns (partial vectors and more than one), over Q(zeta_7), Q(zeta_5, sqrt(...))
// and Q(zeta_12) with two radicands; every result of `variant` equals the reference kernel's.
void check_variant(Variant variant) {
  std::mt19937_64 rng(424242);
  std::vector<FieldPtr> fields = {Field::make(7), field_with_root(5, "zeta + zeta^4"), field_with_root(12, "3")};
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    PolyContext ctx(f);
    const long n = ctx.degree(), masks = 1L << f->radicand_count();
    const RadicalMask all = static_cast<RadicalMask>(masks - 1);
    for (auto [r, c] : {std::pair<size_t, size_t>{3, 3}, {5, 5}, {2, 40}}) {
      Matrix m(f, r, c);
      std::uniform_int_distribution<long> coef(-4, 4);
      for (size_t i = 0; i < r; ++i)
        for (size_t j = 0; j < c; ++j)
          if (rng() % 3) {
            Cyclo v = Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 12)) * Cyclo(f->cyclotomic(), coef(rng)) +
                      Cyclo(f->cyclotomic(), coef(rng));
            m(i, j) = Scalar::monomial(f, v, static_cast<RadicalMask>(rng()) & all);
          }
      detail::SparseLetter g;
      REQUIRE(detail::SparseLetter::make(&g, PolyMatrix::from_matrix(m, ctx), ctx, f->radicand_count()));
      for (long k = 1; k <= 11; ++k) {
        CAPTURE(k);
        detail::SmallBlock x{static_cast<long>(c), k, n, masks, {}};
        std::uniform_int_distribution<std::int64_t> big(-(std::int64_t{1} << 36), std::int64_t{1} << 36);
        x.a.resize(static_cast<size_t>(masks * static_cast<long>(c) * k * n));
        for (auto& v : x.a) v = big(rng);
        detail::SmallBlock want, got;
        detail::apply_into_entries(&want, g, x);
        got.a.assign(want.a.size() + 3, 99);  // a reused, dirty buffer of another size
        variant(&got, g, x);
        CHECK(got.rows == want.rows);
        CHECK(got.k == want.k);
        CHECK(got.a == want.a);
      }
    }
  }
}

}  // namespace

TEST_CASE("letter kernel: portable row program equals the entry-by-entry kernel") {
  check_variant(detail::apply_into_portable);
}

TEST_CASE("letter kernel: AVX2 row program equals the entry-by-entry kernel") {
  if (!letter_kernel_available(LetterKernel::kAvx2)) {
    MESSAGE("processor without AVX2: variant not run");
    return;
  }
  check_variant(detail::apply_into_avx2);
}

TEST_CASE("letter kernel: AVX-512 row program equals the entry-by-entry kernel") {
  if (!letter_kernel_available(LetterKernel::kAvx512)) {
    MESSAGE("processor without AVX-512: variant not run");
    return;
  }
  check_variant(detail::apply_into_avx512);
}

TEST_CASE("letter kernel: the dispatcher, names, and whole words with each variant forced") {
  CHECK(letter_kernel_resolve(LetterKernel::kAuto) != LetterKernel::kAuto);
  CHECK(letter_kernel_available(letter_kernel_resolve(LetterKernel::kAuto)));
  CHECK(letter_kernel_resolve(LetterKernel::kPortable) == LetterKernel::kPortable);
  for (LetterKernel v : {LetterKernel::kAuto, LetterKernel::kEntries, LetterKernel::kPortable, LetterKernel::kAvx2,
                         LetterKernel::kAvx512}) {
    LetterKernel back = LetterKernel::kAuto;
    REQUIRE(letter_kernel_from_name(letter_kernel_name(v), &back));
    CHECK(back == v);
  }
  LetterKernel dummy;
  CHECK_FALSE(letter_kernel_from_name("avx3", &dummy));  // negative control

  // Whole words (int64 blocks, then the product tree; and the column engine) with each variant forced.
  FieldPtr f = Field::make(7);
  std::mt19937_64 rng(90210);
  std::vector<Matrix> pool;
  for (int q = 0; q < 3; ++q) {
    Matrix m(f, 3, 3);
    for (size_t i = 0; i < 3; ++i)
      for (size_t j = 0; j < 3; ++j)
        if (rng() % 3) m(i, j) = Scalar(f, Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 7)));
    pool.push_back(m);
  }
  std::vector<const Matrix*> w;
  for (int i = 0; i < 60; ++i) w.push_back(&pool[rng() % 3]);
  const Matrix want = word_product_naive(w, Matrix::identity(f, 3));
  for (LetterKernel v : {LetterKernel::kEntries, LetterKernel::kPortable, LetterKernel::kAvx2, LetterKernel::kAvx512}) {
    if (!letter_kernel_available(v)) continue;
    CAPTURE(letter_kernel_name(v));
    ProductOptions po;
    po.kernel = v;
    CHECK(word_product(w, po) == want);
    po.columns_min_dimension = 0;
    po.columns_ratio = 1;
    CHECK(word_product_columns(w, Matrix::identity(f, 3).columns({0}), po) == want.columns({0}));
  }
}
