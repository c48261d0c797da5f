#include <renorm/io/sha256.hpp>

#include <renorm/ball/ball.hpp>

#include <array>
#include <cstdint>
#include <stdexcept>

namespace renorm::io {

namespace {

/// floor(frac(p^(1/root)) * 2^32) for root = 2 or 3, certainly determined in ball arithmetic.
std::uint32_t frac_bits(ulong p, ulong root)
{
    arb_t x;
    arb_init(x);
    arb_set_ui(x, p);
    arb_root_ui(x, x, root, 192);
    arb_t fl;
    arb_init(fl);
    arb_floor(fl, x, 192);
    arb_sub(x, x, fl, 192);
    arb_mul_2exp_si(x, x, 32);
    arb_floor(x, x, 192);
    fmpz_t z;
    fmpz_init(z);
    const bool unique = arb_get_unique_fmpz(z, x) != 0;
    const std::uint32_t out = static_cast<std::uint32_t>(fmpz_get_ui(z));
    fmpz_clear(z);
    arb_clear(fl);
    arb_clear(x);
    if (!unique)
        throw std::logic_error("sha256: constant not determined");
    return out;
}

struct Constants {
    std::array<std::uint32_t, 64> k{};
    std::array<std::uint32_t, 8> h{};
    Constants()
    {
        ulong primes[64];
        int count = 0;
        for (ulong c = 2; count < 64; ++c) {
            bool prime = true;
            for (ulong d = 2; d * d <= c; ++d)
                if (c % d == 0)
                    prime = false;
            if (prime)
                primes[count++] = c;
        }
        for (int i = 0; i < 64; ++i)
            k[static_cast<size_t>(i)] = frac_bits(primes[i], 3);
        for (int i = 0; i < 8; ++i)
            h[static_cast<size_t>(i)] = frac_bits(primes[i], 2);
    }
};

const Constants& constants()
{
    static const Constants c;
    return c;
}

inline std::uint32_t rotr(std::uint32_t x, int n) { return (x >> n) | (x << (32 - n)); }

} // namespace

std::string sha256_hex(const std::string& data)
{
    const Constants& c = constants();
    std::array<std::uint32_t, 8> h = c.h;
    // Padding: 0x80, zeros, then the length in bits as a 64-bit big-endian number.
    std::string msg = data;
    const std::uint64_t bits = static_cast<std::uint64_t>(data.size()) * 8u;
    msg.push_back(static_cast<char>(0x80));
    while (msg.size() % 64 != 56)
        msg.push_back('\0');
    for (int i = 7; i >= 0; --i)
        msg.push_back(static_cast<char>((bits >> (8 * i)) & 0xffu));
    std::array<std::uint32_t, 64> w{};
    for (size_t block = 0; block < msg.size(); block += 64) {
        for (size_t t = 0; t < 16; ++t) {
            w[t] = 0;
            for (size_t b = 0; b < 4; ++b)
                w[t] = (w[t] << 8) | static_cast<unsigned char>(msg[block + 4 * t + b]);
        }
        for (size_t t = 16; t < 64; ++t) {
            const std::uint32_t s0 = rotr(w[t - 15], 7) ^ rotr(w[t - 15], 18) ^ (w[t - 15] >> 3);
            const std::uint32_t s1 = rotr(w[t - 2], 17) ^ rotr(w[t - 2], 19) ^ (w[t - 2] >> 10);
            w[t] = w[t - 16] + s0 + w[t - 7] + s1;
        }
        std::uint32_t a = h[0], b = h[1], cc = h[2], d = h[3], e = h[4], f = h[5], g = h[6],
                      hh = h[7];
        for (size_t t = 0; t < 64; ++t) {
            const std::uint32_t s1 = rotr(e, 6) ^ rotr(e, 11) ^ rotr(e, 25);
            const std::uint32_t ch = (e & f) ^ (~e & g);
            const std::uint32_t t1 = hh + s1 + ch + c.k[t] + w[t];
            const std::uint32_t s0 = rotr(a, 2) ^ rotr(a, 13) ^ rotr(a, 22);
            const std::uint32_t maj = (a & b) ^ (a & cc) ^ (b & cc);
            const std::uint32_t t2 = s0 + maj;
            hh = g;
            g = f;
            f = e;
            e = d + t1;
            d = cc;
            cc = b;
            b = a;
            a = t1 + t2;
        }
        h[0] += a;
        h[1] += b;
        h[2] += cc;
        h[3] += d;
        h[4] += e;
        h[5] += f;
        h[6] += g;
        h[7] += hh;
    }
    static const char* hex = "0123456789abcdef";
    std::string out;
    for (std::uint32_t v : h)
        for (int i = 7; i >= 0; --i)
            out.push_back(hex[(v >> (4 * i)) & 0xfu]);
    return out;
}

} // namespace renorm::io
