#include <renorm/ball/ball.hpp>

#include <arb.h>
#include <flint/flint.h>

#include <cctype>
#include <cmath>
#include <memory>
#include <stdexcept>

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
    // arb_load_str expects exactly four fields separated by single spaces, each an optional '-'
    // and at least one hexadecimal digit. Anything else must be refused here: Arb does not
    // report a malformed field, it calls flint_abort (found by tests/fuzz, certificate target).
    int fields = 0;
    size_t i = 0;
    while (i <= s.size()) {
        size_t j = i;
        if (j < s.size() && s[j] == '-')
            ++j;
        const size_t digits_start = j;
        while (j < s.size() && std::isxdigit(static_cast<unsigned char>(s[j])))
            ++j;
        if (j == digits_start)
            return std::nullopt;
        ++fields;
        if (j == s.size())
            break;
        if (s[j] != ' ')
            return std::nullopt;
        i = j + 1;
    }
    if (fields != 4)
        return std::nullopt;
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
