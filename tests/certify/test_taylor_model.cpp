// Source: exact polynomial identities, evaluated independently by Arb at higher precision.
// Containment tests of the Taylor-model arithmetic against exact polynomial results.
// Sources of the check values: exact polynomial identities ((1 + t)^2 = 1 + 2t + t^2, products and
// compositions of explicit polynomials), evaluated independently by Arb at higher precision.
#include <renorm/series/taylor_model.hpp>

#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>
#include <random>

using namespace renorm::series;
using renorm::ball::Ball;
using renorm::ball::BallPoly;

namespace {
unsigned test_seed()
{
    const char* s = std::getenv("RENORM_TEST_SEED");
    unsigned seed = s ? static_cast<unsigned>(std::strtoul(s, nullptr, 10)) : 20261202u;
    std::cout << "RENORM_TEST_SEED=" << seed << "\n";
    return seed;
}

BallPoly random_poly(std::mt19937& rng, slong len, double scale)
{
    std::uniform_real_distribution<double> u(-1.0, 1.0);
    BallPoly p;
    for (slong k = 0; k < len; ++k)
        p.set_coeff(k, Ball(u(rng) * scale / static_cast<double>(len)));
    return p;
}

/// True when the exact function f (a polynomial given exactly) is a member of the model m:
/// every coefficient of degree < n in its ball up to eps, and the l1 distance within eps.
bool member(const TaylorModel& m, const BallPoly& exact, slong prec)
{
    // ||exact - p||: the difference must be <= eps, computed as a rigorous lower bound of the
    // distance to the ball set: sum over k of the distance from exact_k to the ball p_k.
    double lower = 0;
    for (slong k = 0; k < std::max(exact.length(), m.p.length()); ++k) {
        Ball e = exact.coeff(k), b = k < m.n ? m.p.coeff(k) : Ball();
        Ball d;
        arb_sub(d.get(), e.get(), b.get(), prec);
        mag_t lo;
        mag_init(lo);
        arb_get_mag_lower(lo, d.get());
        lower += mag_get_d(lo) * (1 - 1e-15);
        mag_clear(lo);
    }
    return lower <= m.eps.approx_double() * (1 + 1e-12) + 1e-300;
}
} // namespace

TEST(TaylorModel, ProductEnclosesExactProductAndItsTail)
{
    std::mt19937 rng(test_seed());
    for (int rep = 0; rep < 20; ++rep) {
        BallPoly f = random_poly(rng, 12, 1.0), g = random_poly(rng, 12, 1.0);
        BallPoly exact;
        arb_poly_mul(exact.get(), f.get(), g.get(), 256);
        TaylorModel fm = tm_from_poly(f, 12, 128), gm = tm_from_poly(g, 12, 128);
        TaylorModel pm = tm_mul(fm, gm, 128);
        EXPECT_TRUE(member(pm, exact, 256));
        // The dropped tail is really there: eps >= ||coefficients 12..22|| > 0.
        EXPECT_GT(pm.eps.approx_double(), 0.0);
    }
}

TEST(TaylorModel, ComposeEnclosesExactComposition)
{
    std::mt19937 rng(test_seed() + 1);
    for (int rep = 0; rep < 10; ++rep) {
        BallPoly f = random_poly(rng, 8, 2.0), h = random_poly(rng, 4, 0.8);
        BallPoly exact;
        arb_poly_compose(exact.get(), f.get(), h.get(), 512); // degree 21, exact polynomial
        TaylorModel fm = tm_from_poly(f, 10, 128), hm = tm_from_poly(h, 10, 128);
        TaylorModel cm = tm_compose(fm, hm, 128);
        ASSERT_TRUE(cm.is_finite());
        EXPECT_TRUE(member(cm, exact, 512));
    }
}

TEST(TaylorModel, ComposeAccountsForTheInnerRemainder)
{
    // f = s^3, h = 0.5 s + E with ||E|| <= 0.1: the member E = 0.1 s^2 gives
    // (0.5 s + 0.1 s^2)^3 which must be a member of the result.
    BallPoly f;
    f.set_coeff(3, Ball(1.0));
    BallPoly h;
    h.set_coeff(1, Ball(0.5));
    TaylorModel fm = tm_from_poly(f, 6, 128), hm = tm_from_poly(h, 6, 128);
    hm.eps = Bound(0.1);
    TaylorModel cm = tm_compose(fm, hm, 128);
    BallPoly hh = h, exact;
    hh.set_coeff(2, Ball(0.1));
    arb_poly_compose(exact.get(), f.get(), hh.get(), 256);
    EXPECT_TRUE(member(cm, exact, 256));
    // ||h|| > 1 violates the hypothesis of (B2): no bound.
    hm.eps = Bound(0.6);
    EXPECT_FALSE(tm_compose(fm, hm, 128).is_finite());
}

TEST(TaylorModel, DerivativeComposeEnclosesExact)
{
    std::mt19937 rng(test_seed() + 2);
    BallPoly f = random_poly(rng, 9, 2.0), h = random_poly(rng, 3, 0.7);
    BallPoly df, exact;
    arb_poly_derivative(df.get(), f.get(), 256);
    arb_poly_compose(exact.get(), df.get(), h.get(), 256);
    TaylorModel cm = tm_compose_derivative(tm_from_poly(f, 9, 128), tm_from_poly(h, 9, 128), 128);
    ASSERT_TRUE(cm.is_finite());
    EXPECT_TRUE(member(cm, exact, 256));
}

TEST(TaylorModel, PowerExactIntegerAndBinomialSeries)
{
    // w = 2 + 0.3 s - 0.2 s^2: w^2 exactly, and w^(1/2) squared gives back w.
    BallPoly w;
    w.set_coeff(0, Ball(2.0));
    w.set_coeff(1, Ball(0.3));
    w.set_coeff(2, Ball(-0.2));
    TaylorModel wm = tm_from_poly(w, 30, 256);
    BallPoly sq;
    arb_poly_mul(sq.get(), w.get(), w.get(), 256);
    TaylorModel p2 = tm_pow(wm, Ball(slong{2}), 256);
    EXPECT_TRUE(member(p2, sq, 256));
    EXPECT_EQ(p2.eps.approx_double(), 0.0); // exact integer power: no series tail

    Ball half(0.5);
    TaylorModel root = tm_pow(wm, half, 256);
    ASSERT_TRUE(root.is_finite());
    TaylorModel back = tm_mul(root, root, 256);
    // back contains w: |back_k - w_k| summed within eps.
    EXPECT_TRUE(member(back, w, 256));
    EXPECT_LT(back.eps.approx_double(), 1e-10); // coefficients decay like 0.4^k (root of w at s = -2.5)
    // The square root at s = 1 must contain sqrt(2.1).
    Ball one(slong{1});
    Ball val = tm_evaluate(root, one, 256), ref;
    arb_set_d(ref.get(), 2.1);
    arb_sqrt(ref.get(), ref.get(), 256);
    EXPECT_TRUE(arb_contains(val.get(), ref.get()));
    // A w that reaches 0 on the disc: no bound.
    w.set_coeff(1, Ball(2.5));
    EXPECT_FALSE(tm_pow(tm_from_poly(w, 30, 256), half, 256).is_finite());
}

TEST(TaylorModel, SupKRkIsTheMaximum)
{
    Bound r(0.9);
    double best = 0;
    for (int k = 1; k < 1000; ++k)
        best = std::max(best, k * std::pow(0.9, k - 1));
    const double got = sup_k_rk(r, 64).approx_double();
    EXPECT_GE(got, best);
    EXPECT_LT(got, best * 1.001);
    EXPECT_FALSE(sup_k_rk(Bound(1.0), 64).is_finite());
}
