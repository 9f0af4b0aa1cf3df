// Internal to src/linalg: pieces shared by the ball engines (word_product_ball.cpp, word_product_ball_fixed.cpp).
#pragma once
#include <memory>
#include <utility>
#include <vector>

#include "zetabraid/linalg/matrix.hpp"

namespace zb::detail {

// RAII acb_mat.
struct BallMat {
  acb_mat_t m;
  BallMat(long r, long c) { acb_mat_init(m, r, c); }
  ~BallMat() { acb_mat_clear(m); }
  BallMat(const BallMat&) = delete;
  BallMat& operator=(const BallMat&) = delete;
  long rows() const { return acb_mat_nrows(m); }
  long cols() const { return acb_mat_ncols(m); }
};
using BallPtr = std::unique_ptr<BallMat>;

struct BallLetters {
  std::vector<BallPtr> mats;  // distinct letters
  std::vector<size_t> seq;    // leaf index per letter
};

/// Ball enclosures of the distinct letters (by pointer) at precision prec, and the leaf index of every letter.
BallLetters ball_letters(const std::vector<const Matrix*>& letters, long prec);

// Upper bound for ||G||_2 (true G inside the ball): sqrt of the max row sum of |G^* G| (an induced norm bounds
// the largest eigenvalue of G^* G), computed sparsely from the nonzero entries; and the Frobenius norm; the
// smaller of the two.
void norm2_bound(mag_t out, const acb_mat_t g, const std::vector<std::pair<long, long>>& nz, long prec);

namespace fixed {
constexpr int kFix = 112;  ///< midpoints are integers X standing for X * 2^-kFix
/// Column propagation with 128-bit fixed-point midpoints (word_product_ball_fixed.cpp); false when a guard fails.
bool product_columns(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec);
}  // namespace fixed

}  // namespace zb::detail
