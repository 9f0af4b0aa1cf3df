// Built-in families of anyon models, computed exactly.
#pragma once
#include "zetabraid/model/model.hpp"

namespace zb {

enum class Su2Gauge {
  kUnitary,     ///< F-matrices unitary; entries involve square roots of quantum integers
  kCyclotomic,  ///< a gauge with every F- and R-symbol in Q(zeta) (not unitary)
};

/// SU(2)_k from the quantum 6j-symbol formula (Kirillov & Reshetikhin 1989), q = exp(pi i/(k+2)).
/// Labels are the spins 0, 1/2, 1, ..., k/2 (with even_only: the integer spins, the SO(3)_k-type
/// subcategory). Unitary gauge: [F^{j1 j2 j3}_j]_{j12 j23} = (-1)^{j1+j2+j3+j} sqrt([2 j12+1][2 j23+1])
/// {j1 j2 j12; j3 j j23}_q. R^{j1 j2}_j = (-1)^{j1+j2-j} q^{c_j - c_j1 - c_j2}, c_j = j(j+1).
/// Field: Q(zeta_{4(k+2)}) (Q(zeta_{2(k+2)}) for even_only), plus square roots of quantum integers.
Model make_su2(int level, Su2Gauge gauge = Su2Gauge::kUnitary, bool even_only = false);

/// Z_N with trivial F-symbols and R^{ab}_{a+b} = zeta_N^{p a b} (a bicharacter, so the hexagons hold).
Model make_cyclic(int order, int power);
/// Toric-code anyons 1, e, m, f (Z_2 x Z_2, trivial F, R^{ab} = (-1)^{a_e b_m}); Kitaev, Ann. Phys. 303 (2003) 2.
Model make_toric_code();
/// Three-fermion model (Z_2 x Z_2, trivial F, every nontrivial anyon a fermion with mutual statistics -1).
Model make_three_fermion();

/// Sets every F entry and R-symbol that is admissible but not stored as given (used by generators).
void mark_all_given(Model& m);

}  // namespace zb
