// Source: hand-derived derivatives (exact calculus) evaluated by Arb at 4x precision.
// Forward-mode derivatives against derivatives worked out by hand and evaluated directly with
// Arb at 4x the precision (STYLE.md §6: containment against an independent truth).
// Sources of the check values: derivatives of the test expressions computed by hand from the
// rules of calculus (exact), and evaluated by Arb at 4x the precision.
#include <renorm/cascade/expression.hpp>
#include <renorm/cascade/jet_evaluator.hpp>

#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>

using namespace renorm;
using namespace renorm::cascade;

namespace {

using Exact = std::function<void(arb_t, const arb_t, const arb_t, slong)>;

struct Case {
    std::string text;
    double x, mu;
    Exact f, fx, fmu, fxx, fxmu;
};

// Checks that each AD output at `prec` overlaps the exact value computed at 4 prec and that
// its radius is small (so a wrong formula cannot hide in a wide ball).
void check(const Case& c, slong prec)
{
    JetEvaluator ev(Expression::parse(c.text), 2, prec);
    ball::Ball x(c.x), mu(c.mu);
    Partials p = ev.evaluate(x, mu);
    const ball::Ball* got[] = {&p.f, &p.fx, &p.fmu, &p.fxx, &p.fxmu};
    const Exact* want[] = {&c.f, &c.fx, &c.fmu, &c.fxx, &c.fxmu};
    const char* names[] = {"f", "f_x", "f_mu", "f_xx", "f_xmu"};
    for (int i = 0; i < 5; ++i) {
        ball::Ball w;
        (*want[i])(w.get(), x.get(), mu.get(), 4 * prec);
        EXPECT_TRUE(ball::overlaps(*got[i], w))
            << c.text << " " << names[i] << " at x=" << c.x << " mu=" << c.mu
            << ": AD " << ball::enclosure_string(*got[i], 30)
            << " exact " << ball::enclosure_string(w, 30);
        EXPECT_LT(got[i]->radius_upper(), 1e-25) << c.text << " " << names[i];
    }
}

} // namespace

TEST(JetEvaluator, SineFamilyDerivatives)
{
    // f = mu sin(pi x): f_x = mu pi cos(pi x), f_mu = sin(pi x),
    // f_xx = -mu pi^2 sin(pi x), f_xmu = pi cos(pi x).
    Case c{"mu*sin(pi*x)", 0.3, 0.87,
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_sin_pi(r, x, p);
               arb_mul(r, r, mu, p);
           },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t pi;
               arb_init(pi);
               arb_const_pi(pi, p);
               arb_cos_pi(r, x, p);
               arb_mul(r, r, mu, p);
               arb_mul(r, r, pi, p);
               arb_clear(pi);
           },
           [](arb_t r, const arb_t x, const arb_t, slong p) { arb_sin_pi(r, x, p); },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t pi;
               arb_init(pi);
               arb_const_pi(pi, p);
               arb_sin_pi(r, x, p);
               arb_mul(r, r, mu, p);
               arb_mul(r, r, pi, p);
               arb_mul(r, r, pi, p);
               arb_neg(r, r);
               arb_clear(pi);
           },
           [](arb_t r, const arb_t x, const arb_t, slong p) {
               arb_t pi;
               arb_init(pi);
               arb_const_pi(pi, p);
               arb_cos_pi(r, x, p);
               arb_mul(r, r, pi, p);
               arb_clear(pi);
           }};
    check(c, 128);
}

TEST(JetEvaluator, QuotientExpLogDerivatives)
{
    // f = exp(mu x) / (1 + x^2) + log(mu + x):
    // f_x = exp(mu x) (mu (1+x^2) - 2x) / (1+x^2)^2 + 1/(mu+x)
    // f_mu = x exp(mu x) / (1+x^2) + 1/(mu+x)
    // f_xx = exp(mu x) [ (mu^2 (1+x^2) - 2)(1+x^2) - 4x (mu (1+x^2) - 2x) ] / (1+x^2)^3
    //        - 1/(mu+x)^2        (derived by hand: d/dx of g/q^2 with g = e (mu q - 2x), q = 1+x^2)
    // f_xmu = exp(mu x) ((1 + mu x)(1+x^2) - 2x^2) / (1+x^2)^2 - 1/(mu+x)^2
    Case c{"exp(mu*x)/(1+x^2) + log(mu + x)", 0.4, 1.3,
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t e, q, l;
               arb_init(e); arb_init(q); arb_init(l);
               arb_mul(e, mu, x, p); arb_exp(e, e, p);
               arb_sqr(q, x, p); arb_add_ui(q, q, 1, p);
               arb_div(r, e, q, p);
               arb_add(l, mu, x, p); arb_log(l, l, p);
               arb_add(r, r, l, p);
               arb_clear(e); arb_clear(q); arb_clear(l);
           },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t e, q, t, l;
               arb_init(e); arb_init(q); arb_init(t); arb_init(l);
               arb_mul(e, mu, x, p); arb_exp(e, e, p);
               arb_sqr(q, x, p); arb_add_ui(q, q, 1, p);
               arb_mul(t, mu, q, p); arb_submul_si(t, x, 2, p); // mu q - 2x
               arb_mul(t, t, e, p);
               arb_div(t, t, q, p); arb_div(t, t, q, p);
               arb_add(l, mu, x, p); arb_inv(l, l, p);
               arb_add(r, t, l, p);
               arb_clear(e); arb_clear(q); arb_clear(t); arb_clear(l);
           },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t e, q, l;
               arb_init(e); arb_init(q); arb_init(l);
               arb_mul(e, mu, x, p); arb_exp(e, e, p);
               arb_sqr(q, x, p); arb_add_ui(q, q, 1, p);
               arb_mul(r, x, e, p); arb_div(r, r, q, p);
               arb_add(l, mu, x, p); arb_inv(l, l, p);
               arb_add(r, r, l, p);
               arb_clear(e); arb_clear(q); arb_clear(l);
           },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t e, q, a, b, l;
               arb_init(e); arb_init(q); arb_init(a); arb_init(b); arb_init(l);
               arb_mul(e, mu, x, p); arb_exp(e, e, p);
               arb_sqr(q, x, p); arb_add_ui(q, q, 1, p);
               // a = (mu^2 q - 2) q
               arb_sqr(a, mu, p); arb_mul(a, a, q, p);
               arb_sub_ui(a, a, 2, p); arb_mul(a, a, q, p);
               // b = 4x (mu q - 2x)
               arb_mul(b, mu, q, p); arb_submul_si(b, x, 2, p); arb_mul(b, b, x, p);
               arb_mul_2exp_si(b, b, 2);
               arb_sub(a, a, b, p);
               arb_mul(a, a, e, p);
               arb_div(a, a, q, p); arb_div(a, a, q, p); arb_div(a, a, q, p);
               arb_add(l, mu, x, p); arb_sqr(l, l, p); arb_inv(l, l, p);
               arb_sub(r, a, l, p);
               arb_clear(e); arb_clear(q); arb_clear(a); arb_clear(b); arb_clear(l);
           },
           [](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t e, q, a, b, l;
               arb_init(e); arb_init(q); arb_init(a); arb_init(b); arb_init(l);
               arb_mul(e, mu, x, p); arb_exp(e, e, p);
               arb_sqr(q, x, p); arb_add_ui(q, q, 1, p);
               arb_mul(a, mu, x, p); arb_add_ui(a, a, 1, p); arb_mul(a, a, q, p);
               arb_sqr(b, x, p); arb_mul_2exp_si(b, b, 1); arb_sub(a, a, b, p);
               arb_mul(a, a, e, p); arb_div(a, a, q, p); arb_div(a, a, q, p);
               arb_add(l, mu, x, p); arb_sqr(l, l, p); arb_inv(l, l, p);
               arb_sub(r, a, l, p);
               arb_clear(e); arb_clear(q); arb_clear(a); arb_clear(b); arb_clear(l);
           }};
    check(c, 160);
}

TEST(JetEvaluator, PowersSqrtTanCos)
{
    // f = abs(x)^2.5 * mu + sqrt(x + 2) + tan(x) - cos(mu*x) + x^mu
    // f_x   = 2.5 mu |x|^1.5 sgn(x) + 1/(2 sqrt(x+2)) + 1 + tan^2 x + mu sin(mu x) + mu x^(mu-1)
    // f_mu  = |x|^2.5 + x sin(mu x) + x^mu log x
    // f_xx  = 3.75 mu |x|^0.5 - 1/(4 (x+2)^1.5) + 2 tan x (1 + tan^2 x) + mu^2 cos(mu x)
    //         + mu (mu-1) x^(mu-2)
    // f_xmu = 2.5 |x|^1.5 sgn(x) + sin(mu x) + mu x cos(mu x) + x^(mu-1) (1 + mu log x)
    // at x = 0.6 > 0 (so sgn = 1 and x^mu is defined).
    auto pw = [](arb_t r, const arb_t x, double q, slong p) {
        arb_t Q;
        arb_init(Q);
        arb_set_d(Q, q);
        arb_pow(r, x, Q, p);
        arb_clear(Q);
    };
    Case c{"abs(x)^2.5*mu + sqrt(x + 2) + tan(x) - cos(mu*x) + x^mu", 0.6, 1.7,
           [pw](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t t;
               arb_init(t);
               pw(r, x, 2.5, p); arb_mul(r, r, mu, p);
               arb_add_ui(t, x, 2, p); arb_sqrt(t, t, p); arb_add(r, r, t, p);
               arb_tan(t, x, p); arb_add(r, r, t, p);
               arb_mul(t, mu, x, p); arb_cos(t, t, p); arb_sub(r, r, t, p);
               arb_pow(t, x, mu, p); arb_add(r, r, t, p);
               arb_clear(t);
           },
           [pw](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t t, u;
               arb_init(t); arb_init(u);
               pw(r, x, 1.5, p); arb_mul(r, r, mu, p); arb_mul_2exp_si(r, r, -1); arb_mul_ui(r, r, 5, p);
               arb_add_ui(t, x, 2, p); arb_sqrt(t, t, p); arb_mul_2exp_si(t, t, 1); arb_inv(t, t, p);
               arb_add(r, r, t, p);
               arb_tan(t, x, p); arb_sqr(t, t, p); arb_add_ui(t, t, 1, p); arb_add(r, r, t, p);
               arb_mul(t, mu, x, p); arb_sin(t, t, p); arb_mul(t, t, mu, p); arb_add(r, r, t, p);
               arb_sub_ui(u, mu, 1, p); arb_pow(t, x, u, p); arb_mul(t, t, mu, p); arb_add(r, r, t, p);
               arb_clear(t); arb_clear(u);
           },
           [pw](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t t, u;
               arb_init(t); arb_init(u);
               pw(r, x, 2.5, p);
               arb_mul(t, mu, x, p); arb_sin(t, t, p); arb_mul(t, t, x, p); arb_add(r, r, t, p);
               arb_pow(t, x, mu, p); arb_log(u, x, p); arb_mul(t, t, u, p); arb_add(r, r, t, p);
               arb_clear(t); arb_clear(u);
           },
           [pw](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t t, u;
               arb_init(t); arb_init(u);
               pw(r, x, 0.5, p); arb_mul(r, r, mu, p); arb_mul_ui(r, r, 15, p); arb_mul_2exp_si(r, r, -2);
               arb_add_ui(t, x, 2, p); pw(t, t, 1.5, p); arb_mul_2exp_si(t, t, 2); arb_inv(t, t, p);
               arb_sub(r, r, t, p);
               arb_tan(t, x, p); arb_sqr(u, t, p); arb_add_ui(u, u, 1, p); arb_mul(t, t, u, p);
               arb_mul_2exp_si(t, t, 1); arb_add(r, r, t, p);
               arb_mul(t, mu, x, p); arb_cos(t, t, p); arb_mul(t, t, mu, p); arb_mul(t, t, mu, p);
               arb_add(r, r, t, p);
               arb_sub_ui(u, mu, 2, p); arb_pow(t, x, u, p); arb_mul(t, t, mu, p);
               arb_sub_ui(u, mu, 1, p); arb_mul(t, t, u, p); arb_add(r, r, t, p);
               arb_clear(t); arb_clear(u);
           },
           [pw](arb_t r, const arb_t x, const arb_t mu, slong p) {
               arb_t t, u;
               arb_init(t); arb_init(u);
               pw(r, x, 1.5, p); arb_mul_ui(r, r, 5, p); arb_mul_2exp_si(r, r, -1);
               arb_mul(t, mu, x, p); arb_sin(t, t, p); arb_add(r, r, t, p);
               arb_mul(t, mu, x, p); arb_cos(t, t, p); arb_mul(t, t, mu, p); arb_mul(t, t, x, p);
               arb_add(r, r, t, p);
               arb_log(u, x, p); arb_mul(u, u, mu, p); arb_add_ui(u, u, 1, p);
               arb_sub_ui(t, mu, 1, p); arb_pow(t, x, t, p); arb_mul(t, t, u, p); arb_add(r, r, t, p);
               arb_clear(t); arb_clear(u);
           }};
    check(c, 160);
}

TEST(JetEvaluator, AbsolutePowerAtTheCriticalPoint)
{
    // f = 1 - mu |x|^z, z = 3.5, at x = 0: f = 1, f_x = 0, f_mu = 0 exactly (z > 1).
    JetEvaluator ev(Expression::parse("1 - mu*abs(x)^3.5"), 1, 128);
    Partials p = ev.evaluate(ball::Ball(0.0), ball::Ball(1.5));
    EXPECT_TRUE(arb_is_one(p.f.get()));
    EXPECT_TRUE(arb_is_zero(p.fx.get()));
    EXPECT_TRUE(arb_is_zero(p.fmu.get()));
    // On a ball containing 0, f_x = -mu z |x|^(z-1) sgn(x) is enclosed: |f_x| <= 1.5*3.5*r^2.5.
    ball::Ball X;
    mag_set_d(arb_radref(X.get()), 0.01);
    Partials q = ev.evaluate(X, ball::Ball(1.5));
    ball::Ball bound(1.5 * 3.5 * std::pow(0.01, 2.5) * 1.000001);
    ball::Ball w;
    arb_union(w.get(), bound.get(), ball::Ball(-1.5 * 3.5 * std::pow(0.01, 2.5) * 1.000001).get(), 64);
    EXPECT_TRUE(ball::contains(w, q.fx)) << ball::enclosure_string(q.fx, 10);
    EXPECT_TRUE(arb_contains_zero(q.fx.get()));
    // A non-integer power of a negative number is not real: NaN, never a number.
    JetEvaluator bad(Expression::parse("x^2.5"), 0, 64);
    EXPECT_FALSE(bad.evaluate(ball::Ball(-0.5), ball::Ball(0.0)).f.is_finite());
}

TEST(JetEvaluator, CenteredFormEnclosesAndIsTighter)
{
    // The logistic map over a ball around 0.7: both forms contain f at the end points, and the
    // centred form is tighter because |f'| < |mu|(|x| + |1-x|).
    const slong prec = 128;
    JetEvaluator ev(Expression::parse("mu*x*(1-x)"), 1, prec);
    ball::Ball X(0.7), mu(3.5);
    mag_set_d(arb_radref(X.get()), 1e-6);
    ball::Ball direct, centred, fx, fm, fx2, fm2;
    ev.evaluate(direct.get(), fx.get(), fm.get(), nullptr, nullptr, X.get(), mu.get());
    ev.evaluate_centered(centred.get(), fx2.get(), fm2.get(), nullptr, nullptr, X.get(), mu.get());
    for (double xe : {0.7 - 1e-6, 0.7, 0.7 + 1e-6}) {
        ball::Ball v;
        JetEvaluator e0(Expression::parse("mu*x*(1-x)"), 0, 4 * prec);
        v = e0.evaluate(ball::Ball(xe), mu).f;
        EXPECT_TRUE(ball::overlaps(centred, v));
        EXPECT_TRUE(ball::overlaps(direct, v));
    }
    EXPECT_LT(centred.radius_upper(), 0.5 * direct.radius_upper());
    EXPECT_TRUE(ball::overlaps(fx, fx2));
}
