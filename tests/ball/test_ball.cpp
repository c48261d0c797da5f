// Source: exact arithmetic and Arb (arb_const_pi) as named beside each check below.
// Sources of the check values: exact arithmetic (log2 10 = 3.3219..., so 100 digits need 333 bits;
// 1/10 computed by Arb at 256 bits), Arb's own pi (arb_const_pi) for the dump/load and digit tests.
#include <renorm/ball/ball.hpp>

#include <gtest/gtest.h>

using namespace renorm::ball;

TEST(Ball, DigitsToBitsRoundsUp)
{
    EXPECT_EQ(digits_to_bits(1), 4);     // log2(10) = 3.32 -> 4
    EXPECT_EQ(digits_to_bits(100), 333); // 332.19 -> 333
    EXPECT_EQ(digits_to_bits(100, 10), 343);
    EXPECT_EQ(bits_to_digits(333), 100);
    EXPECT_THROW(digits_to_bits(-1), std::invalid_argument);
}

TEST(Ball, FromStringEnclosesDecimal)
{
    // 0.1 is not a binary number: the ball must have a nonzero radius and contain 1/10.
    auto b = from_string("0.1", 64);
    ASSERT_TRUE(b);
    Ball tenth;
    arb_set_si(tenth.get(), 1);
    arb_div_si(tenth.get(), tenth.get(), 10, 256);
    EXPECT_TRUE(overlaps(*b, tenth));
    EXPECT_FALSE(from_string("abc", 64));
    EXPECT_FALSE(from_string("", 64));
    EXPECT_THROW(from_string("1", 1), std::invalid_argument);
}

TEST(Ball, DumpLoadIsExact)
{
    Ball x;
    arb_const_pi(x.get(), 200);
    auto y = load(dump(x));
    ASSERT_TRUE(y);
    EXPECT_TRUE(arb_equal(x.get(), y->get()));
    EXPECT_FALSE(load("1 2 3"));
    EXPECT_FALSE(load("zz 0 0 0"));
}

TEST(Ball, DeterminedDigitsStopAtTheRadius)
{
    Ball x;
    arb_const_pi(x.get(), 200);
    mag_set_d(arb_radref(x.get()), 1e-10);
    slong n = 0;
    std::string s = determined_digits(x, 50, &n);
    EXPECT_LE(n, 11);
    EXPECT_GE(n, 9);
    EXPECT_EQ(s.substr(0, 8), "3.141592");
}

TEST(Ball, EscalationStopsAtTheCap)
{
    std::vector<slong> tried;
    auto e = with_increasing_prec(64, 500, [&](slong p) {
        tried.push_back(p);
        return false;
    });
    EXPECT_FALSE(e.succeeded);
    EXPECT_EQ(tried, (std::vector<slong>{64, 128, 256, 500}));
    auto f = with_increasing_prec(64, 1000, [](slong p) { return p >= 200; });
    EXPECT_TRUE(f.succeeded);
    EXPECT_EQ(f.prec, 256);
}
