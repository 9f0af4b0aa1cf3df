// The exact gauge-equivalence test behind model/compare.hpp (internal to src/model/).
//
// Given, for every nonzero F entry and R-symbol, the ratio q_r = (value in B)/(value in A) and the exponent vector
// M_r of the vertex factors u^{ab}_c in its gauge factor (model/transform.hpp), the question is whether some
// nonzero u in C solves u^{M_r} = q_r for every row r.
//
// Why the consistency conditions decide (over C): write the rows as a homomorphism Z^m -> Z^n (e_r -> M_r) and
// q as psi: Z^m -> C*. A solution u is a homomorphism phi: Z^n -> C* with psi = phi o M. It exists iff psi is
// trivial on the kernel of M (so psi factors through the image of M, a subgroup of Z^n) -- the extension from the
// image to all of Z^n then always exists because C* is a divisible group (k-th roots exist). So: equivalent over C
// iff prod_r q_r^{y_r} = 1 for every integer y with sum_r y_r M_r = 0.
//
// How: integer row echelon form (Hermite-style elimination with extended gcds, overflow-checked int64) of the
// rows, processed one by one, carrying the ratio of each row multiplicatively along every unimodular row
// operation. The row operations are unimodular, so the rows that end as zero form a Z-basis of that kernel, and
// their carried values are exactly the products to test against 1 in the field. The echelon rows then give an
// explicit gauge by back substitution when every pivot is +-1 (or a k-th root happens to be found); otherwise the
// gauge exists but is only described ("a k-th root of X").
#pragma once
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "zetabraid/field/scalar.hpp"

namespace zb::detail {

struct GaugeRow {
  std::vector<std::pair<int, int>> exps;  ///< (column, exponent), exponents nonzero, columns distinct
  Scalar ratio;                           ///< nonzero
};

struct GaugeSolution {
  bool consistent = true;
  /// When not consistent: the failing product as (row index, exponent) and its value (!= 1).
  std::vector<std::pair<int, long>> loop;
  std::optional<Scalar> loop_value;
  /// When consistent: u per column (explicit), or explicit == false and a note naming the root that is needed.
  bool explicit_gauge = false;
  std::vector<Scalar> u;
  std::string note;
};

/// Decides solvability of u^{M_r} = q_r (r over rows) with ncols unknowns, exactly, over C.
GaugeSolution solve_gauge(int ncols, const std::vector<GaugeRow>& rows, const FieldPtr& f);

}  // namespace zb::detail
