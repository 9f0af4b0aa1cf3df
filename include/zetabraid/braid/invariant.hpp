// Ribbon data read off the model (quantum dimensions, twists) and the link invariant of a braid closure.
//
// Quantum dimension: d_a = 1/|[F^{a a* a}_a]_{0 0}| when the model claims a unitary gauge (then d_a > 0),
// otherwise d_a = 1/[F^{a a* a}_a]_{0 0} (Frobenius-Schur indicator taken as +1; documented limitation).
// Twist: theta_a = (1/d_a) sum_c d_c R^{a a}_c (quantum trace of the self-braiding; Kitaev 2006, eq. (223)-type
// identity, common practice) -- for a = a* only uses R^{aa}; for other a the same formula applies.
//
// Link invariant of the closure of a braid w on strands a_1..a_n (the word must return each label to its
// position): the quantum trace
//     Q(w) = sum_c d_c Tr rho_c(w),  rho_c on V(a_1..a_n; c)     (Reshetikhin-Turaev; framed, blackboard framing)
// and the framing-corrected, normalised invariant
//     I(w) = prod_components theta_{a_K}^{-w_K} * Q(w) / d_{a_1},
// where w_K is the sum of the signs of the crossings of component K with itself (for a knot: the writhe), so
// the unknot gives 1 and I is unchanged by Markov moves. With equal labels the total-writhe normalisation
//     J(w) = theta_a^{-writhe(w)} Q(w) / d_a
// is also returned (it differs from I by theta_a to the power of the crossings between different components).
#pragma once
#include <vector>

#include "zetabraid/braid/generators.hpp"

namespace zb {

Scalar quantum_dimension(const Model& model, int a);
Scalar twist(const Model& model, int a);

struct LinkInvariant {
  Scalar quantum_trace;     ///< Q(w)
  Scalar invariant;         ///< I(w)
  /// theta_a^{-writhe(w)} Q(w) / d_a when every strand has the same label a (else equal to `invariant`):
  /// the total-writhe normalisation; for SU(2)_k spin-1/2 strands it is (-1)^(c-1) V_L(t), t = e^{-2 pi i/(k+2)}.
  Scalar writhe_normalised;
  int components = 0;
  std::vector<long> self_writhe;  ///< w_K per component
};

LinkInvariant link_invariant(const Model& model, const std::vector<int>& strands, const Word& w);

}  // namespace zb
