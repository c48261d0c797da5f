#pragma once
// Moving ball vectors in and out of double precision without underflow: a vector whose
// entries are 1e-900 is scaled by a power of two first. Used by the chord steps, whose
// linear solves run in double while the residuals carry thousands of digits.

#include <renorm/ball/ball.hpp>

#include <Eigen/Dense>

namespace renorm::newton::detail {

/// An exponent e with |v_k| < 2^e for every k < n (midpoints); LONG_MIN/2 for a zero vector.
slong max_exponent(arb_srcptr v, slong n);

/// The midpoints v_k * 2^-e rounded to doubles.
Eigen::VectorXd to_scaled_doubles(arb_srcptr v, slong n, slong e);

/// out_k = x_k * 2^e (exact: a double times a power of two).
void from_scaled_doubles(arb_ptr out, const Eigen::VectorXd& x, slong e);

/// log10 of an upper bound of |x| (midpoint and radius); -inf for exact zero.
double log10_upper(const ball::Ball& x);

} // namespace renorm::newton::detail
