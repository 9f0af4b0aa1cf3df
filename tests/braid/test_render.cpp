// Renderings of the braid layer's results (braid/render.hpp): JSON keys in their documented order (README
// "braid ... --json") and the text lines. Oracles (common practice): V(t t t t; 1) of the Fibonacci model has
// dimension F(3) = 2; the Fibonacci braid representation on four anyons is irreducible with a full-twist scalar.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/helpers.hpp"
#include "zetabraid/braid/render.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {

std::vector<std::string> keys_of(const nlohmann::ordered_json& j) {
  std::vector<std::string> k;
  for (const auto& [key, value] : j.items()) k.push_back(key);
  return k;
}

Model fib() { return load_model(zbtest::source_dir() + "/models/fibonacci.toml"); }

}  // namespace

TEST_CASE("fusion_space / subspace renderings") {
  Model m = fib();
  FusionSpace sp(m, parse_anyons(m, "t t t t"), parse_label(m, "1", "total"));
  auto j = nlohmann::ordered_json::parse(fusion_space_json(sp));
  CHECK(keys_of(j) == std::vector<std::string>{"dimension", "basis"});
  CHECK(j["dimension"] == 2);
  CHECK(fusion_space_text(sp).rfind("V(t t t t; 1): dimension 2\n", 0) == 0);

  auto groups = parse_keep(m, "1-2:1", 4);
  Subspace s = subspace_from_groups(sp, groups);
  auto k = nlohmann::ordered_json::parse(subspace_json(sp, s));
  CHECK(keys_of(k) == std::vector<std::string>{"dimension", "kept_dimension", "coordinate", "basis"});
  CHECK(k["kept_dimension"] == 1);  // anyons 1, 2 fuse to 1 in one of the two trees
  CHECK(subspace_text(sp, keep_canonical(m, groups), s).rfind("kept subspace 1-2:1 of V(t t t t; 1): dimension 1 of 2",
                                                              0) == 0);
}

TEST_CASE("generator renderings: names s3 / s3^-1, one {generator, matrix} per entry") {
  CHECK(generator_name(3) == "s3");
  CHECK(generator_name(-3) == "s3^-1");
  Model m = fib();
  BraidGenerators g(m, parse_label(m, "1", "total"));
  std::vector<int> an = parse_anyons(m, "t t t t");
  GeneratorMatrices mats{{1, &g.matrix(an, 1)}, {-2, &g.matrix(an, -2)}};
  auto j = nlohmann::ordered_json::parse(generators_json(mats));
  REQUIRE(j.size() == 2);
  CHECK(keys_of(j[0]) == std::vector<std::string>{"generator", "matrix"});
  CHECK(j[1]["generator"] == "s2^-1");
  CHECK(generators_text(mats).rfind("s1 (2 x 2):\n  [", 0) == 0);
}

TEST_CASE("braid_report renderings: keys; text ends with the overall line") {
  Model m = fib();
  BraidGenerators g(m, parse_label(m, "1", "total"));
  std::vector<int> an = parse_anyons(m, "t t t t");
  BraidCheckOptions opt;
  BraidReport r = check_braid_representation(g, an, opt);
  auto j = nlohmann::ordered_json::parse(braid_report_json(r));
  CHECK(keys_of(j) == std::vector<std::string>{"ok", "dimension", "relations", "eigenvalues", "full_twist",
                                               "algebra_dimension", "irreducible"});
  CHECK(j["irreducible"] == true);
  std::string t = braid_report_text(m, an, g.total(), r, opt);
  CHECK(t.rfind("V(t t t t; 1): dimension 2\n", 0) == 0);
  CHECK(t.size() > 16);
  CHECK(t.substr(t.size() - 16) == "all checks hold\n");
}

TEST_CASE("link_invariant renderings: keys; the unknot's invariant is 1") {
  Model m = fib();
  Word w = parse_word("s1");  // closure of s1 on two strands: the unknot (one component)
  LinkInvariant li = link_invariant(m, parse_anyons(m, "t t"), w);
  auto j = nlohmann::ordered_json::parse(link_invariant_json(li, w.writhe()));
  CHECK(keys_of(j) == std::vector<std::string>{"components", "writhe", "quantum_trace", "invariant",
                                               "writhe_normalised"});
  CHECK(j["components"] == 1);
  CHECK(j["invariant"]["exact"] == "1");  // framing-corrected, unknot = 1 (common practice)
  CHECK(link_invariant_text(li, w.writhe()).rfind("closure: 1 component(s), writhe 1\n", 0) == 0);
}
