#include <renorm/cascade/period_doubling.hpp>
#include <renorm/cascade/run.hpp>

#include <chrono>
#include <cmath>
#include <future>
#include <optional>
#include <stdexcept>

namespace renorm::cascade {

bool CascadeResult::all_certified() const
{
    if (levels.empty())
        return false;
    for (const auto& l : levels)
        if (l.status != Status::certified)
            return false;
    return true;
}

namespace {

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point t0)
{
    return std::chrono::duration<double>(Clock::now() - t0).count();
}

ball::Ball mid_of(const ball::Ball& b)
{
    ball::Ball m;
    arb_get_mid_arb(m.get(), b.get());
    return m;
}

slong level_prec(const CascadeOptions& o, int n)
{
    slong p = o.prec_base + o.prec_per_level * n;
    p = (p + 31) / 32 * 32;
    return std::min(std::max<slong>(p, 64), o.max_prec);
}

// The first sign change of F_n(mu) on the grid lo < mu_1 < ... <= hi (lo itself excluded),
// skipping parameters where the orbit fails. Returns the bracket.
std::optional<std::pair<double, double>> scan_first_root(const Family& family, const ball::Ball& c,
                                                         int n, double lo, double hi, int grid)
{
    const slong prec = 128;
    bool have_prev = false;
    double prev_mu = 0;
    double prev_F = 0;
    for (int i = 1; i <= grid; ++i) {
        double m = lo + (hi - lo) * i / grid;
        ReturnMap R = superstable_return(family, c, n, ball::Ball(m), prec);
        if (!R.ok || !R.F.is_finite()) {
            have_prev = false;
            continue;
        }
        double F = R.F.approx_double();
        if (F == 0)
            return std::make_pair(m, m);
        if (have_prev && ((F < 0) != (prev_F < 0)))
            return std::make_pair(prev_mu, m);
        have_prev = true;
        prev_mu = m;
        prev_F = F;
    }
    return std::nullopt;
}

ball::Ball ratio(const ball::Ball& a0, const ball::Ball& a1, const ball::Ball& a2, slong prec)
{
    // (a1 - a0) / (a2 - a1)
    ball::Ball num, den, r;
    arb_sub(num.get(), a1.get(), a0.get(), prec);
    arb_sub(den.get(), a2.get(), a1.get(), prec);
    arb_div(r.get(), num.get(), den.get(), prec);
    return r;
}

void finish_estimates(CascadeResult& res, slong prec)
{
    std::vector<ball::Ball> mus, deltas, alphas;
    for (const auto& l : res.levels) {
        mus.push_back(mid_of(l.mu));
        if (l.has_delta)
            deltas.push_back(mid_of(l.delta));
        if (l.has_alpha)
            alphas.push_back(mid_of(l.alpha));
    }
    res.mu_limit = approx_limit(mus, prec);
    res.delta_limit = approx_limit(deltas, prec);
    res.alpha_limit = approx_limit(alphas, prec);
}

void add_ratios(CascadeResult& res, slong prec)
{
    auto& L = res.levels;
    const std::size_t i = L.size() - 1;
    if (i >= 2) {
        L[i].delta = ratio(L[i - 2].mu, L[i - 1].mu, L[i].mu, prec);
        L[i].has_delta = L[i].delta.is_finite();
    }
    if (i >= 1 && L[i].has_d && L[i - 1].has_d) {
        arb_div(L[i].alpha.get(), L[i - 1].d.get(), L[i].d.get(), prec);
        L[i].has_alpha = L[i].alpha.is_finite();
    }
}

struct Located {
    SuperstableLevel level;
    bool hard_failure = false;
    ball::Ball c;
};

Located locate_with_escalation(const Family& family, int n, const ball::Ball& guess,
                               double spacing, const CascadeOptions& o)
{
    Located out;
    auto esc = ball::with_increasing_prec(level_prec(o, n), o.max_prec, [&](slong p) {
        CriticalPoint cp = critical_point(family, p);
        if (!cp.ok) {
            out.level = SuperstableLevel{};
            out.level.problem = cp.problem;
            out.hard_failure = true;
            return true;
        }
        out.c = cp.c;
        out.level = locate_superstable(family, cp.c, n, guess, spacing, o.max_newton, p);
        if (!out.level.ok) {
            if (out.level.problem.rfind("precision", 0) == 0)
                return false;
            out.hard_failure = true;
            return true;
        }
        return out.level.cert.status == Status::certified;
    });
    if (!esc.succeeded && !out.hard_failure && !out.level.ok) {
        out.hard_failure = true;
        out.level.problem += " (precision cap " + std::to_string(o.max_prec) + " bits reached)";
    }
    return out;
}

void check_options(const CascadeOptions& o)
{
    if (o.levels < 1 || o.levels > max_cascade_level)
        throw std::invalid_argument("levels must be in 1.." + std::to_string(max_cascade_level));
    if (o.threads != 1 && o.threads != 2)
        throw std::invalid_argument("threads must be 1 or 2");
    if (o.prec_base < 32 || o.prec_per_level < 0 || o.max_prec < o.prec_base)
        throw std::invalid_argument("bad precision settings");
}

// Superstable parameters mu_first..mu_L, each located by Newton and certified by Krawczyk.
// With two threads the certificate of level n is finished while level n+1 is located: the
// guess for n+1 only needs the approximate mu_n.
void run_superstable(const Family& family, const CascadeOptions& o, CascadeResult& res,
                     const std::function<void(const CascadeLevel&)>& on_level)
{
    CriticalPoint cp = critical_point(family, 256);
    if (!cp.ok) {
        res.failed = true;
        res.failure = "critical point: " + cp.problem;
        return;
    }
    res.critical = cp.c;
    int first = -1;
    std::optional<std::pair<double, double>> br;
    for (int n = 0; n <= 1 && first < 0; ++n) {
        br = scan_first_root(family, cp.c, n, family.mu_lo, family.mu_hi, 800);
        if (br)
            first = n;
    }
    if (first < 0) {
        res.failed = true;
        res.failed_level = 0;
        res.failure = "no superstable parameter of period 1 or 2 in the mu range [" +
                      std::to_string(family.mu_lo) + ", " + std::to_string(family.mu_hi) + "]";
        return;
    }
    if (first > o.levels) {
        res.failed = true;
        res.failed_level = first;
        res.failure = "the family has no superstable cycle of period 1; ask for more levels";
        return;
    }
    std::vector<double> approx; // mid of mu_n, n = first..
    for (int n = first; n <= o.levels; ++n) {
        auto t0 = Clock::now();
        double guess = 0, spacing = 0;
        const std::size_t k = approx.size();
        if (n == first) {
            guess = 0.5 * (br->first + br->second);
            spacing = (family.mu_hi - family.mu_lo) / 4;
        } else if (k < 4) {
            double prev = approx[k - 1];
            double width = k == 1 ? family.mu_hi - prev : 1.5 * std::fabs(prev - approx[k - 2]);
            double dir = k == 1 ? 1.0 : (prev > approx[k - 2] ? 1.0 : -1.0);
            double lo = prev, hi = prev + dir * width;
            auto b = dir > 0 ? scan_first_root(family, cp.c, n, lo, hi, 600)
                             : scan_first_root(family, cp.c, n, hi, lo, 600);
            if (!b) {
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": no sign change of f^(2^n)(c) - c found after mu_" +
                              std::to_string(n - 1);
                break;
            }
            guess = 0.5 * (b->first + b->second);
            spacing = std::fabs(guess - prev);
        } else {
            double prev = approx[k - 1], prev2 = approx[k - 2];
            double d = res.levels.back().has_delta ? res.levels.back().delta.approx_double() : 4.0;
            guess = prev + (prev - prev2) / d;
            spacing = std::fabs(guess - prev);
        }
        // Locate (and certify) at an automatically chosen, escalating precision.
        Located L = locate_with_escalation(family, n, ball::Ball(guess), spacing, o);
        // The level's guess can be refined with the exact midpoint (more than double digits).
        CascadeLevel lev;
        lev.n = n;
        lev.period = std::uint64_t(1) << n;
        lev.seconds = seconds_since(t0);
        lev.prec = L.level.prec;
        if (!L.level.ok) {
            res.failed = true;
            res.failed_level = n;
            res.failure = "level " + std::to_string(n) + ": " + L.level.problem;
            break;
        }
        const SuperstableCertificate& cert = L.level.cert;
        if (cert.status == Status::certified) {
            if (!cert.exact_period) {
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": the zero found has c on a cycle of period < 2^n";
                break;
            }
            lev.status = Status::certified;
            lev.mu = cert.mu;
            if (n >= 1) {
                lev.d = cert.half;
                lev.has_d = true;
            }
        } else {
            lev.status = Status::not_certified;
            lev.mu = L.level.mu_approx;
            if (n >= 1) {
                lev.d = L.level.half_approx;
                lev.has_d = true;
            }
            lev.note = "not certified: " + L.level.problem;
        }
        const double m = lev.mu.approx_double();
        if (k >= 2) {
            // Sanity: the cascade moves on in the same direction with a ratio above 1.
            double s1 = approx[k - 1] - approx[k - 2], s2 = m - approx[k - 1];
            if (!(s1 * s2 > 0) || !(std::fabs(s1 / s2) > 1.2) || !(std::fabs(s1 / s2) < 1000)) {
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": Newton reached a parameter outside the cascade (spacing ratio " +
                              std::to_string(s1 / s2) + ")";
                break;
            }
        }
        approx.push_back(m);
        res.levels.push_back(lev);
        add_ratios(res, std::max<slong>(lev.prec, 128));
        res.levels.back().seconds = seconds_since(t0);
        if (on_level)
            on_level(res.levels.back());
    }
}

// Period-doubling parameters b_first..b_L (estimates).
void run_doubling(const Family& family, const CascadeOptions& o, CascadeResult& res,
                  const std::function<void(const CascadeLevel&)>& on_level)
{
    // Superstable parameters of the first three levels give the first guesses: mu_n < b_n < mu_{n+1}.
    CascadeOptions so = o;
    so.kind = SequenceKind::superstable;
    CascadeResult sup;
    sup.kind = SequenceKind::superstable;
    so.levels = std::min(max_cascade_level, 3);
    run_superstable(family, so, sup, {});
    res.critical = sup.critical;
    if (sup.levels.size() < 3) {
        res.failed = true;
        res.failed_level = sup.failed_level;
        res.failure = "doubling: the superstable parameters needed for the first guesses failed: " +
                      sup.failure;
        return;
    }
    const int first = sup.levels.front().n;
    std::vector<double> b;
    for (int n = first; n <= o.levels; ++n) {
        auto t0 = Clock::now();
        const std::size_t k = b.size();
        double guess, spacing;
        if (k < 2) {
            double m0 = sup.levels[k].mu.approx_double(), m1 = sup.levels[k + 1].mu.approx_double();
            guess = m0 + 0.8 * (m1 - m0);
            spacing = std::fabs(m1 - m0);
        } else {
            double d = k >= 3 ? (b[k - 2] - b[k - 3]) / (b[k - 1] - b[k - 2]) : 4.0;
            guess = b[k - 1] + (b[k - 1] - b[k - 2]) / d;
            spacing = std::fabs(guess - b[k - 1]);
        }
        DoublingPoint dp;
        slong used = 0;
        bool hard = false;
        auto esc = ball::with_increasing_prec(level_prec(o, n), o.max_prec, [&](slong p) {
            used = p;
            CriticalPoint cp = critical_point(family, p);
            if (!cp.ok) {
                dp.problem = cp.problem;
                hard = true;
                return true;
            }
            dp = approx_doubling_point(family, n, ball::Ball(guess), cp.c, spacing, o.max_newton, p);
            if (!dp.ok && dp.problem.rfind("precision", 0) != 0) {
                hard = true;
                return true;
            }
            return dp.ok;
        });
        if (!esc.succeeded || hard || !dp.ok) {
            res.failed = true;
            res.failed_level = n;
            res.failure = "level " + std::to_string(n) + ": " + dp.problem;
            break;
        }
        CascadeLevel lev;
        lev.n = n;
        lev.period = std::uint64_t(1) << n;
        lev.status = Status::not_certified;
        lev.mu = dp.mu;
        lev.prec = used;
        lev.note = "estimate (Newton, not certified)";
        const double m = dp.mu.approx_double();
        if (k >= 2) {
            double s1 = b[k - 1] - b[k - 2], s2 = m - b[k - 1];
            if (!(s1 * s2 > 0) || !(std::fabs(s1 / s2) > 1.2) || !(std::fabs(s1 / s2) < 1000)) {
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": Newton reached a parameter outside the cascade";
                break;
            }
        }
        b.push_back(m);
        res.levels.push_back(lev);
        add_ratios(res, std::max<slong>(used, 128));
        res.levels.back().seconds = seconds_since(t0);
        if (on_level)
            on_level(res.levels.back());
    }
}

} // namespace

CascadeResult run_cascade(const Family& family, const CascadeOptions& options,
                          const std::function<void(const CascadeLevel&)>& on_level)
{
    check_options(options);
    CascadeResult res;
    res.kind = options.kind;
    arb_indeterminate(res.critical.get());
    if (options.kind == SequenceKind::superstable)
        run_superstable(family, options, res, on_level);
    else
        run_doubling(family, options, res, on_level);
    slong prec = 128;
    for (const auto& l : res.levels)
        prec = std::max(prec, l.prec);
    finish_estimates(res, prec);
    return res;
}

double approx_cascade_seconds(const Family& family, const CascadeOptions& o)
{
    // Seconds per orbit step at 128 bits, measured on one core (bench/cascade_levels):
    // the hand-written quadratic kernel, a polynomial expression, an expression with
    // elementary functions.
    double per_step = family.fast_quadratic ? 1.5e-7 : 6e-7;
    for (const auto& nd : family.expr.nodes())
        if (nd.op == Op::sin || nd.op == Op::cos || nd.op == Op::tan || nd.op == Op::exp ||
            nd.op == Op::log || nd.op == Op::sqrt || nd.op == Op::pow)
            per_step = std::max(per_step, 3e-6);
    double passes = o.kind == SequenceKind::superstable ? 4 : 30;
    double total = 0;
    for (int n = 0; n <= o.levels; ++n) {
        double p = static_cast<double>(level_prec(o, n));
        total += passes * std::ldexp(1.0, n) * per_step * std::pow(p / 128, 1.3);
    }
    return total;
}

} // namespace renorm::cascade
