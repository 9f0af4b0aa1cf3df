// A certify request: the user's text inputs (model file, anyons, total charge, kept subspace, braid word, method,
// precision, threads), loaded and validated once, carrying everything a run and its certificate speak about.
// Front ends (the CLI's `certify`, future bindings) fill CertifyArguments and call run(); nothing is joined by
// hand outside the library.
#pragma once
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/cert/certify.hpp"

namespace zb {

/// How the kept subspace was given.
enum class KeepKind {
  kAll,      ///< no constraint: the whole fusion space
  kCharges,  ///< total charges of consecutive groups ("1-3:t,4-6:t")
  kVectors,  ///< explicit exact basis vectors read from a keep file
};
/// "all", "charges", "vectors" (the names written in certificates, keep.kind).
std::string keep_kind_name(KeepKind k);

/// The user's inputs as text, exactly as typed (option names in error messages are the CLI's).
struct CertifyArguments {
  std::string model_path;             ///< model file (TOML); written into certificates as given
  std::string anyons;                 ///< anyon labels, e.g. "t t t t t t"
  std::string total;                  ///< total charge label
  std::string keep_spec;              ///< charges of consecutive groups; empty = not given
  std::string keep_file;              ///< file of exact basis vectors; empty = not given
  std::optional<std::string> word;    ///< braid word text (empty text = the trivial word); nullopt = not given
  std::string word_file;              ///< file holding the braid word; empty = not given
  std::string method = "auto";        ///< exact | interval | modular | auto
  std::optional<long> precision;      ///< interval precision in bits, 16..CertifyOptions::max_precision
  std::optional<int> threads;         ///< 1..kMaxThreads; nullopt = all cores (requested_thread_count)
};

/// A loaded, validated request. Movable, not copyable.
class CertifyRequest {
 public:
  /// Validates and loads, in this order (the first problem is reported): a word is given (--word or
  /// --word-file), at most one of --keep / --keep-file, the method name, the precision range, the thread count,
  /// then the model (load_model), anyons, total charge, the word (parse_word, or read_word_file: errors name
  /// FILE:LINE:COLUMN; both given is an error), a nonzero fusion space, the word's generator range, and the
  /// kept subspace (parse_keep + subspace_from_groups, or the keep file read with read_input_file at most
  /// kMaxKeepFileBytes and parsed by subspace_from_text: errors name FILE:LINE). InputError for bad input,
  /// ResourceError for limits.
  explicit CertifyRequest(const CertifyArguments& args);
  ~CertifyRequest();
  CertifyRequest(CertifyRequest&&) noexcept;
  CertifyRequest& operator=(CertifyRequest&&) noexcept;

  const std::string& model_path() const { return model_path_; }
  const Model& model() const { return *model_; }
  const std::vector<int>& anyons() const { return anyons_; }
  int total() const { return total_; }
  const FusionSpace& space() const { return *space_; }
  const Word& word() const { return word_; }
  KeepKind keep_kind() const { return keep_kind_; }
  /// Canonical charge spec (keep_canonical) for KeepKind::kCharges, else empty.
  const std::string& keep_spec() const { return keep_spec_; }
  const Subspace& keep() const { return *keep_; }
  const CertifyOptions& options() const { return options_; }

  /// Certifies the word (cert/certify.hpp).
  CertifyResult run();
  /// What a certificate of a result of this request speaks about (pointers into this request).
  CertificateInputs certificate_inputs() const;
  /// The certificate text of a result of run() (certificate_json, cert/certificate.hpp).
  std::string certificate(const CertifyResult& r) const;
  /// The PARI/GP re-check script of a result of run() (export_gp, cert/certificate.hpp).
  std::string gp_script(const CertifyResult& r) const;

 private:
  std::string model_path_;
  std::unique_ptr<Model> model_;              // heap-held: the generators and the space point into it
  std::unique_ptr<BraidGenerators> gens_;
  std::vector<int> anyons_;
  int total_ = 0;
  const FusionSpace* space_ = nullptr;        // owned by gens_
  Word word_;
  KeepKind keep_kind_ = KeepKind::kAll;
  std::string keep_spec_;
  std::optional<Subspace> keep_;            // always set after construction
  CertifyOptions options_;
};

}  // namespace zb
