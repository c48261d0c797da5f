#include <renorm/newton/collocation.hpp>
#include <renorm/newton/detail/dense_solve.hpp>
#include <renorm/newton/detail/scaled.hpp>
#include <renorm/series/chebyshev.hpp>
#include <renorm/series/series.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace renorm::newton {

using ball::BallMat;
using namespace renorm::series;

namespace {


double log10_max_abs(const BallVec& f)
{
    double worst = -std::numeric_limits<double>::infinity();
    for (slong j = 0; j < f.size(); ++j) {
        Ball b(f[j]);
        worst = std::max(worst, detail::log10_upper(b));
    }
    return worst;
}

BallPoly resized(const BallPoly& c, slong n)
{
    BallPoly out = truncated(c, n);
    return out;
}

Ball alpha_of(const BallPoly& c, slong prec)
{
    Ball g1, a;
    chebyshev_evaluate(g1, nullptr, c, Ball(slong{1}), prec);
    arb_inv(a.get(), g1.get(), prec);
    arb_neg(a.get(), a.get());
    arb_get_mid_arb(a.get(), a.get());
    return a;
}


} // namespace

bool collocation_residual(BallVec& f, BallMat* jacobian, const BallPoly& c, const std::string& order,
                          slong n, slong prec)
{
    if (n < 2 || prec < 2)
        throw std::invalid_argument("collocation_residual: need n >= 2 and prec >= 2");
    const Ball z = doubling::order_ball(order, prec);
    BallVec y = chebyshev_points(n, prec);
    Ball g1, a, amz, a2, zm1;
    chebyshev_evaluate(g1, nullptr, c, Ball(slong{1}), prec);
    if (!arb_is_negative(g1.get()))
        return false;
    arb_inv(a.get(), g1.get(), prec);
    arb_neg(a.get(), a.get());
    arb_pow(amz.get(), a.get(), z.get(), prec);
    arb_inv(amz.get(), amz.get(), prec);
    arb_sqr(a2.get(), a.get(), prec);
    arb_sub_ui(zm1.get(), z.get(), 1, prec);
    f = BallVec(n);
    BallVec tu(n), tv(n);
    for (slong j = 0; j < n; ++j) {
        Ball u, gu, dgu, v, gv, dgv, gy;
        arb_mul(u.get(), y[j], amz.get(), prec);
        chebyshev_evaluate(gu, &dgu, c, u, prec);
        if (!arb_is_positive(gu.get()))
            return false;
        arb_pow(v.get(), gu.get(), z.get(), prec);
        chebyshev_evaluate(gv, &dgv, c, v, prec);
        chebyshev_evaluate(gy, nullptr, c, Ball(y[j]), prec);
        // F_j = G(y_j) + a G(v_j)
        arb_mul(f[j], a.get(), gv.get(), prec);
        arb_add(f[j], f[j], gy.get(), prec);
        if (!jacobian)
            continue;
        // m = -a z G'(v) G(u)^(z-1); q = -a^2 G(v) - z a m u G'(u)
        Ball m, q, t;
        arb_pow(t.get(), gu.get(), zm1.get(), prec);
        arb_mul(m.get(), dgv.get(), t.get(), prec);
        arb_mul(m.get(), m.get(), a.get(), prec);
        arb_mul(m.get(), m.get(), z.get(), prec);
        arb_neg(m.get(), m.get());
        arb_mul(q.get(), z.get(), a.get(), prec);
        arb_mul(q.get(), q.get(), m.get(), prec);
        arb_mul(q.get(), q.get(), u.get(), prec);
        arb_mul(q.get(), q.get(), dgu.get(), prec);
        arb_addmul(q.get(), a2.get(), gv.get(), prec);
        arb_neg(q.get(), q.get());
        // T_k at x(y_j), x(u_j), x(v_j) by the three-term recurrence
        Ball xy, xu, xv, ty0, ty1, tu0, tu1, tv0, tv1, nxt;
        auto to_x = [&](Ball& x, const Ball& w) {
            arb_mul_2exp_si(x.get(), w.get(), 1);
            arb_sub_ui(x.get(), x.get(), 1, prec);
        };
        to_x(xy, Ball(y[j]));
        to_x(xu, u);
        to_x(xv, v);
        for (slong k = 0; k < n; ++k) {
            Ball ty, tuk, tvk;
            if (k == 0) {
                arb_one(ty.get());
                arb_one(tuk.get());
                arb_one(tvk.get());
            } else if (k == 1) {
                ty = xy;
                tuk = xu;
                tvk = xv;
            } else {
                auto step = [&](Ball& out, const Ball& x, const Ball& p1, const Ball& p0) {
                    arb_mul(out.get(), x.get(), p1.get(), prec);
                    arb_mul_2exp_si(out.get(), out.get(), 1);
                    arb_sub(out.get(), out.get(), p0.get(), prec);
                };
                step(ty, xy, ty1, ty0);
                step(tuk, xu, tu1, tu0);
                step(tvk, xv, tv1, tv0);
            }
            ty0 = ty1;
            ty1 = ty;
            tu0 = tu1;
            tu1 = tuk;
            tv0 = tv1;
            tv1 = tvk;
            // J = T_k(y) - [T_k(1) q - a T_k(v) + m T_k(u)], T_k(1) = 1
            arb_ptr e = jacobian->entry(j, k);
            arb_sub(e, ty.get(), q.get(), prec);
            arb_addmul(e, a.get(), tvk.get(), prec);
            arb_submul(e, m.get(), tuk.get(), prec);
        }
    }
    return true;
}

CollocationFixedPoint approx_collocation_newton(const std::string& order, const BallPoly& guess, slong n,
                                                double tol, slong max_iter, slong prec)
{
    CollocationFixedPoint fp;
    fp.order = order;
    fp.n = n;
    fp.prec = prec;
    BallPoly c = approx_midpoints(resized(guess, n));
    double prev = std::numeric_limits<double>::infinity();
    const double log_tol = std::log10(tol);
    for (slong it = 0; it <= max_iter; ++it) {
        BallVec f;
        BallMat j(n, n);
        if (!collocation_residual(f, &j, c, order, n, prec)) {
            fp.message = "the doubling operator is undefined at the iterate (G(1) >= 0 or G(u) <= 0)";
            return fp;
        }
        fp.log10_residual = log10_max_abs(f);
        fp.steps = it;
        if (!std::isfinite(fp.log10_residual)) {
            fp.message = "Newton diverged (non-finite residual)";
            return fp;
        }
        if (fp.log10_residual <= log_tol) {
            fp.converged = true;
            break;
        }
        if (it == max_iter || (it >= 3 && fp.log10_residual > prev - 0.3)) {
            fp.message = "Newton (collocation) stalled at residual 1e" +
                         std::to_string(static_cast<int>(fp.log10_residual));
            break;
        }
        prev = fp.log10_residual;
        BallVec d;
        if (!detail::approx_solve_dense(d, j, f, prec)) {
            fp.message = "the collocation Jacobian is numerically singular";
            return fp;
        }
        for (slong k = 0; k < n; ++k) {
            Ball ck = c.coeff(k);
            arb_sub(ck.get(), ck.get(), d[k], prec);
            c.set_coeff(k, ck);
        }
        c = approx_midpoints(c);
    }
    fp.c = c;
    fp.a = alpha_of(c, prec);
    fp.decay_rate = approx_decay_rate(c);
    return fp;
}

CollocationFixedPoint approx_collocation_continuation(const std::string& order, slong n, slong prec,
                                                      const ProgressFn& progress)
{
    // G(y) = 1 - 1.5276 y + 0.1048 y^2 (design note) in Chebyshev form, y = (x + 1)/2.
    const double guess[3] = {0.2755, -0.7114, 0.0131};
    const double tol = std::pow(2.0, -0.8 * static_cast<double>(prec));
    CollocationFixedPoint fp = approx_collocation_newton("2", from_doubles(guess, 3), n, tol, 30, prec);
    if (!fp.converged) {
        fp.message.insert(0, "no fixed point at z = 2: ");
        return fp;
    }
    const double z_end = doubling::order_ball(order, 64).approx_double();
    double z = 2.0, step = std::clamp(z_end - 2.0, -0.5, 1.0);
    slong k = 0;
    while (z != z_end) {
        const double z_next = (std::fabs(z_end - z) <= std::fabs(step)) ? z_end : z + step;
        const std::string o = (z_next == z_end) ? order : std::to_string(z_next);
        CollocationFixedPoint trial = approx_collocation_newton(o, fp.c, n, tol, 20, prec);
        if (progress)
            progress({"continuation", ++k, n, prec, trial.log10_residual, o});
        if (trial.converged) {
            fp = trial;
            z = z_next;
            step *= 1.5;
        } else {
            step *= 0.5;
            if (std::fabs(step) < 1e-4) {
                fp.converged = false;
                fp.message = "continuation in z stalled near z = " + std::to_string(z) + " (" + trial.message + ")";
                return fp;
            }
        }
    }
    fp.order = order;
    return fp;
}

CollocationFixedPoint approx_collocation_refine(const CollocationFixedPoint& start, slong digits, double guard,
                                                slong min_n, const ProgressFn& progress)
{
    CollocationFixedPoint fp = start;
    fp.converged = false;
    const double dw = static_cast<double>(digits) + guard;
    const double rate = std::max(start.decay_rate, 0.05);
    slong n_final = std::max(approx_length_for_digits(dw, rate), min_n);
    double e = -start.log10_residual;
    BallPoly c = start.c;
    slong n = start.n;
    for (slong step = 0; step < 60; ++step) {
        const double t = std::min(dw, std::max(2.0 * e, e + 5.0));
        n = std::max(n, approx_length_for_digits(t, rate));
        if (t >= dw)
            n = std::max(n, n_final);
        const slong prec = ball::digits_to_bits(static_cast<slong>(std::ceil(t)) + 5) + 64;
        CollocationFixedPoint s = approx_collocation_newton(fp.order, c, n, std::pow(10.0, -std::min(t, 300.0)),
                                                            t >= dw ? 8 : 1, prec);
        // At the target, converge fully; before it, one Newton step per precision level.
        if (!s.message.empty() && s.message.find("stalled") == std::string::npos) {
            fp.message = s.message;
            return fp;
        }
        c = s.c;
        fp.n = n;
        fp.prec = prec;
        fp.log10_residual = s.log10_residual;
        fp.steps += s.steps;
        if (progress)
            progress({"collocation", step, n, prec, s.log10_residual, fp.order});
        if (t >= dw && s.log10_residual <= -dw) {
            // the tail of the coefficients must be below the target too
            double tail = -std::numeric_limits<double>::infinity();
            for (slong k = std::max<slong>(0, n - 4); k < n; ++k)
                tail = std::max(tail, detail::log10_upper(c.coeff(k)));
            if (tail <= -dw) {
                fp.converged = true;
                break;
            }
            n_final = static_cast<slong>(std::ceil(1.25 * static_cast<double>(n)));
            n = n_final;
            continue;
        }
        e = std::max(e + 3.0, -s.log10_residual);
    }
    if (!fp.converged && fp.message.empty())
        fp.message = "collocation Newton did not reach 1e-" + std::to_string(static_cast<long>(dw));
    fp.c = c;
    fp.a = alpha_of(c, fp.prec);
    return fp;
}

bool collocation_dt_matrices(BallMat& m, BallMat& cmat, const CollocationFixedPoint& fp, slong n, slong prec)
{
    BallVec f;
    if (!collocation_residual(f, &m, fp.c, fp.order, n, prec))
        return false;
    BallVec y = chebyshev_points(n, prec);
    cmat = chebyshev_matrix(y, n, prec);
    arb_mat_sub(m.get(), cmat.get(), m.get(), prec);
    return true;
}

} // namespace renorm::newton
