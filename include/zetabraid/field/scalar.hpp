// Exact numbers of zetabraid: elements of L = K(sqrt(d_1), ..., sqrt(d_m)) over K = Q(zeta_N).
//
// Radicands d_j are elements of K that are real and positive under zeta |-> exp(2*pi*i/N); sqrt(d_j) always
// denotes the positive real root. The radicands are kept multiplicatively independent modulo squares of K
// (proved when each is adjoined, see Field::sqrt), so [L:K] = 2^m and the representation
//     x = sum over subsets S of {1..m} of c_S * prod_{j in S} sqrt(d_j),   c_S in K,
// is unique: x == 0 exactly when every c_S == 0. Complex conjugation acts on the c_S and fixes each sqrt(d_j).
// Scalars store only their nonzero c_S (sparse), so products of radical monomials stay cheap.
#pragma once
#include <cstdint>
#include <map>
#include <memory>
#include <utility>
#include <mutex>
#include <string>
#include <vector>

#include <numeric>

#include "zetabraid/field/cyclotomic.hpp"
#include "zetabraid/field/square_test.hpp"

namespace zb {

class Field;
using FieldPtr = std::shared_ptr<Field>;

/// A radical monomial's support: bit j set means sqrt(d_{j+1}) is a factor.
using RadicalMask = std::uint64_t;

/// The field K(sqrt(d_1),...,sqrt(d_m)). Radicands are appended (never removed) by sqrt(); all Scalars made
/// from one Field stay valid when it grows. Thread-safe for concurrent arithmetic once no radicand is added.
class Field : public std::enable_shared_from_this<Field> {
 public:
  static constexpr int kMaxRadicands = 62;
  static FieldPtr make(unsigned long conductor);
  static FieldPtr make(CyclotomicFieldPtr k);

  const CyclotomicFieldPtr& cyclotomic() const { return k_; }
  unsigned long conductor() const { return k_->conductor(); }
  int radicand_count() const { return static_cast<int>(radicands_.size()); }
  const Cyclo& radicand(int j) const { return radicands_.at(static_cast<size_t>(j)); }
  /// prod_{j in S} d_j (cached).
  const Cyclo& radicand_product(RadicalMask s) const;
  /// sigma_a(d_j) (zeta -> zeta^a) and its sign (it is real: d_j lies in the real subfield), cached.
  struct Conjugate {
    Cyclo value;
    int sign;
  };
  const Conjugate& conjugate_radicand(int j, long a) const;

  /// Exact square root of x in K: returns true and sets root if x is a square in K (root chosen as the
  /// positive one when x is real and positive). Proofs: a found root is verified by squaring; a non-square is
  /// proved by a quadratic non-residue at a degree-one prime.
  static bool sqrt_in_base(const Cyclo& x, Cyclo* root);

  // Scalars are defined below; Field::sqrt and friends are declared after Scalar.
 private:
  friend class Scalar;
  explicit Field(CyclotomicFieldPtr k) : k_(std::move(k)) {}
  CyclotomicFieldPtr k_;
  std::vector<Cyclo> radicands_;
  mutable std::map<RadicalMask, Cyclo> products_;
  mutable std::map<std::pair<int, long>, Conjugate> conjugates_;
  mutable std::mutex mu_;
  std::mutex grow_mu_;
 public:
  /// sqrt(x) for x in K, real and positive (or any real x when i is in K: sqrt(-y) = i*sqrt(y)).
  /// Returns an element of K when x is a square in K; otherwise reduces x against the existing radicands or
  /// adjoins it as a new one. Throws InputError when x is not real, or negative with i not in K.
  class Scalar sqrt(const Cyclo& x);
  /// When frozen, sqrt() never adjoins a new radicand (it throws InputError instead); reductions still work.
  void set_frozen(bool frozen) { frozen_ = frozen; }
  bool frozen() const { return frozen_; }

 private:
  bool frozen_ = false;
  Scalar sqrt_uncached(const Cyclo& x);
  /// Legendre symbols of radicand j at witnesses 0..count-1 (cached, extended on demand).
  const std::vector<signed char>& radicand_symbols(int j, size_t count);
  std::unique_ptr<WitnessList> witnesses_;
  std::vector<std::vector<signed char>> symbols_;
  std::map<std::string, std::vector<std::pair<RadicalMask, std::string>>> sqrt_cache_;  // x.str() -> result terms
};

/// An element of a Field. Value type.
class Scalar {
 public:
  /// Resource limits of products (ResourceError beyond): terms of one value (distinct square-root monomials) and
  /// term-by-term products in one multiplication. Models use a handful of terms; sums of many distinct square
  /// roots raised to powers would otherwise grow like 2^(radicands).
  static constexpr size_t kMaxTerms = 1u << 12;
  static constexpr size_t kMaxTermProducts = 1u << 18;

  explicit Scalar(FieldPtr f);             ///< zero
  Scalar(FieldPtr f, long v);              ///< integer
  Scalar(FieldPtr f, const Cyclo& c);      ///< element of the base field
  static Scalar zeta_power(FieldPtr f, long e);
  /// c * prod_{j in S} sqrt(d_j)
  static Scalar monomial(FieldPtr f, const Cyclo& c, RadicalMask s);

  const FieldPtr& field() const { return f_; }
  const std::map<RadicalMask, Cyclo>& terms() const { return t_; }

  Scalar& operator+=(const Scalar& o);
  Scalar& operator-=(const Scalar& o);
  Scalar& operator*=(const Scalar& o);
  Scalar& operator/=(const Scalar& o);  ///< MathError on division by zero
  Scalar operator-() const;
  friend Scalar operator+(Scalar a, const Scalar& b) { return a += b; }
  friend Scalar operator-(Scalar a, const Scalar& b) { return a -= b; }
  friend Scalar operator*(const Scalar& a, const Scalar& b);
  friend Scalar operator/(Scalar a, const Scalar& b) { return a /= b; }
  friend bool operator==(const Scalar& a, const Scalar& b);
  friend bool operator!=(const Scalar& a, const Scalar& b) { return !(a == b); }

  Scalar inverse() const;
  Scalar pow(long e) const;
  Scalar conj() const;                ///< complex conjugation (fixes every sqrt(d_j))
  Scalar abs2() const { return *this * conj(); }
  bool is_zero() const { return t_.empty(); }
  /// Storage size in bits: the sum of Cyclo::size().total over the stored coefficients c_S.
  long size_bits() const;
  bool is_one() const;
  bool in_base() const;               ///< lies in K (no radicals)
  const Cyclo& base_part() const;     ///< c_{empty set}; zero if absent
  Cyclo to_base() const;              ///< requires in_base()
  bool is_real() const { return *this == conj(); }
  /// Sign of a real scalar, decided exactly (increasing precision on a nonzero number).
  int real_sign() const;
  /// Image under sqrt(d_j) -> -sqrt(d_j) for each j in s (a Galois automorphism of L over K).
  Scalar flip(RadicalMask s) const;

  /// Canonical text in the expression syntax, e.g. "(zeta^3 + zeta^2)*sqrt(zeta^3 + zeta^2 + 1) + 1/2".
  std::string str() const;
  /// The same text with sqrt(d_{j+1}) written as radical_name(j) (e.g. a named constant).
  std::string str(const std::function<std::string(int)>& radical_name) const;
  void ball(acb_t out, long prec) const;
  /// Enclosure under another embedding of L into C: zeta |-> exp(2*pi*i*a/N) (gcd(a, N) = 1) and
  /// sqrt(d_j) |-> (-1)^(bit j of signs) * r_j, r_j the principal square root of the real number sigma_a(d_j)
  /// (positive, or i times a positive number; the sign of sigma_a(d_j) is decided exactly). As (a, signs) run
  /// over (Z/N)^* x {0..2^m-1} this gives each of the [L:Q] embeddings once. ball_at(out, prec, 1, 0) == ball.
  /// Accuracy: prec relative bits for nonzero values (as ball).
  void ball_at(acb_t out, long prec, long a, RadicalMask signs) const;

 private:
  void check_same(const Scalar& o) const;
  FieldPtr f_;
  std::map<RadicalMask, Cyclo> t_;  // only nonzero coefficients
};

/// Printing of balls: "[m +/- r]" for real values, "[a +/- r] + [b +/- r]*i" otherwise.
std::string ball_str(const acb_t b, long digits = 20);
std::string ball_str(const arb_t b, long digits = 20);

}  // namespace zb
