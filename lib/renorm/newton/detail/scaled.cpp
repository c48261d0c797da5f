#include <renorm/newton/detail/scaled.hpp>

#include <climits>
#include <cmath>
#include <limits>

namespace renorm::newton::detail {

slong max_exponent(arb_srcptr v, slong n)
{
    slong best = LONG_MIN / 2;
    for (slong k = 0; k < n; ++k) {
        const arf_struct* m = arb_midref(v + k);
        if (arf_is_zero(m) || !arf_is_finite(m))
            continue;
        slong e = fmpz_get_si(ARF_EXPREF(m)); // |m| < 2^e
        if (e > best)
            best = e;
    }
    return best;
}

Eigen::VectorXd to_scaled_doubles(arb_srcptr v, slong n, slong e)
{
    Eigen::VectorXd x(n);
    arf_t t;
    arf_init(t);
    for (slong k = 0; k < n; ++k) {
        arf_mul_2exp_si(t, arb_midref(v + k), -e);
        x(k) = arf_get_d(t, ARF_RND_NEAR); // tiny entries flush to zero: harmless here
    }
    arf_clear(t);
    return x;
}

void from_scaled_doubles(arb_ptr out, const Eigen::VectorXd& x, slong e)
{
    for (Eigen::Index k = 0; k < x.size(); ++k) {
        arb_set_d(out + k, x(k));
        arb_mul_2exp_si(out + k, out + k, e);
    }
}

double log10_upper(const ball::Ball& x)
{
    mag_t m;
    mag_init(m);
    arb_get_mag(m, x.get());
    double out;
    if (mag_is_zero(m)) {
        out = -std::numeric_limits<double>::infinity();
    } else if (mag_is_inf(m)) {
        out = std::numeric_limits<double>::infinity();
    } else {
        // mag = man * 2^(exp - MAG_BITS)
        double man = static_cast<double>(MAG_MAN(m));
        slong ex = fmpz_get_si(MAG_EXPREF(m));
        out = std::log10(man) + (static_cast<double>(ex) - MAG_BITS) * 0.30102999566398120;
    }
    mag_clear(m);
    return out;
}

} // namespace renorm::newton::detail
