// The model commands end to end: make (stdout and --out), info --json, and reproducibility of bundled files.
#include <doctest/doctest.h>

#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "support/helpers.hpp"

namespace {
using zbtest::slurp;
}  // namespace

TEST_CASE("bundled generated files are exactly what model make writes today") {
  std::string dir = zbtest::source_dir() + "/models/";
  struct Case {
    const char* args;
    const char* file;
  };
  for (Case c : {Case{"su2 --level 1", "su2_k1.toml"}, Case{"su2 --level 3", "su2_k3.toml"},
                 Case{"su2 --level 3 --even", "su2_k3_even.toml"},
                 Case{"su2 --level 4 --gauge cyclotomic", "su2_k4_cyclotomic.toml"},
                 Case{"cyclic --order 5 --power 2", "z5.toml"}, Case{"toric-code", "toric_code.toml"},
                 Case{"three-fermion", "three_fermion.toml"}}) {
    CAPTURE(c.args);
    auto r = zbtest::run(zbtest::cli() + " model make " + c.args);  // stdout without --out
    CHECK(r.status == 0);
    CHECK(r.out == slurp(dir + c.file));
  }
}

TEST_CASE("model make --out writes a file that passes model check; bad options exit 2") {
  std::string out = "/tmp/zb_model_cli_" + std::to_string(::getpid()) + ".toml";
  auto r = zbtest::run(zbtest::cli() + " model make su2 --level 2 --out " + out);
  CHECK(r.status == 0);
  CHECK(r.out.empty());
  r = zbtest::run(zbtest::cli() + " model check " + out);
  CHECK(r.status == 0);
  std::remove(out.c_str());
  CHECK(zbtest::run(zbtest::cli() + " model make su2 --level 2 --gauge nonsense").status == 2);
  CHECK(zbtest::run(zbtest::cli() + " model make su2").status == 2);
  CHECK(zbtest::run(zbtest::cli() + " model make su2 --level 2 --out /nonexistent-dir/x.toml").status == 2);
}

TEST_CASE("model info --json: every number as {exact, ball}") {
  auto r = zbtest::run(zbtest::cli() + " model info --json " + zbtest::source_dir() + "/models/ising.toml");
  REQUIRE(r.status == 0);
  auto j = nlohmann::json::parse(r.out);
  for (const char* k : {"labels", "dimensions", "twists", "S", "T", "fs_indicators", "central_charge_mod8", "modular"})
    CHECK(j.contains(k));
  CHECK(j["labels"].size() == 3);
  CHECK(j["dimensions"][1]["ball"].get<std::string>().find("1.41421356") != std::string::npos);  // sqrt 2
  CHECK(j["S"][1][1]["exact"] == "0");
  CHECK(j["central_charge_mod8"]["exact"] == "1/2");
  CHECK(j["fs_indicators"][1]["exact"] == "1");
  CHECK(j["modular"] == true);
  CHECK(j["verlinde"]["ok"] == true);
  // a fusion-only model (no [R]): dimensions, no twists
  std::string f = "/tmp/zb_model_cli_fusion_" + std::to_string(::getpid()) + ".toml";
  std::ofstream(f) << "labels = [\"1\", \"t\"]\nf_unlisted = \"1\"\n[field]\nconductor = 5\n[constants]\n"
                      "phi = \"1 + zeta + zeta^4\"\n[fusion]\n\"t t\" = [\"1\", \"t\"]\n[F]\n"
                      "\"t t t t\" = [[\"1/phi\", \"1\"], [\"1/phi\", \"-1/phi\"]]\n";
  r = zbtest::run(zbtest::cli() + " model check --json " + f);
  CHECK(r.status == 0);  // a non-unitary gauge of Fibonacci's F: consistent, no hexagons
  CHECK(nlohmann::json::parse(r.out)["checks"]["hexagon"]["skipped"] == true);
  r = zbtest::run(zbtest::cli() + " model info --json " + f);
  CHECK(r.status == 0);
  auto k = nlohmann::json::parse(r.out);
  CHECK(k["twists"].is_null());
  CHECK(k["dimensions"][1]["ball"].get<std::string>().find("1.6180339") != std::string::npos);
  std::remove(f.c_str());
}
