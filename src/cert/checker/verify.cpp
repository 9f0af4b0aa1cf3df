// The dispatcher of the independent checker: reads the certificate (bounded), checks its top-level shape, reads
// the inputs, and hands the claim to the path of its method (exact_path.cpp, interval_path.cpp,
// modular_path.cpp). The only place where rejections become a VerifyOutcome and unreadable files an InputError.
#include "zetabraid/cert/checker/verify.hpp"

#include <fmt/format.h>

#include "checker.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"

namespace zb {

std::string route_name(RecheckRoute r) { return r == RecheckRoute::kModular ? "modular" : "exact"; }

RecheckRoute parse_route(const std::string& s) {
  if (s == "exact") return RecheckRoute::kExact;
  if (s == "modular") return RecheckRoute::kModular;
  throw InputError(fmt::format("--via must be exact or modular (got \"{}\")", printable(s)));
}

namespace checker {
namespace {

const std::set<std::string> kTopKeys1 = {"format", "version", "model", "field", "space",
                                         "keep",   "word",    "claim", "method", "hints"};

// Top-level keys, format, version; returns the version.
long check_shape(const json& c) {
  if (!c.is_object()) reject("the certificate is not a JSON object");
  std::set<std::string> keys = kTopKeys1;
  // the version decides whether "proof" belongs: read it first when it is there
  long version = 2;
  if (c.contains("version")) {
    if (!c["version"].is_number_integer() || (c["version"].get<long>() != 1 && c["version"].get<long>() != 2))
      reject("unsupported version (this checker reads versions 1 and 2)");
    version = c["version"].get<long>();
  }
  if (version >= 2) keys.insert("proof");
  expect_keys(c, keys, "the certificate");
  if (c["format"] != "zetabraid-certificate") reject("format is not \"zetabraid-certificate\"");
  if (version >= 2 && (!c["proof"].is_object() || !c["proof"].contains("kind")))
    reject("proof must be an object with a kind");
  expect_keys(c["claim"], {"verdict", "leakage"}, "claim");
  expect_keys(c["claim"]["leakage"], {"exact", "ball", "upper", "lower"}, "claim.leakage");
  expect_keys(c["method"], {"name", "precision_bits"}, "method");
  expect_keys(c["hints"], {"image", "action"}, "hints");
  return version;
}

std::string check(const json& c, const std::string& cert_path, const VerifyOptions& opt) {
  const long version = check_shape(c);
  const std::string verdict_text = str_of(c["claim"]["verdict"], "claim.verdict");
  const std::optional<Verdict> claim = parse_verdict(verdict_text);
  if (!claim) reject("claim.verdict must be \"leak-free\", \"leaks\" or \"leakage-bounded\"");
  const std::string method = str_of(c["method"]["name"], "method.name");
  if (method != "exact" && method != "interval" && method != "modular")
    reject("method.name must be \"exact\", \"interval\" or \"modular\"");
  const long prec = static_cast<long>(uint_of(c["method"]["precision_bits"], "method.precision_bits", 1u << 20));
  Inputs x;
  read_inputs(&x, c, cert_path, opt);
  if (method == "modular") {
    if (version < 2) reject("method \"modular\" needs certificate version 2");
    return check_modular(x, c, *claim, prec);
  }
  if (version >= 2) {
    const std::string want = method == "exact" ? "exact-engine" : "interval";
    expect_keys(c["proof"], {"kind"}, "proof");
    if (c["proof"]["kind"] != want)
      reject(fmt::format("proof.kind of an {} certificate must be \"{}\"", method, want));
  }
  if (method == "exact") {
    if (prec != 128) reject("method.precision_bits of an exact certificate must be 128 (the enclosure precision)");
    return check_exact(x, c, *claim, opt.route);
  }
  return check_interval(x, c, *claim, prec, opt.plain_interval);
}

}  // namespace
}  // namespace checker

VerifyOutcome verify_certificate(const std::string& cert_path, const VerifyOptions& opt) {
  // unreadable, not a regular file, or over the size limit: an input error (exit 2), not a rejection
  const std::string text = read_input_file(cert_path, kMaxCertificateFileBytes, "certificate");
  try {
    const checker::json c = checker::parse_strict(text);
    return {true, "", printable(checker::check(c, cert_path, opt))};
  } catch (const checker::Reject& r) {
    return {false, printable(r.why), ""};
  } catch (const checker::Unreadable& u) {
    throw InputError(u.why);
  } catch (const ResourceError&) {
    throw;
  } catch (const std::bad_alloc&) {
    throw;
  } catch (const std::exception& e) {
    return {false, printable(fmt::format("error while checking: {}", e.what())), ""};
  }
}

}  // namespace zb
