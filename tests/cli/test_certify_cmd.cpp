// `zetabraid certify` end to end: certificates (exact, interval, modular), `verify` on them, tampering, determinism
// across thread counts, and the PARI/GP export (hostile names and labels stay data) re-checked by PARI/GP.
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <regex>

#include "support/fib_model.hpp"
#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;
using ojson = nlohmann::ordered_json;
namespace fs = std::filesystem;

namespace {

std::string fib_file() { return zbtest::source_dir() + "/models/fibonacci.toml"; }

std::string tmpdir() { return zbtest::tmpdir("zb_cert_test"); }

using zbtest::slurp;
using zbtest::spit;

std::string two_qubit(const std::string& word, const std::string& extra = "") {
  return zbtest::cli() + " certify --model " + fib_file() +
         " --anyons 't t t t t t' --total 1 --keep '1-3:t,4-6:t' --word '" + word + "' " + extra;
}

std::string certify_cmd(const std::string& anyons, const std::string& keep, const std::string& word_file,
                        const std::string& extra) {
  return fmt::format("{} certify --model {} --anyons '{}' --total 1 --keep '{}' --word-file {} {}", zbtest::cli(),
                     fib_file(), anyons, keep, word_file, extra);
}

zbtest::RunResult verify_json(const std::string& dir, const ojson& j, const std::string& extra = "") {
  zbtest::spit(dir + "/t.json", j.dump(2) + "\n");
  return zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + extra + " " + dir + "/t.json");
}

// The Fibonacci model with label "t" renamed to `label_toml` (a TOML basic string body) and name `name_toml`.
std::string hostile_model(const std::string& name_toml, const std::string& label_toml) {
  std::string s = zbtest::slurp(zbtest::source_dir() + "/models/fibonacci.toml");
  auto swap = [&](const std::string& from, const std::string& to) {
    size_t p = s.find(from);
    REQUIRE(p != std::string::npos);
    s.replace(p, from.size(), to);
  };
  const std::string l = label_toml;
  swap("name = \"Fibonacci\"", "name = \"" + name_toml + "\"");
  swap("labels = [\"1\", \"t\"]", "labels = [\"1\", \"" + l + "\"]");
  swap("\"t t\" = [\"1\", \"t\"]", "\"" + l + " " + l + "\" = [\"1\", \"" + l + "\"]");
  swap("\"t t t t\" =", "\"" + l + " " + l + " " + l + " " + l + "\" =");
  swap("\"t t\" = [\"exp", "\"" + l + " " + l + "\" = [\"exp");
  return s;
}

}  // namespace

TEST_CASE("non-coordinate kept spaces: charge of anyons 2-3, and explicit basis vectors") {
  Model m = zbtest::fibonacci_model();
  std::vector<int> four(4, 1);
  BraidGenerators g(m, 1);
  const FusionSpace& sp = g.space(four);
  Subspace k = subspace_from_groups(sp, parse_keep(m, "2-3:1", 4));
  REQUIRE_FALSE(k.coordinate);
  CertifyOptions ex;
  ex.method = Method::kExact;
  // s2 exchanges anyons 2 and 3 inside the group: leak-free; s1 and s3 move anyons across it: leaks
  CHECK(certify(g, four, k, parse_word("s2 s2 s2^-1"), ex).verdict == Verdict::kLeakFree);
  CHECK(certify(g, four, k, parse_word("s1"), ex).verdict == Verdict::kLeaks);
  CHECK(certify(g, four, k, parse_word("s3"), ex).verdict == Verdict::kLeaks);
  // a braid moving the pair as a unit keeps its charge: s1 s2 moves anyon 1 across the pair (2,3)... then back
  CHECK(certify(g, four, k, parse_word("s1 s2 s2^-1 s1^-1"), ex).verdict == Verdict::kLeakFree);
  // the same kept space given as basis vectors (columns of the projector) gives the same verdicts and leakage
  std::string text;
  for (size_t j = 0; j < k.kept(); ++j) {
    for (size_t i = 0; i < sp.dimension(); ++i) text += (i ? ", " : "") + k.basis(i, j).str();
    text += "\n";
  }
  Subspace kv = subspace_from_text(sp, "# kept basis\n" + text, "vectors.txt");
  CertifyResult a = certify(g, four, k, parse_word("s1"), ex), b = certify(g, four, kv, parse_word("s1"), ex);
  CHECK(*a.leakage == *b.leakage);
  // a kept vector outside the model's field (sqrt 2 for Fibonacci) adjoins a radicand; certificates carry it
  if (std::filesystem::exists(fib_file())) {
    std::string d = tmpdir();
    spit(d + "/v2.txt", "1, sqrt(2), 0\n");
    std::string cert = d + "/v2.json";
    auto r = zbtest::run(zbtest::cli() + " certify --model " + fib_file() + " --anyons 't t t t' --total t --keep-file " +
                         d + "/v2.txt --word s2 --out " + cert);
    CHECK(r.status == 1);
    CHECK(zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + cert).status == 0);
    auto j = nlohmann::ordered_json::parse(slurp(cert));
    j["field"]["radicands"].push_back("3");  // an extra radicand nobody needs is rejected
    spit(cert, j.dump(2) + "\n");
    CHECK(zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + cert).status == 1);
  }
  CHECK_THROWS_WITH_AS(subspace_from_text(sp, "1, 0\n", "v.txt"), doctest::Contains("v.txt:1"), InputError);
  CHECK_THROWS_WITH_AS(subspace_from_text(sp, "1, 0, 0\n2, zeta +, 0", "v.txt"),
                       doctest::Contains("v.txt:2"), InputError);
  CHECK_THROWS_AS(subspace_from_text(sp, "1, 0, 0\n2, 0, 0", "v.txt"), InputError);
}

TEST_CASE("CLI: certify, certificates, verify, tampering, GP") {
  if (!std::filesystem::exists(fib_file())) return;
  const std::string d = tmpdir();
  // contract shape
  auto r = zbtest::run(two_qubit("s3", "--json"));
  CHECK(r.status == 1);  // leaks: a claim of invariance is false
  auto j = nlohmann::json::parse(r.out);
  CHECK(j["verdict"] == "leaks");
  CHECK(j["dimension"] == 5);
  CHECK(j["kept_dimension"] == 4);
  CHECK(j["leakage"].contains("ball"));
  CHECK(j["leakage"]["exact"].is_string());
  r = zbtest::run(two_qubit("s1 s2^-1 s1", "--json"));
  CHECK(r.status == 0);
  CHECK(nlohmann::json::parse(r.out)["verdict"] == "leak-free");
  // the same leakage via the code-built model (independent of the loader and of the file's gauge choices)
  {
    Model m = zbtest::fibonacci_model();
    BraidGenerators g(m, 0);
    std::vector<int> six(6, 1);
    Subspace k = subspace_from_groups(g.space(six), parse_keep(m, "1-3:t,4-6:t", 6));
    CertifyOptions ex;
    ex.method = Method::kExact;
    std::string ball = certify(g, six, k, parse_word("s3"), ex).leakage_ball;
    CHECK(ball == j["leakage"]["ball"].get<std::string>());
  }
  // errors: out-of-range generator, malformed word, unknown label, zero-dimensional space: exit 2, no file
  std::string out = d + "/never.json";
  r = zbtest::run(two_qubit("s9", "--out " + out), true);
  CHECK(r.status == 2);
  CHECK(r.out.find("column 1") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(out));
  r = zbtest::run(two_qubit("s1 (s2", "--out " + out), true);
  CHECK(r.status == 2);
  CHECK(r.out.find("column 4") != std::string::npos);
  r = zbtest::run(zbtest::cli() + " certify --model " + fib_file() + " --anyons 't q' --total 1 --word s1", true);
  CHECK(r.status == 2);
  r = zbtest::run(zbtest::cli() + " certify --model " + fib_file() + " --anyons 't' --total 1 --word ''", true);
  CHECK(r.status == 2);
  CHECK(r.out.find("zero-dimensional") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(out));

  // certificates: deterministic bytes, verified, every tampering rejected
  struct Case {
    std::string word, method;
  };
  for (const Case& c : {Case{"s3 s2", "exact"}, Case{"s1 s2^-1 s1", "exact"}, Case{"(s3 s2 s4^-1)^5", "interval"},
                        Case{"(s1 s2)^7", "interval"}}) {
    CAPTURE(c.word);
    std::string a = d + "/a.json", b = d + "/b.json", gpf = d + "/a.gp";
    zbtest::run(two_qubit(c.word, "--method " + c.method + " --out " + a + " --export-gp " + gpf));
    zbtest::run(two_qubit(c.word, "--method " + c.method + " --out " + b));
    std::string text = slurp(a);
    REQUIRE(!text.empty());
    CHECK(text == slurp(b));
    r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + a);
    CHECK(r.status == 0);
    CHECK(r.out.rfind("VERIFIED", 0) == 0);
    // PARI/GP, run with no zetabraid at all, agrees
    if (zbtest::have_gp()) {
      CHECK(zbtest::gp(slurp(gpf)).find("zetabraid-gp: verified") != std::string::npos);
      // negative control: the same script with the opposite claim is rejected
      std::string g2 = slurp(gpf);
      auto p = g2.find("VERDICT = \"");
      REQUIRE(p != std::string::npos);
      std::string verdict = nlohmann::json::parse(text)["claim"]["verdict"];
      std::string other = verdict == "leak-free" ? "leaks" : "leak-free";
      g2.replace(p, std::string("VERDICT = \"" + verdict + "\"").size(), "VERDICT = \"" + other + "\"");
      if (c.method == "exact") CHECK(zbtest::gp(g2).find("zetabraid-gp: REJECTED") != std::string::npos);
      // negative controls on the numbers: a wrong exact leakage, an upper bound below the true leakage
      std::string g3 = slurp(gpf);
      if (c.method == "exact" && verdict == "leaks") {
        auto q = g3.find("\nLEAK = ");
        REQUIRE(q != std::string::npos);
        g3.insert(q + 8, "1/1000 + ");
        CHECK(zbtest::gp(g3).find("zetabraid-gp: REJECTED: the exact leakage differs") != std::string::npos);
      }
      if (c.method == "exact") {
        // GP recomputes the kept space from the charge groups by braiding each block to the front: a wrong
        // charge for anyons 4-6 must be noticed
        std::string g4 = slurp(gpf);
        auto q = g4.find("GROUPS = [[1, 3, 2], [4, 6, 2]]");
        REQUIRE(q != std::string::npos);
        g4.replace(q, 31, "GROUPS = [[1, 3, 2], [4, 6, 1]]");
        CHECK(zbtest::gp(g4).find("zetabraid-gp: REJECTED: a kept basis vector violates") != std::string::npos);
      }
      if (c.method == "interval" && verdict == "leaks") {
        auto q = g3.find("\nUPPER = ");
        REQUIRE(q != std::string::npos);
        g3.replace(q, g3.find(';', q) - q, "\nUPPER = 1/10^6");
        CHECK(zbtest::gp(g3).find("zetabraid-gp: REJECTED: the leakage exceeds") != std::string::npos);
      }
    }
    // tampering: each edit must be rejected with exit 1
    auto j0 = nlohmann::ordered_json::parse(text);
    std::vector<std::pair<std::string, std::function<void(nlohmann::ordered_json&)>>> edits = {
        {"verdict", [](auto& x) { x["claim"]["verdict"] = x["claim"]["verdict"] == "leaks" ? "leak-free" : "leaks"; }},
        {"word", [](auto& x) { x["word"]["letters"] = x["word"]["letters"].template get<std::string>() + " 1"; }},
        {"length", [](auto& x) { x["word"]["length"] = 1; }},
        {"anyons", [](auto& x) { x["space"]["total"] = "t"; }},
        {"keep", [](auto& x) { x["keep"]["spec"] = "1-3:1,4-6:1"; }},
        {"sha", [](auto& x) { x["model"]["sha256"] = std::string(64, '0'); }},
        {"extra key", [](auto& x) { x["note"] = "hello"; }},
        {"version", [](auto& x) { x["version"] = 3; }},
        {"version 1 with a proof", [](auto& x) { x["version"] = 1; }},
        {"proof kind", [](auto& x) { x["proof"]["kind"] = x["proof"]["kind"] == "norm-bound" ? "interval" : "norm-bound"; }},
        {"method", [](auto& x) { x["method"]["name"] = x["method"]["name"] == "exact" ? "interval" : "exact"; }},
        {"numbers", [](auto& x) {
           auto& l = x["claim"]["leakage"];
           if (l["exact"].is_string())
             l["exact"] = l["exact"].template get<std::string>() + " + 1/1000";
           else if (x["claim"]["verdict"] == "leaks")
             l["lower"] = "9.99e-1";
           else
             l["upper"] = "1e-300";
         }},
        {"ball", [](auto& x) {
           auto& l = x["claim"]["leakage"];
           if (l["ball"].is_string()) l["ball"] = "[0.5 +/- 1e-30]";
           else x["hints"]["action"] = nullptr;
         }},
    };
    if (c.method == "exact")
      edits.push_back({"image hint", [](auto& x) { x["hints"]["image"][0][0] = "2"; }});
    for (auto& [name, edit] : edits) {
      CAPTURE(name);
      auto jt = j0;
      edit(jt);
      spit(d + "/t.json", jt.dump(2) + "\n");
      r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + d + "/t.json");
      CHECK(r.status == 1);
      CHECK(r.out.rfind("REJECTED", 0) == 0);
    }
    // a model file that differs by one byte is rejected (hash), even if it still loads
    std::string mf = d + "/fib_copy.toml";
    spit(mf, slurp(fib_file()) + "\n# edited\n");
    r = zbtest::run(zbtest::cli() + " verify --model " + mf + " " + a);
    CHECK(r.status == 1);
    spit(mf, slurp(fib_file()));
    r = zbtest::run(zbtest::cli() + " verify --model " + mf + " " + a);
    CHECK(r.status == 0);
    // not JSON at all
    spit(d + "/t.json", text.substr(0, text.size() / 2));
    CHECK(zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + d + "/t.json").status == 1);
  }
  // unreadable certificate file: an input error
  CHECK(zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + d + "/does-not-exist.json").status == 2);
  std::filesystem::remove_all(d);
}

TEST_CASE("mixed anyon types: pure braids of Ising sigma and psi anyons, verified and re-checked by GP") {
  std::string ising = zbtest::source_dir() + "/models/ising.toml";
  if (!std::filesystem::exists(ising)) return;
  const std::string d = tmpdir();
  struct Case {
    std::string word, verdict;
  };
  // psi braided twice around the sigma pair (charge 1) is a pure braid; whether it keeps the pair's charge is
  // decided exactly and must agree between certify, verify and GP
  for (const Case& c : {Case{"s4 s3 s2 s2 s3^-1 s4^-1", ""}, Case{"s2 s1 s1 s2^-1 s4 s4", ""}, Case{"s1 s1", "leak-free"}}) {
    CAPTURE(c.word);
    std::string a = d + "/m.json", g = d + "/m.gp";
    auto r = zbtest::run(zbtest::cli() + " certify --model " + ising +
                         " --anyons 'sigma sigma sigma sigma psi psi' --total 1 --keep '1-2:1' --json --word '" +
                         c.word + "' --out " + a + " --export-gp " + g);
    REQUIRE(r.status <= 1);
    std::string verdict = nlohmann::json::parse(r.out)["verdict"];
    if (!c.verdict.empty()) CHECK(verdict == c.verdict);
    CHECK(zbtest::run(zbtest::cli() + " verify --model " + ising + " " + a).status == 0);
    if (zbtest::have_gp()) CHECK(zbtest::gp(slurp(g)).find("zetabraid-gp: verified: " + verdict) != std::string::npos);
  }
  // a word that permutes the anyon types cannot be certified
  auto r = zbtest::run(zbtest::cli() + " certify --model " + ising +
                       " --anyons 'sigma sigma psi psi' --total 1 --word 's2'", true);
  CHECK(r.status == 2);
  std::filesystem::remove_all(d);
}

TEST_CASE("verify rejects a certificate of a leaking word with an honest-looking leak-free claim") {
  // The producer is bypassed entirely: a certificate claiming leak-free for s3 is built by hand from a genuine
  // leak-free certificate by swapping the word; the checker recomputes the image and must reject.
  if (!std::filesystem::exists(fib_file())) return;
  const std::string d = tmpdir();
  std::string a = d + "/lf.json";
  zbtest::run(two_qubit("s1", "--out " + a));
  auto j = nlohmann::ordered_json::parse(slurp(a));
  j["word"]["letters"] = "3";
  spit(a, j.dump(2) + "\n");
  auto r = zbtest::run(zbtest::cli() + " verify --model " + fib_file() + " " + a);
  CHECK(r.status == 1);
  std::filesystem::remove_all(d);
}

TEST_CASE("modular certificates: verified, deterministic, every tampered proof rejected") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  // A non-coordinate kept space (charge 1 of anyons 2-3 among six t anyons) and a long word of s2, s4, s5 only:
  // leak-free (those braids never move anyons 2-3 apart from each other or braid another anyon around them,
  // common practice), with a norm bound that needs many primes. And a leaking word (s1, s3 change that charge).
  zbtest::spit(d + "/free.txt", zbtest::letters_text(zbtest::random_letters(5, {2, 4, 5}, 3000)));
  zbtest::spit(d + "/leak.txt", zbtest::letters_text(zbtest::random_letters(6, {1, 2, 3}, 40)));
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

TEST_CASE("certificates are the same bytes at 1 and 2 threads (exact, interval, modular)") {
  const std::string d = zbtest::tmpdir("zb_modular_cert_test");
  zbtest::spit(d + "/w10.txt", zbtest::letters_text(zbtest::random_letters(12, {1, 2, 3, 4, 5, 6, 7, 8, 9}, 400)));
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
    Word w = parse_word(zbtest::letters_text(zbtest::random_letters(seed, seed % 2 ? std::vector<int>{1, 2, 3, 4, 5} : std::vector<int>{1, 2, 4, 5}, 60)));
    CertifyResult a = certify(g, six, keep, w, au), e = certify(g, six, keep, w, ex);
    CHECK(a.verdict == e.verdict);
    CHECK(a.method == (e.verdict == Verdict::kLeaks ? Method::kModular : Method::kExact));
  }
}

TEST_CASE("export_gp: names, labels and paths are data in the script, never code") {
  if (!zbtest::have_gp()) return;
  const std::string d = zbtest::tmpdir("zb_test_certificate");
  const std::string mark1 = d + "/pwned_by_path", mark2 = d + "/pwned_by_name", mark3 = d + "/pwned_by_label";
  // a folder whose name closes a GP comment and runs code, with quotes, backslashes and an ANSI escape
  const std::string folder = d + "/m\nsystem(\"touch " + mark1 + "\")\n\\\\ \"\\n\x1b[2K";
  fs::create_directories(folder);
  const std::string name = "F\\nsystem(\\\"touch " + mark2 + "\\\")\\n\\\\\\\\ \\\"\\u001b[31m";
  // labels may not contain blanks, but quotes, backslashes, parentheses and escapes are accepted by the loader
  const std::string label_toml = "t\\\")\\\\\\u001b;system(\\\"touch\\\\x20" + mark3 + "\\\")";
  zbtest::spit(folder + "/m.toml", hostile_model(name, label_toml));
  const std::string label = "t\")\\\x1b;system(\"touch\\x20" + mark3 + "\")";  // the label as the loader reads it
  auto quote = [](const std::string& s) { return "'" + s + "'"; };  // no single quote in these names
  const std::string an = fmt::format("{0} {0} {0} {0}", label);
  for (const std::string word : {"s1", "s2"}) {
    CAPTURE(word);
    const std::string gpf = d + "/x.gp";
    auto r = zbtest::run(fmt::format("{} certify --model {} --anyons {} --total 1 --keep {} --word {} --export-gp {}",
                                     zbtest::cli(), quote(folder + "/m.toml"), quote(an), quote("1-2:" + label), word,
                                     gpf),
                         true);
    CAPTURE(r.out);
    REQUIRE(r.status <= 1);
    const std::string script = zbtest::slurp(gpf);
    // no byte of the inputs reaches the script raw: no control character but our own line breaks
    size_t raw = 0;
    for (char ch : script) raw += static_cast<unsigned char>(ch) < 0x20 && ch != '\n';
    CHECK(raw == 0);
    CHECK(script.find("\nsystem(") == std::string::npos);
    const std::string out = zbtest::gp(script);
    CHECK(out.find("zetabraid-gp: verified: " + std::string(r.status == 0 ? "leak-free" : "leaks")) !=
          std::string::npos);
    // the names survive as data: GP reads back the model name and the path's escapes as printable text
    CHECK(zbtest::gp(script + "\nprint(MODEL_NAME);").find("system(\"touch") != std::string::npos);
    CHECK_FALSE(fs::exists(mark1));
    CHECK_FALSE(fs::exists(mark2));
    CHECK_FALSE(fs::exists(mark3));
  }
  fs::remove_all(d);
}
