// The trusted modular base (linalg/modular_base.hpp): prime records, reduction of exact values mod p, images,
// order multipliers and the embeddings of L. Shared by the producer and the independent checker.
#include "zetabraid/linalg/modular_base.hpp"

#include <fmt/format.h>

#include <algorithm>

#include "zetabraid/error.hpp"

namespace zb {

namespace {

ulong pow_mod(ulong b, ulong e, const nmod_t& m) { return n_powmod2_preinv(b, e, m.n, m.ninv); }

bool has_order(ulong w, ulong n, const nmod_t& m) {
  if (pow_mod(w, n, m) != 1) return false;
  n_factor_t fac;
  n_factor_init(&fac);
  n_factor(&fac, n, 1);
  for (int i = 0; i < fac.num; ++i)
    if (pow_mod(w, n / fac.p[i], m) == 1) return false;
  return true;
}

// Image of a Cyclo at zeta -> w; returns false when p divides the denominator.
bool eval_cyclo(ulong* out, const Cyclo& x, ulong w, const nmod_t& m) {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  x.get_poly(p);
  ulong den = fmpz_fdiv_ui(fmpq_poly_denref(p), m.n);
  bool ok = den != 0;
  if (ok) {
    ulong v = 0;
    for (long k = fmpq_poly_length(p) - 1; k >= 0; --k) {
      v = nmod_mul(v, w, m);
      v = nmod_add(v, fmpz_fdiv_ui(fmpq_poly_numref(p) + k, m.n), m);
    }
    *out = nmod_mul(v, n_invmod(den, m.n), m);
  }
  fmpq_poly_clear(p);
  return ok;
}

nmod_t make_nmod(ulong p) {
  nmod_t m;
  nmod_init(&m, p);
  return m;
}

}  // namespace

ModularPrime make_prime(const Field& f, ulong p, ulong zeta, std::vector<ulong> roots) {
  ulong n = f.conductor();
  if (p < 3 || !n_is_prime(p)) throw InputError(fmt::format("{} is not an odd prime", p));
  if (p % n != 1 % n) throw InputError(fmt::format("prime {} is not 1 mod the conductor {}", p, n));
  nmod_t m = make_nmod(p);
  zeta %= p;
  if (!has_order(zeta, n, m)) throw InputError(fmt::format("{} is not a primitive {}-th root of unity mod {}", zeta, n, p));
  if (roots.size() != static_cast<size_t>(f.radicand_count()))
    throw InputError(fmt::format("{} square roots given, the field has {} radicands", roots.size(), f.radicand_count()));
  for (int j = 0; j < f.radicand_count(); ++j) {
    ulong d;
    if (!eval_cyclo(&d, f.radicand(j), zeta, m))
      throw InputError(fmt::format("prime {} divides a denominator of radicand {}", p, j + 1));
    ulong r = roots[static_cast<size_t>(j)] % p;
    if (nmod_mul(r, r, m) != d)
      throw InputError(fmt::format("{}^2 is not the image {} of radicand {} mod {}", r, d, j + 1, p));
    roots[static_cast<size_t>(j)] = r;
  }
  return ModularPrime{p, zeta, std::move(roots)};
}

std::vector<ModularPrime> choose_primes(const Field& f, size_t count, int bits) {
  if (bits < 8 || bits > 63) throw InputError("prime size must be 8..63 bits");
  ulong n = f.conductor();
  ulong step = n % 2 ? 2 * n : n;  // p = 1 mod N and p odd
  ulong p = (ulong{1} << (bits - 1)) / step * step + 1;
  std::vector<ModularPrime> out;
  for (; out.size() < count; p += step) {
    if (p >= (ulong{1} << bits) - step) throw ResourceError("ran out of primes of the requested size");
    if (!n_is_prime(p)) continue;
    nmod_t m = make_nmod(p);
    ulong w = 0;
    for (ulong a = 2; a < p; ++a) {
      ulong c = pow_mod(a, (p - 1) / n, m);
      if (has_order(c, n, m)) {
        w = c;
        break;
      }
    }
    bool ok = true;
    std::vector<ulong> roots;
    for (int j = 0; j < f.radicand_count() && ok; ++j) {
      ulong d;
      if (!eval_cyclo(&d, f.radicand(j), w, m) || d == 0) {
        ok = false;
        break;
      }
      ulong r = n_sqrtmod(d, p);
      if (r == 0) {
        ok = false;
        break;
      }
      roots.push_back(std::min(r, p - r));
    }
    if (ok) out.push_back(ModularPrime{p, w, std::move(roots)});
  }
  return out;
}

ModularImage::ModularImage(ulong p, size_t rows, size_t cols) : mod_(make_nmod(p)), r_(rows), c_(cols), a_(rows * cols, 0) {}

bool ModularImage::is_zero() const {
  for (ulong v : a_)
    if (v) return false;
  return true;
}

bool operator==(const ModularImage& x, const ModularImage& y) {
  return x.mod_.n == y.mod_.n && x.r_ == y.r_ && x.c_ == y.c_ && x.a_ == y.a_;
}

ModularImage operator*(const ModularImage& x, const ModularImage& y) {
  if (x.c_ != y.r_ || x.mod_.n != y.mod_.n) throw MathError("modular images do not compose");
  ModularImage z(x.mod_.n, x.r_, y.c_);
  for (size_t i = 0; i < x.r_; ++i)
    for (size_t k = 0; k < x.c_; ++k) {
      ulong a = x(i, k);
      if (!a) continue;
      for (size_t j = 0; j < y.c_; ++j) z(i, j) = nmod_add(z(i, j), nmod_mul(a, y(k, j), x.mod_), x.mod_);
    }
  return z;
}

ulong reduce_cyclo(const Cyclo& x, const ModularPrime& q) {
  nmod_t m = make_nmod(q.p);
  ulong v;
  if (!eval_cyclo(&v, x, q.zeta, m)) throw MathError(fmt::format("prime {} divides a denominator of {}", q.p, x.str()));
  return v;
}

ulong reduce_scalar(const Scalar& x, const ModularPrime& q) {
  nmod_t m = make_nmod(q.p);
  if (q.roots.size() < static_cast<size_t>(x.field()->radicand_count()))
    throw MathError("modular prime made for a field with fewer radicands");
  ulong v = 0;
  for (const auto& [s, c] : x.terms()) {
    ulong t;
    if (!eval_cyclo(&t, c, q.zeta, m)) throw MathError(fmt::format("prime {} divides a denominator of {}", q.p, c.str()));
    for (int j = 0; j < 64; ++j)
      if (s & (RadicalMask{1} << j)) t = nmod_mul(t, q.roots[static_cast<size_t>(j)], m);
    v = nmod_add(v, t, m);
  }
  return v;
}

ModularImage reduce_matrix(const Matrix& a, const ModularPrime& q) {
  ModularImage out(q.p, a.rows(), a.cols());
  for (size_t i = 0; i < a.rows(); ++i)
    for (size_t j = 0; j < a.cols(); ++j)
      if (!a(i, j).is_zero()) out(i, j) = reduce_scalar(a(i, j), q);
  return out;
}

void order_multiplier(fmpz_t s, const Matrix& m) {
  const Field& f = *m.field();
  std::vector<fmpz_t> b(static_cast<size_t>(f.radicand_count()));
  fmpq_poly_t p;
  fmpq_poly_init(p);
  for (int j = 0; j < f.radicand_count(); ++j) {
    fmpz_init(b[static_cast<size_t>(j)]);
    f.radicand(j).get_poly(p);
    fmpz_set(b[static_cast<size_t>(j)], fmpq_poly_denref(p));
  }
  fmpz_t t;
  fmpz_init(t);
  fmpz_one(s);
  for (size_t i = 0; i < m.rows(); ++i)
    for (size_t j = 0; j < m.cols(); ++j)
      for (const auto& [mask, c] : m(i, j).terms()) {
        c.get_poly(p);
        fmpz_set(t, fmpq_poly_denref(p));
        for (int r = 0; r < f.radicand_count(); ++r)
          if (mask & (RadicalMask{1} << r)) fmpz_mul(t, t, b[static_cast<size_t>(r)]);
        fmpz_lcm(s, s, t);
      }
  fmpz_clear(t);
  fmpq_poly_clear(p);
  for (auto& x : b) fmpz_clear(x);
}

std::vector<Embedding> embeddings_up_to_conjugation(const Field& f) {
  const long n = static_cast<long>(f.conductor());
  const RadicalMask signs = RadicalMask{1} << f.radicand_count();
  std::vector<Embedding> out;
  for (long a = 1; a < std::max(n, 2L); ++a) {
    if (n_gcd(static_cast<ulong>(a), static_cast<ulong>(n)) != 1) continue;
    int weight = 1;
    if (n > 2) {  // zeta -> zeta^a and zeta -> zeta^-a are complex conjugate embeddings of K (and of L over them)
      if (a > n - a) continue;
      weight = 2;
    }
    for (RadicalMask e = 0; e < signs; ++e) out.push_back({a, e, weight});
  }
  return out;
}

}  // namespace zb
