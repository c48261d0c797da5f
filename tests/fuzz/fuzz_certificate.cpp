// Source: none needed - a fuzz target asserts properties (no crash, no accepted forgery), no values.
// Fuzz target: the certificate reader. verify_certificate promises never to throw for bad text
// and to accept only a certificate whose every bound it recomputed; any crash, sanitizer report
// or exception escaping it is a bug. A mutated certificate almost always fails its checksum, so
// when the input is a JSON object the target also re-signs it (recomputes "checksum") and
// verifies that too: the fuzzer then reaches the field readers and the recheck of the proof.
// No check values: the fuzz target asserts only that reading any input ends in accept or reject
// without a crash, a hang or a sanitizer report.
#include <renorm/io/certificate_file.hpp>

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

namespace {

void check(const std::string& text)
{
    const renorm::io::Verdict v = renorm::io::verify_certificate(text);
    // A verdict is either an acceptance with statements, or a rejection with a reason.
    if (v.accepted && (v.proved.empty() || v.bad_input))
        std::abort();
    if (!v.accepted && v.reason.empty())
        std::abort();
}

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size)
{
    const std::string text(reinterpret_cast<const char*>(data), size);
    check(text);
    nlohmann::json doc = nlohmann::json::parse(text, nullptr, false);
    if (doc.is_object() && doc.contains("checksum") && doc["checksum"].is_object()) {
        doc["checksum"]["value"] = renorm::io::content_checksum(doc);
        check(doc.dump(1));
    }
    return 0;
}
