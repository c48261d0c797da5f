#pragma once
/// \file
/// The certificate document: a versioned JSON text that holds everything needed to re-check a
/// proof of certify/proof.hpp (problem, truncation, precisions, exact centres, radii, every
/// bound) and the claims it supports, with a SHA-256 checksum of its content.
///
/// Format "renorm-certificate", version 1 (docs/certify-notes.md lists every field). Numbers
/// that the proof uses are stored exactly (Arb dump strings); claims are decimal intervals
/// [lower, upper] rounded outward from the proved enclosures.

#include <renorm/certify/proof.hpp>

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

namespace renorm::io {

inline constexpr const char* certificate_format = "renorm-certificate";
inline constexpr int certificate_version = 1;

/// The document of a certified proof, checksum included. Throws std::invalid_argument when
/// the certificate's status is not certified (nothing unproved is ever written).
nlohmann::json certificate_to_json(const certify::Certificate& c);

/// The SHA-256 of the compact serialisation (sorted keys) of `doc` without its "checksum".
std::string content_checksum(const nlohmann::json& doc);

/// Decimal text of a number <= every point of x (lower) or >= every point (upper), with
/// `places` digits after the point. Exact (integer arithmetic on the binary endpoints).
std::string decimal_lower(const ball::Ball& x, slong places);
std::string decimal_upper(const ball::Ball& x, slong places);

/// True when the decimal text d (form [-]digits[.digits]) is certainly <= (is_lower) or >=
/// every point of x. Exact. False for malformed text.
bool decimal_bounds(const std::string& d, const ball::Ball& x, bool is_lower);

/// The verdict of verify_certificate().
struct Verdict {
    bool accepted = false;
    bool bad_input = false;          ///< not a certificate at all (malformed, unknown version)
    std::string reason;              ///< why it was rejected
    std::vector<std::string> proved; ///< plain-language statements, when accepted
    certify::Certificate recomputed; ///< the recomputed proof (when it got that far)
};

/// Re-checks a certificate text from its content alone: format and version, checksum, the
/// bounds recomputed by certify::recheck (never the solver), the recorded bounds at least the
/// recomputed ones, and every claim containing the recomputed enclosure. Never throws for bad
/// text; returns the reason instead.
Verdict verify_certificate(const std::string& text);

} // namespace renorm::io
