// Source: none needed - a fuzz target asserts properties (no crash, no escaping exception), no values.
// Fuzz target: the command line. The input is split at newlines into argv; the whole CLI::App of
// `renorm` (build_app) parses it, option conversions and checks included, and is stopped before
// any subcommand runs: the top-level parse-complete callback, which CLI11 calls before the
// subcommands' callbacks, throws. (Removing the subcommands' callbacks instead would destroy the
// shared argument structs they own while the options still point into them.)
// CLI11's parse errors and the exceptions main() turns into exit codes are expected; crashes,
// sanitizer reports and any other exception are bugs.
// No check values: the fuzz target asserts only that parsing any argument vector ends in a parse
// or a usage error without a crash, a hang or a sanitizer report.
#include "commands.hpp"

#include <cstddef>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

namespace {
/// Thrown once parsing is complete, before any subcommand's callback.
struct StopBeforeRun {
    int unused = 0;
};
} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size)
{
    std::vector<std::string> args{"renorm"};
    std::string cur;
    for (std::size_t i = 0; i < size; ++i) {
        const char c = static_cast<char>(data[i]);
        if (c == '\n') {
            args.push_back(cur);
            cur.clear();
        } else if (c != '\0') {
            cur += c;
        }
    }
    if (!cur.empty() || size == 0)
        args.push_back(cur);
    if (args.size() > 64)
        return 0;
    std::vector<char*> argv;
    for (auto& a : args)
        argv.push_back(a.data());
    argv.push_back(nullptr);

    CLI::App app;
    int code = 0;
    renorm::app::build_app(app, &code);
    app.parse_complete_callback([] { throw StopBeforeRun{}; });
    try {
        app.parse(static_cast<int>(args.size()), argv.data());
    } catch (const StopBeforeRun&) {
    } catch (const CLI::Error&) {
    } catch (const renorm::app::BadInput&) {
    } catch (const std::invalid_argument&) {
    }
    return 0;
}
