// The independent certificate checker behind `zetabraid verify` (docs/certificate-format.md, section 7).
//
// A separate house: everything under cert/checker/ includes only the trusted base listed in section 7 (the exact
// field, Matrix, the modular base, the model loader, io/, detail/, error.hpp, cert/verdict.hpp) and never a
// producer header (no braid/, no word products, no modular_zero_test, no certify.hpp); tests/cert/test_verify.cpp
// enforces this from the #include lines. The checker rebuilds the letters from F and R itself, multiplies words
// its own way (exactly, in balls, or modulo primes with its own norm bound), recomputes the kept subspace by its
// own route and computes the leakage by its own formula.
//
// Every byte of a certificate is untrusted: any deviation from the documented format (unknown or missing or
// duplicate keys, numbers out of range, malformed decimals) is a rejection, never a crash.
#pragma once
#include <string>

namespace zb {

/// How an exact certificate's image hint is re-checked.
enum class RecheckRoute {
  kExact,    ///< left-to-right in the number field
  kModular,  ///< images at the checker's own primes with its own norm bound
};
/// "exact", "modular".
std::string route_name(RecheckRoute r);
/// The route named exactly `s`; InputError (exit 2) otherwise.
RecheckRoute parse_route(const std::string& s);

struct VerifyOptions {
  /// Model file to use instead of model.file of the certificate. Without it, model.file must be a relative path
  /// without "..": it is looked up in the certificate's folder, then in the current directory.
  std::string model_override;
  RecheckRoute route = RecheckRoute::kExact;  ///< exact certificates only; modular ones always use images
  /// Interval certificates: propagate with a plain left-to-right ball product even when every letter is exactly
  /// unitary (by default: midpoints with one rigorous 2-norm error bound per column). For cross-checks.
  bool plain_interval = false;
};

struct VerifyOutcome {
  bool verified = false;
  std::string reason;    ///< why it was rejected (empty when verified); control characters escaped
  std::string summary;   ///< what was verified, e.g. "leaks, leakage = ... (exact)"; control characters escaped
};

/// Re-checks a certificate. Returns a rejection (never throws) for any content problem: a false claim, a
/// malformed or out-of-range field, a model whose hash differs. Throws InputError (exit 2) when the certificate or
/// the model cannot be read (missing, not a regular file, too large: io/input_file.hpp limits), or when model.file
/// is absolute or leaves the certificate's folder and no model_override is given; ResourceError (exit 3) when a
/// limit of the checker is reached.
VerifyOutcome verify_certificate(const std::string& cert_path, const VerifyOptions& options = {});

}  // namespace zb
