// `zetabraid verify` on certificates made by `zetabraid certify`: the checker's interval re-check (one error bound
// per column for unitary letters, the plain ball product as the fallback, their agreement with the exact leakage)
// and `verify --via modular` re-checking an exact certificate's image by modular images.
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>

#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/cert/certify.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;
using ojson = nlohmann::ordered_json;

namespace {

std::string fib_file() { return zbtest::source_dir() + "/models/fibonacci.toml"; }

std::string tmpdir() { return zbtest::tmpdir("zb_verify_interval"); }

using zbtest::slurp;
using zbtest::spit;

std::string certify_cmd(const std::string& anyons, const std::string& keep, const std::string& word_file,
                        const std::string& extra) {
  return fmt::format("{} certify --model {} --anyons '{}' --total 1 --keep '{}' --word-file {} {}", zbtest::cli(),
                     fib_file(), anyons, keep, word_file, extra);
}

zbtest::RunResult verify_json(const std::string& dir, const ojson& j, const std::string& extra = "") {
  zbtest::spit(dir + "/t.json", j.dump(2) + "\n");
  return zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + extra + " " + dir + "/t.json");
}

// certify on the Fibonacci model; the word goes through a file (long words)
int certify(const std::string& dir, const std::string& anyons, const std::string& total, const std::string& keep,
            const std::string& letters, const std::string& method, const std::string& out,
            const std::string& extra = "") {
  spit(dir + "/w.txt", letters + "\n");
  return zbtest::run(zbtest::cli() + " certify --model " + fib_file() + " --anyons '" + anyons + "' --total " + total +
                     " --keep '" + keep + "' --word-file " + dir + "/w.txt --method " + method + " --out " + out + " " +
                     extra)
      .status;
}

VerifyOutcome verify(const std::string& cert, bool plain = false) {
  VerifyOptions opt;
  opt.model_override = fib_file();
  opt.plain_interval = plain;  // the checker's plain ball product instead of the error-bound propagation
  return verify_certificate(cert, opt);
}

// the recomputed enclosure printed at the end of a summary: "...; enclosure [m +/- r])"
std::string enclosure_of(const std::string& summary) {
  size_t a = summary.rfind("enclosure ");
  if (a == std::string::npos) return "";
  a += 10;
  size_t b = summary.rfind(')');
  return b > a ? summary.substr(a, b - a) : "";
}

// rewrites the claim of an interval certificate around a given enclosure, with upper/lower/verdict derived
// from it exactly as the format prescribes (so only the enclosure itself can be wrong)
void claim_ball(const std::string& cert, const std::string& ball) {
  auto j = nlohmann::ordered_json::parse(slurp(cert));
  std::string up, lo;
  bool pos = interval_bounds(ball, j["method"]["precision_bits"].get<long>(), &up, &lo);
  j["claim"]["verdict"] = pos ? "leaks" : "leakage-bounded";
  j["claim"]["leakage"]["ball"] = ball;
  j["claim"]["leakage"]["upper"] = up;
  j["claim"]["leakage"]["lower"] = pos ? nlohmann::ordered_json(lo) : nlohmann::ordered_json();
  spit(cert, j.dump(2) + "\n");
}

}  // namespace

TEST_CASE("interval re-check: a long certificate verifies quickly, tighter true claims too, false ones fail") {
  if (!std::filesystem::exists(fib_file())) return;
  const std::string d = tmpdir(), cert = d + "/long.json";
  // s1 s2 braid anyons 1-3 among themselves and s4 s5 anyons 4-6, so each group keeps its total charge and the
  // two-qubit space is kept exactly (common practice): the true leakage is 0
  std::string letters = zbtest::letters_text(zbtest::random_letters(2026, {1, 2, 4, 5}, 20000));
  REQUIRE(certify(d, "t t t t t t", "1", "1-3:t,4-6:t", letters, "interval", cert) == 0);
  VerifyOutcome v = verify(cert);
  CAPTURE(v.reason);
  CAPTURE(v.summary);
  CHECK(v.verified);
  CHECK(v.summary.find("one error bound per column") != std::string::npos);
  // cheap re-check: a working precision near the producer's (the plain ball product needs ~L + 64 = 20064 bits);
  // speed itself is measured by benchmarks, not asserted here
  size_t at = v.summary.find("re-checked at ");
  REQUIRE(at != std::string::npos);
  CHECK(std::stol(v.summary.substr(at + 14)) < 1000);
  // a much tighter claim is still true (leakage 0): confirmed after raising the precision
  claim_ball(cert, "[+/- 1.0e-250]");
  v = verify(cert);
  CAPTURE(v.reason);
  CHECK(v.verified);
  // negative controls: a positive leakage, and a ball around a nonzero value, are false claims
  claim_ball(cert, "[1.0e-10 +/- 1.0e-12]");
  CHECK_FALSE(verify(cert).verified);
  claim_ball(cert, "[2.0e-60 +/- 1.5e-60]");
  CHECK_FALSE(verify(cert).verified);
  std::filesystem::remove_all(d);
}

TEST_CASE("interval re-check rejects an upper bound below the true leakage of a leaking word (both paths)") {
  if (!std::filesystem::exists(fib_file())) return;
  const std::string d = tmpdir(), cert = d + "/leak.json";
  // s3 braids anyon 3 out of group 1-3: a random word with s3 leaks (the exact method agrees on short ones)
  std::string letters = zbtest::letters_text(zbtest::random_letters(7, {1, 2, 3, 4, 5}, 3000));
  REQUIRE(certify(d, "t t t t t t", "1", "1-3:t,4-6:t", letters, "interval", cert) == 1);
  auto j = nlohmann::json::parse(slurp(cert));
  REQUIRE(j["claim"]["verdict"] == "leaks");
  std::string honest = j["claim"]["leakage"]["ball"];
  arb_t x;
  arb_init(x);
  REQUIRE(arb_set_str(x, honest.c_str(), 128) == 0);
  double leak = arf_get_d(arb_midref(x), ARF_RND_NEAR);
  arb_clear(x);
  REQUIRE(leak > 1e-3);
  for (bool plain : {false, true}) {
    CAPTURE(plain);
    claim_ball(cert, honest);
    VerifyOutcome v = verify(cert, plain);
    CAPTURE(v.reason);
    CHECK(v.verified);
    CHECK(v.summary.find(plain ? "plain ball product" : "one error bound per column") != std::string::npos);
    // upper = 0.75 x < x (verdict leaks), upper = x/2 (verdict leakage-bounded): false claims
    claim_ball(cert, fmt::format("[{:.6e} +/- {:.6e}]", leak / 2, leak / 4));
    v = verify(cert, plain);
    CHECK_FALSE(v.verified);
    CHECK(v.reason.find("cannot confirm leakage <=") != std::string::npos);
    claim_ball(cert, fmt::format("[+/- {:.6e}]", leak / 2));
    CHECK_FALSE(verify(cert, plain).verified);
    // a lower bound above the truth is false as well
    claim_ball(cert, fmt::format("[{:.6e} +/- {:.6e}]", leak * 1.5, leak * 0.4));
    v = verify(cert, plain);
    CHECK_FALSE(v.verified);
    CHECK(v.reason.find("cannot confirm leakage >=") != std::string::npos);
  }
  std::filesystem::remove_all(d);
}

TEST_CASE("interval re-check: error-bound and plain paths agree on short words and contain the exact leakage") {
  if (!std::filesystem::exists(fib_file())) return;
  const std::string d = tmpdir();
  Model m = load_model(fib_file());
  struct Space {
    std::string anyons, total, keep;
    std::vector<int> gens;
  };
  // a coordinate kept space (two qubits in six anyons) and a non-coordinate one (charge of anyons 2-3)
  for (const Space& s : {Space{"t t t t t t", "1", "1-3:t,4-6:t", {1, 2, 3, 4, 5}}, Space{"t t t t", "t", "2-3:1", {1, 2, 3}}})
    for (unsigned seed = 1; seed <= 4; ++seed) {
      std::string letters = zbtest::letters_text(zbtest::random_letters(seed, s.gens, 6 * seed));
      CAPTURE(s.keep);
      CAPTURE(letters);
      std::string ex = d + "/e.json", iv = d + "/i.json";
      int st = certify(d, s.anyons, s.total, s.keep, letters, "exact", ex);
      REQUIRE(st <= 1);
      // the exact leakage (the exact method's own value, itself re-checked by verify and by GP elsewhere)
      std::string exact = nlohmann::json::parse(slurp(ex))["claim"]["leakage"]["exact"];
      acb_t e;
      acb_init(e);
      parse_expression(exact, m.field).ball(e, 512);
      // a low producer precision (16 bits): the checker then works near 16 + 2 log2 L + 32 bits, so its
      // enclosure is wide enough that a missing error term would show as an enclosure missing the exact value
      REQUIRE(certify(d, s.anyons, s.total, s.keep, letters, "interval", iv, "--precision 16") == st);
      std::string enc[2];
      for (bool plain : {false, true}) {
        CAPTURE(plain);
        VerifyOutcome v = verify(iv, plain);
        CAPTURE(v.reason);
        REQUIRE(v.verified);
        enc[plain] = enclosure_of(v.summary);
        arb_t b;
        arb_init(b);
        REQUIRE(arb_set_str(b, enc[plain].c_str(), 256) == 0);
        CAPTURE(enc[plain]);
        CHECK(arb_contains(b, acb_realref(e)));
        CHECK(mag_cmp_2exp_si(arb_radref(b), -20) < 0);  // and not vacuous
        arb_clear(b);
      }
      CHECK(enc[0] != "");
      acb_clear(e);
    }
  std::filesystem::remove_all(d);
}

TEST_CASE("verify --via modular re-checks an exact certificate's image by modular images") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  zbtest::spit(d + "/w.txt", zbtest::letters_text(zbtest::random_letters(9, {1, 2, 3, 4, 5}, 150)));
  std::string a = d + "/e.json";
  zbtest::run(certify_cmd("t t t t t t", "1-3:t,4-6:t", d + "/w.txt", "--method exact --out " + a));
  auto r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " --via modular " + a);
  CHECK(r.status == 0);
  CHECK(r.out.find("image checked mod") != std::string::npos);
  // Negative control: one image entry changed by 1 is caught by the images alone.
  auto j = ojson::parse(zbtest::slurp(a));
  // (in canonical form, so that only the value differs)
  Model fib = load_model(fib_file());
  j["hints"]["image"][2][1] = parse_expression(j["hints"]["image"][2][1].get<std::string>() + " + 1", fib.field).str();
  r = verify_json(d, j, "--via modular");
  CHECK(r.status == 1);
  CHECK(r.out.find("differs mod") != std::string::npos);
  r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " --via nonsense " + a, true);
  CHECK(r.status == 2);
}
