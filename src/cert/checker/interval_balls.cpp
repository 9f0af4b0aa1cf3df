// Ball images of the kept columns for interval certificates, and enclosures of the leakage
// (docs/certificate-format.md section 7).
#include <map>

#include <algorithm>

#include "checker.hpp"
#include "zetabraid/detail/raii.hpp"

namespace zb::checker {

namespace {

// One letter as its nonzero entries row by row, as balls at precision p (plain path) or as their midpoints with
// delta >= ||M - U||_2, the Frobenius norm of the radii (unitary path).
struct BallLetter {
  size_t rows = 0;
  std::vector<size_t> col;        // row by row
  std::vector<size_t> row_start;  // entries of row i: [row_start[i], row_start[i + 1])
  acb_ptr vals = nullptr;
  slong n = 0;
  MagT delta;
  BallLetter(const LetterTable& t, long p, bool midpoints) : rows(t.rows) {
    std::vector<std::vector<const LetterTable::Entry*>> by_row(t.rows);
    for (const auto& e : t.entries) by_row[e.row].push_back(&e);
    n = static_cast<slong>(t.entries.size());
    vals = _acb_vec_init(n);
    MagT r, d2;
    slong at = 0;
    for (size_t i = 0; i < t.rows; ++i) {
      row_start.push_back(col.size());
      for (const LetterTable::Entry* e : by_row[i]) {
        col.push_back(e->col);
        acb_ptr v = vals + at++;
        e->value.ball(v, p);
        if (!midpoints) continue;
        // |M_ij - U_ij| <= hypot(rad re, rad im) since U_ij lies in the ball
        mag_hypot(r.get(), arb_radref(acb_realref(v)), arb_radref(acb_imagref(v)));
        mag_addmul(d2.get(), r.get(), r.get());
        acb_get_mid(v, v);
      }
    }
    row_start.push_back(col.size());
    mag_sqrt(delta.get(), d2.get());
  }
  ~BallLetter() { _acb_vec_clear(vals, n); }
  BallLetter(const BallLetter&) = delete;
  BallLetter& operator=(const BallLetter&) = delete;
};

}  // namespace

void plain_image(acb_mat_t out, const Matrix& keep, const std::vector<const LetterTable*>& seq, long p) {
  const slong k = static_cast<slong>(keep.cols());
  AcbMatT acc(static_cast<slong>(keep.rows()), k);
  keep.ball(acc.get(), p);
  std::map<const LetterTable*, std::unique_ptr<BallLetter>> balls;
  for (const LetterTable* t : seq) {
    auto it = balls.find(t);
    if (it == balls.end()) it = balls.emplace(t, std::make_unique<BallLetter>(*t, p, false)).first;
    const BallLetter& b = *it->second;
    AcbMatT next(static_cast<slong>(b.rows), k);
    for (size_t i = 0; i < b.rows; ++i)
      for (size_t q = b.row_start[i]; q < b.row_start[i + 1]; ++q)
        for (slong c = 0; c < k; ++c)
          acb_addmul(acb_mat_entry(next.get(), static_cast<slong>(i), c), b.vals + q,
                     acb_mat_entry(acc.get(), static_cast<slong>(b.col[q]), c), p);
    acc = std::move(next);
  }
  acb_mat_set(out, acc.get());
}

// The kept columns carried as vectors of midpoints (zero radii) v_j with ONE rigorous bound
// e_j >= ||v_j - v_j^true||_2 each. One letter with midpoint matrix M, ||M - U||_2 <= delta: w = M v in ball
// arithmetic, then
//   ||mid(w) - U v^true|| <= ||mid(w) - M v|| + ||(M - U) v|| + ||U (v - v^true)||
//                         <= ||rad(w)||_2     + delta ||v||_2  + e          (||U||_2 = 1),
// with ||v||_2 <= ||v^true||_2 + e = ||V_j||_2 + e (unitary letters keep the true norm).
void unitary_image(acb_mat_t mid, mag_ptr err, const Matrix& keep, const std::vector<const LetterTable*>& seq,
                   long p) {
  const size_t dim = keep.rows(), k = keep.cols();
  keep.ball(mid, p);
  std::vector<acb_ptr> cols(k), next(k);
  mag_ptr norm = _mag_vec_init(static_cast<slong>(k));  // norm[c] >= ||V_c||_2
  std::vector<acb_struct> scratch(dim);                 // shallow copies of entries, read only, never cleared
  MagT t, nv, rw;
  for (size_t c = 0; c < k; ++c) {
    cols[c] = _acb_vec_init(static_cast<slong>(dim));
    next[c] = _acb_vec_init(static_cast<slong>(dim));
    mag_zero(err + c);
    for (size_t i = 0; i < dim; ++i) {
      acb_srcptr e = acb_mat_entry(mid, static_cast<slong>(i), static_cast<slong>(c));
      mag_hypot(t.get(), arb_radref(acb_realref(e)), arb_radref(acb_imagref(e)));
      mag_addmul(err + c, t.get(), t.get());
      acb_get_mag(t.get(), e);  // >= |V_ic| (the exact entry lies in the ball)
      mag_addmul(norm + c, t.get(), t.get());
      acb_get_mid(cols[c] + i, e);
    }
    mag_sqrt(err + c, err + c);
    mag_sqrt(norm + c, norm + c);
  }
  std::map<const LetterTable*, std::unique_ptr<BallLetter>> lets;
  for (const LetterTable* tb : seq) {
    auto it = lets.find(tb);
    if (it == lets.end()) it = lets.emplace(tb, std::make_unique<BallLetter>(*tb, p, true)).first;
    const BallLetter& sb = *it->second;
    for (size_t c = 0; c < k; ++c) {
      acb_ptr v = cols[c], w = next[c];
      mag_add(nv.get(), norm + c, err + c);  // >= ||v||_2
      for (size_t i = 0; i < dim; ++i) {
        const size_t a = sb.row_start[i], b = sb.row_start[i + 1];
        for (size_t q = a; q < b; ++q) scratch[q - a] = v[sb.col[q]];
        acb_dot(w + i, nullptr, 0, sb.vals + a, 1, scratch.data(), 1, static_cast<slong>(b - a), p);
      }
      mag_zero(rw.get());
      for (size_t i = 0; i < dim; ++i) {
        mag_ptr re = arb_radref(acb_realref(w + i)), im = arb_radref(acb_imagref(w + i));
        mag_addmul(rw.get(), re, re);
        mag_addmul(rw.get(), im, im);
        mag_zero(re);
        mag_zero(im);
      }
      mag_sqrt(rw.get(), rw.get());
      mag_addmul(err + c, sb.delta.get(), nv.get());
      mag_add(err + c, err + c, rw.get());
      std::swap(cols[c], next[c]);
    }
  }
  for (size_t c = 0; c < k; ++c) {
    for (size_t i = 0; i < dim; ++i)
      acb_set(acb_mat_entry(mid, static_cast<slong>(i), static_cast<slong>(c)), cols[c] + i);
    _acb_vec_clear(cols[c], static_cast<slong>(dim));
    _acb_vec_clear(next[c], static_cast<slong>(dim));
  }
  _mag_vec_clear(norm, static_cast<slong>(k));
}

void coordinate_leakage(arb_t leak, const acb_mat_t w, const std::vector<bool>& kept_rows, long p) {
  ArbT t;
  arb_zero(leak);
  for (slong i = 0; i < acb_mat_nrows(w); ++i) {
    if (kept_rows[static_cast<size_t>(i)]) continue;
    for (slong j = 0; j < acb_mat_ncols(w); ++j) {
      acb_srcptr e = acb_mat_entry(w, i, j);
      arb_sqr(t.get(), acb_realref(e), p);
      arb_add(leak, leak, t.get(), p);
      arb_sqr(t.get(), acb_imagref(e), p);
      arb_add(leak, leak, t.get(), p);
    }
  }
}

// With a_j = ||outside rows of v_j||_2 (enclosed from the midpoints), the true outside norm of column j lies in
// [a_j - e_j, a_j + e_j] intersected with [0, oo), so leakage = sum_j (true norm)^2 lies in
// [sum lo_j^2, sum hi_j^2], rounded outward.
void coordinate_leakage_bounded(arb_t leak, const acb_mat_t mid, mag_srcptr err, const std::vector<bool>& kept_rows,
                                long p) {
  // No row outside the kept space (the kept space is the whole space): the leak block is empty and the leakage
  // is exactly 0, whatever the error bounds of the image.
  if (std::all_of(kept_rows.begin(), kept_rows.end(), [](bool b) { return b; })) {
    arb_zero(leak);
    return;
  }
  ArbT s, t;
  ArfT lo, hi, lo_sum, hi_sum;
  for (slong j = 0; j < acb_mat_ncols(mid); ++j) {
    arb_zero(s.get());
    for (slong i = 0; i < acb_mat_nrows(mid); ++i) {
      if (kept_rows[static_cast<size_t>(i)]) continue;
      acb_srcptr e = acb_mat_entry(mid, i, j);
      arb_sqr(t.get(), acb_realref(e), p);
      arb_add(s.get(), s.get(), t.get(), p);
      arb_sqr(t.get(), acb_imagref(e), p);
      arb_add(s.get(), s.get(), t.get(), p);
    }
    arb_sqrtpos(s.get(), s.get(), p);  // a sum of squares: its negative part is rounding only
    arb_add_error_mag(s.get(), err + j);
    arb_get_lbound_arf(lo.get(), s.get(), p);
    if (arf_sgn(lo.get()) < 0) arf_zero(lo.get());
    arb_get_ubound_arf(hi.get(), s.get(), p);
    arf_mul(lo.get(), lo.get(), lo.get(), p, ARF_RND_DOWN);
    arf_mul(hi.get(), hi.get(), hi.get(), p, ARF_RND_UP);
    arf_add(lo_sum.get(), lo_sum.get(), lo.get(), p, ARF_RND_DOWN);
    arf_add(hi_sum.get(), hi_sum.get(), hi.get(), p, ARF_RND_UP);
  }
  arb_set_interval_arf(leak, lo_sum.get(), hi_sum.get(), p);
}

// Not the producer's trace formula: first the part of W outside span V, D = W - V (G^-1 (V^* W)) with exact
// V, V^* and G^-1 (zero exactly when rho(w) keeps the space), then its squared norm in the metric of the kept
// coordinates, tr(D^* D G^-1) = sum_{i,a,b} conj(D_ia) D_ib (G^-1)_ba. Equal to the trace formula because
// 1 - V G^-1 V^* is a Hermitian projector (section 5).
void outside_leakage(arb_t leak, const acb_mat_t w, const Matrix& v, long p) {
  const slong dim = acb_mat_nrows(w), k = acb_mat_ncols(w);
  const Matrix vh = v.adjoint();
  const Matrix gi = (vh * v).inverse();
  AcbMatT vb(dim, k), vhb(k, dim), gib(k, k), b(k, k), c(k, k), d(dim, k), dg(dim, k);
  v.ball(vb.get(), p);
  vh.ball(vhb.get(), p);
  gi.ball(gib.get(), p);
  acb_mat_mul(b.get(), vhb.get(), w, p);         // V^* W
  acb_mat_mul(c.get(), gib.get(), b.get(), p);   // G^-1 V^* W
  acb_mat_mul(d.get(), vb.get(), c.get(), p);    // V G^-1 V^* W
  acb_mat_sub(d.get(), w, d.get(), p);           // D
  acb_mat_mul(dg.get(), d.get(), gib.get(), p);  // D G^-1
  AcbT s, t;
  for (slong i = 0; i < dim; ++i)
    for (slong j = 0; j < k; ++j) {
      acb_conj(t.get(), acb_mat_entry(d.get(), i, j));
      acb_addmul(s.get(), t.get(), acb_mat_entry(dg.get(), i, j), p);
    }
  arb_set(leak, acb_realref(s.get()));
}

}  // namespace zb::checker
