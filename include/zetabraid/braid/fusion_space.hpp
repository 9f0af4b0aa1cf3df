// Fusion spaces V(a_1 ... a_n; c) in the left-associated fusion-tree basis.
//
// Basis (fixed throughout zetabraid, documented in docs/certificate-format.md): a basis vector is a sequence
// of intermediate charges (x_1, ..., x_n) with x_1 = a_1, x_k a fusion channel of x_{k-1} (x) a_k, and
// x_n = c: the tree (((a_1 a_2 -> x_2) a_3 -> x_3) ... a_n -> x_n = c). Basis vectors are ordered
// lexicographically by the label indices (model order) of (x_2, ..., x_{n-1}).
#pragma once
#include <map>
#include <string>
#include <vector>

#include "zetabraid/linalg/matrix.hpp"
#include "zetabraid/model/model.hpp"

namespace zb {

class FusionSpace {
 public:
  /// Largest dimension built; beyond it ResourceError.
  static constexpr size_t kMaxDimension = 20000;
  /// Most anyons in one fusion space (braid checks cost ~ anyons^2 generator pairs); beyond it ResourceError.
  static constexpr size_t kMaxAnyons = 256;

  /// The space of the given anyons (label indices) with total charge `total`; may be zero-dimensional.
  FusionSpace(const Model& model, std::vector<int> anyons, int total);

  const Model& model() const { return *model_; }
  const std::vector<int>& anyons() const { return anyons_; }
  int total() const { return total_; }
  size_t dimension() const { return basis_.size(); }
  int anyon_count() const { return static_cast<int>(anyons_.size()); }
  /// Intermediate charges (x_1..x_n) of basis vector i.
  const std::vector<int>& tree(size_t i) const { return basis_.at(i); }
  /// Index of a tree, or -1.
  long index_of(const std::vector<int>& tree) const;
  /// Readable label, e.g. "(t,1,t,t,1)" = the sequence x_1..x_n.
  std::string label(size_t i) const;
  /// Throws InputError with a clear message when dimension() == 0.
  void require_nonzero() const;

 private:
  const Model* model_;
  std::vector<int> anyons_;
  int total_;
  std::vector<std::vector<int>> basis_;
  std::map<std::vector<int>, size_t> index_;
};

/// Label indices from text "t t t" or "t,t,t"; InputError naming the unknown label and the model's labels.
std::vector<int> parse_anyons(const Model& model, const std::string& text);
/// One label index; InputError when unknown (what = e.g. "total charge").
int parse_label(const Model& model, const std::string& text, const std::string& what);
/// Label names joined by blanks.
std::string label_names(const Model& model, const std::vector<int>& labels);

/// Exact F-matrix [F^{abc}_d] restricted to admissible channels: rows e (a b -> e, e c -> d), columns f
/// (b c -> f, a f -> d), both ascending; with its inverse. Missing admissible entries read as zero.
struct FMatrix {
  std::vector<int> rows, cols;
  Matrix value, inverse;
  long row_of(int e) const;
  long col_of(int f) const;
};

/// Cache of F-matrices and their inverses for one model (not thread-safe).
class FMatrixCache {
 public:
  explicit FMatrixCache(const Model& m) : m_(&m) {}
  /// Throws MathError when the F-matrix is singular or not square.
  const FMatrix& get(int a, int b, int c, int d);

 private:
  const Model* m_;
  std::map<std::array<int, 4>, FMatrix> cache_;
};

}  // namespace zb
