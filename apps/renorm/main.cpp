#include "commands.hpp"

#include <exception>
#include <iostream>

int main(int argc, char** argv)
{
    using namespace renorm::app;
    CLI::App app;
    int code = exit_ok;
    build_app(app, &code); // app.cpp: description, version flag, every subcommand
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
