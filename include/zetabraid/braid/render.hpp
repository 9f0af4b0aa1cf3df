// Renderings of the braid layer's results, for people (text lines) and programs (one JSON object), in one place:
// fusion-space bases, kept subspaces, generator matrices, braid-representation checks and link invariants.
// Presentation only. Naming as in model/render.hpp: <result>_text returns whole lines, <result>_json one compact
// JSON value without a trailing newline. Exact values appear as canonical texts, enclosures as "[m +/- r]".
#pragma once
#include <string>
#include <utility>
#include <vector>

#include "zetabraid/braid/checks.hpp"
#include "zetabraid/braid/invariant.hpp"
#include "zetabraid/braid/subspace.hpp"

namespace zb {

/// The basis of a fusion space. JSON keys: dimension, basis (tree labels).
std::string fusion_space_text(const FusionSpace& space);
std::string fusion_space_json(const FusionSpace& space);

/// A kept subspace of `space` given by the canonical charge spec `spec` (keep_canonical). JSON keys: dimension,
/// kept_dimension, coordinate, basis (kept vectors, one row each).
std::string subspace_text(const FusionSpace& space, const std::string& spec, const Subspace& keep);
std::string subspace_json(const FusionSpace& space, const Subspace& keep);

/// "s3" for k = 3, "s3^-1" for k = -3.
std::string generator_name(int k);
/// Generator matrices as (signed index, matrix) pairs. JSON: an array of {generator, matrix}.
using GeneratorMatrices = std::vector<std::pair<int, const Matrix*>>;
std::string generators_text(const GeneratorMatrices& gens);
std::string generators_json(const GeneratorMatrices& gens);

/// The report of check_braid_representation on V(anyons; total) of model m, run with `opt`. JSON keys: ok,
/// dimension, relations [{relation, holds}], eigenvalues [{generator, eigenvalues [{value, multiplicity, source}],
/// complete, hecke}], full_twist ({holds, scalar} or null), algebra_dimension, irreducible.
std::string braid_report_text(const Model& m, const std::vector<int>& anyons, int total, const BraidReport& r,
                              const BraidCheckOptions& opt);
std::string braid_report_json(const BraidReport& r);

/// The link invariant of a braid closure; `writhe` is the word's writhe. JSON keys: components, writhe,
/// quantum_trace, invariant, writhe_normalised (each {exact, ball}).
std::string link_invariant_text(const LinkInvariant& li, long writhe);
std::string link_invariant_json(const LinkInvariant& li, long writhe);

}  // namespace zb
