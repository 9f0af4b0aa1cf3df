// The layers only look down (DEVELOPERS.md, "Layout"): io and detail < field < linalg < model < braid < cert < cli.
// Every file in include/zetabraid/<layer>/, src/<layer>/ and tests/<layer>/ may include, directly or through
// project headers (tests/support fixtures included), only headers of its own layer or a lower one. The checker in
// src/cert/checker/ has its own stricter rule (tests/cert/test_verify.cpp). This test reads the source tree only
// (ZB_SOURCE_DIR), so it uses no test support and no zetabraid header itself.
#include <doctest/doctest.h>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <set>
#include <string>
#include <vector>

namespace fs = std::filesystem;

namespace {

// Rank of each layer folder; a folder not listed (tests/support, tests/fuzz) has no layer of its own.
const std::map<std::string, int> kRank = {{"io", 0},    {"detail", 0}, {"field", 1}, {"linalg", 2},
                                          {"model", 3}, {"braid", 4},  {"cert", 5},  {"cli", 6}};

// The layer of a file given relative to the source root, or "" when it has none (include/zetabraid/error.hpp is
// part of the bottom, like io).
std::string layer_of(const fs::path& rel) {
  std::vector<std::string> p;
  for (const auto& c : rel) p.push_back(c.string());
  std::string l;
  if (p.size() >= 3 && (p[0] == "src" || p[0] == "tests")) l = p[1];
  if (p.size() >= 3 && p[0] == "include" && p[1] == "zetabraid") l = p.size() == 3 ? "io" : p[2];
  return kRank.count(l) ? l : "";
}

std::vector<std::string> quoted_includes(const fs::path& file) {
  static const std::regex inc(R"re(^\s*#\s*include\s*"([^"]+)")re");
  std::vector<std::string> out;
  std::ifstream in(file);
  std::string line;
  std::smatch m;
  while (std::getline(in, line))
    if (std::regex_search(line, m, inc)) out.push_back(m[1]);
  return out;
}

// A quoted include resolved the way the build does: beside the file, then tests/ (the test include folder), then
// include/. Empty when it is not a file of the tree.
fs::path resolve(const fs::path& root, const fs::path& from, const std::string& name) {
  for (const fs::path& base : {from.parent_path(), root / "tests", root / "include"}) {
    std::error_code ec;
    fs::path p = fs::weakly_canonical(base / name, ec);
    if (!ec && fs::is_regular_file(p)) return p;
  }
  return {};
}

void walk(const fs::path& root, const fs::path& file, int rank, const std::string& chain, std::set<fs::path>* seen,
          const fs::path& start, std::vector<std::string>* bad) {
  for (const std::string& name : quoted_includes(file)) {
    fs::path p = resolve(root, file, name);
    if (p.empty() || !seen->insert(p).second) continue;
    std::string rel = fs::relative(p, root).string();
    std::string l = layer_of(fs::relative(p, root));
    std::string via = chain.empty() ? rel : chain + " -> " + rel;
    if (!l.empty() && kRank.at(l) > rank)
      bad->push_back(fs::relative(start, root).string() + " includes " + via + " (layer " + l + " is above)");
    else
      walk(root, p, rank, via, seen, start, bad);
  }
}

// Every upward include below `root`, one line each.
std::vector<std::string> layering_violations(const fs::path& root_in) {
  const fs::path root = fs::weakly_canonical(root_in);
  std::vector<std::string> bad;
  for (const auto& [layer, rank] : kRank)
    for (const fs::path& dir : {root / "include" / "zetabraid" / layer, root / "src" / layer, root / "tests" / layer}) {
      if (!fs::is_directory(dir)) continue;
      for (const auto& e : fs::recursive_directory_iterator(dir)) {
        const std::string ext = e.path().extension().string();
        if (!e.is_regular_file() || (ext != ".cpp" && ext != ".hpp" && ext != ".h")) continue;
        const fs::path f = fs::weakly_canonical(e.path());
        std::set<fs::path> seen{f};
        walk(root, f, rank, "", &seen, f, &bad);
      }
    }
  return bad;
}

void write(const fs::path& p, const std::string& text) {
  fs::create_directories(p.parent_path());
  std::ofstream(p) << text;
}

}  // namespace

TEST_CASE("no file of a layer includes a header of a higher layer (include/, src/, tests/; also through fixtures)") {
  std::vector<std::string> bad = layering_violations(ZB_SOURCE_DIR);
  for (const std::string& b : bad) FAIL_CHECK(b);
  CHECK(bad.empty());
}

TEST_CASE("negative control: upward includes, direct and through a test fixture, are caught") {
  const fs::path t = fs::temp_directory_path() / ("zb_layering_" + std::to_string(::getpid()));
  fs::remove_all(t);
  write(t / "include/zetabraid/braid/w.hpp", "#pragma once\n");
  write(t / "include/zetabraid/linalg/m.hpp", "#pragma once\n#include \"zetabraid/field/k.hpp\"\n");
  write(t / "include/zetabraid/field/k.hpp", "#pragma once\n#include <vector>\n");
  write(t / "tests/support/fixture.hpp", "#include \"zetabraid/linalg/m.hpp\"\n");
  write(t / "tests/linalg/test_m.cpp", "#include \"support/fixture.hpp\"\n  #  include \"zetabraid/braid/w.hpp\"\n");
  write(t / "tests/field/test_k.cpp", "#include \"zetabraid/field/k.hpp\"\n#include \"support/fixture.hpp\"\n");
  write(t / "src/model/a.cpp", "#include \"zetabraid/linalg/m.hpp\"\n#include \"missing.hpp\"\n");
  std::vector<std::string> bad = layering_violations(t);
  CAPTURE(bad.size());
  REQUIRE(bad.size() == 2);
  std::set<std::string> got(bad.begin(), bad.end());
  CHECK(got.count("tests/linalg/test_m.cpp includes include/zetabraid/braid/w.hpp (layer braid is above)") == 1);
  CHECK(got.count("tests/field/test_k.cpp includes tests/support/fixture.hpp -> include/zetabraid/linalg/m.hpp "
                  "(layer linalg is above)") == 1);
  fs::remove_all(t);
}
