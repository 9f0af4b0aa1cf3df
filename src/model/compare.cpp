// Comparing two models up to gauge and relabelling, or to the mirror (model/compare.hpp).
#include "zetabraid/model/compare.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <map>
#include <numeric>
#include <optional>

#include "compare_gauge.hpp"
#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/model/ribbon.hpp"
#include "zetabraid/model/transform.hpp"

namespace zb {

namespace {

// Levels of the relabelling filter: each adds one family of gauge invariants.
enum Level { kFusion = 0, kDims = 1, kFs = 2, kTwists = 3 };
const char* level_name(int l) {
  static const char* names[] = {"fusion rules", "dimensions", "fs_indicators", "twists"};
  return names[l];
}

// One model with its ribbon data (when computable) and a relabelling-independent signature per label.
struct Side {
  Model m;
  std::optional<RibbonData> rd;
  bool positive = false;                 // every d_a real and > 0 (then d, nu and theta are canonical)
  std::vector<std::vector<int>> sig;     // per label: self-dual flag, then sorted |a x b| over b
  std::vector<Scalar> d2;
};

Side prepare(Model m, std::vector<std::string>* notes, const char* which) {
  Side s{std::move(m), std::nullopt, false, {}, {}};
  const int n = s.m.label_count();
  for (int a = 0; a < n; ++a) {
    std::vector<int> cnt;
    for (int b = 0; b < n; ++b) cnt.push_back(static_cast<int>(s.m.channels(a, b).size()));
    std::sort(cnt.begin(), cnt.end());
    cnt.insert(cnt.begin(), s.m.dual(a) == a ? 1 : 0);
    s.sig.push_back(std::move(cnt));
  }
  try {
    s.rd = ribbon_data(s.m);
    s.positive = true;
    for (const Scalar& d : s.rd->dims) {
      s.d2.push_back(d * d);
      s.positive = s.positive && d.is_real() && d.real_sign() > 0;
    }
  } catch (const MathError& e) {
    notes->push_back(fmt::format("ribbon data of {} not available ({}); only the gauge test decides", which, e.what()));
  }
  return s;
}

std::string L(const Model& m, int a) { return m.labels[static_cast<size_t>(a)]; }

bool label_ok(int level, const Side& A, int a, const Side& B, int b) {
  if (A.sig[static_cast<size_t>(a)] != B.sig[static_cast<size_t>(b)]) return false;
  if (level < kDims || !A.rd || !B.rd) return true;
  if (A.d2[static_cast<size_t>(a)] != B.d2[static_cast<size_t>(b)]) return false;
  if (!(A.positive && B.positive)) return true;
  if (A.rd->dims[static_cast<size_t>(a)] != B.rd->dims[static_cast<size_t>(b)]) return false;
  if (level >= kFs && A.rd->fs[static_cast<size_t>(a)] != B.rd->fs[static_cast<size_t>(b)]) return false;
  if (level >= kTwists && A.rd->braided && B.rd->braided &&
      A.rd->twists[static_cast<size_t>(a)] != B.rd->twists[static_cast<size_t>(b)])
    return false;
  return true;
}

// Every permutation pi (A label -> B label) fixing the unit, keeping N and the invariants of `level`; at most max+1.
std::vector<std::vector<int>> relabelings(const Side& A, const Side& B, int level, long max) {
  const int n = A.m.label_count();
  std::vector<std::vector<int>> out;
  std::vector<int> pi(static_cast<size_t>(n), -1);
  std::vector<char> used(static_cast<size_t>(n), 0);
  auto consistent = [&](int a) {
    for (int x = 0; x <= a; ++x)
      for (int y = 0; y <= a; ++y)
        for (int z = 0; z <= a; ++z)
          if ((x == a || y == a || z == a) &&
              A.m.fusion(x, y, z) != B.m.fusion(pi[static_cast<size_t>(x)], pi[static_cast<size_t>(y)], pi[static_cast<size_t>(z)]))
            return false;
    return true;
  };
  auto rec = [&](auto&& self, int a) -> void {
    if (static_cast<long>(out.size()) > max) return;
    if (a == n) {
      out.push_back(pi);
      return;
    }
    for (int b = (a == 0 ? 0 : 1); b < (a == 0 ? 1 : n); ++b) {
      if (used[static_cast<size_t>(b)] || !label_ok(level, A, a, B, b)) continue;
      pi[static_cast<size_t>(a)] = b, used[static_cast<size_t>(b)] = 1;
      if (consistent(a)) self(self, a + 1);
      pi[static_cast<size_t>(a)] = -1, used[static_cast<size_t>(b)] = 0;
    }
  };
  rec(rec, 0);
  return out;
}

// The differing invariant of `level` under the relabelling pi (which keeps everything below that level).
CompareDiff invariant_diff(int level, const Side& A, const Side& B, const std::vector<int>* pi) {
  CompareDiff d;
  d.invariant = level_name(level);
  if (level == kFusion || !pi) {
    d.detail = "no permutation of B's labels that fixes the unit maps A's fusion rules onto B's";
    auto fp = [](const Side& s) {
      std::vector<std::string> parts;
      for (int a = 0; a < s.m.label_count(); ++a) {
        int total = 0;
        for (int b = 0; b < s.m.label_count(); ++b) total += static_cast<int>(s.m.channels(a, b).size());
        parts.push_back(fmt::format("{}: {}", L(s.m, a), total));
      }
      return "channels per label (sum over b of |a x b|): " + fmt::format("{}", fmt::join(parts, ", "));
    };
    d.value_a = fp(A), d.value_b = fp(B);
    return d;
  }
  for (int a = 0; a < A.m.label_count(); ++a) {
    const int b = (*pi)[static_cast<size_t>(a)];
    if (label_ok(level, A, a, B, b)) continue;
    std::string what = level == kDims ? "d" : level == kFs ? "nu" : "theta";
    auto val = [&](const Side& s, int x) {
      if (level == kFs) return fmt::format("{}", s.rd->fs[static_cast<size_t>(x)]);
      const Scalar& v = level == kDims ? s.rd->dims[static_cast<size_t>(x)] : s.rd->twists[static_cast<size_t>(x)];
      return v.str();
    };
    d.detail = fmt::format("no relabelling that keeps the {} keeps the {}; e.g. {}_{} in A vs {}_{} in B",
                           level_name(level - 1), level_name(level), what, L(A.m, a), what, L(B.m, b));
    d.value_a = val(A, a), d.value_b = val(B, b);
    return d;
  }
  d.detail = "(no label found)";
  return d;
}

std::string f_name(const Model& m, int a, int b, int c, int d, int e, int f) {
  return fmt::format("F^{{{} {} {}}}_{}[{},{}]", L(m, a), L(m, b), L(m, c), L(m, d), L(m, e), L(m, f));
}

struct GaugeTry {
  bool ok = false;
  CompareDiff diff;
  std::vector<GaugeValue> gauge;
  bool explicit_gauge = false;
  std::string note;
};

// Gauge test of A against Bp (B relabelled onto A's labels), both in one field.
GaugeTry gauge_test(const Model& A, const Model& Bp) {
  GaugeTry t;
  const int n = A.label_count();
  std::map<std::array<int, 3>, int> col;
  std::vector<std::array<int, 3>> vertex;
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c : A.channels(a, b)) col[{a, b, c}] = static_cast<int>(vertex.size()), vertex.push_back({a, b, c});
  std::vector<detail::GaugeRow> rows;
  std::vector<std::string> names;
  auto add = [&](const std::string& name, const Scalar* va, const Scalar* vb,
                 std::initializer_list<std::pair<std::array<int, 3>, int>> ex) {
    if (!va && !vb) return true;
    if (!va || !vb) {
      t.diff.invariant = "zero pattern";
      t.diff.detail = fmt::format("{} is zero in one model and not in the other", name);
      t.diff.value_a = va ? va->str() : "0", t.diff.value_b = vb ? vb->str() : "0";
      return false;
    }
    std::map<int, int> e;
    for (const auto& [v, k] : ex) e[col.at(v)] += k;
    detail::GaugeRow r{{}, *vb / *va};
    for (auto [c, k] : e)
      if (k) r.exps.emplace_back(c, k);
    rows.push_back(std::move(r));
    names.push_back(name);
    return true;
  };
  bool ok = true;
  A.for_each_f_block([&](const Model::FBlock& B) {
    for (int e : B.rows)
      for (int f : B.cols)
        if (ok)
          ok = add(f_name(A, B.a, B.b, B.c, B.d, e, f), A.f_symbol(B.a, B.b, B.c, B.d, e, f),
                   Bp.f_symbol(B.a, B.b, B.c, B.d, e, f),
                   {{{B.a, B.b, e}, 1}, {{e, B.c, B.d}, 1}, {{B.b, B.c, f}, -1}, {{B.a, f, B.d}, -1}});
  });
  if (A.has_r)
    for (int a = 0; a < n && ok; ++a)
      for (int b = 0; b < n && ok; ++b)
        for (int c : A.channels(a, b))
          if (ok)
            ok = add(fmt::format("R^{{{} {}}}_{}", L(A, a), L(A, b), L(A, c)), A.r_symbol(a, b, c), Bp.r_symbol(a, b, c),
                     {{{a, b, c}, 1}, {{b, a, c}, -1}});
  if (!ok) return t;
  detail::GaugeSolution s = detail::solve_gauge(static_cast<int>(vertex.size()), rows, A.field);
  if (!s.consistent) {
    t.diff.invariant = "loop product";
    t.diff.detail = "a product of ratios (value in B)/(value in A) that every gauge leaves at 1 is not 1";
    t.diff.value_a = "1";
    t.diff.value_b = s.loop_value->str();
    for (auto [r, e] : s.loop) t.diff.loop.push_back({names[static_cast<size_t>(r)], e, rows[static_cast<size_t>(r)].ratio.str()});
    return t;
  }
  t.ok = true;
  t.explicit_gauge = s.explicit_gauge;
  t.note = s.note;
  if (!s.explicit_gauge) return t;
  // Normalise: every gauge factor is homogeneous of degree 0 in u, so dividing all u by u^{11}_1 is again a
  // solution, with u = 1 on the unit vertices whenever the data force them to be equal (normalised F).
  const Scalar kappa = s.u[static_cast<size_t>(col.at({0, 0, 0}))];
  Gauge g;
  for (size_t i = 0; i < vertex.size(); ++i) g.emplace(vertex[i], s.u[i] / kappa);
  // Independent check of the explicit gauge: applying it to A must give B exactly.
  Model check = apply_gauge(A, g);
  bool same = check.f_symbols().size() == Bp.f_symbols().size() && check.r_symbols().size() == Bp.r_symbols().size();
  for (const auto& [k, v] : check.f_symbols()) {
    const Scalar* w = Bp.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5]);
    same = same && w && *w == v;
  }
  for (const auto& [k, v] : check.r_symbols()) {
    const Scalar* w = Bp.r_symbol(k[0], k[1], k[2]);
    same = same && w && *w == v;
  }
  if (!same) throw InternalError("compare: the gauge found does not map A onto B");
  for (const auto& [v, u] : g)
    if (!u.is_one()) t.gauge.push_back({fmt::format("{} {} -> {}", L(A, v[0]), L(A, v[1]), L(A, v[2])), u.str()});
  return t;
}

// The whole comparison of A with B (both in one field); fills r except the verdict's mirror flavour.
bool compare_in_field(const Side& A, const Side& B, const CompareOptions& opt, CompareResult* r) {
  std::vector<std::vector<int>> cands = relabelings(A, B, kTwists, opt.max_relabelings);
  if (static_cast<long>(cands.size()) > opt.max_relabelings)
    throw ResourceError(fmt::format("compare: more than {} candidate relabellings", opt.max_relabelings));
  if (cands.empty()) {
    int level = kFs;
    std::vector<std::vector<int>> lower;
    for (; level >= kFusion; --level)
      if (!(lower = relabelings(A, B, level, 0)).empty()) break;
    r->differs = invariant_diff(level + 1 > kTwists ? kTwists : level + 1, A, B, lower.empty() ? nullptr : &lower[0]);
    return false;
  }
  const int n = A.m.label_count();
  bool first = true;
  for (const auto& pi : cands) {
    ++r->relabelings_tried;
    std::vector<int> to_a(static_cast<size_t>(n));
    for (int a = 0; a < n; ++a) to_a[static_cast<size_t>(pi[static_cast<size_t>(a)])] = a;
    Model Bp = relabel_model(B.m, to_a, A.m.labels);
    GaugeTry t = gauge_test(A.m, Bp);
    if (t.ok) {
      r->relabeling = pi;
      r->gauge = std::move(t.gauge);
      r->gauge_explicit = t.explicit_gauge;
      r->gauge_note = t.note;
      return true;
    }
    if (first) {
      first = false;
      r->differs = std::move(t.diff);
      if (cands.size() > 1)
        r->differs.detail += fmt::format(" (under the first of {} candidate relabellings)", cands.size());
    }
  }
  return false;
}

// Per label a, values that every gauge leaves unchanged and that are rational functions of F and R (so the
// conjugate's values are the conjugates of A's): d_a^2 = x_a x_{a*} = 1/([F^{a a* a}_a]_{11} [F^{a* a a*}_{a*}]_{11})
// (model/ribbon.hpp) first, then R^{aa}_c for every channel c (u^{aa}_c/u^{aa}_c = 1). Empty when an entry is
// missing.
std::vector<std::vector<Scalar>> label_invariants(const Model& m) {
  std::vector<std::vector<Scalar>> out;
  for (int a = 0; a < m.label_count(); ++a) {
    const int ad = m.dual(a);
    if (ad < 0) return {};
    const Scalar* p = m.f_symbol(a, ad, a, a, 0, 0);
    const Scalar* q = m.f_symbol(ad, a, ad, ad, 0, 0);
    if (!p || !q) return {};
    std::vector<Scalar> v{(*p * *q).inverse()};
    if (m.has_r)
      for (int c : m.channels(a, a)) {
        const Scalar* r = m.r_symbol(a, a, c);
        if (!r) return {};
        v.push_back(*r);
      }
    out.push_back(std::move(v));
  }
  return out;
}

// False only when proved: some label of A has, under the embedding (k, signs), invariants whose enclosures cannot
// be those of any label of B (d^2 disjoint, or an R^{aa}_c disjoint from every R^{bb}_c'); then no relabelling and
// gauge can map that conjugate onto B.
bool invariants_may_match(const std::vector<std::vector<Scalar>>& ia, const std::vector<std::vector<Scalar>>& ib,
                          long k, RadicalMask signs) {
  if (ia.empty() || ib.empty()) return true;
  const long prec = 64;
  auto balls = [&](const std::vector<Scalar>& v, bool at) {
    std::vector<AcbT> out(v.size());
    for (size_t j = 0; j < v.size(); ++j) at ? v[j].ball_at(out[j].get(), prec, k, signs) : v[j].ball(out[j].get(), prec);
    return out;
  };
  std::vector<std::vector<AcbT>> bb;
  for (const auto& v : ib) bb.push_back(balls(v, false));
  for (const auto& v : ia) {
    std::vector<AcbT> x = balls(v, true);
    bool any = false;
    for (const auto& y : bb) {
      if (any || y.size() != x.size() || !acb_overlaps(x[0].get(), y[0].get())) continue;
      bool all = true;
      for (size_t i = 1; i < x.size() && all; ++i) {
        bool hit = false;
        for (size_t j = 1; j < y.size() && !hit; ++j) hit = acb_overlaps(x[i].get(), y[j].get());
        all = hit;
      }
      any = all;
    }
    if (!any) return false;
  }
  return true;
}

// B against every Galois conjugate of a other than the identity (and the mirror when it was tried): true and r
// filled with the first conjugate found equivalent. Conjugation keeps the label count, R presence and fusion
// rules, so a difference there is not retried.
bool compare_galois(const Model& a, const Model& b, const CompareOptions& opt, CompareResult* r) {
  const std::string& inv = r->differs.invariant;
  if (inv == "label count" || inv == "braiding" || inv == "fusion rules") return false;
  const long N = static_cast<long>(a.field->conductor());
  const int m = a.field->radicand_count();
  const long embeddings = m >= 20 ? -1 : static_cast<long>(euler_phi(a.field->conductor())) << m;
  if (embeddings < 0 || embeddings > opt.max_galois) {
    r->notes.push_back(fmt::format("Galois conjugates of A not tried: its field has more than {} embeddings",
                                   opt.max_galois));
    return false;
  }
  const std::vector<std::vector<Scalar>> ia = label_invariants(a), ib = label_invariants(b);
  for (long k = 1; k <= std::max(N - 1, 1L); ++k) {
    if (std::gcd(k, N) != 1) continue;
    for (RadicalMask s = 0; s < (RadicalMask(1) << m); ++s) {
      if (s == 0 && (k == 1 || (opt.try_mirror && k == N - 1))) continue;
      if (opt.galois_prefilter && !invariants_may_match(ia, ib, k, s)) {
        ++r->galois_excluded;
        continue;
      }
      CompareResult t;
      ++r->galois_tried;
      bool ok = false;
      try {
        Model g = galois_model(a, k, s);
        FieldPtr f = common_field(g, b);
        std::vector<std::string> scratch;
        Side G = prepare(move_to_field(g, f), &scratch, "the conjugate of A");
        Side B = prepare(move_to_field(b, f), &scratch, "B");
        ok = compare_in_field(G, B, opt, &t);
      } catch (const ResourceError& e) {
        // A limit hit by one conjugate (e.g. a larger common field) ends the search but not the comparison.
        r->notes.push_back(fmt::format("Galois conjugates of A: search stopped at k = {}: {}", k, e.what()));
        return false;
      }
      r->relabelings_tried += t.relabelings_tried;
      if (!ok) continue;
      r->relabeling = std::move(t.relabeling);
      r->gauge = std::move(t.gauge);
      r->gauge_explicit = t.gauge_explicit;
      r->gauge_note = std::move(t.gauge_note);
      r->galois_k = k;
      r->galois_signs.clear();
      for (int j = 0; j < m; ++j) r->galois_signs.push_back(s & (RadicalMask(1) << j) ? -1 : 1);
      return true;
    }
  }
  return false;
}

}  // namespace

const char* verdict_name(CompareVerdict v) {
  switch (v) {
    case CompareVerdict::kEquivalent: return "equivalent";
    case CompareVerdict::kEquivalentToMirror: return "equivalent-to-mirror";
    case CompareVerdict::kEquivalentToGaloisConjugate: return "equivalent-to-galois-conjugate";
    default: return "not-equivalent";
  }
}

CompareResult compare_models(const Model& a, const Model& b, const CompareOptions& opt) {
  CompareResult r;
  r.labels_a = a.labels, r.labels_b = b.labels;
  if (a.label_count() != b.label_count()) {
    r.differs = {"label count", "the models have different numbers of labels", std::to_string(a.label_count()),
                 std::to_string(b.label_count()), {}};
    return r;
  }
  if (a.has_r != b.has_r) {
    r.differs = {"braiding", "one model has R-symbols and the other has none", a.has_r ? "R given" : "no R",
                 b.has_r ? "R given" : "no R", {}};
    return r;
  }
  for (const Model* m : {&a, &b})
    for (int x = 0; x < m->label_count(); ++x)
      for (int y = 0; y < m->label_count(); ++y)
        for (int z = 0; z < m->label_count(); ++z)
          if (m->fusion(x, y, z) > 1) throw InputError("compare: fusion multiplicities above 1 are not supported");
  FieldPtr f = common_field(a, b);
  Side A = prepare(move_to_field(a, f), &r.notes, "A");
  Side B = prepare(move_to_field(b, f), &r.notes, "B");
  if (compare_in_field(A, B, opt, &r)) {
    r.verdict = CompareVerdict::kEquivalent;
    return r;
  }
  CompareDiff direct = r.differs;
  if (opt.try_mirror) {
    long tried = r.relabelings_tried;
    Side Ac = prepare(mirror_model(A.m), &r.notes, "the mirror of A");
    const bool mirror = compare_in_field(Ac, B, opt, &r);
    r.relabelings_tried += tried;
    if (mirror) {
      r.verdict = CompareVerdict::kEquivalentToMirror;
      r.differs = {};
      return r;
    }
    r.differs = direct;
  }
  if (opt.try_galois && compare_galois(a, b, opt, &r)) {
    r.verdict = CompareVerdict::kEquivalentToGaloisConjugate;
    r.differs = {};
  }
  return r;
}

}  // namespace zb
