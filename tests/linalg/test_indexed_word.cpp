// The engines on IndexedWord (trees of repeats) against the left-to-right product of the expanded letters, on
// random words with nested powers (fixed seed). The expansion is written out by the generator itself.
#include <doctest/doctest.h>

#include <random>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/linalg/modular.hpp"
#include "zetabraid/linalg/word_product.hpp"

using namespace zb;

namespace {

// Appends a random sequence to `seq` of w and its expansion to *flat.
void random_sequence(IndexedWord& w, std::uint32_t seq, const std::vector<Matrix>& pool, std::mt19937_64& rng,
                     std::vector<const Matrix*>* flat, int depth) {
  int items = 1 + static_cast<int>(rng() % 5);
  for (int i = 0; i < items; ++i) {
    std::uint64_t rep = 1 + rng() % (depth == 0 ? 9 : 4);
    if (depth < 3 && rng() % 3 == 0) {
      std::uint32_t g = w.add_sequence();
      std::vector<const Matrix*> inner;
      random_sequence(w, g, pool, rng, &inner, depth + 1);
      w.append_group(seq, g, rep);
      for (std::uint64_t r = 0; r < rep; ++r) flat->insert(flat->end(), inner.begin(), inner.end());
    } else {
      const Matrix* m = &pool[rng() % pool.size()];
      w.append_letter(seq, w.letter(m), rep);
      for (std::uint64_t r = 0; r < rep; ++r) flat->push_back(m);
    }
  }
}

std::vector<Matrix> letter_pool(const FieldPtr& f, std::mt19937_64& rng) {
  std::vector<Matrix> pool;
  for (int q = 0; q < 3; ++q) {
    Matrix m(f, 3, 3);
    for (size_t i = 0; i < 3; ++i)
      for (size_t j = 0; j < 3; ++j)
        if (rng() % 3) m(i, j) = Scalar(f, Cyclo::zeta_power(f->cyclotomic(), static_cast<long>(rng() % 7)));
    pool.push_back(m);
  }
  return pool;
}

}  // namespace

TEST_CASE("indexed words: exact, column, modular and ball engines equal the naive product (random powers)") {
  FieldPtr f = Field::make(7);
  std::mt19937_64 rng(8675309);
  std::vector<Matrix> pool = letter_pool(f, rng);
  const Matrix id = Matrix::identity(f, 3), start = id.columns({0, 2});
  ModularPrime q = choose_primes(*f, 1, 62)[0];
  for (int trial = 0; trial < 12; ++trial) {
    IndexedWord w;
    std::vector<const Matrix*> flat;
    random_sequence(w, 0, pool, rng, &flat, 0);
    w.finish();
    CAPTURE(flat.size());
    REQUIRE(w.length() == flat.size());
    CHECK(w.expand_pointers() == flat);
    CHECK(w.letters().size() <= pool.size());
    const Matrix naive = word_product_naive(flat, id);
    CHECK(word_product(w) == naive);
    ProductOptions plain;  // no run/period sharing, no int64 kernel: the product tree alone
    plain.share_repeats = false;
    plain.small_kernel = false;
    CHECK(word_product(w, plain) == naive);
    ProductOptions cols;
    cols.columns_min_dimension = 0;
    cols.columns_ratio = 1;  // the column engine
    CHECK(word_product_columns(w, start, cols) == naive * start);
    CHECK(word_product_columns(w, start) == naive * start);
    CHECK(word_product_mod(w, start, q) == reduce_matrix(naive * start, q));
  }
  // Ball engine (short word: the enclosure must contain the exact product).
  IndexedWord w;
  std::vector<const Matrix*> flat;
  random_sequence(w, 0, pool, rng, &flat, 2);
  w.finish();
  acb_mat_t b;
  acb_mat_init(b, 3, 2);
  word_product_ball(b, w, start, 256, BallMethod::kTree);
  acb_mat_t e;
  acb_mat_init(e, 3, 2);
  (word_product_naive(flat, id) * start).ball(e, 1024);
  for (slong i = 0; i < 3; ++i)
    for (slong j = 0; j < 2; ++j) CHECK(acb_contains(acb_mat_entry(b, i, j), acb_mat_entry(e, i, j)));
  acb_mat_clear(e);
  acb_mat_clear(b);
}

TEST_CASE("indexed words: runs merged, letters found once, shapes checked once") {
  FieldPtr f = Field::make(7);
  std::mt19937_64 rng(1);
  std::vector<Matrix> pool = letter_pool(f, rng);
  IndexedWord w = IndexedWord::from_letters({&pool[0], &pool[0], &pool[0], &pool[1], &pool[0]});
  REQUIRE(w.sequences()[0].size() == 3);
  CHECK(w.sequences()[0][0].repeat == 3);
  CHECK(w.letters().size() == 2);
  CHECK(w.length() == 5);
  CHECK(w.rows() == 3);
  CHECK(w.cols() == 3);
  // A repeated non-square group and letters that do not compose are refused.
  Matrix wide(f, 3, 2);
  IndexedWord bad;
  bad.append_letter(0, bad.letter(&wide), 2);
  CHECK_THROWS_AS(bad.finish(), MathError);
  IndexedWord bad2;
  bad2.append_letter(0, bad2.letter(&wide));
  bad2.append_letter(0, bad2.letter(&wide));
  CHECK_THROWS_AS(bad2.finish(), MathError);
  IndexedWord ok;
  ok.append_letter(0, ok.letter(&wide));
  ok.append_letter(0, ok.letter(&pool[1]));
  CHECK_NOTHROW(ok.finish());  // negative control: 3x3 after 3x2 composes
  CHECK(ok.cols() == 2);
}
