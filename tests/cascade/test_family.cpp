// Families: construction, bad input, and the critical point (given or found and proved).
// Sources of the check values: the closed-form derivatives and critical points of each family
// (e.g. f(x) = 1 - mu x^2 has f'(0) = 0; mu x(1 - x) has its maximum at 1/2), common practice.
#include <renorm/cascade/family.hpp>

#include <gtest/gtest.h>

using namespace renorm;
using namespace renorm::cascade;

TEST(Family, BuiltinsParseAndHaveTheirCriticalPoint)
{
    for (const auto& name : builtin_family_names()) {
        Family f = make_builtin_family(name, "2");
        CriticalPoint cp = critical_point(f, 128);
        ASSERT_TRUE(cp.ok) << name << ": " << cp.problem;
        EXPECT_FALSE(describe_builtin_family(name).empty());
    }
    // logistic and sine: c = 1/2 exactly; the others: c = 0.
    ball::Ball half;
    arb_set_d(half.get(), 0.5);
    EXPECT_TRUE(ball::contains(critical_point(make_builtin_family("logistic"), 64).c, half));
    EXPECT_TRUE(ball::contains(critical_point(make_builtin_family("sine"), 64).c, half));
    EXPECT_TRUE(arb_is_zero(critical_point(make_builtin_family("cubic"), 64).c.get()));
}

TEST(Family, BadInputIsRejected)
{
    EXPECT_THROW(make_builtin_family("tent"), std::invalid_argument);
    EXPECT_THROW(make_builtin_family("power", "1"), std::invalid_argument);
    EXPECT_THROW(make_builtin_family("power", "0.5"), std::invalid_argument);
    EXPECT_THROW(make_builtin_family("power", "abc"), std::invalid_argument);
    EXPECT_NO_THROW(make_builtin_family("power", "1.5"));
    EXPECT_THROW(make_user_family("1 - mu*x^", "", -1, 1, 0, 2), ParseError);
    EXPECT_THROW(make_user_family("1 - mu*x^2", "x/2", -1, 1, 0, 2), ParseError);
    EXPECT_THROW(make_user_family("1 - mu*x^2", "", 1, -1, 0, 2), std::invalid_argument);
}

TEST(Family, CriticalPointIsFoundAndProved)
{
    // d/dx mu x (1 - x) = mu (1 - 2x): the zero is 1/2 for every mu.
    Family f = make_user_family("mu*x*(1-x)", "", 0, 1, 1, 4);
    CriticalPoint cp = critical_point(f, 128);
    ASSERT_TRUE(cp.ok) << cp.problem;
    ball::Ball half;
    arb_set_d(half.get(), 0.5);
    EXPECT_TRUE(ball::contains(cp.c, half));
    EXPECT_LT(cp.c.radius_upper(), 1e-15);
    // sin(pi x) has its maximum at 1/2 too.
    Family s = make_user_family("mu*sin(pi*x)", "", 0, 1, 0.3, 1);
    CriticalPoint cs = critical_point(s, 128);
    ASSERT_TRUE(cs.ok) << cs.problem;
    EXPECT_TRUE(ball::contains(cs.c, half));
}

TEST(Family, CriticalPointFailuresAreReported)
{
    // c = mu/2 moves with mu: refused.
    CriticalPoint moving = critical_point(make_user_family("mu*x - x^2", "", 0, 4, 1, 3), 128);
    EXPECT_FALSE(moving.ok);
    EXPECT_NE(moving.problem.find("depend"), std::string::npos) << moving.problem;
    // x^4 - x^2 has three critical points in [-1, 1].
    CriticalPoint several = critical_point(make_user_family("mu - x^4 + x^2", "", -1, 1, 0, 1), 128);
    EXPECT_FALSE(several.ok);
    EXPECT_NE(several.problem.find("zeros"), std::string::npos) << several.problem;
    // A given critical point where f' is not 0.
    CriticalPoint wrong = critical_point(make_user_family("1 - mu*x^2", "0.1", -1, 1, 0.5, 2), 128);
    EXPECT_FALSE(wrong.ok);
}
