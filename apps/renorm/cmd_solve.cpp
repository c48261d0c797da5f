// renorm solve: estimates of alpha, delta and the next eigenvalues for one order z.
#include "commands.hpp"
#include "progress.hpp"

#include <renorm/io/atomic_file.hpp>
#include <renorm/io/checkpoint.hpp>
#include <renorm/solve/solve.hpp>
#include <renorm/version.hpp>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>
#include <sstream>
#include <unistd.h>

namespace renorm::app {

namespace {

struct SolveArgs {
    std::string order = "2";
    slong digits = 100;
    slong eigenvalues = 4;
    bool json = false;
    bool quiet = false;
    std::string coefficients;
    std::string basis = "auto";
    std::string checkpoint;
    std::string resume;
    std::string progress = "auto";
    int threads = 1;
    // Set at registration: whether an option was given (a resumed run takes the others from the
    // checkpoint).
    CLI::Option* order_opt = nullptr;
    CLI::Option* digits_opt = nullptr;
    CLI::Option* eigenvalues_opt = nullptr;
    CLI::Option* basis_opt = nullptr;
};

std::string eigen_text(const solve::EigenvalueReport& e)
{
    if (e.is_refined && !e.refined.text.empty())
        return e.refined.text;
    std::ostringstream os;
    os.precision(12);
    os << e.approx.real();
    if (e.approx.imag() != 0)
        os << (e.approx.imag() > 0 ? " + " : " - ") << std::abs(e.approx.imag()) << "i";
    return os.str();
}

std::string kind_text(const solve::EigenvalueReport& e)
{
    if (e.kind == spectrum::Kind::coordinate_change)
        return "coordinate change, alpha^(-z*" + std::to_string(e.power) + ")";
    return spectrum::to_string(e.kind);
}

slong eigen_digits(const solve::EigenvalueReport& e)
{
    return e.is_refined ? std::min<slong>(e.refined.stable_digits, 30) : 12;
}

std::string coefficients_json(const solve::Result& r, slong digits)
{
    nlohmann::json j;
    j["format"] = "renorm-coefficients";
    j["version"] = 1;
    j["order"] = r.problem.order;
    j["basis"] = solve::to_string(r.basis);
    if (r.basis == solve::Basis::taylor) {
        j["disc"] = {{"centre", r.problem.disc.centre}, {"radius", r.problem.disc.radius}};
        j["variable"] = "s = (y - centre) / radius, y = |x|^z, g(x) = G(y) = sum_k c_k s^k";
    } else {
        j["variable"] = "y = |x|^z on [0, 1], g(x) = G(y) = sum_k c_k T_k(2 y - 1)";
    }
    j["N"] = r.coefficients.length();
    j["certified"] = false;
    j["renorm_version"] = renorm::version;
    j["commit"] = renorm::git_commit;
    nlohmann::json c = nlohmann::json::array();
    for (slong k = 0; k < r.coefficients.length(); ++k)
        c.push_back(ball::approx_decimal(r.coefficients.coeff(k), digits + 10));
    j["coefficients"] = c;
    return j.dump(1) + "\n";
}

int run_solve(SolveArgs a)
{
    // --resume: read the checkpoint first; the request options not given take its values, the
    // ones given must match it (check_resume names the first difference).
    io::Checkpoint resumed;
    if (!a.resume.empty()) {
        resumed = io::read_checkpoint(a.resume);
        if (a.order_opt->count() == 0)
            a.order = resumed.order;
        if (a.digits_opt->count() == 0)
            a.digits = resumed.digits;
        if (a.eigenvalues_opt->count() == 0)
            a.eigenvalues = resumed.eigenvalues;
        if (a.basis_opt->count() == 0)
            a.basis = resumed.basis;
        if (a.checkpoint.empty())
            a.checkpoint = a.resume;
    }
    solve::Request req;
    req.order = a.order;
    req.digits = a.digits;
    req.eigenvalues = a.eigenvalues;
    req.basis = a.basis == "taylor"      ? solve::Basis::taylor
                : a.basis == "chebyshev" ? solve::Basis::chebyshev
                                         : solve::Basis::automatic;
    req.threads = a.threads;
    req.checkpoint_path = a.checkpoint;
    if (!a.resume.empty())
        req.resume = &resumed;
    // Everything that can be refused is refused before the run starts: the request and its
    // memory estimate (also on resume), the checkpoint's match, the output paths.
    solve::validate(req, available_memory_bytes());
    if (req.resume) {
        solve::check_resume(req, resumed);
        if (resumed.commit != renorm::git_commit)
            std::cerr << "renorm solve: note: the checkpoint was written by commit " << resumed.commit
                      << ", this is " << renorm::git_commit << "; the result may differ in the last digits\n";
    }
    if (!a.coefficients.empty())
        io::check_writable(a.coefficients);
    if (!a.checkpoint.empty())
        io::check_writable(a.checkpoint);
    // A long run without a checkpoint loses everything when it is interrupted: say so up front.
    if (const solve::Cost cost = solve::estimate_cost(req);
        cost.seconds > 600 && a.checkpoint.empty() && !req.resume && solve::choose_basis(req) == solve::Basis::taylor)
        std::cerr << "renorm solve: note: this run may take about " << static_cast<long>(cost.seconds / 60)
                  << " min (rough estimate); --checkpoint FILE saves it after every Newton step\n";
    ProgressLine progress(a.quiet ? ProgressMode::none
                          : a.progress == "lines" ? ProgressMode::lines
                          : a.progress == "none"  ? ProgressMode::none
                                                  : ProgressMode::automatic);
    req.progress = progress.callback();
    solve::Result r = solve::solve_constants(req);
    progress.finish();
    if (!r.converged) {
        std::cerr << "renorm solve: no result for z = " << a.order << ": " << r.message << "\n";
        return exit_failed;
    }
    const slong digits = std::min({r.alpha.stable_digits, r.delta.stable_digits, a.digits});
    if (!a.coefficients.empty())
        io::write_file_atomic(a.coefficients, coefficients_json(r, a.digits));
    if (a.json) {
        nlohmann::json j;
        j["order"] = a.order;
        j["alpha"] = r.alpha.text;
        j["delta"] = r.delta.text;
        j["digits"] = digits;
        j["alpha_digits"] = std::min(r.alpha.stable_digits, a.digits);
        j["delta_digits"] = std::min(r.delta.stable_digits, a.digits);
        nlohmann::json ev = nlohmann::json::array();
        for (const auto& e : r.eigenvalues)
            ev.push_back({{"value", eigen_text(e)}, {"kind", kind_text(e)}, {"digits", eigen_digits(e)}});
        j["eigenvalues"] = ev;
        j["basis"] = solve::to_string(r.basis);
        j["N"] = r.n;
        j["N_check"] = r.n_check;
        j["precision_bits"] = r.prec;
        j["log10_residual"] = r.log10_residual;
        j["certified"] = false;
        j["seconds"] = r.seconds;
        if (r.total_seconds >= 0)
            j["total_seconds"] = r.total_seconds; // all sittings of a resumed run
        else
            j["total_seconds"] = nullptr;
        std::cout << j.dump() << "\n";
        return exit_ok;
    }
    std::cout << "order z = " << a.order << "\n"
              << "alpha = " << r.alpha.text << "\n"
              << "delta = " << r.delta.text << "\n";
    if (!r.eigenvalues.empty()) {
        std::cout << "next eigenvalues of DT (by modulus):\n";
        for (const auto& e : r.eigenvalues)
            std::cout << "  " << eigen_text(e) << "   (" << kind_text(e) << ", " << eigen_digits(e)
                      << " digits)\n";
    }
    std::cout << "digits: alpha " << std::min(r.alpha.stable_digits, a.digits) << ", delta "
              << std::min(r.delta.stable_digits, a.digits)
              << " (stable between truncations N = " << r.n << " and N = " << r.n_check << ", "
              << solve::to_string(r.basis) << " basis)\n"
              << "working precision: " << r.prec << " bits; residual |G - T(G)| = 1e"
              << static_cast<long>(std::floor(r.log10_residual)) << "\n"
              << "status: ESTIMATE, not certified (renorm certify proves enclosures)\n";
    return exit_ok;
}

} // namespace

void register_solve(CLI::App& app, int* code)
{
    auto args = std::make_shared<SolveArgs>();
    CLI::App* sub = app.add_subcommand(
        "solve", "Estimate alpha, delta and the next eigenvalues for a critical point of order z");
    args->order_opt = sub->add_option("-z,--order", args->order, "order z > 1 of the critical point (any real number)")
        ->capture_default_str();
    args->digits_opt = sub->add_option("-d,--digits", args->digits, "significant digits wanted")->capture_default_str();
    args->eigenvalues_opt = sub->add_option("-k,--eigenvalues", args->eigenvalues, "how many eigenvalues after delta to report (0-50)")
        ->capture_default_str();
    args->basis_opt = sub->add_option("--basis", args->basis,
                    "taylor (disc about y = 1/2; fast at thousands of digits), chebyshev (collocation on "
                    "[0, 1]; any z), or auto (taylor for z <= 6)")
        ->check(CLI::IsMember({"auto", "taylor", "chebyshev"}))
        ->capture_default_str();
    sub->add_flag("--json", args->json, "print one JSON object on stdout");
    sub->add_flag("-q,--quiet", args->quiet, "no progress on stderr (the same as --progress none)");
    sub->add_option("--progress", args->progress,
                    "auto (one line rewritten in place when stderr is a terminal, nothing otherwise), "
                    "lines (one plain line per Newton step, also into a file or pipe), or none")
        ->check(CLI::IsMember({"auto", "lines", "none"}))
        ->capture_default_str();
    sub->add_option("--threads", args->threads,
                    "threads inside products and compositions (0: one per core); 2 gained 1.1-1.4x at "
                    "1500-3000 digits (README); the digits do not depend on it")
        ->capture_default_str();
    sub->add_option("--checkpoint", args->checkpoint,
                    "save the run's state to FILE after every Newton step and every finished stage "
                    "(Taylor basis only)")
        ->type_name("FILE");
    sub->add_option("--resume", args->resume,
                    "continue the run saved in FILE (and keep saving to it, unless --checkpoint names "
                    "another file); the result is identical to an uninterrupted run's")
        ->type_name("FILE");
    sub->add_option("--coefficients", args->coefficients,
                    "also write the coefficients of G to FILE (JSON, decimal strings)")
        ->type_name("FILE");
    sub->footer("Solves the doubling equation G(y) = -a G(G(y a^-z)^z), G(0) = 1, a = -1/G(1), with\n"
                "y = |x|^z, by Newton's method on a truncated Taylor series (each step doubles the\n"
                "digits; its linear system is solved by preconditioned GMRES), then finds delta (the\n"
                "eigenvalue of the linearised operator outside the unit disc) and the next eigenvalues,\n"
                "each marked relevant, irrelevant, or a coordinate change alpha^(-zm). Every digit\n"
                "printed agrees between two truncations (N and about 1.2 N). These are ESTIMATES;\n"
                "'renorm certify' proves enclosures.\n\n"
                "Examples:\n"
                "  renorm solve                          # z = 2, 100 digits\n"
                "  renorm solve --order 4 --digits 50 --json\n"
                "  renorm solve -z 3.5 -d 40 --coefficients g35.json\n\n"
                "Long runs: --checkpoint FILE saves the state after every Newton step (written to a\n"
                "temporary file, then renamed over FILE, so FILE is always complete). If the run is\n"
                "killed, --resume FILE continues it and prints exactly what the uninterrupted run\n"
                "would have printed. Options not given with --resume are taken from FILE; options\n"
                "given must match it. Checkpoints need the Taylor basis (z <= 6): with the Chebyshev\n"
                "basis --checkpoint and --resume are refused. The memory estimate is checked before\n"
                "the run starts, also on resume.\n"
                "  nohup renorm solve -d 10000 --checkpoint d10k.ckpt --progress lines 2> d10k.log &\n"
                "  renorm solve --resume d10k.ckpt --progress lines 2>> d10k.log");
    sub->callback([args, code] { *code = run_solve(*args); });
}

} // namespace renorm::app
