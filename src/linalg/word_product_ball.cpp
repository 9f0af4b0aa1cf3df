// Ball enclosures of word products (see word_product.hpp): a balanced acb_mat product tree for small
// dimensions, column propagation with a rigorous 2-norm error bound for big ones, adaptive precision.
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <exception>
#include <map>
#include <memory>
#include <thread>
#include <unordered_map>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"

#include "zetabraid/detail/parallel.hpp"

namespace zb {

namespace {

// RAII acb_mat.
struct BallMat {
  acb_mat_t m;
  BallMat(long r, long c) { acb_mat_init(m, r, c); }
  ~BallMat() { acb_mat_clear(m); }
  BallMat(const BallMat&) = delete;
  BallMat& operator=(const BallMat&) = delete;
  long rows() const { return acb_mat_nrows(m); }
  long cols() const { return acb_mat_ncols(m); }
};
using BallPtr = std::unique_ptr<BallMat>;

void check_ball_shapes(const std::vector<const Matrix*>& letters, const Matrix& start, const acb_mat_t out) {
  size_t r = start.rows();
  for (size_t i = 0; i < letters.size(); ++i) {
    if (!letters[i]) throw MathError("null letter in a word product");
    if (letters[i]->cols() != r)
      throw MathError(fmt::format("letter {} ({}x{}) does not compose ({} rows before it)", i + 1, letters[i]->rows(),
                                  letters[i]->cols(), r));
    r = letters[i]->rows();
  }
  if (static_cast<size_t>(acb_mat_nrows(out)) != r || static_cast<size_t>(acb_mat_ncols(out)) != start.cols())
    throw MathError(fmt::format("ball output is {}x{}, the product is {}x{}", acb_mat_nrows(out), acb_mat_ncols(out), r,
                                start.cols()));
}

struct BallLetters {
  std::vector<BallPtr> mats;  // distinct letters
  std::vector<size_t> seq;    // leaf index per letter
};

BallLetters ball_letters(const std::vector<const Matrix*>& letters, long prec) {
  BallLetters b;
  std::unordered_map<const Matrix*, size_t> index;
  for (const Matrix* m : letters) {
    auto it = index.find(m);
    if (it == index.end()) {
      it = index.emplace(m, b.mats.size()).first;
      b.mats.push_back(std::make_unique<BallMat>(static_cast<long>(m->rows()), static_cast<long>(m->cols())));
      m->ball(b.mats.back()->m, prec);
    }
    b.seq.push_back(it->second);
  }
  return b;
}

// Runs of one letter -> (leaf, exponent).
struct Run {
  size_t leaf;
  unsigned long exp;
};

class BallTree {
 public:
  BallTree(const BallLetters& b, long prec, int threads) : b_(b), prec_(prec) {
    for (size_t l : b.seq) {
      if (!runs_.empty() && runs_.back().leaf == l)
        ++runs_.back().exp;
      else
        runs_.push_back({l, 1});
    }
    for (int t = threads; t > 1; t /= 2) ++spawn_depth_;
  }
  BallPtr run() { return node(0, runs_.size(), 0); }

 private:
  BallPtr leaf(const Run& r) {
    const BallMat& g = *b_.mats[r.leaf];
    auto out = std::make_unique<BallMat>(g.rows(), g.cols());
    if (r.exp == 1)
      acb_mat_set(out->m, g.m);
    else
      acb_mat_pow_ui(out->m, g.m, r.exp, prec_);
    return out;
  }
  BallPtr node(size_t lo, size_t hi, int depth) {
    if (hi - lo == 1) return leaf(runs_[lo]);
    size_t mid = lo + (hi - lo) / 2;
    BallPtr left, right;
    fork_join(depth < spawn_depth_ && hi - lo >= 32, [&] { left = node(lo, mid, depth + 1); },
                      [&] { right = node(mid, hi, depth + 1); });
    auto out = std::make_unique<BallMat>(right->rows(), left->cols());
    acb_mat_mul(out->m, right->m, left->m, prec_);
    return out;
  }
  const BallLetters& b_;
  long prec_;
  std::vector<Run> runs_;
  int spawn_depth_ = 0;
};

void product_tree(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec, int threads) {
  BallMat s(static_cast<long>(start.rows()), static_cast<long>(start.cols()));
  start.ball(s.m, prec);
  if (letters.empty()) {
    acb_mat_set(out, s.m);
    return;
  }
  BallLetters b = ball_letters(letters, prec);
  BallTree tree(b, prec, threads);
  BallPtr p = tree.run();
  if (start.is_identity())
    acb_mat_set(out, p->m);
  else
    acb_mat_mul(out, p->m, s.m, prec);
}

// Upper bound for ||G||_2 (true G inside the ball): sqrt of the max row sum of |G^* G| (an induced norm bounds
// the largest eigenvalue of G^* G), computed sparsely from the nonzero entries; and the Frobenius norm; the
// smaller of the two.
void norm2_bound(mag_t out, const acb_mat_t g, const std::vector<std::pair<long, long>>& nz, long prec) {
  long c = acb_mat_ncols(g);
  // Nonzeros grouped by row: H(a, b) = sum_i conj(G(i, a)) G(i, b).
  std::map<long, std::vector<long>> by_row;
  for (auto [i, j] : nz) by_row[i].push_back(j);
  std::map<std::pair<long, long>, std::unique_ptr<acb_struct, void (*)(acb_struct*)>> h;
  acb_t t;
  acb_init(t);
  auto make = [] {
    auto* p = new acb_struct;
    acb_init(p);
    return std::unique_ptr<acb_struct, void (*)(acb_struct*)>(p, [](acb_struct* q) {
      acb_clear(q);
      delete q;
    });
  };
  for (const auto& [i, cols] : by_row)
    for (long a : cols)
      for (long b : cols) {
        acb_conj(t, acb_mat_entry(g, i, a));
        acb_mul(t, t, acb_mat_entry(g, i, b), prec);
        auto it = h.find({a, b});
        if (it == h.end()) it = h.emplace(std::make_pair(a, b), make()).first;
        acb_add(it->second.get(), it->second.get(), t, prec);
      }
  std::vector<mag_struct> row(static_cast<size_t>(c));
  for (auto& r : row) mag_init(&r);
  mag_t m, best, fro;
  mag_init(m);
  mag_init(best);
  mag_init(fro);
  for (const auto& [ab, v] : h) {
    acb_get_mag(m, v.get());
    mag_add(&row[static_cast<size_t>(ab.first)], &row[static_cast<size_t>(ab.first)], m);
  }
  for (auto& r : row) mag_max(best, best, &r);
  mag_sqrt(best, best);
  for (auto [i, j] : nz) {
    acb_get_mag(m, acb_mat_entry(g, i, j));
    mag_addmul(fro, m, m);
  }
  mag_sqrt(fro, fro);
  mag_min(out, best, fro);
  for (auto& r : row) mag_clear(&r);
  mag_clear(fro);
  mag_clear(best);
  mag_clear(m);
  acb_clear(t);
}

// Column propagation with exact midpoints and one rigorous 2-norm error bound per column.
void product_columns(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec) {
  long k = static_cast<long>(start.cols());
  auto acc = std::make_unique<BallMat>(static_cast<long>(start.rows()), k);
  start.ball(acc->m, prec);
  std::vector<mag_struct> err(static_cast<size_t>(k));
  for (auto& e : err) mag_init(&e);
  mag_t t, rad;
  mag_init(t);
  mag_init(rad);
  // Move the radii of the start into the column error bounds.
  auto absorb = [&](BallMat& m) {
    for (long j = 0; j < k; ++j) {
      mag_zero(rad);
      for (long i = 0; i < m.rows(); ++i) {
        acb_struct* e = acb_mat_entry(m.m, i, j);
        mag_hypot(t, arb_radref(acb_realref(e)), arb_radref(acb_imagref(e)));
        mag_addmul(rad, t, t);
        mag_zero(arb_radref(acb_realref(e)));
        mag_zero(arb_radref(acb_imagref(e)));
      }
      mag_sqrt(rad, rad);
      mag_add(&err[static_cast<size_t>(j)], &err[static_cast<size_t>(j)], rad);
    }
  };
  absorb(*acc);
  if (!letters.empty()) {
    BallLetters b = ball_letters(letters, prec);
    std::vector<std::vector<std::pair<long, long>>> nz(b.mats.size());
    std::vector<mag_struct> nu(b.mats.size());
    for (size_t l = 0; l < b.mats.size(); ++l) {
      const BallMat& g = *b.mats[l];
      for (long i = 0; i < g.rows(); ++i)
        for (long j = 0; j < g.cols(); ++j)
          if (!acb_is_zero(acb_mat_entry(g.m, i, j))) nz[l].emplace_back(i, j);
      mag_init(&nu[l]);
      norm2_bound(&nu[l], g.m, nz[l], prec);
    }
    // Row-wise nonzeros: (row, first index, count) into cols[l] / vals[l] (shallow copies of the ball entries,
    // read only by acb_dot).
    struct RowSpan {
      long i;
      size_t first, count;
    };
    std::vector<std::vector<RowSpan>> rows(b.mats.size());
    std::vector<std::vector<long>> cols(b.mats.size());
    std::vector<std::vector<acb_struct>> vals(b.mats.size());
    for (size_t l = 0; l < b.mats.size(); ++l)
      for (auto [i, c] : nz[l]) {
        if (rows[l].empty() || rows[l].back().i != i) rows[l].push_back({i, cols[l].size(), 0});
        ++rows[l].back().count;
        cols[l].push_back(c);
        vals[l].push_back(*acb_mat_entry(b.mats[l]->m, i, c));
      }
    std::vector<acb_struct> ys;
    std::unordered_map<long, std::unique_ptr<BallMat>> spare;  // next buffers by row count
    for (size_t l : b.seq) {
      const BallMat& g = *b.mats[l];
      auto& slot = spare[g.rows()];
      std::unique_ptr<BallMat> next = slot ? std::move(slot) : std::make_unique<BallMat>(g.rows(), k);
      acb_mat_zero(next->m);
      for (const RowSpan& r : rows[l]) {
        ys.resize(r.count);
        for (long j = 0; j < k; ++j) {
          for (size_t q = 0; q < r.count; ++q) ys[q] = *acb_mat_entry(acc->m, cols[l][r.first + q], j);
          acb_dot(acb_mat_entry(next->m, r.i, j), nullptr, 0, vals[l].data() + r.first, 1, ys.data(), 1,
                  static_cast<slong>(r.count), prec);
        }
      }
      for (auto& e : err) mag_mul(&e, &e, &nu[l]);
      absorb(*next);
      spare[acc->rows()] = std::move(acc);
      acc = std::move(next);
    }
    for (auto& v : nu) mag_clear(&v);
  }
  acb_mat_set(out, acc->m);
  for (long i = 0; i < acc->rows(); ++i)
    for (long j = 0; j < k; ++j) {
      acb_struct* e = acb_mat_entry(out, i, j);
      arb_add_error_mag(acb_realref(e), &err[static_cast<size_t>(j)]);
      arb_add_error_mag(acb_imagref(e), &err[static_cast<size_t>(j)]);
    }
  for (auto& e : err) mag_clear(&e);
  mag_clear(rad);
  mag_clear(t);
}

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

constexpr int kFix = 112;
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

BallMethod pick(const std::vector<const Matrix*>& letters, const Matrix& start, BallMethod m) {
  if (m != BallMethod::kAuto) return m;
  size_t dim = start.rows();
  for (const Matrix* l : letters) dim = std::max(dim, l->rows());
  // Columns cost nnz * cols per letter and lose ~log2(length) bits when every letter has 2-norm <= 1 (unitary
  // letters); the tree costs dim^3 per letter and copes better with letters of norm > 1. Big spaces: columns.
  if (dim > 8) return BallMethod::kColumns;
  std::unordered_map<const Matrix*, bool> seen;
  mag_t nu, one;
  mag_init(nu);
  mag_init(one);
  mag_set_ui_2exp_si(one, 1025, -10);  // 1 + 2^-10
  bool unitary = true;
  acb_mat_t g;
  for (const Matrix* l : letters) {
    if (!unitary) break;
    if (!seen.emplace(l, true).second) continue;
    acb_mat_init(g, static_cast<long>(l->rows()), static_cast<long>(l->cols()));
    l->ball(g, 64);
    std::vector<std::pair<long, long>> nz;
    for (long i = 0; i < acb_mat_nrows(g); ++i)
      for (long j = 0; j < acb_mat_ncols(g); ++j)
        if (!acb_is_zero(acb_mat_entry(g, i, j))) nz.emplace_back(i, j);
    norm2_bound(nu, g, nz, 64);
    unitary = mag_cmp(nu, one) <= 0;
    acb_mat_clear(g);
  }
  mag_clear(one);
  mag_clear(nu);
  return unitary ? BallMethod::kColumns : BallMethod::kTree;
}

}  // namespace

void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec) {
  word_product_ball(out, letters, start, prec, BallMethod::kAuto, 1);
}

void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec,
                       BallMethod method, int threads) {
  check_ball_shapes(letters, start, out);
  if (prec < 2) throw MathError("ball precision must be at least 2 bits");
  BallMethod m = pick(letters, start, method);
  if (m == BallMethod::kTree)
    product_tree(out, letters, start, prec, threads);
  else if (m == BallMethod::kColumnsArb || prec > fixed::kFix || !fixed::product_columns(out, letters, start, prec))
    product_columns(out, letters, start, prec);
}

long ball_matrix_accuracy_bits(const acb_mat_t m) {
  mag_t r, t;
  mag_init(r);
  mag_init(t);
  for (long i = 0; i < acb_mat_nrows(m); ++i)
    for (long j = 0; j < acb_mat_ncols(m); ++j) {
      const acb_struct* e = acb_mat_entry(m, i, j);
      mag_max(r, r, arb_radref(acb_realref(e)));
      mag_max(r, r, arb_radref(acb_imagref(e)));
    }
  long bits;
  if (mag_is_zero(r)) {
    bits = ARF_PREC_EXACT;
  } else if (mag_is_inf(r)) {
    bits = -ARF_PREC_EXACT;
  } else {
    // Largest b with r <= 2^-b (rigorous on the mag upper bound).
    bits = static_cast<long>(std::floor(-mag_get_d_log2_approx(r))) + 2;
    while (mag_cmp_2exp_si(r, -bits) > 0) --bits;
  }
  mag_clear(t);
  mag_clear(r);
  return bits;
}

long ball_matrix_relative_bits(const acb_mat_t m) {
  long best = ARF_PREC_EXACT;
  for (long i = 0; i < acb_mat_nrows(m); ++i)
    for (long j = 0; j < acb_mat_ncols(m); ++j) {
      const acb_struct* e = acb_mat_entry(m, i, j);
      if (acb_is_zero(e)) continue;
      best = std::min(best, static_cast<long>(acb_rel_accuracy_bits(e)));
    }
  return best;
}

BallReport word_product_ball_adaptive(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start,
                                      const BallOptions& opt) {
  check_ball_shapes(letters, start, out);
  BallMethod m = pick(letters, start, opt.method);
  size_t dim = start.rows();
  for (const Matrix* l : letters) dim = std::max(dim, l->rows());
  double lg = std::log2(static_cast<double>(letters.size()) + 2.0);
  // Expected loss: tree ~ levels * log2(dim) bits; columns ~ log2(length) + log2(dim).
  double loss = m == BallMethod::kTree ? lg * (std::log2(static_cast<double>(dim)) + 1.0) : lg + std::log2(static_cast<double>(dim)) + 4;
  long prec = std::max<long>(32, opt.target_bits + static_cast<long>(loss) + 16);
  BallReport rep;
  for (;;) {
    prec = std::min(prec, opt.max_precision);
    word_product_ball(out, letters, start, prec, m, opt.threads);
    ++rep.runs;
    rep.precision = prec;
    rep.accuracy_bits = ball_matrix_accuracy_bits(out);
    rep.relative_bits = ball_matrix_relative_bits(out);
    rep.reached = rep.accuracy_bits >= opt.target_bits;
    if (rep.reached || prec >= opt.max_precision) break;
    long missing = opt.target_bits - std::max<long>(rep.accuracy_bits, -prec);
    prec += std::max<long>(missing + 16, prec / 2);
  }
  return rep;
}

}  // namespace zb

namespace zb {

// The ball engines work letter by letter (or on a tree over the letter list): the IndexedWord is expanded to its
// letters in application order (distinct letters are still enclosed once each, by pointer).
void word_product_ball(acb_mat_t out, const IndexedWord& word, const Matrix& start, long prec, BallMethod method,
                       int threads) {
  word_product_ball(out, word.expand_pointers(), start, prec, method, threads);
}

BallReport word_product_ball_adaptive(acb_mat_t out, const IndexedWord& word, const Matrix& start,
                                      const BallOptions& opt) {
  return word_product_ball_adaptive(out, word.expand_pointers(), start, opt);
}

}  // namespace zb
