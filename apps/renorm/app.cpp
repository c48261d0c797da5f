// The whole `renorm` command line as one CLI::App: main.cpp parses it and runs the chosen
// subcommand; the command-line fuzz target (tests/fuzz) parses fuzzed argv with it.
#include "commands.hpp"

#include <renorm/version.hpp>

namespace renorm::app {

void build_app(CLI::App& app, int* code)
{
    app.description("renorm: universal constants of period-doubling renormalization (Feigenbaum's "
                    "delta and alpha, and their analogues for a critical point of any order z), "
                    "computed to any precision, with rigorous enclosures and an independent "
                    "cross-check in concrete map families.");
    app.set_version_flag("--version", std::string("renorm ") + renorm::version + " (commit " +
                                          renorm::git_commit + ")");
    app.require_subcommand(1);
    app.footer("Exit codes: 0 ok, 1 computation failed, 2 bad input, 3 not certified.\n"
               "Run 'renorm COMMAND --help' for the options and an example of each command.");
    register_solve(app, code);
    register_cascade(app, code);
    register_crosscheck(app, code);
    register_certify(app, code);
    register_verify(app, code);
    register_table(app, code);
    register_plot(app, code);
    register_checkpoint(app, code);
}

} // namespace renorm::app
