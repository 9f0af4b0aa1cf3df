// Fusion spaces in the left-associated fusion-tree basis (braid/fusion_space.hpp): dimensions, labels and anyon
// lists, on the Fibonacci model built in code.
#include <doctest/doctest.h>

#include "support/fib_model.hpp"
#include "zetabraid/braid/fusion_space.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

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
