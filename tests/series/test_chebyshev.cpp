// Source: none needed beyond closed forms computed in the test (Chebyshev identities, exact
// polynomials); no published constants.
#include <renorm/series/chebyshev.hpp>

#include <gtest/gtest.h>

using namespace renorm;
using namespace renorm::series;

TEST(Chebyshev, ClenshawMatchesTheExplicitPolynomial)
{
    // f = 2 T_0 - T_1 + 3 T_3 with x = 2y - 1: T_1 = x, T_3 = 4x^3 - 3x; f' in y is 2 df/dx.
    BallPoly c;
    c.set_coeff(0, Ball(slong{2}));
    c.set_coeff(1, Ball(slong{-1}));
    c.set_coeff(3, Ball(slong{3}));
    for (double y : {0.0, 0.3, 0.75, 1.0}) {
        const double x = 2 * y - 1;
        const double f = 2 - x + 3 * (4 * x * x * x - 3 * x);
        const double df = 2 * (-1 + 3 * (12 * x * x - 3));
        Ball fv, dfv;
        chebyshev_evaluate(fv, &dfv, c, Ball(y), 128);
        EXPECT_NEAR(fv.approx_double(), f, 1e-14) << "y = " << y;
        EXPECT_NEAR(dfv.approx_double(), df, 1e-13) << "y = " << y;
    }
}

TEST(Chebyshev, InterpolationRecoversCoefficientsAndMatchesTheMatrix)
{
    const slong n = 9;
    BallPoly c;
    for (slong k = 0; k < n; ++k)
        c.set_coeff(k, Ball(1.0 / static_cast<double>(k + 1) * (k % 2 ? -1 : 1)));
    BallVec y = chebyshev_points(n, 256);
    EXPECT_TRUE(arb_contains_si(y[0], 1));
    EXPECT_TRUE(arb_contains_si(y[n - 1], 0));
    ball::BallMat m = chebyshev_matrix(y, n, 256);
    BallVec values(n);
    for (slong j = 0; j < n; ++j) {
        Ball v;
        chebyshev_evaluate(v, nullptr, c, Ball(y[j]), 256);
        arb_set(values[j], v.get());
        // the matrix row times c is the same value
        Ball s;
        for (slong k = 0; k < n; ++k)
            arb_addmul(s.get(), m.entry(j, k), c.coeff(k).get(), 256);
        EXPECT_TRUE(overlaps(s, v)) << j;
    }
    BallPoly back = chebyshev_interpolate(values, 256);
    for (slong k = 0; k < n; ++k)
        EXPECT_TRUE(overlaps(back.coeff(k), c.coeff(k))) << "k = " << k;
}
