// Suspects and one-entry repairs (blame.hpp): rank the symbols of failing equations, then solve for the top ones.
#include <fmt/format.h>

#include <algorithm>
#include <map>
#include <optional>

#include "blame.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zb::blame {

namespace {

// Coefficients of an equation as a Laurent polynomial in the value x of one symbol: exponent -> coefficient.
std::map<int, Scalar> polynomial_in(const Model& m, const EquationSet& E, const Equation& eq, int sym) {
  std::map<int, Scalar> poly;
  for (const Term& t : eq.terms) {
    Scalar c(m.field, t.sign);
    int k = 0;
    for (auto [id, pw] : t.factors) {
      if (id == sym) {
        k += pw;
        continue;
      }
      const Scalar* v = E.symbols[static_cast<size_t>(id)].value;
      if (!v) {
        c = Scalar(m.field);
        break;
      }
      c *= pw > 0 ? *v : v->inverse();
    }
    if (c.is_zero()) continue;
    auto it = poly.find(k);
    if (it == poly.end())
      poly.emplace(k, std::move(c));
    else
      it->second += c;
  }
  for (auto it = poly.begin(); it != poly.end();) it = it->second.is_zero() ? poly.erase(it) : std::next(it);
  return poly;
}

// A root of the polynomial when it is linear after removing a power of x (c_k x^k + c_{k+1} x^{k+1}), or 0 when
// it is a single monomial of positive degree; nothing otherwise.
std::optional<Scalar> linear_root(const Model& m, const std::map<int, Scalar>& poly) {
  if (poly.size() == 1 && poly.begin()->first > 0) return Scalar(m.field);
  if (poly.size() != 2) return std::nullopt;
  auto lo = poly.begin(), hi = std::next(lo);
  if (hi->first != lo->first + 1) return std::nullopt;
  return -(lo->second / hi->second);
}

// The structural conditions on one symbol's new value: for F, its block stays normalised (unit among a, b, c),
// invertible and, when claimed, unitary; for R, nonzero and, when claimed, of modulus 1.
bool structure_holds(const Model& m, const Symbol& s, const Scalar& x) {
  if (s.is_r) return !x.is_zero() && (!m.claims_unitary || (x.abs2() - Scalar(m.field, 1)).is_zero());
  const auto& k = s.key;
  if ((k[0] == 0 || k[1] == 0 || k[2] == 0) && !x.is_one()) return false;
  std::vector<int> rows = m.left_channels(k[0], k[1], k[2], k[3]), cols = m.right_channels(k[0], k[1], k[2], k[3]);
  if (rows.size() != cols.size()) return false;
  Matrix X(m.field, rows.size(), cols.size());
  for (size_t i = 0; i < rows.size(); ++i)
    for (size_t j = 0; j < cols.size(); ++j) {
      if (rows[i] == k[4] && cols[j] == k[5])
        X(i, j) = x;
      else if (const Scalar* v = m.f_symbol(k[0], k[1], k[2], k[3], rows[i], cols[j]))
        X(i, j) = *v;
    }
  if (X.rank() != rows.size()) return false;
  if (!m.claims_unitary) return true;
  return (X * X.adjoint() - Matrix::identity(m.field, rows.size())).is_zero();
}

// A value for symbol `sym` making every checked equation involving it hold, or nothing.
std::optional<Scalar> repair(const Model& m, const EquationSet& E, const std::vector<Status>& st,
                             const std::vector<int>& eqs, int sym) {
  const Symbol& s = E.symbols[static_cast<size_t>(sym)];
  const Scalar current = s.value ? *s.value : Scalar(m.field);
  std::vector<Scalar> tried;
  constexpr size_t kMaxCandidates = 4;
  // Failing equations first: they are the ones the value must change.
  for (Status want : {kFail, kPass})
    for (int i : eqs) {
      if (st[static_cast<size_t>(i)] != want) continue;
      std::optional<Scalar> x = linear_root(m, polynomial_in(m, E, E.eqs[static_cast<size_t>(i)], sym));
      if (!x || *x == current) continue;
      if (std::find(tried.begin(), tried.end(), *x) != tried.end()) continue;
      tried.push_back(*x);
      bool ok = structure_holds(m, s, *x);
      for (size_t j = 0; ok && j < eqs.size(); ++j) {
        const Equation& eq = E.eqs[static_cast<size_t>(eqs[j])];
        ok = residual(m, E, eq, sym, &*x).is_zero();
      }
      if (ok) return x;
      if (tried.size() >= kMaxCandidates) return std::nullopt;
    }
  return std::nullopt;
}

}  // namespace

void find_suspects(const Model& m, const CheckOptions& opt, const EquationSet& E, const std::vector<Status>& st,
                   CheckReport& rep) {
  const size_t ns = E.symbols.size();
  std::vector<long> fails(ns, 0), passes(ns, 0);
  std::vector<std::vector<int>> eqs_of(ns);
  for (size_t i = 0; i < E.eqs.size(); ++i) {
    if (st[i] == kNotChecked) continue;
    for (int id : E.eqs[i].symbols) {
      eqs_of[static_cast<size_t>(id)].push_back(static_cast<int>(i));
      ++(st[i] == kFail ? fails : passes)[static_cast<size_t>(id)];
    }
  }
  std::vector<int> order;
  for (size_t id = 0; id < ns; ++id)
    if (fails[id] > 0) order.push_back(static_cast<int>(id));
  // Most failing equations first; ties: fewest passing equations; then symbol order (kind, labels).
  auto key = [&](int id) { return std::make_pair(E.symbols[static_cast<size_t>(id)].is_r, E.symbols[static_cast<size_t>(id)].key); };
  std::sort(order.begin(), order.end(), [&](int x, int y) {
    size_t a = static_cast<size_t>(x), b = static_cast<size_t>(y);
    if (fails[a] != fails[b]) return fails[a] > fails[b];
    if (passes[a] != passes[b]) return passes[a] < passes[b];
    return key(x) < key(y);
  });
  std::vector<int> rank(ns, -1);
  for (size_t r = 0; r < order.size(); ++r) rank[static_cast<size_t>(order[r])] = static_cast<int>(r);

  for (size_t r = 0; r < order.size() && r < opt.max_suspects; ++r) {
    const size_t id = static_cast<size_t>(order[r]);
    const Symbol& s = E.symbols[id];
    Suspect x;
    x.symbol = symbol_name(m, s);
    x.line = s.line;
    x.failures = fails[id];
    x.passes = passes[id];
    if (std::optional<Scalar> v = repair(m, E, st, eqs_of[id], order[r])) x.repair = v->str();
    rep.suspects.push_back(std::move(x));
  }

  // Lines of the listed equation failures: every symbol's line, and the line of its best-ranked symbol first.
  std::map<std::pair<std::string, std::string>, size_t> failing;
  for (size_t i = 0; i < E.eqs.size(); ++i)
    if (st[i] == kFail) failing.emplace(std::make_pair(check_name(E.eqs[i].kind), equation_where(m, E.eqs[i])), i);
  for (CheckFailure& f : rep.failures) {
    auto it = failing.find({f.check, f.where});
    if (it == failing.end()) continue;
    const Equation& eq = E.eqs[it->second];
    int best = -1;
    for (int id : eq.symbols) {
      const Symbol& s = E.symbols[static_cast<size_t>(id)];
      if (s.line) f.lines.push_back(s.line);
      if (rank[static_cast<size_t>(id)] >= 0 && (best < 0 || rank[static_cast<size_t>(id)] < rank[static_cast<size_t>(best)]))
        best = id;
    }
    std::sort(f.lines.begin(), f.lines.end());
    f.lines.erase(std::unique(f.lines.begin(), f.lines.end()), f.lines.end());
    if (best >= 0) f.line = E.symbols[static_cast<size_t>(best)].line;
  }
}

}  // namespace zb::blame
