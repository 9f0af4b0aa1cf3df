// Subspaces of a fusion space to keep (the encoded space of a gate): total-charge constraints on groups of
// consecutive anyons, or an explicit list of exact basis vectors.
//
// The projector onto "anyons i..j have total charge c" is computed independently of any tree shape: in the
// left-associated basis it acts only on the intermediate charges x_i..x_{j-1}, for fixed u = x_{i-1} and
// v = x_j, as the projector on the small space V(u, a_i, ..., a_j; v). There, braiding u across the block
// (s1 s2 ... s_m, a braid of u around the block as a unit, which preserves the block's total charge by
// naturality of the braiding) brings the block to the front, where its charge is the diagonal label x_m:
//     P_{u,v} = beta^{-1} Q beta,   beta = s1 s2 ... s_m,   Q = [x_m == c].
// For i == 1 the projector is diagonal (x_j == c). Several groups give the product of their (commuting)
// projectors.
#pragma once
#include <string>
#include <vector>

#include "zetabraid/braid/generators.hpp"

namespace zb {

struct ChargeGroup {
  int first = 0, last = 0;  ///< 1-based anyon positions, first <= last
  int charge = 0;           ///< label index
};

/// Parses "1-3:t,4-6:t" (or "2:t" for one anyon); InputError with the column on bad input.
std::vector<ChargeGroup> parse_keep(const Model& model, const std::string& text, int anyon_count);
/// Canonical text of groups, e.g. "1-3:t,4-6:t".
std::string keep_canonical(const Model& model, const std::vector<ChargeGroup>& groups);

/// A sparse square matrix (columns of (row, value)), used for projectors.
struct SparseMatrix {
  size_t n = 0;
  std::vector<std::vector<std::pair<size_t, Scalar>>> cols;
  Matrix dense(const FieldPtr& f) const;
};

/// Exact projector onto the subspace where anyons first..last have total charge `charge`.
SparseMatrix charge_projector(const FusionSpace& space, const ChargeGroup& group);

struct Subspace {
  Matrix basis;                      ///< dimension x k, columns = kept basis vectors
  bool coordinate = false;           ///< the kept basis is a set of tree basis vectors
  std::vector<size_t> coordinates;   ///< when coordinate: their indices (ascending)
  size_t kept() const { return basis.cols(); }
};

/// The kept subspace of the groups' constraints: coordinate when the product projector is diagonal, otherwise
/// a maximal independent set of its columns. Zero-dimensional result -> InputError.
Subspace subspace_from_groups(const FusionSpace& space, const std::vector<ChargeGroup>& groups);
/// The whole space (no constraint).
Subspace whole_space(const FusionSpace& space);
/// Basis vectors from text: one vector per line, entries exact expressions separated by ','; '#' starts a
/// comment. InputError naming name:line on bad entries, wrong length or dependent vectors.
Subspace subspace_from_text(const FusionSpace& space, const std::string& text, const std::string& name);

}  // namespace zb
