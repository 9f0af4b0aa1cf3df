// Text and JSON renderings of certify results and verify outcomes (cert/render.hpp).
#include "zetabraid/cert/render.hpp"

#include <fmt/format.h>

#include "zetabraid/linalg/render.hpp"

namespace zb {

namespace {

using ojson = nlohmann::ordered_json;

ojson or_null(const std::string& s) { return s.empty() ? ojson(nullptr) : ojson(s); }

}  // namespace

std::string certify_json(const CertifyResult& r, const CertifyFiles& files) {
  ojson leak{{"exact", r.leakage ? ojson(r.leakage->str()) : ojson(nullptr)},
             {"ball", or_null(r.leakage_ball)},
             {"upper", or_null(r.leakage_upper)},
             {"lower", or_null(r.leakage_lower)}};
  if (!r.unitary) leak["note"] = "the leakage value needs a model that claims a unitary gauge";
  ojson out{{"verdict", verdict_name(r.verdict)},
            {"method", method_name(r.method)},
            {"dimension", r.dimension},
            {"kept_dimension", r.kept},
            {"letters", r.letters},
            {"leakage", leak},
            {"action", r.action ? matrix_json(*r.action) : ojson(nullptr)},
            {"precision_bits", r.precision}};
  if (r.method == Method::kInterval) out["accuracy_bits"] = r.accuracy_bits;
  if (r.modular) {
    const ModularZeroResult& z = *r.modular;
    out["proof"] = z.nonzero ? ojson{{"kind", "nonzero-image"}, {"prime", z.witness.p}, {"row", z.row},
                                     {"col", z.col}, {"value", z.value}}
                             : ojson{{"kind", "norm-bound"}, {"primes", z.primes.size()}, {"bound_bits", z.bound_bits}};
  }
  out["certificate"] = or_null(files.certificate);
  return out.dump();
}

std::string certify_text(const CertifyRequest& req, const CertifyResult& r, const CertifyFiles& files) {
  const Model& m = req.model();
  std::string o = fmt::format("fusion space V({}; {}): dimension {}; kept subspace ({}): dimension {}\n",
                              label_names(m, req.anyons()), m.labels[static_cast<size_t>(req.total())], r.dimension,
                              req.keep_kind() == KeepKind::kCharges ? req.keep_spec() : keep_kind_name(req.keep_kind()),
                              r.kept);
  o += fmt::format("word: {} letters; method: {}{}\n", r.letters, method_name(r.method),
                   r.method == Method::kInterval ? fmt::format(" ({} bits)", r.precision) : std::string());
  o += fmt::format("verdict: {}\n", verdict_name(r.verdict));
  if (r.leakage)
    o += fmt::format("leakage ||P_out rho(w) P_in||_F^2 = {}\n  enclosure: {}\n", r.leakage->str(), r.leakage_ball);
  else if (r.method == Method::kExact && !r.unitary)
    o += "leakage value: needs a model that claims a unitary gauge (leak-free was decided exactly)\n";
  if (r.modular) {
    const ModularZeroResult& z = *r.modular;
    if (z.nonzero)
      o += fmt::format("proof: entry ({}, {}) of the leak block is {} != 0 mod p = {} (a ring map, so the entry is "
                       "not 0)\n", z.row, z.col, z.value, z.witness.p);
    else
      o += fmt::format("proof: the leak block vanishes mod {} primes whose product exceeds the norm bound {} "
                       "(a nonzero entry would have a larger norm)\n", z.primes.size(),
                       z.norm_bound.rfind("0*", 0) == 0 ? std::string("0") : fmt::format("2^{}", z.bound_bits));
  }
  if (r.method == Method::kInterval) {
    o += fmt::format("leakage <= {} (rigorous; enclosure {}, {} bits of accuracy)\n", r.leakage_upper,
                     r.leakage_ball, r.accuracy_bits);
    if (!r.leakage_lower.empty()) o += fmt::format("leakage >= {} > 0: the braid leaks\n", r.leakage_lower);
  }
  if (r.action)
    o += fmt::format("induced action on the kept subspace ({} x {}){}:\n{}", r.action->rows(), r.action->cols(),
                     r.verdict == Verdict::kLeakFree ? "" : " (compression P_in rho(w) P_in)",
                     r.kept <= 8 ? matrix_text(*r.action, "  ") : std::string("  (omitted: use --json)\n"));
  if (!files.certificate.empty()) o += fmt::format("certificate written to {}\n", files.certificate);
  if (!files.gp_script.empty()) o += fmt::format("PARI/GP re-check script written to {}\n", files.gp_script);
  return o;
}

std::string verify_text(const VerifyOutcome& v) {
  return v.verified ? fmt::format("VERIFIED: {}\n", v.summary) : fmt::format("REJECTED: {}\n", v.reason);
}

std::string verify_json(const VerifyOutcome& v) {
  return ojson{{"verified", v.verified}, {"reason", v.reason}, {"summary", v.summary}}.dump();
}

}  // namespace zb
