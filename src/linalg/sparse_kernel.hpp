// Internal: letter-by-letter application of sparse generator matrices to integer coefficient arrays.
//
// A letter G (integral: PolyMatrix with den 1, radicand products integral) is precomputed as a list of terms
// (row i, column c, mask S of G_ic's part, mask U of the operand): multiplying by G_ic,S * sqrt(d_S) maps the
// operand part U to part S^U through the integer n x n matrix M = [x^t * G_ic,S * d_{S&U} mod Phi_N], stored by its
// nonzero entries. An operand is a dense array coef[U][row][t][col] (all 2^m masks, t < phi(N)).
//
// Two coefficient types: int64 while a rigorous bound says every partial sum stays below 2^62 (checked before each
// letter from the operand's actual largest coefficient and the letter's growth factor beta), fmpz otherwise.
#pragma once
#include <cstdint>
#include <vector>

#include "zetabraid/linalg/poly_matrix.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb::detail {

struct KernelEntry {
  std::int32_t r, t;
  std::int64_t v;
};

class SparseLetter {
 public:
  /// Returns false (and leaves *out unusable) when the letter is not integral or too large for the kernel.
  static bool make(SparseLetter* out, const PolyMatrix& g, const PolyContext& ctx, int radicands);
  long rows() const { return rows_; }
  long cols() const { return cols_; }
  /// Upper bound on max|coef(G x)| / max|coef(x)|.
  double beta() const { return beta_; }

  struct Term {
    long i, c;
    int from, to;  // operand mask U -> result mask S^U
    std::vector<KernelEntry> m;
  };
  const std::vector<Term>& terms() const { return terms_; }

  /// The same sums as a program over operand coefficient rows (all k columns of one (mask, row, t) at a time):
  /// every destination row (mask, row i, coefficient r) adds the source rows whose multiplier is +1, subtracts
  /// those with -1 and multiplies the rest (braid letters are almost all +-1), so the usual case needs no
  /// multiplication. Row indices are in units of k columns: dest = (to * rows + i) * n + r, source =
  /// (from * cols + c) * n + t. Destination rows with no source are absent (covers_all() tells).
  struct ProgramRow {
    std::int64_t dst;
    std::uint32_t plus, minus, times;  // counts, in this order, from `first` in program_sources()
    std::uint32_t first;
  };
  struct ProgramSource {
    std::int64_t src, v;
  };
  const std::vector<ProgramRow>& program_rows() const { return prog_rows_; }
  const std::vector<ProgramSource>& program_sources() const { return prog_src_; }
  bool covers_all() const { return covers_all_; }

 private:
  std::vector<ProgramRow> prog_rows_;
  std::vector<ProgramSource> prog_src_;
  bool covers_all_ = false;
  long rows_ = 0, cols_ = 0;
  double beta_ = 0;
  std::vector<Term> terms_;
};

/// Dense coefficient array for a rows x k matrix with 2^m masks.
struct SmallBlock {
  long rows = 0, k = 0, n = 0, masks = 0;
  std::vector<std::int64_t> a;  // [U][row][t][col]
  /// Upper bound on max|a| kept by apply (rescanned when it gets near the limit); -1 = unknown.
  double bound = -1;
  std::int64_t max_abs() const;
  static SmallBlock identity(long d, long n, long masks);
  PolyMatrix to_poly(const PolyContext& ctx, const fmpz* den = nullptr) const;
  /// Numerators of p (all masks < `masks`); false when a coefficient needs more than 40 bits.
  static bool from_poly(SmallBlock* out, const PolyMatrix& p, long n, long masks);
};

struct BigBlock {
  long rows = 0, k = 0, n = 0, masks = 0;
  std::vector<fmpz> a;  // owned fmpz values
  BigBlock() = default;
  BigBlock(long rows, long k, long n, long masks);
  BigBlock(const SmallBlock& s);
  BigBlock(BigBlock&& o) noexcept;
  BigBlock& operator=(BigBlock&& o) noexcept;
  BigBlock(const BigBlock&) = delete;
  ~BigBlock();
  PolyMatrix to_poly(const PolyContext& ctx, const fmpz* den = nullptr) const;
};

/// Whether G applied to x is safe in int64.
bool fits_small(const SparseLetter& g, SmallBlock& x);
SmallBlock apply(const SparseLetter& g, const SmallBlock& x);
/// y = g x into *out (must not be x), reusing its buffer: the named variants (LetterKernel, word_product.hpp) give
/// identical results (tests compare each with apply_into_entries, the reference). apply_into_avx2 and
/// apply_into_avx512 throw MathError when the processor (or the build) lacks the instructions.
void apply_into_entries(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
void apply_into_portable(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
void apply_into_avx2(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
void apply_into_avx512(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
/// The dispatcher: runs letter_kernel_resolve(kernel).
void apply_into(SmallBlock* out, const SparseLetter& g, const SmallBlock& x, LetterKernel kernel = LetterKernel::kAuto);
BigBlock apply(const SparseLetter& g, const BigBlock& x);

}  // namespace zb::detail
