// Ball column propagation with midpoints in 128-bit fixed point (see the comment below and word_product.hpp).
#include <algorithm>
#include <cstdint>
#include <vector>

#include "ball_common.hpp"
#include "zetabraid/error.hpp"

namespace zb::detail {

// ---------------- Column propagation in 128-bit fixed point ----------------
//
// The same column method with midpoints held as signed 128-bit integers X (value X * 2^-kFix) instead of arb
// balls. Letters: G~ = letter ball midpoints rounded to the grid, with delta_G >= ||G - G~||_F (ball radii plus
// rounding, computed in mag arithmetic). One letter step y~ = G~ x~ truncates every real product once (error
// < 2^-kFix), so |y~_i - (G~ x~)_i| <= 2 sqrt 2 c_i 2^-kFix (c_i nonzeros in row i) and the rounding vector has
// 2-norm <= rho_G = 3 * 2^-kFix * sqrt(sum c_i^2). With E >= ||x* - x~||_2 (x* the exact column) and
// N >= ||x~||_2 for every column:
//     E' = nu_G E + delta_G N + rho_G,    N' = (nu_G + delta_G) N + rho_G,
// evaluated in Arb's mag_t arithmetic (every operation rounded upward; no floating point). The final
// balls are the exact midpoints X * 2^-kFix with radius E on the real and imaginary parts. Overflow is excluded by
// guards: every |G~ entry| <= 2^4, N <= 2^4, at most 16 nonzeros per row, so every partial sum of a real part
// (at most 32 products, each of value <= 2^8) has value < 2^13, i.e. integer magnitude < 2^125.
// Returns false (nothing written) when a guard fails; the caller then uses the arb column method.
namespace fixed {

using i128 = __int128;
using u128 = unsigned __int128;

// floor(|a| |b| / 2^112) with the sign of a b (truncation toward zero: error < 1 in the last place).
inline i128 mul(i128 a, i128 b) {
  bool neg = (a < 0) != (b < 0);
  u128 ua = a < 0 ? -static_cast<u128>(a) : static_cast<u128>(a);
  u128 ub = b < 0 ? -static_cast<u128>(b) : static_cast<u128>(b);
  std::uint64_t a0 = static_cast<std::uint64_t>(ua), a1 = static_cast<std::uint64_t>(ua >> 64);
  std::uint64_t b0 = static_cast<std::uint64_t>(ub), b1 = static_cast<std::uint64_t>(ub >> 64);
  u128 lo = static_cast<u128>(a0) * b0, m1 = static_cast<u128>(a1) * b0, m2 = static_cast<u128>(a0) * b1,
       hi = static_cast<u128>(a1) * b1;
  u128 sm = (lo >> 64) + static_cast<std::uint64_t>(m1) + static_cast<std::uint64_t>(m2);
  u128 top = hi + (m1 >> 64) + (m2 >> 64) + (sm >> 64);  // P = top * 2^128 + (sm mod 2^64) * 2^64 + (lo mod 2^64)
  u128 q = (top << 16) + (static_cast<std::uint64_t>(sm) >> 48);
  return neg ? -static_cast<i128>(q) : static_cast<i128>(q);
}

struct Cx {
  i128 re = 0, im = 0;
};

// Nearest grid point of an arf (|x| <= 2^4 by the caller's guards).
i128 to_fix(const arf_t x) {
  arf_t t;
  arf_init(t);
  arf_mul_2exp_si(t, x, kFix);
  fmpz_t z;
  fmpz_init(z);
  arf_get_fmpz(z, t, ARF_RND_NEAR);
  i128 v = 0;
  if (!fmpz_is_zero(z)) {
    fmpz_t a;
    fmpz_init(a);
    fmpz_abs(a, z);
    fmpz_t r;
    fmpz_init(r);
    fmpz_fdiv_r_2exp(r, a, 64);
    std::uint64_t lo = fmpz_get_ui(r);
    fmpz_fdiv_q_2exp(a, a, 64);
    std::uint64_t hi = fmpz_get_ui(a);  // < 2^53 by the caller's guards
    fmpz_clear(r);
    v = static_cast<i128>((static_cast<u128>(hi) << 64) | lo);
    if (fmpz_sgn(z) < 0) v = -v;
    fmpz_clear(a);
  }
  fmpz_clear(z);
  arf_clear(t);
  return v;
}

void to_arf(arf_t out, i128 v) {
  fmpz_t z;
  fmpz_init(z);
  u128 u = v < 0 ? -static_cast<u128>(v) : static_cast<u128>(v);
  fmpz_set_uiui(z, static_cast<std::uint64_t>(u >> 64), static_cast<std::uint64_t>(u));
  if (v < 0) fmpz_neg(z, z);
  arf_set_fmpz(out, z);
  arf_mul_2exp_si(out, out, -kFix);
  fmpz_clear(z);
}

// Upper-bound magnitudes (Arb's mag_t rounds every operation upward), RAII.
struct Mag {
  mag_t v;
  Mag() { mag_init(v); }
  Mag(const Mag& o) { mag_init(v); mag_set(v, o.v); }
  Mag& operator=(const Mag& o) { mag_set(v, o.v); return *this; }
  ~Mag() { mag_clear(v); }
};

// |entry error|^2 bound for a ball entry rounded to the grid: (rad_re + 2^-kFix)^2 + (rad_im + 2^-kFix)^2.
void entry_err2(mag_t out, const acb_struct* x, const mag_t grid) {
  Mag er, ei;
  mag_add(er.v, arb_radref(acb_realref(x)), grid);
  mag_add(ei.v, arb_radref(acb_imagref(x)), grid);
  mag_mul(er.v, er.v, er.v);
  mag_mul(ei.v, ei.v, ei.v);
  mag_add(out, er.v, ei.v);
}

bool product_columns(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec) {
  const long k = static_cast<long>(start.cols());
  const long bprec = std::max<long>(prec, kFix + 30);
  Mag m, t, lim, grid, e, nrm;
  mag_set_ui_2exp_si(lim.v, 1, 4);
  mag_set_ui_2exp_si(grid.v, 1, -kFix);
  // Start: midpoints rounded to the grid; E0 and N0 over all columns.
  BallMat sb(static_cast<long>(start.rows()), k);
  start.ball(sb.m, bprec);
  long rows = sb.rows();
  std::vector<Cx> acc(static_cast<size_t>(rows * k)), next;
  for (long j = 0; j < k; ++j) {
    Mag ej, nj, err2, mx;
    for (long i = 0; i < rows; ++i) {
      const acb_struct* x = acb_mat_entry(sb.m, i, j);
      acb_get_mag(m.v, x);
      if (mag_cmp(m.v, lim.v) > 0) return false;
      Cx& c = acc[static_cast<size_t>(i * k + j)];
      c.re = to_fix(arb_midref(acb_realref(x)));
      c.im = to_fix(arb_midref(acb_imagref(x)));
      // |x~ entry - x entry|^2 <= err2 and |x~ entry| <= |x| + sqrt(err2).
      entry_err2(err2.v, x, grid.v);
      mag_sqrt(mx.v, err2.v);
      mag_add(mx.v, mx.v, m.v);
      mag_add(ej.v, ej.v, err2.v);
      mag_mul(mx.v, mx.v, mx.v);
      mag_add(nj.v, nj.v, mx.v);
    }
    mag_sqrt(ej.v, ej.v);
    mag_sqrt(nj.v, nj.v);
    mag_max(e.v, e.v, ej.v);
    mag_max(nrm.v, nrm.v, nj.v);
  }
  if (mag_cmp(nrm.v, lim.v) > 0) return false;
  // Letters: grid midpoints, rows of nonzeros, nu, delta, rho.
  struct FixLetter {
    long rows = 0;
    std::vector<long> row_first;  // size rows + 1, into cols / vals
    std::vector<long> cols;
    std::vector<Cx> vals;
    Mag nu, delta, rho;
  };
  std::vector<FixLetter> fl;
  std::vector<size_t> seq;
  {
    BallLetters b = ball_letters(letters, bprec);
    seq = b.seq;
    for (const auto& g : b.mats) {
      FixLetter f;
      f.rows = g->rows();
      std::vector<std::pair<long, long>> nz;
      Mag d2, err2;
      unsigned long c2 = 0;
      f.row_first.push_back(0);
      for (long i = 0; i < g->rows(); ++i) {
        unsigned long c = 0;
        for (long jj = 0; jj < g->cols(); ++jj) {
          const acb_struct* x = acb_mat_entry(g->m, i, jj);
          if (acb_is_zero(x)) continue;
          nz.emplace_back(i, jj);
          acb_get_mag(m.v, x);
          if (mag_cmp(m.v, lim.v) > 0) return false;
          f.cols.push_back(jj);
          f.vals.push_back({to_fix(arb_midref(acb_realref(x))), to_fix(arb_midref(acb_imagref(x)))});
          entry_err2(err2.v, x, grid.v);
          mag_add(d2.v, d2.v, err2.v);
          ++c;
        }
        if (c > 16) return false;
        c2 += c * c;
        f.row_first.push_back(static_cast<long>(f.cols.size()));
      }
      norm2_bound(f.nu.v, g->m, nz, bprec);
      mag_sqrt(f.delta.v, d2.v);
      mag_set_ui(f.rho.v, c2);
      mag_sqrt(f.rho.v, f.rho.v);
      mag_mul_ui(f.rho.v, f.rho.v, 3);
      mag_mul_2exp_si(f.rho.v, f.rho.v, -kFix);
      fl.push_back(std::move(f));
    }
  }
  Mag t1, t2;
  for (size_t l : seq) {
    const FixLetter& g = fl[l];
    next.assign(static_cast<size_t>(g.rows * k), Cx{});
    for (long i = 0; i < g.rows; ++i)
      for (long q = g.row_first[static_cast<size_t>(i)]; q < g.row_first[static_cast<size_t>(i) + 1]; ++q) {
        const Cx v = g.vals[static_cast<size_t>(q)];
        const Cx* x = acc.data() + g.cols[static_cast<size_t>(q)] * k;
        Cx* y = next.data() + i * k;
        for (long j = 0; j < k; ++j) {
          y[j].re += mul(v.re, x[j].re) - mul(v.im, x[j].im);
          y[j].im += mul(v.re, x[j].im) + mul(v.im, x[j].re);
        }
      }
    // E' = nu E + delta N + rho,  N' = (nu + delta) N + rho   (all in upward-rounded mag arithmetic)
    mag_mul(t1.v, g.nu.v, e.v);
    mag_mul(t2.v, g.delta.v, nrm.v);
    mag_add(e.v, t1.v, t2.v);
    mag_add(e.v, e.v, g.rho.v);
    mag_add(t1.v, g.nu.v, g.delta.v);
    mag_mul(nrm.v, t1.v, nrm.v);
    mag_add(nrm.v, nrm.v, g.rho.v);
    if (mag_cmp(nrm.v, lim.v) > 0) return false;
    acc.swap(next);
    rows = g.rows;
  }
  for (long i = 0; i < rows; ++i)
    for (long j = 0; j < k; ++j) {
      acb_struct* o = acb_mat_entry(out, i, j);
      const Cx& c = acc[static_cast<size_t>(i * k + j)];
      to_arf(arb_midref(acb_realref(o)), c.re);
      to_arf(arb_midref(acb_imagref(o)), c.im);
      mag_set(arb_radref(acb_realref(o)), e.v);
      mag_set(arb_radref(acb_imagref(o)), e.v);
    }
  return true;
}

}  // namespace fixed

}  // namespace zb::detail
