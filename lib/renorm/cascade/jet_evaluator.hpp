#pragma once
/// \file
/// Forward-mode automatic differentiation of an Expression with Arb balls.
///
/// Every node carries a jet: the value and its partial derivatives with respect to x and mu,
/// (f, f_x, f_mu, f_xx, f_xmu), up to the order asked for. The chain rule is applied exactly,
/// node by node, in ball arithmetic; there are no finite differences.

#include <renorm/ball/ball.hpp>
#include <renorm/cascade/expression.hpp>

#include <vector>

namespace renorm::cascade {

/// The local partial derivatives of a map f(x, mu) at one point (or over a box of balls).
struct Partials {
    ball::Ball f;    ///< f(x, mu)
    ball::Ball fx;   ///< df/dx          (order >= 1)
    ball::Ball fmu;  ///< df/dmu         (order >= 1)
    ball::Ball fxx;  ///< d2f/dx2        (order 2)
    ball::Ball fxmu; ///< d2f/dx dmu     (order 2)
};

/// Evaluates an Expression and its partial derivatives over balls, at a fixed precision.
/// Construction converts the constants (numbers, pi, e, constant subtrees) once at `prec`.
///
/// Encloses: for every x in the ball x and every mu in the ball mu at which the expression is
/// differentiable, each output ball contains the corresponding partial derivative. Where a
/// derivative does not exist (abs at 0, u^p at u = 0 with p < 2 for the second derivative) the
/// output is a ball of infinite radius or NaN, except that abs'(0) is enclosed by [-1, 1] (the
/// generalised gradient), which gives the true derivative 0 for |u|^p, p > 1, at u = 0.
/// Functions outside their domain (log, sqrt of a negative number, a non-integer power of a
/// negative number) give NaN balls.
/// Precision: `prec` bits for every operation.
class JetEvaluator {
public:
    /// `order` is 0 (value only), 1 (f, f_x, f_mu) or 2 (also f_xx, f_xmu).
    /// Throws std::invalid_argument for a bad order or prec < 2.
    JetEvaluator(const Expression& expr, int order, slong prec);
    JetEvaluator(const JetEvaluator&) = delete;
    JetEvaluator& operator=(const JetEvaluator&) = delete;

    /// Writes the partials at (x, mu) into the non-null outputs (a null output is skipped;
    /// outputs above `order` are never written). Outputs must not alias x or mu.
    void evaluate(arb_ptr f, arb_ptr fx, arb_ptr fmu, arb_ptr fxx, arb_ptr fxmu, arb_srcptr x,
                  arb_srcptr mu);
    /// As evaluate(), but f is enclosed by the mean-value (centred) form
    ///   f(X, mu) in f(mid X, mu) + f_x(X, mu) (X - mid X),
    /// intersected with the direct evaluation. Iterating a map with the direct evaluation
    /// multiplies radii by the sum of the absolute values of the terms of f' (e.g. |x| + |1 - x|
    /// for x (1 - x)) instead of |f'|: a loss of about 2^n log2(that factor) bits over an orbit of
    /// length 2^n. The centred form grows radii by |f'| only. Needs order >= 1.
    /// Encloses: the same as evaluate(). Costs one more (value-only) evaluation.
    void evaluate_centered(arb_ptr f, arb_ptr fx, arb_ptr fmu, arb_ptr fxx, arb_ptr fxmu,
                           arb_srcptr x, arb_srcptr mu);
    /// The same, returning the partials (those above `order` are zero).
    Partials evaluate(const ball::Ball& x, const ball::Ball& mu);

    int order() const { return m_order; }
    slong prec() const { return m_prec; }

private:
    void eval_node(int i);
    void run_nodes(arb_srcptr x, arb_srcptr mu);
    arb_ptr reg(int i) { return m_regs[5 * static_cast<slong>(i)]; }

    std::vector<Node> m_nodes;
    int m_order;
    int m_active_order; ///< m_order, or 0 during a value-only pass
    slong m_prec;
    int m_scratch; ///< index of the first of three scratch jets
    ball::BallVec m_regs;
    ball::BallVec m_tmp;          ///< g, g', g'' and work space
    std::vector<int> m_pow_mode;  ///< per pow node: 0 variable exponent, 1 integer, 2 real constant
    std::vector<long> m_pow_int;  ///< the integer exponent (mode 1)
    arb_srcptr m_x = nullptr;
    arb_srcptr m_mu = nullptr;
};

} // namespace renorm::cascade
