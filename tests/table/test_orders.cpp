// Source: none needed - parsing only; the expected lists are the inputs' exact decimal ranges.
// Parsing the list of orders of a table (lib/renorm/table/orders): lists, exact decimal ranges,
// and every kind of bad input with a message naming the problem and the accepted range.
#include <renorm/table/orders.hpp>

#include <gtest/gtest.h>

namespace {

using renorm::table::parse_orders;
using V = std::vector<std::string>;

TEST(Orders, ListsAndRanges)
{
    EXPECT_EQ(parse_orders("2,4,6"), (V{"2", "4", "6"}));
    EXPECT_EQ(parse_orders(" 2.50 , 02 "), (V{"2.5", "2"}));
    EXPECT_EQ(parse_orders("1.5:3:0.5"), (V{"1.5", "2", "2.5", "3"}));
    // exact decimal steps: 0.1 is not accumulated in binary
    const V r = parse_orders("1.1:2:0.1");
    ASSERT_EQ(r.size(), 10u);
    EXPECT_EQ(r.front(), "1.1");
    EXPECT_EQ(r[6], "1.7");
    EXPECT_EQ(r.back(), "2");
    // the end is included only when reached
    EXPECT_EQ(parse_orders("2:5:2"), (V{"2", "4"}));
    EXPECT_EQ(parse_orders("3:3:1"), (V{"3"}));
    EXPECT_EQ(parse_orders("1.5:8:0.5,10,12,16,24,32").size(), 19u);
    EXPECT_EQ(parse_orders("64"), (V{"64"}));
    EXPECT_EQ(parse_orders("1.001"), (V{"1.001"}));
}

void expect_rejected(const std::string& spec, const std::string& fragment)
{
    try {
        parse_orders(spec);
        ADD_FAILURE() << "accepted '" << spec << "'";
    } catch (const std::invalid_argument& e) {
        const std::string m = e.what();
        EXPECT_NE(m.find(fragment), std::string::npos) << m;
        EXPECT_NE(m.find("accepted:"), std::string::npos) << m;
        EXPECT_EQ(m.find('\n'), std::string::npos) << "not one line: " << m;
    }
}

TEST(Orders, BadInputNamesTheProblem)
{
    expect_rejected("2,1,4", "order 1 is not above 1");
    expect_rejected("0.5", "order 0.5 is not above 1");
    expect_rejected("1:3:1", "order 1 is not above 1");
    expect_rejected("65", "order 65 is above 64");
    expect_rejected("", "empty");
    expect_rejected("2,,3", "empty item");
    expect_rejected("2,3,", "empty item");
    expect_rejected("4:2:1", "reversed");
    expect_rejected("2:4:0", "step of zero");
    expect_rejected("2:4:0.00", "step of zero");
    expect_rejected("2:4:-1", "not a plain decimal number");
    expect_rejected("2:4", "form A:B:STEP");
    expect_rejected("2e1", "not a plain decimal number");
    expect_rejected("-2", "not a plain decimal number");
    expect_rejected("two", "not a plain decimal number");
    expect_rejected("2,2.0", "appears twice");
    expect_rejected("2:3:0.5,2.5", "appears twice");
    expect_rejected("1.0001:64:0.01", "more than 1000");
    expect_rejected(".", "is not a number");
}

} // namespace
