// Every pentagon and hexagon equation as a list of terms over named symbols, evaluated with plain Scalar
// arithmetic (blame.hpp). The enumeration follows the fast drivers of equations.cpp, block by block, so failures
// come in the same order and with the same labels.
#include <fmt/format.h>

#include <map>

#include "blame.hpp"
#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"

namespace zb::blame {

namespace {

const char* kPentagonWhat =
    "[F^{fcd}_e]_{gl} [F^{abl}_e]_{fk} - sum_h [F^{abc}_g]_{fh} [F^{ahd}_e]_{gk} [F^{bcd}_k]_{hl} != 0";
const char* kHexagonWhat = "R^{ca}_e [F^{acb}_d]_{eg} R^{cb}_g - sum_f [F^{cab}_d]_{ef} R^{cf}_d [F^{abc}_d]_{fg} != 0";
const char* kReverseWhat =
    "(R^{ac}_e)^-1 [F^{acb}_d]_{eg} (R^{bc}_g)^-1 - sum_f [F^{cab}_d]_{ef} (R^{fc}_d)^-1 [F^{abc}_d]_{fg} != 0";

std::string ball_of(const Scalar& s, long digits) {
  AcbT b;
  s.ball(b, static_cast<long>(static_cast<double>(digits) * 3.33) + 16);
  return ball_str(b, digits);
}

// Builds the symbol table and the equations.
class Builder {
 public:
  Builder(const Model& m, long max_terms) : M(m), n(m.label_count()), max_terms_(max_terms) {}

  EquationSet run() {
    pentagons();
    if (M.has_r) {
      hexagons(false);
      hexagons(true);
    }
    return std::move(E);
  }

 private:
  const Model& M;
  const int n;
  long max_terms_;
  EquationSet E;
  std::map<std::array<int, 7>, int> index_;

  bool N(int a, int b, int c) const { return M.fusion(a, b, c) > 0; }

  // Symbol id of [F^{abc}_d]_{ef}, or -1 when not admissible (the entry is zero by the fusion rules).
  int f(int a, int b, int c, int d, int e, int g) {
    if (!N(a, b, e) || !N(e, c, d) || !N(b, c, g) || !N(a, g, d)) return -1;
    std::array<int, 6> k{a, b, c, d, e, g};
    auto [it, fresh] = index_.emplace(std::array<int, 7>{0, a, b, c, d, e, g}, static_cast<int>(E.symbols.size()));
    if (fresh) {
      Symbol s;
      s.key = k;
      s.given = M.f_given.count(k) > 0;
      s.value = M.f_symbol(a, b, c, d, e, g);
      auto ln = M.f_line.find(k);
      s.line = ln == M.f_line.end() ? 0 : ln->second;
      E.symbols.push_back(s);
    }
    return it->second;
  }
  int r(int a, int b, int c) {
    if (!N(a, b, c)) return -1;
    auto [it, fresh] = index_.emplace(std::array<int, 7>{1, a, b, c, 0, 0, 0}, static_cast<int>(E.symbols.size()));
    if (fresh) {
      Symbol s;
      s.is_r = true;
      s.key = {a, b, c, 0, 0, 0};
      s.given = M.r_given.count({a, b, c}) > 0;
      s.value = M.r_symbol(a, b, c);
      auto ln = M.r_line.find({a, b, c});
      s.line = ln == M.r_line.end() ? 0 : ln->second;
      E.symbols.push_back(s);
    }
    return it->second;
  }

  // Adds sign * prod factors to eq unless a factor is zero by the fusion rules (id -1) or the inverse of an
  // R-symbol given as zero (the fast drivers skip such terms too; r_admissible reports the zero).
  void term(Equation& eq, int sign, std::initializer_list<std::pair<int, int>> factors) {
    Term t;
    t.sign = sign;
    for (auto [id, p] : factors) {
      if (id < 0) return;
      const Symbol& s = E.symbols[static_cast<size_t>(id)];
      if (p < 0 && s.given && !s.value) return;
      t.factors.emplace_back(id, p);
    }
    for (auto [id, p] : t.factors) {
      (void)p;
      eq.symbols.push_back(id);
      eq.missing = eq.missing || !E.symbols[static_cast<size_t>(id)].given;
    }
    eq.terms.push_back(std::move(t));
    if (++E.terms > max_terms_)
      throw ResourceError(fmt::format("locating wrong entries needs more than {} equation terms", max_terms_));
  }
  void finish(Equation& eq) {
    std::sort(eq.symbols.begin(), eq.symbols.end());
    eq.symbols.erase(std::unique(eq.symbols.begin(), eq.symbols.end()), eq.symbols.end());
    E.eqs.push_back(std::move(eq));
  }

  void pentagons() {
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d) {
            std::vector<char> seen(static_cast<size_t>(n), 0);
            for (int f1 : M.channels(a, b))
              for (int g : M.channels(f1, c))
                for (int e : M.channels(g, d)) seen[static_cast<size_t>(e)] = 1;
            for (int e = 0; e < n; ++e)
              if (seen[static_cast<size_t>(e)]) pentagon_block(a, b, c, d, e);
          }
  }
  void pentagon_block(int a, int b, int c, int d, int e) {
    std::vector<std::pair<int, int>> right;
    for (int l : M.channels(c, d))
      for (int k : M.channels(b, l))
        if (N(a, k, e)) right.emplace_back(k, l);
    for (int ff : M.channels(a, b))
      for (int g : M.channels(ff, c)) {
        if (!N(g, d, e)) continue;
        for (auto [k, l] : right) {
          Equation eq{EqKind::kPentagon, {a, b, c, d, e, ff, g, k, l}, {}, {}, false};
          term(eq, 1, {{f(ff, c, d, e, g, l), 1}, {f(a, b, l, e, ff, k), 1}});
          for (int h : M.channels(b, c))
            term(eq, -1, {{f(a, b, c, g, ff, h), 1}, {f(a, h, d, e, g, k), 1}, {f(b, c, d, k, h, l), 1}});
          finish(eq);
        }
      }
  }
  void hexagons(bool inv) {
    const EqKind kind = inv ? EqKind::kHexagonReverse : EqKind::kHexagon;
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d)
            for (int e : M.channels(a, c)) {
              if (!N(e, b, d)) continue;
              for (int g : M.channels(c, b)) {
                if (!N(a, g, d)) continue;
                Equation eq{kind, {a, b, c, d, e, g}, {}, {}, false};
                if (inv)
                  term(eq, 1, {{r(a, c, e), -1}, {f(a, c, b, d, e, g), 1}, {r(b, c, g), -1}});
                else
                  term(eq, 1, {{r(c, a, e), 1}, {f(a, c, b, d, e, g), 1}, {r(c, b, g), 1}});
                for (int ff : M.channels(a, b)) {
                  if (inv)
                    term(eq, -1, {{f(c, a, b, d, e, ff), 1}, {r(ff, c, d), -1}, {f(a, b, c, d, ff, g), 1}});
                  else
                    term(eq, -1, {{f(c, a, b, d, e, ff), 1}, {r(c, ff, d), 1}, {f(a, b, c, d, ff, g), 1}});
                }
                finish(eq);
              }
            }
  }
};

}  // namespace

std::string check_name(EqKind k) {
  return k == EqKind::kPentagon ? "pentagon" : k == EqKind::kHexagon ? "hexagon" : "hexagon_reverse";
}

std::string equation_where(const Model& m, const Equation& e) {
  auto L = [&](int i) { return m.labels[static_cast<size_t>(e.labels[static_cast<size_t>(i)])]; };
  if (e.kind == EqKind::kPentagon)
    return fmt::format("a={} b={} c={} d={} e={} f={} g={} k={} l={}", L(0), L(1), L(2), L(3), L(4), L(5), L(6),
                       L(7), L(8));
  return fmt::format("a={} b={} c={} d={} e={} g={}", L(0), L(1), L(2), L(3), L(4), L(5));
}

std::string symbol_name(const Model& m, const Symbol& s) {
  auto L = [&](int i) { return m.labels[static_cast<size_t>(s.key[static_cast<size_t>(i)])]; };
  if (s.is_r) return fmt::format("R^{{{} {}}}_{}", L(0), L(1), L(2));
  return fmt::format("F^{{{} {} {}}}_{}[{},{}]", L(0), L(1), L(2), L(3), L(4), L(5));
}

bool has_missing_symbols(const Model& m) {
  bool missing = false;
  m.for_each_f_block([&](const Model::FBlock& B) {
    for (int e : B.rows)
      for (int f : B.cols) missing = missing || !m.f_given.count({B.a, B.b, B.c, B.d, e, f});
  });
  if (m.has_r)
    for (int a = 0; a < m.label_count(); ++a)
      for (int b = 0; b < m.label_count(); ++b)
        for (int c : m.channels(a, b)) missing = missing || !m.r_given.count({a, b, c});
  return missing;
}

EquationSet enumerate_equations(const Model& m, long max_terms) { return Builder(m, max_terms).run(); }

Scalar residual(const Model& m, const EquationSet& E, const Equation& eq, int sub, const Scalar* x) {
  Scalar sum(m.field);
  for (const Term& t : eq.terms) {
    Scalar p(m.field, t.sign);
    for (auto [id, pw] : t.factors) {
      const Scalar* v = id == sub ? x : E.symbols[static_cast<size_t>(id)].value;
      if (!v || v->is_zero()) {
        p = Scalar(m.field);
        break;
      }
      p *= pw > 0 ? *v : v->inverse();
    }
    sum += p;
  }
  return sum;
}

std::vector<Status> evaluate(const Model& m, const EquationSet& E, int threads) {
  std::vector<Status> st(E.eqs.size(), kPass);
  parallel_for(E.eqs.size(), thread_count(threads), [&](size_t i) {
    const Equation& eq = E.eqs[i];
    if (eq.missing) {
      st[i] = kNotChecked;
      return;
    }
    Scalar sum = residual(m, E, eq);
    st[i] = sum.is_zero() ? kPass : kFail;
  });
  return st;
}

void report_equations(const Model& m, const CheckOptions& opt, const EquationSet& E, const std::vector<Status>& st,
                      CheckReport& rep) {
  std::vector<EqKind> kinds{EqKind::kPentagon};
  if (m.has_r) kinds = {EqKind::kPentagon, EqKind::kHexagon, EqKind::kHexagonReverse};
  for (EqKind k : kinds) {
    CheckCount cc;
    cc.name = check_name(k);
    size_t listed = 0;
    for (size_t i = 0; i < E.eqs.size(); ++i) {
      const Equation& eq = E.eqs[i];
      if (eq.kind != k) continue;
      if (st[i] == kNotChecked) {
        ++cc.not_checked;
        continue;
      }
      ++cc.count;
      if (st[i] == kPass) continue;
      ++cc.failed;
      if (listed >= opt.max_failures) continue;
      ++listed;
      Scalar res = residual(m, E, eq);
      CheckFailure fl;
      fl.check = cc.name;
      fl.where = equation_where(m, eq);
      fl.what = k == EqKind::kPentagon ? kPentagonWhat : k == EqKind::kHexagon ? kHexagonWhat : kReverseWhat;
      fl.residual = res.str();
      fl.residual_ball = ball_of(res, opt.ball_digits);
      rep.failures.push_back(std::move(fl));
    }
    if (cc.not_checked)
      cc.note = fmt::format("{} equations not checked: they need symbols missing from the file", cc.not_checked);
    rep.checks.push_back(cc);
  }
  if (!m.has_r) {
    CheckCount cc;
    cc.name = "hexagon";
    cc.skipped = true;
    cc.note = "no R-symbols given (fusion category only)";
    rep.checks.push_back(cc);
  }
  // Each missing symbol once, in the order of the symbol table sorted by kind and labels.
  std::map<std::pair<bool, std::array<int, 6>>, long> need;
  for (size_t i = 0; i < E.eqs.size(); ++i)
    if (st[i] == kNotChecked)
      for (int id : E.eqs[i].symbols) {
        const Symbol& s = E.symbols[static_cast<size_t>(id)];
        if (!s.given) ++need[{s.is_r, s.key}];
      }
  for (const auto& [k, count] : need) {
    Symbol s;
    s.is_r = k.first;
    s.key = k.second;
    rep.missing.push_back({symbol_name(m, s), count});
  }
}

}  // namespace zb::blame
