#pragma once
/// \file
/// Newton-Krylov with a precision and truncation schedule (DEVELOPERS.md, "The Newton-Krylov
/// path"). One driver serves the fixed point of T and the eigenpair of DT. Nothing here is
/// proved: the results are estimates and starting points for certify/.
///
/// Each Newton step
///   1. picks a target t = min(D, 2e - 2) digits from the e digits the iterate has, the truncation
///      n the target needs and the precision of t digits;
///   2. computes the residual F(x) at that truncation and precision (the only full-cost work);
///   3. solves J delta = F to the t - e digits the correction needs, by flexible GMRES at that
///      low precision on the first n_in = length(t - e) modes, with J applied matrix-free
///      (one derivative evaluation per Krylov step, no matrix), and preconditioned by an LU of
///      the m x m truncated Jacobian taken at an earlier iterate at moderate precision;
///   4. x <- x - delta, and hands the state to a checkpoint callback.
/// The costs therefore sum to about that of the last residual plus a few half-size derivative
/// evaluations.

#include <renorm/ball/ball.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace renorm::newton {

using ball::BallMat;

/// What the Newton-Krylov driver needs from a problem F(x) = 0. The unknown x is a vector of
/// n series coefficients followed by extras() scalars (an eigenvalue, say); n changes with the
/// schedule and the coefficients beyond n are zero.
class KrylovProblem {
public:
    virtual ~KrylovProblem() = default;
    /// Number of scalars after the series coefficients.
    virtual slong extras() const { return 0; }
    /// The truncation that resolves `digits` digits of the solution.
    virtual slong length_for(double digits) const = 0;
    /// F(x) at truncation n and precision prec into f (length n + extras). Returns log10 of the
    /// size of F the stopping rule uses (absolute or relative, the problem's choice), NaN when
    /// F is undefined at x.
    virtual double residual(BallVec& f, const BallVec& x, slong n, slong prec) = 0;
    /// Prepares J = F'(x) truncated at n for apply(). x has the length of the last residual.
    virtual void linearize(const BallVec& x, slong n, slong prec) = 0;
    /// y = J v (v and y of length n + extras, n from linearize()).
    virtual void apply(BallVec& y, const BallVec& v, slong prec) const = 0;
    /// The dense (m + extras) square matrix of F'(x) truncated at m (for the preconditioner).
    virtual BallMat small_jacobian(const BallVec& x, slong m, slong prec) const = 0;
    /// J on the modes beyond the preconditioner's block is taken as this multiple of the
    /// identity (1 for G - T(G); -lambda for DT h - lambda h).
    virtual double tail_scale(const BallVec& x) const = 0;
    /// Whether the last coefficients of x lie below 10^-digits (the truncation is long enough).
    virtual bool long_enough(const BallVec& /*x*/, slong /*n*/, double /*digits*/) const { return true; }
};

/// Everything a Newton-Krylov run needs to continue exactly where it stopped: a checkpoint.
struct KrylovState {
    BallVec x;               ///< current iterate (exact midpoints), length n + extras
    slong n = 0;             ///< its truncation
    double digits = 0;       ///< digits the iterate had at the last residual (-log10 of it)
    slong step = 0;          ///< Newton steps done
    slong krylov_total = 0;  ///< Krylov steps done
    slong n_final = 0;       ///< the truncation the run ends at (grows if the tail is too long)
    BallVec pc_point;        ///< iterate the preconditioner was built at (empty: none yet)
    slong pc_size = 0;       ///< its block size m
    slong pc_prec = 0;       ///< its precision, bits
    double pc_digits = 0;    ///< digits pc_point had
    // Inside a Newton step (empty `f`: between steps). A long correction is saved at every
    // restart of its GMRES, so that an interrupted run loses at most one restart cycle: the
    // step's residual (the full-cost evaluation) and the correction so far.
    BallVec f;               ///< residual of the running step, at its truncation and precision
    double f_log10 = 0;      ///< what problem.residual() returned for it
    BallVec inner;           ///< GMRES's correction so far (length n_in + extras)
    slong inner_restarts = 0;///< restart cycles done
    slong inner_steps = 0;   ///< Krylov steps done in this Newton step
};

/// Options of approx_newton_krylov().
struct KrylovOptions {
    double guard_digits = 10;  ///< digits solved beyond the request
    slong max_newton = 60;
    slong max_krylov = 40;      ///< Krylov steps per restart
    slong max_restarts = 4;
    slong precond_max = 1500;   ///< largest preconditioner block m
    /// Precision cap of the preconditioner, digits; 0: 150 (D/1000)^0.4 for D digits. A block of
    /// m ~ 3q + 30 modes at q digits gains about q digits a Krylov step (DEVELOPERS.md).
    double precond_digits = 0;
    slong min_length = 0;      ///< lower bound of the final truncation
    /// Newton corrections to make even when the first residual already meets the target (1 at a
    /// second truncation: its fixed point is then solved for, not the first one's padded).
    slong min_steps = 0;
    /// The linear solve of each Newton step: GMRES (the fast path), or for comparison the dense
    /// LU of the whole n_in x n_in Jacobian at the correction's precision (the dense path:
    /// same schedule, N^3 work).
    bool dense_inner = false;
    ProgressFn progress;
    std::string stage = "newton-krylov"; ///< progress label
    std::string order;                   ///< progress label
    /// Restart cycles are shortened for large systems so that each takes a bounded time: a
    /// cycle has at most restart_work / (n_in prec) Krylov steps (at least 6, at most
    /// max_krylov; 1e9 gives 8 steps, about 35 min on this machine, at 10,000
    /// digits, 40 below 3000). Deterministic, so a resumed run restarts where the first did.
    double restart_work = 1e9;
    slong cycle = 0; ///< a fixed restart length instead (tests use 1 to save inside every step)
    /// Called after every Newton step with the state to save (a checkpoint), and within a step
    /// at every GMRES restart (then with `f` and `inner` set).
    std::function<void(const KrylovState&)> on_step;
};

/// The outcome of a Newton-Krylov run.
struct KrylovResult {
    KrylovState state;              ///< final state (x at the final truncation)
    slong prec = 0;                 ///< precision of the last residual, bits
    double log10_residual = 0;      ///< of the last residual
    std::vector<slong> krylov_steps; ///< Krylov steps of each Newton step
    bool converged = false;
    std::string message;
};

/// Solves F(x) = 0 to `digits` (+ guard) digits by the schedule described at the top of this
/// file, from `start` (its x, n and digits must be set; the other fields may be zero). To
/// continue a checkpoint, pass the saved state: the run is deterministic, so it produces the
/// same iterates as the uninterrupted run. No guarantee.
/// Returns: converged == false with the reason when the residual stalls, F becomes undefined,
/// GMRES fails to reach the tolerance, or max_newton steps pass.
KrylovResult approx_newton_krylov(KrylovProblem& problem, KrylovState start, double digits,
                                  const KrylovOptions& options);

/// Where a restarted GMRES solve stands after a cycle: enough to continue it exactly.
struct FgmresCycle {
    BallVec delta;      ///< the correction so far
    slong restarts = 0; ///< cycles done
    slong steps = 0;    ///< Krylov steps done
    /// Digits the correction has gained so far, log10(||b|| / ||b - J delta||), as GMRES's
    /// rotated right-hand side estimates it at the end of the last cycle; -1 when not known (a
    /// state read back from a checkpoint). For progress reports only.
    double gained = -1;
};

/// y = J v computed at the given precision (at most approx_fgmres()'s prec).
using FgmresApply = std::function<void(BallVec&, const BallVec&, slong)>;

/// Flexible GMRES for J delta = b with right preconditioner `precondition`, at `prec` bits,
/// to ||b - J delta||_2 <= 10^-rel_digits ||b||_2, restarted every max_steps steps. Returns the
/// Krylov steps taken, or -1 when the tolerance is not reached within max_steps * (restarts + 1).
/// `on_restart` (if set) sees the state after every cycle that does not end the solve;
/// `resume` continues from such a state (the same steps follow as without the interruption).
/// Each Krylov product is asked for only the digits the residual still needs to fall (from GMRES's estimate |g_j| down to the target, plus 20), so a solve gaining D digits
/// computes its later products at a fraction of prec (inexact Krylov; the residual at a restart
/// is computed at prec). No guarantee.
slong approx_fgmres(BallVec& delta, const BallVec& b, const FgmresApply& apply_j,
                    const std::function<void(BallVec&, const BallVec&)>& precondition, double rel_digits,
                    slong max_steps, slong restarts, slong prec, const FgmresCycle* resume = nullptr,
                    const std::function<void(const FgmresCycle&)>& on_restart = {});

namespace detail {
/// Whether a preconditioner of q_want digits and m_want modes is worth building over the one of
/// pc_digits and pc_size: when it has 1.5 times more digits, or 1.5 times more modes at no fewer
/// digits, or reaches the cap (q_cap digits, m_cap modes) the 1.5 rule would step over. Without
/// that last clause delta's block at 10,000 digits stayed at 813 modes (built when the truncation
/// was 813; 1161 next was not 1.5 times more) while the fixed point's reached the cap of 1161,
/// and delta's Krylov steps gained half the fixed point's digits (DEVELOPERS.md, "Known
/// problems").
bool preconditioner_improves(double pc_digits, slong pc_size, double q_want, slong m_want, double q_cap,
                             slong m_cap);
} // namespace detail

/// The series part x_0 .. x_{n-1} of an unknown vector as a polynomial. Exact.
BallPoly krylov_series(const BallVec& x, slong n);
/// An unknown vector of n + extras entries holding p's first n coefficients, extras zero. Exact.
BallVec krylov_vector(const BallPoly& p, slong n, slong extras = 0);

/// The preconditioner of approx_newton_krylov(): an LU of the problem's small Jacobian at a
/// given point, the problem's tail scale beyond its block. No guarantee.
class KrylovPreconditioner {
public:
    KrylovPreconditioner(const KrylovProblem& problem, const BallVec& point, slong m, slong prec);
    /// y ~ J^-1 v for v of length n + extras, at prec bits (at most the preconditioner's own).
    void apply(BallVec& y, const BallVec& v, slong n, slong prec) const;
    slong size() const { return m_m; }

private:
    slong m_m, m_extras, m_prec;
    double m_tail;
    BallMat m_lu;
    std::vector<slong> m_perm;
};

} // namespace renorm::newton
