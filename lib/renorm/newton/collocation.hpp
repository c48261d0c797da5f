#pragma once
/// \file
/// The doubling equation by Chebyshev collocation on [0, 1] (the second basis; DEVELOPERS.md,
/// "Large z"): the unknowns are the n Chebyshev coefficients of G, the equations are
/// G(y_j) = T(G)(y_j) at the n Lobatto points. Every composition is a pointwise evaluation on
/// [0, 1] (u and v map [0, 1] into itself), so no disc has to contain the inner maps' images.
/// No guarantee: estimates only.

#include <renorm/newton/fixed_point.hpp>

#include <string>

namespace renorm::newton {

/// An approximate fixed point in the Chebyshev basis. No guarantee.
struct CollocationFixedPoint {
    std::string order;
    BallPoly c;                 ///< Chebyshev coefficients of G on [0, 1] (midpoints)
    Ball a;                     ///< alpha = -1/G(1)
    slong n = 0;
    slong prec = 0;
    double log10_residual = 0;  ///< log10 max_j |G(y_j) - T(G)(y_j)|
    double decay_rate = 0;      ///< digits per coefficient of the tail
    slong steps = 0;
    bool converged = false;
    std::string message;
};

/// The collocation residual F_j = G(y_j) - T(G)(y_j) and, when `jacobian` is not null, the
/// matrix dF_j/dc_k = T_k(y_j) - DT(T_k)(y_j). Encloses both for the truncated G.
/// Returns false when T is undefined at G (G(1) >= 0, or G(u_j) <= 0).
bool collocation_residual(ball::BallVec& f, ball::BallMat* jacobian, const BallPoly& c,
                          const std::string& order, slong n, slong prec);

/// Newton's method at one size n and precision (multiprecision LU). No guarantee.
CollocationFixedPoint approx_collocation_newton(const std::string& order, const BallPoly& guess, slong n,
                                                double tol, slong max_iter, slong prec);

/// Continuation in z from 2 to `order` at size n. No guarantee.
CollocationFixedPoint approx_collocation_continuation(const std::string& order, slong n, slong prec,
                                                      const ProgressFn& progress = {});

/// Newton to `digits` (+ guard) with the size chosen from the coefficient decay, growing it
/// until the last coefficients fall below the target. No guarantee.
CollocationFixedPoint approx_collocation_refine(const CollocationFixedPoint& start, slong digits,
                                                double guard, slong min_n, const ProgressFn& progress = {});

/// The collocation matrices of DT at the fixed point: m[j][k] = DT(T_k)(y_j) and
/// c[j][k] = T_k(y_j), n x n. Encloses every entry. Returns false when T is undefined.
bool collocation_dt_matrices(ball::BallMat& m, ball::BallMat& c, const CollocationFixedPoint& fp, slong n,
                             slong prec);

} // namespace renorm::newton
