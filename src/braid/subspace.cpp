#include "zetabraid/braid/subspace.hpp"

#include <fmt/format.h>

#include <cctype>
#include <algorithm>
#include <map>
#include <sstream>

#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/field/expression.hpp"

namespace zb {

std::vector<ChargeGroup> parse_keep(const Model& model, const std::string& text, int n) {
  std::vector<ChargeGroup> out;
  size_t p = 0;
  auto fail = [&](size_t at, const std::string& what) -> void {
    throw InputError(fmt::format("column {}: {} in subspace spec (expected groups like \"1-3:t,4-6:t\")", at + 1,
                                 what));
  };
  auto skip = [&] {
    while (p < text.size() && std::isspace(static_cast<unsigned char>(text[p]))) ++p;
  };
  auto number = [&]() -> int {
    skip();
    size_t s = p;
    long v = 0;
    while (p < text.size() && std::isdigit(static_cast<unsigned char>(text[p]))) {
      v = v * 10 + (text[p++] - '0');
      if (v > 100000) fail(s, "position too large");
    }
    if (p == s) fail(s, "expected an anyon position");
    return static_cast<int>(v);
  };
  skip();
  if (p >= text.size()) fail(p, "empty spec");
  while (p < text.size()) {
    ChargeGroup g;
    size_t start = p;
    g.first = number();
    skip();
    g.last = g.first;
    if (p < text.size() && text[p] == '-') {
      ++p;
      g.last = number();
    }
    skip();
    if (p >= text.size() || text[p] != ':') fail(p, "expected ':' before the charge label");
    ++p;
    skip();
    size_t ls = p;
    while (p < text.size() && text[p] != ',' && !std::isspace(static_cast<unsigned char>(text[p]))) ++p;
    std::string lab = text.substr(ls, p - ls);
    if (lab.empty()) fail(ls, "expected a charge label");
    g.charge = model.label_index(lab);
    if (g.charge < 0)
      throw InputError(fmt::format("column {}: unknown charge label '{}' in subspace spec (labels: {})", ls + 1, lab,
                                   fmt::join(model.labels, ", ")));
    if (g.first < 1 || g.last > n || g.first > g.last)
      throw InputError(fmt::format("column {}: group {}-{} is not a range of anyon positions 1..{}", start + 1,
                                   g.first, g.last, n));
    for (const ChargeGroup& h : out)
      if (!(g.last < h.first || h.last < g.first))
        throw InputError(fmt::format("column {}: group {}-{} overlaps group {}-{}", start + 1, g.first, g.last,
                                     h.first, h.last));
    out.push_back(g);
    skip();
    if (p < text.size()) {
      if (text[p] != ',') fail(p, fmt::format("unexpected character '{}'", text[p]));
      ++p;
      skip();
      if (p >= text.size()) fail(p, "expected a group after ','");
    }
  }
  return out;
}

std::string keep_canonical(const Model& model, const std::vector<ChargeGroup>& groups) {
  std::string s;
  for (size_t i = 0; i < groups.size(); ++i) {
    const auto& g = groups[i];
    s += (i ? "," : "") + (g.first == g.last ? std::to_string(g.first)
                                             : std::to_string(g.first) + "-" + std::to_string(g.last)) +
         ":" + model.labels[static_cast<size_t>(g.charge)];
  }
  return s;
}

Matrix SparseMatrix::dense(const FieldPtr& f) const {
  Matrix m(f, n, n);
  for (size_t j = 0; j < cols.size(); ++j)
    for (const auto& [i, v] : cols[j]) m(i, j) = v;
  return m;
}

namespace {

// Projector on V(u, a_i..a_j; v) onto "anyons 2..m+1 have total charge c" (dense, small).
Matrix inner_projector(const Model& model, int u, const std::vector<int>& block, int v, int c) {
  std::vector<int> labels;
  labels.push_back(u);
  labels.insert(labels.end(), block.begin(), block.end());
  BraidGenerators gens(model, v);
  const FusionSpace& w = gens.space(labels);
  const size_t m = block.size();
  std::vector<int> up;
  for (size_t k = 1; k <= m; ++k) up.push_back(static_cast<int>(k));
  const Word beta = Word::from_letters(up);
  std::vector<int> end;
  std::vector<const Matrix*> fwd = gens.letters(labels, beta, &end);
  const FusionSpace& w2 = gens.space(end);
  Matrix q(model.field, w2.dimension(), w2.dimension());
  for (size_t r = 0; r < w2.dimension(); ++r)
    if (w2.tree(r)[m - 1] == c) q(r, r) = Scalar(model.field, 1);
  std::vector<const Matrix*> back = gens.letters(end, beta.inverse());
  // a product of at most 2m+1 small matrices, multiplied plainly (no word_product here, so that the
  // independent checker, which recomputes kept bases through this code, shares no product routine)
  Matrix p = Matrix::identity(model.field, w.dimension());
  for (const Matrix* g : fwd) p = *g * p;
  p = q * p;
  for (const Matrix* g : back) p = *g * p;
  return p;
}

SparseMatrix multiply(const SparseMatrix& a, const SparseMatrix& b, const FieldPtr& f) {
  SparseMatrix c;
  c.n = a.n;
  c.cols.resize(b.cols.size());
  for (size_t j = 0; j < b.cols.size(); ++j) {
    std::map<size_t, Scalar> acc;
    for (const auto& [k, bv] : b.cols[j])
      for (const auto& [i, av] : a.cols[k]) {
        auto it = acc.find(i);
        if (it == acc.end())
          acc.emplace(i, av * bv);
        else
          it->second += av * bv;
      }
    for (auto& [i, v] : acc)
      if (!v.is_zero()) c.cols[j].emplace_back(i, std::move(v));
  }
  (void)f;
  return c;
}

}  // namespace

SparseMatrix charge_projector(const FusionSpace& space, const ChargeGroup& g) {
  const Model& model = space.model();
  const size_t dim = space.dimension();
  SparseMatrix p;
  p.n = dim;
  p.cols.resize(dim);
  const size_t i = static_cast<size_t>(g.first), j = static_cast<size_t>(g.last);
  if (i == 1) {
    for (size_t k = 0; k < dim; ++k)
      if (space.tree(k)[j - 1] == g.charge) p.cols[k].emplace_back(k, Scalar(model.field, 1));
    return p;
  }
  std::vector<int> block(space.anyons().begin() + static_cast<long>(i) - 1,
                         space.anyons().begin() + static_cast<long>(j));
  std::map<std::pair<int, int>, std::pair<std::unique_ptr<FusionSpace>, Matrix>> inner;
  for (size_t k = 0; k < dim; ++k) {
    const std::vector<int>& t = space.tree(k);
    int u = t[i - 2], v = t[j - 1];
    auto key = std::make_pair(u, v);
    auto it = inner.find(key);
    if (it == inner.end()) {
      std::vector<int> labels{u};
      labels.insert(labels.end(), block.begin(), block.end());
      auto ws = std::make_unique<FusionSpace>(model, labels, v);
      Matrix pr = inner_projector(model, u, block, v, g.charge);
      it = inner.emplace(key, std::make_pair(std::move(ws), std::move(pr))).first;
    }
    const FusionSpace& w = *it->second.first;
    const Matrix& pr = it->second.second;
    // inner tree of k: (u, x_i, ..., x_{j-1}, v)
    std::vector<int> it_tree(t.begin() + static_cast<long>(i) - 2, t.begin() + static_cast<long>(j));
    long col = w.index_of(it_tree);
    if (col < 0) throw InternalError("inner tree missing");
    std::vector<int> nt = t;
    for (size_t r = 0; r < w.dimension(); ++r) {
      const Scalar& val = pr(r, static_cast<size_t>(col));
      if (val.is_zero()) continue;
      const std::vector<int>& rt = w.tree(r);
      for (size_t q = 0; q < rt.size(); ++q) nt[i - 2 + q] = rt[q];
      long row = space.index_of(nt);
      if (row < 0) throw InternalError("projected tree missing");
      p.cols[k].emplace_back(static_cast<size_t>(row), val);
    }
    std::sort(p.cols[k].begin(), p.cols[k].end(), [](const auto& a, const auto& b) { return a.first < b.first; });
  }
  return p;
}

Subspace whole_space(const FusionSpace& space) {
  Subspace s{Matrix::identity(space.model().field, space.dimension()), true, {}};
  for (size_t k = 0; k < space.dimension(); ++k) s.coordinates.push_back(k);
  return s;
}

namespace {

// Picks a maximal set of independent columns (exact elimination); returns their indices.
std::vector<size_t> independent_columns(const Matrix& m) {
  const size_t r = m.rows();
  std::vector<std::vector<Scalar>> echelon;  // reduced vectors
  std::vector<size_t> pivots, chosen;
  for (size_t j = 0; j < m.cols(); ++j) {
    std::vector<Scalar> v(r, Scalar(m.field()));
    bool any = false;
    for (size_t i = 0; i < r; ++i) {
      v[i] = m(i, j);
      any = any || !v[i].is_zero();
    }
    if (!any) continue;
    for (size_t e = 0; e < echelon.size(); ++e) {
      const Scalar& c = v[pivots[e]];
      if (c.is_zero()) continue;
      Scalar f = c;  // echelon rows are normalised to 1 at the pivot
      for (size_t i = 0; i < r; ++i)
        if (!echelon[e][i].is_zero()) v[i] -= f * echelon[e][i];
    }
    size_t piv = r;
    for (size_t i = 0; i < r; ++i)
      if (!v[i].is_zero()) { piv = i; break; }
    if (piv == r) continue;
    Scalar inv = v[piv].inverse();
    for (auto& x : v)
      if (!x.is_zero()) x *= inv;
    echelon.push_back(std::move(v));
    pivots.push_back(piv);
    chosen.push_back(j);
  }
  return chosen;
}

}  // namespace

Subspace subspace_from_groups(const FusionSpace& space, const std::vector<ChargeGroup>& groups) {
  const FieldPtr& f = space.model().field;
  const size_t dim = space.dimension();
  SparseMatrix p;
  p.n = dim;
  p.cols.resize(dim);
  for (size_t k = 0; k < dim; ++k) p.cols[k].emplace_back(k, Scalar(f, 1));
  for (const ChargeGroup& g : groups) p = multiply(charge_projector(space, g), p, f);
  bool diagonal = true;
  std::vector<size_t> coords;
  for (size_t k = 0; k < dim && diagonal; ++k) {
    if (p.cols[k].empty()) continue;
    if (p.cols[k].size() == 1 && p.cols[k][0].first == k && p.cols[k][0].second.is_one())
      coords.push_back(k);
    else
      diagonal = false;
  }
  Subspace s{Matrix(f, dim, 0), false, {}};
  if (diagonal) {
    s.coordinate = true;
    s.coordinates = coords;
    Matrix b(f, dim, coords.size());
    for (size_t j = 0; j < coords.size(); ++j) b(coords[j], j) = Scalar(f, 1);
    s.basis = std::move(b);
  } else {
    Matrix pd = p.dense(f);
    s.basis = pd.columns(independent_columns(pd));
  }
  if (s.kept() == 0)
    throw InputError(fmt::format("the subspace \"{}\" of V({}; {}) is zero-dimensional",
                                 keep_canonical(space.model(), groups), label_names(space.model(), space.anyons()),
                                 space.model().labels[static_cast<size_t>(space.total())]));
  return s;
}

Subspace subspace_from_text(const FusionSpace& space, const std::string& text, const std::string& name) {
  const FieldPtr& f = space.model().field;
  const size_t dim = space.dimension();
  std::vector<std::vector<Scalar>> vecs;
  std::istringstream in(text);
  std::string line;
  size_t lineno = 0;
  while (std::getline(in, line)) {
    ++lineno;
    auto hash = line.find('#');
    if (hash != std::string::npos) line.erase(hash);
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    std::vector<Scalar> v;
    size_t p = 0;
    while (true) {
      size_t q = line.find(',', p);
      std::string tok = line.substr(p, q == std::string::npos ? std::string::npos : q - p);
      if (tok.find_first_not_of(" \t\r") == std::string::npos)
        throw InputError(fmt::format("{}:{}: column {}: empty entry (expected exact expressions separated by ',')",
                                     printable(name), lineno, p + 1));
      try {
        v.push_back(parse_expression(tok, f));
      } catch (const ExpressionError& e) {
        throw InputError(fmt::format("{}:{}: column {}: {}", printable(name), lineno, p + e.column(), e.message()));
      }
      if (q == std::string::npos) break;
      p = q + 1;
    }
    if (v.size() != dim)
      throw InputError(fmt::format("{}:{}: vector has {} entries, the fusion space has dimension {}", printable(name), lineno,
                                   v.size(), dim));
    vecs.push_back(std::move(v));
  }
  if (vecs.empty()) throw InputError(fmt::format("{}: no basis vectors", printable(name)));
  Matrix b(f, dim, vecs.size());
  for (size_t j = 0; j < vecs.size(); ++j)
    for (size_t i = 0; i < dim; ++i) b(i, j) = vecs[j][i];
  if (b.rank() != vecs.size())
    throw InputError(fmt::format("{}: the {} basis vectors are linearly dependent", printable(name), vecs.size()));
  Subspace s{std::move(b), false, {}};
  return s;
}

}  // namespace zb
