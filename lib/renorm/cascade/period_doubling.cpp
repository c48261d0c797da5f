#include <renorm/cascade/jet_evaluator.hpp>
#include <renorm/cascade/period_doubling.hpp>
#include <renorm/cascade/superstable.hpp>

#include <cmath>
#include <cstdint>
#include <stdexcept>

namespace renorm::cascade {

namespace {

ball::Ball mid_of(const ball::Ball& b)
{
    ball::Ball m;
    arb_get_mid_arb(m.get(), b.get());
    return m;
}

} // namespace

DoublingSystem doubling_system(const Family& family, slong n, const ball::Ball& x0,
                               const ball::Ball& mu, slong prec)
{
    if (n < 0 || n > 40)
        throw std::invalid_argument("doubling_system: level n must be in 0..40");
    if (prec < 2)
        throw std::invalid_argument("doubling_system: prec must be >= 2");
    DoublingSystem out;
    const std::uint64_t N = std::uint64_t(1) << n;
    JetEvaluator ev(family.expr, 2, prec);
    ball::Ball x = x0, xx(slong(1)), xm, P(slong(1)), Px, Pm;
    ball::Ball f, fx, fm, fxx, fxm, t, u;
    const double slack = 1e-9 * (family.x_hi - family.x_lo);
    for (std::uint64_t k = 0; k < N; ++k) {
        ev.evaluate_centered(f.get(), fx.get(), fm.get(), fxx.get(), fxm.get(), x.get(), mu.get());
        // dP/dmu <- dP/dmu f_x + P (f_xx dx/dmu + f_xmu)
        arb_mul(t.get(), fxx.get(), xm.get(), prec);
        arb_add(t.get(), t.get(), fxm.get(), prec);
        arb_mul(t.get(), t.get(), P.get(), prec);
        arb_mul(Pm.get(), Pm.get(), fx.get(), prec);
        arb_add(Pm.get(), Pm.get(), t.get(), prec);
        // dP/dx <- dP/dx f_x + P f_xx dx/dx
        arb_mul(t.get(), fxx.get(), xx.get(), prec);
        arb_mul(t.get(), t.get(), P.get(), prec);
        arb_mul(Px.get(), Px.get(), fx.get(), prec);
        arb_add(Px.get(), Px.get(), t.get(), prec);
        // P <- P f_x;  dx/dx <- f_x dx/dx;  dx/dmu <- f_mu + f_x dx/dmu
        arb_mul(P.get(), P.get(), fx.get(), prec);
        arb_mul(xx.get(), xx.get(), fx.get(), prec);
        arb_mul(u.get(), fx.get(), xm.get(), prec);
        arb_add(xm.get(), u.get(), fm.get(), prec);
        arb_swap(x.get(), f.get());
        double v = x.approx_double();
        if (!(v >= family.x_lo - slack && v <= family.x_hi + slack)) {
            out.problem = "the orbit left [" + std::to_string(family.x_lo) + ", " +
                          std::to_string(family.x_hi) + "] at step " + std::to_string(k + 1);
            return out;
        }
    }
    arb_sub(out.g1.get(), x.get(), x0.get(), prec);
    arb_add_ui(out.g2.get(), P.get(), 1, prec);
    arb_sub_ui(out.j11.get(), P.get(), 1, prec);
    out.j12 = xm;
    out.j21 = Px;
    out.j22 = Pm;
    out.ok = out.g1.is_finite() && out.g2.is_finite() && out.j11.is_finite() &&
             out.j12.is_finite() && out.j21.is_finite() && out.j22.is_finite();
    if (!out.ok)
        out.problem = "the orbit became non-finite";
    return out;
}

DoublingPoint approx_doubling_point(const Family& family, slong n, const ball::Ball& mu_guess,
                                    const ball::Ball& x_guess, double spacing, int max_iter,
                                    slong prec)
{
    if (!(spacing > 0))
        throw std::invalid_argument("approx_doubling_point: spacing must be positive");
    DoublingPoint out;
    const int target = static_cast<int>(target_bits_below_spacing);
    const double tol_mu = std::ldexp(spacing, -target);
    const double tol_x = std::ldexp(family.x_hi - family.x_lo, -target);
    ball::Ball x = mid_of(x_guess), mu = mid_of(mu_guess), t, det, dx, dmu;
    // Stage 1: Newton in x for f^N(x) = x at fixed mu (derivative P - 1).
    for (int it = 0; it < max_iter; ++it) {
        ++out.iterations;
        DoublingSystem s = doubling_system(family, n, x, mu, prec);
        if (!s.ok) {
            out.problem = "cycle search: " + s.problem;
            return out;
        }
        arb_div(dx.get(), s.g1.get(), s.j11.get(), prec);
        if (!dx.is_finite()) {
            out.problem = "cycle search: singular derivative";
            return out;
        }
        arb_sub(x.get(), x.get(), mid_of(dx).get(), prec);
        x = mid_of(x);
        if (std::fabs(dx.approx_double()) < std::ldexp(family.x_hi - family.x_lo, -40))
            break;
    }
    // Stage 2: Newton on the 2x2 system; Cramer's rule on midpoints.
    for (int it = 0; it < max_iter; ++it) {
        ++out.iterations;
        DoublingSystem s = doubling_system(family, n, x, mu, prec);
        if (!s.ok) {
            out.problem = s.problem;
            return out;
        }
        arb_mul(det.get(), s.j11.get(), s.j22.get(), prec);
        arb_submul(det.get(), s.j12.get(), s.j21.get(), prec);
        if (arb_contains_zero(det.get())) {
            out.problem = "singular Jacobian of the doubling system";
            return out;
        }
        // dx = (g1 j22 - g2 j12)/det, dmu = (j11 g2 - j21 g1)/det
        arb_mul(dx.get(), s.g1.get(), s.j22.get(), prec);
        arb_submul(dx.get(), s.g2.get(), s.j12.get(), prec);
        arb_div(dx.get(), dx.get(), det.get(), prec);
        arb_mul(dmu.get(), s.j11.get(), s.g2.get(), prec);
        arb_submul(dmu.get(), s.j21.get(), s.g1.get(), prec);
        arb_div(dmu.get(), dmu.get(), det.get(), prec);
        if (dmu.radius_upper() > tol_mu) {
            out.problem = "precision: rounding noise in the Newton step is above the target at " +
                          std::to_string(prec) + " bits";
            return out;
        }
        arb_sub(x.get(), x.get(), mid_of(dx).get(), prec);
        arb_sub(mu.get(), mu.get(), mid_of(dmu).get(), prec);
        x = mid_of(x);
        mu = mid_of(mu);
        out.last_dx = std::fabs(dx.approx_double()) + dx.radius_upper();
        out.last_dmu = std::fabs(dmu.approx_double()) + dmu.radius_upper();
        if (std::fabs(dmu.approx_double()) <= tol_mu && std::fabs(dx.approx_double()) <= tol_x) {
            out.ok = true;
            out.mu = mu;
            out.x = x;
            return out;
        }
    }
    out.problem = "Newton for the doubling point did not converge in " + std::to_string(max_iter) +
                  " steps";
    return out;
}

DoublingCertificate certify_doubling_point(const Family& family, slong n, const ball::Ball& x,
                                           const ball::Ball& mu, const ball::Ball& rx,
                                           const ball::Ball& rmu, slong prec)
{
    if (!arb_is_exact(x.get()) || !arb_is_exact(mu.get()))
        throw std::invalid_argument("certify_doubling_point: the centre must be exact");
    DoublingCertificate cert;
    cert.prec = prec;
    arb_indeterminate(cert.mu.get());
    arb_indeterminate(cert.x.get());
    DoublingSystem at_m = doubling_system(family, n, x, mu, prec);
    if (!at_m.ok) {
        cert.problem = at_m.problem;
        return cert;
    }
    // The box X = [x +/- rx] x [mu +/- rmu] and X - m.
    ball::Ball Xx = x, Xm = mu, dx, dm;
    mag_t r;
    mag_init(r);
    arb_get_mag(r, rx.get());
    mag_set(arb_radref(Xx.get()), r);
    mag_set(arb_radref(dx.get()), r);
    arb_get_mag(r, rmu.get());
    mag_set(arb_radref(Xm.get()), r);
    mag_set(arb_radref(dm.get()), r);
    mag_clear(r);
    DoublingSystem at_X = doubling_system(family, n, Xx, Xm, prec);
    if (!at_X.ok) {
        cert.problem = "box: " + at_X.problem;
        return cert;
    }
    // Y = inverse of the midpoint Jacobian at m, rounded to exact numbers.
    double a = at_m.j11.approx_double(), b = at_m.j12.approx_double();
    double c = at_m.j21.approx_double(), d = at_m.j22.approx_double();
    double det = a * d - b * c;
    if (!std::isfinite(det) || det == 0) {
        cert.problem = "singular Jacobian at the centre";
        return cert;
    }
    // (doubles suffice: any Y is allowed by the theorem; the scale is set by the Jacobian)
    ball::Ball y11(d / det), y12(-b / det), y21(-c / det), y22(a / det);
    // K = m - Y G(m) + (I - Y J(X)) (X - m)
    auto lin = [&](const ball::Ball& p, const ball::Ball& q, const ball::Ball& u,
                   const ball::Ball& v) { // p u + q v
        ball::Ball s, t;
        arb_mul(s.get(), p.get(), u.get(), prec);
        arb_mul(t.get(), q.get(), v.get(), prec);
        arb_add(s.get(), s.get(), t.get(), prec);
        return s;
    };
    ball::Ball yg1 = lin(y11, y12, at_m.g1, at_m.g2);
    ball::Ball yg2 = lin(y21, y22, at_m.g1, at_m.g2);
    // M = I - Y J(X)
    ball::Ball m11 = lin(y11, y12, at_X.j11, at_X.j21), m12 = lin(y11, y12, at_X.j12, at_X.j22);
    ball::Ball m21 = lin(y21, y22, at_X.j11, at_X.j21), m22 = lin(y21, y22, at_X.j12, at_X.j22);
    arb_sub_ui(m11.get(), m11.get(), 1, prec);
    arb_neg(m11.get(), m11.get());
    arb_neg(m12.get(), m12.get());
    arb_neg(m21.get(), m21.get());
    arb_sub_ui(m22.get(), m22.get(), 1, prec);
    arb_neg(m22.get(), m22.get());
    ball::Ball K1 = lin(m11, m12, dx, dm), K2 = lin(m21, m22, dx, dm);
    arb_sub(K1.get(), K1.get(), yg1.get(), prec);
    arb_add(K1.get(), K1.get(), x.get(), prec);
    arb_sub(K2.get(), K2.get(), yg2.get(), prec);
    arb_add(K2.get(), K2.get(), mu.get(), prec);
    cert.box_x = Xx;
    cert.box_mu = Xm;
    cert.krawczyk_x = K1;
    cert.krawczyk_mu = K2;
    if (!arb_contains_interior(Xx.get(), K1.get()) || !arb_contains_interior(Xm.get(), K2.get())) {
        cert.problem = "Krawczyk test failed: K(X) is not inside X";
        return cert;
    }
    cert.status = Status::certified;
    cert.x = K1;
    cert.mu = K2;
    return cert;
}

} // namespace renorm::cascade
