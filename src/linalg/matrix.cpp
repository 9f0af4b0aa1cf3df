#include "zetabraid/linalg/matrix.hpp"

#include <fmt/format.h>

#include "zetabraid/error.hpp"

namespace zb {

Matrix::Matrix(FieldPtr f, size_t rows, size_t cols) : f_(f), r_(rows), c_(cols), a_(rows * cols, Scalar(f)) {}

Matrix Matrix::identity(FieldPtr f, size_t n) {
  Matrix m(f, n, n);
  for (size_t i = 0; i < n; ++i) m(i, i) = Scalar(f, 1);
  return m;
}

Matrix operator*(const Matrix& x, const Matrix& y) {
  if (x.c_ != y.r_) throw MathError(fmt::format("matrix shapes {}x{} and {}x{} do not compose", x.r_, x.c_, y.r_, y.c_));
  Matrix z(x.f_, x.r_, y.c_);
  for (size_t i = 0; i < x.r_; ++i)
    for (size_t k = 0; k < x.c_; ++k) {
      const Scalar& a = x(i, k);
      if (a.is_zero()) continue;
      for (size_t j = 0; j < y.c_; ++j)
        if (!y(k, j).is_zero()) z(i, j) += a * y(k, j);
    }
  return z;
}

Matrix operator+(const Matrix& x, const Matrix& y) {
  if (x.r_ != y.r_ || x.c_ != y.c_) throw MathError("matrix shapes differ in a sum");
  Matrix z = x;
  for (size_t i = 0; i < z.a_.size(); ++i) z.a_[i] += y.a_[i];
  return z;
}

Matrix operator-(const Matrix& x, const Matrix& y) {
  if (x.r_ != y.r_ || x.c_ != y.c_) throw MathError("matrix shapes differ in a difference");
  Matrix z = x;
  for (size_t i = 0; i < z.a_.size(); ++i) z.a_[i] -= y.a_[i];
  return z;
}

bool operator==(const Matrix& x, const Matrix& y) {
  if (x.r_ != y.r_ || x.c_ != y.c_) return false;
  for (size_t i = 0; i < x.a_.size(); ++i)
    if (x.a_[i] != y.a_[i]) return false;
  return true;
}

Matrix Matrix::scaled(const Scalar& s) const {
  Matrix z = *this;
  for (auto& v : z.a_) v *= s;
  return z;
}

Matrix Matrix::adjoint() const {
  Matrix z(f_, c_, r_);
  for (size_t i = 0; i < r_; ++i)
    for (size_t j = 0; j < c_; ++j) z(j, i) = (*this)(i, j).conj();
  return z;
}

Matrix Matrix::transpose() const {
  Matrix z(f_, c_, r_);
  for (size_t i = 0; i < r_; ++i)
    for (size_t j = 0; j < c_; ++j) z(j, i) = (*this)(i, j);
  return z;
}

bool Matrix::is_zero() const {
  for (const auto& v : a_)
    if (!v.is_zero()) return false;
  return true;
}

bool Matrix::is_identity() const {
  if (r_ != c_) return false;
  for (size_t i = 0; i < r_; ++i)
    for (size_t j = 0; j < c_; ++j)
      if (i == j ? !(*this)(i, j).is_one() : !(*this)(i, j).is_zero()) return false;
  return true;
}

Matrix Matrix::inverse() const {
  if (r_ != c_) throw MathError("inverse of a non-square matrix");
  size_t n = r_;
  Matrix a = *this, inv = identity(f_, n);
  for (size_t col = 0; col < n; ++col) {
    size_t piv = n;
    for (size_t i = col; i < n; ++i)
      if (!a(i, col).is_zero()) { piv = i; break; }
    if (piv == n) throw MathError("matrix is singular");
    if (piv != col)
      for (size_t j = 0; j < n; ++j) {
        std::swap(a(piv, j), a(col, j));
        std::swap(inv(piv, j), inv(col, j));
      }
    Scalar p = a(col, col).inverse();
    for (size_t j = 0; j < n; ++j) {
      a(col, j) *= p;
      inv(col, j) *= p;
    }
    for (size_t i = 0; i < n; ++i) {
      if (i == col || a(i, col).is_zero()) continue;
      Scalar m = a(i, col);
      for (size_t j = 0; j < n; ++j) {
        if (!a(col, j).is_zero()) a(i, j) -= m * a(col, j);
        if (!inv(col, j).is_zero()) inv(i, j) -= m * inv(col, j);
      }
    }
  }
  return inv;
}

size_t Matrix::rank() const {
  Matrix a = *this;
  size_t rank = 0;
  for (size_t col = 0; col < c_ && rank < r_; ++col) {
    size_t piv = r_;
    for (size_t i = rank; i < r_; ++i)
      if (!a(i, col).is_zero()) { piv = i; break; }
    if (piv == r_) continue;
    if (piv != rank)
      for (size_t j = 0; j < c_; ++j) std::swap(a(piv, j), a(rank, j));
    Scalar p = a(rank, col).inverse();
    for (size_t i = rank + 1; i < r_; ++i) {
      if (a(i, col).is_zero()) continue;
      Scalar m = a(i, col) * p;
      for (size_t j = col; j < c_; ++j)
        if (!a(rank, j).is_zero()) a(i, j) -= m * a(rank, j);
    }
    ++rank;
  }
  return rank;
}

Matrix Matrix::block(size_t r0, size_t c0, size_t nr, size_t nc) const {
  if (r0 + nr > r_ || c0 + nc > c_) throw MathError("block out of range");
  Matrix z(f_, nr, nc);
  for (size_t i = 0; i < nr; ++i)
    for (size_t j = 0; j < nc; ++j) z(i, j) = (*this)(r0 + i, c0 + j);
  return z;
}

Matrix Matrix::columns(const std::vector<size_t>& idx) const {
  Matrix z(f_, r_, idx.size());
  for (size_t i = 0; i < r_; ++i)
    for (size_t j = 0; j < idx.size(); ++j) z(i, j) = (*this)(i, idx.at(j));
  return z;
}

Scalar Matrix::trace() const {
  Scalar t(f_);
  for (size_t i = 0; i < std::min(r_, c_); ++i) t += (*this)(i, i);
  return t;
}

Scalar Matrix::frobenius_norm2() const {
  Scalar t(f_);
  for (const auto& v : a_)
    if (!v.is_zero()) t += v * v.conj();
  return t;
}

void Matrix::ball(acb_mat_t out, long prec) const {
  for (size_t i = 0; i < r_; ++i)
    for (size_t j = 0; j < c_; ++j) (*this)(i, j).ball(acb_mat_entry(out, i, j), prec);
}

std::string Matrix::str() const {
  std::string s = "[";
  for (size_t i = 0; i < r_; ++i) {
    s += i ? ",\n [" : "[";
    for (size_t j = 0; j < c_; ++j) s += (j ? ", " : "") + (*this)(i, j).str();
    s += "]";
  }
  return s + "]";
}

}  // namespace zb
