// Deciding exactly whether two multiplicity-free models describe the same fusion (or, with R, braided) category
// data up to gauge transformations and relabellings that keep the fusion rules, or whether B is equivalent to the
// complex conjugate ("mirror") of A. Gauge action and conventions: model/transform.hpp; the exact gauge test and
// why its consistency conditions decide equivalence over C: src/model/compare_gauge.hpp.
//
// Method: both models are moved into one common field (transform.hpp, common_field). Gauge invariants first:
// label count, fusion rules up to relabelling, quantum dimensions, Frobenius-Schur indicators, twists (from
// model/ribbon.hpp). Relabellings are enumerated by backtracking among the permutations that fix the unit and
// keep the fusion rules and these invariants; for each, the zero patterns of F and R must agree and the ratios
// B/A must be a gauge factor (decided exactly). The S-matrix is determined by N, d and theta, so it never differs
// first and is not compared separately. When the quantum dimensions are not all positive, ribbon_data picks a sign
// pattern that may depend on the order of the labels, so only d_a^2 (and no indicators or twists) filter the
// relabellings then; the gauge test decides anyway.
#pragma once
#include <array>
#include <string>
#include <vector>

#include "zetabraid/model/model.hpp"

namespace zb {

enum class CompareVerdict { kEquivalent, kEquivalentToMirror, kEquivalentToGaloisConjugate, kNotEquivalent };

struct CompareOptions {
  bool try_mirror = true;        ///< also compare B with the conjugate of A when A and B are not equivalent
  long max_relabelings = 20000;  ///< more candidate relabellings than this: ResourceError
  /// When neither A nor its mirror is equivalent to B: compare B with each Galois conjugate of A
  /// (transform.hpp, galois_model), one per embedding (k, signs) of A's field, k ascending, then signs. The
  /// identity is skipped, and the mirror (k = N-1, signs 0) when try_mirror already tried it; so without
  /// try_mirror the mirror can still be found here, as the conjugate k = N-1.
  bool try_galois = false;  ///< off by default: a Galois conjugate is a different category (CLI: --galois)
  /// Exclude conjugates whose gauge invariants d_a^2, R^{aa}_c provably match no label of B (enclosures) before
  /// the full test; the verdict is the same without it (tests compare both).
  bool galois_prefilter = true;
  long max_galois = 256;  ///< A's field has more embeddings than this: the conjugates are skipped (with a note)
};

/// One factor of a loop product: (value in B)/(value in A) of an entry, to a power.
struct LoopFactor {
  std::string entry;  ///< "F^{a b c}_d[e,f]" or "R^{a b}_c" in A's labels
  long exponent = 0;
  std::string ratio;  ///< exact text of B/A for this entry
};

/// The first gauge invariant found to differ (empty `invariant` when equivalent).
struct CompareDiff {
  std::string invariant;  ///< "label count", "fusion rules", "dimensions", "fs_indicators", "twists", "zero pattern", "loop product"
  std::string detail;     ///< one sentence, with label names
  std::string value_a, value_b;
  std::vector<LoopFactor> loop;  ///< for "loop product": the product of these is value_b (should be value_a = 1)
};

struct GaugeValue {
  std::string vertex;  ///< "a b -> c" in A's labels
  std::string value;   ///< exact text of u^{ab}_c
};

struct CompareResult {
  CompareVerdict verdict = CompareVerdict::kNotEquivalent;
  std::vector<std::string> labels_a, labels_b;
  std::vector<int> relabeling;     ///< A's label i is B's label relabeling[i] (when equivalent)
  bool gauge_explicit = false;     ///< gauge lists every vertex factor (verified by applying it)
  std::vector<GaugeValue> gauge;   ///< u^{ab}_c taking A (relabelled, conjugated for the mirror) to B
  std::string gauge_note;          ///< when not explicit: which root is needed
  CompareDiff differs;             ///< when not equivalent (from the direct comparison, not the mirror)
  long relabelings_tried = 0;
  /// For kEquivalentToGaloisConjugate: B is equivalent to galois_model(A, galois_k, galois_signs); relabeling and
  /// gauge then take that conjugate (labels as A's) to B. galois_signs has one entry +1/-1 per radicand of A.
  long galois_k = 1;
  std::vector<int> galois_signs;
  long galois_tried = 0;     ///< Galois conjugates compared in full
  /// Conjugates excluded before the full test: the enclosures prove that some label's d_a^2 or R^{aa}_c (gauge
  /// invariants) match those of no label of B.
  long galois_excluded = 0;
  std::vector<std::string> notes;
};

/// Compares A and B exactly (see above). A Galois conjugate of A is another solution of the same polynomial
/// equations (pentagon, hexagon have rational coefficients) and generally another category (e.g. Yang-Lee vs
/// Fibonacci): the verdict "equivalent-to-galois-conjugate" says so, it is not "equivalent". MathError/InputError only for unusable input (e.g. multiplicities).
CompareResult compare_models(const Model& a, const Model& b, const CompareOptions& opt = {});

/// "equivalent", "equivalent-to-mirror", "equivalent-to-galois-conjugate", "not-equivalent"
const char* verdict_name(CompareVerdict v);

}  // namespace zb
