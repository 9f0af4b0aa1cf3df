// The int64 sparse-letter kernel variants (src/linalg/sparse_kernel.hpp), each against the entry-by-entry reference
// kernel on random integral letters and operands (fixed seed), then whole words with each variant forced against
// the left-to-right product.
#include <doctest/doctest.h>

#include <random>

#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"
#include "zetabraid/linalg/word_product.hpp"
#include "../../src/linalg/sparse_kernel.hpp"

using namespace zb;
using zbtest::field_with_roots;

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

TEST_CASE("int64 block kernel equals the fmpz path and the left-to-right product") {
  // Integral letters (algebraic integers) take the int64 kernel; coefficients grow by several bits per letter
  // here, so every word crosses the 2^62 limit several times (blocks flushed, fmpz continuation).
  std::vector<FieldPtr> fields = {Field::make(5), field_with_roots(5, {"zeta + zeta^4"}), field_with_roots(8, {"3", "zeta + zeta^7 + 3"})};
  std::mt19937_64 rng(424242);
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    for (int trial = 0; trial < 2; ++trial) {
      size_t d = 3 + rng() % 2;
      std::vector<Matrix> pool;
      for (int k = 0; k < 3; ++k) {
        Matrix m(f, d, d);
        std::uniform_int_distribution<long> c(-2, 2);
        RadicalMask all = (RadicalMask{1} << f->radicand_count()) - 1;
        for (size_t i = 0; i < d; ++i)
          for (size_t j = 0; j < d; ++j)
            if (rng() % 3) {
              Cyclo v = Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 8)) * Cyclo(f->cyclotomic(), c(rng));
              m(i, j) = Scalar::monomial(f, v, static_cast<RadicalMask>(rng()) & all);
            }
        pool.push_back(m);
      }
      std::vector<const Matrix*> w;
      std::uniform_int_distribution<size_t> pick(0, 2);
      for (int i = 0; i < 60; ++i) w.push_back(&pool[pick(rng)]);
      Matrix naive = word_product_naive(w, Matrix::identity(f, d));
      ProductOptions off;
      off.small_kernel = false;
      CHECK(word_product(w) == naive);
      CHECK(word_product(w, off) == naive);
      ProductOptions two;
      two.threads = 2;
      CHECK(word_product(w, two) == naive);
      // Columns engine with the kernel on a bigger block-diagonal space.
      size_t big = 30;
      std::vector<Matrix> bp;
      for (const Matrix& m : pool) {
        Matrix b = Matrix::identity(f, big);
        for (size_t i = 0; i < d; ++i)
          for (size_t j = 0; j < d; ++j) b(i + 5, j + 5) = m(i, j);
        bp.push_back(b);
      }
      std::vector<const Matrix*> bw;
      for (const Matrix* m : w) bw.push_back(&bp[static_cast<size_t>(m - &pool[0])]);
      Matrix start = Matrix::identity(f, big).columns({5, 6});
      start(7, 1) = Scalar(f, Cyclo(f->cyclotomic(), 1, 3));  // a denominator in the start
      Matrix cn = word_product_naive(bw, start);
      CHECK(word_product_columns(bw, start) == cn);
      CHECK(word_product_columns(bw, start, off) == cn);
      ProductOptions blocks;
      blocks.column_block_limbs = 0;  // int64 block products from the first fmpz step on
      CHECK(word_product_columns(bw, start, blocks) == cn);
      ProductOptions letters;
      letters.column_blocks = false;
      CHECK(word_product_columns(bw, start, letters) == cn);
    }
  }
}

TEST_CASE("row-program int64 kernel equals the entry-by-entry kernel and the left-to-right product") {
  // The row program (+1 / -1 / other multipliers summed per destination row; portable, AVX2 with 4 columns per
  // vector and AVX-512 with 8, each the processor has) against the entry-by-entry kernel on random integral letters
  // and operands (1 to 11 columns: partial vectors and more than one), for degrees phi(N) = 2, 4, 6, 8 and 10,
  // with one and two radicands, including multipliers other than +-1 and a 2 x 70 letter with long destination
  // rows. Then whole words against the naive product (N = 7, 11).
  std::vector<FieldPtr> fields = {Field::make(3), field_with_roots(5, {"zeta + zeta^4"}), Field::make(7),
                                  field_with_roots(15, {"2", "3"}), Field::make(11)};
  std::mt19937_64 rng(777001);
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    PolyContext ctx(f);
    const long n = ctx.degree(), masks = 1L << f->radicand_count();
    RadicalMask all = static_cast<RadicalMask>(masks - 1);
    for (auto [r, c] : {std::pair<size_t, size_t>{4, 4}, {2, 70}}) {
      Matrix m(f, r, c);
      std::uniform_int_distribution<long> coef(-3, 3);
      for (size_t i = 0; i < r; ++i)
        for (size_t j = 0; j < c; ++j)
          if (c > 8 || rng() % 3) {
            Cyclo v = Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 12)) * Cyclo(f->cyclotomic(), coef(rng)) +
                      Cyclo(f->cyclotomic(), coef(rng));
            m(i, j) = Scalar::monomial(f, v, static_cast<RadicalMask>(rng()) & all);
          }
      detail::SparseLetter g;
      bool ok = detail::SparseLetter::make(&g, PolyMatrix::from_matrix(m, ctx), ctx, f->radicand_count());
      REQUIRE(ok);
      for (long k : {1L, 3L, 5L, 8L, 11L}) {
        detail::SmallBlock x{static_cast<long>(c), k, n, masks, {}};
        std::uniform_int_distribution<std::int64_t> big(-(std::int64_t{1} << 40), std::int64_t{1} << 40);
        x.a.resize(static_cast<size_t>(masks * static_cast<long>(c) * k * n));
        for (auto& v : x.a) v = big(rng);
        detail::SmallBlock y1, y2, y4;
        detail::apply_into_entries(&y1, g, x);  // the reference
        detail::apply_into_portable(&y4, g, x);
        CHECK(y1.a == y4.a);
        // Every vector variant the processor has, and the dispatcher's choice.
        for (LetterKernel v : {LetterKernel::kAvx2, LetterKernel::kAvx512, LetterKernel::kAuto}) {
          if (!letter_kernel_available(v)) continue;
          CAPTURE(letter_kernel_name(v));
          detail::SmallBlock yv;
          detail::apply_into(&yv, g, x, v);
          CHECK(y1.a == yv.a);
          CHECK(y1.rows == yv.rows);
        }
        detail::apply_into(&y2, g, x);
        // Negative control: a changed operand gives a different result.
        x.a[0] += 1;
        detail::SmallBlock y3;
        detail::apply_into(&y3, g, x);
        CHECK(y3.a != y2.a);
      }
    }
    // Whole words through word_product (int64 blocks, then the tree) against the naive product.
    if (f->radicand_count() == 0 && (f->conductor() == 7 || f->conductor() == 11)) {
      std::vector<Matrix> pool;
      for (int q = 0; q < 3; ++q) {
        Matrix m(f, 3, 3);
        for (size_t i = 0; i < 3; ++i)
          for (size_t j = 0; j < 3; ++j)
            if (rng() % 3) m(i, j) = Scalar(f, Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 11)));
        pool.push_back(m);
      }
      std::vector<const Matrix*> w;
      for (int i = 0; i < 80; ++i) w.push_back(&pool[rng() % 3]);
      CHECK(word_product(w) == word_product_naive(w, Matrix::identity(f, 3)));
    }
  }
}
