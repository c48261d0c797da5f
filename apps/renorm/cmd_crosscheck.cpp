// renorm crosscheck: the fixed-point solver against the cascade of the power family
// 1 - mu |x|^z, two independent routes to the same constants.
#include "commands.hpp"
#include "progress.hpp"

#include <renorm/cascade/run.hpp>
#include <renorm/solve/solve.hpp>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <iostream>
#include <memory>

namespace renorm::app {

namespace {

struct CrosscheckArgs {
    std::string order = "2";
    slong digits = 40;
    int levels = 22;
    bool json = false;
    bool quiet = false;
};

int run_crosscheck(const CrosscheckArgs& a)
{
    solve::Request req;
    req.order = a.order;
    req.digits = a.digits;
    req.eigenvalues = 0;
    solve::validate(req, available_memory_bytes());
    if (a.levels < 2 || a.levels > cascade::max_cascade_level)
        throw BadInput("--levels must be between 2 and " + std::to_string(cascade::max_cascade_level) +
                       ", got " + std::to_string(a.levels));
    ProgressLine progress(a.quiet);
    req.progress = progress.callback();
    solve::Result fp = solve::solve_constants(req);
    progress.finish();
    if (!fp.converged) {
        std::cerr << "renorm crosscheck: the fixed-point solver failed: " << fp.message << "\n";
        return exit_failed;
    }
    cascade::Family family = cascade::make_builtin_family("power", a.order);
    cascade::CascadeOptions co;
    co.levels = a.levels;
    cascade::CascadeResult cr = cascade::run_cascade(family, co);
    if (cr.failed && cr.levels.size() < 4) {
        std::cerr << "renorm crosscheck: the cascade failed at level " << cr.failed_level << ": "
                  << cr.failure << "\n";
        return exit_failed;
    }
    // Agreement: the significant digits the two routes share. alpha is signed in the cascade
    // (the cycle point alternates sides) and positive in the fixed-point normalisation.
    ball::Ball cascade_alpha = cr.alpha_limit.value;
    arb_abs(cascade_alpha.get(), cascade_alpha.get());
    const slong cap = a.digits;
    const slong agree_delta =
        cr.delta_limit.ok ? solve::approx_agreeing_digits(fp.delta.value, cr.delta_limit.value, cap) : 0;
    const slong agree_alpha =
        cr.alpha_limit.ok ? solve::approx_agreeing_digits(fp.alpha.value, cascade_alpha, cap) : 0;
    // The routes are consistent when they agree on every digit the cascade claims (up to one
    // unit of rounding in the last claimed digit).
    std::string abs_alpha_text = cr.alpha_limit.text;
    if (!abs_alpha_text.empty() && abs_alpha_text[0] == '-')
        abs_alpha_text.erase(0, 1);
    const bool consistent = agree_delta + 1 >= std::min(cr.delta_limit.digits, fp.delta.stable_digits) &&
                            agree_alpha + 1 >= std::min(cr.alpha_limit.digits, fp.alpha.stable_digits);
    if (a.json) {
        nlohmann::json j;
        j["order"] = a.order;
        j["fixed_point"] = {{"alpha", fp.alpha.text}, {"delta", fp.delta.text},
                            {"alpha_digits", fp.alpha.stable_digits}, {"delta_digits", fp.delta.stable_digits}};
        j["cascade"] = {{"family", "1 - mu |x|^z"}, {"levels", a.levels},
                        {"alpha", abs_alpha_text}, {"delta", cr.delta_limit.text},
                        {"alpha_digits", cr.alpha_limit.digits}, {"delta_digits", cr.delta_limit.digits}};
        j["agreeing_digits"] = {{"alpha", agree_alpha}, {"delta", agree_delta}};
        j["consistent"] = consistent;
        j["certified"] = false;
        std::cout << j.dump() << "\n";
    } else {
        std::cout << "order z = " << a.order << "\n"
                  << "fixed point (estimate):   alpha = " << fp.alpha.text << "\n"
                  << "                          delta = " << fp.delta.text << "\n"
                  << "cascade of 1 - mu |x|^z, " << a.levels << " levels (extrapolated estimate):\n"
                  << "                         |alpha| = " << abs_alpha_text << " ("
                  << cr.alpha_limit.digits << " digits claimed)\n"
                  << "                          delta = " << cr.delta_limit.text << " ("
                  << cr.delta_limit.digits << " digits claimed)\n"
                  << "agreeing significant digits: alpha " << agree_alpha << ", delta " << agree_delta << "\n"
                  << (consistent ? "consistent: the two routes agree on every digit the cascade claims\n"
                                 : "INCONSISTENT: the routes disagree within the digits the cascade claims\n");
    }
    return consistent ? exit_ok : exit_failed;
}

} // namespace

void register_crosscheck(CLI::App& app, int* code)
{
    auto args = std::make_shared<CrosscheckArgs>();
    CLI::App* sub = app.add_subcommand(
        "crosscheck", "Compare the fixed-point constants with the cascade of the family 1 - mu |x|^z");
    sub->add_option("-z,--order", args->order, "order z > 1 of the critical point")->capture_default_str();
    sub->add_option("-d,--digits", args->digits, "digits asked of the fixed-point solver")->capture_default_str();
    sub->add_option("-L,--levels", args->levels, "cascade levels (periods up to 2^L)")->capture_default_str();
    sub->add_flag("--json", args->json, "print one JSON object on stdout");
    sub->add_flag("-q,--quiet", args->quiet, "no progress line on stderr");
    sub->footer("Two independent routes to the same constants: the doubling fixed point (renorm solve)\n"
                "and the ratios of superstable parameters of 1 - mu |x|^z, extrapolated (renorm\n"
                "cascade). Both are estimates here; exit code 1 when they disagree within the digits\n"
                "the cascade claims.\n\n"
                "Examples:\n"
                "  renorm crosscheck                 # z = 2, 22 levels\n"
                "  renorm crosscheck --order 4 --levels 18 --json");
    sub->callback([args, code] { *code = run_crosscheck(*args); });
}

} // namespace renorm::app
