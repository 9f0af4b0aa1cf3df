// Exact invariants of a braided anyon model (methods: docs/model-format.md, "Invariants").
#include "zetabraid/model/invariants.hpp"

#include <fmt/format.h>

#include <numeric>

#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/model/ribbon.hpp"

namespace zb {

namespace {

// Writes z = exp(2 pi i j/m) when z^m = 1 is proved and the ball of z pins down j; returns false otherwise.
bool root_of_unity_index(const Scalar& z, long max_order, long* j_out, long* m_out) {
  if (z.is_zero()) return false;
  Scalar p = z;
  long m = 0;
  for (long e = 1; e <= max_order; ++e) {
    if (p.is_one()) {
      m = e;
      break;
    }
    p = p * z;
  }
  if (m == 0) return false;
  // arg(z) * m / (2 pi) is within 1/2 of exactly one integer j (mod m); certify with balls.
  for (long prec = 64; prec <= 4096; prec *= 2) {
    AcbT b;
    z.ball(b, prec);
    ArbT t, pi2, r, half;
    acb_arg(t, b, prec);
    arb_const_pi(pi2, prec);
    arb_mul_2exp_si(pi2, pi2, 1);
    arb_div(t, t, pi2, prec);
    arb_mul_si(t, t, m, prec);
    double mid = arf_get_d(arb_midref(t.get()), ARF_RND_NEAR);
    long j = std::lround(mid);
    arb_sub_si(r, t, j, prec);
    arb_abs(r, r);
    arb_set_d(half, 0.5);
    bool certain = arb_lt(r, half);
    if (certain) {
      *j_out = ((j % m) + m) % m;
      *m_out = m;
      return true;
    }
  }
  return false;
}

}  // namespace

Invariants compute_invariants(const Model& m, long) {
  const int n = m.label_count();
  const FieldPtr& F = m.field;
  Invariants inv(F);
  // d_a, nu_a and theta_a: the one computation of ribbon data (model/ribbon.hpp).
  RibbonData rd = ribbon_data(m);
  inv.dims = std::move(rd.dims);
  inv.fs = std::move(rd.fs);
  for (const Scalar& d : inv.dims) inv.global_dim2 += d * d;
  if (!inv.global_dim2.in_base()) throw MathError("D^2 involves square roots; not supported yet");
  inv.global_dim = F->sqrt(inv.global_dim2.to_base());
  if (!m.has_r) {
    inv.notes.push_back("no R-symbols: twists, S, T and c are not defined");
    return inv;
  }
  inv.braided = true;
  inv.twists = std::move(rd.twists);
  Matrix S(F, static_cast<size_t>(n), static_cast<size_t>(n)), T(F, static_cast<size_t>(n), static_cast<size_t>(n));
  Scalar Dinv = inv.global_dim.inverse();
  for (int a = 0; a < n; ++a) {
    T(static_cast<size_t>(a), static_cast<size_t>(a)) = inv.twists[static_cast<size_t>(a)];
    for (int b = 0; b < n; ++b) {
      Scalar s(F);
      for (int c : m.channels(m.dual(a), b))
        s += Scalar(F, m.fusion(m.dual(a), b, c)) * inv.dims[static_cast<size_t>(c)] * inv.twists[static_cast<size_t>(c)];
      S(static_cast<size_t>(a), static_cast<size_t>(b)) =
          s * Dinv / (inv.twists[static_cast<size_t>(a)] * inv.twists[static_cast<size_t>(b)]);
    }
  }
  inv.modular = S.rank() == static_cast<size_t>(n);
  for (int a = 0; a < n; ++a)
    inv.gauss_plus += inv.dims[static_cast<size_t>(a)] * inv.dims[static_cast<size_t>(a)] * inv.twists[static_cast<size_t>(a)];
  inv.gauss_phase = inv.gauss_plus * Dinv;
  long j = 0, mo = 1;
  if (inv.modular && root_of_unity_index(inv.gauss_phase, 8 * static_cast<long>(F->conductor()) * 8, &j, &mo)) {
    // exp(2 pi i c/8) = exp(2 pi i j/m): c = 8 j/m mod 8.
    long num = 8 * j, den = mo;
    long g = std::gcd(num, den);
    num /= g;
    den /= g;
    num %= 8 * den;
    inv.central_charge_known = true;
    inv.c_num = num;
    inv.c_den = den;
  } else if (!inv.modular) {
    inv.notes.push_back("S is singular: the model is not modular, so c is not defined");
  } else {
    inv.notes.push_back("p_+/D is not a root of unity of small order in the field: c mod 8 not determined exactly");
  }
  if (inv.modular) {
    Matrix Si = S.inverse();
    inv.verlinde_ok = true;
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c) {
          Scalar s(F);
          for (int t = 0; t < n; ++t)
            s += S(static_cast<size_t>(a), static_cast<size_t>(t)) * S(static_cast<size_t>(b), static_cast<size_t>(t)) *
                 Si(static_cast<size_t>(t), static_cast<size_t>(c)) / S(0, static_cast<size_t>(t));
          ++inv.verlinde_checked;
          if (s != Scalar(F, m.fusion(a, b, c))) inv.verlinde_ok = false;
        }
  }
  if (inv.modular) {
    // Frobenius-Schur indicators a second way, from twists and dimensions (formula of Bantay 1997, common
    // practice for modular categories); must agree with the F-symbol values.
    for (int a = 0; a < n; ++a) {
      Scalar s(F);
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          if (m.fusion(b, c, a)) {
            Scalar q = inv.twists[static_cast<size_t>(b)] / inv.twists[static_cast<size_t>(c)];
            s += Scalar(F, m.fusion(b, c, a)) * inv.dims[static_cast<size_t>(b)] * inv.dims[static_cast<size_t>(c)] * q * q;
          }
      s /= inv.global_dim2;
      if (s != Scalar(F, inv.fs[static_cast<size_t>(a)])) {
        inv.fs_twist_formula_ok = false;
        inv.notes.push_back(fmt::format("FS indicator of {} from the twist formula is {}, from F it is {}",
                                        m.labels[static_cast<size_t>(a)], s.str(), inv.fs[static_cast<size_t>(a)]));
      }
    }
  }
  inv.S = std::move(S);
  inv.T = std::move(T);
  return inv;
}

}  // namespace zb
