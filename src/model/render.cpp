// Text and JSON renderings of model check reports and invariants (model/render.hpp).
#include "zetabraid/model/render.hpp"

#include <fmt/format.h>

#include <cmath>

#include "zetabraid/io/input_file.hpp"
#include "zetabraid/linalg/render.hpp"

namespace zb {

namespace {

using ojson = nlohmann::ordered_json;

// Invariants print their enclosures at digits * 3.33 + 16 bits (kept for byte-identical output).
constexpr long kInvariantGuardBits = 16;

ojson num(const Scalar& s, long digits) { return value_json(s, digits, kInvariantGuardBits); }
ojson num_int(const FieldPtr& f, long v, long digits) { return num(Scalar(f, v), digits); }

// The ranked suspects of a failed check, with their one-entry repairs.
std::string suspects_text(const std::string& path, const CheckReport& rep) {
  std::string o;
  if (!rep.suspects.empty()) o += "suspects (most failing equations first, then fewest passing ones):\n";
  for (const Suspect& s : rep.suspects) {
    std::string at = s.line ? fmt::format("{}:{}", printable(path), s.line) : printable(path);
    o += fmt::format("  {} ({}): in {} failing and {} passing equations\n", s.symbol, at, s.failures, s.passes);
    if (!s.repair.empty())
      o += fmt::format("    {} on {} should be {}\n", s.symbol, s.line ? fmt::format("line {}", s.line) : "an unknown line",
                       s.repair);
    else
      o += "    no single value of this entry makes every equation involving it hold\n";
  }
  if (!rep.suspects_note.empty()) o += "suspects not computed: " + rep.suspects_note + "\n";
  return o;
}

}  // namespace

std::string check_report_json(const Model& m, const std::string& path, const CheckReport& rep) {
  ojson j;
  j["ok"] = rep.ok;
  j["model"] = m.name;
  j["file"] = path;
  ojson checks = ojson::object();
  for (const CheckCount& c : rep.checks) {
    ojson x{{"count", c.count}, {"failed", c.failed}};
    if (c.skipped) x["skipped"] = true;
    if (!c.note.empty()) x["note"] = c.note;
    if (c.not_checked) x["not_checked"] = c.not_checked;
    checks[c.name] = x;
  }
  j["checks"] = checks;
  ojson fl = ojson::array();
  for (const CheckFailure& f : rep.failures) {
    ojson x{{"check", f.check}, {"labels", f.where}, {"condition", f.what}};
    if (!f.residual.empty()) x["residual"] = {{"exact", f.residual}, {"ball", f.residual_ball}};
    if (f.line) x["line"] = f.line;
    if (!f.lines.empty()) x["lines"] = f.lines;
    fl.push_back(x);
  }
  j["failures"] = fl;
  if (!rep.ok) {
    ojson su = ojson::array();
    for (const Suspect& s : rep.suspects)
      su.push_back(ojson{{"symbol", s.symbol},
                         {"line", s.line ? ojson(s.line) : ojson(nullptr)},
                         {"failures", s.failures},
                         {"passes", s.passes},
                         {"repair", s.repair.empty() ? ojson(nullptr) : ojson(s.repair)}});
    j["suspects"] = su;
    if (!rep.suspects_note.empty()) j["suspects_note"] = rep.suspects_note;
  }
  if (!rep.missing.empty()) {
    ojson mi = ojson::array();
    for (const MissingSymbol& s : rep.missing) mi.push_back(ojson{{"symbol", s.symbol}, {"needed_by", s.needed_by}});
    j["missing"] = mi;
  }
  j["exact"] = true;
  j["seconds"] = std::round(rep.seconds * 1000.0) / 1000.0;
  return j.dump();
}

std::string check_report_text(const Model& m, const std::string& path, const CheckReport& rep) {
  std::string o = fmt::format("model {} ({}): {}\n", printable(m.name.empty() ? path : m.name), printable(path),
                              rep.ok ? "consistent: every check holds exactly" : "NOT consistent");
  for (const CheckCount& c : rep.checks) {
    if (c.skipped)
      o += fmt::format("  {:<22} skipped: {}\n", c.name, c.note);
    else
      o += fmt::format("  {:<22} {:>10} checked exactly, {} failed{}\n", c.name, c.count, c.failed,
                       c.not_checked ? fmt::format(", {} not checked (symbols missing)", c.not_checked) : "");
  }
  for (const MissingSymbol& s : rep.missing)
    o += fmt::format("MISSING {}: not in the file; {} equations that need it were not checked\n", s.symbol,
                     s.needed_by);
  for (const CheckFailure& f : rep.failures) {
    o += fmt::format("FAILED {}: {}{}\n  {}\n", f.check, f.where, f.line ? fmt::format(" ({}:{})", path, f.line) : "",
                     f.what);
    if (!f.residual.empty()) o += fmt::format("  residual = {}\n  residual lies in {}\n", f.residual, f.residual_ball);
  }
  o += suspects_text(path, rep);
  o += fmt::format("  ({:.2f} s)\n", rep.seconds);
  long listed = static_cast<long>(rep.failures.size()), total = 0;
  for (const CheckCount& c : rep.checks) total += c.failed;
  if (total > listed) o += fmt::format("  ({} failures in all; the first ones of each check are listed)\n", total);
  return o;
}

std::string model_info_refusal(const Model& m, const std::string& path, const CheckReport& rep) {
  std::string o = fmt::format(
      "model info: {} ({}) fails model check, so its invariants would be computed from inconsistent data; run "
      "`zetabraid model check` for the full report, or pass --unchecked\n",
      printable(m.name.empty() ? path : m.name), printable(path));
  for (const CheckFailure& f : rep.failures) {
    o += fmt::format("first failure: {}: {}{}\n  {}\n", f.check, f.where,
                     f.line ? fmt::format(" ({}:{})", printable(path), f.line) : "", f.what);
    break;
  }
  for (const MissingSymbol& s : rep.missing) {
    o += fmt::format("missing: {}\n", s.symbol);
    break;
  }
  return o;
}

std::string invariants_json(const Model& m, const Invariants& inv, long digits, bool verified) {
  const FieldPtr& F = m.field;
  ojson j;
  j["model"] = m.name;
  j["labels"] = m.labels;
  ojson dims = ojson::array();
  for (const Scalar& d : inv.dims) dims.push_back(num(d, digits));
  j["dimensions"] = dims;
  j["global_dimension_squared"] = num(inv.global_dim2, digits);
  j["global_dimension"] = num(inv.global_dim, digits);
  ojson fs = ojson::array();
  for (int v : inv.fs) fs.push_back(num_int(F, v, digits));
  j["fs_indicators"] = fs;
  ojson tw = ojson::array();
  for (const Scalar& t : inv.twists) tw.push_back(num(t, digits));
  j["twists"] = inv.braided ? tw : ojson(nullptr);
  auto mat = [&](const std::optional<Matrix>& M) {
    if (!M) return ojson(nullptr);
    ojson rows = ojson::array();
    for (size_t a = 0; a < M->rows(); ++a) {
      ojson row = ojson::array();
      for (size_t b = 0; b < M->cols(); ++b) row.push_back(num((*M)(a, b), digits));
      rows.push_back(row);
    }
    return rows;
  };
  j["S"] = mat(inv.S);
  j["T"] = mat(inv.T);
  if (inv.braided) {
    j["gauss_sum"] = num(inv.gauss_plus, digits);
    j["gauss_phase"] = num(inv.gauss_phase, digits);
  }
  if (inv.central_charge_known) {
    std::string exact = inv.c_den == 1 ? std::to_string(inv.c_num) : fmt::format("{}/{}", inv.c_num, inv.c_den);
    Scalar c(F, Cyclo(F->cyclotomic(), inv.c_num, inv.c_den));
    j["central_charge_mod8"] = ojson{{"exact", exact}, {"ball", ball_text(c, digits, kInvariantGuardBits)}};
  } else {
    j["central_charge_mod8"] = nullptr;
  }
  j["modular"] = inv.modular;
  j["verlinde"] = ojson{{"ok", inv.verlinde_ok}, {"checked", inv.verlinde_checked}};
  if (inv.modular) j["fs_twist_formula_ok"] = inv.fs_twist_formula_ok;
  j["notes"] = inv.notes;
  if (!verified) j["verified"] = false;
  return j.dump();
}

std::string invariants_text(const Model& m, const Invariants& inv, long digits, bool verified) {
  std::string o = fmt::format("model {}: exact invariants (each enclosure is a rigorous ball)\n", printable(m.name));
  if (!verified)
    o += "  WARNING: verified: false -- the data fail model check; every value below is computed from unverified "
         "data\n";
  const std::string mark = verified ? "" : "  [unverified]";
  auto line = [&](const std::string& what, const Scalar& s) {
    o += fmt::format("  {:<24} {}{}\n  {:<24}   in {}\n", what, s.str(), mark, "",
                     ball_text(s, digits, kInvariantGuardBits));
  };
  const int n = m.label_count();
  for (int a = 0; a < n; ++a) line("d_" + m.labels[a], inv.dims[static_cast<size_t>(a)]);
  line("D^2", inv.global_dim2);
  line("D", inv.global_dim);
  for (int a = 0; a < n; ++a)
    o += fmt::format("  {:<24} {}{}\n", "nu_" + m.labels[a] + " (FS indicator)", inv.fs[a], mark);
  if (inv.braided) {
    for (int a = 0; a < n; ++a) line("theta_" + m.labels[a], inv.twists[static_cast<size_t>(a)]);
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        line(fmt::format("S[{},{}]", m.labels[a], m.labels[b]), (*inv.S)(static_cast<size_t>(a), static_cast<size_t>(b)));
    line("p_+ (Gauss sum)", inv.gauss_plus);
    line("p_+/D", inv.gauss_phase);
    o += fmt::format("  modular (S invertible)   {}\n", inv.modular ? "yes" : "no");
    if (inv.central_charge_known)
      o += fmt::format("  central charge mod 8     {}{}\n",
                       inv.c_den == 1 ? std::to_string(inv.c_num) : fmt::format("{}/{}", inv.c_num, inv.c_den), mark);
    if (inv.modular)
      o += fmt::format("  Verlinde formula         {} ({} fusion coefficients compared exactly)\n",
                       inv.verlinde_ok ? "reproduces N" : "does NOT reproduce N", inv.verlinde_checked);
  }
  for (const std::string& s : inv.notes) o += "  note: " + s + "\n";
  return o;
}

std::string compare_json(const CompareResult& r, const std::string& path_a, const std::string& path_b) {
  ojson j;
  j["verdict"] = verdict_name(r.verdict);
  j["file_a"] = path_a;
  j["file_b"] = path_b;
  if (r.verdict != CompareVerdict::kNotEquivalent) {
    ojson rl = ojson::object();
    for (size_t a = 0; a < r.relabeling.size(); ++a)
      rl[r.labels_a[a]] = r.labels_b[static_cast<size_t>(r.relabeling[a])];
    j["relabeling"] = rl;
    ojson g = ojson::array();
    for (const GaugeValue& v : r.gauge) g.push_back({{"vertex", v.vertex}, {"u", v.value}});
    if (r.gauge_explicit) j["gauge"] = g;
    if (!r.gauge_note.empty()) j["gauge_note"] = r.gauge_note;
    if (r.verdict == CompareVerdict::kEquivalentToGaloisConjugate)
      j["galois"] = {{"k", r.galois_k}, {"signs", r.galois_signs}};
  } else {
    ojson d{{"invariant", r.differs.invariant}, {"detail", r.differs.detail}, {"a", r.differs.value_a},
            {"b", r.differs.value_b}};
    if (!r.differs.loop.empty()) {
      ojson l = ojson::array();
      for (const LoopFactor& f : r.differs.loop) l.push_back({{"entry", f.entry}, {"exponent", f.exponent}, {"ratio", f.ratio}});
      d["loop"] = l;
    }
    j["differs"] = d;
  }
  j["relabelings_tried"] = r.relabelings_tried;
  if (r.galois_tried || r.galois_excluded)
    j["galois_conjugates"] = {{"tried", r.galois_tried}, {"excluded_by_invariants", r.galois_excluded}};
  j["notes"] = r.notes;
  j["exact"] = true;
  return j.dump();
}

std::string compare_text(const CompareResult& r, const std::string& path_a, const std::string& path_b) {
  std::string o = fmt::format("A = {}, B = {}: {}\n", printable(path_a), printable(path_b), verdict_name(r.verdict));
  if (r.verdict == CompareVerdict::kEquivalentToMirror)
    o += "  B is gauge equivalent to the complex conjugate (mirror) of A, not to A\n";
  if (r.verdict == CompareVerdict::kEquivalentToGaloisConjugate) {
    std::string signs;
    for (size_t j = 0; j < r.galois_signs.size(); ++j)
      signs += fmt::format("{}{}", j ? ", " : "", r.galois_signs[j] > 0 ? "+" : "-");
    o += fmt::format("  B is gauge equivalent to the Galois conjugate of A under zeta -> zeta^{}{}, not to A (nor to "
                     "its mirror); relabelling and gauge below take that conjugate to B\n",
                     r.galois_k, signs.empty() ? "" : ", sqrt(d_j) -> (" + signs + ") sqrt(sigma(d_j))");
  }
  if (r.verdict != CompareVerdict::kNotEquivalent) {
    std::string rl;
    for (size_t a = 0; a < r.relabeling.size(); ++a)
      rl += fmt::format("{}{} -> {}", a ? ", " : "", printable(r.labels_a[a]),
                        printable(r.labels_b[static_cast<size_t>(r.relabeling[a])]));
    o += "  relabelling (A -> B): " + rl + "\n";
    if (r.gauge_explicit) {
      o += fmt::format("  gauge (u^{{ab}}_c taking A to B; {} vertices differ from 1, checked by applying it):\n",
                       r.gauge.size());
      for (const GaugeValue& v : r.gauge) o += fmt::format("    u[{}] = {}\n", printable(v.vertex), v.value);
    } else if (!r.gauge_note.empty()) {
      o += "  gauge: " + r.gauge_note + "\n";
    }
  } else {
    o += fmt::format("  differs: {}: {}\n    A: {}\n    B: {}\n", r.differs.invariant, printable(r.differs.detail),
                     printable(r.differs.value_a), printable(r.differs.value_b));
    for (const LoopFactor& f : r.differs.loop)
      o += fmt::format("    factor ({})^{} with B/A = {}\n", printable(f.entry), f.exponent, f.ratio);
  }
  for (const std::string& n : r.notes) o += "  note: " + printable(n) + "\n";
  return o;
}

}  // namespace zb
