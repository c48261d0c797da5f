#include "commands.hpp"

#include <renorm/version.hpp>

#include <exception>
#include <iostream>

int main(int argc, char** argv)
{
    using namespace renorm::app;
    CLI::App app{"renorm: universal constants of period-doubling renormalization (Feigenbaum's "
                 "delta and alpha, and their analogues for a critical point of any order z), "
                 "computed to any precision, with rigorous enclosures and an independent "
                 "cross-check in concrete map families."};
    app.set_version_flag("--version", std::string("renorm ") + renorm::version + " (commit " +
                                          renorm::git_commit + ")");
    app.require_subcommand(1);
    app.footer("Exit codes: 0 ok, 1 computation failed, 2 bad input, 3 not certified.\n"
               "Run 'renorm COMMAND --help' for the options and an example of each command.");
    int code = exit_ok;
    register_solve(app, &code);
    register_cascade(app, &code);
    register_certify(app, &code);
    register_verify(app, &code);
    register_table(app, &code);
    register_plot(app, &code);
    try {
        app.parse(argc, argv);
    } catch (const CLI::CallForHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForAllHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForVersion& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        // CLI11 prints its own message; every parse error is bad input.
        app.exit(e);
        return exit_bad_input;
    } catch (const BadInput& e) {
        std::cerr << "renorm: error: " << e.what() << "\n";
        return exit_bad_input;
    } catch (const std::invalid_argument& e) {
        std::cerr << "renorm: error: " << e.what() << "\n";
        return exit_bad_input;
    } catch (const std::exception& e) {
        std::cerr << "renorm: failed: " << e.what() << "\n";
        return exit_failed;
    }
    return code;
}
