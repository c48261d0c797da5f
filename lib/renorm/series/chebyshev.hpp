#pragma once
/// \file
/// Functions on [0, 1] as Chebyshev series f(y) = sum_k c_k T_k(2y - 1), the second basis of
/// renorm (design note §3). Used by the collocation solver for large orders z, where the
/// image of any disc around [0, 1] under the doubling map's inner maps leaves the disc
/// (DEVELOPERS.md, "Large z"). The coefficients are stored in a BallPoly (coefficient k = c_k).

#include <renorm/ball/ball.hpp>

namespace renorm::series {

using ball::Ball;
using ball::BallPoly;
using ball::BallVec;

/// f(y) and f'(y) (derivative in y) by Clenshaw's recurrence.
/// Encloses both for every y in the input ball and every coefficient in its ball; `df` may be
/// null. Aliasing: f and df must not alias y.
void chebyshev_evaluate(Ball& f, Ball* df, const BallPoly& c, const Ball& y, slong prec);

/// The n Chebyshev–Lobatto points of [0, 1], y_j = (1 + cos(pi j / (n - 1))) / 2, j = 0..n-1
/// (y_0 = 1, y_{n-1} = 0). Encloses them. Requires n >= 2.
BallVec chebyshev_points(slong n, slong prec);

/// The matrix T_k(2 y_j - 1), j, k < n, at the points y. Encloses every entry.
ball::BallMat chebyshev_matrix(const BallVec& y, slong n, slong prec);

/// Coefficients of the degree n-1 interpolant of the values at the n Lobatto points
/// (a discrete cosine transform done as a direct sum). Encloses them (exactly the interpolant).
BallPoly chebyshev_interpolate(const BallVec& values, slong prec);

} // namespace renorm::series
