// Renderings of the certificate layer's results, for people (text lines) and programs (one JSON object), in one
// place: certify results and the checker's verify outcome. Presentation only; naming as in model/render.hpp.
// (The certificate itself is a format, not a rendering: cert/certificate.hpp.)
#pragma once
#include <string>

#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/cert/request.hpp"

namespace zb {

/// Files written for a certify run (empty = not written); named in the rendering.
struct CertifyFiles {
  std::string certificate;  ///< certificate (JSON)
  std::string gp_script;    ///< PARI/GP re-check script
};

/// A certify result of `req`. JSON keys: verdict, method, dimension, kept_dimension, letters,
/// leakage {exact, ball, upper, lower[, note]}, action, precision_bits, [accuracy_bits (interval),]
/// [proof (modular): {kind: "nonzero-image", prime, row, col, value} or {kind: "norm-bound", primes, bound_bits},]
/// certificate (path or null).
std::string certify_text(const CertifyRequest& req, const CertifyResult& r, const CertifyFiles& files = {});
std::string certify_json(const CertifyResult& r, const CertifyFiles& files = {});

/// The outcome of verify_certificate: "VERIFIED: summary" or "REJECTED: reason". JSON keys: verified, reason,
/// summary.
std::string verify_text(const VerifyOutcome& v);
std::string verify_json(const VerifyOutcome& v);

}  // namespace zb
