#include <renorm/certify/detail/models.hpp>

namespace renorm::certify::detail {

using namespace renorm::series;

namespace {
bool lt_one(const Bound& r) { return mag_cmp_2exp_si(r.get(), 0) < 0; }

Models fail(Models m, const std::string& why)
{
    m.ok = false;
    m.failure = why;
    return m;
}
} // namespace

Models compute_models(const doubling::Problem& problem, const BallPoly& g0, const Bound& rho,
                      slong n, bool with_derivative, Mutation mutation, slong prec)
{
    Models md;
    const series::Disc& d = problem.disc;
    Ball z = problem.order_ball(prec);
    Ball c(d.centre), r(d.radius), one(slong{1}), zero;
    // G0 rounded to the working precision (an enclosure; keeps low-precision passes cheap).
    md.g = tm_round(tm_from_poly(g0, n, prec), prec);
    md.g.eps = md.g.eps + rho;

    // s at y = 1 and y = 0; evaluation at s needs |s| <= 1.
    md.s1 = d.to_s(one, prec);
    md.s0 = d.to_s(zero, prec);
    Ball g1 = tm_evaluate(md.g, md.s1, prec);
    if (!arb_is_finite(g1.get()))
        return fail(md, "|s(1)| <= 1 (y = 1 inside the disc)");
    if (!arb_is_negative(g1.get()))
        return fail(md, "G(1) < 0 for every G in the ball");
    arb_inv(md.a.get(), g1.get(), prec);
    arb_neg(md.a.get(), md.a.get());

    // sigma_u = (u - c)/r = (c a^-z - c)/r + a^-z s.
    Ball amz;
    arb_pow(amz.get(), md.a.get(), z.get(), prec);
    arb_inv(amz.get(), amz.get(), prec);
    arb_mul(md.b0.get(), c.get(), amz.get(), prec);
    arb_sub(md.b0.get(), md.b0.get(), c.get(), prec);
    arb_div(md.b0.get(), md.b0.get(), r.get(), prec);
    md.b1 = amz;
    md.r_u = Bound::abs_upper(md.b0) + Bound::abs_upper(md.b1);
    if (!lt_one(md.r_u))
        return fail(md, "||sigma_u|| < 1 (u maps the disc into itself)");

    md.w = tm_compose_affine(md.g, md.b0, md.b1, prec);
    TaylorModel v = tm_pow(md.w, z, prec);
    if (!v.is_finite())
        return fail(md, "G(u) = w0 (1 + t) with w0 > 0 and ||t|| < 1 (the power G(u)^z)");
    Ball minus_c;
    arb_neg(minus_c.get(), c.get());
    Ball inv_r;
    arb_inv(inv_r.get(), r.get(), prec);
    md.sigma_v = tm_scalar_mul(tm_add_scalar(v, minus_c, prec), inv_r, prec);
    md.r_v = tm_norm(md.sigma_v);
    if (!lt_one(md.r_v))
        return fail(md, "||sigma_v|| < 1 (v maps the disc into itself)");

    md.g_v = tm_compose(md.g, md.sigma_v, prec);
    Ball mina;
    arb_neg(mina.get(), md.a.get());
    // T(G) = -a G(v)
    md.t = tm_scalar_mul(md.g_v, mutation == Mutation::flip_sign_T ? md.a : mina, prec);
    if (!md.t.is_finite())
        return fail(md, "T(G) finite");

    if (with_derivative) {
        // G'(v) and G'(u), derivatives in y: (1/r) d/ds.
        TaylorModel dg_v = tm_scalar_mul(tm_compose_derivative(md.g, md.sigma_v, prec), inv_r, prec);
        TaylorModel dg_u =
            tm_scalar_mul(tm_compose_derivative_affine(md.g, md.b0, md.b1, prec), inv_r, prec);
        Ball zm1;
        arb_sub_ui(zm1.get(), z.get(), 1, prec);
        TaylorModel w_zm1 = tm_pow(md.w, zm1, prec);
        // m = -a z G'(v) G(u)^(z-1)
        Ball factor;
        arb_mul(factor.get(), md.a.get(), z.get(), prec);
        if (mutation != Mutation::flip_sign_DT)
            arb_neg(factor.get(), factor.get());
        md.m = tm_scalar_mul(tm_mul(dg_v, w_zm1, prec), factor, prec);
        // u(s) = a^-z (c + r s)
        BallPoly u;
        {
            Ball u0, u1;
            arb_mul(u0.get(), amz.get(), c.get(), prec);
            arb_mul(u1.get(), amz.get(), r.get(), prec);
            u.set_coeff(0, u0);
            u.set_coeff(1, u1);
        }
        TaylorModel um = tm_from_poly(u, n, prec);
        // q = -a^2 G(v) - z a m u G'(u)
        Ball a2, za;
        arb_sqr(a2.get(), md.a.get(), prec);
        arb_neg(a2.get(), a2.get());
        arb_mul(za.get(), z.get(), md.a.get(), prec);
        arb_neg(za.get(), za.get());
        TaylorModel mudg = tm_mul(tm_mul(md.m, um, prec), dg_u, prec);
        md.q = tm_add(tm_scalar_mul(md.g_v, a2, prec), tm_scalar_mul(mudg, za, prec), prec);
        if (!md.m.is_finite() || !md.q.is_finite())
            return fail(md, "the derivative factors m and q finite (G(u)^(z-1), G' on the disc)");
        md.has_derivative = true;
    }
    md.ok = true;
    return md;
}

TaylorModel apply_derivative(const Models& md, const BallPoly& h, slong prec)
{
    const slong n = md.g.n;
    TaylorModel hm = tm_from_poly(h, n, prec);
    Ball h1 = tm_evaluate(hm, md.s1, prec);
    TaylorModel out = tm_scalar_mul(md.q, h1, prec);
    TaylorModel hv = tm_compose(hm, md.sigma_v, prec);
    out = tm_sub(out, tm_scalar_mul(hv, md.a, prec), prec);
    TaylorModel hu = tm_compose_affine(hm, md.b0, md.b1, prec);
    out = tm_add(out, tm_mul(md.m, hu, prec), prec);
    return out;
}

Columns derivative_columns(const Models& md, slong n, slong prec)
{
    Columns cols;
    cols.matrix = BallMat(n, n);
    cols.eps.resize(static_cast<size_t>(n));
    TaylorModel pv = tm_constant(Ball(slong{1}), n); // sigma_v^k
    BallPoly pu;                                     // sigma_u^k (degree k < n: exact)
    arb_poly_one(pu.get());
    BallPoly lin_u;
    lin_u.set_coeff(0, md.b0);
    lin_u.set_coeff(1, md.b1);
    Ball s1k(slong{1});
    Ball mina;
    arb_neg(mina.get(), md.a.get());
    for (slong k = 0; k < n; ++k) {
        if (k > 0) {
            pv = tm_mul(pv, md.sigma_v, prec);
            BallPoly next;
            arb_poly_mul(next.get(), pu.get(), lin_u.get(), prec);
            pu = next;
            arb_mul(s1k.get(), s1k.get(), md.s1.get(), prec);
        }
        // DT s^k = s1^k q - a sigma_v^k + m sigma_u^k
        TaylorModel col = tm_scalar_mul(md.q, s1k, prec);
        col = tm_add(col, tm_scalar_mul(pv, mina, prec), prec);
        col = tm_add(col, tm_mul(md.m, tm_from_poly(pu, n, prec), prec), prec);
        for (slong i = 0; i < n; ++i)
            arb_poly_get_coeff_arb(cols.matrix.entry(i, k), col.p.get(), i);
        cols.eps[static_cast<size_t>(k)] = col.eps;
    }
    // sup_{k >= n}: each of the three terms decreases in k since |s1|, R_v, R_u < 1.
    Bound s1n(1.0), rvn(1.0), run(1.0);
    Bound as1 = Bound::abs_upper(md.s1);
    for (slong k = 0; k < n; ++k) {
        s1n = s1n * as1;
        rvn = rvn * md.r_v;
        run = run * md.r_u;
    }
    cols.beta = s1n * tm_norm(md.q) + Bound::abs_upper(md.a) * rvn + tm_norm(md.m) * run;
    return cols;
}

Bound column_norm(const BallMat& a, slong k)
{
    Bound s;
    mag_t t;
    mag_init(t);
    for (slong i = 0; i < a.rows(); ++i) {
        arb_get_mag(t, a.entry(i, k));
        mag_add(s.get(), s.get(), t);
    }
    mag_clear(t);
    return s;
}

Bound matrix_norm(const BallMat& a)
{
    Bound best;
    for (slong k = 0; k < a.cols(); ++k)
        best = series::max(best, column_norm(a, k));
    return best;
}

} // namespace renorm::certify::detail
