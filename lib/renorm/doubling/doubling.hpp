#pragma once
/// \file
/// The period-doubling operator in the variable y = |x|^z (design note §1):
///
///     T(G)(y) = -a G(v(y)),  u(y) = y a^-z,  v(y) = G(u(y))^z,  a = a(G) = -1 / G(1),
///
/// and its derivative (design note §2, derived again in DEVELOPERS.md):
///
///     DT(G) h = h(1) q - a h(v) + m h(u),
///     m = -a z G'(v) G(u)^(z-1),   q = -a^2 G(v) - z a m u G'(u).
///
/// G and h are truncated series in s = (y - c)/r on a disc (series.hpp). The functions here
/// enclose the *truncated* operators: every product and composition keeps degrees < n, and
/// what it drops is not bounded here (certify/ adds those tails).

#include <renorm/ball/ball.hpp>
#include <renorm/series/series.hpp>

#include <Eigen/Dense>

#include <string>

namespace renorm::doubling {

using ball::Ball;
using ball::BallMat;
using ball::BallPoly;
using series::Disc;

/// z as a ball from its decimal text. Encloses the decimal number. Throws std::invalid_argument
/// when the text is not a finite number greater than 1.
Ball order_ball(const std::string& order, slong prec);

/// The doubling problem for one order z of the critical point, on one disc.
struct Problem {
    std::string order = "2"; ///< z as decimal text (converted to a ball at each precision)
    Disc disc;

    /// z as a ball. Encloses the decimal number `order`. Throws std::invalid_argument when
    /// the text is not a finite number greater than 1.
    Ball order_ball(slong prec) const;
};

/// The image of T and the scale factor it used.
struct TImage {
    BallPoly t; ///< T_n(G): the first n coefficients of -a G(v)
    Ball a;     ///< a(G) = -1 / G(1)
};

/// T_n(G): the coefficients of degree < n of T(G), every intermediate product and
/// composition truncated at degree n.
/// Encloses: the truncated operator T_n applied to every G in the input balls.
/// Returns: a zero-length image with a non-finite `a` when G(1) is not certainly negative,
/// or G(u) not certainly positive at the centre (the operator is undefined there).
/// Precision: compositions may lose a few bits near the edge of the disc.
TImage apply_T(const BallPoly& g, const Problem& problem, slong n, slong prec);

/// The derivative DT(G) at one G, with every factor it needs computed once.
class Linearization {
public:
    /// Prepares DT(G) truncated at degree n. Throws std::invalid_argument when T is undefined at
    /// G (see apply_T).
    Linearization(const BallPoly& g, const Problem& problem, slong n, slong prec);

    /// DT(G) h, truncated at degree n. Encloses it for every h in the input balls.
    BallPoly apply(const BallPoly& h, slong prec) const;

    /// The n x n matrix of the truncated DT(G) in the basis s^k (column k = DT s^k).
    /// Encloses every entry. Cost: about 2n truncated products of length n.
    BallMat matrix(slong prec) const;

    /// The matrix of matrix() rounded to doubles (leading m x m block). No guarantee.
    Eigen::MatrixXd approx_matrix(slong m, slong prec) const;

    slong length() const { return m_n; }
    const Ball& a() const { return m_a; }
    /// h(1) for the basis function s^k is s1^k: the value of s at y = 1.
    const Ball& s_at_one() const { return m_s1; }
    /// s at y = 0: the functional h(0) = sum h_k s0^k.
    const Ball& s_at_zero() const { return m_s0; }
    /// The series m and q and the inner maps (for tests and the certificate).
    const BallPoly& multiplier() const { return m_mult; }
    const BallPoly& rank_one() const { return m_q; }
    const BallPoly& inner_v() const { return m_sigma_v; }
    const Ball& inner_u0() const { return m_b0; }
    const Ball& inner_u1() const { return m_b1; }

private:
    slong m_n;
    Ball m_a, m_s1, m_s0;
    Ball m_b0, m_b1;   ///< (u - c)/r = b0 + b1 s
    BallPoly m_sigma_v; ///< (v - c)/r as a series in s
    BallPoly m_mult;    ///< m(s)
    BallPoly m_q;       ///< q(s)
};

/// The scaled inner maps of T at G: (u - c)/r = b0 + b1 s and (v - c)/r as a series, with
/// a = -1/G(1) and w = G(u). Encloses them (truncated at n).
struct InnerMaps {
    Ball a, b0, b1;
    BallPoly w;       ///< G(u(s))
    BallPoly sigma_v; ///< (G(u)^z - c)/r
    bool ok = false;  ///< false when G(1) < 0 or w(0) > 0 is not certain
};
InnerMaps inner_maps(const BallPoly& g, const Problem& problem, slong n, slong prec);

} // namespace renorm::doubling
