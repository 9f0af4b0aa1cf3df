#include "zetabraid/braid/generators.hpp"

#include <fmt/format.h>

#include <cstdlib>

#include "zetabraid/error.hpp"

namespace zb {

BraidGenerators::BraidGenerators(const Model& model, int total) : model_(&model), total_(total), fcache_(model) {
  if (!model.has_r)
    throw InputError(fmt::format("model {} has no R-symbols: braid generators need them", model.name));
}

const FusionSpace& BraidGenerators::space(const std::vector<int>& anyons) {
  auto it = spaces_.find(anyons);
  if (it != spaces_.end()) return *it->second;
  auto sp = std::make_unique<FusionSpace>(*model_, anyons, total_);
  const FusionSpace& ref = *sp;
  spaces_.emplace(anyons, std::move(sp));
  return ref;
}

std::vector<int> BraidGenerators::swapped(std::vector<int> anyons, int k) {
  size_t i = static_cast<size_t>(std::abs(k));
  std::swap(anyons.at(i - 1), anyons.at(i));
  return anyons;
}

const Matrix& BraidGenerators::matrix(const std::vector<int>& anyons, int k) {
  int n = static_cast<int>(anyons.size());
  if (k == 0 || std::abs(k) > n - 1)
    throw InputError(fmt::format("generator s{} out of range: {} anyons have generators s1..s{}", std::abs(k), n,
                                 n - 1));
  auto key = std::make_pair(anyons, k);
  auto it = mats_.find(key);
  if (it != mats_.end()) return *it->second;
  auto m = std::make_unique<Matrix>(build(anyons, k));
  const Matrix& ref = *m;
  mats_.emplace(std::move(key), std::move(m));
  return ref;
}

Matrix BraidGenerators::build(const std::vector<int>& anyons, int k) {
  const Model& m = *model_;
  const size_t i = static_cast<size_t>(std::abs(k));  // 1-based position
  const bool inv = k < 0;
  const FusionSpace& from = space(anyons);
  std::vector<int> to_labels = swapped(anyons, k);
  const FusionSpace& to = space(to_labels);
  Matrix g(m.field, to.dimension(), from.dimension());
  const int b = anyons[i - 1], c = anyons[i];
  auto r_of = [&](int x, int y, int f) -> Scalar {
    const Scalar* r = m.r_symbol(x, y, f);
    if (!r || r->is_zero())
      throw MathError(fmt::format("model {} lacks R^{{{} {}}}_{} (needed by s{})", m.name, m.labels[x], m.labels[y],
                                  m.labels[f], i));
    return *r;
  };
  for (size_t col = 0; col < from.dimension(); ++col) {
    const std::vector<int>& t = from.tree(col);
    std::vector<int> nt = t;
    nt[0] = to_labels[0];
    if (i == 1) {
      // sigma_1: diagonal in x_2
      int x2 = t[1];
      Scalar v = inv ? r_of(c, b, x2).inverse() : r_of(b, c, x2);
      long row = to.index_of(nt);
      if (row < 0) throw InternalError("s1 image tree missing");
      g(static_cast<size_t>(row), col) = v;
      continue;
    }
    const int u = t[i - 2], e = t[i - 1], d = t[i];
    const FMatrix& f1 = fcache_.get(u, b, c, d);
    const FMatrix& f2 = fcache_.get(u, c, b, d);
    long er = f1.row_of(e);
    if (er < 0) throw InternalError("intermediate charge not admissible in F");
    for (size_t ep = 0; ep < f2.rows.size(); ++ep) {
      Scalar acc(m.field);
      for (size_t fj = 0; fj < f1.cols.size(); ++fj) {
        int f = f1.cols[fj];
        const Scalar& a = f1.value(static_cast<size_t>(er), fj);
        if (a.is_zero()) continue;
        long fi = f2.col_of(f);
        if (fi < 0) continue;
        const Scalar& z = f2.inverse(static_cast<size_t>(fi), ep);
        if (z.is_zero()) continue;
        Scalar r = inv ? r_of(c, b, f).inverse() : r_of(b, c, f);
        acc += a * r * z;
      }
      if (acc.is_zero()) continue;
      nt[i - 1] = f2.rows[ep];
      long row = to.index_of(nt);
      if (row < 0) throw InternalError("image tree missing from the target space");
      g(static_cast<size_t>(row), col) = acc;
    }
  }
  return g;
}

std::vector<const Matrix*> BraidGenerators::letters(const std::vector<int>& anyons, const Word& w,
                                                    std::vector<int>* end) {
  w.check_range(static_cast<int>(anyons.size()));
  std::vector<const Matrix*> out;
  out.reserve(w.size());
  std::vector<int> cur = anyons;
  bool uniform = true;
  for (int a : anyons) uniform = uniform && a == anyons[0];
  if (uniform) {
    // label sequence never changes: one matrix per distinct letter
    std::map<int, const Matrix*> seen;
    w.for_each_letter([&](int l, std::uint32_t) {
      auto it = seen.find(l);
      if (it == seen.end()) it = seen.emplace(l, &matrix(cur, l)).first;
      out.push_back(it->second);
    });
  } else {
    w.for_each_letter([&](int l, std::uint32_t) {
      out.push_back(&matrix(cur, l));
      cur = swapped(cur, l);
    });
  }
  if (end) *end = cur;
  return out;
}

}  // namespace zb
