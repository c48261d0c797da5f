#include <renorm/cascade/jet_evaluator.hpp>

#include <stdexcept>

namespace renorm::cascade {

namespace {

// Jet layout: 5 consecutive balls (value, d/dx, d/dmu, d2/dx2, d2/dx dmu).
enum Comp { V = 0, DX = 1, DM = 2, DXX = 3, DXM = 4 };

struct Flags {
    bool x;
    bool mu;
    int order;
};

// out = g(u) with g, g', g'' given: the chain rule for a jet,
//   (g o u)_x = g' u_x,  (g o u)_xx = g'' u_x^2 + g' u_xx,  (g o u)_xmu = g'' u_x u_mu + g' u_xmu.
void chain(arb_ptr out, arb_srcptr u, arb_srcptr g0, arb_srcptr g1, arb_srcptr g2, arb_ptr t,
           Flags fl, slong prec)
{
    arb_set(out + V, g0);
    if (fl.order < 1)
        return;
    if (fl.x)
        arb_mul(out + DX, g1, u + DX, prec);
    if (fl.mu)
        arb_mul(out + DM, g1, u + DM, prec);
    if (fl.order < 2)
        return;
    if (fl.x) {
        arb_sqr(t, u + DX, prec);
        arb_mul(t, t, g2, prec);
        arb_addmul(t, g1, u + DXX, prec);
        arb_swap(out + DXX, t);
        if (fl.mu) {
            arb_mul(t, u + DX, u + DM, prec);
            arb_mul(t, t, g2, prec);
            arb_addmul(t, g1, u + DXM, prec);
            arb_swap(out + DXM, t);
        }
    }
}

// out = a * b (Leibniz rule). out must not alias a or b.
void mul_jet(arb_ptr out, arb_srcptr a, arb_srcptr b, bool a_const, bool b_const, arb_ptr t,
             Flags fl, slong prec)
{
    if (a_const || b_const) {
        arb_srcptr c = a_const ? a : b;
        arb_srcptr u = a_const ? b : a;
        arb_mul(out + V, c + V, u + V, prec);
        if (fl.order >= 1) {
            if (fl.x)
                arb_mul(out + DX, c + V, u + DX, prec);
            if (fl.mu)
                arb_mul(out + DM, c + V, u + DM, prec);
        }
        if (fl.order >= 2) {
            if (fl.x)
                arb_mul(out + DXX, c + V, u + DXX, prec);
            if (fl.x && fl.mu)
                arb_mul(out + DXM, c + V, u + DXM, prec);
        }
        return;
    }
    arb_mul(out + V, a + V, b + V, prec);
    if (fl.order >= 1) {
        if (fl.x) {
            arb_mul(out + DX, a + DX, b + V, prec);
            arb_addmul(out + DX, a + V, b + DX, prec);
        }
        if (fl.mu) {
            arb_mul(out + DM, a + DM, b + V, prec);
            arb_addmul(out + DM, a + V, b + DM, prec);
        }
    }
    if (fl.order >= 2) {
        if (fl.x) {
            arb_mul(t, a + DX, b + DX, prec);
            arb_mul_2exp_si(t, t, 1);
            arb_addmul(t, a + DXX, b + V, prec);
            arb_addmul(t, a + V, b + DXX, prec);
            arb_swap(out + DXX, t);
        }
        if (fl.x && fl.mu) {
            arb_mul(t, a + DXM, b + V, prec);
            arb_addmul(t, a + DX, b + DM, prec);
            arb_addmul(t, a + DM, b + DX, prec);
            arb_addmul(t, a + V, b + DXM, prec);
            arb_swap(out + DXM, t);
        }
    }
}

// Components of a jet that can be nonzero under the flags: value, then the derivatives.
template <class F> void for_live(Flags fl, F&& f)
{
    f(V);
    if (fl.order >= 1) {
        if (fl.x)
            f(DX);
        if (fl.mu)
            f(DM);
    }
    if (fl.order >= 2) {
        if (fl.x)
            f(DXX);
        if (fl.x && fl.mu)
            f(DXM);
    }
}

// Encloses u^q for a ball u >= 0 (possibly containing 0) and a constant q:
// q > 0: [0, max(u)^q] by monotonicity; q == 0 exactly: 1; otherwise [+/- inf].
void pow_nonneg(arb_ptr res, arb_srcptr u, arb_srcptr q, slong prec)
{
    if (arb_is_zero(q)) {
        arb_one(res);
        return;
    }
    if (!arb_is_positive(q)) {
        arb_zero_pm_inf(res);
        return;
    }
    if (arb_is_positive(u)) {
        arb_pow(res, u, q, prec);
        return;
    }
    arf_t hi, zero;
    arf_init(hi);
    arf_init(zero);
    arb_get_ubound_arf(hi, u, prec);
    arb_t h;
    arb_init(h);
    arb_set_arf(h, hi);
    if (arf_is_zero(hi)) {
        arb_zero(res);
    } else {
        arb_pow(h, h, q, prec);
        arb_get_ubound_arf(hi, h, prec);
        arb_set_interval_arf(res, zero, hi, prec);
    }
    arb_clear(h);
    arf_clear(hi);
    arf_clear(zero);
}

} // namespace

JetEvaluator::JetEvaluator(const Expression& expr, int order, slong prec)
    : m_nodes(expr.nodes()), m_order(order), m_active_order(order), m_prec(prec)
{
    if (order < 0 || order > 2)
        throw std::invalid_argument("JetEvaluator: order must be 0, 1 or 2");
    if (prec < 2)
        throw std::invalid_argument("JetEvaluator: prec must be >= 2");
    if (m_nodes.empty())
        throw std::invalid_argument("JetEvaluator: empty expression");
    const int n = static_cast<int>(m_nodes.size());
    m_scratch = n;
    m_regs = ball::BallVec(5 * (static_cast<slong>(n) + 3));
    m_tmp = ball::BallVec(8);
    m_pow_mode.assign(n, 0);
    m_pow_int.assign(n, 0);
    // Constant subtrees are evaluated once here; evaluate() skips them.
    for (int i = 0; i < n; ++i) {
        const Node& nd = m_nodes[i];
        if (!nd.dep_x && !nd.dep_mu)
            eval_node(i);
        if (nd.op == Op::pow && !m_nodes[nd.b].dep_x && !m_nodes[nd.b].dep_mu) {
            fmpz_t k;
            fmpz_init(k);
            arb_srcptr p = reg(nd.b);
            if (arb_is_exact(p) && arb_get_unique_fmpz(k, p) && fmpz_bits(k) <= 20) {
                m_pow_mode[i] = 1;
                m_pow_int[i] = fmpz_get_si(k);
            } else {
                m_pow_mode[i] = 2;
            }
            fmpz_clear(k);
        }
    }
}

void JetEvaluator::eval_node(int i)
{
    const Node& nd = m_nodes[i];
    const slong prec = m_prec;
    arb_ptr out = reg(i);
    arb_srcptr a = nd.a >= 0 ? reg(nd.a) : nullptr;
    arb_srcptr b = nd.b >= 0 ? reg(nd.b) : nullptr;
    const Flags fl{nd.dep_x, nd.dep_mu, m_active_order};
    arb_ptr g0 = m_tmp[0];
    arb_ptr g1 = m_tmp[1];
    arb_ptr g2 = m_tmp[2];
    arb_ptr t = m_tmp[3];
    auto is_const = [&](int j) { return !m_nodes[j].dep_x && !m_nodes[j].dep_mu; };

    switch (nd.op) {
    case Op::number: {
        auto v = ball::from_string(nd.text, prec);
        if (v)
            arb_set(out + V, v->get());
        else
            arb_indeterminate(out + V);
        return;
    }
    case Op::pi:
        arb_const_pi(out + V, prec);
        return;
    case Op::e:
        arb_const_e(out + V, prec);
        return;
    case Op::var_x:
        arb_set(out + V, m_x);
        if (m_active_order >= 1)
            arb_one(out + DX);
        return;
    case Op::var_mu:
        arb_set(out + V, m_mu);
        if (m_active_order >= 1)
            arb_one(out + DM);
        return;
    case Op::add:
        for_live(fl, [&](int c) { arb_add(out + c, a + c, b + c, prec); });
        return;
    case Op::sub:
        for_live(fl, [&](int c) { arb_sub(out + c, a + c, b + c, prec); });
        return;
    case Op::neg:
        for_live(fl, [&](int c) { arb_neg(out + c, a + c); });
        return;
    case Op::mul:
        mul_jet(out, a, b, is_const(nd.a), is_const(nd.b), t, fl, prec);
        return;
    case Op::div: {
        if (is_const(nd.b)) {
            for_live(fl, [&](int c) { arb_div(out + c, a + c, b + V, prec); });
            return;
        }
        // a / b = a * (1/b); 1/u has derivatives -1/u^2 and 2/u^3.
        arb_ptr s = reg(m_scratch);
        for (int c = 0; c < 5; ++c)
            arb_zero(s + c); // the scratch jet may hold components of another node
        const Flags fb{m_nodes[nd.b].dep_x, m_nodes[nd.b].dep_mu, m_active_order};
        arb_inv(g0, b + V, prec);
        arb_sqr(g1, g0, prec);
        arb_mul(g2, g1, g0, prec);
        arb_mul_2exp_si(g2, g2, 1);
        arb_neg(g1, g1);
        chain(s, b, g0, g1, g2, t, fb, prec);
        mul_jet(out, a, s, is_const(nd.a), false, t, fl, prec);
        return;
    }
    case Op::sin:
    case Op::cos:
        arb_sin_cos(g0, g1, a + V, prec);
        arb_neg(g2, g0);
        if (nd.op == Op::cos) {
            arb_swap(g0, g1);  // g0 = cos, g1 = sin
            arb_neg(g1, g1);   // g1 = -sin
            arb_neg(g2, g0);   // g2 = -cos
        }
        chain(out, a, g0, g1, g2, t, fl, prec);
        return;
    case Op::tan:
        arb_tan(g0, a + V, prec);
        arb_sqr(g1, g0, prec);
        arb_add_ui(g1, g1, 1, prec);
        arb_mul(g2, g0, g1, prec);
        arb_mul_2exp_si(g2, g2, 1);
        chain(out, a, g0, g1, g2, t, fl, prec);
        return;
    case Op::exp:
        arb_exp(g0, a + V, prec);
        chain(out, a, g0, g0, g0, t, fl, prec);
        return;
    case Op::log:
        arb_log(g0, a + V, prec);
        arb_inv(g1, a + V, prec);
        arb_sqr(g2, g1, prec);
        arb_neg(g2, g2);
        chain(out, a, g0, g1, g2, t, fl, prec);
        return;
    case Op::sqrt:
        arb_sqrt(g0, a + V, prec);
        arb_inv(g1, g0, prec);
        arb_mul_2exp_si(g1, g1, -1); // 1 / (2 sqrt u)
        arb_div(g2, g1, a + V, prec);
        arb_mul_2exp_si(g2, g2, -1);
        arb_neg(g2, g2); // -1 / (4 u sqrt u)
        chain(out, a, g0, g1, g2, t, fl, prec);
        return;
    case Op::abs:
        if (arb_contains_zero(a + V)) {
            // |u| over a ball holding 0 is [0, max |u|]: a ball that is certainly >= 0, so
            // that a real power of it stays defined.
            arf_t lo, hi;
            arf_init(lo);
            arf_init(hi);
            arb_get_abs_ubound_arf(hi, a + V, MAG_BITS); // hi/2 is then exact as a mag
            arb_set_interval_arf(g0, lo, hi, prec);
            arf_clear(lo);
            arf_clear(hi);
        } else {
            arb_abs(g0, a + V);
        }
        arb_sgn(g1, a + V); // [-1, 1] when the ball contains 0
        if (arb_contains_zero(a + V))
            arb_zero_pm_inf(g2);
        else
            arb_zero(g2);
        chain(out, a, g0, g1, g2, t, fl, prec);
        return;
    case Op::pow: {
        if (m_pow_mode[i] == 1) {
            // Integer exponent k: u^k, k u^(k-1), k (k-1) u^(k-2), valid for every real u != 0,
            // and for u = 0 when the exponent of each term is >= 0.
            const long k = m_pow_int[i];
            auto ipow = [&](arb_ptr r, long e) {
                if (e >= 0) {
                    arb_pow_ui(r, a + V, static_cast<ulong>(e), prec);
                } else {
                    arb_pow_ui(r, a + V, static_cast<ulong>(-e), prec);
                    arb_inv(r, r, prec);
                }
            };
            ipow(g0, k);
            if (k == 0) {
                arb_zero(g1);
                arb_zero(g2);
            } else {
                ipow(g1, k - 1);
                arb_mul_si(g1, g1, k, prec);
                if (k == 1) {
                    arb_zero(g2);
                } else {
                    ipow(g2, k - 2);
                    arb_mul_si(g2, g2, k * (k - 1), prec);
                }
            }
            chain(out, a, g0, g1, g2, t, fl, prec);
            return;
        }
        if (m_pow_mode[i] == 2) {
            // Real constant exponent p: u^p = exp(p log u) for u > 0; for u >= 0 containing 0
            // each power is enclosed by monotonicity (pow_nonneg); negative u is outside the
            // domain (NaN).
            arb_srcptr p = b + V;
            arb_ptr q = m_tmp[4];
            // abs, sqrt and exp are >= 0 even when rounding puts a ball's lower end below 0.
            const Op base = m_nodes[nd.a].op;
            const bool nonneg = arb_is_nonnegative(a + V) || base == Op::abs ||
                                base == Op::sqrt || base == Op::exp;
            if (arb_is_positive(a + V)) {
                arb_pow(g0, a + V, p, prec);
                arb_div(g1, g0, a + V, prec);
                arb_div(g2, g1, a + V, prec);
            } else if (nonneg) {
                pow_nonneg(g0, a + V, p, prec);
                arb_sub_ui(q, p, 1, prec);
                pow_nonneg(g1, a + V, q, prec);
                arb_sub_ui(q, p, 2, prec);
                pow_nonneg(g2, a + V, q, prec);
            } else {
                arb_indeterminate(g0);
                arb_indeterminate(g1);
                arb_indeterminate(g2);
            }
            arb_mul(g1, g1, p, prec); // p u^(p-1)
            arb_sub_ui(q, p, 1, prec);
            if (arb_is_zero(q)) {
                arb_zero(g2); // p = 1: no second derivative term (avoid 0 * inf)
            } else {
                arb_mul(g2, g2, q, prec);
                arb_mul(g2, g2, p, prec); // p (p-1) u^(p-2)
            }
            chain(out, a, g0, g1, g2, t, fl, prec);
            return;
        }
        // Variable exponent: a^b = exp(b log a).
        arb_ptr s1 = reg(m_scratch);
        arb_ptr s2 = reg(m_scratch + 1);
        const Flags fa{m_nodes[nd.a].dep_x, m_nodes[nd.a].dep_mu, m_active_order};
        arb_log(g0, a + V, prec);
        arb_inv(g1, a + V, prec);
        arb_sqr(g2, g1, prec);
        arb_neg(g2, g2);
        // scratch jets may hold stale components from another node: clear them first
        for (int c = 0; c < 5; ++c) {
            arb_zero(s1 + c);
            arb_zero(s2 + c);
        }
        chain(s1, a, g0, g1, g2, t, fa, prec);
        mul_jet(s2, s1, b, is_const(nd.a), false, t, fl, prec);
        arb_exp(g0, s2 + V, prec);
        chain(out, s2, g0, g0, g0, t, fl, prec);
        return;
    }
    }
}

void JetEvaluator::run_nodes(arb_srcptr x, arb_srcptr mu)
{
    m_x = x;
    m_mu = mu;
    const int n = static_cast<int>(m_nodes.size());
    for (int i = 0; i < n; ++i)
        if (m_nodes[i].dep_x || m_nodes[i].dep_mu)
            eval_node(i);
    m_x = nullptr;
    m_mu = nullptr;
}

void JetEvaluator::evaluate(arb_ptr f, arb_ptr fx, arb_ptr fmu, arb_ptr fxx, arb_ptr fxmu,
                            arb_srcptr x, arb_srcptr mu)
{
    run_nodes(x, mu);
    arb_srcptr r = reg(static_cast<int>(m_nodes.size()) - 1);
    if (f)
        arb_set(f, r + V);
    if (m_order >= 1) {
        if (fx)
            arb_set(fx, r + DX);
        if (fmu)
            arb_set(fmu, r + DM);
    }
    if (m_order >= 2) {
        if (fxx)
            arb_set(fxx, r + DXX);
        if (fxmu)
            arb_set(fxmu, r + DXM);
    }
}

void JetEvaluator::evaluate_centered(arb_ptr f, arb_ptr fx, arb_ptr fmu, arb_ptr fxx,
                                     arb_ptr fxmu, arb_srcptr x, arb_srcptr mu)
{
    if (m_order < 1)
        throw std::invalid_argument("evaluate_centered needs order >= 1");
    arb_ptr direct = m_tmp[5];
    arb_ptr dfx = m_tmp[6];
    arb_ptr mid = m_tmp[7];
    evaluate(direct, dfx, fmu, fxx, fxmu, x, mu);
    if (fx)
        arb_set(fx, dfx);
    if (arb_is_exact(x) || !arb_is_finite(dfx)) {
        arb_set(f, direct);
        return;
    }
    // f(m) + f_x(X) (X - m), m = mid X  (mean value theorem, for each mu in the ball)
    arb_get_mid_arb(mid, x);
    m_active_order = 0;
    run_nodes(mid, mu);
    m_active_order = m_order;
    arb_srcptr r = reg(static_cast<int>(m_nodes.size()) - 1);
    arb_ptr t = m_tmp[3];
    arb_sub(t, x, mid, m_prec);
    arb_mul(t, t, dfx, m_prec);
    arb_add(t, t, r + V, m_prec);
    if (!arb_intersection(f, t, direct, m_prec))
        arb_set(f, t); // cannot happen for exact arithmetic; keep the centred enclosure
}

Partials JetEvaluator::evaluate(const ball::Ball& x, const ball::Ball& mu)
{
    Partials p;
    evaluate(p.f.get(), p.fx.get(), p.fmu.get(), p.fxx.get(), p.fxmu.get(), x.get(), mu.get());
    return p;
}

} // namespace renorm::cascade
