// Ribbon data of a model -- quantum dimensions d_a, Frobenius-Schur indicators nu_a and twists theta_a -- computed
// in one place, for the invariants (model/invariants.hpp) and the braid layer (link invariants, full twists).
//
// Formulas (Kitaev, Ann. Phys. 321 (2006) 2, Appendix E; P. Bonderson, PhD thesis, Caltech 2007, section 2.3;
// both from memory), with the conventions of model.hpp:
//  * x_a = 1/[F^{a a* a}_a]_{11} (both intermediate channels the unit). For self-dual a, [F^{a a a}_a]_{11} = nu_a/d_a,
//    so x_a = nu_a d_a; in general d_a^2 = x_a x_{a*} is gauge invariant.
//  * d_a = +|x_a x_{a*}|^(1/2) when these numbers form a character of the fusion ring (d_a d_b = sum_c N_{ab}^c d_c;
//    always so for unitary models), otherwise the sign pattern with the fewest negative signs that does (models
//    with up to 16 labels; e.g. d_t = (1 - sqrt 5)/2 for Yang-Lee). MathError when no pattern works.
//  * nu_a = d_a [F^{a a a}_a]_{11} = d_a / x_a (= +-1) for self-dual a, 0 otherwise. It is *not* assumed to be +1:
//    e.g. nu_sigma = -1 in the Ising-type models with nu = 3, 5 (mod 8) of Kitaev's sixteenfold way, and
//    nu_{1/2} = -1 in SU(2)_k.
//  * theta_a = sum_c (d_c/d_a) R^{aa}_c (the quantum trace of the self-exchange, divided by d_a).
#pragma once
#include <vector>

#include "zetabraid/model/model.hpp"

namespace zb {

struct RibbonData {
  std::vector<Scalar> dims;    ///< d_a
  std::vector<int> fs;         ///< nu_a for self-dual a (+1 or -1), 0 for the others
  bool braided = false;        ///< R-symbols present: twists filled
  std::vector<Scalar> twists;  ///< theta_a (empty without R-symbols)
};

/// Computes d_a, nu_a and (with R-symbols) theta_a for every label. MathError when the data admit no consistent
/// quantum dimensions (no duals, [F^{a a* a}_a]_{11} zero or missing, no sign pattern, d_a^2 not in the base field,
/// nu_a not +-1, d of the unit not 1, a missing R^{aa}_c).
RibbonData ribbon_data(const Model& m);

/// d_a and theta_a of one label (each call computes ribbon_data(m); call that once for many labels).
Scalar quantum_dimension(const Model& m, int a);
Scalar twist(const Model& m, int a);

}  // namespace zb
