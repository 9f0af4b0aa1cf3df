// Certificates of braid-word verdicts: writing (deterministic JSON, format specified in
// docs/certificate-format.md) and the independent re-check (`zetabraid verify`).
#pragma once
#include <string>

#include "zetabraid/cert/certify.hpp"
#include "zetabraid/io/sha256.hpp"

namespace zb {

/// Lower-case hex SHA-256 of a file's bytes (sha256_hex, io/sha256.hpp). InputError when unreadable.
std::string sha256_file(const std::string& path);
/// Whole file as bytes; InputError naming the file when unreadable.
std::string read_file_bytes(const std::string& path);

/// Everything a certificate speaks about.
struct CertificateInputs {
  std::string model_path;        ///< as given (the checker resolves it relative to the cwd, then the cert's folder)
  const Model* model = nullptr;
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

struct VerifyOutcome {
  bool verified = false;
  std::string reason;    ///< why it was rejected (empty when verified)
  std::string summary;   ///< what was verified, e.g. "leaks, leakage = ... (exact)"
};

/// Re-checks a certificate through code that shares no product routine with the producer: its own generator
/// action (from F and R directly), its own straightforward exact product, ball product and modular images, its
/// own leakage formula. `model_override` replaces the model path stored in the certificate. `via` picks how
/// an exact certificate's image is re-checked: "exact" (left-to-right in the number field) or "modular"
/// (images at the checker's own primes with a norm bound); modular certificates are always re-checked by
/// images. Never throws for bad content (returns a rejection); throws InputError only when the certificate file
/// itself is unreadable or `via` is unknown.
VerifyOutcome verify_certificate(const std::string& cert_path, const std::string& model_override = "",
                                 const std::string& via = "exact");

/// A self-contained PARI/GP script that rebuilds the generators from the model's F- and R-symbols, multiplies
/// the word, and checks the claim exactly. Prints "zetabraid-gp: verified" or "zetabraid-gp: REJECTED ...".
std::string export_gp(const CertificateInputs& in, const CertifyResult& r);

}  // namespace zb
