#pragma once
/// \file
/// The whole estimate: fixed point, alpha, delta and the next eigenvalues for one order z, with
/// the number of digits shown stable by two truncations (N and about 1.2 N). No guarantee: these
/// are estimates; certify/ proves enclosures.

#include <renorm/io/checkpoint.hpp>
#include <renorm/newton/fixed_point.hpp>
#include <renorm/spectrum/spectrum.hpp>

#include <complex>
#include <functional>
#include <string>
#include <vector>

namespace renorm::solve {

using ball::Ball;
using ball::BallPoly;

/// The basis the fixed point is solved in (DEVELOPERS.md, "Two bases").
enum class Basis {
    automatic, ///< Taylor on a disc for z <= 6, Chebyshev collocation above
    taylor,    ///< Taylor series in s = (y - c)/r with chord steps: scales to thousands of digits
    chebyshev, ///< Chebyshev collocation on [0, 1] with a dense multiprecision LU: any z
};
std::string to_string(Basis b);

/// What to compute.
struct Request {
    Basis basis = Basis::automatic;
    std::string order = "2"; ///< z > 1, decimal text
    slong digits = 100;      ///< digits wanted
    slong eigenvalues = 4;   ///< how many eigenvalues after delta to report
    /// Threads FLINT may use inside one large multiplication (its FFT is threaded; the result is
    /// the same bits for any count). 0: one per core. Set for this call and the calling thread
    /// only, restored on return. Not always faster: bench/threads.cpp (DEVELOPERS.md).
    int threads = 1;
    newton::ProgressFn progress;
    /// Taylor basis only. Where to save a checkpoint (io/checkpoint.hpp) after every Newton step
    /// of every stage and after every finished stage; empty: none is written.
    std::string checkpoint_path;
    /// Taylor basis only. A checkpoint to continue from: finished stages are reused, the running
    /// one continues from its saved state, so the result is bit for bit that of the uninterrupted
    /// run. It must match the request (check_resume) and outlive the call.
    const io::Checkpoint* resume = nullptr;
    /// Called with every checkpoint taken (after it is written, when checkpoint_path is set).
    /// An exception thrown here ends the run: tests interrupt runs this way.
    std::function<void(const io::Checkpoint&)> on_checkpoint;
};

/// The names of the stages a Taylor-basis run goes through, in order, as a checkpoint records
/// them: "fixed-point@N", "fixed-point@1.2N", "delta@N", "delta@1.2N", then "eigenvalue-K@N" and
/// "eigenvalue-K@1.2N" for K = 1 .. request.eigenvalues (the real ones are refined).
std::vector<std::string> stage_names(const Request& request);

/// Where one stage of a checkpointed run stands (checkpoint_status()). Nothing here is a
/// guarantee: the values are the stage's estimates.
struct StageStatus {
    enum class State { finished, running, waiting };
    std::string name;
    State state = State::waiting;
    slong n = 0;                 ///< finished: its truncation; running: the iterate's
    slong prec = 0;              ///< finished: its working precision, bits
    double log10_residual = 0;   ///< finished: its last residual
    /// finished: alpha (a fixed point; a = -1/G(1)) or the eigenvalue, to 20 significant digits
    std::string value;
    double digits = 0;           ///< running: digits the last finished correction aimed at
    slong step = 0;              ///< running: Newton steps done
    slong krylov_steps = 0;      ///< running: Krylov steps of the finished Newton steps
    slong target_n = 0;          ///< running: the truncation the stage will end at (0: not known yet)
    /// running: Krylov steps already done inside the unfinished Newton step (saved at a GMRES
    /// restart); -1 when the state was saved between two Newton steps.
    slong inner_steps = -1;
    /// running, saved inside a step: that step's truncation and the log10 of its residual (the
    /// iterate's measured accuracy; `digits` is what the last correction was expected to reach)
    slong step_n = 0;
    double step_log10_residual = 0;
};

/// The stages of the run that wrote `checkpoint` (stage_names() of its request), in the order the
/// run takes them, each finished, running or waiting. An eigenvalue-K pair is listed as waiting
/// although the run skips it when that eigenvalue turns out not to be real.
std::vector<StageStatus> checkpoint_status(const io::Checkpoint& checkpoint);

/// Throws std::invalid_argument naming the first difference when `checkpoint` was written for
/// another request (order text, digits, eigenvalues, basis used), or names a stage this request
/// does not run, or holds a running state of the wrong shape.
void check_resume(const Request& request, const io::Checkpoint& checkpoint);

/// An estimated constant: the value at the working precision and the digits both truncations
/// agree on.
struct Estimate {
    Ball value;           ///< midpoint at the larger truncation (no guarantee)
    double log10_error;   ///< log10 of |value(N) - value(1.2 N)| + the residual's share
    slong stable_digits;  ///< significant digits the two truncations agree on
    /// Decimal text with min(stable_digits, requested) significant digits, correctly rounded
    /// from the midpoint. Empty when no digit is stable.
    std::string text;
};

/// One reported eigenvalue after delta.
struct EigenvalueReport {
    std::complex<double> approx; ///< from the dense double matrix
    spectrum::Kind kind;
    int power = 0;               ///< m for a coordinate change a^(-zm)
    Estimate refined;            ///< real eigenvalues only: refined to min(digits, 30)
    bool is_refined = false;
};

/// The result of solve_constants().
struct Result {
    doubling::Problem problem;
    Basis basis = Basis::taylor;    ///< the basis actually used
    newton::FixedPoint fixed_point; ///< Taylor basis: the fixed point at the larger truncation
    BallPoly coefficients;          ///< coefficients of G in the basis used (larger truncation)
    Estimate alpha, delta;
    std::vector<EigenvalueReport> eigenvalues; ///< after delta, by decreasing modulus
    slong n = 0, n_check = 0;       ///< the two truncations compared
    slong prec = 0;                 ///< working precision of the last step, bits
    double log10_residual = 0;
    bool converged = false;
    std::string message;            ///< why not, when not converged
    double seconds = 0;             ///< wall seconds of this call
    /// Wall seconds of the whole run over all sittings: this call's plus those a resumed
    /// checkpoint records; -1 when the checkpoint does not record them.
    double total_seconds = 0;
};

/// Resources a request will need, estimated before it runs.
struct Cost {
    slong n = 0;         ///< truncation
    slong prec = 0;      ///< bits
    double bytes = 0;    ///< peak memory estimate
    double seconds = 0;  ///< wall time estimate on one core of a 2020s machine
};
Cost estimate_cost(const Request& request);

/// Checks a request and throws std::invalid_argument naming the problem and the accepted range:
/// z not a finite number > 1, digits < 1, eigenvalues < 0 or > 50, a checkpoint or resume asked
/// of the Chebyshev basis (not supported), or a run whose memory estimate exceeds
/// `memory_limit_bytes`.
void validate(const Request& request, double memory_limit_bytes);

/// The basis a request will use: its own choice, or for Basis::automatic Taylor when z <= 6
/// (where the default disc contains the inner maps' images and the coefficients decay fast) and
/// Chebyshev collocation above.
Basis choose_basis(const Request& request);

/// Runs the whole estimate. No guarantee. Returns converged == false with a message when Newton or
/// the eigenvalue refinement fails; no number is reported as stable then. Throws
/// std::invalid_argument when request.resume does not match the request (check_resume) or a
/// checkpoint is asked of the Chebyshev basis, std::runtime_error when a checkpoint cannot be
/// written.
Result solve_constants(const Request& request);

/// Significant digits on which x and y agree: floor(-log10(|x - y| / |x|)). No guarantee.
slong approx_agreeing_digits(const Ball& x, const Ball& y, slong cap);

} // namespace renorm::solve
