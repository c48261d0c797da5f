#pragma once
/// \file
/// Taylor models: rigorous arithmetic on functions analytic on the closed unit s-disc.
///
/// A TaylorModel (p, n, eps) stands for the SET of functions f = p + E with p a polynomial of
/// degree < n whose coefficients lie in the given balls, and E any function with
/// ||E|| = sum_k |E_k| <= eps (the l1 norm of series.hpp, which bounds |E| on |s| <= 1 and is a
/// Banach-algebra norm: ||fg|| <= ||f|| ||g||). Every operation below returns a model that
/// contains the exact result for EVERY member of its input sets: what a truncation drops is
/// moved into eps, never lost. An infinite eps means "no bound" (a hypothesis of the
/// operation failed); callers test is_finite().
///
/// The bounds used (all elementary; for Taylor models in general see Makino & Berz,
/// Int. J. Pure Appl. Math. 4 (2003)):
///   (B1) ||fg|| <= ||f|| ||g||                                  (Banach algebra)
///   (B2) ||E o h|| <= ||E||            when ||h|| <= 1          (sum |E_k| ||h||^k)
///   (B3) ||p(x + e) - p(x)|| <= ||e|| sum_k k |p_k| R^(k-1),   R >= ||x|| + ||e||
///        (from ||(x+e)^k - x^k|| <= (||x||+||e||)^k - ||x||^k <= k R^(k-1) ||e||)
///   (B4) ||E' o h|| <= ||E|| sup_{k>=1} k R^(k-1)  when ||h|| <= R < 1
///   (B5) binomial tail: for p > -1, K >= p, |t| <= tau < 1,
///        sum_{k>=K} |C(p,k)| tau^k <= |C(p,K)| tau^K / (1 - tau).

#include <renorm/ball/ball.hpp>
#include <renorm/series/series.hpp>

#include <cmath>
#include <string>

namespace renorm::series {

/// An upper bound: owning wrapper over mag_t (Arb's unsigned floating-point upper bounds;
/// every mag_* operation rounds up).
class Bound {
public:
    Bound() { mag_init(m_x); }
    explicit Bound(double d)
    {
        mag_init(m_x);
        mag_set_d(m_x, d);
    }
    Bound(const Bound& o)
    {
        mag_init(m_x);
        mag_set(m_x, o.m_x);
    }
    Bound& operator=(const Bound& o)
    {
        if (this != &o)
            mag_set(m_x, o.m_x);
        return *this;
    }
    ~Bound() { mag_clear(m_x); }
    mag_ptr get() { return m_x; }
    mag_srcptr get() const { return m_x; }
    bool is_finite() const { return mag_is_finite(m_x) != 0; }
    double approx_double() const { return mag_get_d(m_x); }
    /// The bound as an exact ball [b +/- 0].
    Ball to_ball() const
    {
        Ball b;
        arf_set_mag(arb_midref(b.get()), m_x);
        return b;
    }
    /// Decimal text with `digits` significant digits (any exponent; doubles would underflow).
    /// No guarantee (display only).
    std::string text(slong digits = 3) const
    {
        if (!is_finite())
            return "inf";
        Ball b = to_ball();
        char* s = arb_get_str(b.get(), digits, ARB_STR_NO_RADIUS);
        std::string out(s);
        flint_free(s);
        return out;
    }
    /// An approximation of log10 of the bound (-inf for 0). No guarantee (parameter choice).
    double approx_log10() const
    {
        if (mag_is_zero(m_x))
            return -HUGE_VAL;
        return mag_get_d_log2_approx(m_x) * 0.30102999566398120;
    }
    /// The radius of a ball (an upper bound, exact as stored).
    static Bound radius_of(const Ball& x)
    {
        Bound b;
        mag_set(b.m_x, arb_radref(x.get()));
        return b;
    }
    static Bound infinite()
    {
        Bound b;
        mag_inf(b.m_x);
        return b;
    }
    /// An upper bound for |x| (over the whole ball x).
    static Bound abs_upper(const Ball& x)
    {
        Bound b;
        arb_get_mag(b.m_x, x.get());
        return b;
    }

private:
    mag_t m_x;
};

inline Bound operator+(const Bound& x, const Bound& y)
{
    Bound r;
    mag_add(r.get(), x.get(), y.get());
    return r;
}
inline Bound operator*(const Bound& x, const Bound& y)
{
    Bound r;
    mag_mul(r.get(), x.get(), y.get());
    return r;
}
inline bool operator<(const Bound& x, const Bound& y) { return mag_cmp(x.get(), y.get()) < 0; }
inline Bound max(const Bound& x, const Bound& y) { return x < y ? y : x; }

/// Trailing coefficients below 2^-(prec + tm_drop_guard_bits) times the largest coefficient
/// are moved into the remainder by every operation (tunable; any value is rigorous).
extern slong tm_drop_guard_bits;

/// A Taylor model (see the file comment): p of degree < n plus any E with ||E|| <= eps.
struct TaylorModel {
    BallPoly p;
    slong n = 0;
    Bound eps;
    bool is_finite() const;
};

/// Upper bound of sum_k |p_k| over every polynomial in the balls.
Bound poly_norm(const BallPoly& p);
/// Upper bound of the norm of every member: ||p|| + eps.
Bound tm_norm(const TaylorModel& f);
/// Upper bound of sum_{k>=1} k |p_k| R^(k-1) (the derivative bound (B3)).
Bound derivative_sum(const BallPoly& p, const Bound& r, slong prec);
/// Upper bound of sup_{k>=1} k R^(k-1) for R < 1 (B4); infinite when R >= 1.
Bound sup_k_rk(const Bound& r, slong prec);

/// The model of f: coefficients of degree >= n move into eps (exactly, through their norm).
/// Encloses: {f}. Throws std::invalid_argument for n < 1.
TaylorModel tm_from_poly(const BallPoly& f, slong n, slong prec);
/// The constant model c. Encloses: {c}.
TaylorModel tm_constant(const Ball& c, slong n);

/// f + g, f - g, c f and f + c. Encloses them for every member.
TaylorModel tm_add(const TaylorModel& f, const TaylorModel& g, slong prec);
TaylorModel tm_sub(const TaylorModel& f, const TaylorModel& g, slong prec);
TaylorModel tm_scalar_mul(const TaylorModel& f, const Ball& c, slong prec);
TaylorModel tm_add_scalar(const TaylorModel& f, const Ball& c, slong prec);

/// f g: the full product of the polynomial parts, degrees >= n moved to eps, plus
/// ||p_f|| eps_g + ||p_g|| eps_f + eps_f eps_g (B1). Encloses fg for every member.
TaylorModel tm_mul(const TaylorModel& f, const TaylorModel& g, slong prec);

/// f(b0 + b1 s) for |b0| + |b1| <= 1. The polynomial part is composed exactly (its degree does
/// not grow); the remainder keeps its bound by (B2). Encloses it for every member and every
/// b0, b1 in the balls. Returns eps = inf when |b0| + |b1| <= 1 is not certain.
TaylorModel tm_compose_affine(const TaylorModel& f, const Ball& b0, const Ball& b1, slong prec);

/// (df/ds)(b0 + b1 s) for |b0| + |b1| <= R < 1: the polynomial part exactly, the remainder by
/// (B4). Encloses it for every member. Returns eps = inf when R < 1 is not certain.
TaylorModel tm_compose_derivative_affine(const TaylorModel& f, const Ball& b0, const Ball& b1,
                                         slong prec);

/// f(h) for ||h|| <= R <= 1 (R = ||p_h|| + eps_h): Horner in p_h with tm_mul, plus
/// eps_h sum k|p_k|R^(k-1) (B3), plus eps_f (B2). Encloses f o h for every member of f and h.
/// Returns eps = inf when R <= 1 is not certain.
TaylorModel tm_compose(const TaylorModel& f, const TaylorModel& h, slong prec);

/// (df/ds)(h) for ||h|| <= R < 1, as tm_compose on the derivative polynomial plus eps_f times
/// sup k R^(k-1) (B4). Encloses it for every member. Returns eps = inf when R < 1 fails.
TaylorModel tm_compose_derivative(const TaylorModel& f, const TaylorModel& h, slong prec);

/// w^p (principal branch) for w = w0 (1 + t) with w0 > 0 the midpoint of the constant
/// coefficient and ||t|| <= tau < 1: w0^p sum_k C(p,k) t^k, the series summed by Horner
/// with tm_mul and its tail bounded by (B5) (no tail when p is an exact integer >= 0).
/// Requires p > -1. Encloses w^p for every member. Returns eps = inf when w0 > 0 or tau < 1
/// is not certain.
TaylorModel tm_pow(const TaylorModel& w, const Ball& p, slong prec);

/// f(s) at a point with |s| <= 1: p(s) +/- eps. Encloses f(s) for every member. Returns an
/// indeterminate ball when |s| <= 1 is not certain.
Ball tm_evaluate(const TaylorModel& f, const Ball& s, slong prec);

/// The same model with every ball rounded to `prec` bits (midpoints rounded, radii widened).
/// Encloses: the input set.
TaylorModel tm_round(const TaylorModel& f, slong prec);

} // namespace renorm::series
