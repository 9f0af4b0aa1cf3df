// Transformations of a model that keep the category it describes (gauge, relabelling) or give its mirror, and the
// move of two models into one common field (used by model/compare.hpp).
//
// Gauge action (multiplicity-free), derived here for the conventions of model.hpp: rescaling every splitting
// vertex |a, b; c> by a nonzero u^{ab}_c turns the left-associated tree |(a b -> e) c -> d> into
// u^{ab}_e u^{ec}_d times itself and the right-associated one into u^{bc}_f u^{af}_d times itself, so
//     [F'^{abc}_d]_{ef} = u^{ab}_e u^{ec}_d / (u^{bc}_f u^{af}_d) [F^{abc}_d]_{ef},
// and the exchange V^{ab}_c -> V^{ba}_c becomes
//     R'^{ab}_c = u^{ab}_c / u^{ba}_c R^{ab}_c.
// The F-formula is the one of Kitaev, Ann. Phys. 321 (2006) 2, App. E and Bonderson's thesis (Caltech 2007)
// eq. (2.32) (from memory). For R those sources write u^{ba}_c/u^{ab}_c (eq. (2.33), from memory): their R^{ab}_c
// is read on the other side of the vertex. What decides here is this project's hexagon (docs/model-format.md):
// inserting both factors, the terms of the sum over f pick up a common factor only when R'^{cf}_d/R^{cf}_d =
// u^{cf}_d/u^{fc}_d, and then both sides agree; with the opposite ratio a gauge copy fails the hexagon.
// tests/model/test_transform.cpp checks both (a gauge copy passes check_model, the opposite ratio does not).
#pragma once
#include <array>
#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "zetabraid/model/model.hpp"

namespace zb {

/// Vertex factors u^{ab}_c (key {a, b, c}); a vertex not listed has u = 1.
using Gauge = std::map<std::array<int, 3>, Scalar>;

/// The model with every F entry and R-symbol transformed by the gauge (formulas above). Values of u must lie in
/// m.field and be nonzero (MathError otherwise). The unitarity claim is kept only when every |u| = 1.
Model apply_gauge(const Model& m, const Gauge& u);

/// A random gauge with a fixed seed: u^{ab}_c = (+-p/q) zeta^k with 1 <= p, q <= 5 and zeta the field's root of
/// unity, u = 1 on the vertices with the unit (so F-symbols with the unit stay 1).
Gauge random_gauge(const Model& m, std::uint64_t seed);

/// The model with its labels permuted and renamed: old label i becomes label perm[i] of the result, named
/// names[perm[i]]. perm must be a permutation with perm[0] = 0 (MathError otherwise).
Model relabel_model(const Model& m, const std::vector<int>& perm, const std::vector<std::string>& names);

/// Parses "a:b,c:d,..." (label a of m is called b afterwards) into perm and names for relabel_model. When the new
/// names are a permutation of the old ones, the labels move to the positions of their new names (the unit must
/// keep its name); otherwise positions stay and only names change. InputError on unknown labels, repeats or
/// clashes.
void parse_relabeling(const Model& m, const std::string& spec, std::vector<int>* perm, std::vector<std::string>* names);

/// The complex conjugate ("mirror") model: every F entry and R-symbol conjugated.
Model mirror_model(const Model& m);

/// The Galois conjugate of m under the embedding (k, signs) of its field L = K(sqrt(d_1), ..., sqrt(d_m)),
/// K = Q(zeta_N): every coefficient c in K goes to sigma_k(c) (zeta -> zeta^k, gcd(k, N) = 1) and sqrt(d_j) to
/// (-1)^(bit j of signs) * r_j, r_j the principal root of sigma_k(d_j) (positive, or i times a positive number:
/// sigma_k(d_j) is real but may be negative) -- the same embedding as Scalar::ball_at(.., k, signs). Because the
/// d_j are independent modulo squares of K, so are the sigma_k(d_j), and every sign choice is a field embedding
/// of L into C; the images of F and R therefore satisfy the same pentagon and hexagon equations. The result lives
/// in a fresh field: conductor N, or lcm(N, 4) when some sigma_k(d_j) < 0 and i is not in K (so that r_j exists),
/// with the r_j reduced against or adjoined as radicands. The unitarity claim is kept only for the identity and
/// the mirror (k = +-1, signs = 0). MathError when gcd(k, N) != 1 or signs has a bit at or past m.
Model galois_model(const Model& m, long k, RadicalMask signs = 0);

/// Every F block F^{abc}_d, read as the square matrix with rows e and columns f in ascending label order, replaced
/// by its inverse (invert_f_blocks) or its transpose (transpose_f_blocks); R is unchanged. Both are involutions.
/// The result is generally NOT a consistent model in this project's convention (model.hpp): it is how the same
/// data look when printed in a convention where F maps the other way or is written with rows and columns
/// swapped. MathError on a block that is not square or is singular (only for inconsistent input). The unitarity
/// claim is dropped.
Model invert_f_blocks(const Model& m);
Model transpose_f_blocks(const Model& m);

/// A fresh field containing both models' fields: conductor lcm(N_a, N_b), the radicands of a and then of b.
FieldPtr common_field(const Model& a, const Model& b);

/// The same model with every value moved into the field `to` (which must contain m.field: zeta_N -> zeta_M^(M/N),
/// sqrt(d_j) -> the positive root of the image of d_j). MathError when N does not divide the conductor of `to`.
Model move_to_field(const Model& m, const FieldPtr& to);

}  // namespace zb
