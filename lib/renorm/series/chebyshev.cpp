#include <renorm/series/chebyshev.hpp>

#include <stdexcept>

namespace renorm::series {

void chebyshev_evaluate(Ball& f, Ball* df, const BallPoly& c, const Ball& y, slong prec)
{
    if (prec < 2)
        throw std::invalid_argument("chebyshev_evaluate: prec must be >= 2");
    // x = 2y - 1. Clenshaw: b_k = c_k + 2x b_{k+1} - b_{k+2}, f = c_0 + x b_1 - b_2.
    // For the derivative, differentiate the recurrence in x: d_k = 2 b_{k+1} + 2x d_{k+1} - d_{k+2},
    // f' = b_1 + x d_1 - d_2, and df/dy = 2 df/dx.
    const slong n = c.length();
    Ball x, twox;
    arb_mul_2exp_si(x.get(), y.get(), 1);
    arb_sub_ui(x.get(), x.get(), 1, prec);
    arb_mul_2exp_si(twox.get(), x.get(), 1);
    Ball b1, b2, d1, d2, t;
    for (slong k = n - 1; k >= 1; --k) {
        // derivative first (it uses the old b1)
        if (df) {
            arb_mul(t.get(), twox.get(), d1.get(), prec);
            arb_sub(t.get(), t.get(), d2.get(), prec);
            arb_addmul_si(t.get(), b1.get(), 2, prec);
            d2 = d1;
            d1 = t;
        }
        arb_mul(t.get(), twox.get(), b1.get(), prec);
        arb_sub(t.get(), t.get(), b2.get(), prec);
        arb_add(t.get(), t.get(), c.get()->coeffs + k, prec);
        b2 = b1;
        b1 = t;
    }
    Ball c0 = c.coeff(0);
    arb_mul(t.get(), x.get(), b1.get(), prec);
    arb_sub(t.get(), t.get(), b2.get(), prec);
    arb_add(f.get(), t.get(), c0.get(), prec);
    if (df) {
        arb_mul(t.get(), x.get(), d1.get(), prec);
        arb_sub(t.get(), t.get(), d2.get(), prec);
        arb_add(t.get(), t.get(), b1.get(), prec);
        arb_mul_2exp_si(df->get(), t.get(), 1);
    }
}

BallVec chebyshev_points(slong n, slong prec)
{
    if (n < 2)
        throw std::invalid_argument("chebyshev_points: n must be >= 2");
    BallVec y(n);
    for (slong j = 0; j < n; ++j) {
        // cos(pi j/(n-1)) = cos_pi(j/(n-1))
        fmpq_t q;
        fmpq_init(q);
        fmpq_set_si(q, j, static_cast<ulong>(n - 1));
        arb_cos_pi_fmpq(y[j], q, prec);
        fmpq_clear(q);
        arb_add_ui(y[j], y[j], 1, prec);
        arb_mul_2exp_si(y[j], y[j], -1);
    }
    return y;
}

ball::BallMat chebyshev_matrix(const BallVec& y, slong n, slong prec)
{
    ball::BallMat m(y.size(), n);
    Ball x;
    for (slong j = 0; j < y.size(); ++j) {
        arb_mul_2exp_si(x.get(), y[j], 1);
        arb_sub_ui(x.get(), x.get(), 1, prec);
        if (n > 0)
            arb_one(m.entry(j, 0));
        if (n > 1)
            arb_set(m.entry(j, 1), x.get());
        for (slong k = 2; k < n; ++k) {
            // T_k = 2x T_{k-1} - T_{k-2}
            arb_mul(m.entry(j, k), x.get(), m.entry(j, k - 1), prec);
            arb_mul_2exp_si(m.entry(j, k), m.entry(j, k), 1);
            arb_sub(m.entry(j, k), m.entry(j, k), m.entry(j, k - 2), prec);
        }
    }
    return m;
}

BallPoly chebyshev_interpolate(const BallVec& values, slong prec)
{
    // For the Lobatto points x_j = cos(pi j/(n-1)): c_k = (2/(n-1)) sum_j'' f_j cos(pi j k/(n-1)),
    // with the first and last terms of the sum halved, and c_0, c_{n-1} halved again. The
    // cosines take only 2(n-1) distinct values, computed once.
    const slong n = values.size();
    if (n < 2)
        throw std::invalid_argument("chebyshev_interpolate: need at least 2 values");
    const slong period = 2 * (n - 1);
    BallVec cosines(period);
    fmpq_t q;
    fmpq_init(q);
    for (slong m = 0; m < period; ++m) {
        fmpq_set_si(q, m, static_cast<ulong>(n - 1));
        arb_cos_pi_fmpq(cosines[m], q, prec);
    }
    fmpq_clear(q);
    BallVec half(n);
    for (slong j = 0; j < n; ++j) {
        arb_set(half[j], values[j]);
        if (j == 0 || j == n - 1)
            arb_mul_2exp_si(half[j], half[j], -1);
    }
    BallPoly c;
    arb_poly_fit_length(c.get(), n);
    Ball s;
    for (slong k = 0; k < n; ++k) {
        arb_zero(s.get());
        for (slong j = 0; j < n; ++j)
            arb_addmul(s.get(), half[j], cosines[(j * k) % period], prec);
        arb_mul_2exp_si(s.get(), s.get(), 1);
        arb_div_ui(s.get(), s.get(), static_cast<ulong>(n - 1), prec);
        if (k == 0 || k == n - 1)
            arb_mul_2exp_si(s.get(), s.get(), -1);
        arb_set(c.get()->coeffs + k, s.get());
    }
    _arb_poly_set_length(c.get(), n);
    _arb_poly_normalise(c.get());
    return c;
}

} // namespace renorm::series
