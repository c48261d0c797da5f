// Source: none needed - a fuzz target asserts properties (parse/print round trip), no values.
// Fuzz target: the map-expression parser of cascade/. Either parse throws ParseError (with a
// column inside the text, or one past its end), or it returns a tree whose fully parenthesised
// rendering parses again to the same rendering.
#include <renorm/cascade/expression.hpp>

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

using renorm::cascade::Expression;
using renorm::cascade::ParseError;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size)
{
    const std::string text(reinterpret_cast<const char*>(data), size);
    try {
        const Expression e = Expression::parse(text);
        if (e.nodes().empty() || e.root() < 0)
            std::abort();
        for (size_t i = 0; i < e.nodes().size(); ++i) { // children before parents
            const auto& n = e.nodes()[i];
            if (n.a >= static_cast<int>(i) || n.b >= static_cast<int>(i))
                std::abort();
        }
        const std::string once = e.to_string();
        const std::string twice = Expression::parse(once).to_string();
        if (once != twice)
            std::abort();
    } catch (const ParseError& err) {
        if (err.column() < 1 || err.column() > static_cast<int>(text.size()) + 1)
            std::abort();
    }
    return 0;
}
