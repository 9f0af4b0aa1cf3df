// Dense matrices over a zetabraid Field (exact). The reference ("slow path") type; hot loops use the
// engines in linalg/ that work on integer-polynomial or modular representations.
#pragma once
#include <string>
#include <vector>

#include "zetabraid/field/scalar.hpp"

namespace zb {

class Matrix {
 public:
  Matrix(FieldPtr f, size_t rows, size_t cols);  ///< zero matrix
  static Matrix identity(FieldPtr f, size_t n);

  size_t rows() const { return r_; }
  size_t cols() const { return c_; }
  const FieldPtr& field() const { return f_; }
  Scalar& operator()(size_t i, size_t j) { return a_[i * c_ + j]; }
  const Scalar& operator()(size_t i, size_t j) const { return a_[i * c_ + j]; }

  friend Matrix operator*(const Matrix& x, const Matrix& y);  ///< MathError on shape mismatch
  friend Matrix operator+(const Matrix& x, const Matrix& y);
  friend Matrix operator-(const Matrix& x, const Matrix& y);
  friend bool operator==(const Matrix& x, const Matrix& y);
  friend bool operator!=(const Matrix& x, const Matrix& y) { return !(x == y); }
  Matrix scaled(const Scalar& s) const;
  Matrix adjoint() const;    ///< conjugate transpose
  Matrix transpose() const;
  bool is_zero() const;
  bool is_identity() const;
  /// Inverse by exact Gauss-Jordan; MathError when singular.
  Matrix inverse() const;
  /// Rank by exact elimination.
  size_t rank() const;
  /// Sub-block rows [r0, r0+nr) x cols [c0, c0+nc).
  Matrix block(size_t r0, size_t c0, size_t nr, size_t nc) const;
  /// Columns picked by index.
  Matrix columns(const std::vector<size_t>& idx) const;
  Scalar trace() const;
  /// Sum of |a_ij|^2 (exact; real).
  Scalar frobenius_norm2() const;
  /// Entry-wise enclosure at prec bits; out must be initialised with matching shape.
  void ball(acb_mat_t out, long prec) const;
  std::string str() const;

 private:
  FieldPtr f_;
  size_t r_, c_;
  std::vector<Scalar> a_;
};

}  // namespace zb
