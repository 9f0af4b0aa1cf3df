// The checker's own fusion trees and braid letters, rebuilt from the fusion rules, F- and R-symbols alone
// (docs/certificate-format.md sections 2 and 3): no generator matrices or products of the producer.
#include <fmt/format.h>

#include <cstdlib>

#include "checker.hpp"
#include "zetabraid/error.hpp"

namespace zb::checker {

Trees::Trees(const Model& m, const std::vector<int>& anyons, int total) {
  const size_t n = anyons.size();
  const int nl = m.label_count();
  for (int a : anyons)
    for (int x = 0; x < nl; ++x)
      for (int y = 0; y < nl; ++y)
        if (m.fusion(x, a, y) > 1) reject("the model has a fusion multiplicity > 1 (not supported by this format)");
  // reach[k][y]: charge y after anyons 1..k+1 can still end at `total` (prunes dead branches)
  std::vector<std::vector<char>> reach(n, std::vector<char>(static_cast<size_t>(nl), 0));
  reach[n - 1][static_cast<size_t>(total)] = 1;
  for (size_t k = n - 1; k-- > 0;)
    for (int x = 0; x < nl; ++x)
      for (int y = 0; y < nl; ++y)
        if (reach[k + 1][static_cast<size_t>(y)] && m.fusion(x, anyons[k + 1], y) > 0) reach[k][static_cast<size_t>(x)] = 1;
  // depth-first, labels ascending: lexicographic order of (x_2, ..., x_{n-1}); x_1 = a_1, x_n = total
  std::vector<int> t(n, 0);
  t[0] = anyons[0];
  std::vector<int> next(n, 0);
  size_t k = 1;
  if (n > 1 && !reach[0][static_cast<size_t>(anyons[0])]) return;
  if (n == 1) {
    if (anyons[0] == total) trees_.push_back(t);
  } else {
    for (;;) {
      if (next[k] >= nl) {
        if (k == 1) break;
        next[k] = 0;
        --k;
        ++next[k];
        continue;
      }
      const int y = next[k];
      if (m.fusion(t[k - 1], anyons[k], y) > 0 && reach[k][static_cast<size_t>(y)]) {
        t[k] = y;
        if (k == n - 1) {
          if (trees_.size() >= kMaxDimension)
            throw ResourceError(fmt::format("fusion space larger than the checker's limit {}", kMaxDimension));
          trees_.push_back(t);
          ++next[k];
        } else {
          ++k;
          next[k] = 0;
        }
      } else {
        ++next[k];
      }
    }
  }
  for (size_t i = 0; i < trees_.size(); ++i) index_.emplace(trees_[i], i);
}

long Trees::index_of(const std::vector<int>& t) const {
  auto it = index_.find(t);
  return it == index_.end() ? -1 : static_cast<long>(it->second);
}

std::string Trees::label(const Model& m, size_t i) const {
  std::string s = "(";
  for (size_t k = 0; k < trees_[i].size(); ++k) s += (k ? "," : "") + m.labels[static_cast<size_t>(trees_[i][k])];
  return s + ")";
}

size_t count_trees(const Model& m, const std::vector<int>& labels, int total) {
  // ways[x] = number of trees of the first anyons with charge x (capped: only compared with small numbers)
  const size_t nl = static_cast<size_t>(m.label_count());
  std::vector<size_t> ways(nl, 0), next(nl);
  ways[static_cast<size_t>(labels[0])] = 1;
  for (size_t k = 1; k < labels.size(); ++k) {
    std::fill(next.begin(), next.end(), 0);
    for (size_t x = 0; x < nl; ++x)
      if (ways[x])
        for (size_t y = 0; y < nl; ++y) {
          const int n = m.fusion(static_cast<int>(x), labels[k], static_cast<int>(y));
          if (n > 0) next[y] = std::min<size_t>(next[y] + ways[x] * static_cast<size_t>(n), size_t(1) << 40);
        }
    ways.swap(next);
  }
  return ways[static_cast<size_t>(total)];
}

Matrix LetterTable::dense(const FieldPtr& f) const {
  Matrix m(f, rows, cols);
  for (const Entry& e : entries) m(e.row, e.col) = e.value;
  return m;
}

// F^{abc}_d restricted to admissible channels (rows e: a b -> e, e c -> d; columns f: b c -> f, a f -> d), with
// its inverse.
struct Action::Local {
  std::vector<int> rows, cols;
  Matrix f, finv;
};

Action::Action(const Model& m, int total) : m_(m), total_(total) {}
Action::~Action() = default;

const Trees& Action::trees(const std::vector<int>& labels) {
  auto it = spaces_.find(labels);
  if (it == spaces_.end()) it = spaces_.emplace(labels, std::make_unique<Trees>(m_, labels, total_)).first;
  return *it->second;
}

const Action::Local& Action::local(int a, int b, int c, int d) {
  std::array<int, 4> key{a, b, c, d};
  auto it = locals_.find(key);
  if (it != locals_.end()) return *it->second;
  auto l = std::make_unique<Local>(Local{{}, {}, Matrix(m_.field, 0, 0), Matrix(m_.field, 0, 0)});
  for (int e = 0; e < m_.label_count(); ++e)
    if (m_.fusion(a, b, e) > 0 && m_.fusion(e, c, d) > 0) l->rows.push_back(e);
  for (int f = 0; f < m_.label_count(); ++f)
    if (m_.fusion(b, c, f) > 0 && m_.fusion(a, f, d) > 0) l->cols.push_back(f);
  if (l->rows.size() != l->cols.size()) reject("the model has a non-square F-matrix");
  l->f = Matrix(m_.field, l->rows.size(), l->cols.size());
  for (size_t x = 0; x < l->rows.size(); ++x)
    for (size_t y = 0; y < l->cols.size(); ++y)
      if (const Scalar* s = m_.f_symbol(a, b, c, d, l->rows[x], l->cols[y])) l->f(x, y) = *s;
  if (l->f.rank() != l->rows.size()) reject("the model has a singular F-matrix");
  l->finv = l->f.inverse();
  return *locals_.emplace(key, std::move(l)).first->second;
}

Scalar Action::rsym(int a, int b, int c) const {
  const Scalar* r = m_.r_symbol(a, b, c);
  if (!r || r->is_zero()) reject(fmt::format("model lacks R^{{{} {}}}_{}", m_.labels[a], m_.labels[b], m_.labels[c]));
  return *r;
}

// sigma_k^{+-1} applied to basis vector s of V(labels): F-move, R, inverse F-move (section 3).
std::vector<Scalar> Action::apply(const std::vector<int>& labels, int k, size_t s) {
  const size_t i = static_cast<size_t>(std::abs(k));
  std::vector<int> to_labels = labels;
  std::swap(to_labels[i - 1], to_labels[i]);
  const Trees& to = trees(to_labels);
  std::vector<Scalar> out(to.dimension(), Scalar(m_.field));
  const int b = labels[i - 1], c = labels[i];
  std::vector<int> t = trees(labels).tree(s);
  t[0] = to_labels[0];
  if (i == 1) {
    long row = to.index_of(t);
    if (row < 0) reject("internal: image tree missing");
    out[static_cast<size_t>(row)] = k > 0 ? rsym(b, c, t[1]) : rsym(c, b, t[1]).inverse();
    return out;
  }
  const int u = t[i - 2], e = t[i - 1], d = t[i];
  // sum over f of F^{u b c}_d[e,f] R^{bc}_f (F^{u c b}_d)^{-1}[f,e']
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
    Scalar coeff = f1.f(er, fj) * (k > 0 ? rsym(b, c, f) : rsym(c, b, f).inverse());
    for (size_t ep = 0; ep < f2.rows.size(); ++ep) {
      const Scalar& z = f2.finv(fi, ep);
      if (z.is_zero()) continue;
      t[i - 1] = f2.rows[ep];
      long row = to.index_of(t);
      if (row < 0) reject("internal: image tree missing");
      out[static_cast<size_t>(row)] += coeff * z;
    }
  }
  return out;
}

LetterTable Action::letter(const std::vector<int>& labels, int k) {
  const Trees& from = trees(labels);
  LetterTable t;
  t.cols = from.dimension();
  for (size_t s = 0; s < from.dimension(); ++s) {
    std::vector<Scalar> col = apply(labels, k, s);
    t.rows = col.size();
    for (size_t r = 0; r < col.size(); ++r)
      if (!col[r].is_zero()) t.entries.push_back({r, s, std::move(col[r])});
  }
  if (from.dimension() == 0) {
    std::vector<int> to = labels;
    const size_t i = static_cast<size_t>(std::abs(k));
    std::swap(to[i - 1], to[i]);
    t.rows = trees(to).dimension();
  }
  return t;
}

Letters Action::tabulate(const std::vector<int>& anyons, const std::vector<int>& word) {
  Letters out;
  std::map<std::pair<std::vector<int>, int>, const LetterTable*> seen;
  std::vector<int> labels = anyons;
  for (int l : word) {
    const size_t i = static_cast<size_t>(std::abs(l));
    if (l == 0 || i >= labels.size()) reject(fmt::format("generator {} outside 1..{}", l, labels.size() - 1));
    auto key = std::make_pair(labels, l);
    auto it = seen.find(key);
    if (it == seen.end()) {
      out.distinct.push_back(std::make_unique<LetterTable>(letter(labels, l)));
      it = seen.emplace(key, out.distinct.back().get()).first;
    }
    out.sequence.push_back(it->second);
    std::swap(labels[i - 1], labels[i]);
  }
  out.end_labels = labels;
  return out;
}

Matrix apply_letters(const std::vector<const LetterTable*>& seq, const Matrix& v) {
  const FieldPtr& f = v.field();
  std::vector<std::vector<Scalar>> cols(v.cols(), std::vector<Scalar>(v.rows(), Scalar(f)));
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < v.rows(); ++i) cols[j][i] = v(i, j);
  for (const LetterTable* t : seq)
    for (auto& col : cols) {
      std::vector<Scalar> next(t->rows, Scalar(f));
      for (const LetterTable::Entry& e : t->entries)
        if (!col[e.col].is_zero()) next[e.row] += e.value * col[e.col];
      col = std::move(next);
    }
  const size_t rows = seq.empty() ? v.rows() : seq.back()->rows;
  Matrix out(f, rows, v.cols());
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < rows; ++i) out(i, j) = cols[j][i];
  return out;
}

}  // namespace zb::checker
