// Computing table rows (lib/renorm/table/compute): values against published constants (sources in
// tests/reference_values.hpp), failed rows kept with the reason, the same rows on 1 and 2 threads,
// the rank assignment, and the row message used between MPI ranks.
#include <renorm/ball/ball.hpp>
#include <renorm/table/compute.hpp>

#include "reference_values.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>

namespace {

using namespace renorm;
using renorm::io::RowStatus;
using renorm::io::TableRow;

/// Units in the last place of `text` (shown to `digits` significant digits) by which it differs
/// from the longer decimal string `ref`; below 1 means the digits agree up to rounding.
double ulps_apart(const std::string& text, long digits, const std::string& ref)
{
    auto x = ball::from_string(text, 4000);
    auto r = ball::from_string(ref, 4000);
    if (text.empty() || !x || !r)
        return INFINITY;
    ball::Ball d, scale;
    arb_sub(d.get(), x->get(), r->get(), 4000);
    arb_abs(d.get(), d.get());
    // one unit in the last place of text: 10^(floor(log10|x|) - digits + 1)
    const long e = static_cast<long>(std::floor(std::log10(std::fabs(x->approx_double()))));
    arb_set_ui(scale.get(), 10);
    arb_pow_ui(scale.get(), scale.get(), static_cast<ulong>(digits - 1 - e), 4000);
    arb_mul(d.get(), d.get(), scale.get(), 4000);
    return d.approx_double();
}

/// Significant digits of a decimal string.
long significant_digits(const std::string& s)
{
    long n = 0;
    bool leading = true;
    for (char c : s) {
        if (c < '0' || c > '9')
            continue;
        if (leading && c == '0')
            continue;
        leading = false;
        ++n;
    }
    return n;
}

void expect_agrees(const std::string& text, long digits, const std::string& ref, const char* what)
{
    // correctly rounded: within half a unit, plus what the reference's own rounding may add
    const double tol = 0.5 + 0.5 * std::pow(10.0, static_cast<double>(digits - significant_digits(ref)));
    EXPECT_LE(ulps_apart(text, digits, ref), tol)
        << what << ": " << text << " (" << digits << " digits) vs reference " << ref;
}

TEST(TableCompute, QuadraticRowAgreesWithPublishedDigits)
{
    table::RowOptions o;
    o.digits = 25;
    o.eigenvalues = 1;
    const TableRow r = table::compute_row("2", o);
    ASSERT_EQ(r.status, RowStatus::estimated) << r.note;
    EXPECT_EQ(r.alpha.digits, 25);
    EXPECT_EQ(r.delta.digits, 25);
    // OEIS A006891 / A006890 (see reference_values.hpp)
    expect_agrees(r.alpha.text, r.alpha.digits, test_ref::alpha_z2, "alpha(2)");
    expect_agrees(r.delta.text, r.delta.digits, test_ref::delta_z2, "delta(2)");
    ASSERT_EQ(r.eigenvalues.size(), 1u);
    EXPECT_EQ(r.eigenvalues[0].kind, "coordinate change alpha^(-z*1)");
    // alpha^-2 (the first coordinate change, DEVELOPERS.md): 0.159628440382699770039...
    expect_agrees(r.eigenvalues[0].value.text, r.eigenvalues[0].value.digits,
                  "0.15962844038269977003948083979", "alpha^-2");
    EXPECT_GT(r.n_check, r.n);
    EXPECT_GT(r.prec, 64);
    EXPECT_TRUE(r.note.empty()) << r.note;
    EXPECT_TRUE(r.radius.empty());
    EXPECT_EQ(r.basis, "taylor");
}

TEST(TableCompute, QuarticAndSexticRowsAgreeWithBriggs)
{
    table::RowOptions o;
    o.digits = 18;
    // Briggs, Math. Comp. 57 (1991), 19 digits each, from memory (reference_values.hpp)
    const TableRow r4 = table::compute_row("4", o);
    ASSERT_EQ(r4.status, RowStatus::estimated) << r4.note;
    expect_agrees(r4.alpha.text, r4.alpha.digits, test_ref::alpha_z4, "alpha(4)");
    expect_agrees(r4.delta.text, r4.delta.digits, test_ref::delta_z4, "delta(4)");
    const TableRow r6 = table::compute_row("6", o);
    ASSERT_EQ(r6.status, RowStatus::estimated) << r6.note;
    expect_agrees(r6.alpha.text, r6.alpha.digits, test_ref::alpha_z6, "alpha(6)");
    expect_agrees(r6.delta.text, r6.delta.digits, test_ref::delta_z6, "delta(6)");
    EXPECT_EQ(r6.alpha.digits, 18);
}

TEST(TableCompute, CertifiedRowCarriesItsRadiusAndPublishedDigits)
{
    table::RowOptions o;
    o.digits = 20;
    o.certify = true;
    const TableRow r = table::compute_row("2", o);
    ASSERT_EQ(r.status, RowStatus::certified) << r.note;
    EXPECT_FALSE(r.radius.empty());
    EXPECT_EQ(r.n_check, 0);
    EXPECT_EQ(r.alpha.digits, 20);
    EXPECT_EQ(r.delta.digits, 20);
    // OEIS A006891 / A006890 (reference_values.hpp)
    expect_agrees(r.alpha.text, r.alpha.digits, test_ref::alpha_z2, "certified alpha(2)");
    expect_agrees(r.delta.text, r.delta.digits, test_ref::delta_z2, "certified delta(2)");
    // the radius is below 10^-20 relative to the values (the digits are determined)
    EXPECT_LT(std::stod(r.radius), 1e-20) << r.radius;
}

TEST(TableCompute, ExpectAgreesCatchesAWrongDigit)
{
    // the check used above fails on a last digit off by one, and on the circulating wrong tail
    EXPECT_LE(ulps_apart("4.669201609102990671853203820", 28, test_ref::delta_z2), 0.5);
    EXPECT_GT(ulps_apart("4.669201609102990671853203821", 28, test_ref::delta_z2), 0.5 + 1e-9);
    EXPECT_GT(ulps_apart(test_ref::delta_z2_wrong_circulating, 31, test_ref::delta_z2), 0.5 + 1e-9);
    EXPECT_EQ(significant_digits("0.0015962"), 5);
}

TEST(TableCompute, FailureBecomesAFailedRowWithTheReason)
{
    table::RowOptions o;
    o.digits = 10;
    const TableRow r = table::compute_row("not-a-number", o);
    EXPECT_EQ(r.status, RowStatus::failed);
    EXPECT_NE(r.note.find("error:"), std::string::npos) << r.note;
    EXPECT_GE(r.seconds, 0.0);
}

TEST(TableCompute, FallbackRetriesAFailedRowWithFewerDigits)
{
    // No order fails cheaply at many digits and converges at fewer in a way that would stay true
    // as the solver improves, so this checks the edges: a row that succeeds is not retried, an
    // exception is still a failed row, and retry counts must lie below --digits. The retry
    // itself shows in the shipped orders table (its notes).
    table::RowOptions o;
    o.digits = 12;
    o.fallback_digits = {8, 4};
    const TableRow bad = table::compute_row("not-a-number", o);
    EXPECT_EQ(bad.status, RowStatus::failed);
    const TableRow good = table::compute_row("2", o);
    EXPECT_EQ(good.status, RowStatus::estimated);
    EXPECT_EQ(good.alpha.digits, 12);
    EXPECT_TRUE(good.note.empty()) << good.note;
    table::RowOptions wrong = o;
    wrong.fallback_digits = {12};
    EXPECT_THROW(table::validate({"2"}, wrong, 1e12), std::invalid_argument);
}

TEST(TableCompute, SameRowsOnOneAndTwoThreads)
{
    table::RowOptions o;
    o.digits = 12;
    const std::vector<std::string> orders = {"2.5", "1.5", "3", "2"};
    auto one = table::compute_rows(orders, o, 1);
    size_t events = 0;
    auto two = table::compute_rows(orders, o, 2, [&](size_t, const TableRow*, bool) { ++events; });
    EXPECT_EQ(events, 2 * orders.size());
    ASSERT_EQ(one.size(), orders.size());
    ASSERT_EQ(two.size(), orders.size());
    for (size_t i = 0; i < orders.size(); ++i) {
        EXPECT_EQ(one[i].order, orders[i]);
        one[i].seconds = two[i].seconds = 0; // the only field that may differ
        EXPECT_EQ(one[i], two[i]) << orders[i];
        EXPECT_EQ(one[i].status, RowStatus::estimated);
    }
}

TEST(TableCompute, AssignmentCoversEveryOrderOnceAndBalances)
{
    table::RowOptions o;
    o.digits = 100;
    const std::vector<std::string> orders = {"1.5", "2", "3", "4", "6", "8", "12", "16"};
    for (int parts : {1, 2, 3, 8, 11}) {
        const auto owner = table::assign_orders(orders, o, parts);
        ASSERT_EQ(owner.size(), orders.size());
        for (int w : owner) {
            EXPECT_GE(w, 0);
            EXPECT_LT(w, parts);
        }
        EXPECT_EQ(owner, table::assign_orders(orders, o, parts)); // deterministic
        if (parts <= static_cast<int>(orders.size())) {
            std::set<int> used(owner.begin(), owner.end());
            EXPECT_EQ(static_cast<int>(used.size()), parts) << "an idle worker with " << parts;
        }
    }
    // greedy balancing: the loads differ by at most the costliest single row
    for (int parts : {2, 3}) {
        const auto owner = table::assign_orders(orders, o, parts);
        std::vector<double> load(static_cast<size_t>(parts), 0.0);
        double biggest = 0;
        for (size_t i = 0; i < orders.size(); ++i) {
            const double c = table::approx_row_cost(orders[i], o);
            load[static_cast<size_t>(owner[i])] += c;
            biggest = std::max(biggest, c);
        }
        const auto [lo, hi] = std::minmax_element(load.begin(), load.end());
        EXPECT_LE(*hi - *lo, biggest * (1 + 1e-12)) << parts << " workers";
    }
    EXPECT_GT(table::approx_row_cost("16", o), table::approx_row_cost("2", o));
    EXPECT_THROW(table::assign_orders(orders, o, 0), std::invalid_argument);
}

TEST(TableCompute, RowMessageRoundTrip)
{
    TableRow a;
    a.order = "3.5";
    a.status = RowStatus::certified;
    a.alpha = {"1.9", 2};
    a.delta = {"6.1", 2};
    a.eigenvalues.resize(2);
    a.eigenvalues[0].value.text = "0.1";
    a.eigenvalues[0].value.digits = 1;
    a.eigenvalues[0].kind = "irrelevant";
    a.radius = "1e-30";
    a.n = 80;
    a.prec = 300;
    a.basis = "chebyshev";
    a.seconds = 0.1 + 0.2; // not a short decimal: must survive exactly
    a.note = "quote \" and, comma";
    TableRow b;
    b.order = "32";
    b.note = "failed";
    const std::vector<std::pair<size_t, TableRow>> rows = {{4, a}, {0, b}};
    EXPECT_EQ(table::rows_from_message(table::rows_to_message(rows)), rows);
    EXPECT_THROW(table::rows_from_message("[{\"index\": 1}]"), std::invalid_argument);
    EXPECT_THROW(table::rows_from_message("not json"), std::invalid_argument);
}

TEST(TableCompute, ValidateNamesTheProblem)
{
    table::RowOptions o;
    o.digits = 0;
    EXPECT_THROW(table::validate({"2"}, o, 1e12), std::invalid_argument);
    o.digits = 10;
    o.eigenvalues = 51;
    EXPECT_THROW(table::validate({"2"}, o, 1e12), std::invalid_argument);
    o.eigenvalues = 0;
    EXPECT_NO_THROW(table::validate({"2", "4"}, o, 1e12));
    o.digits = 5000;
    EXPECT_THROW(table::validate({"2"}, o, 1e6), std::invalid_argument); // memory estimate
}

} // namespace
