// Deciding squares in Q(zeta_N), with proofs either way.
//  - Non-square: a degree-one prime (p, r), p = 1 mod N, r a root of Phi_N mod p, at which x(r) is a nonzero
//    quadratic non-residue mod p. If x = s^2 in K then x(r) = s(r)^2 mod p, so one such witness proves it.
//  - Square: a root s found by Trager's norm method (factor the norm of X^2 - x, shifted by c*zeta so the factor
//    separates the two roots) and verified exactly by s*s == x.
#include "zetabraid/field/square_test.hpp"

#include <fmt/format.h>

#include "zetabraid/error.hpp"

namespace zb {

namespace {

std::vector<ulong> prime_factors(ulong n) {
  std::vector<ulong> f;
  for (ulong q = 2; q * q <= n; ++q)
    if (n % q == 0) {
      f.push_back(q);
      while (n % q == 0) n /= q;
    }
  if (n > 1) f.push_back(n);
  return f;
}

}  // namespace

WitnessList::WitnessList(unsigned long conductor) : n_(conductor) {}

const Witness& WitnessList::at(size_t i) {
  while (list_.size() <= i) extend();
  return list_[i];
}

void WitnessList::extend() {
  // Next prime p = 1 mod N above the last one, starting near 2^50; each prime contributes all phi(N) roots.
  ulong n = n_ < 2 ? 2 : n_;
  if (next_k_ == 0) next_k_ = ((1UL << 50) / n) + 1;
  std::vector<ulong> qs = prime_factors(n);
  for (;;) {
    ulong p = next_k_ * n + 1;
    ++next_k_;
    if (!n_is_prime(p)) continue;
    nmod_t mod;
    nmod_init(&mod, p);
    ulong w = 0;
    for (ulong a = 2; a < 1000; ++a) {
      ulong c = n_powmod2(a, (p - 1) / n, p);
      bool primitive = c != 1 || n == 1;
      for (ulong q : qs)
        if (n_powmod2(c, n / q, p) == 1) primitive = false;
      if (primitive || (n_ == 1)) {
        w = c;
        break;
      }
    }
    if (w == 0) continue;
    for (ulong j = 0; j < n_; ++j) {
      if (n_ > 1 && n_gcd(j, n_) != 1) continue;
      if (n_ == 1 && j > 0) break;
      list_.push_back(Witness{p, n_powmod2(w, j, p)});
    }
    if (n_ <= 2) list_.back().root = (n_ == 1) ? 1 : p - 1;
    return;
  }
}

int legendre_at(const Cyclo& x, const Witness& w) {
  fmpq_poly_t poly;
  fmpq_poly_init(poly);
  x.get_poly(poly);
  ulong p = w.p;
  ulong den = fmpz_fdiv_ui(fmpq_poly_denref(poly), p);
  if (den == 0) {
    fmpq_poly_clear(poly);
    return 0;
  }
  ulong v = 0;
  const fmpz* c = fmpq_poly_numref(poly);
  for (long k = fmpq_poly_length(poly) - 1; k >= 0; --k) {
    v = n_mulmod2(v, w.root, p);
    v = n_addmod(v, fmpz_fdiv_ui(c + k, p), p);
  }
  fmpq_poly_clear(poly);
  if (v == 0) return 0;
  ulong e = n_powmod2(v, (p - 1) / 2, p);
  return e == 1 ? 1 : -1;
}

namespace {

// Root of X^2 - x in K by the norm method with shift c; returns true and sets *root on success.
bool trager_root(const Cyclo& x, long c, Cyclo* root) {
  const CyclotomicFieldPtr& k = x.field();
  long phi = k->degree();
  Cyclo z = Cyclo::zeta_power(k, 1);
  Cyclo cz = Cyclo(k, c) * z;
  Cyclo two_cz = cz + cz;
  Cyclo e = cz * cz - x;  // h(X) = X^2 - 2cz X + e
  // Multiplication by X on the basis zeta^i (i < phi), zeta^i X; column j = image of basis vector j.
  fmpq_mat_t m;
  fmpq_mat_init(m, 2 * phi, 2 * phi);
  fmpq_poly_t pol;
  fmpq_poly_init(pol);
  fmpq_t q;
  fmpq_init(q);
  for (long i = 0; i < phi; ++i) {
    fmpq_set_si(fmpq_mat_entry(m, phi + i, i), 1, 1);  // zeta^i -> zeta^i X
    Cyclo zi = Cyclo::zeta_power(k, i);
    Cyclo a = -(zi * e);        // constant part of zeta^i X^2
    Cyclo b = zi * two_cz;      // X part
    a.get_poly(pol);
    for (long r = 0; r < phi; ++r) {
      fmpq_poly_get_coeff_fmpq(q, pol, r);
      fmpq_set(fmpq_mat_entry(m, r, phi + i), q);
    }
    b.get_poly(pol);
    for (long r = 0; r < phi; ++r) {
      fmpq_poly_get_coeff_fmpq(q, pol, r);
      fmpq_set(fmpq_mat_entry(m, phi + r, phi + i), q);
    }
  }
  fmpq_poly_t cp;
  fmpq_poly_init(cp);
  fmpq_mat_charpoly(cp, m);
  fmpz_poly_t zp;
  fmpz_poly_init(zp);
  fmpq_poly_get_numerator(zp, cp);
  fmpz_poly_factor_t fac;
  fmpz_poly_factor_init(fac);
  fmpz_poly_factor(fac, zp);
  bool found = false;
  for (long f = 0; f < fac->num && !found; ++f) {
    const fmpz_poly_struct* g = fac->p + f;
    if (fmpz_poly_degree(g) > phi) continue;
    // g(X) mod h(X) = A + B X, by Horner: (A + B X) X = -B e + (A + 2cz B) X.
    Cyclo a(k), b(k);
    fmpz_t cf;
    fmpz_init(cf);
    for (long d = fmpz_poly_degree(g); d >= 0; --d) {
      Cyclo na = -(b * e);
      Cyclo nb = a + two_cz * b;
      fmpz_poly_get_coeff_fmpz(cf, g, d);
      fmpq_t qi;
      fmpq_init(qi);
      fmpq_set_fmpz_frac(qi, cf, fmpz_poly_lead(g));
      a = na + Cyclo(k, qi);
      b = nb;
      fmpq_clear(qi);
    }
    fmpz_clear(cf);
    if (b.is_zero()) continue;
    Cyclo t = -(a / b);
    Cyclo s = t - cz;
    if (s * s == x) {
      *root = s;
      found = true;
    }
  }
  fmpz_poly_factor_clear(fac);
  fmpz_poly_clear(zp);
  fmpq_poly_clear(cp);
  fmpq_clear(q);
  fmpq_poly_clear(pol);
  fmpq_mat_clear(m);
  return found;
}

}  // namespace

SquareAnswer decide_square(const Cyclo& x, WitnessList& witnesses, size_t max_witnesses) {
  SquareAnswer ans;
  if (x.is_zero()) {
    ans.is_square = true;
    ans.root = x;
    return ans;
  }
  if (x.is_rational()) {
    fmpq_t q, r;
    fmpq_init(q);
    fmpq_init(r);
    x.get_fmpq(q);
    bool sq = fmpq_sgn(q) > 0 && fmpz_is_square(fmpq_numref(q)) && fmpz_is_square(fmpq_denref(q));
    if (sq) {
      fmpz_sqrt(fmpq_numref(r), fmpq_numref(q));
      fmpz_sqrt(fmpq_denref(r), fmpq_denref(q));
      ans.is_square = true;
      ans.root = Cyclo(x.field(), r);
    }
    fmpq_clear(q);
    fmpq_clear(r);
    if (sq) return ans;
    // fall through: a rational non-square can still be a square in K (e.g. 5 in Q(zeta_5))
  }
  for (size_t i = 0; i < max_witnesses; ++i)
    if (legendre_at(x, witnesses.at(i)) == -1) {
      ans.is_square = false;
      ans.witness = witnesses.at(i);
      return ans;
    }
  long phi = x.field()->degree();
  Cyclo root(x.field());
  for (long c = 0; c <= phi + 1; ++c)
    if (trager_root(x, c, &root)) {
      ans.is_square = true;
      ans.root = root;
      return ans;
    }
  // No non-residue among the witnesses, yet no root: look further for a witness (always exists if not a square).
  for (size_t i = max_witnesses; i < 64 * max_witnesses; ++i)
    if (legendre_at(x, witnesses.at(i)) == -1) {
      ans.is_square = false;
      ans.witness = witnesses.at(i);
      return ans;
    }
  throw ResourceError("could not decide whether " + x.str() + " is a square in Q(zeta_" +
                      std::to_string(x.field()->conductor()) + ")");
}

}  // namespace zb
