// The modular method: verdicts by modular images with a norm bound (linalg/modular.hpp), its certificates and
// the checker's own re-check, including `verify --via modular` for exact certificates. Oracles: the exact
// engine's verdict (itself checked against facts of the trade in cert_test.cpp), PARI/GP's exact re-check, and
// negative controls (every tampered proof must be rejected).
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <random>

#include "support/helpers.hpp"
#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;
using ojson = nlohmann::ordered_json;

namespace {

std::string fib_file() { return zbtest::source_dir() + "/models/fibonacci.toml"; }

std::string certify_cmd(const std::string& anyons, const std::string& keep, const std::string& word_file,
                        const std::string& extra) {
  return fmt::format("{} certify --model {} --anyons '{}' --total 1 --keep '{}' --word-file {} {}", zbtest::cli(),
                     fib_file(), anyons, keep, word_file, extra);
}

std::string random_word_text(unsigned seed, size_t len, const std::vector<int>& gens) {
  std::mt19937_64 rng(seed);
  std::string w;
  for (size_t i = 0; i < len; ++i) {
    int g = gens[rng() % gens.size()];
    w += (w.empty() ? "" : " ") + std::to_string(rng() % 2 ? g : -g);
  }
  return w;
}

zbtest::RunResult verify_json(const std::string& dir, const ojson& j, const std::string& extra = "") {
  zbtest::spit(dir + "/t.json", j.dump(2) + "\n");
  return zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + extra + " " + dir + "/t.json");
}

}  // namespace

TEST_CASE("modular verdicts equal the exact engine's on random two-qubit words (seeded)") {
  Model m = load_model(fib_file());
  BraidGenerators g(m, m.label_index("1"));
  std::vector<int> six(6, m.label_index("t"));
  Subspace keep = subspace_from_groups(g.space(six), parse_keep(m, "1-3:t,4-6:t", 6));
  CertifyOptions ex, mo;
  ex.method = Method::kExact;
  mo.method = Method::kModular;
  int free = 0, leaks = 0;
  for (unsigned seed = 1; seed <= 16; ++seed) {
    // Words on one qubit's anyons (1-2 or 4-5) are leak-free (common practice); mixed words mostly leak.
    std::vector<int> gens = seed % 4 == 0 ? std::vector<int>{1, 2} : seed % 4 == 1 ? std::vector<int>{4, 5}
                                                                                   : std::vector<int>{1, 2, 3, 4, 5};
    Word w = parse_word(random_word_text(seed, 30 + 5 * seed, gens));
    CertifyResult a = certify(g, six, keep, w, ex), b = certify(g, six, keep, w, mo);
    CAPTURE(seed);
    CHECK(a.verdict == b.verdict);
    REQUIRE(b.modular);
    CHECK(b.modular->zero == (b.verdict == Verdict::kLeakFree));
    CHECK(!b.leakage);
    (a.verdict == Verdict::kLeakFree ? free : leaks)++;
  }
  CHECK(free > 0);
  CHECK(leaks > 0);
}

TEST_CASE("modular certificates: verified, deterministic, every tampered proof rejected") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  // A non-coordinate kept space (charge 1 of anyons 2-3 among six t anyons) and a long word of s2, s4, s5 only:
  // leak-free (those braids never move anyons 2-3 apart from each other or braid another anyon around them,
  // common practice), with a norm bound that needs many primes. And a leaking word (s1, s3 change that charge).
  zbtest::spit(d + "/free.txt", random_word_text(5, 3000, {2, 4, 5}));
  zbtest::spit(d + "/leak.txt", random_word_text(6, 40, {1, 2, 3}));
  for (const std::string name : {"free", "leak"}) {
    CAPTURE(name);
    std::string a = d + "/" + name + ".json", b = d + "/" + name + "2.json";
    auto r = zbtest::run(certify_cmd("t t t t t t", "2-3:1", d + "/" + name + ".txt", "--method modular --out " + a));
    CHECK(r.status == (name == "free" ? 0 : 1));
    zbtest::run(certify_cmd("t t t t t t", "2-3:1", d + "/" + name + ".txt", "--method modular --threads 2 --out " + b));
    CHECK(zbtest::slurp(a) == zbtest::slurp(b));  // same bytes at any thread count
    r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + a);
    CHECK(r.status == 0);
    CHECK(r.out.rfind("VERIFIED", 0) == 0);
    // The exact engine agrees.
    r = zbtest::run(certify_cmd("t t t t t t", "2-3:1", d + "/" + name + ".txt", "--method exact --json"));
    CHECK(nlohmann::json::parse(r.out)["verdict"] == (name == "free" ? "leak-free" : "leaks"));
    auto j0 = ojson::parse(zbtest::slurp(a));
    CHECK(j0["method"]["name"] == "modular");
    std::vector<std::pair<std::string, std::function<void(ojson&)>>> edits = {
        {"verdict", [](ojson& x) { x["claim"]["verdict"] = x["claim"]["verdict"] == "leaks" ? "leak-free" : "leaks"; }},
        {"word", [](ojson& x) { x["word"]["letters"] = x["word"]["letters"].get<std::string>() + " 1 -1 1"; x["word"]["length"] = x["word"]["length"].get<size_t>() + 3; }},
        {"method", [](ojson& x) { x["method"]["name"] = "exact"; }},
        {"leakage value", [](ojson& x) { x["claim"]["leakage"]["exact"] = "0"; }},
    };
    if (name == "free") {
      size_t n = j0["proof"]["primes"].size();
      CHECK(n > 10);
      // Primes < 2^62: keeping floor((bits - 2)/62) of them leaves a product below the bound (>= 2^(bits - 1)).
      size_t keep = static_cast<size_t>((j0["proof"]["bound_bits"].get<long>() - 2) / 62);
      REQUIRE(keep >= 1);
      edits.push_back({"too few primes", [keep](ojson& x) {
                         auto& p = x["proof"]["primes"];
                         while (p.size() > keep) p.erase(p.size() - 1);
                       }});
      edits.push_back({"duplicate prime", [](ojson& x) { x["proof"]["primes"][1] = x["proof"]["primes"][0]; }});
      edits.push_back({"wrong root", [](ojson& x) {
                         auto& q = x["proof"]["primes"][0];
                         q["roots"][0] = q["p"].get<ulong>() - q["roots"][0].get<ulong>() + 1;
                       }});
      edits.push_back({"not prime", [](ojson& x) { x["proof"]["primes"][0]["p"] = x["proof"]["primes"][0]["p"].get<ulong>() + 10; }});
      edits.push_back({"no primes", [](ojson& x) { x["proof"]["primes"] = ojson::array(); }});
    } else {
      edits.push_back({"value", [](ojson& x) { x["proof"]["value"] = x["proof"]["value"].get<ulong>() + 1; }});
      edits.push_back({"row", [](ojson& x) { x["proof"]["row"] = 7; }});
      edits.push_back({"kind", [](ojson& x) { x["proof"]["kind"] = "norm-bound"; }});
    }
    for (auto& [what, edit] : edits) {
      CAPTURE(what);
      ojson t = j0;
      edit(t);
      r = verify_json(d, t);
      CHECK(r.status == 1);
      CHECK(r.out.rfind("REJECTED", 0) == 0);
    }
    // The PARI/GP re-check of the same claim (an exact product in GP, no zetabraid code).
    if (zbtest::have_gp()) {
      std::string gpf = d + "/" + name + ".gp";
      zbtest::run(certify_cmd("t t t t t t", "2-3:1", d + "/" + name + ".txt", "--method modular --export-gp " + gpf));
      CHECK(zbtest::run(std::string(ZB_GP) + " -q -f " + gpf).out.find("zetabraid-gp: verified") != std::string::npos);
    }
  }
}

TEST_CASE("verify --via modular re-checks an exact certificate's image by modular images") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  zbtest::spit(d + "/w.txt", random_word_text(9, 150, {1, 2, 3, 4, 5}));
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

TEST_CASE("certificates are the same bytes at 1 and 2 threads (exact, interval, modular)") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  zbtest::spit(d + "/w10.txt", random_word_text(12, 400, {1, 2, 3, 4, 5, 6, 7, 8, 9}));
  for (const std::string method : {"exact", "interval", "modular"}) {
    CAPTURE(method);
    std::string a = d + "/t1.json", b = d + "/t2.json";
    zbtest::run(certify_cmd("t t t t t t t t t t", "1-3:t,4-6:t", d + "/w10.txt", "--method " + method + " --threads 1 --out " + a));
    zbtest::run(certify_cmd("t t t t t t t t t t", "1-3:t,4-6:t", d + "/w10.txt", "--method " + method + " --threads 2 --out " + b));
    std::string x = zbtest::slurp(a);
    CHECK(!x.empty());
    CHECK(x == zbtest::slurp(b));
  }
}

TEST_CASE("auto method, model without a unitary gauge, long word: a nonzero image proves the leak, else exact") {
  // Yang-Lee data (the non-unitary Galois conjugate of Fibonacci): no leakage value, so auto falls back on the
  // modular filter for long words. Reference verdicts from the exact method.
  Model m = load_model(zbtest::source_dir() + "/models/yang_lee.toml");
  int t = m.label_index("t");
  BraidGenerators g(m, m.label_index("1"));
  std::vector<int> six(6, t);
  Subspace keep = subspace_from_groups(g.space(six), parse_keep(m, "1-3:t,4-6:t", 6));
  CertifyOptions au, ex;
  au.method = Method::kAuto;
  au.exact_budget = 10;  // every word below counts as long
  ex.method = Method::kExact;
  for (unsigned seed = 1; seed <= 6; ++seed) {
    CAPTURE(seed);
    Word w = parse_word(random_word_text(seed, 60, seed % 2 ? std::vector<int>{1, 2, 3, 4, 5} : std::vector<int>{1, 2, 4, 5}));
    CertifyResult a = certify(g, six, keep, w, au), e = certify(g, six, keep, w, ex);
    CHECK(a.verdict == e.verdict);
    CHECK(a.method == (e.verdict == Verdict::kLeaks ? Method::kModular : Method::kExact));
  }
}
