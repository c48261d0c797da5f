#include <renorm/doubling/doubling.hpp>

#include <cmath>
#include <stdexcept>

namespace renorm::doubling {

using namespace renorm::series;

Ball order_ball(const std::string& order, slong prec)
{
    auto z = ball::from_string(order, prec);
    if (!z)
        throw std::invalid_argument("order z must be a finite number, got '" + order + "'");
    Ball one(slong{1});
    if (!arb_gt(z->get(), one.get()))
        throw std::invalid_argument("order z must be greater than 1, got " + order);
    return *z;
}

Ball Problem::order_ball(slong prec) const
{
    return doubling::order_ball(order, prec);
}

InnerMaps inner_maps(const BallPoly& g, const Problem& problem, slong n, slong prec)
{
    InnerMaps im;
    const Disc& d = problem.disc;
    Ball z = problem.order_ball(prec);
    Ball c(d.centre), r(d.radius), one(slong{1});
    // a = -1 / G(1), with G(1) = G~(s1), s1 = (1 - c)/r.
    Ball s1 = d.to_s(one, prec);
    Ball g1 = evaluate(g, s1, prec);
    if (!arb_is_negative(g1.get())) {
        arb_indeterminate(im.a.get());
        return im;
    }
    arb_inv(im.a.get(), g1.get(), prec);
    arb_neg(im.a.get(), im.a.get());
    // u = y a^-z: (u - c)/r = (c a^-z - c)/r + a^-z s.
    Ball amz;
    arb_pow(amz.get(), im.a.get(), z.get(), prec);
    arb_inv(amz.get(), amz.get(), prec);
    arb_mul(im.b0.get(), c.get(), amz.get(), prec);
    arb_sub(im.b0.get(), im.b0.get(), c.get(), prec);
    arb_div(im.b0.get(), im.b0.get(), r.get(), prec);
    im.b1 = amz;
    im.w = compose_affine(g, im.b0, im.b1, n, prec);
    Ball w0 = im.w.coeff(0);
    if (!arb_is_positive(w0.get()))
        return im;
    BallPoly v = pow_series(im.w, z, n, prec);
    // (v - c)/r
    if (v.length() == 0)
        arb_poly_fit_length(v.get(), 1);
    arb_poly_set_coeff_arb(v.get(), 0, [&] {
        Ball t = v.coeff(0);
        arb_sub(t.get(), t.get(), c.get(), prec);
        return t;
    }().get());
    arb_poly_scalar_div(v.get(), v.get(), r.get(), prec);
    im.sigma_v = std::move(v);
    im.ok = true;
    return im;
}

TImage apply_T(const BallPoly& g, const Problem& problem, slong n, slong prec)
{
    if (prec < 2 || n < 1)
        throw std::invalid_argument("apply_T: need prec >= 2 and n >= 1");
    TImage out;
    InnerMaps im = inner_maps(g, problem, n, prec);
    out.a = im.a;
    if (!im.ok) {
        arb_indeterminate(out.a.get());
        return out;
    }
    out.t = compose(g, im.sigma_v, n, prec);
    Ball mina;
    arb_neg(mina.get(), im.a.get());
    arb_poly_scalar_mul(out.t.get(), out.t.get(), mina.get(), prec);
    return out;
}

Linearization::Linearization(const BallPoly& g, const Problem& problem, slong n, slong prec)
    : m_n(n)
{
    if (prec < 2 || n < 1)
        throw std::invalid_argument("Linearization: need prec >= 2 and n >= 1");
    const Disc& d = problem.disc;
    // One more coefficient than kept: the derivative of G(v) below needs it.
    InnerMaps im = inner_maps(g, problem, n + 1, prec);
    if (!im.ok)
        throw std::invalid_argument("Linearization: T is undefined at this G (G(1) >= 0 or G(u) <= 0)");
    Ball z = problem.order_ball(prec);
    Ball c(d.centre), r(d.radius), one(slong{1}), zero;
    m_a = im.a;
    m_b0 = im.b0;
    m_b1 = im.b1;
    m_sigma_v = truncated(im.sigma_v, n);
    m_s1 = d.to_s(one, prec);
    m_s0 = d.to_s(zero, prec);

    // G' in y: dG/dy = (1/r) dG~/ds.
    BallPoly dg = derivative(g, prec);
    arb_poly_scalar_div(dg.get(), dg.get(), r.get(), prec);
    BallPoly dg_u = compose_affine(dg, m_b0, m_b1, n, prec);         // G'(u)
    BallPoly g_v1 = compose(g, im.sigma_v, n + 1, prec);             // G(v), n + 1 terms
    BallPoly g_v = truncated(g_v1, n);

    // m = -a z G'(v) G(u)^(z-1). Since d/ds G(v(s)) = G'(v) z G(u)^(z-1) G'(u) du/ds and
    // du/ds = a^-z r = b1 r, this is m = -a (d/ds G(v)) / (b1 r G'(u)): one composition
    // (G(v), which T needs anyway) instead of two (G(v) and G'(v)), and no power G(u)^(z-1).
    // The identity holds coefficient by coefficient for the truncated series below degree n
    // because G(v) is kept to n + 1 terms. G'(u) does not vanish where T is defined (G is
    // decreasing near 0); when its constant term is not certainly nonzero, the direct form is
    // used instead.
    Ball du0 = dg_u.coeff(0);
    if (arb_is_nonzero(du0.get())) {
        BallPoly dgv = derivative(g_v1, prec);
        BallPoly den;
        Ball b1r;
        arb_mul(b1r.get(), m_b1.get(), r.get(), prec);
        arb_poly_scalar_mul(den.get(), dg_u.get(), b1r.get(), prec);
        arb_poly_div_series(m_mult.get(), dgv.get(), den.get(), n, prec);
        Ball mina;
        arb_neg(mina.get(), m_a.get());
        arb_poly_scalar_mul(m_mult.get(), m_mult.get(), mina.get(), prec);
    } else {
        BallPoly dg_v = compose(dg, m_sigma_v, n, prec);             // G'(v)
        Ball zm1;
        arb_sub_ui(zm1.get(), z.get(), 1, prec);
        BallPoly w_zm1 = pow_series(truncated(im.w, n), zm1, n, prec); // G(u)^(z-1)
        m_mult = mullow(dg_v, w_zm1, n, prec);
        Ball factor;
        arb_mul(factor.get(), m_a.get(), z.get(), prec);
        arb_neg(factor.get(), factor.get());
        arb_poly_scalar_mul(m_mult.get(), m_mult.get(), factor.get(), prec);
    }

    // u(s) = a^-z (c + r s)
    BallPoly u;
    {
        Ball u0, u1;
        arb_mul(u0.get(), m_b1.get(), c.get(), prec);
        arb_mul(u1.get(), m_b1.get(), r.get(), prec);
        u.set_coeff(0, u0);
        u.set_coeff(1, u1);
    }
    // q = -a^2 G(v) - z a m u G'(u)
    BallPoly mu = mullow(m_mult, u, n, prec);
    BallPoly mudg = mullow(mu, dg_u, n, prec);
    Ball za;
    arb_mul(za.get(), z.get(), m_a.get(), prec);
    arb_poly_scalar_mul(mudg.get(), mudg.get(), za.get(), prec);
    Ball a2;
    arb_sqr(a2.get(), m_a.get(), prec);
    arb_poly_scalar_mul(g_v.get(), g_v.get(), a2.get(), prec);
    arb_poly_add(m_q.get(), g_v.get(), mudg.get(), prec);
    arb_poly_neg(m_q.get(), m_q.get());
}

BallPoly Linearization::apply(const BallPoly& h_in, slong prec) const
{
    // DT h = h(1) q - a h(v) + m h(u)
    // The series enter the products rounded to prec: asked below the precision they were built
    // at (a relaxed Krylov product), Arb's products of longer coefficients fall back to the
    // classical O(n^2) algorithm (n = 1194: 0.25 s at 600 bits against 0.003 s rounded, and
    // 0.016 s at the full 2493), so an unrounded product got slower as prec fell.
    BallPoly h, sigma_v, mult;
    arb_poly_set_round(h.get(), h_in.get(), prec);
    arb_poly_set_round(sigma_v.get(), m_sigma_v.get(), prec);
    arb_poly_set_round(mult.get(), m_mult.get(), prec);
    Ball h1 = evaluate(h, m_s1, prec);
    BallPoly out;
    arb_poly_scalar_mul(out.get(), m_q.get(), h1.get(), prec);
    BallPoly hv = compose(h, sigma_v, m_n, prec);
    arb_poly_scalar_mul(hv.get(), hv.get(), m_a.get(), prec);
    arb_poly_sub(out.get(), out.get(), hv.get(), prec);
    BallPoly hu = compose_affine(h, m_b0, m_b1, m_n, prec);
    BallPoly mhu = mullow(mult, hu, m_n, prec);
    arb_poly_add(out.get(), out.get(), mhu.get(), prec);
    arb_poly_truncate(out.get(), m_n);
    return out;
}

BallMat Linearization::matrix(slong prec) const
{
    const slong n = m_n;
    BallMat mat(n, n);
    BallPoly pv, pu; // sigma_v^k and sigma_u^k, truncated at n
    arb_poly_one(pv.get());
    arb_poly_one(pu.get());
    BallPoly lin_u;
    lin_u.set_coeff(0, m_b0);
    lin_u.set_coeff(1, m_b1);
    Ball s1k(slong{1});
    for (slong k = 0; k < n; ++k) {
        if (k > 0) {
            pv = mullow(pv, m_sigma_v, n, prec);
            pu = mullow(pu, lin_u, n, prec);
            arb_mul(s1k.get(), s1k.get(), m_s1.get(), prec);
        }
        BallPoly mpu = mullow(m_mult, pu, n, prec);
        for (slong i = 0; i < n; ++i) {
            arb_ptr e = mat.entry(i, k);
            Ball t;
            arb_poly_get_coeff_arb(e, m_q.get(), i);
            arb_mul(e, e, s1k.get(), prec);
            arb_poly_get_coeff_arb(t.get(), pv.get(), i);
            arb_submul(e, t.get(), m_a.get(), prec);
            arb_poly_get_coeff_arb(t.get(), mpu.get(), i);
            arb_add(e, e, t.get(), prec);
        }
    }
    return mat;
}

Eigen::MatrixXd Linearization::approx_matrix(slong m, slong prec) const
{
    if (m > m_n)
        throw std::invalid_argument("approx_matrix: block larger than the truncation");
    Linearization small = *this;
    small.m_n = m;
    BallMat mat = small.matrix(prec);
    Eigen::MatrixXd out(m, m);
    for (slong i = 0; i < m; ++i)
        for (slong j = 0; j < m; ++j)
            out(i, j) = arf_get_d(arb_midref(mat.entry(i, j)), ARF_RND_NEAR);
    return out;
}

} // namespace renorm::doubling
