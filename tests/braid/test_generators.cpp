// Braid words, fusion spaces, generators, subspaces and checks on a Fibonacci model built in code.
#include <doctest/doctest.h>

#include "fib_model.hpp"
#include "zetabraid/braid/checks.hpp"
#include "zetabraid/braid/invariant.hpp"
#include "zetabraid/braid/subspace.hpp"
#include "zetabraid/braid/word.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"

using namespace zb;

TEST_CASE("braid word syntax") {
  CHECK(parse_word("s1 s2^-1 s3").canonical() == "1 -2 3");
  CHECK(parse_word("1 -2 3").canonical() == "1 -2 3");
  CHECK(parse_word("(s1 s2^-1)^3").canonical() == "1 -2 1 -2 1 -2");
  CHECK(parse_word("(s1 s2)^-2").canonical() == "-2 -1 -2 -1");
  CHECK(parse_word("s1^3,s2^(-2)").canonical() == "1 1 1 -2 -2");
  CHECK(parse_word("s1s2").canonical() == "1 2");
  CHECK(parse_word("((s1)^2 s2)^0 s3").canonical() == "3");
  CHECK(parse_word("").size() == 0);
  CHECK(parse_word("s1 s2 s1^-1").writhe() == 1);
  CHECK(parse_word("1 2 -3").inverse().canonical() == "3 -2 -1");
  // errors carry the column
  auto col = [](const std::string& w) -> std::string {
    try {
      parse_word(w);
    } catch (const InputError& e) {
      return std::string(e.what()).substr(0, std::string(e.what()).find(':'));
    }
    return "no error";
  };
  CHECK(col("s1 x2") == "column 4");
  CHECK(col("s1 (s2") == "column 4");
  CHECK(col("s1 s2)") == "column 6");
  CHECK(col("s0") == "column 1");
  CHECK(col("0") == "column 1");
  CHECK(col("s1^") == "column 4");
  CHECK(col("s1 3^2") == "column 5");
  CHECK_THROWS_AS(parse_word("(s1)^1000000000 (s2)^1000"), ResourceError);
  Word w = parse_word("s1  s7");
  CHECK_THROWS_WITH_AS(w.check_range(6), doctest::Contains("column 5: generator s7 out of range"), InputError);
  CHECK_NOTHROW(w.check_range(8));
}

TEST_CASE("Fibonacci fusion-space dimensions are Fibonacci numbers") {
  // Common practice: dim V(t^n; 1) = F_{n-1}, dim V(t^n; t) = F_n with F_1 = F_2 = 1.
  Model m = zbtest::fibonacci_model();
  std::vector<size_t> fib{0, 1, 1};
  for (int k = 3; k <= 20; ++k) fib.push_back(fib[fib.size() - 1] + fib[fib.size() - 2]);
  for (int n = 2; n <= 16; ++n) {
    std::vector<int> a(static_cast<size_t>(n), 1);
    CHECK(FusionSpace(m, a, 0).dimension() == fib[static_cast<size_t>(n - 1)]);
    CHECK(FusionSpace(m, a, 1).dimension() == fib[static_cast<size_t>(n)]);
  }
  FusionSpace s(m, {1, 1, 1}, 1);
  REQUIRE(s.dimension() == 2);
  CHECK(s.label(0) == "(t,1,t)");
  CHECK(s.label(1) == "(t,t,t)");
  CHECK(s.index_of({1, 1, 1}) == 1);
  // zero-dimensional: a clear input error
  FusionSpace z(m, {1}, 0);
  CHECK(z.dimension() == 0);
  CHECK_THROWS_WITH_AS(z.require_nonzero(), doctest::Contains("possible total charges: t"), InputError);
  // mixed labels: 1 t t has the dimensions of t t
  CHECK(FusionSpace(m, {0, 1, 1}, 0).dimension() == 1);
  CHECK(FusionSpace(m, {1, 0, 1, 1}, 1).dimension() == 2);
  CHECK_THROWS_AS(parse_anyons(m, "t t q"), InputError);
  CHECK(parse_anyons(m, "t, t 1") == std::vector<int>{1, 1, 0});
}

TEST_CASE("generators: inverses, unitarity, braid relations, eigenvalues, Hecke, full twist") {
  Model m = zbtest::fibonacci_model();
  for (int total = 0; total < 2; ++total)
    for (int n = 3; n <= 6; ++n) {
      std::vector<int> a(static_cast<size_t>(n), 1);
      BraidGenerators g(m, total);
      BraidReport r = check_braid_representation(g, a);
      CHECK(r.ok());
      CHECK(r.twist_checked);
      // Full twist = theta_c / theta_t^n (ribbon identity; Kassel, Quantum Groups, ch. XIV;
      // Bakalov & Kirillov, Lectures on Tensor Categories, ch. 3)
      CHECK(r.twist_holds);
      for (int i = 1; i < n; ++i) {
        const Matrix& s = g.matrix(a, i);
        CHECK((s * s.adjoint()).is_identity());  // unitary gauge => unitary generators
        CHECK((s * g.matrix(a, -i)).is_identity());
      }
    }
  // the six-anyon two-qubit space (common practice): dimension 5, each generator has the two eigenvalues
  // R^{tt}_1 (multiplicity 2) and R^{tt}_t (multiplicity 3); Hecke relation holds
  BraidGenerators g(m, 0);
  std::vector<int> six(6, 1);
  BraidReport r = check_braid_representation(g, six);
  CHECK(r.dimension == 5);
  for (const auto& e : r.eigen) {
    REQUIRE(e.eigenvalues.size() == 2);
    CHECK(e.complete);
    CHECK(e.hecke_holds);
    std::multiset<size_t> mult{e.eigenvalues[0].multiplicity, e.eigenvalues[1].multiplicity};
    CHECK(mult == std::multiset<size_t>{2, 3});
    for (const auto& ev : e.eigenvalues)
      CHECK((ev.multiplicity == 2 ? ev.value == *m.r_symbol(1, 1, 0) : ev.value == *m.r_symbol(1, 1, 1)));
  }
  // Burnside: the Fibonacci representation on 6 anyons is irreducible (Freedman, Larsen & Wang 2002: the image
  // is dense), so the image spans all 5x5 matrices
  CHECK(r.algebra_dimension == 25);
  // theta_t = exp(4 pi i/5) (Kitaev 2006, Fibonacci)
  CHECK(twist(m, 1) == parse_expression("exp(4*pi*i/5)", m.field));
  CHECK(quantum_dimension(m, 1) == parse_expression("1 + zeta^2 + zeta^8", m.field));
}

TEST_CASE("negative control: a wrong R-symbol breaks the braid relations or the full twist") {
  Model bad = zbtest::fibonacci_model(true);
  BraidGenerators g(bad, 1);
  BraidReport r = check_braid_representation(g, {1, 1, 1, 1});
  CHECK_FALSE(r.ok());
}

TEST_CASE("mixed labels: sigma maps between spaces with swapped labels") {
  Model m = zbtest::fibonacci_model();
  BraidGenerators g(m, 1);
  std::vector<int> a{0, 1, 1, 1};
  const Matrix& s1 = g.matrix(a, 1);
  CHECK(s1.rows() == g.space({1, 0, 1, 1}).dimension());
  BraidReport r = check_braid_representation(g, a);
  CHECK(r.ok());
  CHECK_FALSE(r.twist_checked);
  // unit label braids trivially with t: sigma_1 on (1 t ...) is the identity map (R^{1t}_t = 1)
  CHECK(s1.is_identity());
}

TEST_CASE("charge projectors are independent of the tree shape") {
  Model m = zbtest::fibonacci_model();
  const int n = 6;
  std::vector<int> a(n, 1);
  FusionSpace sp(m, a, 0);
  BraidGenerators g(m, 0);
  for (int first = 1; first <= n; ++first)
    for (int last = first; last <= n; ++last)
      for (int c = 0; c < 2; ++c) {
        ChargeGroup grp{first, last, c};
        Matrix p = charge_projector(sp, grp).dense(m.field);
        CHECK(p * p == p);  // idempotent
        // rank = number of trees with the block fused first: dim V(t..t, c, t..t; 1) * dim V(t^(last-first+1); c)
        std::vector<int> outer(static_cast<size_t>(first - 1), 1);
        outer.push_back(c);
        outer.insert(outer.end(), static_cast<size_t>(n - last), 1);
        size_t expect = FusionSpace(m, outer, 0).dimension() *
                        FusionSpace(m, std::vector<int>(static_cast<size_t>(last - first + 1), 1), c).dimension();
        CHECK(p.rank() == expect);
        // braids inside the block and outside it commute with the block charge
        for (int i = 1; i < n; ++i) {
          bool inside = i >= first && i + 1 <= last, outside = i + 1 < first || i > last;
          const Matrix& s = g.matrix(a, i);
          if (inside || outside) CHECK(s * p == p * s);
        }
        // orthogonal projector in a unitary gauge
        CHECK(p.adjoint() == p);
      }
  // two-qubit encoding: dimension 4 of 5, a coordinate subspace
  Subspace k = subspace_from_groups(sp, parse_keep(m, "1-3:t,4-6:t", n));
  CHECK(k.kept() == 4);
  CHECK(k.coordinate);
  // a group not starting at 1 gives a non-diagonal projector: still the right dimension
  Subspace k2 = subspace_from_groups(sp, parse_keep(m, "2-3:1", n));
  CHECK_FALSE(k2.coordinate);
  CHECK(k2.kept() == 2);  // dim V(t 1 t t t; 1) * 1 = 2
  CHECK_THROWS_AS(parse_keep(m, "1-3:t,3-4:1", n), InputError);
  CHECK_THROWS_AS(parse_keep(m, "1-7:t", n), InputError);
  CHECK_THROWS_AS(parse_keep(m, "1-3 t", n), InputError);
  CHECK_THROWS_AS(parse_keep(m, "1-3:q", n), InputError);
  CHECK_THROWS_AS(subspace_from_groups(sp, parse_keep(m, "1-2:1,3-4:1,5-6:t", n)), InputError);
}

TEST_CASE("word products through the interface agree with generator products") {
  Model m = zbtest::fibonacci_model();
  BraidGenerators g(m, 1);
  std::vector<int> a(4, 1);
  Word w = parse_word("s1 s2^-1 s3 s1");
  Matrix p = word_product(g.letters(a, w));
  // leftmost letter applied first: rho(w) = s1 * s3 * s2^-1 * s1
  Matrix q = g.matrix(a, 1) * g.matrix(a, 3) * g.matrix(a, -2) * g.matrix(a, 1);
  CHECK(p == q);
  CHECK(p != g.matrix(a, 1) * g.matrix(a, -2) * g.matrix(a, 3) * g.matrix(a, 1));
}

TEST_CASE("sixteen Fibonacci anyons: braid relations on a few columns") {
  // dimension F_15 = 610 (common practice); relations checked on kept columns only, through the interface
  Model m = zbtest::fibonacci_model();
  std::vector<int> a(16, 1);
  BraidGenerators g(m, 0);
  const FusionSpace& sp = g.space(a);
  REQUIRE(sp.dimension() == 610);
  Matrix start(m.field, sp.dimension(), 3);
  start(0, 0) = Scalar(m.field, 1);
  start(300, 1) = Scalar(m.field, 1);
  start(609, 2) = Scalar(m.field, 1);
  auto apply = [&](const char* w) { return word_product_columns(g.letters(a, parse_word(w)), start); };
  CHECK(apply("s7 s8 s7") == apply("s8 s7 s8"));
  CHECK(apply("s1 s15") == apply("s15 s1"));
  CHECK(apply("s9 s9^-1") == start);
  CHECK(apply("s7 s8") != apply("s8 s7"));  // negative control: adjacent generators do not commute
}
