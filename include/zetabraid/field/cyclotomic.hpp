// The cyclotomic field Q(zeta_N) and its elements, on antic's nf_elem.
//
// Embedding convention (fixed throughout zetabraid): zeta |-> exp(2*pi*i/N).
// Elements are stored in the power basis 1, zeta, ..., zeta^(phi(N)-1) modulo the cyclotomic polynomial Phi_N.
#pragma once
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "zetabraid/detail/flint.hpp"

namespace zb {

class CyclotomicField;
using CyclotomicFieldPtr = std::shared_ptr<const CyclotomicField>;

/// Context for Q(zeta_N). Immutable, shared by all its elements. Create with CyclotomicField::make.
class CyclotomicField : public std::enable_shared_from_this<CyclotomicField> {
 public:
  /// Largest supported phi(N); beyond it requests fail with ResourceError.
  static constexpr long kMaxDegree = 1024;

  /// Q(zeta_N) for N >= 1. Throws InputError for N == 0, ResourceError when phi(N) > kMaxDegree.
  static CyclotomicFieldPtr make(unsigned long conductor);
  ~CyclotomicField();
  CyclotomicField(const CyclotomicField&) = delete;
  CyclotomicField& operator=(const CyclotomicField&) = delete;

  unsigned long conductor() const { return n_; }
  long degree() const { return degree_; }
  const nf_struct* nf() const { return nf_; }
  nf_struct* nf_mut() const { return const_cast<nf_struct*>(nf_); }
  /// Phi_N as an integer polynomial.
  const fmpz_poly_struct* modulus() const { return phi_; }

 private:
  explicit CyclotomicField(unsigned long n);
  unsigned long n_;
  long degree_;
  nf_t nf_;
  fmpz_poly_t phi_;
};

/// An element of Q(zeta_N). Value type (deep copies), RAII over nf_elem_t.
class Cyclo {
 public:
  explicit Cyclo(CyclotomicFieldPtr k);             ///< zero
  Cyclo(CyclotomicFieldPtr k, long v);               ///< integer
  Cyclo(CyclotomicFieldPtr k, const fmpq_t v);       ///< rational
  Cyclo(CyclotomicFieldPtr k, long num, long den);   ///< rational num/den (den != 0)
  /// zeta^e for any integer e (reduced mod N).
  static Cyclo zeta_power(CyclotomicFieldPtr k, long e);
  /// The element with the given power-basis coefficients (reduced modulo Phi_N).
  static Cyclo from_poly(CyclotomicFieldPtr k, const fmpq_poly_t p);

  Cyclo(const Cyclo& o);
  Cyclo(Cyclo&& o) noexcept;
  Cyclo& operator=(const Cyclo& o);
  Cyclo& operator=(Cyclo&& o) noexcept;
  ~Cyclo();

  const CyclotomicFieldPtr& field() const { return k_; }
  const nf_elem_struct* raw() const { return v_; }
  nf_elem_struct* raw() { return v_; }

  Cyclo& operator+=(const Cyclo& o);
  Cyclo& operator-=(const Cyclo& o);
  Cyclo& operator*=(const Cyclo& o);
  Cyclo& operator/=(const Cyclo& o);  ///< throws MathError on division by zero
  Cyclo operator-() const;
  friend Cyclo operator+(Cyclo a, const Cyclo& b) { return a += b; }
  friend Cyclo operator-(Cyclo a, const Cyclo& b) { return a -= b; }
  friend Cyclo operator*(Cyclo a, const Cyclo& b) { return a *= b; }
  friend Cyclo operator/(Cyclo a, const Cyclo& b) { return a /= b; }
  friend bool operator==(const Cyclo& a, const Cyclo& b);
  friend bool operator!=(const Cyclo& a, const Cyclo& b) { return !(a == b); }

  Cyclo inverse() const;        ///< throws MathError for zero
  Cyclo pow(long e) const;      ///< any integer e; negative needs a nonzero element
  Cyclo conj() const;           ///< complex conjugation, zeta |-> zeta^-1
  /// Image under the Galois automorphism zeta |-> zeta^a (gcd(a, N) == 1).
  Cyclo galois(long a) const;
  bool is_zero() const;
  bool is_one() const;
  bool is_rational() const;
  bool is_real() const { return *this == conj(); }
  /// Rational value; requires is_rational().
  void get_fmpq(fmpq_t out) const;
  void norm(fmpq_t out) const;   ///< N_{K/Q}
  void trace(fmpq_t out) const;  ///< Tr_{K/Q}
  /// Power-basis coefficients.
  void get_poly(fmpq_poly_t out) const;
  /// Storage size in the power basis: `total` = bits of every numerator coefficient plus the common denominator;
  /// `height` = the largest (bits of a numerator coefficient + bits of the denominator); `nonzero` = number of
  /// nonzero coefficients. Zero has all three 0.
  struct Size {
    long total = 0;
    long height = 0;
    long nonzero = 0;
  };
  Size size() const;

  /// Canonical text: the reduced polynomial in `zeta`, highest power first, e.g. "zeta^3 - 2*zeta + 1/2".
  std::string str() const;
  /// Enclosure under zeta |-> exp(2*pi*i/N); the result has radius consistent with prec bits.
  void ball(acb_t out, long prec) const;
  /// Sign of a real element (conj == self), decided exactly by increasing precision. Throws MathError if not real.
  int real_sign() const;

 private:
  void check_same(const Cyclo& o) const;
  CyclotomicFieldPtr k_;
  nf_elem_t v_;
};

/// Sign of a number known to be real and nonzero, from enclosures ball_at(out, prec) at doubling precision
/// (a nonzero real is eventually separated from 0). ResourceError past 2^20 bits.
int sign_of_nonzero_real(const std::function<void(acb_t, long)>& ball_at, const std::string& what);

/// s itself when short; otherwise its start and end around "... (n characters) ...", for error messages that
/// quote values from untrusted input.
std::string abbreviate(const std::string& s, size_t max_chars = 200);

/// Euler's phi.
unsigned long euler_phi(unsigned long n);

}  // namespace zb
