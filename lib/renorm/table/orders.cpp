#include <renorm/table/orders.hpp>

#include <algorithm>
#include <cstdint>
#include <set>
#include <sstream>
#include <stdexcept>

namespace renorm::table {

namespace {

/// A non-negative decimal number m / 10^scale with m exact (at most 18 digits in all).
struct Decimal {
    std::uint64_t m = 0;
    int scale = 0;
};

const char* const accepted =
    "(accepted: a comma-separated list of orders 1 < z <= 64 and ranges A:B:STEP with A <= B, "
    "STEP > 0)";

Decimal parse_decimal(const std::string& s, const std::string& what)
{
    Decimal d;
    bool point = false, any = false;
    int digits = 0;
    for (char c : s) {
        if (c == '.' && !point) {
            point = true;
        } else if (c >= '0' && c <= '9') {
            any = true;
            if (d.m != 0 || c != '0')
                ++digits;
            if (digits > 18)
                throw std::invalid_argument(what + " '" + s + "' has too many digits " + accepted);
            d.m = d.m * 10 + static_cast<std::uint64_t>(c - '0');
            if (point)
                ++d.scale;
        } else {
            throw std::invalid_argument(what + " '" + s + "' is not a plain decimal number " +
                                        accepted);
        }
    }
    if (!any)
        throw std::invalid_argument(what + " '" + s + "' is not a number " + accepted);
    return d;
}

std::uint64_t pow10(int k)
{
    std::uint64_t p = 1;
    while (k-- > 0)
        p *= 10;
    return p;
}

Decimal rescale(Decimal d, int scale)
{
    d.m *= pow10(scale - d.scale);
    d.scale = scale;
    return d;
}

std::string text_of(Decimal d)
{
    // drop trailing zeros of the fraction
    while (d.scale > 0 && d.m % 10 == 0) {
        d.m /= 10;
        --d.scale;
    }
    std::string digits = std::to_string(d.m);
    if (d.scale == 0)
        return digits;
    if (static_cast<int>(digits.size()) <= d.scale)
        digits.insert(0, static_cast<size_t>(d.scale - static_cast<int>(digits.size()) + 1), '0');
    digits.insert(digits.size() - static_cast<size_t>(d.scale), ".");
    return digits;
}

std::string trim(const std::string& s)
{
    const size_t a = s.find_first_not_of(" \t");
    if (a == std::string::npos)
        return "";
    const size_t b = s.find_last_not_of(" \t");
    return s.substr(a, b - a + 1);
}

void check_range(Decimal d)
{
    const std::uint64_t one = pow10(d.scale), top = 64 * pow10(d.scale);
    if (d.m <= one)
        throw std::invalid_argument("order " + text_of(d) + " is not above 1 " + accepted);
    if (d.m > top)
        throw std::invalid_argument("order " + text_of(d) + " is above 64 " + accepted);
}

} // namespace

std::string canonical_decimal(const std::string& s)
{
    return text_of(parse_decimal(s, "number"));
}

std::vector<std::string> parse_orders(const std::string& spec)
{
    std::vector<std::string> out;
    std::set<std::string> seen;
    auto add = [&](Decimal d) {
        check_range(d);
        std::string t = text_of(d);
        if (!seen.insert(t).second)
            throw std::invalid_argument("order " + t + " appears twice in the list " + accepted);
        if (static_cast<long>(out.size()) >= max_rows)
            throw std::invalid_argument("more than " + std::to_string(max_rows) +
                                        " orders in one table " + accepted);
        out.push_back(std::move(t));
    };
    if (trim(spec).empty())
        throw std::invalid_argument(std::string("the list of orders is empty ") + accepted);
    std::stringstream ss(spec);
    std::string item;
    while (std::getline(ss, item, ',')) {
        item = trim(item);
        if (item.empty())
            throw std::invalid_argument("empty item in the list of orders '" + spec + "' " + accepted);
        const auto colons = std::count(item.begin(), item.end(), ':');
        if (colons == 0) {
            add(parse_decimal(item, "order"));
            continue;
        }
        if (colons != 2)
            throw std::invalid_argument("range '" + item + "' must have the form A:B:STEP " + accepted);
        const size_t c1 = item.find(':'), c2 = item.find(':', c1 + 1);
        Decimal a = parse_decimal(trim(item.substr(0, c1)), "range start");
        Decimal b = parse_decimal(trim(item.substr(c1 + 1, c2 - c1 - 1)), "range end");
        Decimal step = parse_decimal(trim(item.substr(c2 + 1)), "range step");
        const int scale = std::max({a.scale, b.scale, step.scale});
        if (scale > 9)
            throw std::invalid_argument("range '" + item + "' has more than 9 decimals " + accepted);
        a = rescale(a, scale);
        b = rescale(b, scale);
        step = rescale(step, scale);
        if (step.m == 0)
            throw std::invalid_argument("range '" + item + "' has a step of zero " + accepted);
        if (a.m > b.m)
            throw std::invalid_argument("range '" + item + "' is reversed (start above end) " +
                                        accepted);
        if ((b.m - a.m) / step.m + 1 > static_cast<std::uint64_t>(max_rows))
            throw std::invalid_argument("range '" + item + "' has more than " +
                                        std::to_string(max_rows) + " orders " + accepted);
        for (std::uint64_t m = a.m; m <= b.m; m += step.m)
            add(Decimal{m, scale});
    }
    if (!spec.empty() && spec.back() == ',')
        throw std::invalid_argument("empty item in the list of orders '" + spec + "' " + accepted);
    return out;
}

} // namespace renorm::table
