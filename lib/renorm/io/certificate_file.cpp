#include <renorm/io/certificate_file.hpp>

#include <renorm/io/sha256.hpp>
#include <renorm/version.hpp>

#include <cmath>
#include <cstdio>
#include <stdexcept>

namespace renorm::io {

using nlohmann::json;
using series::Bound;

namespace {

// Sanity limits for a document read from disk: beyond them the re-check would not finish in
// reasonable time or memory, so the file is rejected as bad input.
constexpr slong max_truncation = 3000;
constexpr slong max_prec = 40000;

json bound_json(const Bound& b)
{
    return json{{"exact", ball::dump(b.to_ball())}, {"approx", b.text(7)}};
}

std::string fmpz_text(const fmpz_t z)
{
    char* s = fmpz_get_str(nullptr, 10, z);
    std::string out(s);
    flint_free(s);
    return out;
}

/// floor or ceil of x 10^places, as text with the decimal point put back.
std::string decimal_round(const arf_t x, slong places, bool up)
{
    fmpz_t p10, m;
    fmpz_init(p10);
    fmpz_init(m);
    fmpz_ui_pow_ui(p10, 10, static_cast<ulong>(places));
    arf_t t;
    arf_init(t);
    arf_set_fmpz(t, p10);
    arf_mul(t, t, x, ARF_PREC_EXACT, ARF_RND_DOWN); // exact
    arf_get_fmpz(m, t, up ? ARF_RND_CEIL : ARF_RND_FLOOR);
    const bool neg = fmpz_sgn(m) < 0;
    fmpz_abs(m, m);
    std::string digits = fmpz_text(m);
    if (static_cast<slong>(digits.size()) <= places)
        digits = std::string(static_cast<size_t>(places) + 1 - digits.size(), '0') + digits;
    std::string out = (neg ? "-" : "") + digits.substr(0, digits.size() - static_cast<size_t>(places));
    if (places > 0)
        out += "." + digits.substr(digits.size() - static_cast<size_t>(places));
    arf_clear(t);
    fmpz_clear(m);
    fmpz_clear(p10);
    return out;
}

/// Decimal places that show the digits an enclosure determines, plus two.
slong places_for(const ball::Ball& x)
{
    const double l = Bound::radius_of(x).approx_log10();
    if (!std::isfinite(l))
        return 30;
    return std::clamp<slong>(static_cast<slong>(std::floor(-l)) + 2, 10, 100000);
}

json claim_json(const ball::Ball& x, const std::string& statement)
{
    const slong places = places_for(x);
    return json{{"lower", decimal_lower(x, places)},
                {"upper", decimal_upper(x, places)},
                {"statement", statement}};
}

json poly_json(const ball::BallPoly& p)
{
    json a = json::array();
    for (slong k = 0; k < p.length(); ++k)
        a.push_back(ball::dump(p.coeff(k)));
    return a;
}

const char* claim_alpha =
    "T has exactly one fixed point G* in the ball, and alpha = -1/G*(1) lies in [lower, upper]";
const char* claim_delta =
    "DT(G*) has an eigenvalue in [lower, upper] (unique eigenpair in the eigenpair ball)";
const char* claim_g0 = "the fixed point satisfies G*(0) in [lower, upper]";

// ---- reading ----

struct Reject {
    std::string reason;
    bool bad_input;
};

const json& field(const json& j, const char* key)
{
    if (!j.is_object() || !j.contains(key))
        throw Reject{std::string("missing field '") + key + "'", true};
    return j.at(key);
}

std::string text_field(const json& j, const char* key)
{
    const json& v = field(j, key);
    if (!v.is_string())
        throw Reject{std::string("field '") + key + "' is not a string", true};
    return v.get<std::string>();
}

slong int_field(const json& j, const char* key, slong lo, slong hi)
{
    const json& v = field(j, key);
    if (!v.is_number_integer())
        throw Reject{std::string("field '") + key + "' is not an integer", true};
    const long long x = v.get<long long>();
    if (x < lo || x > hi)
        throw Reject{std::string("field '") + key + "' out of range", true};
    return static_cast<slong>(x);
}

ball::Ball exact_ball(const json& j, const char* key)
{
    const json& v = field(j, key);
    if (!v.is_string())
        throw Reject{std::string("field '") + key + "' is not a string", true};
    auto b = ball::load(v.get<std::string>());
    if (!b || !arb_is_finite(b->get()))
        throw Reject{std::string("field '") + key + "' is not an exact number", true};
    return *b;
}

Bound bound_field(const json& j, const char* key)
{
    const json& v = field(j, key);
    ball::Ball b = exact_ball(v, "exact");
    if (!arb_is_exact(b.get()) || arf_sgn(arb_midref(b.get())) < 0)
        throw Reject{std::string("bound '") + key + "' is not an exact nonnegative number", true};
    // The recorded number must be a bound as written (a mag: at most 30 mantissa bits).
    Bound out;
    {
        fmpz_t man, ex;
        fmpz_init(man);
        fmpz_init(ex);
        arf_get_fmpz_2exp(man, ex, arb_midref(b.get()));
        if (fmpz_bits(man) <= MAG_BITS && fmpz_fits_si(ex) && fmpz_get_si(ex) > -(WORD(1) << 40) &&
            fmpz_get_si(ex) < (WORD(1) << 40))
            mag_set_ui_2exp_si(out.get(), fmpz_get_ui(man), fmpz_get_si(ex));
        else
            mag_inf(out.get());
        fmpz_clear(ex);
        fmpz_clear(man);
    }
    ball::Ball back = out.to_ball();
    if (!arf_equal(arb_midref(back.get()), arb_midref(b.get())))
        throw Reject{std::string("bound '") + key + "' has too many bits", true};
    return out;
}

ball::BallPoly poly_field(const json& j, const char* key, slong max_len)
{
    const json& v = field(j, key);
    if (!v.is_array() || v.empty() || static_cast<slong>(v.size()) > max_len)
        throw Reject{std::string("field '") + key + "' is not an array of 1..N numbers", true};
    ball::BallPoly p;
    for (size_t k = 0; k < v.size(); ++k) {
        if (!v[k].is_string())
            throw Reject{std::string("field '") + key + "' has a non-string entry", true};
        auto b = ball::load(v[k].get<std::string>());
        if (!b || !arb_is_exact(b->get()) || !arb_is_finite(b->get()))
            throw Reject{std::string("field '") + key + "' has an entry that is not exact", true};
        p.set_coeff(static_cast<slong>(k), *b);
    }
    return p;
}

double exact_double(const ball::Ball& b, const char* what)
{
    const double d = arf_get_d(arb_midref(b.get()), ARF_RND_NEAR);
    ball::Ball back(d);
    if (!arb_is_exact(b.get()) || !arb_equal(back.get(), b.get()))
        throw Reject{std::string(what) + " is not an exact double", true};
    return d;
}

/// 2 recorded >= recomputed, or a rejection naming the bound. (The proof itself uses only the
/// recomputed bounds; this catches a file whose recorded bounds understate them. The factor 2
/// tolerates a different rounding of the approximate inverse by another Arb build.)
void check_recorded(const json& bounds, const char* key, const Bound& recomputed)
{
    Bound recorded = bound_field(bounds, key);
    if (recorded * Bound(2.0) < recomputed)
        throw Reject{std::string("the recorded bound ") + key +
                         " is smaller than the recomputed one (" +
                         recomputed.text(7) + ")",
                     false};
}

void check_claim(const json& claims, const char* key, const ball::Ball& enclosure)
{
    const json& c = field(claims, key);
    const std::string lo = text_field(c, "lower"), hi = text_field(c, "upper");
    if (!decimal_bounds(lo, enclosure, true) || !decimal_bounds(hi, enclosure, false))
        throw Reject{std::string("claim '") + key + "' = [" + lo + ", " + hi +
                         "] does not contain the proved enclosure " +
                         ball::enclosure_string(enclosure, 30),
                     false};
}

} // namespace

std::string decimal_lower(const ball::Ball& x, slong places)
{
    arf_t lb;
    arf_init(lb);
    arb_get_lbound_arf(lb, x.get(), ARF_PREC_EXACT);
    std::string s = decimal_round(lb, places, false);
    arf_clear(lb);
    return s;
}

std::string decimal_upper(const ball::Ball& x, slong places)
{
    arf_t ub;
    arf_init(ub);
    arb_get_ubound_arf(ub, x.get(), ARF_PREC_EXACT);
    std::string s = decimal_round(ub, places, true);
    arf_clear(ub);
    return s;
}

bool decimal_bounds(const std::string& d, const ball::Ball& x, bool is_lower)
{
    // Parse [-]digits[.digits] exactly as M / 10^places.
    size_t i = 0;
    bool neg = false;
    if (i < d.size() && d[i] == '-') {
        neg = true;
        ++i;
    }
    std::string digits;
    slong places = 0;
    bool seen_point = false, seen_digit = false;
    for (; i < d.size(); ++i) {
        const char ch = d[i];
        if (ch >= '0' && ch <= '9') {
            digits.push_back(ch);
            seen_digit = true;
            if (seen_point)
                ++places;
        } else if (ch == '.' && !seen_point) {
            seen_point = true;
        } else {
            return false;
        }
    }
    if (!seen_digit || digits.size() > 200000 || !arb_is_finite(x.get()))
        return false;
    fmpz_t m, p10;
    fmpz_init(m);
    fmpz_init(p10);
    fmpz_set_str(m, digits.c_str(), 10);
    if (neg)
        fmpz_neg(m, m);
    fmpz_ui_pow_ui(p10, 10, static_cast<ulong>(places));
    arf_t end, t, mf;
    arf_init(end);
    arf_init(t);
    arf_init(mf);
    if (is_lower)
        arb_get_lbound_arf(end, x.get(), ARF_PREC_EXACT);
    else
        arb_get_ubound_arf(end, x.get(), ARF_PREC_EXACT);
    arf_set_fmpz(t, p10);
    arf_mul(t, t, end, ARF_PREC_EXACT, ARF_RND_DOWN); // exact: endpoint * 10^places
    arf_set_fmpz(mf, m);
    const int cmp = arf_cmp(mf, t);
    const bool ok = is_lower ? cmp <= 0 : cmp >= 0;
    arf_clear(mf);
    arf_clear(t);
    arf_clear(end);
    fmpz_clear(p10);
    fmpz_clear(m);
    return ok;
}

std::string content_checksum(const json& doc)
{
    json copy = doc;
    if (copy.is_object())
        copy.erase("checksum");
    return sha256_hex(copy.dump());
}

json certificate_to_json(const certify::Certificate& c)
{
    if (c.status != certify::Status::certified)
        throw std::invalid_argument("certificate_to_json: the proof did not close; nothing to write");
    const certify::ProofData& pd = c.data;
    const auto& fb = c.fixed_point;
    const auto& eb = c.eigen;
    json doc;
    doc["format"] = certificate_format;
    doc["version"] = certificate_version;
    doc["producer"] = {{"renorm_version", renorm::version}, {"commit", renorm::git_commit}};
    doc["theorem"] = certify::theorem_statement;
    doc["norm"] = "||f|| = sum_k |f_k| for f(y) = sum_k f_k ((y - c)/r)^k on the disc |y - c| <= r";
    doc["problem"] = {{"order", pd.problem.order},
                      {"order_ball", ball::dump(pd.problem.order_ball(pd.prec))},
                      {"disc_centre", ball::dump(ball::Ball(pd.problem.disc.centre))},
                      {"disc_radius", ball::dump(ball::Ball(pd.problem.disc.radius))}};
    doc["truncation"] = pd.n;
    doc["prec"] = pd.prec;
    doc["prec_low"] = pd.prec_low;
    doc["fixed_point"] = {
        {"centre", poly_json(pd.g0)},
        {"radius", bound_json(pd.rho_g)},
        {"bounds",
         {{"Y", bound_json(fb.y)},
          {"Z", bound_json(fb.z)},
          {"norm_A", bound_json(fb.norm_a)},
          {"tail_column_norm", bound_json(fb.beta)},
          {"norm_sigma_u", bound_json(fb.r_u)},
          {"norm_sigma_v", bound_json(fb.r_v)},
          {"residual_remainder", bound_json(fb.residual_eps)},
          {"derivative_check", bound_json(fb.derivative_check)}}}};
    doc["eigenpair"] = {{"vector", poly_json(pd.h0)},
                        {"value", ball::dump(pd.lambda0)},
                        {"normalisation_index", pd.norm_index},
                        {"radius", bound_json(pd.rho_e)},
                        {"bounds",
                         {{"Y", bound_json(eb.y)},
                          {"Z0", bound_json(eb.z0)},
                          {"Z1", bound_json(eb.z1)},
                          {"norm_A", bound_json(eb.norm_a)}}}};
    doc["claims"] = {{"alpha", claim_json(c.alpha, claim_alpha)},
                     {"delta", claim_json(c.delta, claim_delta)},
                     {"G_at_0", claim_json(c.g_at_zero, claim_g0)}};
    doc["checksum"] = {{"algorithm", "SHA-256"},
                       {"of", "the compact JSON text (sorted keys) of every other field"},
                       {"value", content_checksum(doc)}};
    return doc;
}

Verdict verify_certificate(const std::string& text)
{
    Verdict v;
    try {
        json doc = json::parse(text, nullptr, /*allow_exceptions=*/false);
        if (doc.is_discarded())
            throw Reject{"not valid JSON (truncated or damaged file)", true};
        if (!doc.is_object())
            throw Reject{"not a JSON object", true};
        if (text_field(doc, "format") != certificate_format)
            throw Reject{"unknown format (expected " + std::string(certificate_format) + ")", true};
        const json& ver = field(doc, "version");
        if (!ver.is_number_integer() || ver.get<long long>() != certificate_version)
            throw Reject{"unknown format version (this renorm reads version " +
                             std::to_string(certificate_version) + ")",
                         true};
        const json& ck = field(doc, "checksum");
        if (text_field(ck, "algorithm") != "SHA-256")
            throw Reject{"unknown checksum algorithm", true};
        if (text_field(ck, "value") != content_checksum(doc))
            throw Reject{"checksum mismatch: the file was altered or damaged", false};

        certify::ProofData pd;
        const json& prob = field(doc, "problem");
        pd.problem.order = text_field(prob, "order");
        pd.problem.disc.centre = exact_double(exact_ball(prob, "disc_centre"), "disc_centre");
        pd.problem.disc.radius = exact_double(exact_ball(prob, "disc_radius"), "disc_radius");
        pd.n = int_field(doc, "truncation", 4, max_truncation);
        pd.prec = int_field(doc, "prec", 64, max_prec);
        pd.prec_low = int_field(doc, "prec_low", 64, max_prec);
        {
            ball::Ball zrec = exact_ball(prob, "order_ball");
            ball::Ball z;
            try {
                z = pd.problem.order_ball(pd.prec);
            } catch (const std::invalid_argument& e) {
                throw Reject{std::string("bad order: ") + e.what(), true};
            }
            if (!arb_overlaps(z.get(), zrec.get()))
                throw Reject{"order_ball does not match the order text", false};
        }
        const json& fp = field(doc, "fixed_point");
        pd.g0 = poly_field(fp, "centre", pd.n);
        if (2 * pd.g0.length() < pd.n)
            throw Reject{"the centre has fewer than N/2 coefficients (truncation inflated?)", true};
        pd.rho_g = bound_field(fp, "radius");
        const json& ep = field(doc, "eigenpair");
        pd.h0 = poly_field(ep, "vector", pd.n);
        pd.lambda0 = exact_ball(ep, "value");
        pd.norm_index = int_field(ep, "normalisation_index", 0, pd.n - 1);
        pd.rho_e = bound_field(ep, "radius");
        const json& claims = field(doc, "claims");
        if (!claims.is_object() || claims.size() != 3)
            throw Reject{"claims must be exactly alpha, delta and G_at_0", true};

        v.recomputed = certify::recheck(pd);
        const certify::Certificate& c = v.recomputed;
        if (c.status == certify::Status::bad_input)
            throw Reject{c.message, true};
        if (c.status != certify::Status::certified)
            throw Reject{"the proof does not close when recomputed: " + c.message, false};

        const json& fb = field(fp, "bounds");
        check_recorded(fb, "Y", c.fixed_point.y);
        check_recorded(fb, "Z", c.fixed_point.z);
        const json& eb = field(ep, "bounds");
        check_recorded(eb, "Y", c.eigen.y);
        check_recorded(eb, "Z0", c.eigen.z0);
        check_recorded(eb, "Z1", c.eigen.z1);

        check_claim(claims, "alpha", c.alpha);
        check_claim(claims, "delta", c.delta);
        check_claim(claims, "G_at_0", c.g_at_zero);

        const std::string z = pd.problem.order;
        v.proved.push_back("The period-doubling operator T for a critical point of order z = " + z +
                           " has exactly one fixed point G* within " +
                           bound_json(pd.rho_g)["approx"].get<std::string>() +
                           " (l1 norm on the disc) of the recorded centre.");
        v.proved.push_back("alpha = -1/G*(1) lies in [" +
                           claims["alpha"]["lower"].get<std::string>() + ", " +
                           claims["alpha"]["upper"].get<std::string>() + "].");
        v.proved.push_back("DT(G*) has an eigenvalue delta in [" +
                           claims["delta"]["lower"].get<std::string>() + ", " +
                           claims["delta"]["upper"].get<std::string>() +
                           "] (the only eigenpair within " +
                           bound_json(pd.rho_e)["approx"].get<std::string>() +
                           " of the recorded one).");
        v.proved.push_back("G*(0) lies in [" + claims["G_at_0"]["lower"].get<std::string>() +
                           ", " + claims["G_at_0"]["upper"].get<std::string>() + "].");
        v.accepted = true;
    } catch (const Reject& r) {
        v.accepted = false;
        v.bad_input = r.bad_input;
        v.reason = r.reason;
    } catch (const std::exception& e) {
        v.accepted = false;
        v.bad_input = true;
        v.reason = std::string("malformed certificate: ") + e.what();
    }
    return v;
}

} // namespace renorm::io
