// Exact checks of a braid-group representation on V(a_1..a_n; c): braid relations, eigenvalues with
// multiplicities, Hecke-type quadratic relations, the full twist, and the dimension of the image algebra.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "zetabraid/braid/generators.hpp"

namespace zb {

struct RelationCheck {
  std::string name;  ///< e.g. "s1 s2 s1 = s2 s1 s2", "s1 s3 = s3 s1", "s2 s2^-1 = 1"
  bool holds = false;
};

struct Eigenvalue {
  Scalar value;
  size_t multiplicity = 0;  ///< dim ker(g - value) (exact rank)
  std::string source;       ///< e.g. "R^{t t}_1"
};

struct GeneratorEigen {
  int generator = 0;        ///< i of sigma_i
  bool squared = false;     ///< eigenvalues of sigma_i^2 (labels a_i != a_{i+1})
  std::vector<Eigenvalue> eigenvalues;
  bool complete = false;    ///< multiplicities add up to the dimension (diagonalisable, all found)
  bool hecke_checked = false, hecke_holds = false;  ///< (g - l1)(g - l2) = 0 when two eigenvalues
};

struct BraidReport {
  size_t dimension = 0;
  std::vector<RelationCheck> relations;
  std::vector<GeneratorEigen> eigen;
  bool twist_checked = false, twist_holds = false;
  std::optional<Scalar> twist_expected;  ///< theta_c / theta_a^n
  long algebra_dimension = -1;  ///< -1 = not computed (dimension too large or mixed labels)
  bool ok() const;
};

struct BraidCheckOptions {
  size_t max_dimension = 64;        ///< larger spaces: ResourceError
  size_t max_algebra_dimension = 13; ///< image-algebra dimension computed for spaces up to this dimension
};

BraidReport check_braid_representation(BraidGenerators& gens, const std::vector<int>& anyons,
                                       const BraidCheckOptions& opt = {});

/// Dimension of the algebra spanned by the products of the given square matrices (closure of the identity under
/// left multiplication by the generators), by exact elimination.
size_t algebra_dimension(const std::vector<const Matrix*>& gens, size_t dim);

}  // namespace zb
