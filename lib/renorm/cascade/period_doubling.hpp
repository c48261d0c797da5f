#pragma once
/// \file
/// Period-doubling parameters: b_n where the cycle of period 2^n has multiplier -1 (and the
/// cycle of period 2^(n+1) is born). Superstable parameters interlace them: mu_n < b_n < mu_{n+1}
/// (for a cascade in increasing mu).

#include <renorm/ball/ball.hpp>
#include <renorm/cascade/family.hpp>
#include <renorm/cascade/superstable.hpp>

#include <string>

namespace renorm::cascade {

/// The system G(x, mu) = (f^N(x) - x, (f^N)'(x) + 1), N = 2^n, and its Jacobian.
struct DoublingSystem {
    bool ok = false;
    std::string problem;
    ball::Ball g1, g2;          ///< f^N(x) - x,  prod_k f'(x_k) + 1
    ball::Ball j11, j12;        ///< dg1/dx = P - 1,  dg1/dmu = dx_N/dmu
    ball::Ball j21, j22;        ///< dP/dx,  dP/dmu
};

/// Evaluates G and its Jacobian along the orbit x_0 = x, x_{k+1} = f_mu(x_k), k < 2^n, with
/// second-order jets (f, f_x, f_mu, f_xx, f_xmu) and the recurrences
///   P_{k+1} = P_k f_x,  dP_{k+1}/dx = dP_k/dx f_x + P_k f_xx dx_k/dx,
///   dP_{k+1}/dmu = dP_k/dmu f_x + P_k (f_xx dx_k/dmu + f_xmu),
///   dx_{k+1}/dx = f_x dx_k/dx,  dx_{k+1}/dmu = f_mu + f_x dx_k/dmu.
/// Encloses: G and its Jacobian for every (x, mu) in the input balls.
/// Precision: `prec` bits.
DoublingSystem doubling_system(const Family& family, slong n, const ball::Ball& x,
                               const ball::Ball& mu, slong prec);

/// An approximate period-doubling parameter and a point of its cycle.
struct DoublingPoint {
    bool ok = false;
    std::string problem;
    ball::Ball mu;  ///< b_n (exact midpoint; no guarantee)
    ball::Ball x;   ///< a point of the 2^n cycle at b_n, the one reached from c
    int iterations = 0;
    double last_dx = 0;  ///< size of the last Newton step in x
    double last_dmu = 0; ///< size of the last Newton step in mu
};

/// Newton for b_n: first Newton in x alone (f^N(x) = x at mu = mu_guess, from x_guess), then
/// Newton on the 2x2 system G = 0 in (x, mu). `spacing` (> 0) is the expected distance to the
/// neighbouring parameters; convergence means steps below spacing * 2^-target_bits_below_spacing.
/// No guarantee (not certified): the result is an estimate.
DoublingPoint approx_doubling_point(const Family& family, slong n, const ball::Ball& mu_guess,
                                    const ball::Ball& x_guess, double spacing, int max_iter,
                                    slong prec);

/// A proof that G(x, mu) = 0 (see doubling_system) has exactly one solution in a box.
struct DoublingCertificate {
    Status status = Status::not_certified;
    ball::Ball x, mu;                 ///< the enclosures (NaN +/- inf unless certified)
    ball::Ball box_x, box_mu;         ///< the box X
    ball::Ball krawczyk_x, krawczyk_mu; ///< K(X)
    slong prec = 0;
    std::string problem;
};

/// Proves that G(x, mu) = (f^N(x) - x, (f^N)'(x) + 1) has exactly one zero in the box
/// X = [x +/- rx] x [mu +/- rmu] by the Krawczyk test in two dimensions,
///   K(X) = m - Y G(m) + (I - Y G'(X)) (X - m),  Y = inverse of mid G'(m) (any matrix is allowed),
/// K(X) in the interior of X => one zero in X, and it lies in K(X) (Krawczyk 1969; Neumaier,
/// Interval Methods for Systems of Equations, CUP 1990, Thm 5.1.8). G'(X) comes from
/// doubling_system over the box, which encloses the Jacobian at every point of X.
/// Encloses: b_n in `mu` and a point of the 2^n cycle at b_n in `x`.
/// Returns not_certified (enclosures NaN) when K is not inside X or an orbit fails.
/// Precision: `prec` bits. Throws std::invalid_argument when (x, mu) is not exact.
DoublingCertificate certify_doubling_point(const Family& family, slong n, const ball::Ball& x,
                                           const ball::Ball& mu, const ball::Ball& rx,
                                           const ball::Ball& rmu, slong prec);

} // namespace renorm::cascade
