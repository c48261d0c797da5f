#include "reference_values.hpp"

#include <renorm/newton/fixed_point.hpp>

#include <gtest/gtest.h>

using namespace renorm;
using doubling::Problem;

namespace {
// |x - ref| < 10^-(digits-1) |ref|: x agrees with the reference to `digits` significant digits
// (up to a unit in the last place).
bool agrees(const ball::Ball& x, const char* ref, slong digits)
{
    auto r = ball::from_string(ref, 4 * ball::digits_to_bits(digits + 20));
    if (!r)
        return false;
    ball::Ball d;
    arb_sub(d.get(), x.get(), r->get(), ARF_PREC_EXACT);
    arb_div(d.get(), d.get(), r->get(), 64);
    arb_abs(d.get(), d.get());
    ball::Ball tol;
    arb_set_ui(tol.get(), 10);
    arb_pow_ui(tol.get(), tol.get(), static_cast<ulong>(digits - 1), 64);
    arb_inv(tol.get(), tol.get(), 64);
    return arb_lt(d.get(), tol.get());
}
} // namespace

TEST(FixedPoint, AlphaForZ2MatchesThePublished105Digits)
{
    Problem p;
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    ASSERT_TRUE(start.converged) << start.message;
    newton::FixedPoint fp = newton::approx_refine(start, 105, {});
    ASSERT_TRUE(fp.converged) << fp.message;
    // Source: OEIS A006891 (Briggs 1997, Broadhurst 1999); see reference_values.hpp.
    EXPECT_TRUE(agrees(fp.a, test_ref::alpha_z2, 105)) << ball::approx_decimal(fp.a, 110);
    // A change of a few units in the 100th digit must be detected.
    EXPECT_FALSE(agrees(fp.a, "2.50290787509589282228390287321821578638127137672714997733619205677923546317959020670329964974643383452959", 105));
    EXPECT_LE(fp.log10_residual, -115);
}

TEST(FixedPoint, OtherOrdersMatchPublishedTables)
{
    // Briggs, Math. Comp. 57 (1991), from memory (reference_values.hpp).
    for (auto [z, ref] : {std::pair{"4", test_ref::alpha_z4}, std::pair{"6", test_ref::alpha_z6}}) {
        Problem p;
        p.order = z;
        newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
        ASSERT_TRUE(start.converged) << start.message;
        newton::FixedPoint fp = newton::approx_refine(start, 30, {});
        ASSERT_TRUE(fp.converged) << fp.message;
        EXPECT_TRUE(agrees(fp.a, ref, 19)) << "z = " << z << ": " << ball::approx_decimal(fp.a, 30);
    }
}

TEST(FixedPoint, NonIntegerOrderIsStableUnderTruncationAndPrecision)
{
    Problem p;
    p.order = "3.5";
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    ASSERT_TRUE(start.converged) << start.message;
    newton::RefineOptions o;
    newton::FixedPoint a = newton::approx_refine(start, 40, o);
    o.min_length = 2 * a.n; // twice the truncation
    o.guard_digits = 30;    // and a higher precision
    newton::FixedPoint b = newton::approx_refine(start, 40, o);
    ASSERT_TRUE(a.converged && b.converged);
    EXPECT_GT(b.n, a.n);
    EXPECT_GT(b.prec, a.prec);
    ball::Ball d;
    arb_sub(d.get(), a.a.get(), b.a.get(), 512);
    EXPECT_LT(std::fabs(d.approx_double()), 1e-45) << ball::approx_decimal(a.a, 50) << " vs "
                                                  << ball::approx_decimal(b.a, 50);
    EXPECT_NEAR(a.a.approx_double(), 1.7895, 1e-4);
}

TEST(FixedPoint, FailureIsReportedNotHidden)
{
    Problem p;
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    newton::RefineOptions o;
    o.max_steps = 2;
    newton::FixedPoint fp = newton::approx_refine(start, 500, o);
    EXPECT_FALSE(fp.converged);
    EXPECT_FALSE(fp.message.empty());
    // Newton from a guess of the wrong sign structure cannot even define T.
    const double bad[2] = {1.0, 0.9};
    newton::FixedPoint f2 = newton::approx_newton(p, series::from_doubles(bad, 2), 20, 1e-30, 10, 128);
    EXPECT_FALSE(f2.converged);
    EXPECT_FALSE(f2.message.empty());
}

TEST(FixedPoint, ChordAndNewtonVariantsAgree)
{
    Problem p;
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    newton::RefineOptions o;
    o.method = newton::RefineMethod::chord;
    newton::FixedPoint a = newton::approx_refine(start, 80, o);
    o.method = newton::RefineMethod::newton;
    newton::FixedPoint b = newton::approx_refine(start, 80, o);
    ASSERT_TRUE(a.converged) << a.message;
    ASSERT_TRUE(b.converged) << b.message;
    EXPECT_LT(b.steps, a.steps); // Newton doubles the digits, the chord adds ~14 a step
    EXPECT_TRUE(agrees(a.a, test_ref::alpha_z2, 80));
    EXPECT_TRUE(agrees(b.a, test_ref::alpha_z2, 80));
}
