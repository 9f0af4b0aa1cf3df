// Subspaces to keep (braid/subspace.hpp): charge projectors of groups of anyons, their independence of the tree
// shape, and keep specifications, on the Fibonacci model built in code.
#include <doctest/doctest.h>

#include "support/fib_model.hpp"
#include "zetabraid/braid/generators.hpp"
#include "zetabraid/braid/subspace.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

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
