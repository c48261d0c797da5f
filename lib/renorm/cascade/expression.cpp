#include <renorm/cascade/expression.hpp>

#include <algorithm>

#include <cctype>
#include <utility>

namespace renorm::cascade {

namespace {

const char* function_names[] = {"sin", "cos", "tan", "exp", "log", "sqrt", "abs"};
const Op function_ops[] = {Op::sin, Op::cos, Op::tan, Op::exp, Op::log, Op::sqrt, Op::abs};

bool is_name_start(char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_'; }
bool is_name_char(char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; }
bool is_digit(char c) { return c >= '0' && c <= '9'; }

} // namespace

/// Recursive-descent parser; each grammar rule of expression.hpp is one member function.
class Parser {
public:
    explicit Parser(const std::string& text) : m_s(text) {}

    Expression run()
    {
        m_e.m_text = m_s;
        skip_space();
        if (m_i >= m_s.size())
            fail("expected an expression, found the end of the input");
        expr();
        skip_space();
        if (m_i < m_s.size())
            fail(std::string("expected an operator (+ - * / ^) or the end of the input, found '") +
                 m_s[m_i] + "'");
        return std::move(m_e);
    }

private:
    const std::string& m_s;
    std::size_t m_i = 0;
    int m_depth = 0;
    Expression m_e;

    [[noreturn]] void fail(const std::string& msg) const
    {
        throw ParseError(static_cast<int>(m_i) + 1, msg);
    }
    void skip_space()
    {
        while (m_i < m_s.size() && std::isspace(static_cast<unsigned char>(m_s[m_i])))
            ++m_i;
    }
    bool accept(char c)
    {
        skip_space();
        if (m_i < m_s.size() && m_s[m_i] == c) {
            ++m_i;
            return true;
        }
        return false;
    }
    std::string found() const
    {
        if (m_i >= m_s.size())
            return "the end of the input";
        return std::string("'") + m_s[m_i] + "'";
    }
    int add_node(Op op, int a, int b, int column, std::string text = {})
    {
        Node n;
        n.op = op;
        n.a = a;
        n.b = b;
        n.column = column;
        n.text = std::move(text);
        n.dep_x = op == Op::var_x;
        n.dep_mu = op == Op::var_mu;
        for (int c : {a, b}) {
            if (c >= 0) {
                n.dep_x = n.dep_x || m_e.m_nodes[c].dep_x;
                n.dep_mu = n.dep_mu || m_e.m_nodes[c].dep_mu;
                n.depth = std::max(n.depth, m_e.m_nodes[c].depth + 1);
            }
        }
        if (n.depth > max_expression_depth)
            throw ParseError(column, "the expression nests deeper than " + std::to_string(max_expression_depth) +
                                         " levels (operators, parentheses or signs)");
        m_e.m_nodes.push_back(std::move(n));
        return static_cast<int>(m_e.m_nodes.size()) - 1;
    }

    int expr()
    {
        int left = term();
        for (;;) {
            skip_space();
            int col = static_cast<int>(m_i) + 1;
            if (accept('+'))
                left = add_node(Op::add, left, term(), col);
            else if (accept('-'))
                left = add_node(Op::sub, left, term(), col);
            else
                return left;
        }
    }
    int term()
    {
        int left = unary();
        for (;;) {
            skip_space();
            int col = static_cast<int>(m_i) + 1;
            if (accept('*'))
                left = add_node(Op::mul, left, unary(), col);
            else if (accept('/'))
                left = add_node(Op::div, left, unary(), col);
            else
                return left;
        }
    }
    int unary()
    {
        // Every recursion of the parser passes here: bound it before the stack is.
        struct Depth {
            int& d;
            explicit Depth(int& v) : d(++v) {}
            ~Depth() { --d; }
        } depth(m_depth);
        // Four times the tree's limit: the fully parenthesised rendering of an accepted tree
        // (at most three levels per node: parentheses, a sign or power, a function's
        // parentheses) must parse again.
        if (m_depth > 4 * max_expression_depth)
            fail("the expression nests deeper than " + std::to_string(4 * max_expression_depth) +
                 " parentheses, signs or powers");
        skip_space();
        int col = static_cast<int>(m_i) + 1;
        if (accept('-'))
            return add_node(Op::neg, unary(), -1, col);
        if (accept('+'))
            return unary();
        return power();
    }
    int power()
    {
        int base = primary();
        skip_space();
        int col = static_cast<int>(m_i) + 1;
        if (accept('^'))
            return add_node(Op::pow, base, unary(), col);
        return base;
    }
    int primary()
    {
        skip_space();
        int col = static_cast<int>(m_i) + 1;
        if (m_i >= m_s.size())
            fail("expected a number, a name or '(', found the end of the input");
        char c = m_s[m_i];
        if (is_digit(c) || (c == '.' && m_i + 1 < m_s.size() && is_digit(m_s[m_i + 1])))
            return number(col);
        if (accept('(')) {
            int inner = expr();
            if (!accept(')'))
                fail("expected ')' to close the '(' at column " + std::to_string(col) +
                     ", found " + found());
            return inner;
        }
        if (is_name_start(c)) {
            std::size_t start = m_i;
            while (m_i < m_s.size() && is_name_char(m_s[m_i]))
                ++m_i;
            std::string name = m_s.substr(start, m_i - start);
            for (std::size_t k = 0; k < std::size(function_names); ++k) {
                if (name == function_names[k]) {
                    if (!accept('('))
                        fail("expected '(' after the function '" + name + "', found " + found());
                    int arg = expr();
                    if (!accept(')'))
                        fail("expected ')' to close the argument of '" + name + "', found " +
                             found());
                    return add_node(function_ops[k], arg, -1, col);
                }
            }
            Op op;
            if (name == "x")
                op = Op::var_x;
            else if (name == "mu")
                op = Op::var_mu;
            else if (name == "pi")
                op = Op::pi;
            else if (name == "e")
                op = Op::e;
            else
                throw ParseError(col, "unknown name '" + name +
                                          "' (known: x, mu, pi, e, sin, cos, tan, exp, log, "
                                          "sqrt, abs)");
            skip_space();
            if (m_i < m_s.size() && m_s[m_i] == '(')
                fail("'" + name + "' is not a function; expected an operator");
            return add_node(op, -1, -1, col);
        }
        fail("expected a number, a name or '(', found " + found());
    }
    int number(int col)
    {
        std::size_t start = m_i;
        while (m_i < m_s.size() && is_digit(m_s[m_i]))
            ++m_i;
        if (m_i < m_s.size() && m_s[m_i] == '.') {
            ++m_i;
            while (m_i < m_s.size() && is_digit(m_s[m_i]))
                ++m_i;
        }
        // An exponent only when digits follow: "2e" is 2 followed by the name e (an error).
        if (m_i < m_s.size() && (m_s[m_i] == 'e' || m_s[m_i] == 'E')) {
            std::size_t j = m_i + 1;
            if (j < m_s.size() && (m_s[j] == '+' || m_s[j] == '-'))
                ++j;
            if (j < m_s.size() && is_digit(m_s[j])) {
                m_i = j;
                while (m_i < m_s.size() && is_digit(m_s[m_i]))
                    ++m_i;
            }
        }
        return add_node(Op::number, -1, -1, col, m_s.substr(start, m_i - start));
    }
};

Expression Expression::parse(const std::string& text) { return Parser(text).run(); }

namespace {

std::string render(const std::vector<Node>& nodes, int i)
{
    const Node& n = nodes[i];
    auto bin = [&](const char* op) {
        return "(" + render(nodes, n.a) + " " + op + " " + render(nodes, n.b) + ")";
    };
    auto fn = [&](const char* name) { return std::string(name) + "(" + render(nodes, n.a) + ")"; };
    switch (n.op) {
    case Op::number:
        return n.text;
    case Op::pi:
        return "pi";
    case Op::e:
        return "e";
    case Op::var_x:
        return "x";
    case Op::var_mu:
        return "mu";
    case Op::add:
        return bin("+");
    case Op::sub:
        return bin("-");
    case Op::mul:
        return bin("*");
    case Op::div:
        return bin("/");
    case Op::pow:
        return bin("^");
    case Op::neg:
        return "(-" + render(nodes, n.a) + ")";
    case Op::sin:
        return fn("sin");
    case Op::cos:
        return fn("cos");
    case Op::tan:
        return fn("tan");
    case Op::exp:
        return fn("exp");
    case Op::log:
        return fn("log");
    case Op::sqrt:
        return fn("sqrt");
    case Op::abs:
        return fn("abs");
    }
    return "?";
}

} // namespace

std::string Expression::to_string() const { return render(m_nodes, root()); }

} // namespace renorm::cascade
