// Quantum dimensions, Frobenius-Schur indicators and twists (formulas and sources in ribbon.hpp).
#include "zetabraid/model/ribbon.hpp"

#include <fmt/format.h>

#include <algorithm>

#include "zetabraid/error.hpp"

namespace zb {

namespace {

// d_a d_b = sum_c N_ab^c d_c for all a, b, and d_a = d_{a*}.
bool is_fusion_character(const Model& m, const std::vector<Scalar>& d) {
  const int n = m.label_count();
  for (int a = 0; a < n; ++a) {
    if (d[static_cast<size_t>(a)] != d[static_cast<size_t>(m.dual(a))]) return false;
    for (int b = a; b < n; ++b) {
      Scalar s(m.field);
      for (int c : m.channels(a, b)) s += Scalar(m.field, m.fusion(a, b, c)) * d[static_cast<size_t>(c)];
      if (s != d[static_cast<size_t>(a)] * d[static_cast<size_t>(b)]) return false;
    }
  }
  return true;
}

// The quantum dimensions from x_a = 1/[F^{a a* a}_a]_{11}: |d_a| = (x_a x_{a*})^(1/2), signs as in ribbon.hpp.
std::vector<Scalar> dimensions(const Model& m, const std::vector<Scalar>& x) {
  const int n = m.label_count();
  const FieldPtr& F = m.field;
  std::vector<Scalar> base;  // |d_a| candidates up to sign
  for (int a = 0; a < n; ++a) {
    int ad = m.dual(a);
    if (ad == a) {
      base.push_back(x[static_cast<size_t>(a)]);
      continue;
    }
    Scalar d2 = x[static_cast<size_t>(a)] * x[static_cast<size_t>(ad)];
    if (!d2.in_base())
      throw MathError(fmt::format("d_{}^2 = {} involves square roots; not supported yet", m.labels[a], d2.str()));
    base.push_back(F->sqrt(d2.to_base()));
  }
  // All positive (real > 0) when that is a character of the fusion ring, else the first consistent pattern with
  // the fewest sign changes.
  for (Scalar& s : base)
    if (s.is_real() && s.real_sign() < 0) s = -s;
  if (is_fusion_character(m, base)) return base;
  if (n <= 16) {
    std::vector<unsigned> masks;
    for (unsigned s = 1; s < (1u << (n - 1)); ++s) masks.push_back(s << 1);
    std::stable_sort(masks.begin(), masks.end(),
                     [](unsigned p, unsigned q) { return __builtin_popcount(p) < __builtin_popcount(q); });
    for (unsigned s : masks) {
      std::vector<Scalar> d = base;
      for (int a = 1; a < n; ++a)
        if (s & (1u << a)) d[static_cast<size_t>(a)] = -d[static_cast<size_t>(a)];
      if (is_fusion_character(m, d)) return d;
    }
  }
  throw MathError("no choice of signs makes d_a = +-1/|[F^{a a* a}_a]_11| a character of the fusion rules");
}

}  // namespace

RibbonData ribbon_data(const Model& m) {
  const int n = m.label_count();
  RibbonData rd;
  for (int a = 0; a < n; ++a)
    if (m.dual(a) < 0) throw MathError(fmt::format("label {} has no dual: not a fusion category", m.labels[a]));
  std::vector<Scalar> x;  // x_a = 1/[F^{a a* a}_a]_{11}
  for (int a = 0; a < n; ++a) {
    const Scalar* f = m.f_symbol(a, m.dual(a), a, a, 0, 0);
    if (!f || f->is_zero())
      throw MathError(fmt::format("[F^{{a a* a}}_a]_{{11}} is zero or missing for a = {}", m.labels[a]));
    x.push_back(f->inverse());
  }
  rd.dims = dimensions(m, x);
  if (!rd.dims[0].is_one()) throw MathError("d of the unit label is not 1: check the normalisation of F");
  for (int a = 0; a < n; ++a) {
    if (m.dual(a) != a) {
      rd.fs.push_back(0);
      continue;
    }
    Scalar nu = rd.dims[static_cast<size_t>(a)] / x[static_cast<size_t>(a)];
    if (nu.is_one())
      rd.fs.push_back(1);
    else if ((-nu).is_one())
      rd.fs.push_back(-1);
    else
      throw MathError(fmt::format("Frobenius-Schur indicator of {} is {}, not +-1", m.labels[a], nu.str()));
  }
  if (!m.has_r) return rd;
  rd.braided = true;
  for (int a = 0; a < n; ++a) {
    Scalar s(m.field);
    for (int c : m.channels(a, a)) {
      const Scalar* r = m.r_symbol(a, a, c);
      if (!r) throw MathError(fmt::format("R^{{aa}}_c missing for a = {}, c = {}", m.labels[a], m.labels[c]));
      s += rd.dims[static_cast<size_t>(c)] * *r;
    }
    rd.twists.push_back(s / rd.dims[static_cast<size_t>(a)]);
  }
  return rd;
}

Scalar quantum_dimension(const Model& m, int a) {
  if (a < 0 || a >= m.label_count()) throw MathError(fmt::format("no label with index {}", a));
  return ribbon_data(m).dims[static_cast<size_t>(a)];
}

Scalar twist(const Model& m, int a) {
  if (a < 0 || a >= m.label_count()) throw MathError(fmt::format("no label with index {}", a));
  RibbonData rd = ribbon_data(m);
  if (!rd.braided) throw MathError("the model has no R-symbols: twists are not defined");
  return rd.twists[static_cast<size_t>(a)];
}

}  // namespace zb
