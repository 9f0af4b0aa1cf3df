// Command registration for the zetabraid front end. Each area registers its subcommands; a subcommand's callback
// stores the action to run, and main() runs it and maps exceptions to the documented exit codes.
#pragma once
#include <CLI/CLI.hpp>
#include <functional>
#include <string>

namespace zb::cli {

using Action = std::function<int()>;  // returns the exit code

void add_field_commands(CLI::App& app, Action& action);
void add_model_commands(CLI::App& app, Action& action);
void add_braid_commands(CLI::App& app, Action& action);    ///< braid basis|subspace|generators|check|invariant
void add_certify_commands(CLI::App& app, Action& action);  ///< certify, verify

/// Writes text to path atomically (temporary file in the same folder, then rename); "-" means stdout.
void write_file_atomic(const std::string& path, const std::string& text);

}  // namespace zb::cli
