#include <renorm/cascade/jet_evaluator.hpp>
#include <renorm/cascade/superstable.hpp>

#include <cmath>
#include <cstdint>
#include <memory>
#include <stdexcept>

namespace renorm::cascade {

const char* to_string(Status s)
{
    switch (s) {
    case Status::certified:
        return "certified";
    case Status::not_certified:
        return "not_certified";
    case Status::bad_input:
        return "bad_input";
    }
    return "?";
}

namespace {

void check_level(slong n, slong prec)
{
    if (n < 0 || n > 40)
        throw std::invalid_argument("superstable: level n must be in 0..40");
    if (prec < 2)
        throw std::invalid_argument("superstable: prec must be >= 2");
}

// The midpoint of a ball as an exact ball (radius 0).
ball::Ball mid_of(const ball::Ball& b)
{
    ball::Ball m;
    arb_get_mid_arb(m.get(), b.get());
    return m;
}

bool mid_in_domain(arb_srcptr x, double lo, double hi)
{
    double v = arf_get_d(arb_midref(x), ARF_RND_NEAR);
    double slack = 1e-9 * (hi - lo);
    return v >= lo - slack && v <= hi + slack;
}

std::string orbit_problem(std::uint64_t step, arb_srcptr x, const Family& f)
{
    if (!arb_is_finite(x))
        return "the orbit of c became non-finite at step " + std::to_string(step);
    return "the orbit of c left [" + std::to_string(f.x_lo) + ", " + std::to_string(f.x_hi) +
           "] at step " + std::to_string(step) + " (x ~ " +
           std::to_string(arf_get_d(arb_midref(x), ARF_RND_NEAR)) + ")";
}

} // namespace

namespace {

// The orbit of 1 - mu x^2 in the conjugate coordinate w = mu x (mu > 0):
//   w_{k+1} = mu - w_k^2,   v_k = dw_k/dmu:  v_{k+1} = 1 - 2 w_k v_k,
// two multiplications per step instead of four. At the end x = w/mu and
// dx/dmu = (v - x)/mu (quotient rule), both in ball arithmetic. The ball radius of w grows by
// |2 w| = |f'(x)| per step, as for x: no wrapping loss.
ReturnMap run_orbit_quadratic(const Family& family, const ball::Ball& c, std::uint64_t steps,
                              std::uint64_t half_at, const ball::Ball& mu, slong prec)
{
    ReturnMap out;
    ball::Ball w, v = c, t, x;
    arb_ptr W = w.get();
    arb_ptr V = v.get();
    arb_ptr T = t.get();
    arb_srcptr M = mu.get();
    arb_mul(W, M, c.get(), prec);
    const double md = mu.approx_double();
    const double slack = 1e-9 * (family.x_hi - family.x_lo);
    const double wlo = md * (family.x_lo - slack), whi = md * (family.x_hi + slack);
    for (std::uint64_t k = 0; k < steps; ++k) {
        arb_mul(T, W, V, prec);
        arb_mul_2exp_si(T, T, 1);
        arb_sub_si(V, T, 1, prec);
        arb_neg(V, V);
        arb_sqr(T, W, prec);
        arb_sub(W, M, T, prec);
        const double wd = arf_get_d(arb_midref(W), ARF_RND_NEAR);
        if (!(wd >= wlo && wd <= whi) || ((k & 0xffff) == 0xffff && !arb_is_finite(W))) {
            arb_div(x.get(), W, M, prec);
            out.problem = orbit_problem(k + 1, x.get(), family);
            return out;
        }
        if (k + 1 == half_at) {
            arb_div(out.half.get(), W, M, prec);
            arb_sub(out.half.get(), out.half.get(), c.get(), prec);
        }
    }
    arb_div(x.get(), W, M, prec);
    if (!arb_is_finite(x.get()) || !arb_is_finite(V)) {
        out.problem = orbit_problem(steps, x.get(), family);
        return out;
    }
    arb_sub(out.F.get(), x.get(), c.get(), prec);
    arb_sub(T, V, x.get(), prec);
    arb_div(out.dF.get(), T, M, prec);
    out.ok = true;
    return out;
}

// The orbit x_0 = c, x_{k+1} = f_mu(x_k) for `steps` steps with dx_k/dmu; records x_{half_at} - c.
ReturnMap run_orbit(const Family& family, const ball::Ball& c, std::uint64_t steps,
                    std::uint64_t half_at, const ball::Ball& mu, slong prec)
{
    ReturnMap out;
    const std::uint64_t N = steps;
    ball::Ball x = c;
    ball::Ball y; // dx_k/dmu, zero at k = 0 (c does not depend on mu)
    ball::Ball t, s, fx, fm;
    arb_ptr X = x.get();
    arb_ptr Y = y.get();
    arb_srcptr M = mu.get();
    if (family.fast_quadratic && arb_is_positive(mu.get()))
        return run_orbit_quadratic(family, c, steps, half_at, mu, prec);
    std::unique_ptr<JetEvaluator> ev;
    if (!family.fast_quadratic)
        ev = std::make_unique<JetEvaluator>(family.expr, 1, prec);
    for (std::uint64_t k = 0; k < N; ++k) {
        if (family.fast_quadratic) {
            // f = 1 - mu x^2:  y' = f_mu + f_x y = -x^2 - 2 mu x y = -x (x + 2 mu y).
            arb_mul(t.get(), M, Y, prec);
            arb_mul_2exp_si(t.get(), t.get(), 1);
            arb_add(t.get(), t.get(), X, prec);
            arb_mul(t.get(), t.get(), X, prec);
            arb_neg(Y, t.get());
            arb_sqr(s.get(), X, prec);
            arb_mul(s.get(), s.get(), M, prec);
            arb_neg(s.get(), s.get());
            arb_add_ui(X, s.get(), 1, prec);
        } else {
            ev->evaluate_centered(s.get(), fx.get(), fm.get(), nullptr, nullptr, X, M);
            // y_{k+1} = f_mu(x_k) + f_x(x_k) y_k
            arb_mul(t.get(), fx.get(), Y, prec);
            arb_add(Y, t.get(), fm.get(), prec);
            arb_swap(X, s.get());
        }
        if (!mid_in_domain(X, family.x_lo, family.x_hi) ||
            ((k & 0xffff) == 0xffff && !arb_is_finite(X))) {
            out.problem = orbit_problem(k + 1, X, family);
            return out;
        }
        if (k + 1 == half_at)
            arb_sub(out.half.get(), X, c.get(), prec);
    }
    if (!arb_is_finite(X) || !arb_is_finite(Y)) {
        out.problem = orbit_problem(N, X, family);
        return out;
    }
    arb_sub(out.F.get(), X, c.get(), prec);
    out.dF = y;
    out.ok = true;
    return out;
}

} // namespace

ReturnMap superstable_return(const Family& family, const ball::Ball& c, slong n,
                             const ball::Ball& mu, slong prec)
{
    check_level(n, prec);
    const std::uint64_t N = std::uint64_t(1) << n;
    return run_orbit(family, c, N, n >= 1 ? N / 2 : 0, mu, prec);
}

ball::Ball superstable_half(const Family& family, const ball::Ball& c, slong n,
                            const ball::Ball& mu, slong prec)
{
    check_level(n, prec);
    ball::Ball out;
    if (n < 1) {
        arb_indeterminate(out.get());
        return out;
    }
    ReturnMap R = run_orbit(family, c, std::uint64_t(1) << (n - 1), 0, mu, prec);
    if (!R.ok) {
        arb_indeterminate(out.get());
        return out;
    }
    return R.F;
}

SuperstableCertificate certify_superstable(const Family& family, const ball::Ball& c, slong n,
                                           const ball::Ball& m, const ReturnMap& at_center,
                                           const ball::Ball& rho, slong prec)
{
    check_level(n, prec);
    SuperstableCertificate cert;
    cert.prec = prec;
    arb_indeterminate(cert.mu.get());
    arb_indeterminate(cert.half.get());
    if (!arb_is_exact(m.get()))
        throw std::invalid_argument("certify_superstable: the centre m must be an exact number");
    if (!at_center.ok) {
        cert.problem = at_center.problem;
        return cert;
    }
    // X = [m - rho, m + rho]
    mag_t r;
    mag_init(r);
    arb_get_mag(r, rho.get());
    arb_set(cert.box.get(), m.get());
    mag_set(arb_radref(cert.box.get()), r);
    ball::Ball dX; // X - m = [0 +/- rho]
    mag_set(arb_radref(dX.get()), r);
    mag_clear(r);
    ReturnMap at_box = superstable_return(family, c, n, cert.box, prec);
    if (!at_box.ok) {
        cert.problem = "box orbit: " + at_box.problem;
        return cert;
    }
    cert.residual = at_center.F;
    cert.slope = at_box.dF;
    // Y = 1 / mid(F'(m)), rounded to an exact number (any Y is allowed by the theorem).
    ball::Ball Y = mid_of(at_center.dF);
    if (arb_is_zero(Y.get())) {
        cert.problem = "F_n'(m) has midpoint 0";
        return cert;
    }
    arb_inv(Y.get(), Y.get(), prec);
    Y = mid_of(Y);
    // K = m - Y F(m) + (1 - Y F'(X)) (X - m)
    ball::Ball K, t;
    arb_mul(t.get(), Y.get(), at_center.F.get(), prec);
    arb_sub(K.get(), m.get(), t.get(), prec);
    arb_mul(t.get(), Y.get(), at_box.dF.get(), prec);
    arb_sub_ui(t.get(), t.get(), 1, prec);
    arb_neg(t.get(), t.get());
    arb_mul(t.get(), t.get(), dX.get(), prec);
    arb_add(K.get(), K.get(), t.get(), prec);
    cert.krawczyk = K;
    if (!arb_contains_interior(cert.box.get(), K.get())) {
        cert.problem = "Krawczyk test failed: K(X) is not inside X";
        return cert;
    }
    cert.status = Status::certified;
    cert.mu = K;
    cert.half = at_box.half;
    cert.exact_period = n == 0 || !arb_contains_zero(at_box.half.get());
    return cert;
}

SuperstableCertificate certify_superstable(const Family& family, const ball::Ball& c, slong n,
                                           const ball::Ball& m, const ball::Ball& rho, slong prec)
{
    check_level(n, prec);
    ReturnMap at_center = superstable_return(family, c, n, m, prec);
    return certify_superstable(family, c, n, m, at_center, rho, prec);
}

SuperstableNewton approx_superstable(const Family& family, const ball::Ball& c, slong n,
                                     const ball::Ball& guess, double spacing, int max_iter,
                                     slong prec)
{
    check_level(n, prec);
    if (!(spacing > 0) || !std::isfinite(spacing))
        throw std::invalid_argument("approx_superstable: spacing must be positive");
    SuperstableNewton out;
    out.prec = prec;
    const int target = static_cast<int>(target_bits_below_spacing);
    // Stop when the Krawczyk box built on the step will give a radius ~ 16 (step/s)^2 s below
    // the target: step <= s 2^-(target/2 + 4).
    const double close_enough = std::ldexp(spacing, -(target / 2 + 4));
    const double noise_cap = std::ldexp(spacing, -target - 4);
    ball::Ball g = mid_of(guess);
    for (int it = 0; it < max_iter; ++it) {
        ReturnMap R = superstable_return(family, c, n, g, prec);
        ++out.passes;
        if (!R.ok) {
            out.problem = R.problem;
            return out;
        }
        ball::Ball step;
        arb_div(step.get(), R.F.get(), R.dF.get(), prec);
        if (!step.is_finite()) {
            out.problem = "the mu-derivative of f^(2^n)(c) contains 0 (singular Newton step)";
            return out;
        }
        if (step.radius_upper() > noise_cap) {
            out.precision_limited = true;
            out.problem = "precision: rounding noise in the Newton step (" +
                          std::to_string(step.radius_upper()) + ") is above spacing * 2^-" +
                          std::to_string(target + 4) + " at " + std::to_string(prec) + " bits";
            return out;
        }
        const double sd = std::fabs(step.approx_double());
        ball::Ball next;
        arb_sub(next.get(), g.get(), mid_of(step).get(), prec);
        next = mid_of(next);
        if (sd <= close_enough) {
            out.ok = true;
            out.center = g;
            out.at_center = std::move(R);
            out.step = step;
            out.improved = next;
            return out;
        }
        g = next;
    }
    out.problem = "Newton in mu did not converge in " + std::to_string(max_iter) + " steps";
    return out;
}

SuperstableLevel certify_superstable_from(const Family& family, const ball::Ball& c, slong n,
                                          const SuperstableNewton& newton, double spacing,
                                          slong prec)
{
    check_level(n, prec);
    SuperstableLevel out;
    out.prec = prec;
    if (!newton.ok) {
        out.problem = newton.problem;
        return out;
    }
    out.ok = true;
    out.mu_approx = newton.improved;
    out.half_approx = mid_of(newton.at_center.half);
    const int target = static_cast<int>(target_bits_below_spacing);
    const double want_radius = std::ldexp(spacing, -target);
    ball::Ball center = newton.center;
    ReturnMap at_center = newton.at_center;
    ball::Ball step = newton.step;
    for (int round = 0; round < 4; ++round) {
        const double sd = std::fabs(step.approx_double());
        // rho covers the Newton step with a margin, and is never 0.
        ball::Ball rho(4 * (sd + step.radius_upper()) + std::ldexp(spacing, -target - 8));
        SuperstableCertificate cert = certify_superstable(family, c, n, center, at_center, rho, prec);
        ++out.passes;
        if (cert.status != Status::certified) {
            arb_mul_2exp_si(rho.get(), rho.get(), 8);
            cert = certify_superstable(family, c, n, center, at_center, rho, prec);
            ++out.passes;
        }
        if (cert.status != Status::certified) {
            out.problem = cert.problem;
            out.cert = cert;
            return out;
        }
        out.cert = cert;
        out.mu_approx = mid_of(cert.mu);
        if (cert.mu.radius_upper() <= want_radius || round == 3) {
            // d_n over the box X is used as it is when its relative radius is below 2^-64;
            // otherwise it is recomputed over the (much smaller) enclosure K.
            mag_t rel;
            mag_init(rel);
            arb_get_mag_lower(rel, out.cert.half.get());
            const bool box_is_tight = arb_is_finite(out.cert.half.get()) && !mag_is_zero(rel) &&
                                      out.cert.half.radius_upper() <
                                          std::ldexp(mag_get_d(rel), -64);
            mag_clear(rel);
            if (n >= 1 && !box_is_tight) {
                ball::Ball h = superstable_half(family, c, n, cert.mu, prec);
                out.passes += 1; // half a pass, counted as one
                ball::Ball both;
                if (h.is_finite() && arb_intersection(both.get(), h.get(), out.cert.half.get(), prec))
                    out.cert.half = both;
                out.cert.exact_period = !arb_contains_zero(out.cert.half.get());
            }
            if (n >= 1)
                out.half_approx = mid_of(out.cert.half);
            if (cert.mu.radius_upper() > want_radius)
                out.problem = "certified radius above spacing * 2^-" + std::to_string(target);
            return out;
        }
        // Tighten: a new centre at the middle of K, and its orbit.
        center = out.mu_approx;
        at_center = superstable_return(family, c, n, center, prec);
        ++out.passes;
        if (!at_center.ok) {
            out.problem = at_center.problem;
            return out;
        }
        arb_div(step.get(), at_center.F.get(), at_center.dF.get(), prec);
    }
    return out;
}

SuperstableLevel locate_superstable(const Family& family, const ball::Ball& c, slong n,
                                    const ball::Ball& guess, double spacing, int max_iter,
                                    slong prec)
{
    SuperstableNewton newton = approx_superstable(family, c, n, guess, spacing, max_iter, prec);
    SuperstableLevel out = certify_superstable_from(family, c, n, newton, spacing, prec);
    out.passes += newton.passes;
    return out;
}

} // namespace renorm::cascade
