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

#include "ball_common.hpp"
#include "zetabraid/detail/parallel.hpp"

namespace zb {

namespace detail {

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

}  // namespace detail

namespace {

using detail::BallLetters;
using detail::BallMat;
using detail::BallPtr;
using detail::ball_letters;
using detail::norm2_bound;

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
  else if (m == BallMethod::kColumnsArb || prec > detail::fixed::kFix || !detail::fixed::product_columns(out, letters, start, prec))
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
