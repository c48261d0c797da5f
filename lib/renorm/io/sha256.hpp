#pragma once
/// \file
/// SHA-256 (FIPS 180-4), written for renorm so that certificates carry an integrity checksum
/// without a dependency on a cryptographic library. The round constants are computed, not
/// typed in: the first 32 bits of the fractional parts of the cube roots (K) and square roots
/// (initial hash) of the first primes, evaluated in Arb ball arithmetic (their integer parts
/// are certainly determined). Tested against the FIPS 180-4 examples.

#include <string>

namespace renorm::io {

/// The SHA-256 digest of `data` as 64 lowercase hexadecimal digits.
std::string sha256_hex(const std::string& data);

} // namespace renorm::io
