// Squares in Q(zeta_N): exact decisions with proofs (non-residue witnesses, verified roots).
#pragma once
#include <optional>
#include <vector>

#include "zetabraid/field/cyclotomic.hpp"

namespace zb {

/// A degree-one prime of Q(zeta_N): p = 1 (mod N) and a root r of Phi_N modulo p.
struct Witness {
  unsigned long p = 0;
  unsigned long root = 0;
};

/// A deterministic, lazily extended list of degree-one primes for one conductor (p near 2^50 and up).
class WitnessList {
 public:
  explicit WitnessList(unsigned long conductor);
  const Witness& at(size_t i);
  size_t size() const { return list_.size(); }

 private:
  void extend();
  unsigned long n_;
  unsigned long next_k_ = 0;
  std::vector<Witness> list_;
};

/// Quadratic character of x at the degree-one prime P = (p, zeta - r): 1 or -1 for a nonzero residue or
/// non-residue, 0 when x = 0 mod P or p divides the denominator of x (then x has no image and no verdict).
/// Computed on the integral representative: with x = a/den (a in Z[zeta], den in Z), the symbol of a(r) * den.
int legendre_at(const Cyclo& x, const Witness& w);

/// The integral representative x * den^2 of x modulo squares, den > 0 the least common denominator of x's
/// power-basis coefficients (so the result lies in Z[zeta]); den is set. x is a square iff the result is.
Cyclo integral_representative(const Cyclo& x, fmpz_t den);

struct SquareAnswer {
  bool is_square = false;
  std::optional<Cyclo> root;        ///< a root (either sign) when is_square
  std::optional<Witness> witness;   ///< a non-residue witness when !is_square
};

/// Bound on the characteristic polynomial of the norm method, estimated as (2 phi)^2 * height(x) bits before it
/// is computed: past it decide_square throws ResourceError instead of factoring a huge polynomial.
inline constexpr long kMaxNormMethodBits = 1L << 22;

/// Decides whether x is a square in its cyclotomic field, with a proof either way. ResourceError when neither a
/// witness nor (within kMaxNormMethodBits) a root is found.
SquareAnswer decide_square(const Cyclo& x, WitnessList& witnesses, size_t max_witnesses = 48);

}  // namespace zb
