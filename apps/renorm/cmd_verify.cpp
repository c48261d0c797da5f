// `renorm verify FILE`: re-checks a certificate from its content alone (no solver).
#include "commands.hpp"

#include <renorm/io/certificate_file.hpp>

#include <fstream>
#include <iostream>
#include <sstream>

namespace renorm::app {

namespace {

struct VerifyArgs {
    std::string file;
    bool json = false;
};

int run_verify(const VerifyArgs& a)
{
    std::ifstream in(a.file, std::ios::binary);
    if (!in)
        throw BadInput("cannot read '" + a.file + "'");
    std::ostringstream ss;
    ss << in.rdbuf();
    io::Verdict v = io::verify_certificate(ss.str());
    if (a.json) {
        nlohmann::json j;
        j["file"] = a.file;
        j["accepted"] = v.accepted;
        if (!v.accepted)
            j["reason"] = v.reason;
        j["proved"] = v.proved;
        std::cout << j.dump(2) << "\n";
    } else if (v.accepted) {
        std::cout << "ACCEPTED: every bound was recomputed from " << a.file
                  << " and every claim follows. Proved:\n";
        for (const auto& s : v.proved)
            std::cout << "  - " << s << "\n";
    }
    if (!v.accepted) {
        std::cerr << "renorm verify: REJECTED: " << v.reason << "\n";
        return v.bad_input ? exit_bad_input : exit_not_certified;
    }
    return exit_ok;
}

} // namespace

void register_verify(CLI::App& app, int* code)
{
    auto args = std::make_shared<VerifyArgs>();
    auto* sub = app.add_subcommand(
        "verify", "Re-check a certificate written by `renorm certify`: recompute every bound "
                  "from the file alone and accept it only if every claim follows.");
    sub->add_option("file", args->file, "certificate file")->required();
    sub->add_flag("--json", args->json, "print the verdict as JSON");
    sub->footer("Example: renorm verify alpha2.cert.json\n"
                "Exit codes: 0 accepted, 2 unreadable/malformed/unknown version, 3 rejected "
                "(altered, or a claim does not follow).");
    sub->callback([args, code] { *code = run_verify(*args); });
}

} // namespace renorm::app
