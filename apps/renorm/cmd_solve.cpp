// Placeholder while the solve command is being written; replaced in this same series of commits.
#include "commands.hpp"
namespace renorm::app {
void register_solve(CLI::App& app, int* code)
{
    auto* sub = app.add_subcommand("solve", "(being written)");
    sub->callback([code] { *code = exit_failed; });
}
} // namespace renorm::app
