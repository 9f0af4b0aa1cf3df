// The independent checker behind `zetabraid verify`.
//
// Shared with the producer (trusted base, small and separately tested): the exact field, Matrix arithmetic,
// the model loader, the fusion-tree enumeration and the charge projectors that recompute the kept basis.
// NOT shared: the action of the word's letters (rebuilt here by applying the F-R-F move to basis vectors
// directly), every product of a word (a plain left-to-right application here; the producer goes through
// linalg/word_product), the leakage formula and the decision logic. The interval re-check propagates
// midpoints with one rigorous 2-norm error bound per column when every letter is exactly unitary (checked
// here), and falls back to a plain left-to-right ball product otherwise (docs/certificate-format.md, section 7).
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <memory>
#include <nlohmann/json.hpp>
#include <set>

#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

namespace zb {

namespace {

using json = nlohmann::json;

struct Reject {
  std::string why;
};

[[noreturn]] void reject(const std::string& why) { throw Reject{why}; }

void expect_keys(const json& o, const std::set<std::string>& keys, const std::string& where) {
  if (!o.is_object()) reject(fmt::format("{} is not an object", where));
  for (auto it = o.begin(); it != o.end(); ++it)
    if (!keys.count(it.key())) reject(fmt::format("unexpected key '{}' in {}", it.key(), where));
  for (const auto& k : keys)
    if (!o.contains(k)) reject(fmt::format("missing key '{}' in {}", k, where));
}

std::string str_of(const json& v, const std::string& where) {
  if (!v.is_string()) reject(fmt::format("{} must be a string", where));
  return v.get<std::string>();
}

size_t uint_of(const json& v, const std::string& where) {
  if (!v.is_number_unsigned()) reject(fmt::format("{} must be a non-negative integer", where));
  return v.get<size_t>();
}

Scalar scalar_of(const json& v, const FieldPtr& f, const std::string& where) {
  std::string s = str_of(v, where);
  try {
    return parse_expression(s, f);
  } catch (const InputError& e) {
    reject(fmt::format("{}: not an exact expression: {}", where, e.what()));
  }
}

Matrix matrix_of_rows(const json& v, size_t rows, size_t cols, const FieldPtr& f, const std::string& where) {
  if (!v.is_array() || v.size() != rows) reject(fmt::format("{} must be an array of {} rows", where, rows));
  Matrix m(f, rows, cols);
  for (size_t i = 0; i < rows; ++i) {
    if (!v[i].is_array() || v[i].size() != cols) reject(fmt::format("{} row {} must have {} entries", where, i, cols));
    for (size_t j = 0; j < cols; ++j) m(i, j) = scalar_of(v[i][j], f, fmt::format("{}[{}][{}]", where, i, j));
  }
  return m;
}

// Generator action rebuilt from F and R (no generator matrices, no word products shared with the producer).
class Action {
 public:
  Action(const Model& m, int total) : m_(m), total_(total) {}

  const FusionSpace& space(const std::vector<int>& labels) {
    auto it = spaces_.find(labels);
    if (it == spaces_.end()) it = spaces_.emplace(labels, std::make_unique<FusionSpace>(m_, labels, total_)).first;
    return *it->second;
  }

  // v in V(labels) -> sigma_k^{+-1} v in V(labels swapped); labels updated.
  std::vector<Scalar> apply(std::vector<int>& labels, int k, const std::vector<Scalar>& v) {
    const size_t i = static_cast<size_t>(k > 0 ? k : -k);
    const FusionSpace& from = space(labels);
    std::vector<int> to_labels = labels;
    std::swap(to_labels[i - 1], to_labels[i]);
    const FusionSpace& to = space(to_labels);
    std::vector<Scalar> out(to.dimension(), Scalar(m_.field));
    const int b = labels[i - 1], c = labels[i];
    for (size_t s = 0; s < from.dimension(); ++s) {
      if (v[s].is_zero()) continue;
      std::vector<int> t = from.tree(s);
      t[0] = to_labels[0];
      if (i == 1) {
        Scalar r = k > 0 ? rsym(b, c, t[1]) : rsym(c, b, t[1]).inverse();
        out[static_cast<size_t>(to.index_of(t))] += r * v[s];
        continue;
      }
      const int u = t[i - 2], e = t[i - 1], d = t[i];
      // sum over f of F^{u b c}_d[e,f] R (F^{u c b}_d)^{-1}[f,e']
      const Local& f1 = local(u, b, c, d);
      const Local& f2 = local(u, c, b, d);
      size_t er = 0;
      while (er < f1.rows.size() && f1.rows[er] != e) ++er;
      if (er == f1.rows.size()) reject("internal: tree not admissible in F");
      for (size_t fj = 0; fj < f1.cols.size(); ++fj) {
        const int f = f1.cols[fj];
        if (f1.f(er, fj).is_zero()) continue;
        size_t fi = 0;
        while (fi < f2.cols.size() && f2.cols[fi] != f) ++fi;
        if (fi == f2.cols.size()) continue;
        Scalar coeff = f1.f(er, fj) * (k > 0 ? rsym(b, c, f) : rsym(c, b, f).inverse()) * v[s];
        for (size_t ep = 0; ep < f2.rows.size(); ++ep) {
          const Scalar& z = f2.finv(fi, ep);
          if (z.is_zero()) continue;
          t[i - 1] = f2.rows[ep];
          long row = to.index_of(t);
          if (row < 0) reject("internal: image tree missing");
          out[static_cast<size_t>(row)] += coeff * z;
        }
      }
    }
    labels = to_labels;
    return out;
  }

 private:
  struct Local {
    std::vector<int> rows, cols;
    Matrix f, finv;
  };
  const Local& local(int a, int b, int c, int d) {
    std::array<int, 4> key{a, b, c, d};
    auto it = locals_.find(key);
    if (it != locals_.end()) return it->second;
    std::vector<int> rows, cols;
    for (int e = 0; e < m_.label_count(); ++e)
      if (m_.fusion(a, b, e) > 0 && m_.fusion(e, c, d) > 0) rows.push_back(e);
    for (int f = 0; f < m_.label_count(); ++f)
      if (m_.fusion(b, c, f) > 0 && m_.fusion(a, f, d) > 0) cols.push_back(f);
    if (rows.size() != cols.size()) reject("model has a non-square F-matrix");
    Matrix f(m_.field, rows.size(), cols.size());
    for (size_t x = 0; x < rows.size(); ++x)
      for (size_t y = 0; y < cols.size(); ++y)
        if (const Scalar* s = m_.f_symbol(a, b, c, d, rows[x], cols[y])) f(x, y) = *s;
    Matrix finv = f.inverse();
    return locals_.emplace(key, Local{rows, cols, f, finv}).first->second;
  }
  Scalar rsym(int a, int b, int c) {
    const Scalar* r = m_.r_symbol(a, b, c);
    if (!r || r->is_zero()) reject(fmt::format("model lacks R^{{{} {}}}_{}", m_.labels[a], m_.labels[b], m_.labels[c]));
    return *r;
  }
  const Model& m_;
  int total_;
  std::map<std::vector<int>, std::unique_ptr<FusionSpace>> spaces_;
  std::map<std::array<int, 4>, Local> locals_;
};

// rho(w) applied to the columns of v, exactly, one letter at a time.
// Exact matrix of one letter on V(labels), from the action on basis vectors.
Matrix letter_matrix(Action& act, const std::vector<int>& labels, int k) {
  const FusionSpace& sp = act.space(labels);
  size_t n = sp.dimension();
  Matrix m(sp.model().field, n, n);
  for (size_t j = 0; j < n; ++j) {
    std::vector<Scalar> e(n, Scalar(sp.model().field));
    e[j] = Scalar(sp.model().field, 1);
    std::vector<int> l = labels;
    std::vector<Scalar> c = act.apply(l, k, e);
    for (size_t i = 0; i < n; ++i) m(i, j) = c[i];
  }
  return m;
}

struct SparseEntry {
  size_t row, col;
  Scalar value;
};
struct LetterTable {
  size_t rows = 0;
  std::vector<SparseEntry> entries;
};

// The word's letters as sparse exact tables, in application order (each distinct letter tabulated once).
std::vector<const LetterTable*> letter_tables(Action& act, const std::vector<int>& anyons, const Word& w,
                                              std::map<std::pair<std::vector<int>, int>, LetterTable>* store) {
  std::vector<const LetterTable*> out;
  std::vector<int> labels = anyons;
  for (int l : w.expand()) {
    auto key = std::make_pair(labels, l);
    auto it = store->find(key);
    if (it == store->end()) {
      Matrix g = letter_matrix(act, labels, l);
      LetterTable t{g.rows(), {}};
      for (size_t c = 0; c < g.cols(); ++c)
        for (size_t r = 0; r < g.rows(); ++r)
          if (!g(r, c).is_zero()) t.entries.push_back({r, c, g(r, c)});
      it = store->emplace(key, std::move(t)).first;
    }
    out.push_back(&it->second);
    std::swap(labels[static_cast<size_t>(std::abs(l)) - 1], labels[static_cast<size_t>(std::abs(l))]);
  }
  if (labels != anyons) reject("the word does not return the anyons to their order");
  return out;
}

// rho(w) applied to the columns of v, exactly, one letter at a time: each distinct letter's action is
// tabulated once (from the F-R-F move on basis vectors) as its nonzero entries, then applied plainly.
Matrix exact_image(Action& act, const std::vector<int>& anyons, const Word& w, const Matrix& v) {
  std::map<std::pair<std::vector<int>, int>, LetterTable> store;
  std::vector<const LetterTable*> tables = letter_tables(act, anyons, w, &store);
  std::vector<std::vector<Scalar>> cols(v.cols(), std::vector<Scalar>(v.rows(), Scalar(v.field())));
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < v.rows(); ++i) cols[j][i] = v(i, j);
  for (const LetterTable* t : tables)
    for (auto& col : cols) {
      std::vector<Scalar> next(t->rows, Scalar(v.field()));
      for (const SparseEntry& e : t->entries)
        if (!col[e.col].is_zero()) next[e.row] += e.value * col[e.col];
      col = std::move(next);
    }
  Matrix out(v.field(), v.rows(), v.cols());
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < v.rows(); ++i) out(i, j) = cols[j][i];
  return out;
}

// The part of W outside span V: D = W - V G^-1 V* W (zero exactly when W lies in span V), and the unitary
// leakage ||D||^2 in the metric G^-1: sum_{r,b} conj(D_rb) (D G^-1)_rb. For a kept basis of tree basis vectors
// this is the plain sum of |W_rj|^2 over the other rows.
struct Outside {
  bool zero = true;
  Scalar leak;
};
Outside outside_part(const Matrix& v, const Matrix& w, const std::vector<bool>* kept_rows) {
  const FieldPtr& f = v.field();
  Outside o{true, Scalar(f)};
  if (kept_rows) {
    for (size_t i = 0; i < w.rows(); ++i)
      if (!(*kept_rows)[i])
        for (size_t j = 0; j < w.cols(); ++j)
          if (!w(i, j).is_zero()) {
            o.zero = false;
            o.leak += w(i, j) * w(i, j).conj();
          }
    return o;
  }
  Matrix vh = v.adjoint();
  Matrix gi = (vh * v).inverse();
  Matrix d = w - v * (gi * (vh * w));
  o.zero = d.is_zero();
  Matrix dg = d * gi;
  for (size_t i = 0; i < d.rows(); ++i)
    for (size_t j = 0; j < d.cols(); ++j) o.leak += d(i, j).conj() * dg(i, j);
  return o;
}

// Rows kept when the columns of v are distinct tree basis vectors; empty otherwise.
std::vector<bool> coordinate_rows(const Matrix& v) {
  std::vector<bool> kept(v.rows(), false);
  for (size_t j = 0; j < v.cols(); ++j) {
    size_t ones = 0, row = 0;
    for (size_t i = 0; i < v.rows(); ++i) {
      if (v(i, j).is_zero()) continue;
      if (!v(i, j).is_one()) return {};
      ++ones;
      row = i;
    }
    if (ones != 1 || kept[row]) return {};
    kept[row] = true;
  }
  return kept;
}

std::string ball128(const Scalar& s) {
  acb_t b;
  acb_init(b);
  s.ball(b, 128);
  std::string out = ball_str(acb_realref(b), 20);
  acb_clear(b);
  return out;
}

// ---- interval re-check

// leakage = tr(G^-1 W*W) - tr(G^-1 W*V G^-1 V*W) for ball columns W (any kept basis V; orthonormal tree basis).
void trace_leakage(arb_t leak, acb_mat_t w, const Matrix& vh, const Matrix& gi, long p) {
  const slong dim = acb_mat_nrows(w), k = acb_mat_ncols(w);
  acb_mat_t wh, vhb, gib, a1, b1, b1h, m1, m2;
  acb_mat_init(wh, k, dim);
  acb_mat_init(vhb, k, dim);
  for (auto* mm : {&gib, &a1, &b1, &b1h, &m1, &m2}) acb_mat_init(*mm, k, k);
  vh.ball(vhb, p);
  gi.ball(gib, p);
  acb_mat_conjugate_transpose(wh, w);
  acb_mat_mul(a1, wh, w, p);
  acb_mat_mul(b1, vhb, w, p);
  acb_mat_conjugate_transpose(b1h, b1);
  acb_t tr1, tr2;
  acb_init(tr1);
  acb_init(tr2);
  acb_mat_mul(m1, gib, a1, p);
  acb_mat_trace(tr1, m1, p);
  acb_mat_mul(m1, gib, b1h, p);
  acb_mat_mul(m2, m1, gib, p);
  acb_mat_mul(m1, m2, b1, p);
  acb_mat_trace(tr2, m1, p);
  acb_sub(tr1, tr1, tr2, p);
  arb_set(leak, acb_realref(tr1));
  acb_clear(tr1);
  acb_clear(tr2);
  for (auto* mm : {&wh, &vhb, &gib, &a1, &b1, &b1h, &m1, &m2}) acb_mat_clear(*mm);
}

// Sum of |W_rj|^2 over the rows r outside the kept tree basis vectors (a coordinate kept space).
void coordinate_leakage(arb_t leak, const acb_mat_t w, const std::vector<bool>& kept_row, long p) {
  arb_t t;
  arb_init(t);
  arb_zero(leak);
  for (slong i = 0; i < acb_mat_nrows(w); ++i) {
    if (kept_row[static_cast<size_t>(i)]) continue;
    for (slong j = 0; j < acb_mat_ncols(w); ++j) {
      acb_srcptr e = acb_mat_entry(w, i, j);
      arb_sqr(t, acb_realref(e), p);
      arb_add(leak, leak, t, p);
      arb_sqr(t, acb_imagref(e), p);
      arb_add(leak, leak, t, p);
    }
  }
  arb_clear(t);
}

// One letter as its nonzero entries, as balls at precision p (plain path) or as their midpoints with
// delta >= ||M - U||_2, the Frobenius norm of the radii (unitary path).
struct BallLetter {
  size_t rows = 0;
  std::vector<std::pair<size_t, size_t>> idx;  // row by row
  std::vector<size_t> row_start;                // entries of row i: idx[row_start[i] .. row_start[i + 1])
  acb_ptr vals = nullptr;
  slong n = 0;
  mag_t delta;
  BallLetter(const Matrix& m, long p, bool midpoints) {
    mag_init(delta);
    rows = m.rows();
    for (size_t i = 0; i < m.rows(); ++i) {
      row_start.push_back(idx.size());
      for (size_t j = 0; j < m.cols(); ++j)
        if (!m(i, j).is_zero()) idx.emplace_back(i, j);
    }
    row_start.push_back(idx.size());
    n = static_cast<slong>(idx.size());
    vals = _acb_vec_init(n);
    mag_t r, d2;
    mag_init(r);
    mag_init(d2);
    for (size_t e = 0; e < idx.size(); ++e) {
      m(idx[e].first, idx[e].second).ball(vals + e, p);
      if (!midpoints) continue;
      // |M_ij - U_ij| <= hypot(rad re, rad im) since U_ij lies in the ball
      mag_hypot(r, arb_radref(acb_realref(vals + e)), arb_radref(acb_imagref(vals + e)));
      mag_addmul(d2, r, r);
      acb_get_mid(vals + e, vals + e);
    }
    mag_sqrt(delta, d2);
    mag_clear(r);
    mag_clear(d2);
  }
  ~BallLetter() {
    _acb_vec_clear(vals, n);
    mag_clear(delta);
  }
  BallLetter(const BallLetter&) = delete;
  BallLetter& operator=(const BallLetter&) = delete;
};

// Plain path: rho(w) V as a left-to-right ball product at precision p (loses about a bit per letter).
void plain_image(acb_mat_t acc, const Matrix& keep, const std::vector<const Matrix*>& seq, long p) {
  const slong k = static_cast<slong>(keep.cols());
  keep.ball(acc, p);
  std::map<const Matrix*, std::unique_ptr<BallLetter>> balls;
  acb_mat_t tmp;
  for (const Matrix* mm : seq) {
    auto it = balls.find(mm);
    if (it == balls.end()) it = balls.emplace(mm, std::make_unique<BallLetter>(*mm, p, false)).first;
    const BallLetter& sb = *it->second;
    acb_mat_init(tmp, static_cast<slong>(sb.rows), k);
    for (size_t e = 0; e < sb.idx.size(); ++e) {
      auto [i, j] = sb.idx[e];
      for (slong c = 0; c < k; ++c)
        acb_addmul(acb_mat_entry(tmp, i, c), sb.vals + e, acb_mat_entry(acc, j, c), p);
    }
    acb_mat_swap(tmp, acc);
    acb_mat_clear(tmp);
  }
}

// Unitary path (every letter matrix U exactly unitary, checked by the caller): the kept columns are carried
// as vectors of floating midpoints (zero radii) v_j with ONE rigorous bound e_j >= ||v_j - v_j^true||_2 each.
// One letter with midpoint matrix M, ||M - U||_2 <= delta: w = M v in ball arithmetic, then
//   ||mid(w) - U v^true|| <= ||mid(w) - M v|| + ||(M - U) v|| + ||U (v - v^true)||
//                         <= ||rad(w)||_2     + delta ||v||_2  + e          (||U||_2 = 1),
// with ||v||_2 <= ||v^true||_2 + e = ||V_j||_2 + e (unitary letters keep the true norm), and the next
// midpoint vector is mid(w). The error grows by about 2^-p per letter instead of doubling.
void unitary_image(acb_mat_t mid, mag_ptr err, const Matrix& keep, const std::vector<const Matrix*>& seq, long p) {
  const size_t dim = keep.rows(), k = keep.cols();
  keep.ball(mid, p);
  std::vector<acb_ptr> cols(k), next(k);
  mag_ptr norm = _mag_vec_init(static_cast<slong>(k));  // norm[c] >= ||V_c||_2
  std::vector<acb_struct> scratch(dim);                 // shallow copies of entries, read only, never cleared
  mag_t t, nv, rw;
  mag_init(t);
  mag_init(nv);
  mag_init(rw);
  for (size_t c = 0; c < k; ++c) {
    cols[c] = _acb_vec_init(static_cast<slong>(dim));
    next[c] = _acb_vec_init(static_cast<slong>(dim));
    mag_zero(err + c);
    for (size_t i = 0; i < dim; ++i) {
      acb_srcptr e = acb_mat_entry(mid, static_cast<slong>(i), static_cast<slong>(c));
      mag_hypot(t, arb_radref(acb_realref(e)), arb_radref(acb_imagref(e)));
      mag_addmul(err + c, t, t);
      acb_get_mag(t, e);  // >= |V_ic| (the exact entry lies in the ball)
      mag_addmul(norm + c, t, t);
      acb_get_mid(cols[c] + i, e);
    }
    mag_sqrt(err + c, err + c);
    mag_sqrt(norm + c, norm + c);
  }
  std::map<const Matrix*, std::unique_ptr<BallLetter>> lets;
  for (const Matrix* mm : seq) {
    auto it = lets.find(mm);
    if (it == lets.end()) it = lets.emplace(mm, std::make_unique<BallLetter>(*mm, p, true)).first;
    const BallLetter& sb = *it->second;
    for (size_t c = 0; c < k; ++c) {
      acb_ptr v = cols[c], w = next[c];
      mag_add(nv, norm + c, err + c);  // >= ||v||_2
      for (size_t i = 0; i < dim; ++i) {
        const size_t a = sb.row_start[i], b = sb.row_start[i + 1];
        for (size_t q = a; q < b; ++q) scratch[q - a] = v[sb.idx[q].second];
        acb_dot(w + i, nullptr, 0, sb.vals + a, 1, scratch.data(), 1, static_cast<slong>(b - a), p);
      }
      mag_zero(rw);
      for (size_t i = 0; i < dim; ++i) {
        mag_ptr re = arb_radref(acb_realref(w + i)), im = arb_radref(acb_imagref(w + i));
        mag_addmul(rw, re, re);
        mag_addmul(rw, im, im);
        mag_zero(re);
        mag_zero(im);
      }
      mag_sqrt(rw, rw);
      mag_addmul(err + c, sb.delta, nv);
      mag_add(err + c, err + c, rw);
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
  mag_clear(t);
  mag_clear(nv);
  mag_clear(rw);
}

// Coordinate kept space from the unitary path: with a_j = ||outside rows of v_j||_2 (enclosed from the
// midpoints), the true outside norm of column j lies in [a_j - e_j, a_j + e_j] intersected with [0, oo), so
// leakage = sum_j (true norm)^2 lies in [sum lo_j^2, sum hi_j^2], rounded outward.
void coordinate_leakage_bounded(arb_t leak, const acb_mat_t mid, mag_srcptr err, const std::vector<bool>& kept_row,
                                long p) {
  arb_t s, t;
  arb_init(s);
  arb_init(t);
  arf_t lo, hi, lo_sum, hi_sum;
  arf_init(lo);
  arf_init(hi);
  arf_init(lo_sum);
  arf_init(hi_sum);
  for (slong j = 0; j < acb_mat_ncols(mid); ++j) {
    arb_zero(s);
    for (slong i = 0; i < acb_mat_nrows(mid); ++i) {
      if (kept_row[static_cast<size_t>(i)]) continue;
      acb_srcptr e = acb_mat_entry(mid, i, j);
      arb_sqr(t, acb_realref(e), p);
      arb_add(s, s, t, p);
      arb_sqr(t, acb_imagref(e), p);
      arb_add(s, s, t, p);
    }
    arb_sqrtpos(s, s, p);  // a sum of squares: its negative part is rounding only
    arb_add_error_mag(s, err + j);
    arb_get_lbound_arf(lo, s, p);
    if (arf_sgn(lo) < 0) arf_zero(lo);
    arb_get_ubound_arf(hi, s, p);
    arf_mul(lo, lo, lo, p, ARF_RND_DOWN);
    arf_mul(hi, hi, hi, p, ARF_RND_UP);
    arf_add(lo_sum, lo_sum, lo, p, ARF_RND_DOWN);
    arf_add(hi_sum, hi_sum, hi, p, ARF_RND_UP);
  }
  arb_set_interval_arf(leak, lo_sum, hi_sum, p);
  arf_clear(lo);
  arf_clear(hi);
  arf_clear(lo_sum);
  arf_clear(hi_sum);
  arb_clear(s);
  arb_clear(t);
}
// ---- Modular re-check (section 7): the letter tables above, the checker's own reduction mod p and propagation,
// its own conjugate enclosures. Shared with the producer: the field (Scalar::ball_at), make_prime (validates a
// prime record), embeddings_up_to_conjugation and order_multiplier (linalg/modular.hpp).

// Image of x at (p, zeta -> w, sqrt(d_j) -> roots[j]); rejects when p divides a denominator.
ulong mod_image(const Scalar& x, const ModularPrime& q, const nmod_t& m) {
  ulong v = 0;
  fmpq_poly_t p;
  fmpq_poly_init(p);
  for (const auto& [mask, c] : x.terms()) {
    c.get_poly(p);
    ulong den = fmpz_fdiv_ui(fmpq_poly_denref(p), m.n), t = 0;
    if (den == 0) {
      fmpq_poly_clear(p);
      reject(fmt::format("prime {} divides a denominator of {}", q.p, c.str()));
    }
    for (long k = fmpq_poly_length(p) - 1; k >= 0; --k)
      t = nmod_add(nmod_mul(t, q.zeta, m), fmpz_fdiv_ui(fmpq_poly_numref(p) + k, m.n), m);
    t = nmod_mul(t, n_invmod(den, m.n), m);
    for (size_t j = 0; j < q.roots.size(); ++j)
      if (mask & (RadicalMask{1} << j)) t = nmod_mul(t, q.roots[j], m);
    v = nmod_add(v, t, m);
  }
  fmpq_poly_clear(p);
  return v;
}

// Image of X = post * rho(w) * start - offset (post, offset may be null), row-major rows(X) x cols(start).
std::vector<ulong> mod_product(const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix* post,
                               const Matrix* offset, const ModularPrime& q) {
  nmod_t m;
  nmod_init(&m, q.p);
  const size_t k = start.cols();
  std::vector<ulong> acc(start.rows() * k), next;
  for (size_t i = 0; i < start.rows(); ++i)
    for (size_t j = 0; j < k; ++j) acc[i * k + j] = mod_image(start(i, j), q, m);
  std::map<const LetterTable*, std::vector<ulong>> values;
  for (const LetterTable* t : w) {
    auto it = values.find(t);
    if (it == values.end()) {
      std::vector<ulong> v;
      for (const auto& e : t->entries) v.push_back(mod_image(e.value, q, m));
      it = values.emplace(t, std::move(v)).first;
    }
    next.assign(t->rows * k, 0);
    for (size_t e = 0; e < t->entries.size(); ++e) {
      const ulong a = it->second[e];
      ulong* dst = &next[t->entries[e].row * k];
      const ulong* src = &acc[t->entries[e].col * k];
      for (size_t j = 0; j < k; ++j) dst[j] = nmod_add(dst[j], nmod_mul(a, src[j], m), m);
    }
    acc.swap(next);
  }
  if (post) {
    next.assign(post->rows() * k, 0);
    for (size_t i = 0; i < post->rows(); ++i)
      for (size_t r = 0; r < post->cols(); ++r) {
        if ((*post)(i, r).is_zero()) continue;
        ulong a = mod_image((*post)(i, r), q, m);
        for (size_t j = 0; j < k; ++j) next[i * k + j] = nmod_add(next[i * k + j], nmod_mul(a, acc[r * k + j], m), m);
      }
    acc.swap(next);
  }
  if (offset)
    for (size_t i = 0; i < offset->rows(); ++i)
      for (size_t j = 0; j < k; ++j) acc[i * k + j] = nmod_sub(acc[i * k + j], mod_image((*offset)(i, j), q, m), m);
  return acc;
}

// Upper bound (mag) of s^[L:Q] * max over entries x of X of prod_sigma |sigma(x)|, s = product of the order
// multipliers of the factors (every letter occurrence counted). Per embedding: the word is cut into blocks of
// `block` letters, each block's conjugate enclosed as a ball matrix (letters applied to the identity), and the
// kept columns are multiplied by the blocks in turn (radii then grow like the blocks' norms).
void mod_norm_bound(mag_t out, const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix* post,
                    const Matrix* offset, long prec) {
  const Field& f = *start.field();
  const slong k = static_cast<slong>(start.cols());
  const size_t block = std::clamp<size_t>(128 * std::max<size_t>(1, start.cols()) / std::max<size_t>(1, start.rows()), 1, 128);
  const slong rows = static_cast<slong>(post ? post->rows() : (w.empty() ? start.rows() : w.back()->rows));
  std::vector<mag_struct> entry(static_cast<size_t>(rows * k));
  for (auto& e : entry) {
    mag_init(&e);
    mag_one(&e);
  }
  mag_t t;
  mag_init(t);
  acb_t o;
  acb_init(o);
  for (const Embedding& e : embeddings_up_to_conjugation(f)) {
    std::map<const LetterTable*, std::vector<acb_struct>> balls;
    auto values = [&](const LetterTable* tb) -> const std::vector<acb_struct>& {
      auto it = balls.find(tb);
      if (it == balls.end()) {
        std::vector<acb_struct> v(tb->entries.size());
        for (size_t n = 0; n < v.size(); ++n) {
          acb_init(&v[n]);
          tb->entries[n].value.ball_at(&v[n], prec, e.a, e.signs);
        }
        it = balls.emplace(tb, std::move(v)).first;
      }
      return it->second;
    };
    // cur (r x c) <- table * cur, sparse
    auto left_apply = [&](acb_mat_t cur, size_t out_rows, const std::vector<SparseEntry>& ent,
                          const std::vector<acb_struct>& val) {
      acb_mat_t nx;
      acb_mat_init(nx, static_cast<slong>(out_rows), acb_mat_ncols(cur));
      for (size_t n = 0; n < ent.size(); ++n)
        for (slong j = 0; j < acb_mat_ncols(cur); ++j)
          acb_addmul(acb_mat_entry(nx, static_cast<slong>(ent[n].row), j), &val[n],
                     acb_mat_entry(cur, static_cast<slong>(ent[n].col), j), prec);
      acb_mat_swap(nx, cur);
      acb_mat_clear(nx);
    };
    acb_mat_t v;
    acb_mat_init(v, static_cast<slong>(start.rows()), k);
    for (size_t i = 0; i < start.rows(); ++i)
      for (slong j = 0; j < k; ++j)
        start(i, static_cast<size_t>(j)).ball_at(acb_mat_entry(v, static_cast<slong>(i), j), prec, e.a, e.signs);
    for (size_t at = 0; at < w.size(); at += block) {
      const size_t end = std::min(w.size(), at + block);
      if (end - at == 1) {
        left_apply(v, w[at]->rows, w[at]->entries, values(w[at]));
        continue;
      }
      acb_mat_t blk, prod;
      acb_mat_init(blk, acb_mat_nrows(v), acb_mat_nrows(v));
      acb_mat_one(blk);
      for (size_t x = at; x < end; ++x) left_apply(blk, w[x]->rows, w[x]->entries, values(w[x]));
      acb_mat_init(prod, acb_mat_nrows(blk), k);
      acb_mat_mul(prod, blk, v, prec);
      acb_mat_swap(prod, v);
      acb_mat_clear(prod);
      acb_mat_clear(blk);
    }
    if (post) {
      std::vector<SparseEntry> pe;
      for (size_t i = 0; i < post->rows(); ++i)
        for (size_t r = 0; r < post->cols(); ++r)
          if (!(*post)(i, r).is_zero()) pe.push_back({i, r, (*post)(i, r)});
      std::vector<acb_struct> pv(pe.size());
      for (size_t n = 0; n < pe.size(); ++n) {
        acb_init(&pv[n]);
        pe[n].value.ball_at(&pv[n], prec, e.a, e.signs);
      }
      left_apply(v, post->rows(), pe, pv);
      for (auto& z : pv) acb_clear(&z);
    }
    for (slong i = 0; i < rows; ++i)
      for (slong j = 0; j < k; ++j) {
        acb_ptr x = acb_mat_entry(v, i, j);
        if (offset) {
          (*offset)(static_cast<size_t>(i), static_cast<size_t>(j)).ball_at(o, prec, e.a, e.signs);
          acb_sub(x, x, o, prec);
        }
        acb_get_mag(t, x);
        for (int r = 0; r < e.weight; ++r) mag_mul(&entry[static_cast<size_t>(i * k + j)], &entry[static_cast<size_t>(i * k + j)], t);
      }
    acb_mat_clear(v);
    for (auto& [tb, vals] : balls)
      for (auto& z : vals) acb_clear(&z);
  }
  acb_clear(o);
  mag_zero(out);
  for (auto& z : entry) {
    mag_max(out, out, &z);
    mag_clear(&z);
  }
  // multiplier
  fmpz_t s, u;
  fmpz_init(s);
  fmpz_init(u);
  order_multiplier(s, start);
  for (const Matrix* mm : {post, offset})
    if (mm) {
      order_multiplier(u, *mm);
      fmpz_mul(s, s, u);
    }
  std::map<const LetterTable*, ulong> count;
  for (const LetterTable* tb : w) ++count[tb];
  for (const auto& [tb, c] : count) {
    fmpz_one(u);
    for (const auto& en : tb->entries) {
      Matrix one(start.field(), 1, 1);
      one(0, 0) = en.value;
      fmpz_t v;
      fmpz_init(v);
      order_multiplier(v, one);
      fmpz_lcm(u, u, v);
      fmpz_clear(v);
    }
    fmpz_pow_ui(u, u, c);
    fmpz_mul(s, s, u);
  }
  mag_set_fmpz(t, s);
  mag_pow_ui(t, t, static_cast<ulong>(f.cyclotomic()->degree()) << f.radicand_count());
  mag_mul(out, out, t);
  fmpz_clear(s);
  fmpz_clear(u);
  mag_clear(t);
}

ModularPrime prime_of(const json& j, const Field& f, const std::string& where) {
  expect_keys(j, {"p", "zeta", "roots"}, where);
  if (!j["p"].is_number_unsigned() || !j["zeta"].is_number_unsigned() || !j["roots"].is_array())
    reject(fmt::format("{}: p, zeta must be non-negative integers and roots an array", where));
  std::vector<ulong> roots;
  for (const auto& r : j["roots"]) {
    if (!r.is_number_unsigned()) reject(fmt::format("{}: roots must be non-negative integers", where));
    roots.push_back(r.get<ulong>());
  }
  ulong p = j["p"].get<ulong>(), z = j["zeta"].get<ulong>();
  for (ulong r : roots)
    if (r >= p) reject(fmt::format("{}: a root is not reduced mod p", where));
  if (z >= p) reject(fmt::format("{}: zeta is not reduced mod p", where));
  try {
    return make_prime(f, p, z, roots);
  } catch (const InputError& e) {
    reject(fmt::format("{}: {}", where, e.what()));
  }
}

// Checks a proof that X = post * rho(w) * start - offset is zero ("norm-bound") or nonzero ("nonzero-image").
// Returns a summary of what was checked.
std::string check_modular_proof(const json& jp, const std::vector<const LetterTable*>& w, const Matrix& start,
                                const Matrix* post, const Matrix* offset, bool claim_zero, long prec) {
  const Field& f = *start.field();
  std::string kind = str_of(jp["kind"], "proof.kind");
  if (!claim_zero) {
    if (kind != "nonzero-image") reject("a leaking verdict by modular images needs proof.kind \"nonzero-image\"");
    expect_keys(jp, {"kind", "prime", "row", "col", "value"}, "proof");
    ModularPrime q = prime_of(jp["prime"], f, "proof.prime");
    size_t row = uint_of(jp["row"], "proof.row"), col = uint_of(jp["col"], "proof.col");
    ulong value = jp["value"].is_number_unsigned() ? jp["value"].get<ulong>() : 0;
    std::vector<ulong> im = mod_product(w, start, post, offset, q);
    const size_t k = start.cols();
    if (col >= k || row * k + col >= im.size()) reject("proof.row/col outside the leak block");
    if (im[row * k + col] == 0) reject(fmt::format("the leak block's entry ({}, {}) vanishes mod {}", row, col, q.p));
    if (im[row * k + col] != value) reject("proof.value is not the image of the stated entry");
    return fmt::format("entry ({}, {}) is {} != 0 mod {}", row, col, value, q.p);
  }
  if (kind != "norm-bound") reject("a zero claim by modular images needs proof.kind \"norm-bound\"");
  expect_keys(jp, {"kind", "multiplier", "norm_bound", "bound_bits", "primes"}, "proof");
  if (!jp["primes"].is_array() || jp["primes"].empty()) reject("proof.primes must be a non-empty array");
  std::set<ulong> seen;
  fmpz_t prod;
  fmpz_init(prod);
  fmpz_one(prod);
  for (size_t i = 0; i < jp["primes"].size(); ++i) {
    ModularPrime q = prime_of(jp["primes"][i], f, fmt::format("proof.primes[{}]", i));
    if (!seen.insert(q.p).second) {
      fmpz_clear(prod);
      reject(fmt::format("proof.primes: {} occurs twice", q.p));
    }
    std::vector<ulong> im = mod_product(w, start, post, offset, q);
    for (ulong v : im)
      if (v) {
        fmpz_clear(prod);
        reject(fmt::format("the image mod {} is not zero", q.p));
      }
    fmpz_mul_ui(prod, prod, q.p);
  }
  mag_t bound, pm;
  mag_init(bound);
  mag_init(pm);
  mod_norm_bound(bound, w, start, post, offset, prec);
  mag_set_fmpz_lower(pm, prod);
  bool enough = mag_cmp(bound, pm) < 0;
  std::string shown = mag_is_zero(bound) ? std::string("0")  // display only
                                          : fmt::format("~2^{}", static_cast<long>(std::ceil(mag_get_d_log2_approx(bound))));
  mag_clear(bound);
  mag_clear(pm);
  fmpz_clear(prod);
  if (!enough) reject("the product of proof.primes does not exceed the checker's norm bound");
  return fmt::format("images vanish at {} primes, product > norm bound {}", seen.size(), shown);
}

// hints.image == rho(w) V by modular images at the checker's own primes: every image of rho(w) V - hint must
// vanish, at primes whose product exceeds the checker's norm bound. Returns a note for the summary.
std::string modular_equal(const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix& hint) {
  const Field& f = *start.field();
  mag_t bound, pm;
  mag_init(bound);
  mag_init(pm);
  mod_norm_bound(bound, w, start, nullptr, &hint, 128);
  fmpz_t prod;
  fmpz_init(prod);
  fmpz_one(prod);
  size_t used = 0, want = 1;
  std::vector<ModularPrime> primes;
  for (;;) {
    mag_set_fmpz_lower(pm, prod);
    if (used > 0 && mag_cmp(bound, pm) < 0) break;
    if (used >= primes.size()) {
      want = std::max<size_t>(2 * want, static_cast<size_t>(std::max(0.0, mag_get_d_log2_approx(bound))) / 61 + 2);
      if (want > 200000) {
        fmpz_clear(prod);
        reject("the norm bound needs more than 200000 primes (use the exact path)");
      }
      primes = choose_primes(f, want, 62);
    }
    const ModularPrime& q = primes[used++];
    for (ulong v : mod_product(w, start, nullptr, &hint, q))
      if (v) {
        fmpz_clear(prod);
        reject(fmt::format("hints.image is not rho(word) applied to the kept basis (differs mod {})", q.p));
      }
    fmpz_mul_ui(prod, prod, q.p);
  }
  long bits = static_cast<long>(std::ceil(mag_get_d_log2_approx(bound)));  // display only
  mag_clear(bound);
  mag_clear(pm);
  fmpz_clear(prod);
  return fmt::format("; image checked mod {} primes (norm bound ~2^{})", used, bits);
}

struct Ctx {
  Model model;
  std::vector<int> anyons;
  int total = 0;
  std::unique_ptr<FusionSpace> space;
  Matrix keep{Field::make(1), 0, 0};
  Word word;
};

VerifyOutcome check(const json& c, const std::string& cert_path, const std::string& model_override,
                    const std::string& via) {
  if (!c.is_object() || !c.contains("version") || !c["version"].is_number_integer() ||
      (c["version"].get<long>() != 1 && c["version"].get<long>() != 2))
    reject("unsupported version (this checker reads versions 1 and 2)");
  const long version = c["version"].get<long>();
  if (version == 1)
    expect_keys(c, {"format", "version", "model", "field", "space", "keep", "word", "claim", "method", "hints"},
                "the certificate");
  else
    expect_keys(c, {"format", "version", "model", "field", "space", "keep", "word", "claim", "method", "hints", "proof"},
                "the certificate");
  if (c["format"] != "zetabraid-certificate") reject("format is not \"zetabraid-certificate\"");
  const json no_proof = json::object();
  const json& jp = version >= 2 ? c["proof"] : no_proof;
  if (version >= 2 && (!jp.is_object() || !jp.contains("kind"))) reject("proof must be an object with a kind");
  // model
  const json& jm = c["model"];
  expect_keys(jm, {"file", "sha256", "name", "unitary"}, "model");
  std::string path = model_override.empty() ? str_of(jm["file"], "model.file") : model_override;
  namespace fs = std::filesystem;
  if (model_override.empty() && !fs::exists(path)) {
    fs::path alt = fs::path(cert_path).parent_path() / path;
    if (fs::exists(alt)) path = alt.string();
  }
  std::string sha;
  try {
    sha = sha256_file(path);
  } catch (const InputError&) {
    reject(fmt::format("model file {} cannot be read", path));
  }
  if (sha != str_of(jm["sha256"], "model.sha256"))
    reject(fmt::format("SHA-256 of {} is {}, the certificate says {}", path, sha, jm["sha256"].dump()));
  Ctx x;
  try {
    x.model = load_model(path);
  } catch (const std::exception& e) {
    reject(fmt::format("model file {} does not load: {}", path, e.what()));
  }
  const Model& m = x.model;
  if (str_of(jm["name"], "model.name") != m.name) reject("model.name differs from the model file");
  if (!jm["unitary"].is_boolean() || jm["unitary"].get<bool>() != m.claims_unitary)
    reject("model.unitary differs from the model file");
  const FieldPtr& f = m.field;
  // field
  const json& jf = c["field"];
  expect_keys(jf, {"conductor", "radicands"}, "field");
  if (uint_of(jf["conductor"], "field.conductor") != f->conductor()) reject("field.conductor differs from the model");
  if (!jf["radicands"].is_array() || jf["radicands"].size() < static_cast<size_t>(f->radicand_count()))
    reject("field.radicands differ from the model");
  const int model_radicands = f->radicand_count();
  for (int j = 0; j < model_radicands; ++j)
    if (str_of(jf["radicands"][static_cast<size_t>(j)], "field.radicands") != f->radicand(j).str())
      reject("field.radicands differ from the model");
  // further radicands come from explicit kept basis vectors: adjoin them in order, each must be new
  for (size_t j = static_cast<size_t>(model_radicands); j < jf["radicands"].size(); ++j) {
    std::string text = str_of(jf["radicands"][j], "field.radicands");
    Scalar d = scalar_of(jf["radicands"][j], f, "field.radicands");
    if (!d.in_base()) reject("field.radicands: a radicand must lie in Q(zeta_N)");
    int before = f->radicand_count();
    try {
      (void)f->sqrt(d.to_base());
    } catch (const std::exception& e) {
      reject(fmt::format("field.radicands: sqrt({}) cannot be adjoined: {}", text, e.what()));
    }
    if (f->radicand_count() != before + 1 || f->radicand(before).str() != text)
      reject(fmt::format("field.radicands: {} is not a new independent radicand", text));
  }
  // space
  const json& js = c["space"];
  expect_keys(js, {"anyons", "total", "dimension", "basis"}, "space");
  if (!js["anyons"].is_array() || js["anyons"].empty()) reject("space.anyons must be a nonempty array");
  for (const auto& a : js["anyons"]) {
    int i = m.label_index(str_of(a, "space.anyons"));
    if (i < 0) reject(fmt::format("space.anyons: unknown label {}", a.dump()));
    x.anyons.push_back(i);
  }
  x.total = m.label_index(str_of(js["total"], "space.total"));
  if (x.total < 0) reject("space.total: unknown label");
  x.space = std::make_unique<FusionSpace>(m, x.anyons, x.total);
  const size_t dim = x.space->dimension();
  if (dim == 0) reject("the fusion space is zero-dimensional");
  if (uint_of(js["dimension"], "space.dimension") != dim)
    reject(fmt::format("space.dimension is {}, the fusion space has dimension {}", js["dimension"].dump(), dim));
  if (!js["basis"].is_array() || js["basis"].size() != dim) reject("space.basis has the wrong length");
  for (size_t i = 0; i < dim; ++i)
    if (str_of(js["basis"][i], "space.basis") != x.space->label(i)) reject(fmt::format("space.basis[{}] differs", i));
  // keep
  const json& jk = c["keep"];
  expect_keys(jk, {"kind", "spec", "dimension", "basis"}, "keep");
  std::string kind = str_of(jk["kind"], "keep.kind");
  if (kind != "vectors" && jf["radicands"].size() != static_cast<size_t>(model_radicands))
    reject("field.radicands: extra radicands are allowed only with explicit kept basis vectors");
  size_t k = uint_of(jk["dimension"], "keep.dimension");
  if (k == 0 || k > dim) reject("keep.dimension out of range");
  Matrix claimed_keep = matrix_of_rows(jk["basis"], k, dim, f, "keep.basis").transpose();
  if (kind == "charges") {
    std::string spec = str_of(jk["spec"], "keep.spec");
    Subspace s{Matrix(f, 0, 0), false, {}};
    try {
      auto groups = parse_keep(m, spec, static_cast<int>(x.anyons.size()));
      if (keep_canonical(m, groups) != spec) reject("keep.spec is not in canonical form");
      s = subspace_from_groups(*x.space, groups);
    } catch (const InputError& e) {
      reject(fmt::format("keep.spec: {}", e.what()));
    }
    if (s.basis != claimed_keep) reject("keep.basis is not the kept basis of keep.spec");
  } else if (kind == "vectors" || kind == "all") {
    RadicalMask used = 0;
    for (size_t i = 0; i < dim; ++i)
      for (size_t j = 0; j < k; ++j)
        for (const auto& [mask, c] : claimed_keep(i, j).terms()) used |= mask;
    for (int r = model_radicands; r < f->radicand_count(); ++r)
      if (!(used & (RadicalMask(1) << r))) reject("field.radicands: a radicand that no kept basis vector uses");
    if (!jk["spec"].is_null()) reject("keep.spec must be null for this kind");
    if (kind == "all" && !claimed_keep.is_identity()) reject("keep.basis of kind \"all\" must be the identity");
    if (claimed_keep.rank() != k) reject("keep.basis vectors are linearly dependent");
  } else {
    reject("keep.kind must be \"charges\", \"vectors\" or \"all\"");
  }
  x.keep = claimed_keep;
  // word
  const json& jw = c["word"];
  expect_keys(jw, {"letters", "length"}, "word");
  std::string letters = str_of(jw["letters"], "word.letters");
  try {
    x.word = parse_word(letters);
    x.word.check_range(static_cast<int>(x.anyons.size()));
  } catch (const std::exception& e) {
    reject(fmt::format("word.letters: {}", e.what()));
  }
  if (x.word.canonical() != letters) reject("word.letters is not in canonical form");
  if (uint_of(jw["length"], "word.length") != x.word.size()) reject("word.length differs from the letters");
  // claim, method, hints
  const json& jc = c["claim"];
  expect_keys(jc, {"verdict", "leakage"}, "claim");
  std::string verdict = str_of(jc["verdict"], "claim.verdict");
  const json& jl = jc["leakage"];
  expect_keys(jl, {"exact", "ball", "upper", "lower"}, "claim.leakage");
  const json& jme = c["method"];
  expect_keys(jme, {"name", "precision_bits"}, "method");
  std::string method = str_of(jme["name"], "method.name");
  size_t prec = uint_of(jme["precision_bits"], "method.precision_bits");
  const json& jh = c["hints"];
  expect_keys(jh, {"image", "action"}, "hints");
  Action act(m, x.total);
  const bool unitary = m.claims_unitary;

  if (method == "modular") {
    if (version < 2) reject("method \"modular\" needs certificate version 2");
    if (verdict != "leak-free" && verdict != "leaks") reject("a modular certificate claims leak-free or leaks");
    for (const char* key : {"exact", "ball", "upper", "lower"})
      if (!jl[key].is_null()) reject("claim.leakage values must be null (modular method)");
    if (!jh["image"].is_null() || !jh["action"].is_null()) reject("a modular certificate carries no hints");
    if (prec < 32 || prec > 4096) reject("method.precision_bits out of range (32..4096)");
    std::map<std::pair<std::vector<int>, int>, LetterTable> store;
    auto tables = letter_tables(act, x.anyons, x.word, &store);
    // The checker's own leak block: rows outside the kept coordinates, or 1 - V G^-1 V^*.
    Matrix post(f, 0, 0);
    std::vector<bool> rows = coordinate_rows(x.keep);
    if (!rows.empty()) {
      size_t out_rows = 0;
      for (bool b : rows) out_rows += !b;
      post = Matrix(f, out_rows, dim);
      for (size_t i = 0, r = 0; i < dim; ++i)
        if (!rows[i]) post(r++, i) = Scalar(f, 1);
    } else {
      Matrix vh = x.keep.adjoint();
      post = Matrix::identity(f, dim) - x.keep * ((vh * x.keep).inverse() * vh);
    }
    std::string what = check_modular_proof(jp, tables, x.keep, &post, nullptr, verdict == "leak-free",
                                           static_cast<long>(prec));
    return {true, "", fmt::format("{} (modular; {} letters, kept {} of {}): {}", verdict, x.word.size(), k, dim, what)};
  }
  if (version >= 2) {
    std::string want = method == "exact" ? "exact-engine" : "interval";
    if (jp["kind"] != want) reject(fmt::format("proof.kind of a{} {} certificate must be \"{}\"",
                                               method == "exact" ? "n" : "n", method, want));
    expect_keys(jp, {"kind"}, "proof");
  }
  if (method == "exact") {
    if (prec != 128) reject("method.precision_bits of an exact certificate must be 128 (the enclosure precision)");
    if (verdict != "leak-free" && verdict != "leaks") reject("an exact certificate claims leak-free or leaks");
    if (!jl["upper"].is_null() || !jl["lower"].is_null()) reject("claim.leakage upper/lower must be null (exact)");
    Matrix hint = matrix_of_rows(jh["image"], dim, k, f, "hints.image");
    std::string via_note;
    if (via == "modular") {
      // hints.image == rho(w) V, proved by images of rho(w) V - hint at the checker's own primes (norm bound).
      std::map<std::pair<std::vector<int>, int>, LetterTable> store;
      auto tables = letter_tables(act, x.anyons, x.word, &store);
      via_note = modular_equal(tables, x.keep, hint);
    } else {
      Matrix w = exact_image(act, x.anyons, x.word, x.keep);
      if (hint != w) reject("hints.image is not rho(word) applied to the kept basis");
    }
    const Matrix& w = hint;
    std::vector<bool> rows = coordinate_rows(x.keep);
    Outside out = outside_part(x.keep, w, rows.empty() ? nullptr : &rows);
    bool leak_free = out.zero;
    std::string truth = leak_free ? "leak-free" : "leaks";
    if (verdict != truth) reject(fmt::format("the claim says {}, but the braid word {}", verdict, truth));
    std::string value = "not available (the model does not claim a unitary gauge)";
    if (unitary) {
      const Scalar& leak = out.leak;
      if (leak_free != leak.is_zero()) reject("internal: leakage and leak-free test disagree");
      if (scalar_of(jl["exact"], f, "claim.leakage.exact") != leak)
        reject(fmt::format("claim.leakage.exact is wrong: the leakage is {}", leak.str()));
      if (str_of(jl["ball"], "claim.leakage.ball") != ball128(leak))
        reject(fmt::format("claim.leakage.ball is wrong: expected {}", ball128(leak)));
      value = fmt::format("leakage = {} = {}", leak.str(), ball128(leak));
    } else if (!jl["exact"].is_null() || !jl["ball"].is_null()) {
      reject("claim.leakage must be null for a model without a unitary gauge");
    }
    // action: leak-free -> V A = W; leaking, unitary -> G A = V* W (compression)
    if (leak_free || unitary) {
      Matrix a = matrix_of_rows(jh["action"], k, k, f, "hints.action");
      bool ok = leak_free ? x.keep * a == w : (x.keep.adjoint() * x.keep) * a == x.keep.adjoint() * w;
      if (!ok) reject("hints.action is not the induced action on the kept space");
    } else if (!jh["action"].is_null()) {
      reject("hints.action must be null");
    }
    return {true, "", fmt::format("{} ({}; {} letters, kept {} of {}), {}{}", verdict, "exact", x.word.size(), k, dim,
                                  value, via_note)};
  }
  if (method != "interval") reject("method.name must be \"exact\" or \"interval\"");
  if (!unitary) reject("an interval certificate needs a model that claims a unitary gauge");
  if (verdict != "leaks" && verdict != "leakage-bounded")
    reject("an interval certificate claims leakage-bounded or leaks (never leak-free)");
  if (!jh["image"].is_null() || !jh["action"].is_null() || !jl["exact"].is_null())
    reject("an interval certificate carries no exact values or hints");
  if (prec < 16 || prec > (1u << 20)) reject("method.precision_bits out of range");
  arb_t upper, lower, claimed_ball, leak, t;
  arb_init(upper);
  arb_init(lower);
  arb_init(claimed_ball);
  arb_init(leak);
  arb_init(t);
  struct Clear {
    arb_ptr a[5];
    ~Clear() {
      for (auto p : a) arb_clear(p);
    }
  } clear{{upper, lower, claimed_ball, leak, t}};
  if (!parse_decimal(upper, str_of(jl["upper"], "claim.leakage.upper"), 256)) reject("claim.leakage.upper malformed");
  if (verdict == "leaks") {
    if (!parse_decimal(lower, str_of(jl["lower"], "claim.leakage.lower"), 256) || !arb_is_positive(lower))
      reject("claim.leakage.lower must be a positive decimal for a leaking verdict");
  } else if (!jl["lower"].is_null()) {
    reject("claim.leakage.lower must be null for leakage-bounded");
  }
  std::string ball_text = str_of(jl["ball"], "claim.leakage.ball");
  if (arb_set_str(claimed_ball, ball_text.c_str(), 256) != 0) reject("claim.leakage.ball malformed");
  {
    // the stated bounds and the verdict must be the ones derived from the stated enclosure
    std::string up, lo;
    bool pos = interval_bounds(ball_text, static_cast<long>(prec), &up, &lo);
    if ((verdict == "leaks") != pos)
      reject(fmt::format("claim.verdict {} does not follow from the enclosure {}", verdict, ball_text));
    if (up != str_of(jl["upper"], "claim.leakage.upper"))
      reject(fmt::format("claim.leakage.upper should be {} (derived from the enclosure)", up));
    if (pos && lo != str_of(jl["lower"], "claim.leakage.lower"))
      reject(fmt::format("claim.leakage.lower should be {} (derived from the enclosure)", lo));
  }
  // own matrices of the letters
  std::map<std::pair<std::vector<int>, int>, Matrix> mats;
  std::vector<const Matrix*> seq;
  {
    std::vector<int> labels = x.anyons;
    for (int l : x.word.expand()) {
      auto key = std::make_pair(labels, l);
      auto it = mats.find(key);
      if (it == mats.end()) it = mats.emplace(key, letter_matrix(act, labels, l)).first;
      seq.push_back(&it->second);
      std::swap(labels[static_cast<size_t>(std::abs(l)) - 1], labels[static_cast<size_t>(std::abs(l))]);
    }
    if (labels != x.anyons) reject("the word does not return the anyons to their order");
  }
  Matrix vh = x.keep.adjoint();
  Matrix gi = (vh * x.keep).inverse();
  // is the kept basis a set of distinct tree basis vectors?
  std::vector<bool> kept_row = coordinate_rows(x.keep);
  const bool coordinate = !kept_row.empty();
  // the error-bound propagation relies on ||U||_2 = 1: every distinct letter matrix is checked exactly
  // (U* U = 1 in the number field); otherwise, or when ZETABRAID_VERIFY_PLAIN is set, the plain ball product
  const char* force_plain = std::getenv("ZETABRAID_VERIFY_PLAIN");
  bool all_unitary = true;
  for (const auto& [key, mm] : mats)
    if (mm.rows() != dim || mm.cols() != dim || !(mm.adjoint() * mm).is_identity()) {
      all_unitary = false;
      break;
    }
  const bool fast = all_unitary && !(force_plain && *force_plain && std::string(force_plain) != "0");
  const long length = static_cast<long>(x.word.size());
  std::string last_problem;
  // 0: confirmed, 1: not at this precision, 2: false (the recomputed enclosure contradicts the claim)
  auto judge = [&](long p) {
    arb_sub(t, upper, leak, p);
    bool up_ok = arb_is_nonnegative(t);
    bool low_ok = true;
    if (verdict == "leaks") {
      arb_sub(t, leak, lower, p);
      low_ok = arb_is_nonnegative(t);
    }
    bool ball_ok = arb_contains(claimed_ball, leak);
    if (up_ok && low_ok && ball_ok) return 0;
    last_problem = !up_ok ? fmt::format("cannot confirm leakage <= {} (recomputed enclosure {})",
                                        str_of(jl["upper"], ""), ball_str(leak, 20))
                   : !low_ok ? fmt::format("cannot confirm leakage >= {} (recomputed enclosure {})",
                                           str_of(jl["lower"], ""), ball_str(leak, 20))
                             : fmt::format("claim.leakage.ball {} does not contain the recomputed enclosure {}",
                                           ball_text, ball_str(leak, 20));
    // a claim that is false at this precision already (disjoint) needs no more precision
    if (verdict == "leaks" && !low_ok) {
      arb_sub(t, leak, lower, p);
      if (arb_is_negative(t)) return 2;
    }
    arb_sub(t, upper, leak, p);
    if (arb_is_negative(t)) return 2;
    return 1;
  };
  auto verified = [&](long p, const char* how) {
    return VerifyOutcome{
        true, "",
        fmt::format("{} ({}; {} letters, kept {} of {}), leakage <= {}{}, re-checked at {} bits ({}; enclosure {})",
                    verdict, "interval", x.word.size(), k, dim, str_of(jl["upper"], ""),
                    verdict == "leaks" ? ", leakage >= " + str_of(jl["lower"], "") : std::string(), p, how,
                    ball_str(leak, 20))};
  };
  if (fast) {
    // midpoints plus one 2-norm error bound per column: the error is about L 2^-p, so the producer's precision
    // plus 2 log2 L + 32 bits suffices for an honest certificate; doubled on failure
    long lg = 0;
    while (lg < 62 && (1L << lg) <= length) ++lg;
    const long p0 = static_cast<long>(prec) + 2 * lg + 32;
    const long cap = std::min<long>(std::max<long>(8 * p0, 2048), 1 << 18);
    for (long p = p0;; p *= 2) {
      acb_mat_t mid;
      acb_mat_init(mid, static_cast<slong>(dim), static_cast<slong>(k));
      mag_ptr err = _mag_vec_init(static_cast<slong>(k));
      unitary_image(mid, err, x.keep, seq, p);
      if (coordinate) {
        coordinate_leakage_bounded(leak, mid, err, kept_row, p);
      } else {
        // |entry error| <= column error: every entry of column j gets radius e_j (real and imaginary parts)
        for (size_t j = 0; j < k; ++j)
          for (size_t i = 0; i < dim; ++i)
            acb_add_error_mag(acb_mat_entry(mid, static_cast<slong>(i), static_cast<slong>(j)), err + j);
        trace_leakage(leak, mid, vh, gi, p);
      }
      _mag_vec_clear(err, static_cast<slong>(k));
      acb_mat_clear(mid);
      int r = judge(p);
      if (r == 0) return verified(p, "unitary letters, one error bound per column");
      if (r == 2 || p >= cap) break;
    }
    reject(last_problem);
  }
  long cap = std::max<long>(static_cast<long>(prec) * 8, 256 + 4 * length);
  cap = std::min<long>(cap, 1 << 18);
  // a plain product loses up to about a bit per letter: start there rather than at the producer's precision
  long start = std::max<long>(static_cast<long>(prec), 64 + length);
  for (long p = std::min(start, cap); p <= cap; p *= 2) {
    acb_mat_t acc;
    acb_mat_init(acc, static_cast<slong>(dim), static_cast<slong>(k));
    plain_image(acc, x.keep, seq, p);
    if (coordinate)
      coordinate_leakage(leak, acc, kept_row, p);
    else
      trace_leakage(leak, acc, vh, gi, p);
    acb_mat_clear(acc);
    int r = judge(p);
    if (r == 0) return verified(p, "plain ball product");
    if (r == 2) break;
  }
  reject(last_problem);
}

}  // namespace

VerifyOutcome verify_certificate(const std::string& cert_path, const std::string& model_override,
                                 const std::string& via) {
  if (via != "exact" && via != "modular") throw InputError("--via must be exact or modular");
  std::string text = read_file_bytes(cert_path);
  json c;
  try {
    c = json::parse(text);
  } catch (const std::exception& e) {
    return {false, fmt::format("not a JSON document: {}", e.what()), ""};
  }
  try {
    return check(c, cert_path, model_override, via);
  } catch (const Reject& r) {
    return {false, r.why, ""};
  } catch (const std::exception& e) {
    return {false, fmt::format("error while checking: {}", e.what()), ""};
  }
}

}  // namespace zb
