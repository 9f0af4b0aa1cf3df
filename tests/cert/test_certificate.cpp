// The producer's exports (cert/certificate.hpp) with hostile inputs: names, labels and paths that try to become
// PARI/GP code. Oracle: PARI/GP itself (zbtest::gp runs the exported script) and the file system (no side effect).
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <filesystem>
#include <regex>

#include "support/helpers.hpp"
#include "zetabraid/cert/certificate.hpp"

namespace fs = std::filesystem;

namespace {

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
