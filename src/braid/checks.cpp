#include "zetabraid/braid/checks.hpp"

#include <fmt/format.h>

#include <deque>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"
#include "zetabraid/model/ribbon.hpp"

namespace zb {

bool BraidReport::ok() const {
  for (const auto& r : relations)
    if (!r.holds) return false;
  for (const auto& e : eigen)
    if (!e.complete || (e.hecke_checked && !e.hecke_holds)) return false;
  if (twist_checked && !twist_holds) return false;
  return true;
}

namespace {

Matrix product(BraidGenerators& gens, const std::vector<int>& anyons, const std::vector<int>& letters) {
  return word_product(gens.letters(anyons, Word::from_letters(letters)));
}

std::string word_text(const std::vector<int>& l) {
  std::string s;
  for (size_t i = 0; i < l.size(); ++i) s += (i ? " s" : "s") + std::to_string(std::abs(l[i])) + (l[i] < 0 ? "^-1" : "");
  return s;
}

}  // namespace

size_t algebra_dimension(const std::vector<const Matrix*>& gens, size_t dim) {
  if (gens.empty()) return 1;
  const FieldPtr& f = gens[0]->field();
  const size_t len = dim * dim;
  std::vector<std::vector<Scalar>> echelon;
  std::vector<size_t> pivots;
  std::deque<Matrix> queue;
  auto add = [&](const Matrix& m) -> bool {
    std::vector<Scalar> v;
    v.reserve(len);
    for (size_t i = 0; i < dim; ++i)
      for (size_t j = 0; j < dim; ++j) v.push_back(m(i, j));
    for (size_t e = 0; e < echelon.size(); ++e) {
      if (v[pivots[e]].is_zero()) continue;
      Scalar c = v[pivots[e]];
      for (size_t k = 0; k < len; ++k)
        if (!echelon[e][k].is_zero()) v[k] -= c * echelon[e][k];
    }
    size_t p = len;
    for (size_t k = 0; k < len; ++k)
      if (!v[k].is_zero()) { p = k; break; }
    if (p == len) return false;
    Scalar inv = v[p].inverse();
    for (auto& x : v)
      if (!x.is_zero()) x *= inv;
    echelon.push_back(std::move(v));
    pivots.push_back(p);
    return true;
  };
  Matrix id = Matrix::identity(f, dim);
  add(id);
  queue.push_back(id);
  while (!queue.empty() && echelon.size() < len) {
    Matrix m = std::move(queue.front());
    queue.pop_front();
    for (const Matrix* g : gens) {
      Matrix p = *g * m;
      if (add(p)) queue.push_back(std::move(p));
      if (echelon.size() == len) break;
    }
  }
  return echelon.size();
}

BraidReport check_braid_representation(BraidGenerators& gens, const std::vector<int>& anyons,
                                       const BraidCheckOptions& opt) {
  const Model& model = gens.model();
  const FusionSpace& sp = gens.space(anyons);
  sp.require_nonzero();
  BraidReport rep;
  rep.dimension = sp.dimension();
  if (sp.dimension() > opt.max_dimension)
    throw ResourceError(fmt::format("braid check: dimension {} exceeds the limit {} (--max-dimension)",
                                    sp.dimension(), opt.max_dimension));
  const int n = sp.anyon_count();
  const FieldPtr& f = model.field;
  auto relation = [&](const std::vector<int>& lhs, const std::vector<int>& rhs) {
    bool holds;
    if (rhs.empty())
      holds = product(gens, anyons, lhs).is_identity();
    else
      holds = product(gens, anyons, lhs) == product(gens, anyons, rhs);
    rep.relations.push_back({word_text(lhs) + " = " + (rhs.empty() ? std::string("1") : word_text(rhs)), holds});
  };
  for (int i = 1; i < n; ++i) {
    relation({i, -i}, {});
    relation({-i, i}, {});
  }
  for (int i = 1; i + 1 < n; ++i) relation({i, i + 1, i}, {i + 1, i, i + 1});
  for (int i = 1; i < n; ++i)
    for (int j = i + 2; j < n; ++j) relation({i, j}, {j, i});
  // eigenvalues
  for (int i = 1; i < n; ++i) {
    GeneratorEigen ge;
    ge.generator = i;
    int b = anyons[static_cast<size_t>(i - 1)], c = anyons[static_cast<size_t>(i)];
    ge.squared = b != c;
    Matrix g = ge.squared ? product(gens, anyons, {i, i}) : gens.matrix(anyons, i);
    std::vector<std::pair<Scalar, std::string>> cand;
    for (int ch : model.channels(b, c)) {
      const Scalar* r = model.r_symbol(b, c, ch);
      if (!r) continue;
      Scalar v = *r;
      std::string src = fmt::format("R^{{{} {}}}_{}", model.labels[b], model.labels[c], model.labels[ch]);
      if (ge.squared) {
        const Scalar* r2 = model.r_symbol(c, b, ch);
        if (!r2) continue;
        v = *r2 * v;
        src = fmt::format("R^{{{} {}}}_{} R^{{{} {}}}_{}", model.labels[c], model.labels[b], model.labels[ch],
                          model.labels[b], model.labels[c], model.labels[ch]);
      }
      bool dup = false;
      for (auto& [x, s] : cand)
        if (x == v) {
          dup = true;
          s += " = " + src;
        }
      if (!dup) cand.emplace_back(v, src);
    }
    size_t total = 0;
    Matrix id = Matrix::identity(f, sp.dimension());
    for (auto& [v, src] : cand) {
      size_t mult = sp.dimension() - (g - id.scaled(v)).rank();
      if (mult == 0) continue;
      total += mult;
      ge.eigenvalues.push_back({v, mult, src});
    }
    ge.complete = total == sp.dimension();
    if (ge.eigenvalues.size() == 2) {
      ge.hecke_checked = true;
      ge.hecke_holds = ((g - id.scaled(ge.eigenvalues[0].value)) * (g - id.scaled(ge.eigenvalues[1].value))).is_zero();
    }
    rep.eigen.push_back(std::move(ge));
  }
  bool uniform = true;
  for (int a : anyons) uniform = uniform && a == anyons[0];
  if (uniform) {
    int a = anyons[0];
    std::vector<int> delta2;
    for (int r = 0; r < n; ++r)
      for (int i = 1; i < n; ++i) delta2.push_back(i);
    // The full twist (s1...s_{n-1})^n acts on V(a^n; c) as theta_c / theta_a^n (twists from the model's ribbon data).
    const RibbonData rd = ribbon_data(model);
    if (!rd.braided) throw MathError("the model has no R-symbols: no full twist");
    Scalar expect = rd.twists[static_cast<size_t>(sp.total())] / rd.twists[static_cast<size_t>(a)].pow(n);
    rep.twist_checked = true;
    rep.twist_expected = expect;
    Matrix ft = n > 1 ? product(gens, anyons, delta2) : Matrix::identity(f, sp.dimension());
    rep.twist_holds = ft == Matrix::identity(f, sp.dimension()).scaled(expect);
    if (sp.dimension() <= opt.max_algebra_dimension) {
      std::vector<const Matrix*> g;
      for (int i = 1; i < n; ++i) g.push_back(&gens.matrix(anyons, i));
      rep.algebra_dimension = static_cast<long>(n > 1 ? algebra_dimension(g, sp.dimension()) : 1);
    }
  }
  return rep;
}

}  // namespace zb
