// zetabraid command-line front end: option parsing and dispatch only; the mathematics lives in the library.
#include <fmt/format.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>

#include "commands.hpp"
#include "zetabraid/error.hpp"

namespace zb::cli {

void write_file_atomic(const std::string& path, const std::string& text) {
  if (path == "-") {
    std::cout << text << std::flush;
    return;
  }
  namespace fs = std::filesystem;
  fs::path target(path);
  fs::path dir = target.parent_path().empty() ? fs::path(".") : target.parent_path();
  std::string tmpl = (dir / (".zetabraid-tmp-XXXXXX")).string();
  std::vector<char> buf(tmpl.begin(), tmpl.end());
  buf.push_back('\0');
  int fd = mkstemp(buf.data());
  if (fd < 0) throw InputError("cannot create a temporary file in " + dir.string());
  mode_t mask = umask(0);  // mkstemp creates 0600; give the output the usual permissions
  umask(mask);
  fchmod(fd, 0666 & ~mask);
  std::string tmp(buf.data());
  FILE* f = fdopen(fd, "wb");
  bool ok = f && std::fwrite(text.data(), 1, text.size(), f) == text.size();
  ok = (f && std::fclose(f) == 0) && ok;
  if (!ok) {
    std::remove(tmp.c_str());
    throw InputError("cannot write " + path);
  }
  std::error_code ec;
  fs::rename(tmp, target, ec);
  if (ec) {
    std::remove(tmp.c_str());
    throw InputError("cannot write " + path + ": " + ec.message());
  }
}

}  // namespace zb::cli

int main(int argc, char** argv) {
  using namespace zb;
  CLI::App app{"zetabraid: exact checks of anyon-model data and braid-group representations"};
  app.require_subcommand(1);
  app.set_version_flag("--version", "zetabraid 0.1.0");
  cli::Action action;
  cli::add_field_commands(app, action);
  cli::add_model_commands(app, action);
  cli::add_braid_commands(app, action);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    int rc = app.exit(e);
    return rc == 0 ? kExitOk : kExitInput;
  }
  try {
    return action ? action() : kExitInput;
  } catch (const InputError& e) {
    fmt::print(stderr, "zetabraid: error: {}\n", e.what());
    return kExitInput;
  } catch (const MathError& e) {
    fmt::print(stderr, "zetabraid: error: {}\n", e.what());
    return kExitInput;
  } catch (const ResourceError& e) {
    fmt::print(stderr, "zetabraid: resource limit: {}\n", e.what());
    return kExitResource;
  } catch (const std::bad_alloc&) {
    fmt::print(stderr, "zetabraid: resource limit: out of memory\n");
    return kExitResource;
  } catch (const std::exception& e) {
    fmt::print(stderr, "zetabraid: internal error: {}\n", e.what());
    return kExitInternal;
  }
}
