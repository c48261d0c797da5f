#pragma once
/// \file
/// The list of orders z of a table: parsing "2,4,6", ranges "A:B:STEP" and mixtures
/// ("1.5:8:0.5,10,12"), in exact decimal arithmetic so that 1.5:3:0.1 gives 1.5, 1.6, ..., 3
/// without binary rounding.

#include <string>
#include <vector>

namespace renorm::table {

/// Smallest and largest order a table accepts (the solver's range, solve::validate).
inline constexpr double min_order_exclusive = 1.0;
inline constexpr double max_order = 64.0;
/// Most rows one table may have.
inline constexpr long max_rows = 1000;

/// Parses a comma-separated list whose items are decimal numbers ("2", "3.5") or ranges
/// "A:B:STEP" (A <= B, STEP > 0, both ends included when B - A is a multiple of STEP).
/// Returns canonical decimal text ("2.50" -> "2.5", "02" -> "2"), in the order given.
/// Throws std::invalid_argument with a one-line message naming the problem and the accepted
/// range for: an item that is not a plain decimal number, an order <= 1 or > 64, an empty or
/// reversed range, a zero or negative step, a duplicate order, more than max_rows orders.
std::vector<std::string> parse_orders(const std::string& spec);

/// Canonical decimal text of a plain decimal number (no sign, no exponent). Throws
/// std::invalid_argument for other text.
std::string canonical_decimal(const std::string& s);

} // namespace renorm::table
