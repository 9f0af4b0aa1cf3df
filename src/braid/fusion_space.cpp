#include "zetabraid/braid/fusion_space.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>

#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"

namespace zb {

FusionSpace::FusionSpace(const Model& model, std::vector<int> anyons, int total)
    : model_(&model), anyons_(std::move(anyons)), total_(total) {
  const int nl = model.label_count();
  const size_t n = anyons_.size();
  if (n == 0) throw InputError("a fusion space needs at least one anyon");
  if (n > kMaxAnyons)
    throw ResourceError(fmt::format("{} anyons exceed the limit of {} anyons in a fusion space", n, kMaxAnyons));
  for (int a : anyons_)
    if (a < 0 || a >= nl) throw InputError("anyon label index out of range");
  if (total < 0 || total >= nl) throw InputError("total charge label index out of range");
  // reach[k][x]: charge x after k+1 anyons can still end at `total`.
  std::vector<std::vector<char>> reach(n, std::vector<char>(static_cast<size_t>(nl), 0));
  reach[n - 1][static_cast<size_t>(total)] = 1;
  for (size_t k = n - 1; k-- > 0;)
    for (int x = 0; x < nl; ++x)
      for (int y = 0; y < nl; ++y)
        if (reach[k + 1][static_cast<size_t>(y)] && model.fusion(x, anyons_[k + 1], y) > 0) {
          reach[k][static_cast<size_t>(x)] = 1;
          break;
        }
  for (int x = 0; x < nl; ++x)
    for (int y = 0; y < nl; ++y)
      for (int a : anyons_)
        if (model.fusion(x, a, y) > 1)
          throw InputError(fmt::format("fusion multiplicity N_{{{} {}}}^{} = {} > 1 is not supported yet",
                                       model.labels[x], model.labels[a], model.labels[y], model.fusion(x, a, y)));
  if (!reach[0][static_cast<size_t>(anyons_[0])]) return;
  // The dimension, counted (saturating) before any basis vector is stored: paths[x] = number of trees of the
  // first k+1 anyons ending in charge x that can still reach `total`.
  {
    std::vector<size_t> paths(static_cast<size_t>(nl), 0), nxt(static_cast<size_t>(nl), 0);
    paths[static_cast<size_t>(anyons_[0])] = 1;
    for (size_t k = 1; k < n; ++k) {
      std::fill(nxt.begin(), nxt.end(), 0);
      for (int x = 0; x < nl; ++x) {
        if (paths[static_cast<size_t>(x)] == 0) continue;
        for (int y = 0; y < nl; ++y)
          if (reach[k][static_cast<size_t>(y)] && model.fusion(x, anyons_[k], y) > 0)
            nxt[static_cast<size_t>(y)] =
                std::min(nxt[static_cast<size_t>(y)] + paths[static_cast<size_t>(x)], kMaxDimension + 1);
      }
      paths.swap(nxt);
    }
    if (paths[static_cast<size_t>(total)] > kMaxDimension)
      throw ResourceError(fmt::format("fusion space dimension exceeds {} (limit of exact fusion spaces)", kMaxDimension));
  }
  std::vector<int> cur(n);
  cur[0] = anyons_[0];
  // depth-first enumeration in lexicographic order
  std::vector<int> next(n, 0);
  size_t k = 1;
  if (n == 1) {
    if (anyons_[0] == total) {
      basis_.push_back(cur);
      index_[cur] = 0;
    }
    return;
  }
  next[1] = 0;
  while (true) {
    if (next[k] >= nl) {
      if (k == 1) break;
      --k;
      ++next[k];
      continue;
    }
    int y = next[k];
    if (model.fusion(cur[k - 1], anyons_[k], y) > 0 && reach[k][static_cast<size_t>(y)]) {
      cur[k] = y;
      if (k == n - 1) {
        if (basis_.size() >= kMaxDimension)
          throw ResourceError(fmt::format("fusion space dimension exceeds {}", kMaxDimension));
        index_[cur] = basis_.size();
        basis_.push_back(cur);
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

long FusionSpace::index_of(const std::vector<int>& tree) const {
  auto it = index_.find(tree);
  return it == index_.end() ? -1 : static_cast<long>(it->second);
}

std::string FusionSpace::label(size_t i) const {
  std::string s = "(";
  const auto& t = basis_.at(i);
  for (size_t k = 0; k < t.size(); ++k) s += (k ? "," : "") + model_->labels[static_cast<size_t>(t[k])];
  return s + ")";
}

void FusionSpace::require_nonzero() const {
  if (!basis_.empty()) return;
  // which totals are possible?
  std::vector<std::string> possible;
  for (int c = 0; c < model_->label_count(); ++c)
    if (c != total_ && FusionSpace(*model_, anyons_, c).dimension() > 0) possible.push_back(model_->labels[c]);
  throw InputError(fmt::format("the anyons {} have no fusion tree with total charge {} (the space is zero-"
                               "dimensional); possible total charges: {}",
                               label_names(*model_, anyons_), model_->labels[total_],
                               possible.empty() ? std::string("none") : fmt::format("{}", fmt::join(possible, ", "))));
}

std::string label_names(const Model& model, const std::vector<int>& labels) {
  std::string s;
  for (size_t i = 0; i < labels.size(); ++i) s += (i ? " " : "") + model.labels.at(static_cast<size_t>(labels[i]));
  return s;
}

int parse_label(const Model& model, const std::string& text, const std::string& what) {
  int i = model.label_index(text);
  if (i < 0)
    throw InputError(fmt::format("unknown {} '{}' (labels of model {}: {})", what, text, model.name,
                                 fmt::join(model.labels, ", ")));
  return i;
}

std::vector<int> parse_anyons(const Model& model, const std::string& text) {
  std::vector<int> out;
  size_t p = 0;
  int pos = 0;
  while (p < text.size()) {
    while (p < text.size() && (std::isspace(static_cast<unsigned char>(text[p])) || text[p] == ',')) ++p;
    if (p >= text.size()) break;
    size_t q = p;
    while (q < text.size() && !(std::isspace(static_cast<unsigned char>(text[q])) || text[q] == ',')) ++q;
    ++pos;
    std::string tok = text.substr(p, q - p);
    int i = model.label_index(tok);
    if (i < 0)
      throw InputError(fmt::format("anyon {} (column {}): unknown label '{}' (labels of model {}: {})", pos, p + 1,
                                   printable(tok), printable(model.name), printable(fmt::format("{}", fmt::join(model.labels, ", ")))));
    out.push_back(i);
    p = q;
  }
  if (out.empty()) throw InputError("no anyons given (expected labels separated by blanks, e.g. \"t t t\")");
  return out;
}

long FMatrix::row_of(int e) const {
  for (size_t i = 0; i < rows.size(); ++i)
    if (rows[i] == e) return static_cast<long>(i);
  return -1;
}
long FMatrix::col_of(int f) const {
  for (size_t i = 0; i < cols.size(); ++i)
    if (cols[i] == f) return static_cast<long>(i);
  return -1;
}

const FMatrix& FMatrixCache::get(int a, int b, int c, int d) {
  std::array<int, 4> key{a, b, c, d};
  auto it = cache_.find(key);
  if (it != cache_.end()) return it->second;
  const Model& m = *m_;
  std::vector<int> rows, cols;
  for (int e = 0; e < m.label_count(); ++e)
    if (m.fusion(a, b, e) > 0 && m.fusion(e, c, d) > 0) rows.push_back(e);
  for (int f = 0; f < m.label_count(); ++f)
    if (m.fusion(b, c, f) > 0 && m.fusion(a, f, d) > 0) cols.push_back(f);
  if (rows.size() != cols.size() || rows.empty())
    throw MathError(fmt::format("F^{{{} {} {}}}_{} is not a nonempty square matrix ({} x {})", m.labels[a],
                                m.labels[b], m.labels[c], m.labels[d], rows.size(), cols.size()));
  Matrix v(m.field, rows.size(), cols.size());
  for (size_t i = 0; i < rows.size(); ++i)
    for (size_t j = 0; j < cols.size(); ++j)
      if (const Scalar* s = m.f_symbol(a, b, c, d, rows[i], cols[j])) v(i, j) = *s;
  Matrix inv(m.field, 1, 1);
  try {
    inv = v.inverse();
  } catch (const MathError&) {
    throw MathError(fmt::format("F^{{{} {} {}}}_{} is singular", m.labels[a], m.labels[b], m.labels[c], m.labels[d]));
  }
  auto [pos, ok] = cache_.emplace(key, FMatrix{rows, cols, std::move(v), std::move(inv)});
  (void)ok;
  return pos->second;
}

}  // namespace zb
