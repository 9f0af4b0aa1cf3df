// Products of long sequences of matrices ("words"): the interface every braid-word computation goes through.
// Letters are given in application order: the result is letters.back() * ... * letters.front() * start.
// Implementations may use product trees, integer-polynomial kernels, modular images and ball arithmetic;
// every function here returns exactly what its naive definition says (tests compare against that).
//
// Engines (src/linalg/word_product.cpp):
//  * exact: letters are converted once per distinct pointer to integer-polynomial matrices (PolyMatrix, common
//    denominator, one part per radical mask); runs of one letter are binary powers, a periodic word w^q u is
//    computed as P(u) * P(w)^q, repeated subtrees are computed once, and the rest is a balanced product tree
//    (bit sizes of the two factors stay equal, so big-integer multiplication is used where it is fast).
//    word_product_columns on a big space (dimension well above the number of columns) instead applies the
//    letters one by one to the columns only, visiting only the nonzero entries of each generator.
//  * ball: see word_product_ball below.
//  * modular images: linalg/modular.hpp.
#pragma once
#include <string>
#include <vector>

#include "zetabraid/linalg/matrix.hpp"

namespace zb {

/// The int64 sparse-letter kernels (src/linalg/sparse_kernel.cpp), as named variants with one dispatcher:
///  * kEntries: entry by entry over each letter's multiplication matrices (the reference);
///  * kPortable: the row program (+1 / -1 / other multipliers per destination row) in plain C++;
///  * kAvx2: the row program, 4 columns per 256-bit vector (two vectors per pass);
///  * kAvx512: the row program, 8 columns per 512-bit vector.
/// kAuto picks kAvx512, else kAvx2, else kPortable, by what the processor supports. All give identical results.
enum class LetterKernel { kAuto, kEntries, kPortable, kAvx2, kAvx512 };
/// "auto", "entries", "portable", "avx2", "avx512".
const char* letter_kernel_name(LetterKernel k);
/// Inverse of letter_kernel_name; false for an unknown name.
bool letter_kernel_from_name(const std::string& name, LetterKernel* out);
/// Whether the processor (and this build) can run the variant (kAuto, kEntries and kPortable always can).
bool letter_kernel_available(LetterKernel k);
/// The variant that runs for k: kAuto resolved for this processor, others as they are.
LetterKernel letter_kernel_resolve(LetterKernel k);

struct ProductOptions {
  /// Worker threads for the product tree (1 = none). Results are identical at any thread count.
  int threads = 1;
  /// word_product_columns: apply letters column-wise (sparse) when dimension > columns_ratio * columns and
  /// dimension > columns_min_dimension; otherwise product tree then multiply the start.
  size_t columns_ratio = 4;
  size_t columns_min_dimension = 24;
  /// Detect runs / periodic words and compute the repeated part once (off only for tests and measurements).
  bool share_repeats = true;
  /// Use the int64 sparse-letter kernel (integral letters, <= 4 radicands) for blocks of letters while a
  /// rigorous coefficient bound stays below 2^62 (off only for tests and measurements).
  bool small_kernel = true;
  /// Which int64 letter kernel runs (a forced variant the processor lacks: MathError when it is first used).
  LetterKernel kernel = LetterKernel::kAuto;
  /// word_product_columns: once coefficients are long, apply int64 block products of letters instead of single
  /// letters (off only for tests and measurements).
  bool column_blocks = true;
  /// Switch to blocks at this many limbs per coefficient (-1: automatic, when dimension < columns * (2 + limbs)).
  long column_block_limbs = -1;
};

/// Exact product L_n ... L_1 (application order). Shapes must compose.
Matrix word_product(const std::vector<const Matrix*>& letters);
Matrix word_product(const std::vector<const Matrix*>& letters, const ProductOptions& opt);

/// Exact L_n ... L_1 * start: only the columns of `start` are propagated (cheap for few columns).
Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start);
Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start, const ProductOptions& opt);

/// Straightforward left-to-right exact product (the reference the fast engines are tested against).
Matrix word_product_naive(const std::vector<const Matrix*>& letters, const Matrix& start);

/// Ball enclosure of L_n ... L_1 * start at working precision prec (start may be an identity).
/// `out` is initialised by the caller with shape (rows of L_n) x (cols of start).
/// Every entry of `out` contains the exact entry (rigorous). Two methods (BallMethod):
///  * tree: a balanced product tree of acb_mat products (radius growth ~ polynomial in the word length instead of
///    exponential left to right, since every level multiplies balls of similar size);
///  * columns: the columns are propagated one letter at a time as exact midpoints plus one rigorous 2-norm error
///    bound per column, e' = nu(L) e + ||rad(L * mid)||_2, with nu(L) >= ||L||_2 bounded rigorously from the ball
///    of L^* L (sqrt of its max absolute row sum) or the Frobenius norm. For unitary letters nu ~ 1 + 2^-prec, so
///    the bound grows only linearly in the word length (~log2(length) bits lost); cost nnz(L) * columns per letter.
/// kAuto (the default here): columns when the dimension exceeds 8 or every letter has nu <= 1 + 2^-10, else tree.
void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec);

/// kColumns at a working precision <= 112 first tries midpoints in 128-bit fixed point (value X * 2^-112, one
/// truncation per real product, rigorous error recurrence; see word_product_ball.cpp) and falls back to arb
/// balls when a magnitude guard fails; kColumnsArb always uses arb balls (measurements, tests).
enum class BallMethod { kAuto, kTree, kColumns, kColumnsArb };

struct BallOptions {
  /// Wanted absolute accuracy: every entry's radius <= 2^-target_bits (bits of accuracy kept).
  long target_bits = 64;
  long max_precision = 1 << 16;
  BallMethod method = BallMethod::kAuto;
  int threads = 1;
};

struct BallReport {
  long precision = 0;      ///< working precision of the last (returned) run
  long accuracy_bits = 0;  ///< -log2(largest radius), i.e. absolute bits kept (ARF_PREC_EXACT-like when exact)
  long relative_bits = 0;  ///< acb_mat relative accuracy: min over nonzero entries of acb_rel_accuracy_bits
  bool reached = false;    ///< accuracy_bits >= target_bits
  int runs = 0;
};

/// Adaptive version: picks a starting precision from the word length, reruns at higher precision until every
/// radius is <= 2^-target_bits (or max_precision is reached: then reached = false). Same enclosure guarantee.
BallReport word_product_ball_adaptive(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start,
                                      const BallOptions& opt);
/// Same with a fixed precision and explicit method (measurements, tests).
void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec,
                       BallMethod method, int threads = 1);

/// Absolute and relative accuracy of a ball matrix (as in BallReport).
long ball_matrix_accuracy_bits(const acb_mat_t m);
long ball_matrix_relative_bits(const acb_mat_t m);

}  // namespace zb
