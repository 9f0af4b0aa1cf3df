// Modular images of matrices and word products over L = Q(zeta_N)(sqrt(d_1), ..., sqrt(d_m)).
//
// A ModularPrime fixes a word-size prime p with p = 1 (mod N), a primitive N-th root of unity w mod p (a root of
// Phi_N mod p) and for every radicand d_j a root s_j with s_j^2 = d_j(w) (mod p). Then
//     zeta -> w,  sqrt(d_j) -> s_j
// is a ring homomorphism from the elements of L whose coefficients have denominators prime to p onto F_p
// (L = K[y_1..y_m]/(y_j^2 - d_j)). The prime records, reduce_matrix and the other pieces shared with the
// independent checker live in linalg/modular_base.hpp; this header is the producer's: word_product_mod computes the
// image of a word product with word-size (nmod) arithmetic only, letter by letter, visiting only nonzero generator entries.
//
// What an image proves, and what it does not:
//  * image(x) != 0  ==>  x != 0, and image(x) != image(y) ==> x != y (a homomorphism maps 0 to 0): a proof.
//  * image(x) == 0 at one or many primes does NOT prove x == 0 by itself. It is a fast filter. A deterministic
//    conclusion "x == 0" needs either the exact engine (word_product) or a proven height bound: if every
//    coefficient of the integer-polynomial form of x (linalg/poly_matrix.hpp) is below H in absolute value and
//    the product of the primes at which the image vanishes exceeds 2H, then x == 0 (this module does not prove
//    such bounds). Certificates must say which of the two backs a conclusion drawn from images.
#pragma once
#include <string>
#include <vector>

#include "zetabraid/linalg/modular_base.hpp"

namespace zb {

class IndexedWord;  // linalg/word_product.hpp

/// Image of L_n ... L_1 * start (application order, as word_product_columns).
ModularImage word_product_mod(const std::vector<const Matrix*>& letters, const Matrix& start, const ModularPrime& q);
/// Image of L_n ... L_1 (as word_product).
ModularImage word_product_mod(const std::vector<const Matrix*>& letters, const ModularPrime& q);
/// The same on an IndexedWord (letters reduced once each, then applied in application order).
ModularImage word_product_mod(const IndexedWord& word, const Matrix& start, const ModularPrime& q);

// ---- Proofs of zero from modular images (norm bound) ----
//
// Let R = Z[zeta][b_1 sqrt(d_1), ..., b_m sqrt(d_m)] (b_j the denominator of radicand d_j): an order of L, free
// over Z with basis zeta^a prod_{j in S} b_j sqrt(d_j), so every ModularPrime q defines a ring map R -> F_p whose
// kernel I_q has index p. For x in R and distinct primes p_1..p_r with x in every I_q: x R lies in each I_q, so
// every p_i divides [R : xR] = |N_{L/Q}(x)|, hence x = 0 or |N(x)| >= p_1 ... p_r. And |N(x)| is the product of
// |sigma(x)| over the [L:Q] embeddings sigma (Scalar::ball_at). So: if the images of s*x vanish at primes whose
// product exceeds a rigorous upper bound of prod_sigma |sigma(s*x)|, then x = 0 (s: an integer with s*x in R).

struct ModularZeroOptions {
  size_t filter_primes = 2;     ///< primes tried before the norm bound is computed (a nonzero image ends early)
  size_t max_primes = 20000;    ///< ResourceError when the norm bound needs more
  bool prove_zero = true;       ///< false: a filter only (after filter_primes vanishing images neither flag is set)
  int threads = 1;              ///< images at different primes in parallel; results identical at any count
  long ball_precision = 128;    ///< working precision of the conjugate enclosures
  /// Letters multiplied into blocks of this many before the columns are propagated (the conjugate bound's radii
  /// then grow like the blocks' norms instead of the letters' absolute values); 1 = letter by letter; 0 =
  /// automatic: 128 * columns / dimension, clamped to 1..128 (a block costs about dimension / columns times the
  /// column propagation of its letters).
  size_t block = 0;
};

struct ModularZeroResult {
  bool zero = false;                  ///< proved: the matrix is exactly zero (norm bound)
  bool nonzero = false;               ///< proved: the witness entry's image is nonzero
  ModularPrime witness;               ///< when nonzero
  size_t row = 0, col = 0;            ///< when nonzero: the entry
  ulong value = 0;                    ///< when nonzero: its image mod witness.p
  std::vector<ModularPrime> primes;   ///< primes at which every image vanished (all primes used when zero)
  std::string norm_bound;             ///< when zero: B >= |N(s x)| for every entry x, as "M*2^E" (integers)
  long bound_bits = 0;                ///< when zero: bits of B (log2 B rounded up)
  std::string multiplier;             ///< the integer s (decimal)
};

/// The bound the zero test compares with: B >= s^[L:Q] * max over the entries x of X of prod_sigma |sigma(x)|
/// >= |N_{L/Q}(s x)| (s, written to *multiplier when given: the product of the factors' order_multiplier, each
/// letter occurrence counted).
void modular_norm_bound(mag_t bound, std::string* multiplier, const std::vector<const Matrix*>& letters,
                        const Matrix& start, const Matrix* post, const Matrix* offset, const ModularZeroOptions& opt = {});

/// Decides whether X = post * (L_n ... L_1 * start) - offset is the zero matrix (post, offset may be null:
/// identity, zero) by modular images alone: nonzero as soon as one image has a nonzero entry (a proof);
/// zero when every image vanishes at primes whose product exceeds the norm bound above times 2^64 (a proof; the
/// margin lets an independent checker with a slightly larger rigorous bound accept the same primes). Letters in
/// application order, as word_product_columns. ResourceError when more than opt.max_primes would be needed.
ModularZeroResult modular_zero_test(const std::vector<const Matrix*>& letters, const Matrix& start,
                                    const Matrix* post, const Matrix* offset, const ModularZeroOptions& opt = {});
ModularZeroResult modular_zero_test(const IndexedWord& word, const Matrix& start, const Matrix* post,
                                    const Matrix* offset, const ModularZeroOptions& opt = {});

}  // namespace zb
