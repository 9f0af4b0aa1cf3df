// Text and JSON renderings of the braid layer's results (braid/render.hpp).
#include "zetabraid/braid/render.hpp"

#include <fmt/format.h>

#include <cstdlib>

#include "zetabraid/linalg/render.hpp"

namespace zb {

namespace {

using ojson = nlohmann::ordered_json;

const std::string& label_of(const Model& m, int label) { return m.labels[static_cast<size_t>(label)]; }

bool irreducible(const BraidReport& r) {
  return static_cast<size_t>(r.algebra_dimension) == r.dimension * r.dimension;
}

}  // namespace

std::string fusion_space_text(const FusionSpace& sp) {
  const Model& m = sp.model();
  std::string o = fmt::format(
      "V({}; {}): dimension {}\nbasis (intermediate charges x1..xn of (((a1 a2 -> x2) a3 -> x3) ...)):\n",
      label_names(m, sp.anyons()), label_of(m, sp.total()), sp.dimension());
  for (size_t i = 0; i < sp.dimension(); ++i) o += fmt::format("  {:4}  {}\n", i + 1, sp.label(i));
  return o;
}

std::string fusion_space_json(const FusionSpace& sp) {
  ojson b = ojson::array();
  for (size_t i = 0; i < sp.dimension(); ++i) b.push_back(sp.label(i));
  return ojson{{"dimension", sp.dimension()}, {"basis", b}}.dump();
}

std::string subspace_text(const FusionSpace& sp, const std::string& spec, const Subspace& s) {
  const Model& m = sp.model();
  std::string o = fmt::format("kept subspace {} of V({}; {}): dimension {} of {}{}\n", spec,
                              label_names(m, sp.anyons()), label_of(m, sp.total()), s.kept(), sp.dimension(),
                              s.coordinate ? " (spanned by tree basis vectors)" : " (columns of the charge projector)");
  if (s.coordinate) {
    for (size_t c : s.coordinates) o += fmt::format("  {:4}  {}\n", c + 1, sp.label(c));
  } else {
    o += "basis vectors (one per line, usable with certify --keep-file):\n";
    Matrix cols = s.basis.transpose();
    for (size_t j = 0; j < cols.rows(); ++j) {
      for (size_t i = 0; i < cols.cols(); ++i) o += (i ? ", " : "") + cols(j, i).str();
      o += "\n";
    }
  }
  return o;
}

std::string subspace_json(const FusionSpace& sp, const Subspace& s) {
  return ojson{{"dimension", sp.dimension()},
               {"kept_dimension", s.kept()},
               {"coordinate", s.coordinate},
               {"basis", matrix_json(s.basis.transpose())}}
      .dump();
}

std::string generator_name(int k) { return fmt::format("s{}{}", std::abs(k), k < 0 ? "^-1" : ""); }

std::string generators_text(const GeneratorMatrices& gens) {
  std::string o;
  for (const auto& [k, mat] : gens)
    o += fmt::format("{} ({} x {}):\n{}", generator_name(k), mat->rows(), mat->cols(), matrix_text(*mat, "  "));
  return o;
}

std::string generators_json(const GeneratorMatrices& gens) {
  ojson out = ojson::array();
  for (const auto& [k, mat] : gens) out.push_back({{"generator", generator_name(k)}, {"matrix", matrix_json(*mat)}});
  return out.dump();
}

std::string braid_report_json(const BraidReport& r) {
  ojson rel = ojson::array();
  for (const auto& x : r.relations) rel.push_back({{"relation", x.name}, {"holds", x.holds}});
  ojson eig = ojson::array();
  for (const auto& e : r.eigen) {
    ojson ev = ojson::array();
    for (const auto& v : e.eigenvalues)
      ev.push_back({{"value", value_json(v.value)}, {"multiplicity", v.multiplicity}, {"source", v.source}});
    eig.push_back({{"generator", fmt::format("s{}{}", e.generator, e.squared ? "^2" : "")},
                   {"eigenvalues", ev},
                   {"complete", e.complete},
                   {"hecke", e.hecke_checked ? ojson(e.hecke_holds) : ojson(nullptr)}});
  }
  ojson out{{"ok", r.ok()}, {"dimension", r.dimension}, {"relations", rel}, {"eigenvalues", eig}};
  out["full_twist"] =
      r.twist_checked ? ojson{{"holds", r.twist_holds}, {"scalar", value_json(*r.twist_expected)}} : ojson(nullptr);
  out["algebra_dimension"] = r.algebra_dimension >= 0 ? ojson(r.algebra_dimension) : ojson(nullptr);
  out["irreducible"] = r.algebra_dimension >= 0 ? ojson(irreducible(r)) : ojson(nullptr);
  return out.dump();
}

std::string braid_report_text(const Model& m, const std::vector<int>& an, int total, const BraidReport& r,
                              const BraidCheckOptions& opt) {
  std::string o = fmt::format("V({}; {}): dimension {}\n", label_names(m, an), label_of(m, total), r.dimension);
  size_t good = 0;
  for (const auto& x : r.relations) good += x.holds;
  o += fmt::format("braid relations: {} of {} hold exactly\n", good, r.relations.size());
  for (const auto& x : r.relations)
    if (!x.holds) o += fmt::format("  FAILS: {}\n", x.name);
  for (const auto& e : r.eigen) {
    o += fmt::format("s{}{}: eigenvalues{}\n", e.generator, e.squared ? "^2" : "",
                     e.complete ? " (diagonalisable, multiplicities add up to the dimension)"
                                : " (INCOMPLETE: multiplicities do not add up)");
    for (const auto& v : e.eigenvalues)
      o += fmt::format("  {} = {}  multiplicity {}   {}\n", v.source, v.value.str(), v.multiplicity,
                       ball_text(v.value, 12));
    if (e.hecke_checked)
      o += fmt::format("  quadratic relation (s - l1)(s - l2) = 0: {}\n", e.hecke_holds ? "holds" : "FAILS");
  }
  if (r.twist_checked)
    o += fmt::format("full twist (s1...s{})^{} = theta_c/theta_a^n = {}: {}\n", an.size() - 1, an.size(),
                     r.twist_expected->str(), r.twist_holds ? "holds" : "FAILS");
  if (r.algebra_dimension < 0 && r.twist_checked)
    o += fmt::format("image algebra: not computed (dimension {} > --algebra-limit {})\n", r.dimension,
                     opt.max_algebra_dimension);
  if (r.algebra_dimension >= 0)
    o += fmt::format("image algebra: dimension {} of {} ({})\n", r.algebra_dimension, r.dimension * r.dimension,
                     irreducible(r) ? "full matrix algebra: irreducible (Burnside)"
                                    : "not the full matrix algebra: reducible (Burnside)");
  o += fmt::format("{}\n", r.ok() ? "all checks hold" : "SOME CHECKS FAIL");
  return o;
}

std::string link_invariant_text(const LinkInvariant& li, long writhe) {
  std::string o = fmt::format("closure: {} component(s), writhe {}\n", li.components, writhe);
  o += fmt::format("quantum trace sum_c d_c tr rho_c(w) (framed): {}\n  enclosure: {}\n", li.quantum_trace.str(),
                   ball_text(li.quantum_trace));
  o += fmt::format("invariant (framing-corrected, unknot = 1): {}\n  enclosure: {}\n", li.invariant.str(),
                   ball_text(li.invariant));
  if (li.components > 1)
    o += fmt::format("total-writhe normalisation theta^-w Q/d: {}\n  enclosure: {}\n", li.writhe_normalised.str(),
                     ball_text(li.writhe_normalised));
  return o;
}

std::string link_invariant_json(const LinkInvariant& li, long writhe) {
  return ojson{{"components", li.components},
               {"writhe", writhe},
               {"quantum_trace", value_json(li.quantum_trace)},
               {"invariant", value_json(li.invariant)},
               {"writhe_normalised", value_json(li.writhe_normalised)}}
      .dump();
}

}  // namespace zb
