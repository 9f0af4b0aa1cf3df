// Shared test helpers: running the CLI and PARI/GP, files and scratch folders (random inputs: support/random.hpp).
#pragma once
#include <array>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>
#include <unistd.h>
#include <cstdio>
#include <string>
#include <sys/wait.h>

namespace zbtest {

struct RunResult {
  int status = -1;
  std::string out;
};

/// Runs a shell command, capturing stdout (stderr goes to stdout when merge is set).
inline RunResult run(const std::string& cmd, bool merge = false) {
  RunResult r;
  std::string full = cmd + (merge ? " 2>&1" : " 2>/dev/null");
  FILE* p = popen(full.c_str(), "r");
  if (!p) return r;
  std::array<char, 4096> buf{};
  size_t n;
  while ((n = fread(buf.data(), 1, buf.size(), p)) > 0) r.out.append(buf.data(), n);
  int st = pclose(p);
  r.status = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
  return r;
}

inline std::string cli() { return ZB_CLI; }

/// Whole file as a string; writing a string to a file.
inline std::string slurp(const std::string& path) {
  std::ifstream f(path);
  return std::string((std::istreambuf_iterator<char>(f)), std::istreambuf_iterator<char>());
}
inline void spit(const std::string& path, const std::string& text) { std::ofstream(path) << text; }

/// A per-process scratch folder /tmp/<prefix>_<pid>, created on demand.
inline std::string tmpdir(const std::string& prefix) {
  std::string p = "/tmp/" + prefix + "_" + std::to_string(::getpid());
  std::filesystem::create_directories(p);
  return p;
}
inline std::string source_dir() { return ZB_SOURCE_DIR; }
inline bool have_gp() { return std::string(ZB_GP).size() > 0 && std::string(ZB_GP).find("NOTFOUND") == std::string::npos; }

/// Runs a GP program (quiet, no colours) and returns its trimmed output.
inline std::string gp(const std::string& program) {
  std::string path = "/tmp/zb_test_gp_" + std::to_string(::getpid()) + ".gp";
  FILE* f = fopen(path.c_str(), "w");
  fputs(program.c_str(), f);
  fputs("\nquit\n", f);
  fclose(f);
  RunResult r = run(std::string(ZB_GP) + " -q -f --default colors=no " + path);
  std::remove(path.c_str());
  while (!r.out.empty() && (r.out.back() == '\n' || r.out.back() == ' ')) r.out.pop_back();
  return r.out;
}

}  // namespace zbtest
