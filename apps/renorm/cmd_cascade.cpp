// `renorm cascade`: superstable or period-doubling parameters of one map family, their ratios
// and extrapolated limits. All mathematics is in lib/renorm/cascade; this file parses options,
// prints and sets the exit code.
#include "commands.hpp"

#include <renorm/cascade/cascade.hpp>

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <iostream>
#include <sstream>
#include <unistd.h>

namespace renorm::app {

namespace {

using namespace renorm::cascade;

struct CascadeArgs {
    std::string family;
    std::string map;
    std::string critical;
    std::string order = "2";
    std::vector<double> interval;
    std::vector<double> mu_range;
    int levels = 0;
    std::string kind = "superstable";
    bool json = false;
    bool quiet = false;
    int threads = 2;
};

/// Above this estimated running time a request is refused as bad input.
constexpr double max_estimated_seconds = 6 * 3600.0;

std::string fmt_radius(const ball::Ball& b)
{
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1e", b.radius_upper());
    return buf;
}

std::string digits_of(const ball::Ball& b, slong max_digits)
{
    if (arb_is_zero(b.get()))
        return "0";
    slong count = 0;
    std::string s = ball::determined_digits(b, max_digits, &count);
    if (count == 0)
        return "?";
    return s;
}

std::string approx_text(const ball::Ball& b, slong digits) { return ball::approx_decimal(b, digits); }

Family build_family(const CascadeArgs& a)
{
    if (a.family.empty() == a.map.empty())
        throw BadInput("give exactly one of --family NAME or --map EXPR");
    if (!a.family.empty()) {
        if (!a.critical.empty() || !a.interval.empty() || !a.mu_range.empty())
            throw BadInput("--critical, --interval and --mu-range apply to --map only");
        if (a.family != "power" && a.order != "2")
            throw BadInput("--order applies to --family power only");
        try {
            return make_builtin_family(a.family, a.order);
        } catch (const std::invalid_argument& e) {
            throw BadInput(e.what());
        }
    }
    double xl = -1, xh = 1, ml = 0, mh = 4;
    if (!a.interval.empty()) {
        xl = a.interval[0];
        xh = a.interval[1];
    }
    if (!a.mu_range.empty()) {
        ml = a.mu_range[0];
        mh = a.mu_range[1];
    }
    try {
        return make_user_family(a.map, a.critical, xl, xh, ml, mh);
    } catch (const ParseError& e) {
        bool in_critical = false;
        try {
            Expression::parse(a.map);
            in_critical = true;
        } catch (const ParseError&) {
        }
        throw BadInput(std::string(in_critical ? "--critical" : "--map") + ": " + e.what());
    } catch (const std::invalid_argument& e) {
        throw BadInput(e.what());
    }
}

nlohmann::json estimate_json(const LimitEstimate& e)
{
    nlohmann::json j;
    j["estimate"] = true;
    j["ok"] = e.ok;
    if (e.ok) {
        j["value"] = e.text;
        char buf[32];
        std::snprintf(buf, sizeof buf, "%.3e", e.error);
        j["error_estimate"] = buf;
        j["digits"] = e.digits;
    }
    return j;
}

void print_estimate(std::ostream& os, const char* name, const LimitEstimate& e)
{
    os << "  " << name << " ~ ";
    if (!e.ok || e.digits == 0) {
        os << "(not enough levels to extrapolate)\n";
        return;
    }
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.1e", e.error);
    os << e.text << "   (" << e.digits << " digits on which the extrapolations agree; error ~ "
       << buf << ")\n";
}

int run(const CascadeArgs& a)
{
    Family fam = build_family(a);
    CascadeOptions opt;
    if (a.kind == "superstable")
        opt.kind = SequenceKind::superstable;
    else if (a.kind == "doubling")
        opt.kind = SequenceKind::doubling;
    else
        throw BadInput("--kind must be superstable or doubling (got '" + a.kind + "')");
    if (a.levels < 1 || a.levels > max_cascade_level)
        throw BadInput("--levels must be in 1.." + std::to_string(max_cascade_level) + " (got " +
                       std::to_string(a.levels) + ")");
    opt.levels = a.levels;
    opt.threads = a.threads;
    const double est = approx_cascade_seconds(fam, opt);
    if (est > max_estimated_seconds) {
        char buf[160];
        std::snprintf(buf, sizeof buf,
                      "--levels %d would take about %.0f hours (rough estimate; orbits of length "
                      "2^%d); the limit is %.0f hours",
                      a.levels, est / 3600, a.levels, max_estimated_seconds / 3600);
        throw BadInput(buf);
    }
    const bool progress = !a.quiet && isatty(STDERR_FILENO);
    CascadeResult res = run_cascade(fam, opt, [&](const CascadeLevel& l) {
        if (progress)
            std::cerr << "renorm cascade: level " << l.n << " done (" << l.seconds << " s, "
                      << l.prec << " bits)\n";
    });
    const bool superstable = opt.kind == SequenceKind::superstable;
    const char* sym = superstable ? "mu" : "b";

    if (a.json) {
        nlohmann::json j;
        j["family"] = fam.name;
        j["formula"] = fam.formula;
        j["critical_point"] = digits_of(res.critical, 30);
        j["kind"] = a.kind;
        j["levels"] = nlohmann::json::array();
        for (const auto& l : res.levels) {
            nlohmann::json lj;
            lj["n"] = l.n;
            lj["period"] = std::to_string(l.period);
            lj["status"] = to_string(l.status);
            if (l.status == Status::certified) {
                lj["mu"] = ball::enclosure_string(l.mu, 40);
                lj["mu_digits"] = digits_of(l.mu, 60);
                lj["radius"] = fmt_radius(l.mu);
            } else {
                lj["mu"] = approx_text(l.mu, 40);
            }
            if (l.has_delta)
                lj["delta"] = l.status == Status::certified ? digits_of(l.delta, 40)
                                                             : approx_text(l.delta, 25);
            if (l.has_alpha) {
                lj["alpha"] = l.status == Status::certified ? digits_of(l.alpha, 40)
                                                             : approx_text(l.alpha, 25);
                ball::Ball ab;
                arb_abs(ab.get(), l.alpha.get());
                lj["abs_alpha"] = l.status == Status::certified ? digits_of(ab, 40)
                                                                 : approx_text(ab, 25);
            }
            lj["prec_bits"] = l.prec;
            lj["seconds"] = l.seconds;
            if (!l.note.empty())
                lj["note"] = l.note;
            j["levels"].push_back(lj);
        }
        j["limits"]["accumulation_point"] = estimate_json(res.mu_limit);
        j["limits"]["delta"] = estimate_json(res.delta_limit);
        if (superstable) {
            j["limits"]["alpha"] = estimate_json(res.alpha_limit);
        }
        j["all_certified"] = res.all_certified();
        j["failure"] = res.failed ? nlohmann::json(res.failure) : nlohmann::json(nullptr);
        std::cout << j.dump(2) << "\n";
    } else {
        std::ostream& os = std::cout;
        os << "renorm cascade: " << fam.name << "  f(x) = " << fam.formula
           << ",  critical point c = " << digits_of(res.critical, 20) << "\n";
        if (superstable)
            os << "superstable parameters mu_n (c on a cycle of period 2^n), certified by a "
                  "Krawczyk test:\nmu_n shows the digits its enclosure determines; delta_n and "
                  "alpha_n are enclosures of the finite-n ratios.\n";
        else
            os << "period-doubling parameters b_n (the 2^n cycle has multiplier -1), certified by "
                  "a Krawczyk test on\nthe system f^(2^n)(x) = x, (f^(2^n))'(x) = -1 in (x, mu); "
                  "delta_n are enclosures of the finite-n ratios.\n";
        if (!a.quiet) {
            os << "\n  n  period      " << sym << "_n";
            os << std::string(36, ' ') << "radius   delta_n                      "
               << (superstable ? "alpha_n                    " : "") << "bits  seconds\n";
            for (const auto& l : res.levels) {
                char head[40];
                std::snprintf(head, sizeof head, "%3d %7llu  ", l.n,
                              static_cast<unsigned long long>(l.period));
                std::string mu, rad;
                if (l.status == Status::certified) {
                    mu = digits_of(l.mu, 40);
                    rad = fmt_radius(l.mu);
                } else {
                    mu = approx_text(l.mu, 30);
                    rad = "NOT CERT";
                }
                std::string delta = l.has_delta ? (l.status == Status::certified
                                                       ? digits_of(l.delta, 25)
                                                       : approx_text(l.delta, 20))
                                                : "";
                std::string alpha = l.has_alpha ? (l.status == Status::certified
                                                       ? digits_of(l.alpha, 25)
                                                       : approx_text(l.alpha, 20))
                                                : "";
                char tail[64];
                std::snprintf(tail, sizeof tail, "%5ld %8.3f", static_cast<long>(l.prec),
                              l.seconds);
                os << head;
                os.width(42);
                os << std::left << mu << " ";
                os.width(8);
                os << rad << " ";
                os.width(28);
                os << delta << " ";
                if (superstable) {
                    os.width(26);
                    os << alpha << " ";
                }
                os << std::right << tail << "\n";
                if (!l.note.empty())
                    os << "      note: " << l.note << "\n";
            }
        }
        os << "\nLimits: ESTIMATES by extrapolation (Wynn epsilon, iterated Aitken), not "
              "certified:\n";
        print_estimate(os, superstable ? "accumulation point" : "accumulation point", res.mu_limit);
        print_estimate(os, "delta", res.delta_limit);
        if (superstable) {
            print_estimate(os, "alpha", res.alpha_limit);
            if (res.alpha_limit.ok && res.alpha_limit.digits > 0) {
                ball::Ball ab = res.alpha_limit.value;
                arb_abs(ab.get(), ab.get());
                mag_set_d(arb_radref(ab.get()), res.alpha_limit.error);
                os << "  |alpha| ~ " << ball::determined_digits(ab, 60) << "\n";
            }
        }
        if (!res.levels.empty())
            os << (res.all_certified() ? "All levels certified.\n"
                                       : "Some levels are NOT certified (see notes).\n");
    }
    if (res.failed) {
        std::cerr << "renorm cascade: failed: " << res.failure << "\n";
        return exit_failed;
    }
    if (!res.all_certified())
        return exit_not_certified;
    return exit_ok;
}

} // namespace

void register_cascade(CLI::App& app, int* code)
{
    auto args = std::make_shared<CascadeArgs>();
    auto* sub = app.add_subcommand(
        "cascade",
        "Cross-check in a concrete family: the parameters mu_n where the critical point lies on "
        "a cycle of period 2^n (each certified by an interval Newton / Krawczyk test in ball "
        "arithmetic), the ratios delta_n = (mu_{n-1} - mu_{n-2})/(mu_n - mu_{n-1}) and alpha_n = "
        "d_{n-1}/d_n (d_n: distance from c to f^(2^(n-1))(c)), and their limits estimated by "
        "extrapolation. With --kind doubling: the parameters where the 2^n cycle has "
        "multiplier -1, each certified by a Krawczyk test in (x, mu).");
    std::string fams;
    for (const auto& n : builtin_family_names())
        fams += "\n  " + describe_builtin_family(n);
    sub->add_option("--family", args->family, "A built-in family:" + fams);
    sub->add_option("--map", args->map,
                    "Your own family f(x) in x and mu: + - * / ^, parentheses, sin cos tan exp "
                    "log sqrt abs, pi, e, numbers (e.g. \"mu*x*(1-x)\")");
    sub->add_option("--critical", args->critical,
                    "With --map: the critical point (a constant expression, e.g. 1/2). Without it "
                    "the zero of df/dx in the interval is found and proved");
    sub->add_option("--interval", args->interval,
                    "With --map: LO HI, the interval the orbits must stay in (default -1 1)")
        ->expected(2);
    sub->add_option("--mu-range", args->mu_range,
                    "With --map: LO HI, the parameter range scanned for the first superstable "
                    "parameters (default 0 4); the cascade must go towards HI")
        ->expected(2);
    sub->add_option("--order", args->order, "With --family power: the order z > 1 (default 2)");
    sub->add_option("--levels", args->levels,
                    "The last level L: periods up to 2^L (1.." + std::to_string(max_cascade_level) +
                        "; the work doubles with each level)")
        ->required();
    sub->add_option("--kind", args->kind, "superstable (default) or doubling (multiplier -1); both certified");
    sub->add_flag("--json", args->json, "Print one JSON object instead of the table");
    sub->add_flag("--quiet", args->quiet,
                  "No progress on stderr and no table: only the limits and the status");
    sub->add_option("--threads", args->threads,
                    "1 or 2 (default 2: the proof of one level runs beside the next level)")
        ->check(CLI::Range(1, 2));
    sub->footer("Example:\n  renorm cascade --family logistic --levels 12\n"
                "  renorm cascade --map \"mu*sin(pi*x)\" --critical 1/2 --interval 0 1 "
                "--mu-range 0.3 1 --levels 10 --json\n"
                "Exit codes: 0 ok, 1 a level failed (earlier levels are printed), 2 bad input, "
                "3 a level could not be certified.");
    sub->callback([args, code] { *code = run(*args); });
}

} // namespace renorm::app
