// Placeholder: braid, certify and verify commands are registered here.
#include "commands.hpp"
namespace zb::cli {
void add_braid_commands(CLI::App&, Action&) {}
}  // namespace zb::cli
