// Certificate writing (deterministic bytes) and hashing.
#include "zetabraid/cert/certificate.hpp"

#include <fmt/format.h>

#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/render.hpp"

namespace zb {

using ojson = nlohmann::ordered_json;


namespace {

// The SHA-256 of the bytes the model was parsed from (never a second read of the file, which could have changed).
std::string model_sha256(const CertificateInputs& in) {
  if (!in.model->source_sha256.empty()) return in.model->source_sha256;
  throw InputError("a certificate needs a model loaded from a file (its SHA-256 is recorded when it is parsed)");
}


ojson matrix_columns(const Matrix& m) { return matrix_json(m.transpose()); }

ojson or_null(const std::string& s) { return s.empty() ? ojson(nullptr) : ojson(s); }

ojson prime_json(const ModularPrime& q) {
  ojson roots = ojson::array();
  for (ulong r : q.roots) roots.push_back(r);
  return {{"p", q.p}, {"zeta", q.zeta}, {"roots", roots}};
}

// What backs the verdict (section 6 of docs/certificate-format.md).
ojson proof_json(const CertifyResult& r) {
  if (r.method == Method::kExact) return {{"kind", "exact-engine"}};
  if (r.method == Method::kInterval) return {{"kind", "interval"}};
  const ModularZeroResult& z = *r.modular;
  if (z.nonzero)
    return {{"kind", "nonzero-image"}, {"prime", prime_json(z.witness)}, {"row", z.row}, {"col", z.col},
            {"value", z.value}};
  ojson primes = ojson::array();
  for (const auto& q : z.primes) primes.push_back(prime_json(q));
  return {{"kind", "norm-bound"}, {"multiplier", z.multiplier}, {"norm_bound", z.norm_bound},
          {"bound_bits", z.bound_bits}, {"primes", primes}};
}

}  // namespace

std::string certificate_json(const CertificateInputs& in, const CertifyResult& r) {
  const Model& m = *in.model;
  ojson c;
  c["format"] = "zetabraid-certificate";
  c["version"] = 2;
  c["model"] = {{"file", in.model_path}, {"sha256", model_sha256(in)}, {"name", m.name},
                {"unitary", m.claims_unitary}};
  ojson rad = ojson::array();
  for (int j = 0; j < m.field->radicand_count(); ++j) rad.push_back(m.field->radicand(j).str());
  c["field"] = {{"conductor", m.field->conductor()}, {"radicands", rad}};
  ojson anyons = ojson::array();
  for (int a : in.anyons) anyons.push_back(m.labels[static_cast<size_t>(a)]);
  ojson basis = ojson::array();
  for (size_t i = 0; i < in.space->dimension(); ++i) basis.push_back(in.space->label(i));
  c["space"] = {{"anyons", anyons},
                {"total", m.labels[static_cast<size_t>(in.total)]},
                {"dimension", in.space->dimension()},
                {"basis", basis}};
  c["keep"] = {{"kind", in.keep_kind},
               {"spec", or_null(in.keep_spec)},
               {"dimension", in.keep->kept()},
               {"basis", matrix_columns(in.keep->basis)}};
  c["word"] = {{"letters", in.word->canonical()}, {"length", in.word->size()}};
  ojson leak;
  leak["exact"] = r.leakage ? ojson(r.leakage->str()) : ojson(nullptr);
  leak["ball"] = or_null(r.leakage_ball);
  leak["upper"] = or_null(r.leakage_upper);
  leak["lower"] = or_null(r.leakage_lower);
  c["claim"] = {{"verdict", verdict_name(r.verdict)}, {"leakage", leak}};
  c["method"] = {{"name", method_name(r.method)}, {"precision_bits", r.precision}};
  c["hints"] = {{"image", r.image ? matrix_json(*r.image) : ojson(nullptr)},
                {"action", r.action ? matrix_json(*r.action) : ojson(nullptr)}};
  c["proof"] = proof_json(r);
  return c.dump(2) + "\n";
}

}  // namespace zb
