// The thin certify / verify / model check front end: what it prints is the library's rendering, byte for byte,
// and --threads follows the one thread rule (detail/parallel.hpp) in every command.
#include <doctest/doctest.h>

#include <string>

#include "support/helpers.hpp"
#include "zetabraid/cert/render.hpp"

using namespace zb;

namespace {

std::string fib_path() { return zbtest::source_dir() + "/models/fibonacci.toml"; }

}  // namespace

TEST_CASE("certify --json prints certify_json of the same request; --out writes its certificate") {
  std::string dir = zbtest::tmpdir("zb_certify_cmd");
  std::string cert = dir + "/c.json";
  auto res = zbtest::run(zbtest::cli() + " certify --model " + fib_path() +
                         " --anyons 't t t t t t' --total 1 --keep 1-3:t,4-6:t --word 's3 s2 s3^-1' --threads 1"
                         " --json --out " + cert);
  CHECK(res.status == 1);  // leaks (common practice: s3 couples the two Fibonacci qubits)
  CertifyArguments a;
  a.model_path = fib_path();
  a.anyons = "t t t t t t";
  a.total = "1";
  a.keep_spec = "1-3:t,4-6:t";
  a.word = "s3 s2 s3^-1";
  a.threads = 1;
  CertifyRequest req(a);
  CertifyResult r = req.run();
  CHECK(res.out == certify_json(r, {cert, ""}) + "\n");
  CHECK(zbtest::slurp(cert) == req.certificate(r));

  // the certificate names the model by its absolute path: verify is told which file to use
  auto v = zbtest::run(zbtest::cli() + " verify " + cert + " --model " + fib_path(), true);
  CHECK(v.status == 0);
  CHECK(v.out.rfind("VERIFIED: ", 0) == 0);
}

TEST_CASE("--threads: 1..kMaxThreads in certify and model check, the same message") {
  const std::string msg = "--threads must be 1..256 (omit it for all cores, at most 8)";
  for (const char* t : {"0", "-1", "257"}) {
    CAPTURE(t);
    auto c = zbtest::run(zbtest::cli() + " certify --model " + fib_path() + " --anyons 't t' --total 1 --word s1" +
                             " --threads " + t, true);
    CHECK(c.status == 2);
    CHECK(c.out.find(msg) != std::string::npos);
    auto m = zbtest::run(zbtest::cli() + " model check " + fib_path() + " --threads " + t, true);
    CHECK(m.status == 2);
    CHECK(m.out.find(msg) != std::string::npos);
  }
  // 100 was refused by model check before (a separate 1..64 range); now the one rule allows it
  CHECK(zbtest::run(zbtest::cli() + " model check " + fib_path() + " --threads 100").status == 0);
}
