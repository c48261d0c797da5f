// Source: none needed beyond closed forms worked out beside each check (e.g. the l1 norm 1.875 of
// 1 + s/2 + s^2/4 + s^3/8, a geometric decay rate of exactly 1 digit a term); no published constants.
#include "test_random.hpp"
#include <renorm/series/compose_graded.hpp>
#include <renorm/series/series.hpp>

#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>

using namespace renorm;
using namespace renorm::series;

namespace {
BallPoly random_poly(flint_rand_t st, slong len, double decay, slong prec)
{
    BallPoly p;
    for (slong k = 0; k < len; ++k) {
        Ball x;
        arb_urandom(x.get(), st, prec);
        arb_mul_2exp_si(x.get(), x.get(), -static_cast<slong>(decay * static_cast<double>(k)));
        if (k % 2)
            arb_neg(x.get(), x.get());
        p.set_coeff(k, x);
    }
    return p;
}
} // namespace

TEST(Series, ComposeEqualsEvaluationOfTheComposition)
{
    // With n > deg f * deg h the truncated composition is the whole polynomial f(h), so its value
    // at a point must overlap f(h(s)) evaluated directly at 4x the precision.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 7);
    for (int it = 0; it < 5 * test_random::multiplier(); ++it) {
        BallPoly f = random_poly(st, 8, 1.0, 200);
        BallPoly h = random_poly(st, 4, 1.5, 200);
        BallPoly fh = compose(f, h, 8 * 4, 200);
        Ball s(0.37), hs, direct, via;
        arb_poly_evaluate(hs.get(), h.get(), s.get(), 800);
        arb_poly_evaluate(direct.get(), f.get(), hs.get(), 800);
        via = evaluate(fh, s, 200);
        EXPECT_TRUE(overlaps(direct, via)) << enclosure_string(direct, 40) << " vs " << enclosure_string(via, 40);
        EXPECT_LT(via.radius_upper(), 1e-50);
    }
    flint_randclear(st);
}

TEST(Series, ComposeAffineAgreesWithGeneralCompose)
{
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 11);
    BallPoly f = random_poly(st, 30, 1.0, 300);
    Ball b0(-0.6723), b1(0.1596);
    BallPoly lin;
    lin.set_coeff(0, b0);
    lin.set_coeff(1, b1);
    BallPoly x = compose_affine(f, b0, b1, 30, 300);
    BallPoly y = compose(f, lin, 30, 300);
    for (slong k = 0; k < 30; ++k)
        EXPECT_TRUE(overlaps(x.coeff(k), y.coeff(k))) << "k = " << k;
    flint_randclear(st);
}

TEST(Series, ComposeVariantsOverlapAndComposeDispatches)
{
    // compose_arb (Arb's arb_poly_compose_series) and compose_graded must overlap coefficient by
    // coefficient, for decaying and flat f, with h(0) != 0; compose must be exactly the variant
    // its cutoff picks.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 12);
    for (slong n : {3, 15, 16, 17, 60, 200}) {
        for (double decay : {3.0, 0.0}) {
            BallPoly f = random_poly(st, n, decay, 400);
            BallPoly h = random_poly(st, n, 2.0, 400);
            h.set_coeff(0, Ball(0.35));
            BallPoly a = compose_arb(f, h, n, 400);
            BallPoly g = compose_graded(f, h, n, 400);
            ASSERT_EQ(a.length(), g.length()) << "n = " << n;
            for (slong k = 0; k < n; ++k)
                EXPECT_TRUE(overlaps(a.coeff(k), g.coeff(k)))
                    << "n = " << n << ", decay " << decay << ", k = " << k << ": "
                    << enclosure_string(a.coeff(k), 30) << " vs " << enclosure_string(g.coeff(k), 30);
            BallPoly c = compose(f, h, n, 400);
            const BallPoly& picked = n >= compose_graded_cutoff ? g : a;
            ASSERT_EQ(c.length(), picked.length());
            for (slong k = 0; k < c.length(); ++k)
                EXPECT_TRUE(arb_equal(c.get()->coeffs + k, picked.get()->coeffs + k)) << n << " " << k;
        }
    }
    flint_randclear(st);
}

TEST(Series, ComposeWithRandomCutoffEqualsEvaluation)
{
    // The cutoff set at random (STYLE.md §6): compose must still give f(h) exactly as a
    // polynomial (n > deg f * deg h), checked at a point against Arb's arb_poly_evaluate of f at
    // h(s), both at 4x the precision.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 13);
    const slong saved = compose_graded_cutoff;
    compose_graded_cutoff = 1 + static_cast<slong>(n_randint(st, 64));
    std::cerr << "compose_graded_cutoff=" << compose_graded_cutoff << "\n";
    for (int it = 0; it < 5 * test_random::multiplier(); ++it) {
        BallPoly f = random_poly(st, 10, 1.0, 200);
        BallPoly h = random_poly(st, 5, 1.5, 200);
        const slong n = 10 * 5;
        BallPoly fh = compose(f, h, n, 200);
        Ball s(-0.61), hs, direct;
        arb_poly_evaluate(hs.get(), h.get(), s.get(), 800);
        arb_poly_evaluate(direct.get(), f.get(), hs.get(), 800);
        Ball via = evaluate(fh, s, 200);
        EXPECT_TRUE(overlaps(direct, via)) << enclosure_string(direct, 40) << " vs " << enclosure_string(via, 40);
        EXPECT_LT(via.radius_upper(), 1e-50);
    }
    compose_graded_cutoff = saved;
    flint_randclear(st);
}

TEST(Series, PowSeriesMatchesExactBinomials)
{
    // (1 + s)^2 = 1 + 2 s + s^2 exactly; (1 + s)^(1/2) squared is 1 + s.
    BallPoly w;
    w.set_coeff(0, Ball(slong{1}));
    w.set_coeff(1, Ball(slong{1}));
    BallPoly sq = pow_series(w, Ball(slong{2}), 6, 128);
    EXPECT_TRUE(arb_contains_si(sq.coeff(0).get(), 1));
    EXPECT_TRUE(arb_contains_si(sq.coeff(1).get(), 2));
    EXPECT_TRUE(arb_contains_si(sq.coeff(2).get(), 1));
    EXPECT_TRUE(arb_contains_si(sq.coeff(3).get(), 0));
    BallPoly root = pow_series(w, Ball(0.5), 20, 256);
    BallPoly back = mullow(root, root, 20, 256);
    EXPECT_TRUE(arb_contains_si(back.coeff(0).get(), 1));
    EXPECT_TRUE(arb_contains_si(back.coeff(1).get(), 1));
    for (slong k = 2; k < 20; ++k)
        EXPECT_TRUE(arb_contains_si(back.coeff(k).get(), 0)) << "k = " << k;
    BallPoly neg;
    neg.set_coeff(0, Ball(-1.0));
    EXPECT_THROW(pow_series(neg, Ball(0.5), 4, 64), std::invalid_argument);
}

TEST(Series, NormAndDecay)
{
    const double c[4] = {1.0, -0.5, 0.25, -0.125};
    BallPoly p = from_doubles(c, 4);
    Ball n = norm_l1(p, 64);
    // an upper bound, rounded upward in 30-bit magnitude arithmetic
    EXPECT_GE(n.approx_double(), 1.875);
    EXPECT_LE(n.approx_double(), 1.875 * (1 + 1e-8));
    // coefficients 10^-k decay one digit a term
    BallPoly q;
    for (slong k = 0; k < 40; ++k) {
        Ball x;
        arb_set_ui(x.get(), 10);
        arb_pow_ui(x.get(), x.get(), static_cast<ulong>(k), 128);
        arb_inv(x.get(), x.get(), 128);
        q.set_coeff(k, x);
    }
    EXPECT_NEAR(approx_decay_rate(q), 1.0, 1e-6);
    EXPECT_THROW(mullow(p, p, 3, 1), std::invalid_argument);
}

TEST(Series, DiscMapsYToS)
{
    Disc d{0.5, 0.625};
    Ball s = d.to_s(Ball(slong{1}), 64);
    EXPECT_DOUBLE_EQ(s.approx_double(), 0.8);
}
