// zetabraid command-line front end: option parsing and dispatch only; the mathematics lives in the library.
#include <fmt/format.h>

#include <cstdio>
#include <iostream>

#include "commands.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/output_file.hpp"

namespace zb::cli {

void write_file_atomic(const std::string& path, const std::string& text) { zb::write_file_atomic(path, text); }

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
  cli::add_certify_commands(app, action);
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
