// The braid commands end to end (bundled Fibonacci file).
#include <doctest/doctest.h>

#include <filesystem>
#include <nlohmann/json.hpp>

#include "support/helpers.hpp"

namespace {
std::string fib() { return zbtest::source_dir() + "/models/fibonacci.toml"; }
}  // namespace

TEST_CASE("zetabraid braid basis / check / generators / invariant") {
  if (!std::filesystem::exists(fib())) return;
  auto r = zbtest::run(zbtest::cli() + " braid basis --model " + fib() + " --anyons 't t t t t t' --total 1 --json");
  REQUIRE(r.status == 0);
  auto j = nlohmann::json::parse(r.out);
  CHECK(j["dimension"] == 5);  // Fibonacci number F_5 (common practice)
  CHECK(j["basis"][0] == "(t,1,t,1,t,1)");
  r = zbtest::run(zbtest::cli() + " braid check --model " + fib() + " --anyons 't t t t t t' --total 1 --json");
  REQUIRE(r.status == 0);
  j = nlohmann::json::parse(r.out);
  CHECK(j["ok"] == true);
  CHECK(j["full_twist"]["holds"] == true);
  CHECK(j["algebra_dimension"] == 25);
  CHECK(j["irreducible"] == true);
  for (const auto& g : j["eigenvalues"]) {
    CHECK(g["eigenvalues"].size() == 2);
    CHECK(g["hecke"] == true);
  }
  // the deliberately broken demo model fails the braid checks (exit 1) or is rejected as input (exit 2)
  std::string demo = zbtest::source_dir() + "/models/demo/broken_fibonacci.toml";
  if (std::filesystem::exists(demo)) {
    r = zbtest::run(zbtest::cli() + " braid check --model " + demo + " --anyons 't t t t' --total 1");
    CHECK(r.status != 0);
  }
  r = zbtest::run(zbtest::cli() + " braid generators --model " + fib() + " --anyons 't t t' --total t --generator -2 --json");
  REQUIRE(r.status == 0);
  CHECK(nlohmann::json::parse(r.out)[0]["generator"] == "s2^-1");
  r = zbtest::run(zbtest::cli() + " braid invariant --model " + fib() + " --strands 't t' --word 's1' --json");
  REQUIRE(r.status == 0);
  CHECK(nlohmann::json::parse(r.out)["invariant"]["exact"] == "1");  // unknot (Markov stabilisation)
  r = zbtest::run(zbtest::cli() + " braid subspace --model " + fib() +
                 " --anyons 't t t t t t' --total 1 --keep '1-3:t,4-6:t' --json");
  REQUIRE(r.status == 0);
  j = nlohmann::json::parse(r.out);
  CHECK(j["kept_dimension"] == 4);  // the two-qubit space (common practice)
  CHECK(j["coordinate"] == true);
  // input errors: exit 2 with a message
  r = zbtest::run(zbtest::cli() + " braid basis --model " + fib() + " --anyons 't x' --total 1", true);
  CHECK(r.status == 2);
  CHECK(r.out.find("unknown label 'x'") != std::string::npos);
  r = zbtest::run(zbtest::cli() + " braid basis --model " + fib() + " --anyons 't' --total 1", true);
  CHECK(r.status == 2);
  r = zbtest::run(zbtest::cli() + " braid invariant --model " + fib() + " --strands 't t' --word 's2'", true);
  CHECK(r.status == 2);
}
