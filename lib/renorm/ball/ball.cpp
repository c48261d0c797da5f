#include <renorm/ball/ball.hpp>

#include <arb.h>
#include <flint/flint.h>

#include <cctype>
#include <cmath>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace renorm::ball {

namespace {
struct FlintFree {
    void operator()(char* p) const { flint_free(p); }
};
using FlintString = std::unique_ptr<char, FlintFree>;
} // namespace

std::optional<Ball> from_string(const std::string& s, slong prec)
{
    if (prec < 2)
        throw std::invalid_argument("from_string: prec must be >= 2");
    if (s.empty() || s.find_first_not_of(" \t") == std::string::npos)
        return std::nullopt;
    Ball b;
    if (arb_set_str(b.get(), s.c_str(), prec) != 0 || !b.is_finite())
        return std::nullopt;
    return b;
}

std::string approx_decimal(const Ball& x, slong digits)
{
    Ball m;
    arb_get_mid_arb(m.get(), x.get());
    FlintString str(arb_get_str(m.get(), digits, ARB_STR_NO_RADIUS));
    return std::string(str.get());
}

std::string enclosure_string(const Ball& x, slong digits)
{
    FlintString str(arb_get_str(x.get(), digits, 0));
    return std::string(str.get());
}

std::string determined_digits(const Ball& x, slong max_digits, slong* count)
{
    // Arb documents for arb_get_str: unless ARB_STR_MORE is given, "the output is rounded so
    // that the midpoint is correct to 1 ulp", and when no digit is determined it prints a
    // bound of the form 1e+n (or [+/- ...]).
    FlintString str(arb_get_str(x.get(), max_digits, ARB_STR_NO_RADIUS));
    std::string t(str.get());
    slong n = 0;
    if (t.find('[') == std::string::npos) {
        bool leading = true;
        for (char ch : t) {
            if (ch == 'e' || ch == 'E')
                break;
            if (ch >= '0' && ch <= '9') {
                if (ch != '0')
                    leading = false;
                if (!leading)
                    ++n;
            }
        }
    }
    if (count)
        *count = n;
    return t;
}

std::string dump(const Ball& x)
{
    FlintString str(arb_dump_str(x.get()));
    return std::string(str.get());
}

std::optional<Ball> load(const std::string& s)
{
    // arb_load_str reads four fields "m e m' e'" (arf mantissa and exponent, mag mantissa and
    // exponent), each an optional '-' and hexadecimal digits, separated by single spaces. Arb does
    // not report malformed text: it calls flint_abort. So refuse here everything arb_dump_str never
    // writes and Arb would abort on (each found by tests/fuzz, certificate target): a field that is
    // not of that form; a zero arf mantissa with an exponent other than 0, -1, -2, -3 (zero, +inf,
    // -inf, nan); a zero mag mantissa with an exponent other than 0, -1 (zero, inf); a negative
    // mag mantissa, or one wider than the 30 bits of a mag.
    std::vector<std::string> fields;
    size_t i = 0;
    while (true) {
        size_t j = i;
        if (j < s.size() && s[j] == '-')
            ++j;
        const size_t digits_start = j;
        while (j < s.size() && std::isxdigit(static_cast<unsigned char>(s[j])))
            ++j;
        if (j == digits_start)
            return std::nullopt;
        fields.push_back(s.substr(i, j - i));
        if (j == s.size())
            break;
        if (s[j] != ' ' || fields.size() == 4)
            return std::nullopt;
        i = j + 1;
    }
    if (fields.size() != 4)
        return std::nullopt;
    auto is_zero = [](const std::string& f) {
        return f.find_first_not_of("-0") == std::string::npos;
    };
    // The value of a short field (at most 4 hex digits after leading zeros), else nullopt.
    auto small_value = [](const std::string& f) -> std::optional<long> {
        const bool neg = f[0] == '-';
        const size_t start = f.find_first_not_of('0', neg ? 1 : 0);
        if (start == std::string::npos)
            return 0L;
        if (f.size() - start > 4)
            return std::nullopt;
        const long v = std::stol(f.substr(start), nullptr, 16);
        return neg ? -v : v;
    };
    if (is_zero(fields[0])) {
        const auto e = small_value(fields[1]);
        if (!e || *e > 0 || *e < -3)
            return std::nullopt;
    }
    if (fields[2][0] == '-')
        return std::nullopt;
    {
        const size_t start = fields[2].find_first_not_of('0');
        if (start != std::string::npos &&
            (fields[2].size() - start > 8 ||
             std::stoul(fields[2].substr(start), nullptr, 16) >= (1UL << 30)))
            return std::nullopt;
    }
    if (is_zero(fields[2])) {
        const auto e = small_value(fields[3]);
        if (!e || *e > 0 || *e < -1)
            return std::nullopt;
    }
    Ball b;
    if (arb_load_str(b.get(), s.c_str()) != 0)
        return std::nullopt;
    return b;
}

slong digits_to_bits(slong digits, slong guard)
{
    if (digits < 0)
        throw std::invalid_argument("digits_to_bits: digits must be >= 0");
    return static_cast<slong>(std::ceil(static_cast<double>(digits) * 3.321928094887362)) + guard;
}

slong bits_to_digits(slong bits)
{
    if (bits <= 0)
        return 0;
    return static_cast<slong>(std::floor(static_cast<double>(bits) * 0.30102999566398120));
}

Escalation with_increasing_prec(slong start, slong max_prec, const std::function<bool(slong)>& fn)
{
    if (start < 2 || max_prec < start)
        throw std::invalid_argument("with_increasing_prec: need 2 <= start <= max_prec");
    Escalation e;
    for (slong prec = start; prec <= max_prec; prec *= 2) {
        e.prec = prec;
        if (fn(prec)) {
            e.succeeded = true;
            return e;
        }
        if (prec > max_prec / 2 && prec != max_prec) {
            // one last try exactly at the cap
            e.prec = max_prec;
            if (fn(max_prec)) {
                e.succeeded = true;
                return e;
            }
            return e;
        }
    }
    return e;
}

} // namespace renorm::ball
