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

  /// The same terms grouped by destination (result mask, row i), each with its dense n x n multiplication
  /// matrix: the grouped kernel keeps one destination column of n coefficients in registers while it sums
  /// over the group (each destination written once). Built by make for every letter.
  struct Source {
    int from;
    long c;
    size_t dense;  // offset of the n x n matrix (row-major, [r][t]) in dense()
  };
  struct Group {
    int to;
    long i;
    size_t first, count;  // into sources()
  };
  const std::vector<Group>& groups() const { return groups_; }
  const std::vector<Source>& sources() const { return sources_; }
  const std::vector<std::int64_t>& dense() const { return dense_; }

 private:
  long rows_ = 0, cols_ = 0;
  double beta_ = 0;
  std::vector<Term> terms_;
  std::vector<Group> groups_;
  std::vector<Source> sources_;
  std::vector<std::int64_t> dense_;
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
/// Same into *out (must not be x), reusing its buffer, with the grouped kernel. apply_into_entries (entry by
/// entry) and apply_into_grouped with allow_vector = false (no AVX-512 lanes) give identical results (tests).
void apply_into(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
void apply_into_entries(SmallBlock* out, const SparseLetter& g, const SmallBlock& x);
void apply_into_grouped(SmallBlock* out, const SparseLetter& g, const SmallBlock& x, bool allow_vector = true);
BigBlock apply(const SparseLetter& g, const BigBlock& x);

}  // namespace zb::detail
