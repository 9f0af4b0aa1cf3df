// Seeded random inputs shared by the tests: one generator per type, below the layers that use them (braid letters
// as plain signed integers, elements of Q(zeta_N), elements of the square-root extensions). Random matrices are in
// support/random_matrix.hpp (linear-algebra layer), so field tests need not include it. Every caller passes its own
// fixed seed; the same seed must keep giving the same values, so change a generator only with all its users.
#pragma once
#include <cstddef>
#include <random>
#include <string>
#include <vector>

#include "zetabraid/field/expression.hpp"
#include "zetabraid/field/scalar.hpp"

namespace zbtest {

/// Q(zeta_n) with the given radicands adjoined (expressions in zeta), a field to draw random elements from.
inline zb::FieldPtr field_with_roots(unsigned long n, const std::vector<std::string>& radicands) {
  zb::FieldPtr f = zb::Field::make(n);
  for (const auto& r : radicands) f->sqrt(zb::parse_expression(r, f).to_base());
  return f;
}

/// The generators 1, 2, ..., k (the letters s_1 .. s_k of k + 1 strands).
inline std::vector<int> first_generators(int k) {
  std::vector<int> g;
  for (int i = 1; i <= k; ++i) g.push_back(i);
  return g;
}

/// `len` signed braid letters: each draws g = gens[rng() % gens.size()], then its sign (rng() % 2 ? g : -g).
/// Only raw rng() draws are used (no std:: distribution, whose output differs between standard libraries).
inline std::vector<int> random_letters(std::mt19937_64& rng, const std::vector<int>& gens, std::size_t len) {
  std::vector<int> w;
  w.reserve(len);
  for (std::size_t i = 0; i < len; ++i) {
    int g = gens[rng() % gens.size()];
    w.push_back(rng() % 2 ? g : -g);
  }
  return w;
}
/// The same with a fresh generator seeded by `seed`.
inline std::vector<int> random_letters(unsigned seed, const std::vector<int>& gens, std::size_t len) {
  std::mt19937_64 rng(seed);
  return random_letters(rng, gens, len);
}

/// Letters in the canonical word syntax: "1 -2 3".
inline std::string letters_text(const std::vector<int>& letters) {
  std::string s;
  for (int l : letters) s += (s.empty() ? "" : " ") + std::to_string(l);
  return s;
}

/// A random element of Q(zeta_N) with small rational coefficients (numerators in [-bound, bound], denominators 1..3).
inline zb::Cyclo random_cyclo(const zb::CyclotomicFieldPtr& k, std::mt19937_64& rng, int bound = 5) {
  std::uniform_int_distribution<long> c(-bound, bound), d(1, 3);
  fmpq_poly_t p;
  fmpq_poly_init(p);
  fmpq_t q;
  fmpq_init(q);
  for (long i = 0; i < k->degree(); ++i) {
    fmpq_set_si(q, c(rng), static_cast<unsigned long>(d(rng)));
    fmpq_poly_set_coeff_fmpq(p, i, q);
  }
  zb::Cyclo r = zb::Cyclo::from_poly(k, p);
  fmpq_clear(q);
  fmpq_poly_clear(p);
  return r;
}

/// A random element of L = K(sqrt(d_1), ..., sqrt(d_m)): each radical monomial present with probability 2/3, with
/// a random_cyclo coefficient (bound 3).
inline zb::Scalar random_scalar(const zb::FieldPtr& f, std::mt19937_64& rng) {
  zb::Scalar x(f);
  for (zb::RadicalMask m = 0; m < (zb::RadicalMask{1} << f->radicand_count()); ++m)
    if (rng() % 3 != 0) x += zb::Scalar::monomial(f, random_cyclo(f->cyclotomic(), rng, 3), m);
  return x;
}

}  // namespace zbtest
