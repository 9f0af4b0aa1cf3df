// Integer-polynomial representation of matrices over L = K(sqrt(d_1), ..., sqrt(d_m)), K = Q(zeta_N), for fast
// exact products (the exact engine behind word_product).
//
// A PolyMatrix stores
//     M = (1/den) * sum over masks S of  P_S * prod_{j in S} sqrt(d_j),
// where each P_S is a matrix of integer polynomials in zeta of degree < phi(N) (reduced modulo Phi_N) and den is
// one positive integer common to all entries and masks. Products multiply the integer-polynomial matrices
// (FLINT fmpz_poly_mat, which switches to Kronecker substitution for large entries), combine masks by XOR and
// multiply by d_{S & T} = Field::radicand_product(S & T) (itself written as an integer polynomial over an integer
// denominator), then reduce modulo the monic Phi_N over Z. No number-field element is touched in the inner loop.
#pragma once
#include <map>
#include <memory>
#include <mutex>
#include <vector>

#include <flint/fmpz_mat.h>
#include <flint/fmpz_poly_mat.h>

#include "zetabraid/field/phi_reduce.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zb {

/// Shared data for PolyMatrix arithmetic over one Field: Phi_N and the radicand products as integer
/// polynomials. Thread-safe (radicand products are cached under a lock).
class PolyContext {
 public:
  explicit PolyContext(FieldPtr f);
  ~PolyContext();
  PolyContext(const PolyContext&) = delete;
  PolyContext& operator=(const PolyContext&) = delete;

  const FieldPtr& field() const { return f_; }
  long degree() const { return n_; }
  const fmpz_poly_struct* modulus() const { return phi_; }
  /// d_S = num / den with num an integer polynomial (reduced) and den > 0.
  struct RadicandProduct {
    fmpz_poly_t num;
    fmpz_t den;
  };
  const RadicandProduct& radicand_product(RadicalMask s) const;
  /// Interpolation data for products of polynomials of length n (2n - 1 coefficients): the finite evaluation
  /// points x_q (0, 1, -1, 2, -2, ...; 2n - 2 of them; the last value is taken at infinity), the inverse of their
  /// Vandermonde matrix as inverse / denominator, and x_q^(2n - 2) (top_powers, a column).
  struct Evaluation {
    std::vector<slong> points;
    fmpz_mat_t inverse, top_powers;
    fmpz_t denominator;
  };
  const Evaluation& evaluation() const { return ev_; }
  /// p <- p mod Phi_N in place (the exact remainder; field/phi_reduce.hpp: lengths up to 3n - 2 by a table of
  /// x^k mod Phi_N, longer ones by fmpz_poly_rem).
  void reduce(fmpz_poly_t p) const { reducer_.reduce(p); }
  /// The reduction modulo Phi_N itself.
  const PhiReducer& reducer() const { return reducer_; }
  /// Whether PolyMatrix::mul uses evaluation (small degrees; 1 <= n <= kMaxEvaluationDegree).
  static constexpr long kMaxEvaluationDegree = 12;
  bool has_evaluation() const { return n_ >= 1 && n_ <= kMaxEvaluationDegree; }

 private:
  FieldPtr f_;
  long n_;
  fmpz_poly_t phi_;
  PhiReducer reducer_;
  Evaluation ev_;
  mutable std::mutex mu_;
  mutable std::map<RadicalMask, std::unique_ptr<RadicandProduct>> rp_;
};

class PolyMatrix {
 public:
  PolyMatrix() = default;
  PolyMatrix(long rows, long cols);  ///< zero matrix (den = 1)
  static PolyMatrix identity(long n);
  /// Exact conversion from a Matrix over ctx.field().
  static PolyMatrix from_matrix(const Matrix& m, const PolyContext& ctx);
  /// Exact conversion back (canonical Scalars).
  Matrix to_matrix(const PolyContext& ctx) const;

  /// Takes ownership of the given parts (each rows x cols, entries reduced mod Phi_N, integer); den = 1.
  /// With den given, the value is parts / den.
  static PolyMatrix from_parts(long rows, long cols, std::vector<std::pair<RadicalMask, fmpz_poly_mat_struct*>> parts,
                               const fmpz* den = nullptr);

  PolyMatrix(const PolyMatrix& o);
  PolyMatrix(PolyMatrix&& o) noexcept;
  PolyMatrix& operator=(const PolyMatrix& o);
  PolyMatrix& operator=(PolyMatrix&& o) noexcept;
  ~PolyMatrix();

  long rows() const { return r_; }
  long cols() const { return c_; }
  size_t mask_count() const { return masks_.size(); }
  RadicalMask mask(size_t i) const { return masks_[i]; }
  const fmpz_poly_mat_struct* part(size_t i) const { return parts_[i]; }
  const fmpz* denominator() const { return den_; }
  /// Divides the value by d > 0 (exact: multiplies the denominator, then cancels common content).
  void divide(const fmpz* d);
  /// Largest coefficient size in bits (over all masks and entries).
  long max_bits() const;

  /// Exact product a * b (MathError on shape mismatch). When every entry of both factors lies in one part (graded
  /// factors, as braid letters and their products are), one polynomial product per term instead of one per pair of
  /// parts, and for long coefficients by evaluation at 2n - 1 points and exact interpolation (mul_graded).
  static PolyMatrix mul(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx);
  /// The graded product directly (MathError unless graded_pair(a, b); evaluate needs ctx.has_evaluation()).
  static PolyMatrix mul_graded(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx, bool evaluate);
  /// Whether every entry of a and of b lies in a single part (then mul takes the graded path).
  static bool graded_pair(const PolyMatrix& a, const PolyMatrix& b);
  /// The same product with one fmpz_poly_mat product per pair of masks (independent path for tests).
  static PolyMatrix mul_reference(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx);
  /// Positions (i, j) of the nonzero entries of each part (index as mask(k)).
  using Nonzeros = std::vector<std::vector<std::pair<long, long>>>;
  Nonzeros nonzeros() const;
  /// Exact product a * b where only the listed entries of a are visited (nz = a.nonzeros()): cost
  /// proportional to nnz(a) * cols(b), for sparse generator matrices applied to a few columns.
  static PolyMatrix mul_sparse(const PolyMatrix& a, const Nonzeros& nz, const PolyMatrix& b, const PolyContext& ctx);
  /// a^e for e >= 0 (binary powering); a must be square.
  static PolyMatrix pow(const PolyMatrix& a, unsigned long e, const PolyContext& ctx);

 private:
  static PolyMatrix mul_impl(const PolyMatrix& a, const Nonzeros* nz, const PolyMatrix& b, const PolyContext& ctx,
                             bool fast);
  void clear();
  void normalise();  // drop zero masks, cancel the common content against den
  long r_ = 0, c_ = 0;
  std::vector<RadicalMask> masks_;            // ascending
  std::vector<fmpz_poly_mat_struct*> parts_;  // owned, one per mask
  fmpz_t den_ = {1};
};

}  // namespace zb
