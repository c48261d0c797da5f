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
    p = (p + 63) / 64 * 64;
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

void check_options(const CascadeOptions& o)
{
    if (o.levels < 1 || o.levels > max_cascade_level)
        throw std::invalid_argument("levels must be in 1.." + std::to_string(max_cascade_level));
    if (o.threads != 1 && o.threads != 2)
        throw std::invalid_argument("threads must be 1 or 2");
    if (o.prec_base < 32 || o.prec_per_level < 0 || o.max_prec < o.prec_base)
        throw std::invalid_argument("bad precision settings");
}

// Phase A of a level: Newton at an escalating precision (doubling while rounding noise is
// too large).
struct PhaseA {
    SuperstableNewton newton;
    ball::Ball c;
    std::string problem;
    double seconds = 0;
};

PhaseA locate_phase(const Family& family, int n, const ball::Ball& guess, double spacing,
                    const CascadeOptions& o)
{
    auto t0 = Clock::now();
    PhaseA a;
    bool hard = false;
    ball::with_increasing_prec(level_prec(o, n), o.max_prec, [&](slong p) {
        CriticalPoint cp = critical_point(family, p);
        if (!cp.ok) {
            a.problem = cp.problem;
            hard = true;
            return true;
        }
        a.c = cp.c;
        a.newton = approx_superstable(family, cp.c, n, guess, spacing, o.max_newton, p);
        if (!a.newton.ok && !a.newton.precision_limited) {
            hard = true;
            return true;
        }
        return a.newton.ok;
    });
    if (!a.newton.ok) {
        if (a.problem.empty())
            a.problem = a.newton.problem;
        if (!hard && a.newton.precision_limited)
            a.problem += " (precision cap " + std::to_string(o.max_prec) + " bits reached)";
    }
    a.seconds = seconds_since(t0);
    return a;
}

// Phase B: the proof, doubling the precision (and redoing Newton there) while it fails.
struct PhaseB {
    SuperstableLevel level;
    double seconds = 0;
};

PhaseB certify_phase(const Family& family, int n, const PhaseA& a, double spacing,
                     const CascadeOptions& o)
{
    auto t0 = Clock::now();
    PhaseB b;
    SuperstableNewton newton = a.newton;
    ball::Ball c = a.c;
    slong p = newton.prec;
    for (;;) {
        b.level = certify_superstable_from(family, c, n, newton, spacing, p);
        if (b.level.cert.status == Status::certified || 2 * p > o.max_prec)
            break;
        p *= 2;
        CriticalPoint cp = critical_point(family, p);
        if (!cp.ok)
            break;
        c = cp.c;
        SuperstableNewton again =
            approx_superstable(family, c, n, newton.improved, spacing, o.max_newton, p);
        if (!again.ok)
            break;
        newton = std::move(again);
    }
    b.seconds = seconds_since(t0);
    return b;
}

// Superstable parameters mu_first..mu_L, each located by Newton and certified by Krawczyk.
// With two threads the proof of level n (phase B) runs while level n+1 is located (phase A):
// the guess for n+1 only needs the Newton value of mu_n.
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

    struct Pending {
        int n;
        std::future<PhaseB> fut;
        PhaseA a;
    };
    std::optional<Pending> pending;
    // Waits for the proof of the pending level and appends it to the result.
    auto finish_pending = [&]() {
        if (!pending)
            return;
        PhaseB b = pending->fut.get();
        const int n = pending->n;
        CascadeLevel lev;
        lev.n = n;
        lev.period = std::uint64_t(1) << n;
        lev.prec = b.level.prec;
        lev.seconds = pending->a.seconds + b.seconds;
        const SuperstableCertificate& cert = b.level.cert;
        if (cert.status == Status::certified && cert.exact_period) {
            lev.status = Status::certified;
            lev.mu = cert.mu;
            if (n >= 1) {
                lev.d = cert.half;
                lev.has_d = true;
            }
            if (!b.level.problem.empty())
                lev.note = b.level.problem;
        } else {
            lev.status = Status::not_certified;
            lev.mu = b.level.ok ? b.level.mu_approx : pending->a.newton.improved;
            if (n >= 1) {
                lev.d = b.level.ok ? b.level.half_approx : mid_of(pending->a.newton.at_center.half);
                lev.has_d = true;
            }
            lev.note = cert.status == Status::certified
                           ? "not certified: the period 2^n is not proved (d_n may be 0)"
                           : "not certified: " + b.level.problem;
        }
        res.levels.push_back(lev);
        add_ratios(res, std::max<slong>(lev.prec, 128));
        if (on_level)
            on_level(res.levels.back());
        pending.reset();
    };

    std::vector<ball::Ball> approx; // Newton values of mu_n, n = first..
    const slong gprec = level_prec(o, o.levels) + 64;
    for (int n = first; n <= o.levels; ++n) {
        ball::Ball guess;
        double spacing = 0;
        const std::size_t k = approx.size();
        if (n == first) {
            guess = ball::Ball(0.5 * (br->first + br->second));
            spacing = (family.mu_hi - family.mu_lo) / 4;
        } else if (k < 4) {
            double prev = approx[k - 1].approx_double();
            double width = k == 1 ? family.mu_hi - prev
                                  : 1.5 * std::fabs(prev - approx[k - 2].approx_double());
            double dir = k == 1 ? 1.0 : (prev > approx[k - 2].approx_double() ? 1.0 : -1.0);
            double lo = prev, hi = prev + dir * width;
            auto b = dir > 0 ? scan_first_root(family, cp.c, n, lo, hi, 600)
                             : scan_first_root(family, cp.c, n, hi, lo, 600);
            if (!b) {
                finish_pending();
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": no sign change of f^(2^n)(c) - c found after mu_" +
                              std::to_string(n - 1);
                break;
            }
            guess = ball::Ball(0.5 * (b->first + b->second));
            spacing = std::fabs(guess.approx_double() - prev);
        } else {
            // mu_n ~ mu_{n-1} + (mu_{n-1} - mu_{n-2}) / delta_{n-1}, in ball arithmetic on the
            // exact Newton values (a double would cap the guess at 16 digits).
            // With five or more values, delta_n itself is predicted from the last three ratios
            // (delta_n - delta_{n-1} ~ rho (delta_{n-1} - delta_{n-2})), which makes the guess
            // good enough for the proof after a single Newton pass at the deep levels.
            auto delta_at = [&](std::size_t j) { // (mu_{j-1} - mu_{j-2}) / (mu_j - mu_{j-1})
                ball::Ball a, b, q;
                arb_sub(a.get(), approx[j - 1].get(), approx[j - 2].get(), gprec);
                arb_sub(b.get(), approx[j].get(), approx[j - 1].get(), gprec);
                arb_div(q.get(), a.get(), b.get(), gprec);
                return q;
            };
            ball::Ball d1, r, t;
            arb_sub(d1.get(), approx[k - 1].get(), approx[k - 2].get(), gprec);
            r = delta_at(k - 1); // delta_{n-1}
            if (k >= 5) {
                ball::Ball r2 = delta_at(k - 2), r3 = delta_at(k - 3), a, b, rho;
                arb_sub(a.get(), r.get(), r2.get(), gprec);
                arb_sub(b.get(), r2.get(), r3.get(), gprec);
                arb_div(rho.get(), a.get(), b.get(), gprec);
                const double rh = rho.approx_double();
                if (std::isfinite(rh) && std::fabs(rh) < 0.9) {
                    arb_addmul(r.get(), a.get(), rho.get(), gprec);
                }
            }
            arb_div(t.get(), d1.get(), r.get(), gprec);
            arb_add(guess.get(), approx[k - 1].get(), t.get(), gprec);
            guess = mid_of(guess);
            spacing = std::fabs(t.approx_double());
        }
        PhaseA a = locate_phase(family, n, guess, spacing, o);
        if (!a.newton.ok) {
            finish_pending();
            res.failed = true;
            res.failed_level = n;
            res.failure = "level " + std::to_string(n) + ": " + a.problem;
            break;
        }
        const ball::Ball& m = a.newton.improved;
        if (k >= 2) {
            // Sanity: the cascade moves on in the same direction with a ratio above 1.
            double s1 = approx[k - 1].approx_double() - approx[k - 2].approx_double();
            ball::Ball s2b;
            arb_sub(s2b.get(), m.get(), approx[k - 1].get(), gprec);
            double s2 = s2b.approx_double();
            if (!(s1 * s2 > 0) || !(std::fabs(s1 / s2) > 1.2) || !(std::fabs(s1 / s2) < 1000)) {
                finish_pending();
                res.failed = true;
                res.failed_level = n;
                res.failure = "level " + std::to_string(n) +
                              ": Newton reached a parameter outside the cascade (spacing ratio " +
                              std::to_string(s1 / s2) + ")";
                break;
            }
        }
        approx.push_back(m);
        finish_pending(); // at most one proof in flight
        auto task = [&family, n, a, spacing, o]() { return certify_phase(family, n, a, spacing, o); };
        Pending p{n, {}, a};
        if (o.threads == 2) {
            p.fut = std::async(std::launch::async, task);
        } else {
            std::promise<PhaseB> pr;
            pr.set_value(task());
            p.fut = pr.get_future();
        }
        pending = std::move(p);
    }
    finish_pending();
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
    std::vector<ball::Ball> b; // exact midpoints of b_n
    const slong gprec = level_prec(o, o.levels) + 64;
    for (int n = first; n <= o.levels; ++n) {
        auto t0 = Clock::now();
        const std::size_t k = b.size();
        ball::Ball guess;
        double spacing;
        if (k < 2) {
            double m0 = sup.levels[k].mu.approx_double(), m1 = sup.levels[k + 1].mu.approx_double();
            guess = ball::Ball(m0 + 0.8 * (m1 - m0));
            spacing = std::fabs(m1 - m0);
        } else {
            // b_n ~ b_{n-1} + (b_{n-1} - b_{n-2}) / delta, in ball arithmetic on exact values.
            ball::Ball d1, d2, r, t;
            arb_sub(d1.get(), b[k - 1].get(), b[k - 2].get(), gprec);
            if (k >= 3) {
                arb_sub(d2.get(), b[k - 2].get(), b[k - 3].get(), gprec);
                arb_div(r.get(), d2.get(), d1.get(), gprec);
            } else {
                arb_set_ui(r.get(), 4);
            }
            arb_div(t.get(), d1.get(), r.get(), gprec);
            arb_add(guess.get(), b[k - 1].get(), t.get(), gprec);
            guess = mid_of(guess);
            spacing = std::fabs(t.approx_double());
        }
        DoublingPoint dp;
        DoublingCertificate cert;
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
            dp = approx_doubling_point(family, n, guess, cp.c, spacing, o.max_newton, p);
            if (!dp.ok && dp.problem.rfind("precision", 0) != 0) {
                hard = true;
                return true;
            }
            if (!dp.ok)
                return false;
            // The proof: a box a few Newton steps wide (256 times wider if that fails).
            const int target = static_cast<int>(target_bits_below_spacing);
            ball::Ball rx(4 * dp.last_dx + std::ldexp(family.x_hi - family.x_lo, -target - 8));
            ball::Ball rmu(4 * dp.last_dmu + std::ldexp(spacing, -target - 8));
            cert = certify_doubling_point(family, n, dp.x, dp.mu, rx, rmu, p);
            if (cert.status != Status::certified) {
                arb_mul_2exp_si(rx.get(), rx.get(), 8);
                arb_mul_2exp_si(rmu.get(), rmu.get(), 8);
                cert = certify_doubling_point(family, n, dp.x, dp.mu, rx, rmu, p);
            }
            return cert.status == Status::certified;
        });
        if (hard || !dp.ok) {
            res.failed = true;
            res.failed_level = n;
            res.failure = "level " + std::to_string(n) + ": " + dp.problem;
            break;
        }
        CascadeLevel lev;
        lev.n = n;
        lev.period = std::uint64_t(1) << n;
        lev.prec = used;
        if (esc.succeeded && cert.status == Status::certified) {
            lev.status = Status::certified;
            lev.mu = cert.mu;
        } else {
            lev.status = Status::not_certified;
            lev.mu = dp.mu;
            lev.note = "not certified: " + cert.problem;
        }
        ball::Ball m = mid_of(lev.mu);
        if (k >= 2) {
            ball::Ball s2b;
            arb_sub(s2b.get(), m.get(), b[k - 1].get(), gprec);
            double s1 = b[k - 1].approx_double() - b[k - 2].approx_double(), s2 = s2b.approx_double();
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
    const auto& nodes = family.expr.nodes();
    for (const auto& nd : nodes) {
        const bool integer_power = nd.op == Op::pow && nodes[nd.b].op == Op::number &&
                                   nodes[nd.b].text.find_first_not_of("0123456789") ==
                                       std::string::npos;
        if (!family.fast_quadratic && !integer_power &&
            (nd.op == Op::sin || nd.op == Op::cos || nd.op == Op::tan || nd.op == Op::exp ||
             nd.op == Op::log || nd.op == Op::sqrt || nd.op == Op::pow))
            per_step = std::max(per_step, 3e-6);
    }
    double passes = o.kind == SequenceKind::superstable ? 4 : 30;
    double total = 0;
    for (int n = 0; n <= o.levels; ++n) {
        double p = static_cast<double>(level_prec(o, n));
        total += passes * std::ldexp(1.0, n) * per_step * std::pow(p / 128, 1.3);
    }
    return total;
}

} // namespace renorm::cascade
