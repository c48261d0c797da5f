#include "test_random.hpp"
#include <renorm/series/compose_graded.hpp>
#include <renorm/series/series.hpp>

#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>
#include <sstream>
#include <stdexcept>
#include <string>

using namespace renorm;
using namespace renorm::series;

namespace {
// Random coefficients with |p_k| <= scale 2^(-bits_per_term k), alternating in sign in a
// pattern of three.
BallPoly random_poly(flint_rand_t st, slong len, slong bits_per_term, double scale, slong prec)
{
    BallPoly p;
    Ball sc(scale);
    for (slong k = 0; k < len; ++k) {
        Ball x;
        arb_urandom(x.get(), st, prec);
        arb_mul_2exp_si(x.get(), x.get(), -bits_per_term * k);
        arb_mul(x.get(), x.get(), sc.get(), prec);
        if (k % 3 == 1)
            arb_neg(x.get(), x.get());
        p.set_coeff(k, x);
    }
    return p;
}

// An inner map like the solver's on its disc: h0 + h1 s + (small, decaying terms), so that
// ||h - h0|| is about |h1| + 0.25.
BallPoly inner_map(flint_rand_t st, slong len, double h0, double h1, slong prec)
{
    BallPoly p = random_poly(st, len, 4, 0.25, prec);
    arb_poly_shift_left(p.get(), p.get(), 2);
    arb_poly_truncate(p.get(), len);
    p.set_coeff(0, Ball(h0));
    p.set_coeff(1, Ball(h1));
    return p;
}

std::string dump_poly(const BallPoly& p)
{
    std::ostringstream os;
    os << "[";
    for (slong k = 0; k < p.length(); ++k)
        os << (k ? ", " : "") << ball::dump(p.coeff(k));
    os << "]";
    return os.str();
}

// log2 of sum_k rad(p_k) (minus a large number for exact polynomials).
double log2_l1_radius(const BallPoly& p)
{
    mag_t r;
    mag_init(r);
    for (slong k = 0; k < p.length(); ++k)
        mag_add(r, r, arb_radref(p.get()->coeffs + k));
    const double l = mag_is_zero(r) ? -1e300 : mag_get_d_log2_approx(r);
    mag_clear(r);
    return l;
}

// The graded composition at prec against Arb's (taylor shift + arb_poly_compose_series, i.e.
// compose_arb) at 4 prec: every coefficient must overlap, the midpoints must agree to
// 2^-(prec - 20) relative to the l1 norm of the truth (plus its own radius), and the length
// must be n at most.
void expect_matches_truth(const BallPoly& f, const BallPoly& h, slong n, slong prec,
                          const std::string& label)
{
    BallPoly got = compose_graded(f, h, n, prec);
    // Source of the check values: Arb's arb_poly_taylor_shift and arb_poly_compose_series
    // at 4x precision.
    BallPoly truth = compose_arb(f, h, n, 4 * prec);
    ASSERT_LE(got.length(), n) << label;
    const std::string inputs = label + " n=" + std::to_string(n) + " prec=" + std::to_string(prec) +
                               "\nf=" + dump_poly(f) + "\nh=" + dump_poly(h);
    Ball norm = norm_l1(truth, 4 * prec);
    Ball tol;
    arb_mul_2exp_si(tol.get(), norm.get(), -(prec - 20));
    const slong len = std::max(got.length(), truth.length());
    for (slong k = 0; k < len; ++k) {
        Ball a = got.coeff(k), b = truth.coeff(k);
        ASSERT_TRUE(overlaps(a, b)) << "coefficient " << k << ": " << enclosure_string(a, 30)
                                    << " vs " << enclosure_string(b, 30) << "\n"
                                    << inputs;
        // |mid a - mid b| <= 2^-(prec-20) ||truth|| + rad b (the truth's own width), in mag_t
        // arithmetic (upper bounds).
        Ball ma, mb, diff;
        arf_set(arb_midref(ma.get()), arb_midref(a.get()));
        arf_set(arb_midref(mb.get()), arb_midref(b.get()));
        arb_sub(diff.get(), ma.get(), mb.get(), 8 * prec);
        mag_t dm, bound;
        mag_init(dm);
        mag_init(bound);
        arb_get_mag(dm, diff.get());
        arb_get_mag(bound, tol.get());
        mag_add(bound, bound, arb_radref(b.get()));
        EXPECT_LE(mag_cmp(dm, bound), 0)
            << "coefficient " << k << " midpoint off by 2^" << mag_get_d_log2_approx(dm)
            << ", allowed 2^" << mag_get_d_log2_approx(bound) << "\n"
            << inputs;
        mag_clear(dm);
        mag_clear(bound);
    }
}
} // namespace

TEST(ComposeGraded, DecayingOuterSeriesMatchesArbAtFourTimesThePrecision)
{
    // f_k ~ 2^(-4k) (1.2 decimal digits a term, as the fixed point at z = 2), inner maps with
    // and without a constant term, short and long truncations.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 11);
    for (int it = 0; it < test_random::multiplier(); ++it) {
        for (slong n : {1, 2, 3, 7, 40, 120}) {
            const slong prec = 64 + 4 * n;
            BallPoly f = random_poly(st, n + 5, 4, 1.0, prec);
            expect_matches_truth(f, inner_map(st, n, 0.4, 0.6, prec), n, prec, "constant term");
            expect_matches_truth(f, inner_map(st, n, 0.0, 0.6, prec), n, prec, "no constant term");
            expect_matches_truth(f, random_poly(st, n, 4, 0.5, prec), n, prec, "tiny inner map");
        }
    }
    flint_randclear(st);
}

TEST(ComposeGraded, LongDecayingCaseMatchesArbAndIsAsTight)
{
    // n = 500 at 1000 bits: the coefficients of f fall below the working precision after about
    // 250 terms, so blocks run at reduced precision and the last ones are dropped into the radii.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 12);
    const slong n = 500, prec = 1000;
    BallPoly f = random_poly(st, n, 4, 1.0, prec);
    BallPoly h = inner_map(st, n, 0.4, 0.6, prec);
    expect_matches_truth(f, h, n, prec, "n = 500");
    // Tightness: the l1 norm of the radii (the norm the solver works in) is within 2^10 of that
    // of Arb's composition at the same precision (source: compose_arb at prec).
    BallPoly got = compose_graded(f, h, n, prec);
    BallPoly arb = compose_arb(f, h, n, prec);
    EXPECT_LT(log2_l1_radius(got), log2_l1_radius(arb) + 10)
        << "graded " << log2_l1_radius(got) << " vs Arb " << log2_l1_radius(arb);
    // Both are radii of rounding errors at 1000 bits of an O(1) result.
    EXPECT_LT(log2_l1_radius(got), -prec + 30);
    flint_randclear(st);
}

TEST(ComposeGraded, TwoThreadsGiveTheSameBitsAsOne)
{
    // n prec = 4.8e6 >= 4e6: with FLINT set to 2 threads the baby steps and the columns of
    // every block are split over two threads (compose_graded.cpp, threads_for). The result must
    // not depend on it (the one-thread path is checked against the truth above).
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 13);
    const slong n = 1200, prec = 4000;
    BallPoly f = random_poly(st, n, 4, 1.0, prec);
    BallPoly h = inner_map(st, n, 0.4, 0.6, prec);
    const int saved = flint_get_num_threads();
    flint_set_num_threads(1);
    BallPoly one = compose_graded(f, h, n, prec);
    flint_set_num_threads(2);
    BallPoly two = compose_graded(f, h, n, prec);
    flint_set_num_threads(saved);
    EXPECT_TRUE(arb_poly_equal(one.get(), two.get())) << "the threaded composition differs";
    flint_randclear(st);
}

TEST(ComposeGraded, AsTightAsArbInTheL1NormWhenTheInnerMapExpands)
{
    // ||h - h0|| = 2.05 > 1 (as v at z >= 8 on the default disc): the bounds B_j grow with j, the
    // high blocks are the large ones, and every Horner value below them must keep their precision
    // (an underestimate of B_j for large j makes this fail: checked by mutation). The l1 norm of
    // the radii must stay within 2^10 of that of Arb's composition at the same precision
    // (source: compose_arb at prec), for flat f and for f decaying one bit a term.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 17);
    const slong n = 150, prec = 400;
    for (slong decay : {0, 1}) {
        BallPoly f = random_poly(st, n, decay, 1.0, prec);
        BallPoly h = inner_map(st, n, 0.2, 1.8, prec);
        expect_matches_truth(f, h, n, prec, "expanding inner map");
        BallPoly got = compose_graded(f, h, n, prec);
        BallPoly arb = compose_arb(f, h, n, prec);
        EXPECT_LT(log2_l1_radius(got), log2_l1_radius(arb) + 10)
            << "decay " << decay << ": graded " << log2_l1_radius(got) << " vs Arb "
            << log2_l1_radius(arb);
    }
    flint_randclear(st);
}

TEST(ComposeGraded, NonDecayingOuterSeriesIsStillEnclosed)
{
    // No decay: every block matters; with ||h - h0|| = 1.55 > 1 the high blocks dominate the
    // bound, and with h0 = 0.9 the Taylor shift mixes everything.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 13);
    for (int it = 0; it < test_random::multiplier(); ++it) {
        for (slong n : {2, 9, 60, 150}) {
            const slong prec = 200;
            BallPoly f = random_poly(st, n, 0, 1.0, prec);
            expect_matches_truth(f, inner_map(st, n, 0.1, 0.5, prec), n, prec, "flat f, small h");
            expect_matches_truth(f, inner_map(st, n, 0.9, 1.3, prec), n, prec, "flat f, large h");
            expect_matches_truth(f, inner_map(st, n, 0.0, -0.8, prec), n, prec, "flat f, h0 = 0");
        }
    }
    flint_randclear(st);
}

TEST(ComposeGraded, HugeAndTinyScalesDoNotUnderflow)
{
    // f scaled by 2^-100000 and by 2^100000: magnitudes far outside the range of doubles.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 14);
    const slong n = 80, prec = 400;
    for (slong e : {-100000, 100000}) {
        BallPoly f = random_poly(st, n, 4, 1.0, prec);
        arb_poly_scalar_mul_2exp_si(f.get(), f.get(), e);
        expect_matches_truth(f, inner_map(st, n, 0.3, 0.7, prec), n, prec,
                             "scale 2^" + std::to_string(e));
    }
    flint_randclear(st);
}

TEST(ComposeGraded, SpecialShapes)
{
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 15);
    const slong prec = 200;
    BallPoly f = random_poly(st, 30, 3, 1.0, prec);
    // A constant inner map: only f(h0) survives (source: Arb's arb_poly_evaluate at 4x).
    BallPoly c;
    c.set_coeff(0, Ball(0.3));
    BallPoly got = compose_graded(f, c, 20, prec);
    ASSERT_LE(got.length(), 1);
    Ball direct;
    arb_poly_evaluate(direct.get(), f.get(), c.coeff(0).get(), 4 * prec);
    EXPECT_TRUE(overlaps(got.coeff(0), direct));
    EXPECT_LT(got.coeff(0).radius_upper(), 1e-50);
    // f = 0 gives 0; n = 0 gives the empty polynomial.
    EXPECT_EQ(compose_graded(BallPoly(), inner_map(st, 10, 0.2, 0.5, prec), 10, prec).length(), 0);
    EXPECT_EQ(compose_graded(f, inner_map(st, 10, 0.2, 0.5, prec), 0, prec).length(), 0);
    // A sparse f: whole blocks of zeros (degrees 3..24), then a few terms.
    BallPoly sparse = truncated(f, 3);
    sparse.set_coeff(25, Ball(0.001));
    sparse.set_coeff(27, Ball(-0.002));
    expect_matches_truth(sparse, inner_map(st, 40, 0.2, 0.5, prec), 40, prec, "sparse f");
    // Inputs with radii (uncertain balls): still enclosed.
    BallPoly fuzzy = f;
    for (slong k = 0; k < fuzzy.length(); ++k)
        mag_set_ui_2exp_si(arb_radref(fuzzy.get()->coeffs + k), 1, -100 - 3 * k);
    expect_matches_truth(fuzzy, inner_map(st, 30, 0.2, 0.5, prec), 30, prec, "fuzzy f");
    // An inner map longer than n, an f longer than n.
    expect_matches_truth(random_poly(st, 90, 3, 1.0, prec), inner_map(st, 90, 0.2, 0.5, prec), 25,
                         prec, "inputs longer than n");
    flint_randclear(st);
}

TEST(ComposeGraded, InputsMayBeTheSamePolynomial)
{
    // f(f(s)) with f(0) = 0.25: the same object passed twice.
    flint_rand_t st;
    flint_randinit(st);
    flint_randseed(st, test_random::seed(), 16);
    BallPoly f = inner_map(st, 60, 0.25, 0.5, 300);
    BallPoly copy = f;
    BallPoly got = compose_graded(f, f, 60, 300);
    BallPoly separate = compose_graded(copy, f, 60, 300);
    for (slong k = 0; k < 60; ++k)
        EXPECT_TRUE(arb_equal(got.get()->coeffs + k, separate.get()->coeffs + k)) << k;
    expect_matches_truth(f, f, 60, 300, "aliased");
    flint_randclear(st);
}

TEST(ComposeGraded, RejectsMisuse)
{
    BallPoly f;
    f.set_coeff(0, Ball(1.0));
    EXPECT_THROW(compose_graded(f, f, 3, 1), std::invalid_argument);
    EXPECT_THROW(compose_graded(f, f, -1, 64), std::invalid_argument);
}
