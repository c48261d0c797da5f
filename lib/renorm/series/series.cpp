#include <renorm/series/series.hpp>

#include <renorm/series/compose_graded.hpp>

#include <cmath>
#include <stdexcept>
#include <vector>

namespace renorm::series {

namespace {
void check_prec(slong prec)
{
    if (prec < 2)
        throw std::invalid_argument("series: prec must be >= 2");
}
void check_n(slong n)
{
    if (n < 0)
        throw std::invalid_argument("series: the truncation length must be >= 0");
}
} // namespace

Ball Disc::to_s(const Ball& y, slong prec) const
{
    Ball s, c(centre), r(radius); // doubles convert exactly
    arb_sub(s.get(), y.get(), c.get(), prec);
    arb_div(s.get(), s.get(), r.get(), prec);
    return s;
}

BallPoly truncated(const BallPoly& f, slong n)
{
    check_n(n);
    BallPoly out = f;
    arb_poly_truncate(out.get(), n);
    return out;
}

BallPoly mullow(const BallPoly& f, const BallPoly& g, slong n, slong prec)
{
    check_prec(prec);
    check_n(n);
    BallPoly out;
    arb_poly_mullow(out.get(), f.get(), g.get(), n, prec);
    return out;
}

BallPoly compose_affine(const BallPoly& f, const Ball& b0, const Ball& b1, slong n, slong prec)
{
    check_prec(prec);
    check_n(n);
    // f(b0 + b1 s) = sum_j [sum_k f_k C(k, j) b0^(k-j)] b1^j s^j: a Taylor shift by b0
    // followed by the scaling s -> b1 s.
    BallPoly shifted;
    arb_poly_taylor_shift(shifted.get(), f.get(), b0.get(), prec);
    arb_poly_truncate(shifted.get(), n);
    Ball power(slong{1});
    const slong len = shifted.length();
    for (slong j = 1; j < len; ++j) {
        arb_mul(power.get(), power.get(), b1.get(), prec);
        arb_mul(shifted.get()->coeffs + j, shifted.get()->coeffs + j, power.get(), prec);
    }
    return shifted;
}

slong compose_graded_cutoff = 16;

BallPoly compose(const BallPoly& f, const BallPoly& h, slong n, slong prec)
{
    return n >= compose_graded_cutoff ? compose_graded(f, h, n, prec)
                                      : compose_arb(f, h, n, prec);
}

BallPoly compose_arb(const BallPoly& f, const BallPoly& h, slong n, slong prec)
{
    check_prec(prec);
    check_n(n);
    // f(h) = f(h0 + (h - h0)): shift f by h0, then compose with a series that has no
    // constant term (the form Arb's series composition takes).
    Ball h0 = h.coeff(0);
    BallPoly shifted;
    arb_poly_taylor_shift(shifted.get(), f.get(), h0.get(), prec);
    BallPoly inner = h;
    if (inner.length() > 0)
        arb_zero(inner.get()->coeffs);
    arb_poly_truncate(inner.get(), n);
    _arb_poly_normalise(inner.get());
    BallPoly out;
    arb_poly_compose_series(out.get(), shifted.get(), inner.get(), n, prec);
    return out;
}

BallPoly pow_series(const BallPoly& w, const Ball& p, slong n, slong prec)
{
    check_prec(prec);
    check_n(n);
    Ball w0 = w.coeff(0);
    if (!arb_is_positive(w0.get()))
        throw std::invalid_argument("pow_series: the constant term must be certainly positive");
    BallPoly out;
    arb_poly_pow_arb_series(out.get(), w.get(), p.get(), n, prec);
    return out;
}

BallPoly derivative(const BallPoly& f, slong prec)
{
    check_prec(prec);
    BallPoly out;
    arb_poly_derivative(out.get(), f.get(), prec);
    return out;
}

Ball evaluate(const BallPoly& f, const Ball& s, slong prec)
{
    check_prec(prec);
    Ball out;
    arb_poly_evaluate(out.get(), f.get(), s.get(), prec);
    return out;
}

Ball norm_l1(const BallPoly& f, slong prec)
{
    check_prec(prec);
    // Sum of upper bounds of |f_k|, accumulated in mag_t arithmetic (rounded upward).
    mag_t sum, t;
    mag_init(sum);
    mag_init(t);
    for (slong k = 0; k < f.length(); ++k) {
        arb_get_mag(t, f.get()->coeffs + k);
        mag_add(sum, sum, t);
    }
    Ball out;
    arf_set_mag(arb_midref(out.get()), sum);
    mag_clear(sum);
    mag_clear(t);
    return out;
}

BallPoly approx_midpoints(const BallPoly& f)
{
    BallPoly out = f;
    for (slong k = 0; k < out.length(); ++k)
        mag_zero(arb_radref(out.get()->coeffs + k));
    return out;
}

BallPoly from_doubles(const double* c, slong n)
{
    check_n(n);
    BallPoly out;
    arb_poly_fit_length(out.get(), n);
    for (slong k = 0; k < n; ++k)
        arb_set_d(out.get()->coeffs + k, c[k]);
    _arb_poly_set_length(out.get(), n);
    _arb_poly_normalise(out.get());
    return out;
}

double approx_decay_rate(const BallPoly& f)
{
    const slong n = f.length();
    std::vector<double> ks, ls;
    for (slong k = n / 2; k < n; ++k) {
        const arf_struct* m = arb_midref(f.get()->coeffs + k);
        if (arf_is_zero(m))
            continue;
        // log10 |f_k| without underflow: mantissa and exponent separately.
        fmpz_t e;
        fmpz_init(e);
        arf_t mant;
        arf_init(mant);
        arf_frexp(mant, e, m);
        double l = std::log10(std::fabs(arf_get_d(mant, ARF_RND_NEAR))) +
                   static_cast<double>(fmpz_get_si(e)) * 0.30102999566398120;
        fmpz_clear(e);
        arf_clear(mant);
        ks.push_back(static_cast<double>(k));
        ls.push_back(l);
    }
    if (ks.size() < 3)
        return 0.0;
    double mk = 0, ml = 0;
    for (size_t i = 0; i < ks.size(); ++i) {
        mk += ks[i];
        ml += ls[i];
    }
    mk /= static_cast<double>(ks.size());
    ml /= static_cast<double>(ks.size());
    double sxy = 0, sxx = 0;
    for (size_t i = 0; i < ks.size(); ++i) {
        sxy += (ks[i] - mk) * (ls[i] - ml);
        sxx += (ks[i] - mk) * (ks[i] - mk);
    }
    return -sxy / sxx;
}

} // namespace renorm::series
