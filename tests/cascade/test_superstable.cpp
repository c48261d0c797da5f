// Superstable parameters: orbit enclosures, Krawczyk certificates (positive and negative), and
// closed forms of the first levels.
#include <renorm/cascade/family.hpp>
#include <renorm/cascade/superstable.hpp>

#include <gtest/gtest.h>

using namespace renorm;
using namespace renorm::cascade;

namespace {

ball::Ball critical(const Family& f, slong prec)
{
    CriticalPoint cp = critical_point(f, prec);
    EXPECT_TRUE(cp.ok) << cp.problem;
    return cp.c;
}

SuperstableLevel locate(const Family& f, slong n, double guess, double spacing, slong prec)
{
    return locate_superstable(f, critical(f, prec), n, ball::Ball(guess), spacing, 60, prec);
}

} // namespace

TEST(Superstable, LogisticFirstLevelsMatchClosedForms)
{
    // Classical facts (common practice), closed forms evaluated by Arb: for mu x (1 - x),
    // mu_0 = 2 (f(1/2) = mu/4 = 1/2) and mu_1 = 1 + sqrt(5) (f(f(1/2)) = 1/2).
    const slong prec = 128;
    Family f = make_builtin_family("logistic");
    SuperstableLevel l0 = locate(f, 0, 2.1, 0.5, prec);
    ASSERT_EQ(l0.cert.status, Status::certified) << l0.problem;
    ball::Ball two(slong(2));
    EXPECT_TRUE(ball::contains(l0.cert.mu, two)) << ball::enclosure_string(l0.cert.mu, 30);

    SuperstableLevel l1 = locate(f, 1, 3.2, 1.2, prec);
    ASSERT_EQ(l1.cert.status, Status::certified) << l1.problem;
    ball::Ball golden;
    arb_sqrt_ui(golden.get(), 5, 4 * prec);
    arb_add_ui(golden.get(), golden.get(), 1, 4 * prec);
    EXPECT_TRUE(ball::contains(l1.cert.mu, golden)) << ball::enclosure_string(l1.cert.mu, 40);
    EXPECT_LT(l1.cert.mu.radius_upper(), 1e-25);
    EXPECT_TRUE(l1.cert.exact_period);
    // d_1 = f(c) - c = mu_1/4 - 1/2 = (sqrt(5) - 1)/4 at mu_1.
    ball::Ball d1;
    arb_sqrt_ui(d1.get(), 5, 4 * prec);
    arb_sub_ui(d1.get(), d1.get(), 1, 4 * prec);
    arb_mul_2exp_si(d1.get(), d1.get(), -2);
    EXPECT_TRUE(ball::contains(l1.cert.half, d1)) << ball::enclosure_string(l1.cert.half, 30);
}

TEST(Superstable, QuadraticAndCubicPeriodTwo)
{
    // 1 - mu x^2: f(f(0)) = 1 - mu = 0 gives mu_1 = 1 (common practice).
    // 1 - mu x^2 + x^3/4: f(f(0)) = f(1) = 5/4 - mu gives mu_1 = 5/4 (worked out by hand).
    const slong prec = 128;
    SuperstableLevel q = locate(make_builtin_family("quadratic"), 1, 1.05, 0.3, prec);
    ASSERT_EQ(q.cert.status, Status::certified) << q.problem;
    EXPECT_TRUE(ball::contains(q.cert.mu, ball::Ball(1.0)));
    SuperstableLevel c = locate(make_builtin_family("cubic"), 1, 1.2, 0.3, prec);
    ASSERT_EQ(c.cert.status, Status::certified) << c.problem;
    EXPECT_TRUE(ball::contains(c.cert.mu, ball::Ball(1.25)));
}

TEST(Superstable, ReturnMapEnclosesPointsAndTheDerivative)
{
    // Over a box X of parameters, F_n(X) contains F_n at points of X, and F_n'(X) contains the
    // slope (F(b) - F(a)) / (b - a) between two points (mean value theorem): a check of the
    // derivative recursion that involves no derivative formula.
    const slong prec = 160;
    for (const char* name : {"quadratic", "logistic", "sine", "cubic"}) {
        Family f = make_builtin_family(name);
        ball::Ball c = critical(f, prec);
        const double mid = std::string(name) == "logistic" ? 3.5699
                           : std::string(name) == "sine" ? 0.8655
                           : std::string(name) == "cubic" ? 1.6148
                                                          : 1.4011;
        const double r = 1e-9;
        ball::Ball X(mid);
        mag_set_d(arb_radref(X.get()), r);
        ReturnMap RX = superstable_return(f, c, 8, X, prec);
        ASSERT_TRUE(RX.ok) << name << ": " << RX.problem;
        ReturnMap Ra = superstable_return(f, c, 8, ball::Ball(mid - r / 2), prec);
        ReturnMap Rb = superstable_return(f, c, 8, ball::Ball(mid + r / 2), prec);
        ASSERT_TRUE(Ra.ok && Rb.ok);
        EXPECT_TRUE(ball::contains(RX.F, Ra.F)) << name;
        EXPECT_TRUE(ball::contains(RX.F, Rb.F)) << name;
        ball::Ball slope;
        arb_sub(slope.get(), Rb.F.get(), Ra.F.get(), prec);
        arb_div(slope.get(), slope.get(), ball::Ball(r).get(), prec);
        EXPECT_TRUE(ball::overlaps(RX.dF, slope))
            << name << ": F'(X) = " << ball::enclosure_string(RX.dF, 20)
            << " slope = " << ball::enclosure_string(slope, 20);
        // ... and the point derivatives are much sharper than the box.
        EXPECT_TRUE(ball::overlaps(Ra.dF, RX.dF));
        EXPECT_LT(Ra.dF.radius_upper(), 1e-20);
    }
}

TEST(Superstable, FastQuadraticKernelAgreesWithTheTypedMap)
{
    const slong prec = 192;
    Family builtin = make_builtin_family("quadratic");
    Family typed = make_user_family("1 - mu*x^2", "0", -1, 1, 0.5, 2);
    ASSERT_TRUE(builtin.fast_quadratic);
    ASSERT_FALSE(typed.fast_quadratic);
    ball::Ball c(0.0);
    for (int n : {1, 5, 10}) {
        ReturnMap a = superstable_return(builtin, c, n, ball::Ball(1.4), prec);
        ReturnMap b = superstable_return(typed, c, n, ball::Ball(1.4), prec);
        ASSERT_TRUE(a.ok && b.ok);
        EXPECT_TRUE(ball::overlaps(a.F, b.F)) << n;
        EXPECT_TRUE(ball::overlaps(a.dF, b.dF)) << n;
        EXPECT_TRUE(ball::overlaps(a.half, b.half)) << n;
        EXPECT_LT(a.F.radius_upper(), 1e-40);
        EXPECT_LT(b.F.radius_upper(), 1e-40);
    }
}

TEST(Superstable, PerturbedBoxIsNotCertified)
{
    // Negative test: a box that does not contain the zero (the centre moved by 1e-12, the
    // radius 1e-20) must not be certified, and its enclosure must be NaN +/- inf.
    const slong prec = 160;
    Family f = make_builtin_family("logistic");
    ball::Ball c = critical(f, prec);
    SuperstableLevel good = locate(f, 6, 3.5697952937, 1e-3, prec);
    ASSERT_EQ(good.cert.status, Status::certified) << good.problem;
    ball::Ball m = good.mu_approx;
    arb_add(m.get(), m.get(), ball::Ball(1e-12).get(), prec);
    SuperstableCertificate bad = certify_superstable(f, c, 6, m, ball::Ball(1e-20), prec);
    EXPECT_EQ(bad.status, Status::not_certified);
    EXPECT_FALSE(bad.mu.is_finite());
    // The true centre with the same radius is certified.
    SuperstableCertificate ok = certify_superstable(f, c, 6, good.mu_approx, ball::Ball(1e-20), prec);
    EXPECT_EQ(ok.status, Status::certified) << ok.problem;
    EXPECT_TRUE(ball::overlaps(ok.mu, good.cert.mu));
    // A box so wide that it holds mu_5 and mu_6 as zeros of F_6: no proof.
    SuperstableCertificate wide = certify_superstable(f, c, 6, good.mu_approx, ball::Ball(1e-3), prec);
    EXPECT_EQ(wide.status, Status::not_certified);
}

TEST(Superstable, TooLittlePrecisionIsNotCertified)
{
    // At 24 bits the orbit of length 2^9 has lost all accuracy: no certificate, and the
    // Newton step reports the precision problem.
    Family f = make_builtin_family("quadratic");
    ball::Ball c(0.0);
    SuperstableCertificate cert =
        certify_superstable(f, c, 9, ball::Ball(1.4011541), ball::Ball(1e-12), 24);
    EXPECT_EQ(cert.status, Status::not_certified);
    SuperstableNewton nw = approx_superstable(f, c, 9, ball::Ball(1.4011541), 1e-6, 60, 24);
    EXPECT_FALSE(nw.ok);
}

TEST(Superstable, BadArgumentsThrow)
{
    Family f = make_builtin_family("quadratic");
    EXPECT_THROW(superstable_return(f, ball::Ball(0.0), -1, ball::Ball(1.0), 64), std::invalid_argument);
    EXPECT_THROW(superstable_return(f, ball::Ball(0.0), 3, ball::Ball(1.0), 1), std::invalid_argument);
    ball::Ball inexact(1.0);
    mag_set_d(arb_radref(inexact.get()), 1e-10);
    EXPECT_THROW(certify_superstable(f, ball::Ball(0.0), 2, inexact, ball::Ball(1e-5), 64),
                 std::invalid_argument);
}
