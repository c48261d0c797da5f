#include <renorm/newton/detail/scaled.hpp>
#include <renorm/newton/fixed_point.hpp>
#include <renorm/newton/krylov.hpp>

#include <algorithm>
#include <climits>
#include <cmath>
#include <limits>
#include <memory>
#include <stdexcept>

namespace renorm::newton {

using namespace renorm::series;
using doubling::apply_T;
using doubling::Linearization;

namespace {

/// F = G - T_n(G) and its l1 norm (log10); a NaN norm when T is undefined at G.
struct Residual {
    BallPoly f;
    Ball a;
    double log10_norm = std::numeric_limits<double>::quiet_NaN();
};

Residual residual(const BallPoly& g, const Problem& problem, slong n, slong prec)
{
    Residual r;
    doubling::TImage t = apply_T(g, problem, n, prec);
    if (!t.a.is_finite())
        return r;
    r.a = t.a;
    arb_poly_sub(r.f.get(), g.get(), t.t.get(), prec);
    arb_poly_truncate(r.f.get(), n);
    r.f = approx_midpoints(r.f);
    r.log10_norm = detail::log10_upper(norm_l1(r.f, prec));
    return r;
}

BallPoly resized(const BallPoly& g, slong n)
{
    BallPoly out = truncated(g, n);
    return out;
}

} // namespace

BallPoly approx_initial_guess(const Disc& disc, slong prec)
{
    // G(y) = 1 - 1.5276 y + 0.1048 y^2 with y = c + r s.
    const double coeffs[3] = {1.0, -1.5276, 0.1048};
    BallPoly gy = from_doubles(coeffs, 3);
    Ball c(disc.centre), r(disc.radius);
    return approx_midpoints(compose_affine(gy, c, r, 3, prec));
}

Ball approx_alpha(const BallPoly& g, const Problem& problem, slong prec)
{
    Ball one(slong{1});
    Ball s1 = problem.disc.to_s(one, prec);
    Ball g1 = evaluate(g, s1, prec);
    Ball a;
    arb_inv(a.get(), g1.get(), prec);
    arb_neg(a.get(), a.get());
    arb_get_mid_arb(a.get(), a.get());
    return a;
}

FixedPoint approx_newton(const Problem& problem, const BallPoly& guess, slong n, double tol,
                         slong max_iter, slong prec)
{
    if (prec < 2 || n < 2)
        throw std::invalid_argument("approx_newton: need prec >= 2 and n >= 2");
    FixedPoint fp;
    fp.problem = problem;
    fp.n = n;
    fp.prec = prec;
    BallPoly g = resized(approx_midpoints(guess), n);
    const double log_tol = std::log10(tol);
    double prev = std::numeric_limits<double>::infinity();
    for (slong it = 0; it <= max_iter; ++it) {
        Residual r = residual(g, problem, n, prec);
        if (std::isnan(r.log10_norm)) {
            fp.message = "the doubling operator is undefined at the iterate (G(1) >= 0 or G(u) <= 0)";
            return fp;
        }
        fp.log10_residual = r.log10_norm;
        fp.steps = it;
        if (r.log10_norm <= log_tol) {
            fp.converged = true;
            break;
        }
        if (it == max_iter) {
            fp.message = "Newton did not reach the tolerance in " + std::to_string(max_iter) + " steps";
            break;
        }
        if (it >= 3 && r.log10_norm > prev - 0.3) {
            fp.message = "Newton stalled at residual 1e" + std::to_string(int(r.log10_norm));
            break;
        }
        prev = r.log10_norm;
        Linearization lin(g, problem, n, prec);
        ball::BallMat j = lin.matrix(prec);
        arb_mat_neg(j.get(), j.get());
        for (slong i = 0; i < n; ++i)
            arb_add_ui(j.entry(i, i), j.entry(i, i), 1, prec);
        ball::BallMat rhs(n, 1), x(n, 1);
        for (slong i = 0; i < n; ++i)
            arb_poly_get_coeff_arb(rhs.entry(i, 0), r.f.get(), i);
        if (!arb_mat_approx_solve(x.get(), j.get(), rhs.get(), prec)) {
            fp.message = "the Jacobian I - DT is numerically singular";
            return fp;
        }
        for (slong i = 0; i < n; ++i) {
            Ball gi = g.coeff(i);
            arb_sub(gi.get(), gi.get(), x.entry(i, 0), prec);
            g.set_coeff(i, gi);
        }
        g = approx_midpoints(g);
    }
    fp.g = g;
    fp.a = approx_alpha(g, problem, prec);
    fp.decay_rate = approx_decay_rate(g);
    return fp;
}

FixedPoint approx_continuation(const Problem& problem, slong n, slong prec, const ProgressFn& progress)
{
    const double tol = std::pow(2.0, -0.8 * static_cast<double>(prec));
    Problem p = problem;
    p.order = "2";
    FixedPoint fp = approx_newton(p, approx_initial_guess(problem.disc, prec), n, tol, 30, prec);
    if (!fp.converged) {
        fp.message.insert(0, "no fixed point found at z = 2: ");
        return fp;
    }
    Ball target = problem.order_ball(prec);
    const double z_end = target.approx_double();
    double z = 2.0;
    double step = std::clamp(z_end - 2.0, -0.5, 0.5);
    slong k = 0;
    while (z != z_end) {
        double z_next = (std::fabs(z_end - z) <= std::fabs(step)) ? z_end : z + step;
        p.order = (z_next == z_end) ? problem.order : std::to_string(z_next);
        FixedPoint trial = approx_newton(p, fp.g, n, tol, 20, prec);
        if (progress)
            progress({"continuation", ++k, n, prec, trial.log10_residual, p.order});
        if (trial.converged) {
            fp = trial;
            z = z_next;
            step *= 1.5;
        } else {
            step *= 0.5;
            if (std::fabs(step) < 1e-4) {
                fp.converged = false;
                fp.message = "continuation in z stalled near z = " + std::to_string(z) +
                             " (last Newton failure: " + trial.message + ")";
                return fp;
            }
        }
    }
    fp.problem = problem;
    return fp;
}

slong approx_length_for_digits(double digits, double rate)
{
    rate = std::clamp(rate, 0.2, 4.0);
    return static_cast<slong>(std::ceil(digits / rate)) + 8;
}

namespace {

/// The chord preconditioner: a double LU of I - DT on the first m modes, the identity beyond.
class ChordPreconditioner {
public:
    ChordPreconditioner(const FixedPoint& start, slong m) : m_m(m)
    {
        BallPoly g0 = resized(start.g, std::max(start.n, m));
        Linearization lin(g0, start.problem, m, 128);
        Eigen::MatrixXd j = Eigen::MatrixXd::Identity(m, m) - lin.approx_matrix(m, 128);
        m_lu.compute(j);
    }
    /// P r for a residual r of length n (returned with length n). No guarantee.
    BallPoly apply(const BallPoly& r, slong n, slong prec) const
    {
        BallVec out(n);
        const slong len = std::min(r.length(), n);
        for (slong k = 0; k < len; ++k)
            arb_set(out[k], r.get()->coeffs + k);
        const slong mm = std::min(m_m, n);
        const slong ex = detail::max_exponent(out.data(), mm);
        if (len > 0 && ex > LONG_MIN / 4) {
            Eigen::VectorXd x = Eigen::VectorXd::Zero(m_m);
            x.head(mm) = detail::to_scaled_doubles(out.data(), mm, ex);
            Eigen::VectorXd y = m_lu.solve(x);
            detail::from_scaled_doubles(out.data(), y.head(mm), ex);
        }
        BallPoly p;
        arb_poly_fit_length(p.get(), n);
        for (slong k = 0; k < n; ++k)
            arb_set_round(p.get()->coeffs + k, out[k], prec);
        _arb_poly_set_length(p.get(), n);
        _arb_poly_normalise(p.get());
        return approx_midpoints(p);
    }

private:
    slong m_m;
    Eigen::PartialPivLU<Eigen::MatrixXd> m_lu;
};

double log10_norm(const BallPoly& p, slong prec)
{
    return detail::log10_upper(norm_l1(p, prec));
}

/// log10 of the largest |g_k| over the last `count` coefficients of g (length n).
double log10_tail(const BallPoly& g, slong n, slong count)
{
    double worst = -std::numeric_limits<double>::infinity();
    for (slong k = std::max<slong>(0, n - count); k < n; ++k)
        worst = std::max(worst, detail::log10_upper(g.coeff(k)));
    return worst;
}

} // namespace

FixedPoint approx_refine_newton(const FixedPoint& start, slong digits, const RefineOptions& options)
{
    if (digits < 1)
        throw std::invalid_argument("approx_refine: digits must be >= 1");
    FixedPoint fp = start;
    fp.converged = false;
    const Problem& problem = start.problem;
    const double rate = start.decay_rate > 0.05 ? start.decay_rate : 0.05;
    const double d_work = static_cast<double>(digits) + options.guard_digits;
    slong n_final = std::max(approx_length_for_digits(d_work, rate), options.min_length);
    const slong m = std::min(options.jacobian_size, n_final);
    const ChordPreconditioner precond(start, m);

    // Inexact Newton with precision doubling (DEVELOPERS.md, "Newton steps at two precisions"):
    // the residual F = G - T_n(G) is computed at the precision of the step's target t, and the
    // correction solves (I - DT(G)) delta = F by preconditioned iteration at the much lower
    // precision the correction needs (t - e digits relative, e the digits G already has).
    BallPoly g = start.g;
    double e = std::isfinite(start.log10_residual) ? -start.log10_residual : 1.0;
    double prev = std::numeric_limits<double>::infinity();
    slong stalls = 0;
    slong n = start.n;
    slong inner_total = 0;
    for (slong step = 0; step < options.max_steps; ++step) {
        const double t = std::clamp(std::min(d_work, 2.0 * e - 2.0), std::min(d_work, e + 3.0), d_work);
        n = std::max({n, approx_length_for_digits(t, rate), std::min(m, n_final)});
        if (t >= d_work)
            n = std::max(n, n_final);
        const slong prec = ball::digits_to_bits(static_cast<slong>(std::ceil(t)) + 5) + 64;
        g = resized(g, n);
        Residual r = residual(g, problem, n, prec);
        if (!std::isfinite(r.log10_norm)) {
            fp.message = "Newton diverged: the residual is not finite at step " + std::to_string(step) +
                         " (n = " + std::to_string(n) + ")";
            return fp;
        }
        fp.log10_residual = r.log10_norm;
        fp.n = n;
        fp.prec = prec;
        fp.steps = start.steps + step;
        if (options.progress)
            options.progress({"newton", step, n, prec, r.log10_norm, problem.order});
        // The truncation must also be long enough: the last coefficients of G must lie below
        // the target (the decay rate measured at the start can be optimistic).
        const bool tail_ok = log10_tail(g, n, 4) <= -(d_work + 1.0);
        if (r.log10_norm <= -d_work && n >= n_final && tail_ok) {
            fp.converged = true;
            break;
        }
        if (r.log10_norm <= -d_work && !tail_ok) {
            n_final = static_cast<slong>(std::ceil(1.25 * static_cast<double>(n)));
            n = n_final;
            continue;
        }
        if (r.log10_norm > prev - 0.5) {
            if (++stalls >= 4) {
                fp.message = "Newton stalled at residual 1e" + std::to_string(static_cast<int>(r.log10_norm)) +
                             " (n = " + std::to_string(n) + ", " + std::to_string(prec) + " bits)";
                return fp;
            }
        } else {
            stalls = 0;
        }
        prev = r.log10_norm;
        const double e_now = -r.log10_norm;
        // Relative accuracy the correction needs for the next iterate to be good to t digits.
        const double k_rel = std::max(3.0, t - e_now + 3.0);
        BallPoly delta = precond.apply(r.f, n, prec);
        if (k_rel > 12.0) {
            const slong p_in = ball::digits_to_bits(static_cast<slong>(std::ceil(k_rel)) + 5) + 64;
            Linearization lin(truncated(g, n), problem, n, p_in);
            const double lf = log10_norm(r.f, p_in);
            for (slong it = 0; it < static_cast<slong>(k_rel / 8.0) + 4; ++it) {
                // rho = F - (delta - DT delta)
                BallPoly dtd = lin.apply(delta, p_in);
                BallPoly rho;
                arb_poly_sub(rho.get(), r.f.get(), delta.get(), p_in);
                arb_poly_add(rho.get(), rho.get(), dtd.get(), p_in);
                arb_poly_truncate(rho.get(), n);
                rho = approx_midpoints(rho);
                ++inner_total;
                if (log10_norm(rho, p_in) - lf <= -k_rel)
                    break;
                BallPoly c = precond.apply(rho, n, p_in);
                arb_poly_add(delta.get(), delta.get(), c.get(), p_in);
                delta = approx_midpoints(delta);
            }
        }
        arb_poly_sub(g.get(), g.get(), delta.get(), prec);
        g = approx_midpoints(resized(g, n));
        e = std::max(e + 3.0, std::min(t, 2.0 * e_now - 2.0));
    }
    if (!fp.converged && fp.message.empty())
        fp.message = "Newton did not converge in " + std::to_string(options.max_steps) + " steps";
    fp.g = g;
    fp.a = approx_alpha(g, problem, fp.prec);
    (void)inner_total;
    return fp;
}

FixedPoint approx_refine_chord(const FixedPoint& start, slong digits, const RefineOptions& options)
{
    if (digits < 1)
        throw std::invalid_argument("approx_refine: digits must be >= 1");
    FixedPoint fp = start;
    fp.converged = false;
    const Problem& problem = start.problem;
    const double rate = start.decay_rate > 0.05 ? start.decay_rate : 0.5;
    const double d_work = static_cast<double>(digits) + options.guard_digits;
    const slong n_final = std::max(approx_length_for_digits(d_work, rate), options.min_length);

    // The chord Jacobian: I - DT at the starting point, in double, size m.
    const slong m = std::min(options.jacobian_size, n_final);
    BallPoly g0 = resized(start.g, std::max(start.n, m));
    Eigen::PartialPivLU<Eigen::MatrixXd> lu;
    {
        Linearization lin(g0, problem, m, 128);
        Eigen::MatrixXd j = Eigen::MatrixXd::Identity(m, m) - lin.approx_matrix(m, 128);
        lu.compute(j);
    }

    BallPoly g = start.g;
    double e = -start.log10_residual; // digits the current iterate is good for
    double gain = 10;
    double prev = std::numeric_limits<double>::infinity();
    slong stalls = 0;
    slong n = start.n;
    for (slong step = 0; step < options.max_steps; ++step) {
        const double t = std::clamp(e + gain, 1.0, d_work);
        n = std::max({n, approx_length_for_digits(t, rate), std::min(m, n_final)});
        if (t >= d_work)
            n = std::max(n, n_final);
        const slong prec = ball::digits_to_bits(static_cast<slong>(std::ceil(t)) + 5) + 64;
        g = resized(g, n);
        Residual r = residual(g, problem, n, prec);
        if (!std::isfinite(r.log10_norm)) {
            fp.message = std::isnan(r.log10_norm)
                             ? "the doubling operator became undefined during the chord steps"
                             : "the chord steps diverged (infinite residual)";
            return fp;
        }
        fp.log10_residual = r.log10_norm;
        fp.n = n;
        fp.prec = prec;
        fp.steps = start.steps + step;
        if (options.progress)
            options.progress({"chord", step, n, prec, r.log10_norm, problem.order});
        if (r.log10_norm <= -d_work && n >= n_final) {
            fp.converged = true;
            break;
        }
        if (r.log10_norm > prev - 0.5) {
            if (++stalls >= 4) {
                fp.message = "the chord steps stalled at residual 1e" +
                             std::to_string(static_cast<int>(r.log10_norm)) + " (n = " +
                             std::to_string(n) + ", " + std::to_string(prec) + " bits)";
                return fp;
            }
        } else {
            stalls = 0;
            if (std::isfinite(prev))
                gain = std::clamp(prev - r.log10_norm, 3.0, 14.0);
        }
        prev = r.log10_norm;
        e = -r.log10_norm;
        // Correction: the dense solve on the first m modes, the identity on the rest
        // (DT is small on high modes; see DEVELOPERS.md, "Why chord steps converge").
        const slong mm = std::min(m, n);
        arb_srcptr f = r.f.get()->coeffs;
        const slong flen = r.f.length();
        BallVec delta(n);
        for (slong k = 0; k < std::min(flen, n); ++k)
            arb_set(delta[k], f + k);
        if (flen > 0) {
            const slong ex = detail::max_exponent(f, std::min(flen, mm));
            if (ex > LONG_MIN / 4) {
                Eigen::VectorXd x = detail::to_scaled_doubles(delta.data(), mm, ex);
                Eigen::VectorXd y = (mm == m) ? Eigen::VectorXd(lu.solve(x))
                                              : Eigen::VectorXd(lu.solve([&] {
                                                    Eigen::VectorXd xx = Eigen::VectorXd::Zero(m);
                                                    xx.head(mm) = x;
                                                    return xx;
                                                }()).head(mm));
                detail::from_scaled_doubles(delta.data(), y, ex);
            }
        }
        for (slong k = 0; k < n; ++k) {
            Ball gk = g.coeff(k);
            arb_sub(gk.get(), gk.get(), delta[k], prec);
            g.set_coeff(k, gk);
        }
        g = approx_midpoints(g);
    }
    if (!fp.converged && fp.message.empty())
        fp.message = "the chord steps did not converge in " + std::to_string(options.max_steps) + " steps";
    fp.g = g;
    fp.a = approx_alpha(g, problem, fp.prec);
    return fp;
}

namespace {

/// G - T(G) = 0 for the Newton-Krylov driver: J = I - DT(G).
class FixedPointEquation final : public KrylovProblem {
public:
    FixedPointEquation(const Problem& problem, double rate) : m_problem(problem), m_rate(rate) {}
    slong length_for(double digits) const override { return approx_length_for_digits(digits, m_rate); }
    double residual(BallVec& f, const BallVec& x, slong n, slong prec) override
    {
        Residual r = newton::residual(krylov_series(x, n), m_problem, n, prec);
        f = krylov_vector(r.f, n);
        return r.log10_norm;
    }
    void linearize(const BallVec& x, slong n, slong prec) override
    {
        // The whole iterate enters DT even when the correction is shorter: compositions at
        // degree < n use every coefficient of G once it is shifted to the inner map's centre.
        m_lin = std::make_unique<Linearization>(krylov_series(x, x.size()), m_problem, n, prec);
        m_n = n;
    }
    void apply(BallVec& y, const BallVec& v, slong prec) const override
    {
        BallPoly dt = m_lin->apply(krylov_series(v, m_n), prec);
        y = BallVec(m_n);
        for (slong k = 0; k < m_n; ++k) {
            arb_poly_get_coeff_arb(y[k], dt.get(), k);
            arb_sub(y[k], v[k], y[k], prec);
        }
    }
    ball::BallMat small_jacobian(const BallVec& x, slong m, slong prec) const override
    {
        Linearization lin(krylov_series(x, x.size()), m_problem, m, prec);
        ball::BallMat j = lin.matrix(prec);
        arb_mat_neg(j.get(), j.get());
        for (slong i = 0; i < m; ++i)
            arb_add_ui(j.entry(i, i), j.entry(i, i), 1, prec);
        return j;
    }
    double tail_scale(const BallVec&) const override { return 1.0; }
    bool long_enough(const BallVec& x, slong n, double digits) const override
    {
        return log10_tail(krylov_series(x, n), n, 4) <= -(digits + 1.0);
    }

private:
    Problem m_problem;
    double m_rate;
    std::unique_ptr<Linearization> m_lin;
    slong m_n = 0;
};

} // namespace

FixedPoint approx_refine_krylov(const FixedPoint& start, slong digits, const RefineOptions& options)
{
    if (digits < 1)
        throw std::invalid_argument("approx_refine: digits must be >= 1");
    const double rate = start.decay_rate > 0.05 ? start.decay_rate : 0.5;
    FixedPointEquation eq(start.problem, rate);
    KrylovState s;
    if (options.resume) {
        s = *options.resume;
    } else {
        s.n = start.n;
        s.x = krylov_vector(start.g, start.n);
        s.digits = std::isfinite(start.log10_residual) ? std::max(1.0, -start.log10_residual) : 1.0;
    }
    KrylovOptions ko;
    ko.guard_digits = options.guard_digits;
    ko.min_length = options.min_length;
    ko.min_steps = options.min_steps;
    ko.cycle = options.krylov_cycle;
    ko.max_newton = std::min<slong>(options.max_steps, 200);
    ko.progress = options.progress;
    ko.on_step = options.on_step;
    ko.stage = options.method == RefineMethod::dense ? "newton-dense" : "newton-krylov";
    ko.dense_inner = options.method == RefineMethod::dense;
    ko.order = start.problem.order;
    KrylovResult kr = approx_newton_krylov(eq, std::move(s), static_cast<double>(digits), ko);
    FixedPoint fp = start;
    fp.converged = kr.converged;
    fp.message = kr.message;
    fp.n = kr.state.n;
    fp.prec = kr.prec;
    fp.log10_residual = kr.log10_residual;
    fp.steps = start.steps + kr.state.step;
    fp.krylov_steps = kr.state.krylov_total;
    fp.g = krylov_series(kr.state.x, kr.state.n);
    fp.a = approx_alpha(fp.g, start.problem, std::max<slong>(fp.prec, 64));
    return fp;
}

FixedPoint approx_refine(const FixedPoint& start, slong digits, const RefineOptions& options)
{
    switch (options.method) {
    case RefineMethod::krylov:
    case RefineMethod::dense:
        return approx_refine_krylov(start, digits, options);
    case RefineMethod::chord:
        return approx_refine_chord(start, digits, options);
    case RefineMethod::newton:
        break;
    }
    return approx_refine_newton(start, digits, options);
}

} // namespace renorm::newton
