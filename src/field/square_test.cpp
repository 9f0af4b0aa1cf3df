// Deciding squares in Q(zeta_N), with proofs either way.
//  - Non-square: a degree-one prime (p, r), p = 1 mod N, r a root of Phi_N mod p, at which x(r) is a nonzero
//    quadratic non-residue mod p. If x = s^2 in K then x(r) = s(r)^2 mod p, so one such witness proves it.
//  - Square: a root s found by Trager's norm method (factor the norm of X^2 - x, shifted by c*zeta so the factor
//    separates the two roots) and verified exactly by s*s == x.
#include "zetabraid/field/square_test.hpp"

#include <fmt/format.h>

#include "zetabraid/detail/raii.hpp"
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
  // x = a/den with a in Z[zeta] and den a positive integer. When p does not divide den, reduction modulo the
  // degree-one prime P = (p, zeta - r) is a ring homomorphism on Z_(p)[zeta] (p = 1 mod N, so p does not divide
  // N nor the discriminant of Phi_N, and r is a root of Phi_N mod p): x |-> a(r) / den mod p. Its quadratic
  // character equals that of the integral representative x * den^2 = a * den, so the symbol is (a(r) * den | p).
  // Dropping den (as an earlier version did) is wrong whenever den is a non-residue mod p.
  FmpqPolyT poly;
  x.get_poly(poly);
  const ulong p = w.p;
  const ulong den = fmpz_fdiv_ui(fmpq_poly_denref(poly.get()), p);
  if (den == 0) return 0;  // no image at P: never a witness
  ulong v = 0;
  const fmpz* c = fmpq_poly_numref(poly.get());
  for (long k = fmpq_poly_length(poly.get()) - 1; k >= 0; --k) {
    v = n_mulmod2(v, w.root, p);
    v = n_addmod(v, fmpz_fdiv_ui(c + k, p), p);
  }
  v = n_mulmod2(v, den, p);
  if (v == 0) return 0;
  ulong e = n_powmod2(v, (p - 1) / 2, p);
  return e == 1 ? 1 : -1;
}

Cyclo integral_representative(const Cyclo& x, fmpz_t den) {
  FmpqPolyT poly;
  x.get_poly(poly);
  fmpz_set(den, fmpq_poly_denref(poly.get()));
  FmpqT d2;
  fmpz_mul(fmpq_numref(d2.get()), den, den);
  return x * Cyclo(x.field(), d2.get());
}

namespace {

// Owners of the two FLINT types used only here (see detail/raii.hpp for the common ones).
struct FmpqMatT {
  FmpqMatT(long r, long c) { fmpq_mat_init(m, r, c); }
  ~FmpqMatT() { fmpq_mat_clear(m); }
  FmpqMatT(const FmpqMatT&) = delete;
  FmpqMatT& operator=(const FmpqMatT&) = delete;
  fmpq_mat_struct* get() { return m; }
  fmpq_mat_t m;
};
struct FmpzPolyFactorT {
  FmpzPolyFactorT() { fmpz_poly_factor_init(f); }
  ~FmpzPolyFactorT() { fmpz_poly_factor_clear(f); }
  FmpzPolyFactorT(const FmpzPolyFactorT&) = delete;
  FmpzPolyFactorT& operator=(const FmpzPolyFactorT&) = delete;
  fmpz_poly_factor_struct* get() { return f; }
  fmpz_poly_factor_t f;
};

// Root of X^2 - x in K by the norm method with shift c; returns true and sets *root on success. Any candidate is
// verified by squaring, so nothing here needs a proof.
bool trager_root(const Cyclo& x, long c, Cyclo* root) {
  const CyclotomicFieldPtr& k = x.field();
  long phi = k->degree();
  Cyclo z = Cyclo::zeta_power(k, 1);
  Cyclo cz = Cyclo(k, c) * z;
  Cyclo two_cz = cz + cz;
  Cyclo e = cz * cz - x;  // h(X) = X^2 - 2cz X + e
  // Multiplication by X on the basis zeta^i (i < phi), zeta^i X; column j = image of basis vector j.
  FmpqMatT m(2 * phi, 2 * phi);
  FmpqPolyT pol;
  FmpqT q;
  for (long i = 0; i < phi; ++i) {
    fmpq_set_si(fmpq_mat_entry(m.get(), phi + i, i), 1, 1);  // zeta^i -> zeta^i X
    Cyclo zi = Cyclo::zeta_power(k, i);
    Cyclo a = -(zi * e);        // constant part of zeta^i X^2
    Cyclo b = zi * two_cz;      // X part
    a.get_poly(pol);
    for (long r = 0; r < phi; ++r) {
      fmpq_poly_get_coeff_fmpq(q, pol, r);
      fmpq_set(fmpq_mat_entry(m.get(), r, phi + i), q);
    }
    b.get_poly(pol);
    for (long r = 0; r < phi; ++r) {
      fmpq_poly_get_coeff_fmpq(q, pol, r);
      fmpq_set(fmpq_mat_entry(m.get(), phi + r, phi + i), q);
    }
  }
  FmpqPolyT cp;
  fmpq_mat_charpoly(cp, m.get());
  FmpzPolyT zp;
  fmpq_poly_get_numerator(zp, cp);
  FmpzPolyFactorT fac;
  fmpz_poly_factor(fac.get(), zp);
  FmpzT cf;
  FmpqT qi;
  for (long f = 0; f < fac.get()->num; ++f) {
    const fmpz_poly_struct* g = fac.get()->p + f;
    if (fmpz_poly_degree(g) > phi) continue;
    // g(X) mod h(X) = A + B X, by Horner: (A + B X) X = -B e + (A + 2cz B) X.
    Cyclo a(k), b(k);
    for (long d = fmpz_poly_degree(g); d >= 0; --d) {
      Cyclo na = -(b * e);
      Cyclo nb = a + two_cz * b;
      fmpz_poly_get_coeff_fmpz(cf, g, d);
      fmpq_set_fmpz_frac(qi, cf, fmpz_poly_lead(g));
      a = na + Cyclo(k, qi.get());
      b = nb;
    }
    if (b.is_zero()) continue;
    Cyclo t = -(a / b);
    Cyclo s = t - cz;
    if (s * s == x) {
      *root = s;
      return true;
    }
  }
  return false;
}

// First witness among [from, to) at which y (integral) is a non-residue.
std::optional<Witness> find_witness(const Cyclo& y, WitnessList& witnesses, size_t from, size_t to) {
  for (size_t i = from; i < to; ++i)
    if (legendre_at(y, witnesses.at(i)) == -1) return witnesses.at(i);
  return std::nullopt;
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
    FmpqT q, r;
    x.get_fmpq(q);
    bool sq = fmpq_sgn(q) > 0 && fmpz_is_square(fmpq_numref(q.get())) && fmpz_is_square(fmpq_denref(q.get()));
    if (sq) {
      fmpz_sqrt(fmpq_numref(r.get()), fmpq_numref(q.get()));
      fmpz_sqrt(fmpq_denref(r.get()), fmpq_denref(q.get()));
      ans.is_square = true;
      ans.root = Cyclo(x.field(), r.get());
      return ans;
    }
    // fall through: a rational non-square can still be a square in K (e.g. 5 in Q(zeta_5))
  }
  // Every decision below is taken on the integral representative y = x * den^2 (den > 0 the common denominator of
  // x's coefficients): x is a square iff y is, a non-residue witness of y is one of x, and s^2 = y gives
  // (s/den)^2 = x.
  FmpzT den;
  const Cyclo y = integral_representative(x, den);
  long phi = x.field()->degree();
  // Each prime contributes phi(N) witnesses (one per root of Phi_N mod p). For x in a small subfield (a rational
  // radicand, say) the roots of one prime give the same symbol, so first try one root of each of max_witnesses
  // distinct primes (prime j's roots are entries j*phi .. j*phi + phi - 1), then the witnesses in order.
  for (size_t j = 0; j < max_witnesses; ++j) {
    const Witness& w = witnesses.at(j * static_cast<size_t>(phi) + j % static_cast<size_t>(phi));
    if (legendre_at(y, w) == -1) {
      ans.witness = w;
      return ans;
    }
  }
  if (auto w = find_witness(y, witnesses, 0, max_witnesses)) {
    ans.witness = *w;
    return ans;
  }
  const long height = y.size().height;
  if (height > kMaxNormMethodBits / (4 * phi * phi))
    throw ResourceError(fmt::format("deciding whether {} is a square needs the norm method on a polynomial of about "
                                    "{} bits, more than the limit of {} bits",
                                    abbreviate(x.str(), 80), 4 * phi * phi * height, kMaxNormMethodBits));
  Cyclo root(x.field());
  for (long c = 0; c <= phi + 1; ++c)
    if (trager_root(y, c, &root)) {
      ans.is_square = true;
      FmpqT dq;
      fmpz_set(fmpq_numref(dq.get()), den);
      ans.root = root / Cyclo(x.field(), dq.get());
      return ans;
    }
  // No non-residue among the witnesses, yet no root: look further for a witness (always exists if not a square).
  if (auto w = find_witness(y, witnesses, max_witnesses, 64 * max_witnesses)) {
    ans.witness = *w;
    return ans;
  }
  throw ResourceError("could not decide whether " + abbreviate(x.str()) + " is a square in Q(zeta_" +
                      std::to_string(x.field()->conductor()) + ")");
}

}  // namespace zb
