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

/// Legendre symbol of x(r) modulo p: 1, -1, or 0 when x(r) = 0 mod p or p divides x's denominator.
int legendre_at(const Cyclo& x, const Witness& w);

struct SquareAnswer {
  bool is_square = false;
  std::optional<Cyclo> root;        ///< a root (either sign) when is_square
  std::optional<Witness> witness;   ///< a non-residue witness when !is_square
};

/// Decides whether x is a square in its cyclotomic field, with a proof either way.
SquareAnswer decide_square(const Cyclo& x, WitnessList& witnesses, size_t max_witnesses = 48);

}  // namespace zb
