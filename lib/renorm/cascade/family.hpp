#pragma once
/// \file
/// One-parameter families of interval maps f_mu(x) with one critical point c (the map has a
/// single extremum at c, of order z: f(x) - f(c) ~ |x - c|^z).

#include <renorm/ball/ball.hpp>
#include <renorm/cascade/expression.hpp>

#include <optional>
#include <string>
#include <vector>

namespace renorm::cascade {

/// A family f_mu(x) given by an expression in x and mu, with its critical point, the interval
/// its orbits must stay in, and the parameter range scanned for the first superstable
/// parameters.
struct Family {
    std::string name;          ///< "quadratic", ..., or "map" for a typed expression
    std::string formula;       ///< the expression text
    Expression expr;           ///< parsed formula
    std::string critical_text; ///< the critical point as a constant expression ("1/2"), or ""
    double critical_guess = 0; ///< a double near c (used when critical_text is empty)
    double x_lo = -1, x_hi = 1;   ///< orbits must stay in [x_lo, x_hi]
    double mu_lo = 0, mu_hi = 4;  ///< scan range for the first two superstable parameters
    double order = 2;             ///< order z of the critical point (for display)
    bool fast_quadratic = false;  ///< f = 1 - mu x^2: a hand-written orbit kernel applies
};

/// The names of the built-in families: quadratic, logistic, sine, power, cubic.
std::vector<std::string> builtin_family_names();

/// One line describing the built-in family `name` (formula and critical point).
std::string describe_builtin_family(const std::string& name);

/// A built-in family.
///   quadratic  1 - mu x^2        on [-1, 1], c = 0
///   logistic   mu x (1 - x)      on [0, 1],  c = 1/2
///   sine       mu sin(pi x)      on [0, 1],  c = 1/2
///   power      1 - mu |x|^z      on [-1, 1], c = 0, any real z > 1 (`order_text`)
///   cubic      1 - mu x^2 + x^3/4 on [-1, 1], c = 0 (see family.cpp for why it is unimodal)
/// Throws std::invalid_argument for an unknown name, or for power with an order that is not a
/// number > 1.
Family make_builtin_family(const std::string& name, const std::string& order_text = "2");

/// A family typed by the user. `critical_text` is a constant expression for c, or empty to find
/// c as the unique zero of df/dx in [x_lo, x_hi] (see critical_point()).
/// Throws ParseError for a syntax error, std::invalid_argument for an empty interval or range.
Family make_user_family(const std::string& formula, const std::string& critical_text,
                        double x_lo, double x_hi, double mu_lo, double mu_hi);

/// Outcome of locating the critical point.
struct CriticalPoint {
    bool ok = false;
    ball::Ball c;        ///< enclosure of c (NaN when !ok)
    std::string problem; ///< why it failed
};

/// The critical point at precision `prec`.
/// Given text: its value as a ball. Otherwise: c is the zero of df/dx in [x_lo, x_hi] at
/// mu = (mu_lo + mu_hi)/2, located by a sign scan and Newton on df/dx (second derivative by
/// automatic differentiation), then proved unique in a small box by a Krawczyk test on df/dx.
/// In both cases the function checks that df/dx(c, mu) contains 0 at mu_lo, mu_hi and the
/// middle, since the cascade needs a critical point that does not move with mu.
/// Encloses: c (when ok). Returns ok == false with a reason when there is no zero, several,
/// the proof fails, or c moves with mu.
CriticalPoint critical_point(const Family& family, slong prec);

} // namespace renorm::cascade
