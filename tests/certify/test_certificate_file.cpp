// Source: FIPS 180-4 SHA-256 test vectors; the rest are round trips (no reference values).
// Tests of the certificate document: checksum, decimal rounding, write -> verify, rejections.
// Sources of the check values: SHA-256 test vectors of FIPS 180-4 (the empty message, "abc" and the
// two-block message); everything else is a round trip of the project's own file format.
#include "test_random.hpp"
#include <renorm/io/certificate_file.hpp>
#include <renorm/io/sha256.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>
#include <random>

using namespace renorm;
using nlohmann::json;

namespace {

/// A certified document for z = 2 at 40 digits (small and quick).
const std::string& good_text()
{
    static std::string text = [] {
        doubling::Problem p;
        newton::FixedPoint st = newton::approx_continuation(p, 40, 192);
        newton::FixedPoint fp = newton::approx_refine(st, 55, newton::RefineOptions{});
        certify::Certificate c =
            certify::certify_constants(p, fp.g, fp.n, ball::digits_to_bits(65, 32), 128);
        EXPECT_EQ(c.status, certify::Status::certified) << c.message;
        return io::certificate_to_json(c).dump(1);
    }();
    return text;
}

std::string rehash(json doc)
{
    doc["checksum"]["value"] = io::content_checksum(doc);
    return doc.dump(1);
}

} // namespace

TEST(Sha256, Fips180Examples)
{
    // FIPS 180-4 / NIST example digests.
    EXPECT_EQ(io::sha256_hex(""),
              "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
    EXPECT_EQ(io::sha256_hex("abc"),
              "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    EXPECT_EQ(io::sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
              "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(CertificateFile, DecimalsAreRoundedOutward)
{
    ball::Ball third;
    arb_set_si(third.get(), 1);
    arb_div_si(third.get(), third.get(), 3, 200);
    EXPECT_EQ(io::decimal_lower(third, 5), "0.33333");
    EXPECT_EQ(io::decimal_upper(third, 5), "0.33334");
    ball::Ball m;
    arb_neg(m.get(), third.get());
    EXPECT_EQ(io::decimal_lower(m, 3), "-0.334");
    EXPECT_EQ(io::decimal_upper(m, 3), "-0.333");
    EXPECT_TRUE(io::decimal_bounds("0.33333", third, true));
    EXPECT_FALSE(io::decimal_bounds("0.33334", third, true));
    EXPECT_TRUE(io::decimal_bounds("0.33334", third, false));
    EXPECT_FALSE(io::decimal_bounds("0.3333", third, false));
    EXPECT_FALSE(io::decimal_bounds("0.3x", third, false));
    EXPECT_FALSE(io::decimal_bounds("", third, false));
    // An exact binary number: 0.5 is its own bound.
    ball::Ball half(0.5);
    EXPECT_TRUE(io::decimal_bounds("0.5", half, true));
    EXPECT_TRUE(io::decimal_bounds("0.5", half, false));
}

TEST(CertificateFile, WriteThenVerifyAccepts)
{
    io::Verdict v = io::verify_certificate(good_text());
    ASSERT_TRUE(v.accepted) << v.reason;
    ASSERT_EQ(v.proved.size(), 4u);
    EXPECT_NE(v.proved[1].find("alpha = -1/G*(1) lies in [2.5029078750958928222839"),
              std::string::npos)
        << v.proved[1];
    json doc = json::parse(good_text());
    EXPECT_EQ(doc["format"], "renorm-certificate");
    EXPECT_EQ(doc["version"], 1);
    EXPECT_EQ(doc["truncation"].get<long>(),
              static_cast<long>(doc["fixed_point"]["centre"].size()));
}

TEST(CertificateFile, MalformedTruncatedOrUnknownVersionIsRejected)
{
    const std::string& t = good_text();
    for (size_t cut : {size_t{0}, size_t{1}, t.size() / 3, t.size() / 2, t.size() - 2}) {
        io::Verdict v = io::verify_certificate(t.substr(0, cut));
        EXPECT_FALSE(v.accepted) << cut;
        EXPECT_FALSE(v.reason.empty());
    }
    EXPECT_FALSE(io::verify_certificate("[1,2,3]").accepted);
    EXPECT_FALSE(io::verify_certificate("{}").accepted);
    json doc = json::parse(t);
    doc["version"] = 2;
    io::Verdict v = io::verify_certificate(rehash(doc));
    EXPECT_FALSE(v.accepted);
    EXPECT_NE(v.reason.find("version"), std::string::npos) << v.reason;
    doc = json::parse(t);
    doc["fixed_point"]["centre"] = json::array({"not a number"});
    v = io::verify_certificate(rehash(doc));
    EXPECT_FALSE(v.accepted);
    EXPECT_TRUE(v.bad_input) << v.reason;
    doc = json::parse(t);
    doc["truncation"] = 1000000000;
    EXPECT_FALSE(io::verify_certificate(rehash(doc)).accepted);
    doc = json::parse(t);
    doc["claims"].erase("delta");
    EXPECT_FALSE(io::verify_certificate(rehash(doc)).accepted);
}

TEST(CertificateFile, EverySingleNumberChangeIsRejected)
{
    // Change one digit (or hex digit) of one number anywhere in the file: the checksum must
    // catch every change.
    const std::string& t = good_text();
    std::mt19937 rng(test_random::seed());
    std::vector<size_t> positions;
    for (size_t i = 0; i < t.size(); ++i)
        if (std::isxdigit(static_cast<unsigned char>(t[i])))
            positions.push_back(i);
    std::uniform_int_distribution<size_t> pick(0, positions.size() - 1);
    const int reps = 25 * test_random::multiplier();
    for (int r = 0; r < reps; ++r) {
        std::string m = t;
        const size_t i = positions[pick(rng)];
        m[i] = m[i] == '7' ? '3' : '7';
        io::Verdict v = io::verify_certificate(m);
        EXPECT_FALSE(v.accepted) << "change at " << i << " accepted";
    }
}

TEST(CertificateFile, ChangedClaimsOrBoundsAreRejectedEvenWithAValidChecksum)
{
    // Someone who recomputes the checksum still cannot claim more than was proved.
    const std::string& t = good_text();
    std::mt19937 rng(test_random::seed() + 7);
    const char* keys[] = {"alpha", "delta", "G_at_0"};
    for (const char* key : keys) {
        for (const char* end : {"lower", "upper"}) {
            json doc = json::parse(t);
            std::string s = doc["claims"][key][end].get<std::string>();
            // Tighten the claim: move the bound inward in a digit well inside the radius.
            // (raise a lower end / lower an upper end by one unit in a digit that does not wrap)
            const bool lower = std::string(end) == "lower";
            const bool neg = s[0] == '-';
            const bool raise = lower != neg; // in absolute value
            size_t pos = s.size() - 8;
            while (pos > 0 && (s[pos] == '.' || s[pos] == (raise ? '9' : '0')))
                --pos;
            s[pos] = static_cast<char>(s[pos] + (raise ? 1 : -1));
            doc["claims"][key][end] = s;
            io::Verdict v = io::verify_certificate(rehash(doc));
            EXPECT_FALSE(v.accepted) << key << "." << end << " = " << s;
        }
    }
    // Understated bounds.
    for (const char* b : {"Y", "Z"}) {
        json doc = json::parse(t);
        ball::Ball tiny(1e-300);
        doc["fixed_point"]["bounds"][b]["exact"] = ball::dump(tiny);
        io::Verdict v = io::verify_certificate(rehash(doc));
        EXPECT_FALSE(v.accepted) << b;
        EXPECT_NE(v.reason.find(b), std::string::npos) << v.reason;
    }
    // A smaller radius than the proof supports.
    {
        json doc = json::parse(t);
        ball::Ball tiny(1e-200);
        doc["fixed_point"]["radius"]["exact"] = ball::dump(tiny);
        EXPECT_FALSE(io::verify_certificate(rehash(doc)).accepted);
    }
    // A different eigenvalue centre (by 1e-10) with the same radius.
    {
        json doc = json::parse(t);
        auto lam = ball::load(doc["eigenpair"]["value"].get<std::string>());
        ASSERT_TRUE(lam);
        ball::Ball d(1e-10);
        arb_add(lam->get(), lam->get(), d.get(), 256);
        doc["eigenpair"]["value"] = ball::dump(*lam);
        EXPECT_FALSE(io::verify_certificate(rehash(doc)).accepted);
    }
    // A centre coefficient changed by a relative 1e-6: the proof no longer closes at the radius.
    {
        json doc = json::parse(t);
        std::uniform_int_distribution<int> pick(0, 5);
        const int k = pick(rng);
        auto c = ball::load(doc["fixed_point"]["centre"][k].get<std::string>());
        ASSERT_TRUE(c);
        arb_mul_2exp_si(c->get(), c->get(), 0);
        ball::Ball f(1.000001);
        arb_mul(c->get(), c->get(), f.get(), 256);
        arb_get_mid_arb(c->get(), c->get());
        doc["fixed_point"]["centre"][k] = ball::dump(*c);
        io::Verdict v = io::verify_certificate(rehash(doc));
        EXPECT_FALSE(v.accepted) << "coefficient " << k;
    }
    // A different order z.
    {
        json doc = json::parse(t);
        doc["problem"]["order"] = "2.5";
        EXPECT_FALSE(io::verify_certificate(rehash(doc)).accepted);
    }
}
