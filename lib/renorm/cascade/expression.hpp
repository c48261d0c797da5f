#pragma once
/// \file
/// A map f(x, mu) typed in ordinary notation, parsed into an expression tree.
///
/// Grammar (recursive descent, one function per rule):
///   expr    := term (('+' | '-') term)*
///   term    := unary (('*' | '/') unary)*
///   unary   := ('-' | '+') unary | power
///   power   := primary ('^' unary)?          (right associative: 2^3^2 = 2^9; -x^2 = -(x^2))
///   primary := number | 'x' | 'mu' | 'pi' | 'e' | function '(' expr ')' | '(' expr ')'
///   function: sin cos tan exp log sqrt abs
/// Numbers are decimal: 12, 0.5, .5, 1e-3, 2.5E+2. Spaces are ignored.

#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

namespace renorm::cascade {

/// The operation of one node of an expression tree.
enum class Op {
    number, ///< a decimal constant (text kept, converted to a ball at each precision)
    pi,
    e,
    var_x,
    var_mu,
    add,
    sub,
    mul,
    div,
    pow,
    neg,
    sin,
    cos,
    tan,
    exp,
    log,
    sqrt,
    abs,
};

/// One node. Children always come before their parent in Expression::nodes().
struct Node {
    Op op = Op::number;
    int a = -1;           ///< first operand (index into nodes), -1 if none
    int b = -1;           ///< second operand, -1 if none
    std::string text;     ///< the decimal text of a number node
    bool dep_x = false;   ///< the subtree depends on x
    bool dep_mu = false;  ///< the subtree depends on mu
    int column = 0;       ///< 1-based column where the node starts in the source
    int depth = 1;        ///< height of the subtree (parsing refuses more than max_expression_depth)
};

/// The deepest expression accepted (nesting of parentheses, signs, powers, and chains of
/// operators): every walk over the tree is then safe from stack exhaustion.
inline constexpr int max_expression_depth = 200;

/// A syntax error: the 1-based column and a message saying what was expected or unknown.
class ParseError : public std::invalid_argument {
public:
    ParseError(int column, const std::string& message)
        : std::invalid_argument("column " + std::to_string(column) + ": " + message),
          m_column(column), m_message(message)
    {
    }
    int column() const { return m_column; }
    const std::string& message() const { return m_message; }

private:
    int m_column;
    std::string m_message;
};

/// A parsed expression in x and mu, stored as a topologically ordered node list
/// (the root is the last node).
class Expression {
public:
    /// Parses `text`. Throws ParseError (column, what was expected) on a syntax error or
    /// an unknown name (the message names it).
    static Expression parse(const std::string& text);

    const std::vector<Node>& nodes() const { return m_nodes; }
    int root() const { return static_cast<int>(m_nodes.size()) - 1; }
    const std::string& text() const { return m_text; }
    /// A fully parenthesised rendering of the tree, for diagnostics and tests.
    std::string to_string() const;

private:
    friend class Parser;
    std::vector<Node> m_nodes;
    std::string m_text;
};

} // namespace renorm::cascade
