// `renorm certify`: a computer-assisted proof of the fixed point of the doubling operator and of
// the eigenvalue delta, written as a re-checkable certificate. The mathematics is in
// lib/renorm/certify (proof) and lib/renorm/io (certificate document); this file parses options,
// prints and sets the exit code.
#include "commands.hpp"

#include <renorm/certify/proof.hpp>
#include <renorm/io/atomic_file.hpp>
#include <renorm/io/certificate_file.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <iostream>

namespace renorm::app {

namespace {

struct CertifyArgs {
    std::string order = "2";
    int digits = 100;
    std::string out;
    bool json = false;
    std::vector<double> disc;
};

std::string sci(const series::Bound& b) { return b.text(3); }
std::string rad(const ball::Ball& x) { return series::Bound::radius_of(x).text(3); }

std::string sci(double x)
{
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.2e", x);
    return buf;
}

std::string digits_text(const ball::Ball& b, slong max_digits)
{
    slong count = 0;
    std::string s = ball::determined_digits(b, max_digits, &count);
    return count == 0 ? std::string("?") : s;
}

int run_certify(const CertifyArgs& a)
{
    if (a.digits < 5 || a.digits > 2000)
        throw BadInput("--digits must be between 5 and 2000");
    doubling::Problem problem;
    problem.order = a.order;
    if (!a.disc.empty()) {
        if (a.disc.size() != 2 || !(a.disc[1] > 0) || !(a.disc[0] < a.disc[1]))
            throw BadInput("--disc needs CENTRE,RADIUS with 0 < CENTRE < RADIUS");
        problem.disc.centre = a.disc[0];
        problem.disc.radius = a.disc[1];
    }
    (void)problem.order_ball(64); // throws std::invalid_argument for a bad order
    if (!a.out.empty())
        io::check_writable(a.out, true);

    const auto t0 = std::chrono::steady_clock::now();
    // Starting point (no guarantee): continuation in z, then refinement beyond the target so that
    // the residual bound Y lands below 10^-digits.
    newton::FixedPoint start = newton::approx_continuation(problem, 40, 192);
    if (!start.converged) {
        std::cerr << "renorm certify: no approximate fixed point: " << start.message << "\n";
        return exit_failed;
    }
    if (a.disc.empty()) {
        // The proof needs u and v to map the disc well inside itself; the default disc does
        // not do that for larger z, so pick one (no guarantee; the proof checks it).
        series::Disc d = certify::approx_choose_disc(problem, start.g, start.n);
        if (d.centre != problem.disc.centre || d.radius != problem.disc.radius) {
            problem.disc = d;
            start = newton::approx_continuation(problem, 40, 192);
            if (!start.converged) {
                std::cerr << "renorm certify: no approximate fixed point on the disc: "
                          << start.message << "\n";
                return exit_failed;
            }
        }
    }
    // Up to three attempts: when a proof does not close (or is too wide), the next attempt
    // uses a longer truncation (the tail bound beta falls like ||sigma_v||^N) and more guard
    // digits. The limit is fixed and reaching it is reported.
    const int max_attempts = 3;
    newton::FixedPoint fp;
    certify::Certificate c;
    bool enough = false;
    double t_solve = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    double t_proof = 0;
    int attempt = 0;
    slong min_length = 0;
    for (attempt = 1; attempt <= max_attempts; ++attempt) {
        const auto ta = std::chrono::steady_clock::now();
        const slong guard = 15 + 10 * (attempt - 1);
        newton::RefineOptions opt;
        opt.min_length = min_length;
        fp = newton::approx_refine(start, a.digits + guard, opt);
        if (!fp.converged) {
            std::cerr << "renorm certify: the approximate fixed point did not converge: "
                      << fp.message << "\n";
            return exit_failed;
        }
        const auto tb = std::chrono::steady_clock::now();
        const slong prec = ball::digits_to_bits(a.digits + guard + 10, 32);
        c = certify::certify_constants(problem, fp.g, fp.n, prec, 128);
        const auto tc = std::chrono::steady_clock::now();
        t_solve += std::chrono::duration<double>(tb - ta).count();
        t_proof += std::chrono::duration<double>(tc - tb).count();
        if (c.status == certify::Status::bad_input)
            break;
        if (c.status == certify::Status::certified) {
            // radius < 10^-digits, compared exactly (mag against a lower bound of 10^-digits)
            ball::Ball need;
            arb_set_ui(need.get(), 10);
            arb_pow_ui(need.get(), need.get(), static_cast<ulong>(a.digits), 64);
            arb_inv(need.get(), need.get(), 64);
            series::Bound lower;
            arb_get_mag_lower(lower.get(), need.get());
            enough = series::Bound::radius_of(c.alpha) < lower &&
                     series::Bound::radius_of(c.delta) < lower;
            if (enough)
                break;
        }
        if (attempt < max_attempts && !a.json)
            std::cerr << "renorm certify: attempt " << attempt << " with N = " << fp.n << ": "
                      << (c.status == certify::Status::certified ? "enclosure too wide"
                                                                 : c.message)
                      << "; retrying with a longer truncation\n";
        min_length = fp.n + fp.n / 4 + 8;
    }
    std::string written;
    if (enough && !a.out.empty()) {
        nlohmann::json doc = io::certificate_to_json(c);
        io::write_file_atomic(a.out, doc.dump(1) + "\n");
        written = doc["checksum"]["value"].get<std::string>();
    }

    if (a.json) {
        nlohmann::json j;
        j["order"] = a.order;
        j["status"] = c.status == certify::Status::certified ? (enough ? "certified" : "too_wide")
                                                             : "not_certified";
        j["message"] = c.message;
        j["truncation"] = c.data.n;
        j["disc"] = {{"centre", problem.disc.centre}, {"radius", problem.disc.radius}};
        j["prec"] = c.data.prec;
        j["seconds"] = {{"solve", t_solve}, {"proof", t_proof}};
        j["fixed_point"] = {{"Y", c.fixed_point.y.text(7)},
                            {"Z", c.fixed_point.z.text(7)},
                            {"rho", c.data.rho_g.text(7)}};
        j["eigenpair"] = {{"Y", c.eigen.y.text(7)},
                          {"Z0", c.eigen.z0.approx_double()},
                          {"Z1", c.eigen.z1.approx_double()},
                          {"rho", c.data.rho_e.text(7)}};
        if (c.status == certify::Status::certified) {
            j["alpha"] = {{"digits", digits_text(c.alpha, a.digits + 30)},
                          {"radius", rad(c.alpha)},
                          {"certified", true}};
            j["delta"] = {{"digits", digits_text(c.delta, a.digits + 30)},
                          {"radius", rad(c.delta)},
                          {"certified", true}};
        }
        if (!written.empty())
            j["certificate"] = {{"path", a.out}, {"sha256", written}};
        std::cout << j.dump(2) << "\n";
    } else {
        std::cout << "order z = " << a.order << ", disc |y - " << problem.disc.centre
                  << "| <= " << problem.disc.radius << ", N = " << c.data.n << " modes, " << c.data.prec
                  << " bits (Y) / " << c.data.prec_low << " bits (Z); solve " << sci(t_solve)
                  << " s, proof " << sci(t_proof) << " s\n";
        if (c.fixed_point.y.is_finite())
            std::cout << "fixed point:  Y = " << sci(c.fixed_point.y)
                      << "  Z = " << sci(c.fixed_point.z)
                      << "  rho = " << sci(c.data.rho_g)
                      << (c.fixed_point.closes ? "  (Y + Z rho < rho holds)" : "") << "\n";
        if (c.eigen.y.is_finite())
            std::cout << "eigenpair:    Y = " << sci(c.eigen.y)
                      << "  Z = " << sci(c.eigen.z0.approx_double()) << " + "
                      << sci(c.eigen.z1.approx_double()) << " rho  rho = "
                      << sci(c.data.rho_e)
                      << (c.eigen.closes ? "  (Y + Z rho < rho holds)" : "") << "\n";
        if (c.status == certify::Status::certified) {
            std::cout << "alpha = " << digits_text(c.alpha, a.digits + 30)
                      << "  [certified, radius " << rad(c.alpha) << "]\n";
            std::cout << "delta = " << digits_text(c.delta, a.digits + 30)
                      << "  [certified, radius " << rad(c.delta) << "]\n";
        }
    }
    if (c.status != certify::Status::certified) {
        std::cerr << "renorm certify: NOT certified: " << c.message
                  << (a.out.empty() ? "" : "; no file written") << "\n";
        return c.status == certify::Status::bad_input ? exit_bad_input : exit_not_certified;
    }
    if (!enough) {
        std::cerr << "renorm certify: the proof closes but the enclosures are wider than 1e-"
                  << a.digits << "; no file written\n";
        return exit_not_certified;
    }
    if (!written.empty() && !a.json)
        std::cout << "certificate written to " << a.out << " (SHA-256 " << written << ")\n";
    return exit_ok;
}

} // namespace

void register_certify(CLI::App& app, int* code)
{
    auto args = std::make_shared<CertifyArgs>();
    auto* sub = app.add_subcommand(
        "certify", "Prove enclosures of alpha and delta (computer-assisted proof in ball "
                   "arithmetic) and write a certificate that `renorm verify` re-checks.");
    sub->add_option("--order,-z", args->order, "order z of the critical point (decimal, > 1)")
        ->default_val("2");
    sub->add_option("--digits,-d", args->digits, "enclosure radius below 10^-digits")
        ->default_val(100);
    sub->add_option("--out,-o", args->out, "certificate file (written only when certified)");
    sub->add_option("--disc", args->disc,
                    "CENTRE,RADIUS of the disc |y - c| <= r (default: 0.5,0.625, or a better one "
                    "chosen automatically when u, v do not map it well inside itself)")
        ->delimiter(',');
    sub->add_flag("--json", args->json, "print a JSON summary");
    sub->footer("Example: renorm certify --order 2 --digits 100 --out alpha2.cert.json\n"
                "Exit codes: 0 certified, 1 solver failed, 2 bad input, 3 not certified.");
    sub->callback([args, code] { *code = run_certify(*args); });
}

} // namespace renorm::app
