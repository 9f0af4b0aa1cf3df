// Placeholder: model commands are registered here (see issue "Anyon-model files").
#include "commands.hpp"
namespace zb::cli {
void add_model_commands(CLI::App&, Action&) {}
}  // namespace zb::cli
