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
#include <cstdint>
#include <string>
#include <unordered_map>
#include <vector>

#include "zetabraid/linalg/matrix.hpp"

namespace zb {

/// A word of matrices as the engines take it: the distinct letters once (by pointer, in order of first use) and the
/// word as a tree of sequences whose items are a letter or a sub-sequence, repeated `repeat` >= 1 times (powers
/// the user wrote, runs of one letter). Built once: de-duplication, run merging and (in finish) the shape checks
/// happen here, so the engines never rediscover them. Sequence 0 is the whole word; groups refer only to later
/// sequences; no sequence is empty except sequence 0 of the empty word.
class IndexedWord {
 public:
  struct Item {
    std::uint32_t index = 0;  ///< letter index (letters()) or sequence index (group)
    bool group = false;
    std::uint64_t repeat = 1;
  };
  IndexedWord();
  /// A flat word (runs of one pointer merged into repeats); finished.
  static IndexedWord from_letters(const std::vector<const Matrix*>& letters);

  const std::vector<const Matrix*>& letters() const { return letters_; }
  const std::vector<std::vector<Item>>& sequences() const { return seqs_; }
  /// Letters after expanding every repeat (saturates at SIZE_MAX); of sequence s: length(s).
  size_t length() const { return lengths_[0]; }
  size_t length(std::uint32_t s) const { return lengths_[s]; }
  bool empty() const { return lengths_[0] == 0; }
  /// Columns of the first letter and rows of the last (the product's shape is rows() x cols()); 0 when empty.
  size_t cols() const { return cols_; }
  size_t rows() const { return rows_; }
  /// Calls f(letter index) for every letter in application order, repeats expanded.
  template <class F>
  void for_each(F&& f) const {
    walk(0, f);
  }
  /// Letter indices (resp. pointers) in application order, repeats expanded.
  std::vector<std::uint32_t> expand() const;
  std::vector<const Matrix*> expand_pointers() const;

  // Building.
  /// Index of m among the letters (added when new).
  std::uint32_t letter(const Matrix* m);
  std::uint32_t add_sequence();
  /// Appends letter `index` repeated `repeat` times (merged with a run of the same letter just before it).
  void append_letter(std::uint32_t seq, std::uint32_t index, std::uint64_t repeat = 1);
  void append_group(std::uint32_t seq, std::uint32_t group, std::uint64_t repeat);
  /// Checks that the letters compose (one field; columns of each letter = rows of the one before; repeated groups
  /// square; MathError otherwise) and computes the lengths. Builders call it last.
  void finish();

 private:
  template <class F>
  void walk(std::uint32_t s, F& f) const {
    for (const Item& it : seqs_[s])
      for (std::uint64_t r = 0; r < it.repeat; ++r) {
        if (it.group) walk(it.index, f);
        else f(it.index);
      }
  }
  std::vector<const Matrix*> letters_;
  std::unordered_map<const Matrix*, std::uint32_t> index_;
  std::vector<std::vector<Item>> seqs_;
  std::vector<size_t> lengths_;
  size_t rows_ = 0, cols_ = 0;
};

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

/// Exact product L_n ... L_1 (application order). Shapes must compose. On an IndexedWord, every repeated group
/// is computed once and raised to its power by binary powering; flat stretches go through int64 blocks and the
/// product tree. The overloads on pointer lists build the IndexedWord first.
Matrix word_product(const IndexedWord& word, const ProductOptions& opt = {});
Matrix word_product(const std::vector<const Matrix*>& letters);
Matrix word_product(const std::vector<const Matrix*>& letters, const ProductOptions& opt);

/// Exact L_n ... L_1 * start: only the columns of `start` are propagated (cheap for few columns).
Matrix word_product_columns(const IndexedWord& word, const Matrix& start, const ProductOptions& opt = {});
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
/// The ball engines on an IndexedWord (the letters are expanded in application order).
void word_product_ball(acb_mat_t out, const IndexedWord& word, const Matrix& start, long prec, BallMethod method,
                       int threads = 1);
BallReport word_product_ball_adaptive(acb_mat_t out, const IndexedWord& word, const Matrix& start,
                                      const BallOptions& opt);

/// Absolute and relative accuracy of a ball matrix (as in BallReport).
long ball_matrix_accuracy_bits(const acb_mat_t m);
long ball_matrix_relative_bits(const acb_mat_t m);

}  // namespace zb
