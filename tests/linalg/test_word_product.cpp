// Fast word-product engines against the straightforward left-to-right product, against ball containment and
// against PARI/GP; the engines on IndexedWord (trees of repeats) against the left-to-right product of the expanded
// letters, on random words with nested powers (the expansion is written out by the generator itself). Fixed seeds
// throughout.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <random>

#include "support/helpers.hpp"
#include "support/matrices.hpp"
#include "support/random.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/modular.hpp"
#include "zetabraid/linalg/word_product.hpp"

using namespace zb;
using zbtest::field_with_roots;

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
}}  // namespace

TEST_CASE("product tree equals the left-to-right product exactly") {
  // Fields: Q(zeta_5), Q(zeta_12), Q(zeta_5)(sqrt(1/phi)), Q(zeta_3)(sqrt 2, sqrt 5) (two radicands: masks XOR and
  // products of radicands in the intersection are exercised).
  std::vector<FieldPtr> fields = {Field::make(5), Field::make(12), field_with_roots(5, {"zeta + zeta^4"}),
                                  field_with_roots(3, {"2", "5"})};
  std::mt19937_64 rng(20261202);
  for (const FieldPtr& f : fields) {
    CAPTURE(f->conductor());
    CAPTURE(f->radicand_count());
    for (int trial = 0; trial < 3; ++trial) {
      size_t d = 2 + rng() % 3;
      std::vector<Matrix> pool;
      for (int k = 0; k < 3; ++k) pool.push_back(zbtest::random_matrix(f, d, d, rng));
      auto w = zbtest::random_matrix_word(pool, 6 + rng() % 30, rng);
      Matrix naive = word_product_naive(w, Matrix::identity(f, d));
      Matrix fast = word_product(w);
      CHECK(fast == naive);
      ProductOptions plain;
      plain.share_repeats = false;
      CHECK(word_product(w, plain) == naive);
      // Negative control: dropping one letter changes the product (random invertible-looking letters).
      std::vector<const Matrix*> shorter(w.begin() + 1, w.end());
      if (!naive.is_zero()) CHECK(word_product(shorter) != naive * pool[0]);
    }
  }
}

TEST_CASE("periodic words, powers and non-square letters") {
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  std::mt19937_64 rng(7);
  Matrix a = zbtest::random_matrix(f, 3, 3, rng, 0), b = zbtest::random_matrix(f, 3, 3, rng, 20), c = zbtest::random_matrix(f, 3, 3, rng, 50);
  std::vector<const Matrix*> w;
  for (int rep = 0; rep < 9; ++rep) {
    w.push_back(&a);
    w.push_back(&b);
    w.push_back(&b);
    w.push_back(&c);
  }
  w.push_back(&a);
  w.push_back(&b);  // (a b b c)^9 a b
  CHECK(word_product(w) == word_product_naive(w, Matrix::identity(f, 3)));
  std::vector<const Matrix*> run(40, &b);
  CHECK(word_product(run) == word_product_naive(run, Matrix::identity(f, 3)));
  // Rectangular letters: 2x3 after 3x4.
  Matrix p = zbtest::random_matrix(f, 3, 4, rng, 10), q = zbtest::random_matrix(f, 2, 3, rng, 10);
  std::vector<const Matrix*> rect = {&p, &a, &q};
  CHECK(word_product(rect) == q * (a * p));
  std::vector<const Matrix*> bad = {&q, &q};
  CHECK_THROWS_AS(word_product(bad), MathError);
}

TEST_CASE("columns engine on a big sparse space equals the left-to-right product") {
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  std::mt19937_64 rng(99);
  const size_t d = 40;
  std::vector<Matrix> pool;
  for (int k = 0; k < 3; ++k) pool.push_back(zbtest::random_matrix(f, d, d, rng, 93));
  auto w = zbtest::random_matrix_word(pool, 25, rng);
  Matrix start = zbtest::random_matrix(f, d, 2, rng, 50);
  Matrix naive = word_product_naive(w, start);
  CHECK(word_product_columns(w, start) == naive);
  ProductOptions tree;
  tree.columns_ratio = 1000;  // forces the product tree, then times start
  CHECK(word_product_columns(w, start, tree) == naive);
  CHECK(word_product_columns(std::vector<const Matrix*>{}, start) == start);
}

TEST_CASE("identical results at any thread count") {
  FieldPtr f = field_with_roots(3, {"2"});
  std::mt19937_64 rng(5);
  std::vector<Matrix> pool;
  for (int k = 0; k < 4; ++k) pool.push_back(zbtest::random_matrix(f, 3, 3, rng, 40));
  auto w = zbtest::random_matrix_word(pool, 300, rng);
  ProductOptions o;
  Matrix one = word_product(w, o);
  for (int t : {2, 3, 4}) {
    o.threads = t;
    CHECK(word_product(w, o) == one);
  }
  acb_mat_t b1, b4;
  acb_mat_init(b1, 3, 3);
  acb_mat_init(b4, 3, 3);
  word_product_ball(b1, w, Matrix::identity(f, 3), 200, BallMethod::kTree, 1);
  word_product_ball(b4, w, Matrix::identity(f, 3), 200, BallMethod::kTree, 4);
  CHECK(acb_mat_equal(b1, b4));
  acb_mat_clear(b1);
  acb_mat_clear(b4);
}

TEST_CASE("exact product agrees with PARI/GP on Q(zeta_7)") {
  if (!zbtest::have_gp()) return;
  FieldPtr f = Field::make(7);
  std::mt19937_64 rng(77);
  std::vector<Matrix> pool;
  for (int k = 0; k < 2; ++k) pool.push_back(zbtest::random_matrix(f, 3, 3, rng, 20));
  auto w = zbtest::random_matrix_word(pool, 30, rng);
  Matrix p = word_product(w);
  // GP multiplies the same matrices (entries as polynomials mod polcyclo(7)) left to right.
  auto gp_mat = [](const Matrix& m) {
    std::string s = "[";
    for (size_t i = 0; i < m.rows(); ++i) {
      for (size_t j = 0; j < m.cols(); ++j) {
        std::string e = m(i, j).str();  // GP reserves the name zeta: write z
        for (size_t at; (at = e.find("zeta")) != std::string::npos;) e.replace(at, 4, "z");
        s += (j ? "," : "") + std::string("(") + e + ")";
      }
      s += i + 1 < m.rows() ? ";" : "]";
    }
    return s;
  };
  std::string prog = "z=Mod(x,polcyclo(7)); L=[" + gp_mat(pool[0]) + "," + gp_mat(pool[1]) + "]; W=[";
  for (size_t i = 0; i < w.size(); ++i) prog += (i ? "," : "") + std::to_string(w[i] == &pool[0] ? 1 : 2);
  prog += "]; P=matid(3); for(i=1,#W,P=L[W[i]]*P); R=" + gp_mat(p) + "; print(P==R); print(P==2*R)";
  std::string out = zbtest::gp(prog);
  CAPTURE(prog);
  CHECK(out == "1\n0");
}

TEST_CASE("balls contain the exact result") {
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  std::mt19937_64 rng(13);
  std::vector<Matrix> pool;
  for (int k = 0; k < 3; ++k) pool.push_back(zbtest::random_matrix(f, 3, 3, rng, 30));
  auto w = zbtest::random_matrix_word(pool, 30, rng);
  Matrix start = zbtest::random_matrix(f, 3, 2, rng, 0);
  Matrix exact = word_product_naive(w, start);
  for (BallMethod m : {BallMethod::kTree, BallMethod::kColumns}) {
    acb_mat_t b;
    acb_mat_init(b, 3, 2);
    word_product_ball(b, w, start, 256, m, 1);
    CHECK(zbtest::contains_exact(b, exact));
    CHECK(!zbtest::contains_exact(b, exact.scaled(Scalar(f, 2))));  // negative control
    acb_mat_clear(b);
  }
}

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
