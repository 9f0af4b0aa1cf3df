// Products of long sequences of matrices ("words"): the interface every braid-word computation goes through.
// Letters are given in application order: the result is letters.back() * ... * letters.front() * start.
// Implementations may use product trees, integer-polynomial kernels, modular images and ball arithmetic;
// every function here returns exactly what its naive definition says (tests compare against that).
#pragma once
#include <vector>

#include "zetabraid/linalg/matrix.hpp"

namespace zb {

/// Exact product L_n ... L_1 (application order). Shapes must compose.
Matrix word_product(const std::vector<const Matrix*>& letters);

/// Exact L_n ... L_1 * start: only the columns of `start` are propagated (cheap for few columns).
Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start);

/// Ball enclosure of L_n ... L_1 * start at working precision prec (start may be an identity).
/// `out` is initialised by the caller with shape (rows of L_n) x (cols of start).
void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec);

}  // namespace zb
