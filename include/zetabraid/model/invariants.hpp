// Invariants of a braided anyon model, computed exactly (methods documented in docs/model-format.md).
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "zetabraid/linalg/matrix.hpp"
#include "zetabraid/model/model.hpp"

namespace zb {

/// d_a, nu_a and theta_a are those of ribbon_data() (model/ribbon.hpp), the one place they are computed.
struct Invariants {
  std::vector<Scalar> dims;          ///< quantum dimensions d_a
  Scalar global_dim2;                ///< D^2 = sum_a d_a^2
  Scalar global_dim;                 ///< D = +sqrt(D^2) (in unitary models; see docs for the sign convention)
  std::vector<int> fs;               ///< Frobenius-Schur indicators (0 for non-self-dual labels)
  bool braided = false;              ///< R-symbols present: everything below is filled
  std::vector<Scalar> twists;        ///< theta_a
  std::optional<Matrix> S;           ///< S_ab = (1/D) sum_c N_{a* b}^c d_c theta_c/(theta_a theta_b)
  std::optional<Matrix> T;           ///< diag(theta_a)
  Scalar gauss_plus;                 ///< p_+ = sum_a d_a^2 theta_a
  Scalar gauss_phase;                ///< p_+/D (= exp(2 pi i c/8) for a modular model)
  bool central_charge_known = false; ///< p_+/D is a root of unity: c mod 8 = 8 j/m exactly
  long c_num = 0, c_den = 1;         ///< c mod 8 = c_num/c_den, 0 <= c < 8
  bool modular = false;              ///< S invertible
  bool verlinde_ok = true;           ///< Verlinde formula reproduces N (modular models)
  long verlinde_checked = 0;
  /// Second way to the FS indicators (modular models): nu_a = (1/D^2) sum_{b,c} N_{bc}^a d_b d_c (theta_b/theta_c)^2.
  bool fs_twist_formula_ok = true;
  std::vector<std::string> notes;

  explicit Invariants(FieldPtr f) : global_dim2(f), global_dim(f), gauss_plus(f), gauss_phase(f) {}
};

/// Computes every invariant exactly. Throws MathError when no consistent choice of quantum dimensions exists.
Invariants compute_invariants(const Model& m, long digits = 15);

// Text and JSON renderings: invariants_text / invariants_json in model/render.hpp.

}  // namespace zb
