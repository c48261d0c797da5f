#include "reference_values.hpp"

#include <renorm/spectrum/spectrum.hpp>

#include <gtest/gtest.h>

using namespace renorm;

namespace {
const newton::FixedPoint& fixed_point_z2(slong digits)
{
    static newton::FixedPoint fp = [&] {
        doubling::Problem p;
        return newton::approx_refine(newton::approx_continuation(p, 40, 192), digits, {});
    }();
    return fp;
}
slong agreeing_digits(const ball::Ball& x, const char* ref)
{
    auto r = ball::from_string(ref, 2000);
    ball::Ball d;
    arb_sub(d.get(), x.get(), r->get(), ARF_PREC_EXACT);
    arb_div(d.get(), d.get(), r->get(), 64);
    double l = std::log10(std::fabs(d.approx_double()));
    if (!std::isfinite(l)) { // beyond double range: go through the exponent
        return 1000;
    }
    return static_cast<slong>(std::floor(-l));
}
} // namespace

TEST(Spectrum, DenseSeedsHaveDeltaFirstAndTheTrivialEigenvaluesClassified)
{
    const auto& fp = fixed_point_z2(110);
    auto ev = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    ASSERT_GE(ev.size(), 5u);
    EXPECT_NEAR(ev[0].value.real(), 4.669201609102990, 1e-10);
    EXPECT_EQ(ev[0].kind, spectrum::Kind::relevant);
    // alpha^-2 and alpha^-4: coordinate changes (DEVELOPERS.md); from the computed alpha.
    const double a = fp.a.approx_double();
    EXPECT_NEAR(ev[1].value.real(), std::pow(a, -2), 1e-10);
    EXPECT_EQ(ev[1].kind, spectrum::Kind::coordinate_change);
    EXPECT_EQ(ev[1].power, 1);
    EXPECT_EQ(ev[2].kind, spectrum::Kind::irrelevant);
    EXPECT_NEAR(ev[4].value.real(), std::pow(a, -4), 1e-10);
    EXPECT_EQ(ev[4].power, 2);
    // the normalisation eigenvalue a^z = 6.26 is projected away
    for (const auto& e : ev)
        EXPECT_GT(std::fabs(e.value.real() - a * a), 1e-3);
}

TEST(Spectrum, DeltaForZ2MatchesThePublished100Digits)
{
    const auto& fp = fixed_point_z2(110);
    auto ev = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    spectrum::Eigenpair ep = spectrum::approx_refine_eigenpair(fp, ev[0], 105, {});
    ASSERT_TRUE(ep.converged) << ep.message;
    EXPECT_LE(ep.log10_residual, -105);
    // Source: OEIS A006890 (Briggs 1991; Broadhurst 1999), from memory; see reference_values.hpp.
    EXPECT_GE(agreeing_digits(ep.lambda, test_ref::delta_z2), 100) << ball::approx_decimal(ep.lambda, 105);
    // The circulating 30-decimal string is wrong after 27 significant digits: we must differ.
    slong w = agreeing_digits(ep.lambda, test_ref::delta_z2_wrong_circulating);
    EXPECT_GE(w, 26);
    EXPECT_LE(w, 28);
}

TEST(Spectrum, CoordinateChangeEigenvalueIsAlphaToMinusZExactly)
{
    // An identity of the trade (common practice: conjugating by x -> x(1 + eps |x|^z) gives the
    // eigenvalue alpha^-z): the refined eigenvalue equals alpha^-2 to the precision reached.
    const auto& fp = fixed_point_z2(110);
    auto ev = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    spectrum::Eigenpair ep = spectrum::approx_refine_eigenpair(fp, ev[1], 40, {});
    ASSERT_TRUE(ep.converged) << ep.message;
    ball::Ball a2;
    arb_pow_ui(a2.get(), fp.a.get(), 2, 400);
    arb_inv(a2.get(), a2.get(), 400);
    ball::Ball d;
    arb_sub(d.get(), ep.lambda.get(), a2.get(), 400);
    EXPECT_LT(std::fabs(d.approx_double()), 1e-38);
}

TEST(Spectrum, ComplexSeedsAreNotRefined)
{
    spectrum::ApproxEigen seed;
    seed.value = {0.1, 0.2};
    seed.vector = Eigen::VectorXcd::Ones(10);
    auto ep = spectrum::approx_refine_eigenpair(fixed_point_z2(110), seed, 20, {});
    EXPECT_FALSE(ep.converged);
    EXPECT_FALSE(ep.message.empty());
}

TEST(Spectrum, MatrixFreeArnoldiAgreesWithTheDenseSolver)
{
    // The two seed variants (Eigen dense QR, Spectra matrix-free Arnoldi) on the same truncation.
    const auto& fp = fixed_point_z2(110);
    auto dense = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    auto mf = spectrum::approx_eigenvalues_matfree(fp.g, fp.problem, 60, 5, 128);
    ASSERT_EQ(mf.size(), 5u);
    for (size_t i = 0; i < 5; ++i) {
        EXPECT_NEAR(mf[i].value.real(), dense[i].value.real(), 1e-9) << i;
        EXPECT_EQ(mf[i].kind, dense[i].kind) << i;
    }
    EXPECT_NEAR(mf[0].value.real(), 4.669201609102990, 1e-10);
    // dispatch: above the cutoff the matrix-free variant answers with `count` values
    const slong saved = spectrum::dense_eigen_cutoff;
    spectrum::dense_eigen_cutoff = 10;
    EXPECT_EQ(spectrum::approx_eigenvalues(fp.g, fp.problem, 60, 3, 128).size(), 3u);
    spectrum::dense_eigen_cutoff = saved;
}
