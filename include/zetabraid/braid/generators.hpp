// Exact matrices of the braid generators sigma_i^{+-1} on left-associated fusion-tree bases.
//
// sigma_i (1 <= i < n) is the counterclockwise exchange of the anyons in positions i and i+1 (the exchange whose
// eigenvalue in channel f is R^{a_i a_{i+1}}_f). It maps V(..., a_i, a_{i+1}, ...; c) to
// V(..., a_{i+1}, a_i, ...; c) and changes only the intermediate charge x_i. With u = x_{i-1}, d = x_{i+1},
// b = a_i, c' = a_{i+1} (F-move to fuse b and c' first, R, inverse F-move):
//    sigma_i |.. x_i = e ..>    = sum_{e'} ( sum_f [F^{u b c'}_d]_{e f} R^{b c'}_f [F^{u c' b}_d]^{-1}_{f e'} ) |.. x_i = e' ..>
//    sigma_i^-1 |.. x_i = e ..> = sum_{e'} ( sum_f [F^{u b c'}_d]_{e f} (R^{c' b}_f)^{-1} [F^{u c' b}_d]^{-1}_{f e'} ) |.. e' ..>
// and for i = 1 (no F-move): sigma_1 = diag R^{a_1 a_2}_{x_2}, sigma_1^-1 = diag (R^{a_2 a_1}_{x_2})^{-1}.
// Matrices act on column vectors: entry (new basis index, old basis index).
#pragma once
#include <map>
#include <memory>
#include <vector>

#include "zetabraid/braid/fusion_space.hpp"
#include "zetabraid/braid/word.hpp"

namespace zb {

/// Generators of one model and total charge, built on demand and cached (not thread-safe).
class BraidGenerators {
 public:
  BraidGenerators(const Model& model, int total);

  const Model& model() const { return *model_; }
  int total() const { return total_; }
  /// The fusion space of a label sequence (cached).
  const FusionSpace& space(const std::vector<int>& anyons);
  /// Matrix of sigma_k (k > 0) or sigma_|k|^-1 (k < 0) on V(anyons; total). Throws InputError when |k| is
  /// out of range, MathError when a needed R-symbol is missing.
  const Matrix& matrix(const std::vector<int>& anyons, int k);
  /// Labels after applying sigma_|k|^{+-1}: positions |k|, |k|+1 swapped.
  static std::vector<int> swapped(std::vector<int> anyons, int k);

  /// The matrices of a word's letters in application order, starting from `anyons`; `end` receives the label
  /// sequence after the word. Checks the range of every letter (InputError with the column).
  std::vector<const Matrix*> letters(const std::vector<int>& anyons, const Word& w, std::vector<int>* end = nullptr);

 private:
  Matrix build(const std::vector<int>& anyons, int k);
  const Model* model_;
  int total_;
  FMatrixCache fcache_;
  std::map<std::vector<int>, std::unique_ptr<FusionSpace>> spaces_;
  std::map<std::pair<std::vector<int>, int>, std::unique_ptr<Matrix>> mats_;
};

}  // namespace zb
