// Certificates of braid-word verdicts (the producer's side): writing (deterministic JSON, format specified in
// docs/certificate-format.md) and the PARI/GP export. The independent re-check is cert/checker/verify.hpp.
#pragma once
#include <string>

#include "zetabraid/cert/certify.hpp"
#include "zetabraid/io/sha256.hpp"

namespace zb {

/// Everything a certificate speaks about.
struct CertificateInputs {
  std::string model_path;        ///< as given (the checker looks beside the certificate, then in the cwd)
  const Model* model = nullptr;  ///< loaded from a file: its source_sha256 is the hash written (the bytes parsed)
  std::vector<int> anyons;
  int total = 0;
  std::string keep_kind;         ///< "charges" (spec), "vectors" (explicit basis) or "all"
  std::string keep_spec;         ///< canonical charge spec ("1-3:t,4-6:t") for "charges"
  const Subspace* keep = nullptr;
  const FusionSpace* space = nullptr;
  const Word* word = nullptr;
};

/// The certificate text (JSON, 2-space indentation, fixed key order, trailing newline).
std::string certificate_json(const CertificateInputs& in, const CertifyResult& r);

// The independent re-check of a certificate: cert/checker/verify.hpp.

/// A self-contained PARI/GP script that rebuilds the generators from the model's F- and R-symbols, multiplies
/// the word, and checks the claim exactly. Prints "zetabraid-gp: verified" or "zetabraid-gp: REJECTED ...".
std::string export_gp(const CertificateInputs& in, const CertifyResult& r);

}  // namespace zb
