// Renderings of model check reports and invariants (model/render.hpp): JSON keys in their documented order
// (README "model check --json" / "model info --json") and the text lines.
// Oracle: the Fibonacci model's quantum dimension d_t = (1 + sqrt 5)/2 (common practice) and its
// consistency (published data: F and R of the Fibonacci model satisfy pentagon and hexagon, common practice).
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/helpers.hpp"
#include "zetabraid/model/load.hpp"
#include "zetabraid/model/render.hpp"

using namespace zb;

namespace {

std::vector<std::string> keys_of(const nlohmann::ordered_json& j) {
  std::vector<std::string> k;
  for (const auto& [key, value] : j.items()) k.push_back(key);
  return k;
}

}  // namespace

TEST_CASE("check_report_json / check_report_text: keys and lines of a consistent model") {
  std::string path = zbtest::source_dir() + "/models/fibonacci.toml";
  Model m = load_model(path);
  CheckOptions opt;
  opt.threads = 1;
  CheckReport rep = check_model(m, opt);
  auto j = nlohmann::ordered_json::parse(check_report_json(m, path, rep));
  CHECK(keys_of(j) == std::vector<std::string>{"ok", "model", "file", "checks", "failures", "exact", "seconds"});
  CHECK(j["ok"] == true);
  CHECK(j["file"] == path);
  CHECK(j["checks"]["pentagon"]["failed"] == 0);
  CHECK(j["failures"].empty());
  std::string t = check_report_text(m, path, rep);
  CHECK(t.find("consistent: every check holds exactly\n") != std::string::npos);
  CHECK(t.find("  pentagon ") != std::string::npos);
}

TEST_CASE("check_report_text / check_report_json: failures of a corrupted file") {
  std::string path = zbtest::source_dir() + "/models/demo/broken_fibonacci.toml";
  Model m = load_model(path);
  CheckReport rep = check_model(m);
  REQUIRE_FALSE(rep.ok);
  std::string t = check_report_text(m, path, rep);
  CHECK(t.find("NOT consistent") != std::string::npos);
  CHECK(t.find("FAILED pentagon: ") != std::string::npos);
  CHECK(t.find("  residual = ") != std::string::npos);
  auto j = nlohmann::ordered_json::parse(check_report_json(m, path, rep));
  REQUIRE_FALSE(j["failures"].empty());
  CHECK(keys_of(j["failures"][0]).at(0) == "check");
}

TEST_CASE("invariants_json / invariants_text: keys, and every number as {exact, ball}") {
  Model m = load_model(zbtest::source_dir() + "/models/fibonacci.toml");
  Invariants inv = compute_invariants(m, 10);
  auto j = nlohmann::ordered_json::parse(invariants_json(m, inv, 10));
  CHECK(keys_of(j) == std::vector<std::string>{"model", "labels", "dimensions", "global_dimension_squared",
                                               "global_dimension", "fs_indicators", "twists", "S", "T",
                                               "gauss_sum", "gauss_phase", "central_charge_mod8", "modular",
                                               "verlinde", "fs_twist_formula_ok", "notes"});
  CHECK(keys_of(j["dimensions"][1]) == std::vector<std::string>{"exact", "ball"});
  CHECK(j["dimensions"][1]["ball"].get<std::string>().rfind("[1.61803398", 0) == 0);  // (1 + sqrt 5)/2
  std::string t = invariants_text(m, inv, 10);
  CHECK(t.find("d_t") != std::string::npos);
  CHECK(t.find("in [1.61803398") != std::string::npos);
}
