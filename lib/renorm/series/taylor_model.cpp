#include <renorm/series/taylor_model.hpp>

#include <algorithm>
#include <stdexcept>

namespace renorm::series {

slong tm_drop_guard_bits = 16;

namespace {
void check_prec(slong prec)
{
    if (prec < 2)
        throw std::invalid_argument("taylor_model: prec must be >= 2");
}

/// Splits q into its coefficients of degree < n (returned) and adds the l1 norm of the rest
/// to eps. Trailing coefficients below 2^-(prec + tm_drop_guard_bits) times the largest one
/// also move into eps (they are below the working precision; dropping them keeps products
/// short at low precision, where they would otherwise dominate the cost).
BallPoly split(const BallPoly& q, slong n, Bound& eps, slong prec)
{
    const slong len = std::min(q.length(), n);
    mag_t t, big, cut;
    mag_init(t);
    mag_init(big);
    mag_init(cut);
    for (slong k = 0; k < len; ++k) {
        arb_get_mag(t, q.get()->coeffs + k);
        if (mag_cmp(t, big) > 0)
            mag_set(big, t);
    }
    mag_mul_2exp_si(cut, big, -(prec + tm_drop_guard_bits));
    slong keep = len;
    while (keep > 1) {
        arb_get_mag(t, q.get()->coeffs + keep - 1);
        if (mag_cmp(t, cut) >= 0 || !mag_is_finite(t))
            break;
        --keep;
    }
    for (slong k = keep; k < q.length(); ++k) {
        arb_get_mag(t, q.get()->coeffs + k);
        mag_add(eps.get(), eps.get(), t);
    }
    mag_clear(cut);
    mag_clear(big);
    mag_clear(t);
    if (keep >= q.length())
        return q;
    return truncated(q, keep);
}

/// An upper bound for |x| + |y|.
Bound abs_sum(const Ball& x, const Ball& y) { return Bound::abs_upper(x) + Bound::abs_upper(y); }

bool le_one(const Bound& r) { return mag_cmp_2exp_si(r.get(), 0) <= 0; }
bool lt_one(const Bound& r) { return mag_cmp_2exp_si(r.get(), 0) < 0; }
} // namespace

bool TaylorModel::is_finite() const
{
    if (!eps.is_finite())
        return false;
    for (slong k = 0; k < p.length(); ++k)
        if (!arb_is_finite(p.get()->coeffs + k))
            return false;
    return true;
}

Bound poly_norm(const BallPoly& p)
{
    Bound s;
    mag_t t;
    mag_init(t);
    for (slong k = 0; k < p.length(); ++k) {
        arb_get_mag(t, p.get()->coeffs + k);
        mag_add(s.get(), s.get(), t);
    }
    mag_clear(t);
    return s;
}

Bound tm_norm(const TaylorModel& f) { return poly_norm(f.p) + f.eps; }

Bound derivative_sum(const BallPoly& p, const Bound& r, slong prec)
{
    // Horner on the upper bounds: sum_{k>=1} k |p_k| R^(k-1), every mag operation rounds up.
    (void)prec;
    Bound acc;
    mag_t t;
    mag_init(t);
    for (slong k = p.length() - 1; k >= 1; --k) {
        mag_mul(acc.get(), acc.get(), r.get());
        arb_get_mag(t, p.get()->coeffs + k);
        mag_mul_ui(t, t, static_cast<ulong>(k));
        mag_add(acc.get(), acc.get(), t);
    }
    mag_clear(t);
    return acc;
}

Bound sup_k_rk(const Bound& r, slong prec)
{
    (void)prec;
    if (!lt_one(r))
        return Bound::infinite();
    // f(k) = k R^(k-1) has f(k+1)/f(k) = R (k+1)/k <= 1 iff k >= R/(1-R): the maximum is at
    // some k <= K = floor(R/(1-R)) + 1. Upper bounds: R rounded up, 1 - R rounded down.
    const double rd = mag_get_d(r.get()); // rounded up (mag_get_d is an upper bound)
    if (!(rd < 1.0))
        return Bound::infinite();
    const double kmax_d = rd / (1.0 - rd) + 2.0;
    if (kmax_d > 1e7)
        return Bound::infinite();
    const slong kmax = static_cast<slong>(kmax_d) + 1;
    Bound best, pw(1.0); // pw = R^(k-1) (upper)
    for (slong k = 1; k <= kmax; ++k) {
        Bound f;
        mag_mul_ui(f.get(), pw.get(), static_cast<ulong>(k));
        best = max(best, f);
        pw = pw * r;
    }
    // f(k) decreases for k > K; kmax >= K + 1 covers the maximum.
    return best;
}

TaylorModel tm_from_poly(const BallPoly& f, slong n, slong prec)
{
    check_prec(prec);
    if (n < 1)
        throw std::invalid_argument("tm_from_poly: n must be >= 1");
    TaylorModel m;
    m.n = n;
    m.p = split(f, n, m.eps, prec);
    return m;
}

TaylorModel tm_constant(const Ball& c, slong n)
{
    if (n < 1)
        throw std::invalid_argument("tm_constant: n must be >= 1");
    TaylorModel m;
    m.n = n;
    m.p.set_coeff(0, c);
    return m;
}

TaylorModel tm_add(const TaylorModel& f, const TaylorModel& g, slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = std::min(f.n, g.n);
    BallPoly s;
    arb_poly_add(s.get(), f.p.get(), g.p.get(), prec);
    m.eps = f.eps + g.eps;
    m.p = split(s, m.n, m.eps, prec);
    return m;
}

TaylorModel tm_sub(const TaylorModel& f, const TaylorModel& g, slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = std::min(f.n, g.n);
    BallPoly s;
    arb_poly_sub(s.get(), f.p.get(), g.p.get(), prec);
    m.eps = f.eps + g.eps;
    m.p = split(s, m.n, m.eps, prec);
    return m;
}

TaylorModel tm_scalar_mul(const TaylorModel& f, const Ball& c, slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = f.n;
    arb_poly_scalar_mul(m.p.get(), f.p.get(), c.get(), prec);
    m.eps = f.eps * Bound::abs_upper(c);
    return m;
}

TaylorModel tm_add_scalar(const TaylorModel& f, const Ball& c, slong prec)
{
    check_prec(prec);
    TaylorModel m = f;
    Ball c0 = f.p.coeff(0);
    arb_add(c0.get(), c0.get(), c.get(), prec);
    m.p.set_coeff(0, c0);
    return m;
}

TaylorModel tm_mul(const TaylorModel& f, const TaylorModel& g, slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = std::min(f.n, g.n);
    BallPoly full;
    arb_poly_mul(full.get(), f.p.get(), g.p.get(), prec);
    // (pf + Ef)(pg + Eg) = pf pg + pf Eg + Ef pg + Ef Eg, each cross term by (B1).
    Bound nf = poly_norm(f.p), ng = poly_norm(g.p);
    m.eps = nf * g.eps + ng * f.eps + f.eps * g.eps;
    m.p = split(full, m.n, m.eps, prec);
    return m;
}

TaylorModel tm_compose_affine(const TaylorModel& f, const Ball& b0, const Ball& b1, slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = f.n;
    Bound r = abs_sum(b0, b1);
    if (!le_one(r)) {
        m.eps = Bound::infinite();
        return m;
    }
    // The degree does not grow: the composition of the polynomial part is exact up to rounding.
    m.p = compose_affine(f.p, b0, b1, f.n, prec);
    m.eps = f.eps; // (B2)
    return m;
}

TaylorModel tm_compose_derivative_affine(const TaylorModel& f, const Ball& b0, const Ball& b1,
                                         slong prec)
{
    check_prec(prec);
    TaylorModel m;
    m.n = f.n;
    Bound r = abs_sum(b0, b1);
    Bound c = sup_k_rk(r, prec);
    if (!c.is_finite()) {
        m.eps = Bound::infinite();
        return m;
    }
    BallPoly d = derivative(f.p, prec);
    m.p = compose_affine(d, b0, b1, f.n, prec);
    m.eps = f.eps * c; // (B4)
    return m;
}

namespace {
/// p o h for a polynomial p and a model h with ||h|| <= R <= 1 (the caller checked R).
TaylorModel compose_poly(const BallPoly& p, const TaylorModel& h, const Bound& r, slong prec)
{
    const slong n = h.n;
    TaylorModel hp;
    hp.n = n;
    hp.p = h.p; // the polynomial part alone: Horner is exact algebra on it
    const slong len = p.length();
    TaylorModel acc = tm_constant(Ball(), n);
    if (len == 0)
        return acc;
    acc.p.set_coeff(0, p.coeff(len - 1));
    for (slong k = len - 2; k >= 0; --k) {
        acc = tm_mul(acc, hp, prec);
        acc = tm_add_scalar(acc, p.coeff(k), prec);
    }
    // p(hp + Eh) - p(hp), by (B3).
    acc.eps = acc.eps + h.eps * derivative_sum(p, r, prec);
    return acc;
}
} // namespace

TaylorModel tm_compose(const TaylorModel& f, const TaylorModel& h, slong prec)
{
    check_prec(prec);
    Bound r = tm_norm(h);
    if (!le_one(r) || !h.is_finite()) {
        TaylorModel m;
        m.n = std::min(f.n, h.n);
        m.eps = Bound::infinite();
        return m;
    }
    TaylorModel hh = h;
    hh.n = std::min(f.n, h.n);
    TaylorModel m = compose_poly(f.p, hh, r, prec);
    m.eps = m.eps + f.eps; // (B2)
    return m;
}

TaylorModel tm_compose_derivative(const TaylorModel& f, const TaylorModel& h, slong prec)
{
    check_prec(prec);
    Bound r = tm_norm(h);
    Bound c = sup_k_rk(r, prec);
    if (!c.is_finite() || !h.is_finite()) {
        TaylorModel m;
        m.n = std::min(f.n, h.n);
        m.eps = Bound::infinite();
        return m;
    }
    TaylorModel hh = h;
    hh.n = std::min(f.n, h.n);
    BallPoly d = derivative(f.p, prec);
    TaylorModel m = compose_poly(d, hh, r, prec);
    m.eps = m.eps + f.eps * c; // (B4)
    return m;
}

TaylorModel tm_pow(const TaylorModel& w, const Ball& p, slong prec)
{
    check_prec(prec);
    TaylorModel bad;
    bad.n = w.n;
    bad.eps = Bound::infinite();
    Ball minus_one(slong{-1});
    if (!arb_gt(p.get(), minus_one.get()) || !w.is_finite())
        return bad;
    // w0: the midpoint of the constant coefficient, an exact number.
    Ball w0;
    arf_set(arb_midref(w0.get()), arb_midref(w.p.coeff(0).get()));
    if (!arb_is_positive(w0.get()))
        return bad;
    // t = w / w0 - 1 (every member), ||t|| <= tau.
    Ball inv_w0;
    arb_inv(inv_w0.get(), w0.get(), prec);
    TaylorModel t = tm_scalar_mul(w, inv_w0, prec);
    t = tm_add_scalar(t, minus_one, prec);
    Bound tau = tm_norm(t);
    if (!lt_one(tau))
        return bad;

    // Number of terms K: all of them for an exact integer p >= 0; otherwise K >= p with the
    // tail bound (B5) below 2^-prec (or give up at 8 prec terms).
    std::vector<Ball> binom;
    binom.emplace_back(slong{1});
    const bool exact_int = arb_is_exact(p.get()) && arb_is_int(p.get());
    Bound tail;
    if (exact_int) {
        const slong pi = arf_get_si(arb_midref(p.get()), ARF_RND_DOWN);
        for (slong k = 0; k < pi; ++k) {
            Ball next;
            arb_sub_si(next.get(), p.get(), k, prec);
            arb_mul(next.get(), next.get(), binom.back().get(), prec);
            arb_div_si(next.get(), next.get(), k + 1, prec);
            binom.push_back(next);
        }
    } else {
        Bound one_minus_tau; // a lower bound for 1 - tau
        {
            Ball tb = tau.to_ball(), one(slong{1}), d;
            arb_sub(d.get(), one.get(), tb.get(), prec);
            arb_get_mag_lower(one_minus_tau.get(), d.get());
        }
        const double p_up = arf_get_d(arb_midref(p.get()), ARF_RND_UP) +
                            mag_get_d(arb_radref(p.get()));
        Bound tau_k(1.0);
        const slong k_limit = 8 * prec + 64;
        for (slong k = 0;; ++k) {
            // binom[k] = C(p, k); tau_k = tau^k
            if (static_cast<double>(k) >= p_up + 1.0) {
                Bound term = Bound::abs_upper(binom[k]) * tau_k;
                mag_div(tail.get(), term.get(), one_minus_tau.get());
                if (mag_cmp_2exp_si(tail.get(), -prec - 8) < 0) {
                    binom.pop_back(); // sum k < K, where K = k is the first tail index
                    break;
                }
            }
            if (k > k_limit)
                return bad;
            Ball next;
            arb_sub_si(next.get(), p.get(), k, prec);
            arb_mul(next.get(), next.get(), binom.back().get(), prec);
            arb_div_si(next.get(), next.get(), k + 1, prec);
            binom.push_back(next);
            tau_k = tau_k * tau;
        }
    }
    // Horner: S = sum_{k<K} C(p,k) t^k.
    const slong kk = static_cast<slong>(binom.size());
    TaylorModel s = tm_constant(binom[kk - 1], w.n);
    for (slong k = kk - 2; k >= 0; --k) {
        s = tm_mul(s, t, prec);
        s = tm_add_scalar(s, binom[k], prec);
    }
    s.eps = s.eps + tail;
    Ball w0p;
    arb_pow(w0p.get(), w0.get(), p.get(), prec);
    return tm_scalar_mul(s, w0p, prec);
}

Ball tm_evaluate(const TaylorModel& f, const Ball& s, slong prec)
{
    check_prec(prec);
    Ball out;
    Bound as = Bound::abs_upper(s);
    if (!le_one(as)) {
        arb_indeterminate(out.get());
        return out;
    }
    out = evaluate(f.p, s, prec);
    arb_add_error_mag(out.get(), f.eps.get());
    return out;
}

TaylorModel tm_round(const TaylorModel& f, slong prec)
{
    check_prec(prec);
    TaylorModel m = f;
    for (slong k = 0; k < m.p.length(); ++k)
        arb_set_round(m.p.get()->coeffs + k, m.p.get()->coeffs + k, prec);
    return m;
}

} // namespace renorm::series
