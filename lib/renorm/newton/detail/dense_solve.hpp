#pragma once
// A dense multiprecision solve m x = rhs by Arb's approximate LU (no error bounds), returning
// the midpoints. Shared by the collocation solver and its eigenpair refinement.

#include <renorm/ball/ball.hpp>

namespace renorm::newton::detail {

/// x = m^-1 rhs (midpoints). No guarantee. Returns false when m is numerically singular.
inline bool approx_solve_dense(ball::BallVec& x, const ball::BallMat& m, const ball::BallVec& rhs, slong prec)
{
    const slong n = rhs.size();
    ball::BallMat b(n, 1), sol(n, 1);
    for (slong i = 0; i < n; ++i)
        arb_set(b.entry(i, 0), rhs[i]);
    if (!arb_mat_approx_solve(sol.get(), m.get(), b.get(), prec))
        return false;
    x = ball::BallVec(n);
    for (slong i = 0; i < n; ++i)
        arb_get_mid_arb(x[i], sol.entry(i, 0));
    return true;
}

} // namespace renorm::newton::detail
