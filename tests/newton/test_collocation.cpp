#include "reference_values.hpp"

#include <renorm/newton/collocation.hpp>
#include <renorm/solve/solve.hpp>
#include <renorm/spectrum/collocation.hpp>

#include <gtest/gtest.h>

using namespace renorm;

namespace {
solve::Result run(std::string z, solve::Basis b, slong digits)
{
    solve::Request q{};
    q.order = std::move(z); // (moving avoids a GCC 12 -Wmaybe-uninitialized false positive)
    q.digits = digits;
    q.eigenvalues = 0;
    q.basis = b;
    return solve::solve_constants(q);
}
} // namespace

TEST(Collocation, AlphaAndDeltaForZ2MatchThePublishedDigits)
{
    newton::CollocationFixedPoint start = newton::approx_collocation_continuation("2", 40, 192);
    ASSERT_TRUE(start.converged) << start.message;
    newton::CollocationFixedPoint fp = newton::approx_collocation_refine(start, 60, 10, 0);
    ASSERT_TRUE(fp.converged) << fp.message;
    // OEIS A006891 / A006890 (reference_values.hpp)
    EXPECT_EQ(ball::approx_decimal(fp.a, 60), std::string(test_ref::alpha_z2).substr(0, 61));
    auto seeds = spectrum::approx_collocation_eigenvalues(fp, 60);
    ASSERT_FALSE(seeds.empty());
    EXPECT_EQ(seeds[0].kind, spectrum::Kind::relevant);
    spectrum::Eigenpair d = spectrum::approx_collocation_eigenpair(fp, seeds[0], 65);
    ASSERT_TRUE(d.converged) << d.message;
    EXPECT_EQ(ball::approx_decimal(d.lambda, 60), std::string(test_ref::delta_z2).substr(0, 61));
}

TEST(Collocation, AgreesWithTheTaylorBasisWhereBothWork)
{
    // The two bases share no code beyond Arb: agreement at z = 4 and z = 8 (an overlap test
    // across variants, STYLE.md §6).
    for (const char* z : {"4", "8"}) {
        solve::Result t = run(z, solve::Basis::taylor, 30);
        solve::Result c = run(z, solve::Basis::chebyshev, 30);
        ASSERT_TRUE(t.converged && c.converged) << t.message << c.message;
        EXPECT_EQ(t.basis, solve::Basis::taylor);
        EXPECT_EQ(c.basis, solve::Basis::chebyshev);
        EXPECT_EQ(t.alpha.text, c.alpha.text) << "z = " << z;
        EXPECT_EQ(t.delta.text, c.delta.text) << "z = " << z;
    }
}

TEST(Collocation, LargeOrderIsStableBetweenTruncations)
{
    solve::Result r = run("24", solve::Basis::automatic, 25);
    ASSERT_TRUE(r.converged) << r.message;
    EXPECT_EQ(r.basis, solve::Basis::chebyshev);
    EXPECT_GE(r.alpha.stable_digits, 25);
    EXPECT_GE(r.delta.stable_digits, 25);
    // delta(z) grows with z and alpha(z) decreases toward 1 (common practice for these families)
    EXPECT_GT(r.delta.value.approx_double(), 15.0);
    EXPECT_LT(r.alpha.value.approx_double(), 1.2);
}

TEST(Collocation, UndefinedOperatorIsReported)
{
    const double bad[2] = {1.0, 0.5}; // G increasing: G(1) > 0
    auto fp = newton::approx_collocation_newton("2", series::from_doubles(bad, 2), 20, 1e-30, 5, 128);
    EXPECT_FALSE(fp.converged);
    EXPECT_FALSE(fp.message.empty());
}
