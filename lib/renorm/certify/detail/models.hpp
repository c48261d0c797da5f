#pragma once
/// \file
/// Internal: the doubling operator T and its derivative DT evaluated in Taylor-model
/// arithmetic (series/taylor_model.hpp), over a whole ball of functions G in B(G0, rho).
/// Everything here encloses the exact (untruncated) objects; nothing is dropped.

#include <renorm/doubling/doubling.hpp>
#include <renorm/series/taylor_model.hpp>

#include <string>
#include <vector>

namespace renorm::certify::detail {

using ball::Ball;
using ball::BallMat;
using ball::BallPoly;
using series::Bound;
using series::TaylorModel;

/// Deliberate errors in the mathematics, for tests that show a wrong operator cannot be
/// certified. Production code always passes `none`.
enum class Mutation { none, flip_sign_T, flip_sign_DT };

/// The pieces of T(G) and DT(G) for every G = G0 + H, ||H|| <= rho (all in the variable s):
///   a = -1/G(1), sigma_u = b0 + b1 s = (u - c)/r, w = G(u), sigma_v = (G(u)^z - c)/r,
///   T(G) = -a G(v),  m = -a z G'(v) G(u)^(z-1),  q = -a^2 G(v) - z a m u G'(u)
/// (G' = dG/dy = (1/r) dG/ds). Each model contains the exact function for every such G.
struct Models {
    bool ok = false;
    std::string failure; ///< which hypothesis failed when !ok
    Ball a, s1, s0, b0, b1;
    Bound r_u, r_v;      ///< upper bounds of ||sigma_u|| = |b0| + |b1| and ||sigma_v||
    TaylorModel g, w, sigma_v, g_v, t;
    bool has_derivative = false;
    TaylorModel m, q;
};

/// Computes the models for the ball B(G0, rho) at precision prec, with n coefficients.
/// with_derivative: also m and q.
Models compute_models(const doubling::Problem& problem, const BallPoly& g0, const Bound& rho,
                      slong n, bool with_derivative, Mutation mutation, slong prec);

/// DT(G) h for a polynomial h, as a model containing it for every G of `models`:
/// h(1) q - a h(v) + m h(u).
TaylorModel apply_derivative(const Models& models, const BallPoly& h, slong prec);

/// The columns DT(G) s^k, k < n: the polynomial parts as an n x n ball matrix (column k) and
/// the remainders eps_k. Also beta >= sup_{k >= n} ||DT(G) s^k||
/// = |s1|^n ||q|| + |a| R_v^n + ||m|| R_u^n.
struct Columns {
    BallMat matrix{0, 0};
    std::vector<Bound> eps;
    Bound beta;
};
Columns derivative_columns(const Models& models, slong n, slong prec);

/// max over columns of sum_i |A_ik| (upper bound): the l1 operator norm of a matrix.
Bound matrix_norm(const BallMat& a);
/// The l1 norm of column k (upper bound).
Bound column_norm(const BallMat& a, slong k);

} // namespace renorm::certify::detail
