// Fast word-product engines against the straightforward left-to-right product, against reductions mod p, against
// ball containment and against PARI/GP. Fixed seeds throughout.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <random>

#include "braid/fib_model.hpp"
#include "support/helpers.hpp"
#include "zetabraid/braid/generators.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/modular.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"
#include "zetabraid/linalg/word_product.hpp"
#include "../../src/linalg/sparse_kernel.hpp"

using namespace zb;

namespace {

// Random matrix with entries in the field: base-field coefficients times radical monomials; about `zero_pct`
// percent of the entries are zero.
Matrix random_matrix(const FieldPtr& f, size_t r, size_t c, std::mt19937_64& rng, int zero_pct = 30) {
  Matrix m(f, r, c);
  std::uniform_int_distribution<int> pct(0, 99);
  RadicalMask all = (RadicalMask{1} << f->radicand_count()) - 1;
  std::uniform_int_distribution<RadicalMask> mask(0, all);
  for (size_t i = 0; i < r; ++i)
    for (size_t j = 0; j < c; ++j) {
      if (pct(rng) < zero_pct) continue;
      Scalar s(f);
      int terms = 1 + pct(rng) % 2;
      for (int t = 0; t < terms; ++t) s += Scalar::monomial(f, zbtest::random_cyclo(f->cyclotomic(), rng, 3), mask(rng));
      m(i, j) = s;
    }
  return m;
}

// A word of `len` letters from `pool`, with runs and a repeated block mixed in.
std::vector<const Matrix*> random_word(const std::vector<Matrix>& pool, size_t len, std::mt19937_64& rng) {
  std::uniform_int_distribution<size_t> pick(0, pool.size() - 1);
  std::vector<const Matrix*> w;
  while (w.size() < len) {
    int kind = static_cast<int>(rng() % 4);
    if (kind == 0) {  // a run
      const Matrix* m = &pool[pick(rng)];
      for (size_t k = rng() % 5; k-- > 0 && w.size() < len;) w.push_back(m);
    } else if (kind == 1 && w.size() >= 3) {  // repeat an earlier block
      size_t a = rng() % (w.size() - 2), b = std::min(w.size(), a + 1 + rng() % 6);
      std::vector<const Matrix*> blk(w.begin() + static_cast<long>(a), w.begin() + static_cast<long>(b));
      for (const Matrix* m : blk)
        if (w.size() < len) w.push_back(m);
    } else {
      w.push_back(&pool[pick(rng)]);
    }
  }
  return w;
}

FieldPtr field_with_roots(unsigned long n, const std::vector<std::string>& radicands) {
  FieldPtr f = Field::make(n);
  for (const auto& r : radicands) f->sqrt(parse_expression(r, f).to_base());
  return f;
}

// Ball check: the exact value's tight enclosure lies inside the computed ball.
bool contains_exact(const acb_mat_t b, const Matrix& exact) {
  acb_mat_t e;
  acb_mat_init(e, static_cast<long>(exact.rows()), static_cast<long>(exact.cols()));
  exact.ball(e, 1024);
  bool ok = true;
  for (long i = 0; i < acb_mat_nrows(e) && ok; ++i)
    for (long j = 0; j < acb_mat_ncols(e) && ok; ++j)
      ok = acb_contains(acb_mat_entry(b, i, j), acb_mat_entry(e, i, j));
  acb_mat_clear(e);
  return ok;
}

std::vector<const Matrix*> fibonacci_word(BraidGenerators& g, const std::vector<int>& anyons, size_t len, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::vector<int> wl;
  int strands = static_cast<int>(anyons.size());
  for (size_t i = 0; i < len; ++i) {
    int k = 1 + static_cast<int>(rng() % static_cast<unsigned>(strands - 1));
    wl.push_back(rng() % 2 ? k : -k);
  }
  return g.letters(anyons, Word::from_letters(wl));
}

}  // namespace

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
      for (int k = 0; k < 3; ++k) pool.push_back(random_matrix(f, d, d, rng));
      auto w = random_word(pool, 6 + rng() % 30, rng);
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
  Matrix a = random_matrix(f, 3, 3, rng, 0), b = random_matrix(f, 3, 3, rng, 20), c = random_matrix(f, 3, 3, rng, 50);
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
  Matrix p = random_matrix(f, 3, 4, rng, 10), q = random_matrix(f, 2, 3, rng, 10);
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
  for (int k = 0; k < 3; ++k) pool.push_back(random_matrix(f, d, d, rng, 93));
  auto w = random_word(pool, 25, rng);
  Matrix start = random_matrix(f, d, 2, rng, 50);
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
  for (int k = 0; k < 4; ++k) pool.push_back(random_matrix(f, 3, 3, rng, 40));
  auto w = random_word(pool, 300, rng);
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

TEST_CASE("poly matrix conversion round trip and denominators") {
  FieldPtr f = field_with_roots(12, {"3", "zeta + zeta^11 + 5"});
  std::mt19937_64 rng(11);
  PolyContext ctx(f);
  for (int t = 0; t < 5; ++t) {
    Matrix m = random_matrix(f, 3, 2, rng);
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

TEST_CASE("modular images equal the exact result reduced mod p") {
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  auto primes = choose_primes(*f, 3, 62);
  REQUIRE(primes.size() == 3);
  std::mt19937_64 rng(3);
  std::vector<Matrix> pool;
  for (int k = 0; k < 3; ++k) pool.push_back(random_matrix(f, 4, 4, rng, 30));
  auto w = random_word(pool, 40, rng);
  Matrix exact = word_product(w);
  Matrix start = random_matrix(f, 4, 2, rng, 0);
  Matrix exact_cols = word_product_columns(w, start);
  for (const auto& q : primes) {
    CHECK(q.p % 5 == 1);
    CHECK(word_product_mod(w, q) == reduce_matrix(exact, q));
    CHECK(word_product_mod(w, start, q) == reduce_matrix(exact_cols, q));
    // Homomorphism: image of a product = product of images.
    CHECK(reduce_matrix(pool[0] * pool[1], q) == reduce_matrix(pool[0], q) * reduce_matrix(pool[1], q));
    // Negative control: a different word has a different image.
    std::vector<const Matrix*> w2 = w;
    w2[3] = w2[3] == &pool[0] ? &pool[1] : &pool[0];
    CHECK(word_product_mod(w2, q) != reduce_matrix(exact, q));
  }
  // make_prime rejects a wrong root of the radicand.
  auto q = primes[0];
  CHECK_NOTHROW(make_prime(*f, q.p, q.zeta, q.roots));
  CHECK_THROWS_AS(make_prime(*f, q.p, q.zeta, {q.roots[0] + 1}), InputError);
  CHECK_THROWS_AS(make_prime(*f, q.p, 1, q.roots), InputError);
  CHECK_THROWS_AS(make_prime(*f, q.p + 2, q.zeta, q.roots), InputError);
}

TEST_CASE("chosen primes checked by PARI/GP") {
  if (!zbtest::have_gp()) return;
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  auto primes = choose_primes(*f, 2, 62);
  for (const auto& q : primes) {
    // Independent oracle (PARI/GP): p prime, w a root of polcyclo(5) mod p, s^2 = w + w^4 mod p.
    std::string prog = fmt::format(
        "p={}; w=Mod({},p); s=Mod({},p); print(isprime(p) && subst(polcyclo(5),x,w)==0 && s^2==w+w^4)", q.p, q.zeta,
        q.roots[0]);
    CHECK(zbtest::gp(prog) == "1");
    std::string wrong = fmt::format("p={}; w=Mod({},p); print(subst(polcyclo(5),x,w+1)==0)", q.p, q.zeta);
    CHECK(zbtest::gp(wrong) == "0");  // negative control
  }
}

TEST_CASE("exact product agrees with PARI/GP on Q(zeta_7)") {
  if (!zbtest::have_gp()) return;
  FieldPtr f = Field::make(7);
  std::mt19937_64 rng(77);
  std::vector<Matrix> pool;
  for (int k = 0; k < 2; ++k) pool.push_back(random_matrix(f, 3, 3, rng, 20));
  auto w = random_word(pool, 30, rng);
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
  for (int k = 0; k < 3; ++k) pool.push_back(random_matrix(f, 3, 3, rng, 30));
  auto w = random_word(pool, 30, rng);
  Matrix start = random_matrix(f, 3, 2, rng, 0);
  Matrix exact = word_product_naive(w, start);
  for (BallMethod m : {BallMethod::kTree, BallMethod::kColumns}) {
    acb_mat_t b;
    acb_mat_init(b, 3, 2);
    word_product_ball(b, w, start, 256, m, 1);
    CHECK(contains_exact(b, exact));
    CHECK(!contains_exact(b, exact.scaled(Scalar(f, 2))));  // negative control
    acb_mat_clear(b);
  }
}

TEST_CASE("interval engine on Fibonacci words keeps the requested bits") {
  // Fibonacci data: Kitaev (2006), Nayak et al. (2008) via tests/braid/fib_model.hpp; V(t^6; t) has
  // dimension 5 (Fibonacci number F_5, common practice).
  Model m = zbtest::fibonacci_model();
  BraidGenerators g(m, 0);  // total charge 1 (label index 0)
  std::vector<int> anyons(6, 1);
  REQUIRE(g.space(anyons).dimension() == 5);
  auto w = fibonacci_word(g, anyons, 400, 1);
  Matrix id = Matrix::identity(m.field, 5);
  Matrix exact = word_product(w);
  CHECK(exact == word_product_naive(w, id));
  for (BallMethod meth : {BallMethod::kTree, BallMethod::kColumns}) {
    acb_mat_t b;
    acb_mat_init(b, 5, 5);
    BallOptions o;
    o.target_bits = 80;
    o.method = meth;
    BallReport r = word_product_ball_adaptive(b, w, id, o);
    CHECK(r.reached);
    CHECK(r.accuracy_bits >= 80);
    CHECK(contains_exact(b, exact));
    acb_mat_clear(b);
  }
  // Left to right at 64 bits with plain balls loses far more than the tree (the reason for the tree).
  acb_mat_t naive;
  acb_mat_init(naive, 5, 5);
  id.ball(naive, 64);
  for (const Matrix* l : w) {
    acb_mat_t t, gb;
    acb_mat_init(gb, 5, 5);
    acb_mat_init(t, 5, 5);
    l->ball(gb, 64);
    acb_mat_mul(t, gb, naive, 64);
    acb_mat_swap(t, naive);
    acb_mat_clear(t);
    acb_mat_clear(gb);
  }
  acb_mat_t tree;
  acb_mat_init(tree, 5, 5);
  word_product_ball(tree, w, id, 64, BallMethod::kTree, 1);
  CHECK(ball_matrix_accuracy_bits(tree) > ball_matrix_accuracy_bits(naive) + 20);
  acb_mat_clear(tree);
  acb_mat_clear(naive);
  // Modular image of the Fibonacci word equals the exact product reduced.
  auto q = choose_primes(*m.field, 1)[0];
  CHECK(word_product_mod(w, q) == reduce_matrix(exact, q));
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
      Matrix a = random_matrix(f, 3, 4, rng, 10), b = random_matrix(f, 4, 2, rng, 10);
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

TEST_CASE("fixed-point column balls contain the exact result") {
  // The 128-bit fixed-point column method (kColumns at precision <= 112) against the exact product: containment,
  // bits kept, and a negative control 2^-60 away from the exact value that must fall outside. Fibonacci data as
  // above (fib_model.hpp); 6 anyons (all 5 columns) and 10 anyons (dimension 34, 3 columns). Then random letters:
  // small entries (fixed path) and entries above the guard (arb fallback), both must contain the exact product.
  Model m = zbtest::fibonacci_model();
  BraidGenerators g(m, 0);
  for (int n : {6, 10}) {
    CAPTURE(n);
    std::vector<int> anyons(static_cast<size_t>(n), 1);
    size_t dim = g.space(anyons).dimension();
    auto w = fibonacci_word(g, anyons, 300, 7);
    Matrix start = Matrix::identity(m.field, dim).columns(n == 6 ? std::vector<size_t>{0, 1, 2, 3, 4} : std::vector<size_t>{0, 1, 2});
    Matrix exact = word_product_naive(w, start);
    acb_mat_t fx, ab;
    acb_mat_init(fx, static_cast<long>(dim), static_cast<long>(start.cols()));
    acb_mat_init(ab, static_cast<long>(dim), static_cast<long>(start.cols()));
    word_product_ball(fx, w, start, 100, BallMethod::kColumns, 1);
    word_product_ball(ab, w, start, 100, BallMethod::kColumnsArb, 1);
    CHECK(contains_exact(fx, exact));
    CHECK(contains_exact(ab, exact));
    CHECK(ball_matrix_accuracy_bits(fx) >= 90);  // grid 2^-112, a few bits lost per doubling of the length
    Matrix off = exact;
    off(0, 0) += Scalar(m.field, Cyclo(m.field->cyclotomic(), 1, std::int64_t{1} << 60));
    CHECK(!contains_exact(fx, off));  // negative control
    acb_mat_clear(ab);
    acb_mat_clear(fx);
  }
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  std::mt19937_64 rng(2718);
  for (long scale : {16L, 1L}) {
    CAPTURE(scale);
    std::vector<Matrix> pool;
    for (int q = 0; q < 3; ++q) pool.push_back(random_matrix(f, 4, 4, rng, 30).scaled(Scalar(f, Cyclo(f->cyclotomic(), 1, scale))));
    auto w = random_word(pool, 40, rng);
    Matrix start = random_matrix(f, 4, 2, rng, 0).scaled(Scalar(f, Cyclo(f->cyclotomic(), 1, scale)));
    Matrix exact = word_product_naive(w, start);
    acb_mat_t b;
    acb_mat_init(b, 4, 2);
    word_product_ball(b, w, start, 100, BallMethod::kColumns, 1);
    CHECK(contains_exact(b, exact));
    CHECK(!contains_exact(b, exact.scaled(Scalar(f, 2))));  // negative control
    acb_mat_clear(b);
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
