// A certify request: the user's text inputs loaded and validated once (cert/request.hpp).
#include "zetabraid/cert/request.hpp"

#include <fmt/format.h>

#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/load.hpp"

namespace zb {

std::string keep_kind_name(KeepKind k) {
  switch (k) {
    case KeepKind::kAll: return "all";
    case KeepKind::kCharges: return "charges";
    case KeepKind::kVectors: return "vectors";
  }
  return "?";
}

namespace {

// The options of a request, checked before anything is loaded.
CertifyOptions checked_options(const CertifyArguments& a) {
  if (!a.word && a.word_file.empty()) throw InputError("give the braid word with --word or --word-file");
  if (!a.keep_spec.empty() && !a.keep_file.empty()) throw InputError("give --keep or --keep-file, not both");
  CertifyOptions opt;
  opt.method = parse_method(a.method);
  if (a.precision && (*a.precision < 16 || *a.precision > opt.max_precision))
    throw InputError(fmt::format("--precision must be {}..{} bits, got {}", 16, opt.max_precision, *a.precision));
  opt.precision = a.precision.value_or(0);
  opt.threads = requested_thread_count(a.threads);
  return opt;
}

Word read_request_word(const CertifyArguments& a) {
  if (a.word && !a.word_file.empty()) throw InputError("give --word or --word-file, not both");
  if (a.word) return parse_word(*a.word);
  return read_word_file(a.word_file);  // comments, blanks, limits; errors name FILE:LINE:COLUMN
}

}  // namespace

CertifyRequest::CertifyRequest(const CertifyArguments& a) : model_path_(a.model_path), options_(checked_options(a)) {
  model_ = std::make_unique<Model>(load_model(a.model_path));
  const Model& m = *model_;
  anyons_ = parse_anyons(m, a.anyons);
  total_ = parse_label(m, a.total, "total charge");
  word_ = read_request_word(a);
  gens_ = std::make_unique<BraidGenerators>(m, total_);
  space_ = &gens_->space(anyons_);
  space_->require_nonzero();
  word_.check_range(static_cast<int>(anyons_.size()));
  if (!a.keep_spec.empty()) {
    auto groups = parse_keep(m, a.keep_spec, static_cast<int>(anyons_.size()));
    keep_ = subspace_from_groups(*space_, groups);
    keep_kind_ = KeepKind::kCharges;
    keep_spec_ = keep_canonical(m, groups);
  } else if (!a.keep_file.empty()) {
    keep_ = subspace_from_text(*space_, read_input_file(a.keep_file, kMaxKeepFileBytes, "keep file"), a.keep_file);
    keep_kind_ = KeepKind::kVectors;
  } else {
    keep_ = whole_space(*space_);
    keep_kind_ = KeepKind::kAll;
  }
}

CertifyRequest::~CertifyRequest() = default;
CertifyRequest::CertifyRequest(CertifyRequest&&) noexcept = default;
CertifyRequest& CertifyRequest::operator=(CertifyRequest&&) noexcept = default;

CertifyResult CertifyRequest::run() { return certify(*gens_, anyons_, *keep_, word_, options_); }

CertificateInputs CertifyRequest::certificate_inputs() const {
  return CertificateInputs{model_path_, model_.get(),  anyons_,  total_, keep_kind_name(keep_kind_),
                           keep_spec_,  &*keep_,       space_,   &word_};
}

std::string CertifyRequest::certificate(const CertifyResult& r) const {
  return certificate_json(certificate_inputs(), r);
}

std::string CertifyRequest::gp_script(const CertifyResult& r) const { return export_gp(certificate_inputs(), r); }

}  // namespace zb
