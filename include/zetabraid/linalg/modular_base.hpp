// The trusted modular base shared by the producer (linalg/modular.hpp) and the independent certificate checker
// (cert/checker/): prime records over L = Q(zeta_N)(sqrt(d_1), ..., sqrt(d_m)), reduction of exact values mod p,
// matrices over F_p, order multipliers and the embeddings of L (docs/certificate-format.md, section 7).
//
// A ModularPrime fixes a word-size prime p with p = 1 (mod N), a primitive N-th root of unity w mod p (a root of
// Phi_N mod p) and for every radicand d_j a root s_j with s_j^2 = d_j(w) (mod p). Then
//     zeta -> w,  sqrt(d_j) -> s_j
// is a ring homomorphism from the elements of L whose coefficients have denominators prime to p onto F_p
// (L = K[y_1..y_m]/(y_j^2 - d_j)). reduce_matrix applies it entrywise.
//
// Let R = Z[zeta][b_1 sqrt(d_1), ..., b_m sqrt(d_m)] (b_j the denominator of radicand d_j): an order of L, free
// over Z with basis zeta^a prod_{j in S} b_j sqrt(d_j), so every ModularPrime q defines a ring map R -> F_p whose
// kernel I_q has index p (linalg/modular.hpp states what follows for proofs of zero).
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include <flint/nmod_vec.h>

#include "zetabraid/linalg/matrix.hpp"

namespace zb {

struct ModularPrime {
  ulong p = 0;
  ulong zeta = 0;            ///< image of zeta_N: a primitive N-th root of unity mod p
  std::vector<ulong> roots;  ///< roots[j]^2 == image of radicand j (mod p), one per radicand of the field
};

/// Checks that (p, zeta, roots) define a homomorphism for this field (p prime, p = 1 mod N, zeta of order
/// exactly N, roots[j]^2 = d_j(zeta), radicand denominators prime to p); InputError saying what fails.
ModularPrime make_prime(const Field& f, ulong p, ulong zeta, std::vector<ulong> roots);

/// `count` primes p = 1 (mod N), the smallest ones >= 2^(bits-1) (bits <= 63) at which every radicand is a nonzero
/// square; zeta = the first a^((p-1)/N) (a = 2, 3, ...) of order N, roots = the smaller of the two square roots.
/// Deterministic.
std::vector<ModularPrime> choose_primes(const Field& f, size_t count, int bits = 62);

/// A matrix over F_p (row-major).
class ModularImage {
 public:
  ModularImage(ulong p, size_t rows, size_t cols);
  ulong prime() const { return mod_.n; }
  const nmod_t& modulus() const { return mod_; }
  size_t rows() const { return r_; }
  size_t cols() const { return c_; }
  ulong& operator()(size_t i, size_t j) { return a_[i * c_ + j]; }
  ulong operator()(size_t i, size_t j) const { return a_[i * c_ + j]; }
  bool is_zero() const;
  friend bool operator==(const ModularImage& x, const ModularImage& y);
  friend bool operator!=(const ModularImage& x, const ModularImage& y) { return !(x == y); }
  friend ModularImage operator*(const ModularImage& x, const ModularImage& y);  ///< MathError on shape mismatch

 private:
  nmod_t mod_;
  size_t r_, c_;
  std::vector<ulong> a_;
};

/// Image of one number; MathError when a coefficient denominator is divisible by p.
ulong reduce_scalar(const Scalar& x, const ModularPrime& q);
ulong reduce_cyclo(const Cyclo& x, const ModularPrime& q);
/// Entrywise image of a matrix; MathError when a denominator is divisible by p.
ModularImage reduce_matrix(const Matrix& m, const ModularPrime& q);

/// A positive integer s with s*x in R for every entry x of m: lcm over the terms c_S prod_{j in S} sqrt(d_j) of
/// den(c_S) * prod_{j in S} b_j.
void order_multiplier(fmpz_t s, const Matrix& m);

/// One embedding of L per complex-conjugate pair (Scalar::ball_at arguments) and its weight: the product of
/// |sigma(x)| over all embeddings is the product of |ball_at(x, a, signs)|^weight over this list.
struct Embedding {
  long a;
  RadicalMask signs;
  int weight;
};
std::vector<Embedding> embeddings_up_to_conjugation(const Field& f);

}  // namespace zb
