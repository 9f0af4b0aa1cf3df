// Integer-polynomial arithmetic modulo the cyclotomic polynomial Phi_N: the one home of the reduction used by the
// exact product engine (linalg/poly_matrix), the int64 sparse letter kernel and the model checks.
//
// Phi_N is monic over Z, so every integer polynomial p has a unique remainder p mod Phi_N with integer
// coefficients and degree < n = phi(N). PhiReducer keeps a table of x^k mod Phi_N for k = n .. max_length - 1
// (small integers: |coefficients| < 2^40 is required, else the table is left empty and fmpz_poly_rem is used) and
// replaces each c_k x^k (k >= n) by c_k (x^k mod Phi_N); the rows have degree < n, so the order of the k does not
// matter and no allocation happens.
#pragma once
#include <cstdint>
#include <utility>
#include <vector>

#include "zetabraid/detail/flint.hpp"

namespace zb {

class PhiReducer {
 public:
  /// For a monic integer polynomial `modulus` of degree n >= 0 (Phi_N), with a table for lengths up to
  /// max_length (default 3n - 2: products of two reduced polynomials times one more reduced factor's worth).
  explicit PhiReducer(const fmpz_poly_struct* modulus, long max_length = -1);
  ~PhiReducer();
  PhiReducer(const PhiReducer&) = delete;
  PhiReducer& operator=(const PhiReducer&) = delete;

  long degree() const { return n_; }
  const fmpz_poly_struct* modulus() const { return phi_; }
  /// Longest input the table covers (n when the table is empty); longer inputs fall back to fmpz_poly_rem.
  long table_length() const { return n_ + static_cast<long>(table_.size()); }
  /// Coefficients of x^k mod Phi_N (length n) for n <= k < table_length().
  const std::vector<std::int64_t>& power(long k) const { return table_[static_cast<size_t>(k - n_)]; }

  /// p <- p mod Phi_N in place (the exact remainder).
  void reduce(fmpz_poly_t p) const;
  /// c[0..n) <- (c[0..len) mod Phi_N), c[n..len) zeroed (len <= table_length(); else MathError). fmpz values.
  void reduce(fmpz* c, long len) const;
  /// The same for int64 coefficients: returns false and leaves c unchanged when a partial result could leave
  /// the int64 range (checked in advance from the actual coefficients by a rigorous bound), true when done.
  bool reduce_int64(std::int64_t* c, long len) const;
  /// p <- p mod Phi_N in place by the recurrence x^n = -sum_j c_j x^j over the nonzero coefficients c_j of Phi_N
  /// below the leading one, top term first: cost (len - n) * terms(Phi_N), any length, no table. The better
  /// choice when Phi_N has few terms and inputs are a small multiple of n long (the model checks' kernel).
  void reduce_sparse(fmpz_poly_struct* p) const;
  /// Rigorous bound on max |(c mod Phi_N)_i| / max |c_k| for inputs of length len <= table_length():
  /// 1 + sum over k in [n, len) of max_i |x^k mod Phi_N|_i.
  double growth(long len) const;

 private:
  long n_;
  fmpz_poly_t phi_;
  std::vector<std::vector<std::int64_t>> table_;  // table_[k - n] = x^k mod Phi_N
  std::vector<std::int64_t> row_max_;             // max_i |table_[k - n][i]|
  std::vector<std::pair<long, long>> sparse_;      // (c_j, j) for the nonzero c_j, j < n (all fit in a long)
  bool sparse_ok_ = true;                          // every c_j fits in a long (else reduce_sparse uses reduce)
};

}  // namespace zb
