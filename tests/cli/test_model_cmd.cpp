// The model commands end to end: check (exit codes, JSON), make (stdout and --out), info --json, reproducibility of
// bundled files, and hostile model files (bad input, FIFOs and devices, oversize files, the bit budget) through the
// command line and the loader behind it.
#include <doctest/doctest.h>

#include <fmt/format.h>
#include <sys/stat.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {
using zbtest::slurp;
double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}
std::string load_error(const std::string& path) {
  try {
    load_model(path);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
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

TEST_CASE("model check CLI: exit codes and the JSON shape") {
  std::string dir = zbtest::source_dir();
  auto r = zbtest::run(zbtest::cli() + " model check --json " + dir + "/models/fibonacci.toml");
  CHECK(r.status == 0);
  CHECK(r.out.find("\"ok\":true") != std::string::npos);
  CHECK(r.out.find("\"pentagon\":{\"count\":50,\"failed\":0}") != std::string::npos);
  CHECK(r.out.find("\"failures\":[]") != std::string::npos);
  r = zbtest::run(zbtest::cli() + " model check --json " + dir + "/models/demo/broken_fibonacci.toml");
  CHECK(r.status == 1);
  CHECK(r.out.find("\"ok\":false") != std::string::npos);
  CHECK(r.out.find("\"residual\":{\"exact\"") != std::string::npos);
  r = zbtest::run(zbtest::cli() + " model check " + dir + "/models/demo/broken_fibonacci.toml");
  CHECK(r.status == 1);
  CHECK(r.out.find("FAILED pentagon") != std::string::npos);
}

TEST_CASE("bundled model files load and the CLI rejects bad input with exit 2 and no output file") {
  std::string dir = zbtest::source_dir();
  for (const char* f : {"fibonacci", "ising", "su2_k3", "yang_lee", "toric_code", "three_fermion", "z5"})
    CHECK_NOTHROW(load_model(dir + "/models/" + f + ".toml"));
  auto r = zbtest::run(zbtest::cli() + " model check /nonexistent/file.toml");
  CHECK(r.status == 2);
  std::string bad = "/tmp/zb_model_test_bad.toml";
  std::ofstream(bad) << "labels = [\"1\", \"t\"]\n[field]\nconductor = 5\n[fusion]\n\"t t\" = [\"1\", \"q\"]\n";
  r = zbtest::run(zbtest::cli() + " model check " + bad, true);
  CHECK(r.status == 2);
  CHECK(r.out.find(bad + ":5") != std::string::npos);
  std::remove(bad.c_str());
  std::string out = "/tmp/zb_model_test_out.toml";
  std::remove(out.c_str());
  r = zbtest::run(zbtest::cli() + " model make su2 --level 0 --out " + out);
  CHECK(r.status == 2);
  CHECK(!std::ifstream(out).good());
}

TEST_CASE("model files are regular files of bounded size: FIFO, directory, /dev/zero and oversize are refused") {
  const std::string dir = zbtest::tmpdir("zb_load_test");
  const std::string fifo = dir + "/model.fifo";
  std::remove(fifo.c_str());
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  auto t0 = std::chrono::steady_clock::now();
  std::string e = load_error(fifo);  // nobody writes to it: a blocking open would hang here
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  CHECK(e.find("not a regular file") != std::string::npos);
  std::remove(fifo.c_str());
  CHECK(load_error(dir).find("is a directory") != std::string::npos);
  t0 = std::chrono::steady_clock::now();
  CHECK(load_error("/dev/zero").find("not a regular file") != std::string::npos);
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  const std::string big = dir + "/big.toml";
  std::ofstream(big) << "labels = [\"1\"]\n";
  std::filesystem::resize_file(big, kMaxModelFileBytes + 1);  // sparse: no disk space used
  t0 = std::chrono::steady_clock::now();
  CHECK(load_error(big).find("larger than the limit") != std::string::npos);
  CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
  std::remove(big.c_str());
  // The CLI maps these to exit 2.
  auto r = zbtest::run(zbtest::cli() + " model check /dev/zero", true);
  CHECK(r.status == 2);
}

TEST_CASE("the bit budget bounds constants: chains of powers and of squarings exit 3 quickly") {
  const std::string head = "labels = [\"1\"]\n[field]\nconductor = 5\n[constants]\n";
  auto resource_error = [](const std::string& text, const ExpressionLimits& lim = {}) {
    auto t0 = std::chrono::steady_clock::now();
    std::string msg;
    try {
      parse_model(text, "m.toml", lim);
    } catch (const ResourceError& e) {
      msg = e.what();
    }
    CHECK(seconds_since(t0) < 10.0);  // no hang (not a speed test)
    return msg;
  };
  std::string e = resource_error(head + "a = \"2^100000\"\nb = \"a^100000\"\nc = \"b^100000\"\n[fusion]\n");
  CHECK(e.find("m.toml:6: constants.b: column 2: the power ^100000") != std::string::npos);
  CHECK(e.find(fmt::format("limit of {} bits", kDefaultMaxValueBits)) != std::string::npos);
  std::string sq = head + "c0 = \"3^60000\"\n";
  for (int i = 1; i < 30; ++i) sq += fmt::format("c{} = \"c{} * c{}\"\n", i, i - 1, i - 1);
  e = resource_error(sq + "[fusion]\n");
  CHECK(e.find("constants.c") != std::string::npos);
  CHECK(e.find("limit of") != std::string::npos);
  // A smaller limit through the loading API.
  ExpressionLimits small;
  small.max_bits = 5000;
  e = resource_error(head + "a = \"2^4000\"\nb = \"a * a\"\n[fusion]\n", small);
  CHECK(e.find("m.toml:6: constants.b") != std::string::npos);
  CHECK(e.find("limit of 5000 bits") != std::string::npos);
  CHECK_NOTHROW(parse_model(head + "a = \"2^4000\"\nb = \"a * a\"\n[fusion]\n", "m.toml"));
  // The CLI exits 3.
  const std::string path = zbtest::tmpdir("zb_load_test") + "/pow.toml";
  zbtest::spit(path, head + "a = \"2^100000\"\nb = \"a^100000\"\n[fusion]\n");
  auto r = zbtest::run(zbtest::cli() + " model check " + path, true);
  CHECK(r.status == 3);
  CHECK(r.out.find("limit of") != std::string::npos);
  std::remove(path.c_str());
}
