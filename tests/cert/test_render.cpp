// Renderings of certify results and verify outcomes (cert/render.hpp): JSON keys in their documented order
// (README "certify --json"; the format the CLI printed before the renderings moved into the library) and the
// text lines people read. Oracle for the verdicts: the Fibonacci two-qubit register (common practice: anyons
// 1-3 and 4-6 of total charge t; s1, s2 act inside qubit A, s3 exchanges anyons of both qubits and leaks).
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/helpers.hpp"
#include "zetabraid/cert/render.hpp"

using namespace zb;

namespace {

std::vector<std::string> keys_of(const std::string& json_text) {
  std::vector<std::string> k;
  const auto j = nlohmann::ordered_json::parse(json_text);  // named: items() refers into it
  for (const auto& [key, value] : j.items()) k.push_back(key);
  return k;
}

CertifyRequest fib_request(const std::string& word, const std::string& method) {
  CertifyArguments a;
  a.model_path = zbtest::source_dir() + "/models/fibonacci.toml";
  a.anyons = "t t t t t t";
  a.total = "1";
  a.keep_spec = "1-3:t,4-6:t";
  a.word = word;
  a.method = method;
  a.threads = 1;
  return CertifyRequest(a);
}

}  // namespace

TEST_CASE("certify_json: keys in order for each method; the certificate path or null") {
  const std::vector<std::string> base{"verdict", "method",  "dimension",      "kept_dimension",
                                      "letters", "leakage", "action",         "precision_bits"};
  CertifyRequest exact = fib_request("s3 s2 s3^-1", "exact");
  CertifyResult r = exact.run();
  std::vector<std::string> want = base;
  want.push_back("certificate");
  CHECK(keys_of(certify_json(r)) == want);
  auto j = nlohmann::ordered_json::parse(certify_json(r, {"c.json", "c.gp"}));
  CHECK(j["verdict"] == "leaks");
  CHECK(j["certificate"] == "c.json");
  CHECK(j["dimension"] == 5);
  CHECK(j["kept_dimension"] == 4);
  CHECK(nlohmann::json::parse(certify_json(r))["certificate"].is_null());
  CHECK(keys_of(j["leakage"].dump()) == std::vector<std::string>{"exact", "ball", "upper", "lower"});

  CertifyRequest interval = fib_request("s1 s2^-1 s1", "interval");
  want = base;
  want.insert(want.end(), {"accuracy_bits", "certificate"});
  CHECK(keys_of(certify_json(interval.run())) == want);

  CertifyRequest modular = fib_request("s1 s2^-1 s1", "modular");
  CertifyResult m = modular.run();
  want = base;
  want.insert(want.end(), {"proof", "certificate"});
  CHECK(keys_of(certify_json(m)) == want);
  auto proof = nlohmann::json::parse(certify_json(m))["proof"];
  CHECK(proof["kind"] == "norm-bound");  // leak-free: the images vanish at enough primes
}

TEST_CASE("certify_text: the space, keep, verdict and written files") {
  CertifyRequest req = fib_request("s1 s2^-1 s1", "exact");
  CertifyResult r = req.run();
  std::string t = certify_text(req, r, {"out.json", "out.gp"});
  CHECK(t.rfind("fusion space V(t t t t t t; 1): dimension 5; kept subspace (1-3:t,4-6:t): dimension 4\n", 0) == 0);
  CHECK(t.find("verdict: leak-free\n") != std::string::npos);
  CHECK(t.find("certificate written to out.json\n") != std::string::npos);
  CHECK(t.find("PARI/GP re-check script written to out.gp\n") != std::string::npos);
  CHECK(certify_text(req, r).find("written to") == std::string::npos);
  CHECK(t.back() == '\n');
}

TEST_CASE("verify_text / verify_json: one verdict line; keys verified, reason, summary") {
  VerifyOutcome ok{true, "", "leak-free (exact)"};
  VerifyOutcome bad{false, "hash differs", ""};
  CHECK(verify_text(ok) == "VERIFIED: leak-free (exact)\n");
  CHECK(verify_text(bad) == "REJECTED: hash differs\n");
  CHECK(keys_of(verify_json(bad)) == std::vector<std::string>{"verified", "reason", "summary"});
  CHECK(nlohmann::json::parse(verify_json(ok))["verified"] == true);
}
