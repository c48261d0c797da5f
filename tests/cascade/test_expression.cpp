// Tests of the expression parser: values, precedence, and error reports with columns.
// Sources of the check values: exact arithmetic and the values of elementary functions at simple
// points (sin(pi/2) = 1, exp(0) = 1, ...), evaluated independently by Arb; operator precedence as in
// ordinary mathematical notation (common practice).
#include <renorm/cascade/expression.hpp>
#include <renorm/cascade/jet_evaluator.hpp>

#include <gtest/gtest.h>

#include <string>

using namespace renorm;
using namespace renorm::cascade;

namespace {

// The value of `text` at (x, mu) as a ball, at `prec` bits.
ball::Ball value(const std::string& text, double x, double mu, slong prec = 128)
{
    Expression e = Expression::parse(text);
    JetEvaluator ev(e, 0, prec);
    return ev.evaluate(ball::Ball(x), ball::Ball(mu)).f;
}

bool contains_si(const ball::Ball& b, slong v)
{
    ball::Ball e(v);
    return ball::contains(b, e);
}

int error_column(const std::string& text)
{
    try {
        Expression::parse(text);
    } catch (const ParseError& e) {
        return e.column();
    }
    return -1;
}

std::string error_message(const std::string& text)
{
    try {
        Expression::parse(text);
    } catch (const ParseError& e) {
        return e.message();
    }
    return "";
}

} // namespace

TEST(Expression, IntegerArithmeticIsExact)
{
    // Each value is exact integer arithmetic, so the ball must contain the integer.
    EXPECT_TRUE(contains_si(value("2*3+4", 0, 0), 10));
    EXPECT_TRUE(contains_si(value("2+3*4", 0, 0), 14));
    EXPECT_TRUE(contains_si(value("(2+3)*4", 0, 0), 20));
    EXPECT_TRUE(contains_si(value("2-3-4", 0, 0), -5));     // left associative
    EXPECT_TRUE(contains_si(value("64/4/2", 0, 0), 8));     // left associative
    EXPECT_TRUE(contains_si(value("2^3^2", 0, 0), 512));    // right associative: 2^9
    EXPECT_TRUE(contains_si(value("-x^2", 3, 0), -9));      // unary minus binds looser than ^
    EXPECT_TRUE(contains_si(value("(-x)^2", 3, 0), 9));
    EXPECT_TRUE(contains_si(value("2^-1*4", 0, 0), 2));     // exponent with a sign
    EXPECT_TRUE(contains_si(value("--3", 0, 0), 3));
    EXPECT_TRUE(contains_si(value("+3 - -2", 0, 0), 5));
}

TEST(Expression, DecimalNumbersAndConstants)
{
    const slong prec = 200;
    // 0.1 + 0.2 - 0.3 = 0 exactly as decimals: the ball must contain 0.
    EXPECT_TRUE(contains_si(value("0.1 + 0.2 - 0.3", 0, 0, prec), 0));
    EXPECT_TRUE(contains_si(value("1e3 - 1000", 0, 0), 0));
    EXPECT_TRUE(contains_si(value("2.5E+2 - 250", 0, 0), 0));
    EXPECT_TRUE(contains_si(value(".5*4", 0, 0), 2));
    // pi and e against Arb's constants at 4x precision.
    ball::Ball pi4, e4;
    arb_const_pi(pi4.get(), 4 * prec);
    arb_const_e(e4.get(), 4 * prec);
    EXPECT_TRUE(ball::contains(value("pi", 0, 0, prec), pi4));
    EXPECT_TRUE(ball::contains(value("e", 0, 0, prec), e4));
    // sin(pi/6) = 1/2, cos(pi) = -1, exp(log(7)) = 7, sqrt(16) = 4, abs(-3) = 3, tan(pi/4) = 1
    ball::Ball half;
    arb_set_d(half.get(), 0.5);
    EXPECT_TRUE(ball::contains(value("sin(pi/6)", 0, 0, prec), half));
    EXPECT_TRUE(contains_si(value("cos(pi)", 0, 0, prec), -1));
    EXPECT_TRUE(contains_si(value("exp(log(7))", 0, 0, prec), 7));
    EXPECT_TRUE(contains_si(value("sqrt(16)", 0, 0, prec), 4));
    EXPECT_TRUE(contains_si(value("abs(-3)", 0, 0, prec), 3));
    EXPECT_TRUE(contains_si(value("tan(pi/4)", 0, 0, prec), 1));
    // the variables
    EXPECT_TRUE(contains_si(value("mu*x*(1-x)", 2, 3), -6));
}

TEST(Expression, MinusXSquaredIsNotPlus)
{
    // "1 - mu*x^2" at x = 0.5, mu = 2 is 1/2.
    ball::Ball half;
    arb_set_d(half.get(), 0.5);
    EXPECT_TRUE(ball::contains(value("1 - mu*x^2", 0.5, 2), half));
    EXPECT_FALSE(ball::overlaps(value("1 + mu*x^2", 0.5, 2), half));
}

TEST(Expression, SyntaxErrorsGiveColumnAndWhatWasExpected)
{
    EXPECT_EQ(error_column("1 + * 2"), 5);
    EXPECT_NE(error_message("1 + * 2").find("expected a number"), std::string::npos);
    EXPECT_EQ(error_column("(1 + 2"), 7);
    EXPECT_NE(error_message("(1 + 2").find("expected ')'"), std::string::npos);
    EXPECT_EQ(error_column("sin x"), 5);
    EXPECT_NE(error_message("sin x").find("expected '('"), std::string::npos);
    EXPECT_EQ(error_column(""), 1);
    EXPECT_EQ(error_column("2 3"), 3);
    EXPECT_NE(error_message("2 3").find("expected an operator"), std::string::npos);
    EXPECT_EQ(error_column("x(2)"), 2);
    EXPECT_EQ(error_column("2e"), 2); // 2 followed by the name e: a missing operator
    EXPECT_EQ(error_column("1 - mu*x^"), 10);
}

TEST(Expression, DeepNestingIsRefusedNotACrash)
{
    // Found by the fuzzer: 2800 '(' overflowed the stack of the recursive parser.
    for (const std::string& text : {std::string("2^") + std::string(2800, '('), std::string(5000, '-') + "x",
                                    std::string(900, '(') + "x" + std::string(900, ')')}) {
        try {
            Expression::parse(text);
            ADD_FAILURE() << "accepted a nesting of " << text.size() << " characters";
        } catch (const cascade::ParseError& e) {
            EXPECT_NE(std::string(e.what()).find("nests deeper than"), std::string::npos) << e.what();
        }
    }
    // A long flat chain builds a deep tree: refused as well; 150 levels are fine.
    std::string chain = "x";
    for (int i = 0; i < 300; ++i)
        chain += "+1";
    EXPECT_THROW(Expression::parse(chain), cascade::ParseError);
    std::string ok = std::string(150, '(') + "mu*x" + std::string(150, ')');
    EXPECT_NO_THROW(Expression::parse(ok));
    // A tree at the limit renders (fully parenthesised, signs included) to text that parses again.
    std::string signs = "x";
    for (int i = 0; i < 99; ++i)
        signs = i % 2 ? "-(" + signs + ")" : "sin(-" + signs + ")^2";
    const Expression deep = Expression::parse(signs);
    EXPECT_EQ(Expression::parse(deep.to_string()).to_string(), deep.to_string());
}

TEST(Expression, UnknownNamesAreReportedByName)
{
    EXPECT_EQ(error_column("1 - mu*y^2"), 8);
    EXPECT_NE(error_message("1 - mu*y^2").find("unknown name 'y'"), std::string::npos);
    EXPECT_NE(error_message("sinh(x)").find("unknown name 'sinh'"), std::string::npos);
    EXPECT_EQ(error_column("  foo"), 3);
}

TEST(Expression, RenderingShowsTheTree)
{
    EXPECT_EQ(Expression::parse("1 - mu*x^2").to_string(), "(1 - (mu * (x ^ 2)))");
    EXPECT_EQ(Expression::parse("-x^2").to_string(), "(-(x ^ 2))");
    EXPECT_EQ(Expression::parse("2^3^2").to_string(), "(2 ^ (3 ^ 2))");
    EXPECT_EQ(Expression::parse(" x ").text(), " x ");
}
