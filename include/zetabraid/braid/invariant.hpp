// The link invariant of a braid closure. Quantum dimensions d_a and twists theta_a are the model's
// (model/ribbon.hpp: ribbon_data, quantum_dimension, twist), with the model's Frobenius-Schur indicators -- the
// braid layer computes no ribbon data of its own.
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
#include "zetabraid/model/ribbon.hpp"

namespace zb {

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
