#include <renorm/cascade/family.hpp>
#include <renorm/cascade/jet_evaluator.hpp>

#include <cmath>
#include <stdexcept>

namespace renorm::cascade {

std::vector<std::string> builtin_family_names()
{
    return {"quadratic", "logistic", "sine", "power", "cubic"};
}

std::string describe_builtin_family(const std::string& name)
{
    if (name == "quadratic")
        return "quadratic  1 - mu*x^2          on [-1,1], critical point 0";
    if (name == "logistic")
        return "logistic   mu*x*(1-x)          on [0,1],  critical point 1/2";
    if (name == "sine")
        return "sine       mu*sin(pi*x)        on [0,1],  critical point 1/2";
    if (name == "power")
        return "power      1 - mu*abs(x)^z     on [-1,1], critical point 0, order z > 1 (--order)";
    if (name == "cubic")
        return "cubic      1 - mu*x^2 + x^3/4  on [-1,1], critical point 0";
    throw std::invalid_argument("unknown family '" + name + "'");
}

Family make_builtin_family(const std::string& name, const std::string& order_text)
{
    Family f;
    f.name = name;
    if (name == "quadratic") {
        f.formula = "1 - mu*x^2";
        f.critical_text = "0";
        f.x_lo = -1;
        f.x_hi = 1;
        f.mu_lo = 0.5;
        f.mu_hi = 2;
        f.fast_quadratic = true;
    } else if (name == "logistic") {
        f.formula = "mu*x*(1-x)";
        f.critical_text = "1/2";
        f.x_lo = 0;
        f.x_hi = 1;
        f.mu_lo = 1;
        f.mu_hi = 4;
    } else if (name == "sine") {
        f.formula = "mu*sin(pi*x)";
        f.critical_text = "1/2";
        f.x_lo = 0;
        f.x_hi = 1;
        f.mu_lo = 0.3;
        f.mu_hi = 1;
    } else if (name == "power") {
        auto z = ball::from_string(order_text, 64);
        ball::Ball zm1;
        if (z)
            arb_sub_ui(zm1.get(), z->get(), 1, 64);
        if (!z || !z->is_finite() || !arb_is_positive(zm1.get()))
            throw std::invalid_argument("--order must be a number > 1 (got '" + order_text + "')");
        if (z->approx_double() > 64)
            throw std::invalid_argument("--order above 64 is not supported (got '" + order_text +
                                        "')");
        f.formula = "1 - mu*abs(x)^(" + order_text + ")";
        f.critical_text = "0";
        f.order = z->approx_double();
        f.x_lo = -1;
        f.x_hi = 1;
        f.mu_lo = 0.5;
        f.mu_hi = 2;
    } else if (name == "cubic") {
        // f(x) = 1 - mu x^2 + x^3/4 on [-1, 1]. f'(x) = x (3x/4 - 2 mu) vanishes at 0 and at
        // 8 mu / 3 > 1 for mu > 3/8, so on [-1, 1] f increases up to 0 and decreases after:
        // one quadratic maximum (f''(0) = -2 mu != 0), f(0) = 1, and the minimum over [-1, 1]
        // is f(-1) = 3/4 - mu >= -1 while mu <= 7/4. Hence f maps [-1, 1] into itself for
        // 3/8 < mu <= 7/4 and is unimodal there. The cubic term breaks the symmetry x -> -x
        // of the quadratic family, so the family is a real test of universality.
        f.formula = "1 - mu*x^2 + x^3/4";
        f.critical_text = "0";
        f.x_lo = -1;
        f.x_hi = 1;
        f.mu_lo = 0.5;
        f.mu_hi = 1.75;
    } else {
        std::string known;
        for (const auto& n : builtin_family_names())
            known += (known.empty() ? "" : ", ") + n;
        throw std::invalid_argument("unknown family '" + name + "' (known: " + known + ")");
    }
    f.expr = Expression::parse(f.formula);
    return f;
}

Family make_user_family(const std::string& formula, const std::string& critical_text,
                        double x_lo, double x_hi, double mu_lo, double mu_hi)
{
    if (!(x_lo < x_hi))
        throw std::invalid_argument("the interval must have lo < hi");
    if (!(mu_lo < mu_hi))
        throw std::invalid_argument("the mu range must have lo < hi");
    Family f;
    f.name = "map";
    f.formula = formula;
    f.expr = Expression::parse(formula);
    if (!critical_text.empty()) {
        Expression c = Expression::parse(critical_text);
        for (const auto& nd : c.nodes())
            if (nd.dep_x || nd.dep_mu)
                throw ParseError(nd.column, "the critical point must be a constant (no x or mu)");
        f.critical_text = critical_text;
    }
    f.x_lo = x_lo;
    f.x_hi = x_hi;
    f.mu_lo = mu_lo;
    f.mu_hi = mu_hi;
    f.critical_guess = 0.5 * (x_lo + x_hi);
    return f;
}

namespace {

ball::Ball constant_value(const std::string& text, slong prec)
{
    Expression e = Expression::parse(text);
    JetEvaluator ev(e, 0, prec);
    ball::Ball zero;
    return ev.evaluate(zero, zero).f;
}

bool derivative_vanishes(const Family& family, const ball::Ball& c, slong prec, std::string* why)
{
    JetEvaluator ev(family.expr, 1, prec);
    for (double m : {family.mu_lo, 0.5 * (family.mu_lo + family.mu_hi), family.mu_hi}) {
        ball::Ball mu(m);
        auto p = ev.evaluate(c, mu);
        if (!arb_contains_zero(p.fx.get())) {
            *why = "df/dx at the critical point is not 0 at mu = " + std::to_string(m) +
                   " (the critical point must not depend on mu)";
            return false;
        }
    }
    return true;
}

} // namespace

CriticalPoint critical_point(const Family& family, slong prec)
{
    CriticalPoint out;
    arb_indeterminate(out.c.get());
    if (!family.critical_text.empty()) {
        ball::Ball c = constant_value(family.critical_text, prec);
        if (!c.is_finite()) {
            out.problem = "the critical point '" + family.critical_text + "' is not a finite number";
            return out;
        }
        if (!derivative_vanishes(family, c, prec, &out.problem))
            return out;
        out.ok = true;
        out.c = c;
        return out;
    }
    // Find the zeros of g(x) = df/dx(x, mu_mid) in [x_lo, x_hi] by a sign scan.
    const double mu_mid = 0.5 * (family.mu_lo + family.mu_hi);
    JetEvaluator ev(family.expr, 2, prec);
    ball::Ball mu(mu_mid);
    auto g = [&](double x) {
        auto p = ev.evaluate(ball::Ball(x), mu);
        return p.fx.approx_double();
    };
    const int grid = 1000;
    std::vector<double> brackets;
    double x_prev = family.x_lo;
    double g_prev = g(x_prev);
    for (int i = 1; i <= grid; ++i) {
        double x = family.x_lo + (family.x_hi - family.x_lo) * i / grid;
        double gx = g(x);
        if (!std::isfinite(gx) || !std::isfinite(g_prev)) {
            x_prev = x;
            g_prev = gx;
            continue;
        }
        // A zero on a grid point counts as positive, so it gives one sign change, not two.
        if ((g_prev < 0) != (gx < 0))
            brackets.push_back(0.5 * (x + x_prev));
        x_prev = x;
        g_prev = gx;
    }
    if (brackets.empty()) {
        out.problem = "df/dx has no zero in the interval; give --critical or another --interval";
        return out;
    }
    if (brackets.size() > 1) {
        out.problem = "df/dx has " + std::to_string(brackets.size()) +
                      " zeros in the interval; give --critical or a narrower --interval";
        return out;
    }
    // Newton on g with g' = d2f/dx2, in ball arithmetic on the midpoint.
    ball::Ball m(brackets[0]);
    ball::Ball step;
    for (int it = 0; it < 200; ++it) {
        auto p = ev.evaluate(m, mu);
        arb_div(step.get(), p.fx.get(), p.fxx.get(), prec);
        if (!step.is_finite()) {
            out.problem = "Newton for df/dx = 0 met a zero second derivative";
            return out;
        }
        arb_sub(m.get(), m.get(), step.get(), prec);
        arf_t mid;
        arf_init(mid);
        arf_set(mid, arb_midref(m.get()));
        arb_set_arf(m.get(), mid);
        arf_clear(mid);
        if (arf_cmpabs_2exp_si(arb_midref(step.get()), -(prec * 7) / 8) < 0 && it > 2)
            break;
    }
    // Krawczyk on g over X = [m - r, m + r]:
    //   K = m - g(m)/g'(m) + (1 - g'(X)/g'(m)) (X - m);  K inside X => unique zero of g in X.
    ball::Ball X, K, gm, gpX, t, y;
    auto pm = ev.evaluate(m, mu);
    gm = pm.fx;
    arb_set_round(y.get(), pm.fxx.get(), prec); // any number: here the approximate g'(m)
    arf_t ym;
    arf_init(ym);
    arf_set(ym, arb_midref(y.get()));
    arb_set_arf(y.get(), ym);
    arf_clear(ym);
    arb_set(X.get(), m.get());
    mag_t r;
    mag_init(r);
    mag_set_ui_2exp_si(r, 1, -(prec / 2));
    arf_t absm;
    arf_init(absm);
    arf_abs(absm, arb_midref(m.get()));
    if (!arf_is_zero(absm)) {
        mag_t am;
        mag_init(am);
        arf_get_mag(am, absm);
        mag_mul(r, r, am);
        mag_clear(am);
    }
    if (mag_is_zero(r))
        mag_set_ui_2exp_si(r, 1, -(prec / 2));
    arf_clear(absm);
    mag_set(arb_radref(X.get()), r);
    mag_clear(r);
    auto pX = ev.evaluate(X, mu);
    arb_div(t.get(), gm.get(), y.get(), prec);
    arb_sub(K.get(), m.get(), t.get(), prec);
    arb_div(gpX.get(), pX.fxx.get(), y.get(), prec);
    arb_sub_ui(gpX.get(), gpX.get(), 1, prec);
    arb_neg(gpX.get(), gpX.get());
    arb_sub(t.get(), X.get(), m.get(), prec);
    arb_mul(t.get(), t.get(), gpX.get(), prec);
    arb_add(K.get(), K.get(), t.get(), prec);
    if (!arb_contains_interior(X.get(), K.get())) {
        out.problem = "could not prove the zero of df/dx (Krawczyk test failed at " +
                      std::to_string(prec) +
                      " bits; a critical point where f'' vanishes needs --critical)";
        return out;
    }
    if (!derivative_vanishes(family, K, prec, &out.problem))
        return out;
    out.ok = true;
    out.c = K;
    return out;
}

} // namespace renorm::cascade
