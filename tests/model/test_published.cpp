// Tables as printed: models/published/ holds tables transcribed from named sources in their own conventions
// ([conventions], docs/model-format.md); each must pass model check after conversion and be equivalent (or
// equivalent to the mirror, where the source's chirality is the mirror) to the bundled model it should equal.
#include <doctest/doctest.h>

#include <filesystem>
#include <map>
#include <set>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/compare.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {

std::string published_dir() { return zbtest::source_dir() + "/models/published"; }
Model bundled(const std::string& name) { return load_model(zbtest::source_dir() + "/models/" + name + ".toml"); }

struct Expectation {
  const char* reference;  // bundled model (models/<name>.toml)
  CompareVerdict verdict;
  bool conventions_matter;  // the file's [conventions] change its values (not defaults, not self-inverse on them)
};

// The verdicts each file's header states (sources and "from memory" notes are in the files).
const std::map<std::string, Expectation> kExpected = {
    {"fibonacci_preskill2004.toml", {"fibonacci", CompareVerdict::kEquivalentToMirror, false}},
    {"ising_kitaev2006_nu1.toml", {"ising", CompareVerdict::kEquivalent, false}},
    {"ising_kitaev2006_nu15.toml", {"ising", CompareVerdict::kEquivalentToMirror, false}},
    {"semion_rsw2009.toml", {"su2_k1", CompareVerdict::kEquivalent, false}},
    {"su2_k2_racah_layout.toml", {"su2_k2", CompareVerdict::kEquivalent, true}},
    {"three_fermion_kitaev2006_nu8.toml", {"three_fermion", CompareVerdict::kEquivalent, false}},
    {"toric_code_kitaev2003.toml", {"toric_code", CompareVerdict::kEquivalent, false}},
};

// The text without its [conventions] table (up to the next blank line).
std::string without_conventions(const std::string& text) {
  size_t at = text.find("[conventions]");
  REQUIRE(at != std::string::npos);
  size_t end = text.find("\n\n", at);
  return text.substr(0, at) + (end == std::string::npos ? std::string() : text.substr(end + 2));
}

std::string replace_once(std::string s, const std::string& from, const std::string& to) {
  size_t at = s.find(from);
  REQUIRE(at != std::string::npos);
  return s.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("every published table passes model check and equals its bundled model") {
  std::set<std::string> seen;
  for (const auto& entry : std::filesystem::directory_iterator(published_dir())) {
    const std::string name = entry.path().filename().string();
    if (entry.path().extension() != ".toml") continue;
    CAPTURE(name);
    seen.insert(name);
    auto it = kExpected.find(name);
    REQUIRE_MESSAGE(it != kExpected.end(), "a published file without an expected verdict in this test");
    Model m = load_model(entry.path().string());
    CHECK(!m.source.empty());
    CHECK(check_model(m).ok);
    const Model ref = bundled(it->second.reference);
    CompareResult r = compare_models(ref, m);
    CHECK(verdict_name(r.verdict) == std::string(verdict_name(it->second.verdict)));
    // Negative control: without its [conventions] table the file must fail model check or compare differently
    // when its conventions matter; otherwise (defaults, or self-inverse on these values) nothing changes.
    Model bare = parse_model(without_conventions(zbtest::slurp(entry.path().string())), name);
    const bool same = check_model(bare).ok && compare_models(ref, bare).verdict == it->second.verdict;
    CHECK(same == !it->second.conventions_matter);
  }
  CHECK(seen.size() == kExpected.size());
  CHECK(seen.size() >= 6);
}

TEST_CASE("negative control: the Racah-layout SU(2)_2 without its conventions fails model check") {
  const std::string path = published_dir() + "/su2_k2_racah_layout.toml";
  const std::string text = zbtest::slurp(path);
  Model ok = parse_model(text, path);
  CHECK(check_model(ok).ok);
  // Keys read as "a b c d e f" instead of {a b e; c d f}: the entries land on inadmissible places.
  Model bad = parse_model(without_conventions(text), path);
  CHECK_FALSE(check_model(bad).ok);
  // Only the index order dropped (f_matrix kept) fails as well.
  Model bad2 = parse_model(replace_once(text, "f_indices = \"abe-cdf\"\n", ""), path);
  CHECK_FALSE(check_model(bad2).ok);
}

TEST_CASE("clockwise R-symbols are inverted: the Preskill table read as clockwise is Kitaev's chirality") {
  // A conversion test, not a claim about the source: the same printed R read as clockwise exchanges gives the
  // inverse (= conjugate) R-symbols, so the verdict against models/fibonacci.toml flips from mirror to equivalent.
  const std::string path = published_dir() + "/fibonacci_preskill2004.toml";
  const std::string text = zbtest::slurp(path);
  Model cw = parse_model(replace_once(text, "r_exchange = \"counterclockwise\"", "r_exchange = \"clockwise\""), path);
  CHECK(check_model(cw).ok);
  CHECK(compare_models(bundled("fibonacci"), cw).verdict == CompareVerdict::kEquivalent);
  // Negative control: the semion's R^{ss}_1 = i read as clockwise is -i, the mirror of SU(2)_1.
  const std::string sp = published_dir() + "/semion_rsw2009.toml";
  Model s = parse_model(replace_once(zbtest::slurp(sp), "r_exchange = \"counterclockwise\"",
                                     "r_exchange = \"clockwise\""),
                        sp);
  CHECK(check_model(s).ok);
  CHECK(compare_models(bundled("su2_k1"), s).verdict == CompareVerdict::kEquivalentToMirror);
}

namespace {

// A two-label text with one 2x2 block [F^{ttt}_t] printed as P (rows, columns in label order 1, t) under f_matrix.
std::string fib_text(const std::string& f_matrix, const std::string& p) {
  return "labels = [\"1\", \"t\"]\nf_unlisted = \"1\"\n[conventions]\nf_matrix = \"" + f_matrix +
         "\"\n[field]\nconductor = 5\n[constants]\nphi = \"1 + zeta + zeta^4\"\n[fusion]\n\"t t\" = [\"1\", \"t\"]\n"
         "[F]\n\"t t t t\" = " +
         p + "\n";
}

// [F^{ttt}_t]_{ef} equals the exact value `want`.
bool entry_is(const Model& m, int e, int f, const std::string& want) {
  const Scalar* v = m.f_symbol(1, 1, 1, 1, e, f);
  return v && *v == parse_expression(want, m.field);
}

}  // namespace

TEST_CASE("f_matrix: transpose and inverse of a printed block, checked by hand") {
  // P = [[1, 2], [3, 4]]: P^T = [[1, 3], [2, 4]], P^-1 = [[-2, 1], [3/2, -1/2]] (det -2),
  // (P^-1)^T = [[-2, 3/2], [1, -1/2]]. Conventions (conventions.hpp): as-zetabraid F = P; transpose: P = F^T, rows
  // f, so F = P^T; inverse: P = F^-1 with rows f, so F = P^-1; inverse-transpose: P = (F^-1)^T, so F = P^-T.
  const std::string p = "[[\"1\", \"2\"], [\"3\", \"4\"]]";
  auto f = [&](const char* c) { return parse_model(fib_text(c, p), "mem"); };
  Model as = f("as-zetabraid"), tr = f("transpose"), inv = f("inverse"), it = f("inverse-transpose");
  CHECK(entry_is(as, 0, 1, "2"));
  CHECK(entry_is(as, 1, 0, "3"));
  CHECK(entry_is(tr, 0, 1, "3"));
  CHECK(entry_is(tr, 1, 0, "2"));
  CHECK(entry_is(inv, 0, 0, "-2"));
  CHECK(entry_is(inv, 0, 1, "1"));
  CHECK(entry_is(inv, 1, 0, "3/2"));
  CHECK(entry_is(inv, 1, 1, "-1/2"));
  CHECK(entry_is(it, 0, 1, "3/2"));
  CHECK(entry_is(it, 1, 0, "1"));
  // A 1x1 block filled by f_unlisted is inverted too (1 stays 1).
  CHECK(inv.f_symbol(1, 1, 1, 0, 1, 1) != nullptr);
  // The Fibonacci block in a non-unitary gauge (Q = [[1/phi, 2], [1/(2 phi), -1/phi]], an involution, as
  // 1/phi + 1/phi^2 = 1, common practice) passes model check under every reading.
  const std::string q = "[[\"1/phi\", \"2\"], [\"1/(2*phi)\", \"-1/phi\"]]";
  for (const char* c : {"as-zetabraid", "transpose", "inverse", "inverse-transpose"}) {
    CAPTURE(c);
    CHECK(check_model(parse_model(fib_text(c, q), "mem")).ok);
  }
}

TEST_CASE("conventions: unknown values, partial and singular blocks are input errors with file:line") {
  const std::string p = "[[\"1\", \"2\"], [\"3\", \"4\"]]";
  auto msg = [](const std::string& text) {
    try {
      parse_model(text, "x.toml");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(msg(fib_text("inverted", p)).find("x.toml:4: conventions.f_matrix: expected \"as-zetabraid\"") == 0);
  std::string t = replace_once(fib_text("inverse", p), "f_matrix = \"inverse\"", "r_exchange = \"ccw\"");
  CHECK(msg(t).find("x.toml:4: conventions.r_exchange: expected \"counterclockwise\" or \"clockwise\"") == 0);
  t = replace_once(fib_text("inverse", p), "f_matrix = \"inverse\"", "f_indices = \"abcdee\"");
  CHECK(msg(t).find("x.toml:4: conventions.f_indices: expected the letters") == 0);
  t = replace_once(fib_text("inverse", p), "f_matrix = \"inverse\"", "f_order = \"abcdef\"");
  CHECK(msg(t).find("x.toml:4: conventions.f_order: unknown key") == 0);
  CHECK(msg(fib_text("inverse", "[[\"1\", \"2\"], [\"2\", \"4\"]]")).find("x.toml:12: F.\"t t t t\": f_matrix = "
                                                                          "\"inverse\": the printed block is "
                                                                          "singular") == 0);
  t = replace_once(fib_text("inverse", p), "\"t t t t\" = " + p, "\"t t t t 1 1\" = \"1\"");
  CHECK(msg(t).find("x.toml:12: F.\"t t t t\": f_matrix = \"inverse\" needs every entry of the block") == 0);
  // As printed, without inversion, the partial block loads (model check reports the missing entries).
  t = replace_once(fib_text("transpose", p), "\"t t t t\" = " + p, "\"t t t t 1 1\" = \"1\"");
  CHECK(msg(t) == "no error");
}

TEST_CASE("f_indices names e and f by meaning: a transposed table keyed [F]_{fe} entry by entry") {
  // F = [[1, 2], [3, 4]] (rows e, columns f = 1, t) three ways: as a matrix in zetabraid's reading; as the printed
  // transpose P = F^T; and entry by entry in the order a b c d f e (a source writing [F^{abc}_d]_{fe}).
  const Model want = parse_model(fib_text("as-zetabraid", "[[\"1\", \"2\"], [\"3\", \"4\"]]"), "mem");
  const Model tr = parse_model(fib_text("transpose", "[[\"1\", \"3\"], [\"2\", \"4\"]]"), "mem");
  std::string t = replace_once(fib_text("transpose", "\"1\""), "\"t t t t\" = \"1\"",
                               "\"t t t t 1 1\" = \"1\"\n\"t t t t t 1\" = \"2\"\n\"t t t t 1 t\" = \"3\"\n"
                               "\"t t t t t t\" = \"4\"");
  t = replace_once(t, "[field]", "f_indices = \"abcd-fe\"\n[field]");
  const Model fe = parse_model(t, "mem");
  for (const Model* m : {&tr, &fe})
    for (int e = 0; e < 2; ++e)
      for (int f = 0; f < 2; ++f) {
        CAPTURE(e);
        CAPTURE(f);
        CHECK(m->f_symbol(1, 1, 1, 1, e, f)->str() == want.f_symbol(1, 1, 1, 1, e, f)->str());  // two fields
      }
  // Negative control: the same entries read with the default order "abcd-ef" give F^T.
  const Model ef = parse_model(replace_once(t, "f_indices = \"abcd-fe\"\n", ""), "mem");
  CHECK(ef.f_symbol(1, 1, 1, 1, 0, 1)->str() == want.f_symbol(1, 1, 1, 1, 1, 0)->str());
}
