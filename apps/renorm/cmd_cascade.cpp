// Placeholder while the cascade command is being written; replaced in this same series of commits.
#include "commands.hpp"
namespace renorm::app {
void register_cascade(CLI::App& app, int* code)
{
    auto* sub = app.add_subcommand("cascade", "(being written)");
    sub->callback([code] { *code = exit_failed; });
}
} // namespace renorm::app
