#pragma once
// Each subcommand of `renorm` lives in its own file and registers itself through one
// function declared here. main.cpp only parses and dispatches; all mathematics is in lib/.

#include <CLI/CLI.hpp>

#include <string>

namespace renorm::app {

/// Exit codes shared by every subcommand (documented in README.md).
enum ExitCode : int {
    exit_ok = 0,
    exit_failed = 1,        ///< the computation did not converge or could not finish
    exit_bad_input = 2,     ///< bad arguments, unreadable or unwritable files
    exit_not_certified = 3, ///< a proof did not close / a certificate was rejected
};

/// Thrown by a command for bad input; main prints "renorm: error: <message>" and exits 2.
struct BadInput : std::runtime_error {
    using std::runtime_error::runtime_error;
};

/// Each register_* adds a subcommand to `app`. The subcommand's callback stores its
/// exit code in `*code`.
void register_solve(CLI::App& app, int* code);
void register_cascade(CLI::App& app, int* code);
void register_crosscheck(CLI::App& app, int* code);
void register_certify(CLI::App& app, int* code);
void register_verify(CLI::App& app, int* code);
void register_table(CLI::App& app, int* code);
void register_plot(CLI::App& app, int* code);
void register_checkpoint(CLI::App& app, int* code);

/// The whole command line: description, --version, footer and every subcommand above.
void build_app(CLI::App& app, int* code);

} // namespace renorm::app
