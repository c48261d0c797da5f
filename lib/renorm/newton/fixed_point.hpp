#pragma once
/// \file
/// Approximate solution of the doubling equation G = T(G) (design note §3). Nothing here is
/// proved: the results are starting points for certify/ and estimates for the user.

#include <renorm/ball/ball.hpp>
#include <renorm/doubling/doubling.hpp>

#include <functional>
#include <string>

namespace renorm::newton {

using ball::Ball;
using ball::BallPoly;
using ball::BallVec;
using doubling::Problem;

/// One line of progress of a long computation.
struct Progress {
    std::string stage;  ///< "newton", "continuation", "chord", "eigen"
    slong step = 0;
    slong n = 0;        ///< truncation
    slong prec = 0;     ///< working precision, bits
    double log10_residual = 0;
    std::string order;  ///< the order z being worked on
    double seconds_left = -1; ///< estimated time to the end of this stage (negative: unknown)
    slong krylov_steps = -1;  ///< Krylov steps of the previous correction (Newton-Krylov only)
    /// Inside a long correction (reported at its GMRES restarts): Krylov steps done so far;
    /// log10_residual is then the residual the correction started from. -1 otherwise.
    slong krylov_running = -1;
    /// With krylov_running: the digits the correction has gained so far (-1: not known) and the
    /// digits it needs.
    double krylov_gained = -1;
    double krylov_needed = -1;
};
using ProgressFn = std::function<void(const Progress&)>;

/// An approximate fixed point of T. No guarantee.
struct FixedPoint {
    Problem problem;
    BallPoly g;                  ///< coefficients in s (midpoints, exact binary numbers)
    Ball a;                      ///< alpha = -1/G(1) at the working precision
    slong n = 0;                 ///< number of coefficients
    slong prec = 0;              ///< working precision of the last step, bits
    double log10_residual = 0;   ///< log10 of ||G - T_n(G)|| (l1 norm on the disc)
    slong steps = 0;             ///< Newton or chord steps taken
    slong krylov_steps = 0;      ///< Krylov steps in all (Newton-Krylov path only)
    double decay_rate = 0;       ///< decimal digits per coefficient of the tail of G
    bool converged = false;
    std::string message;         ///< the reason when not converged
};

/// A low-degree starting polynomial for z = 2, G(y) = 1 - 1.5276 y + 0.1048 y^2 (design
/// note §1), written in the variable s of `disc`. No guarantee.
BallPoly approx_initial_guess(const series::Disc& disc, slong prec);

/// Newton's method on G - T_n(G) = 0 with the dense Jacobian I - DT_n at one truncation n and
/// precision: stops when the residual's l1 norm is below tol, or after max_iter steps, or when a
/// step fails to reduce the residual. No guarantee.
FixedPoint approx_newton(const Problem& problem, const BallPoly& guess, slong n, double tol,
                         slong max_iter, slong prec);

/// Continuation in z: from the z = 2 solution to problem.order in steps that halve on failure
/// and grow on success, each step a Newton solve at truncation n. No guarantee.
/// Returns: converged == false with a message when a step below 1e-4 still fails.
FixedPoint approx_continuation(const Problem& problem, slong n, slong prec,
                               const ProgressFn& progress = {});

struct KrylovState;

/// The refinement variants (each tested; the bare approx_refine dispatches).
enum class RefineMethod {
    krylov, ///< Newton-Krylov with precision doubling (krylov.hpp): the fast path
    dense,  ///< the same Newton schedule with a dense LU of the whole Jacobian (for comparison)
    chord,  ///< one double LU, full-precision residual every step (13-16 digits a step)
    newton, ///< inexact Newton: residual at the target, inner solve at the correction's precision
};

/// Options of approx_refine().
struct RefineOptions {
    RefineMethod method = RefineMethod::krylov;
    slong jacobian_size = 320; ///< size of the dense double Jacobian (identity beyond)
    slong max_steps = 600;
    double guard_digits = 10;  ///< digits solved beyond the target
    slong min_length = 0;      ///< a lower bound for the final truncation (e.g. 1.2 N)
    slong min_steps = 0;       ///< Newton-Krylov: corrections made even if the start meets the target
    slong krylov_cycle = 0;    ///< Newton-Krylov: KrylovOptions::cycle (0: automatic)
    ProgressFn progress;
    /// Newton-Krylov only: called with the state after every Newton step (a checkpoint) ...
    std::function<void(const KrylovState&)> on_step;
    /// ... and a saved state to continue from instead of `start` (it must outlive the call).
    const KrylovState* resume = nullptr;
};

/// Chord iteration from `start` to a residual below 10^-(digits + guard): the Jacobian is factored
/// once in double precision, and each step raises the working precision and the truncation to the
/// digits it can reach (about 13 digits a step). No guarantee.
/// Returns: converged == false with the reason when the residual stalls.
FixedPoint approx_refine(const FixedPoint& start, slong digits, const RefineOptions& options);
FixedPoint approx_refine_chord(const FixedPoint& start, slong digits, const RefineOptions& options);
FixedPoint approx_refine_newton(const FixedPoint& start, slong digits, const RefineOptions& options);
/// Newton-Krylov (krylov.hpp): residuals at the step's target precision only, corrections by
/// preconditioned GMRES at the correction's precision; checkpoints through options.on_step.
FixedPoint approx_refine_krylov(const FixedPoint& start, slong digits, const RefineOptions& options);

/// The number of coefficients whose tail falls below 10^-digits at `rate` digits a term.
slong approx_length_for_digits(double digits, double rate);

/// alpha = -1/G(1) for a polynomial G in s. No guarantee (midpoint arithmetic).
Ball approx_alpha(const BallPoly& g, const Problem& problem, slong prec);

} // namespace renorm::newton
