// Source: limits known by construction (closed forms), as named beside each check below.
// Extrapolation on sequences whose limit is known by construction (the algorithms, not the
// physics: s_j = L + a r^j + b q^j with chosen L, a, r, b, q).
// Sources of the check values: sequences built from closed forms with known limits (geometric
// corrections to a known constant, partial sums of convergent series), so the exact limit is known.
#include <renorm/cascade/extrapolate.hpp>

#include <gtest/gtest.h>

#include <cmath>

using namespace renorm;
using namespace renorm::cascade;

namespace {

std::vector<ball::Ball> two_rate_sequence(int count, slong prec)
{
    // L = 1/3, a = 2, r = 0.3, b = -0.5, q = -0.6
    std::vector<ball::Ball> s;
    for (int j = 0; j < count; ++j) {
        ball::Ball v, t;
        arb_set_ui(v.get(), 1);
        arb_div_ui(v.get(), v.get(), 3, prec);
        arb_set_d(t.get(), 0.3);
        arb_pow_ui(t.get(), t.get(), j, prec);
        arb_mul_ui(t.get(), t.get(), 2, prec);
        arb_add(v.get(), v.get(), t.get(), prec);
        arb_set_d(t.get(), -0.6);
        arb_pow_ui(t.get(), t.get(), j, prec);
        arb_mul_2exp_si(t.get(), t.get(), -1);
        arb_sub(v.get(), v.get(), t.get(), prec);
        s.push_back(v);
    }
    return s;
}

double error_from_third(const ball::Ball& v, slong prec)
{
    ball::Ball t;
    arb_set_ui(t.get(), 1);
    arb_div_ui(t.get(), t.get(), 3, prec);
    arb_sub(t.get(), v.get(), t.get(), prec);
    return std::fabs(t.approx_double());
}

} // namespace

TEST(Extrapolate, AitkenIsExactOnOneGeometricTerm)
{
    const slong prec = 256;
    std::vector<ball::Ball> s;
    for (int j = 0; j < 6; ++j) {
        ball::Ball v;
        arb_set_d(v.get(), 0.25);
        arb_pow_ui(v.get(), v.get(), j, prec);
        arb_add_ui(v.get(), v.get(), 5, prec); // 5 + 0.25^j
        s.push_back(v);
    }
    std::vector<ball::Ball> a = approx_aitken(s, prec);
    ASSERT_EQ(a.size(), 4u);
    for (const auto& v : a) {
        ball::Ball d;
        arb_sub_ui(d.get(), v.get(), 5, prec);
        EXPECT_LT(std::fabs(d.approx_double()), 1e-60);
    }
}

TEST(Extrapolate, WynnAndIteratedAitkenRemoveTwoRates)
{
    const slong prec = 256;
    std::vector<ball::Ball> s = two_rate_sequence(14, prec);
    const double raw = error_from_third(s.back(), prec);
    const double wynn = error_from_third(approx_wynn_epsilon(s, prec), prec);
    const double aitken = error_from_third(approx_iterated_aitken(s, prec), prec);
    const double rich = error_from_third(approx_richardson_geometric(s, prec), prec);
    EXPECT_GT(raw, 1e-4);
    EXPECT_LT(wynn, 1e-30);   // the Shanks transform of order 2 is exact on two rates
    EXPECT_LT(aitken, 1e-9);
    EXPECT_LT(rich, raw);     // one rate removed: better than the last term
}

TEST(Extrapolate, LimitEstimateIsHonest)
{
    // The estimated error must cover the true error, and the digits shown must be correct.
    const slong prec = 256;
    for (int count : {8, 10, 14}) {
        std::vector<ball::Ball> s = two_rate_sequence(count, prec);
        // Spoil exactness a little, as in real data: add 1e-25 (j-dependent) noise.
        for (std::size_t j = 0; j < s.size(); ++j) {
            ball::Ball e(1e-25 * std::sin(3.0 * static_cast<double>(j)));
            arb_add(s[j].get(), s[j].get(), e.get(), prec);
        }
        LimitEstimate e = approx_limit(s, prec);
        ASSERT_TRUE(e.ok);
        EXPECT_GE(e.error * 10, error_from_third(e.value, prec)) << count;
        ASSERT_GT(e.digits, 0) << count;
        EXPECT_EQ(e.text.substr(0, 3), "0.3");
    }
    EXPECT_FALSE(approx_limit(two_rate_sequence(3, prec), prec).ok);
}
