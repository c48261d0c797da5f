#pragma once
/// \file
/// Approximate eigenvalues of DT at the fixed point (design note §2-3). No promise: these are
/// estimates, and starting points for certify/.
///
/// DT acts on perturbations h of G. The subspace h(0) = 0 is invariant (DT h(0) = a^z h(0) at the
/// fixed point), and delta is the eigenvalue of largest modulus on it. On the quotient, the
/// normalisation direction has eigenvalue a^z; it is removed by composing DT with the projection
/// Q h = h - h(0). Coordinate changes x -> x (1 + eps |x|^(zm)) give the trivial eigenvalues
/// a^(-zm), m = 1, 2, ... (DEVELOPERS.md derives them).

#include <renorm/doubling/doubling.hpp>
#include <renorm/newton/fixed_point.hpp>
#include <renorm/newton/krylov.hpp>

#include <Eigen/Dense>

#include <complex>
#include <functional>
#include <string>
#include <vector>

namespace renorm::spectrum {

using ball::Ball;
using ball::BallPoly;

/// What an eigenvalue stands for.
enum class Kind {
    relevant,          ///< outside the unit disc: delta
    coordinate_change, ///< a^(-z m) for an integer m >= 1: a change of variable, not dynamics
    irrelevant,        ///< inside the unit disc, not a coordinate change
};
std::string to_string(Kind k);

/// One approximate eigenvalue with its eigenvector in the basis s^k (length m).
struct ApproxEigen {
    std::complex<double> value;
    Eigen::VectorXcd vector;
    Kind kind = Kind::irrelevant;
    int power = 0; ///< m when kind == coordinate_change
};

/// Eigenvalues of DT(G) Q from the dense double matrix of its m x m truncation, sorted by
/// decreasing modulus, the eigenvalue 0 of Q's kernel dropped. No guarantee.
std::vector<ApproxEigen> approx_eigenvalues_dense(const BallPoly& g, const doubling::Problem& problem,
                                                  slong m, slong prec);

/// The `count` eigenvalues of largest modulus of DT(G) Q on the first m modes, by Spectra's
/// implicitly restarted Arnoldi method with DT applied matrix-free (Linearization::apply at
/// `prec` bits, rounded to doubles). Sorted by decreasing modulus. No guarantee.
/// Returns: an empty vector when Arnoldi does not converge.
std::vector<ApproxEigen> approx_eigenvalues_matfree(const BallPoly& g, const doubling::Problem& problem,
                                                    slong m, slong count, slong prec);

/// Dispatches: the dense variant up to m = dense_eigen_cutoff, the matrix-free one above
/// (returning at most `count` eigenvalues then).
std::vector<ApproxEigen> approx_eigenvalues(const BallPoly& g, const doubling::Problem& problem, slong m,
                                            slong count, slong prec);

/// Tunable cutoff of approx_eigenvalues().
extern slong dense_eigen_cutoff;

/// Classifies `lambda` given alpha and z: a^(-zm) within relative tolerance tol, else by modulus.
Kind approx_classify(std::complex<double> lambda, double alpha, double z, double tol, int* power);

/// A refined real eigenpair. No guarantee.
struct Eigenpair {
    BallPoly h;     ///< eigenvector, normalised by h_j = 1 at its largest low-mode coefficient j
    Ball lambda;    ///< eigenvalue (midpoint)
    slong n = 0;
    slong prec = 0;
    double log10_residual = 0; ///< log10 (||DT h - lambda h|| / ||h||)
    slong steps = 0;
    bool converged = false;
    std::string message;
};

/// The eigenpair refinement variants (each tested; approx_refine_eigenpair dispatches).
enum class EigenMethod {
    krylov, ///< Newton-Krylov on (h, lambda) with precision doubling (newton/krylov.hpp)
    dense,  ///< the same Newton schedule with a dense LU of the whole bordered Jacobian
    chord,  ///< chord steps with one bordered double LU (13-16 digits a step)
};

/// Options of approx_refine_eigenpair().
struct EigenOptions {
    EigenMethod method = EigenMethod::krylov;
    slong jacobian_size = 320;
    slong max_steps = 400;
    slong min_length = 0; ///< lower bound for the truncation
    slong min_steps = 0;  ///< Newton-Krylov: corrections made even if the start meets the target
    slong krylov_cycle = 0; ///< Newton-Krylov: KrylovOptions::cycle (0: automatic)
    /// A converged eigenpair from the same seed (e.g. at a shorter truncation) to start from
    /// instead of the double seed; it must outlive the call.
    const Eigenpair* start = nullptr;
    newton::ProgressFn progress;
    /// Newton-Krylov only: called with the state after every Newton step (a checkpoint) ...
    std::function<void(const newton::KrylovState&)> on_step;
    /// ... and a saved state to continue from (it must outlive the call).
    const newton::KrylovState* resume = nullptr;
};

/// Refines a real eigenpair of DT(G) at the fixed point `fp` to `digits` digits by chord steps
/// on (h, lambda) with a bordered double LU, ramping precision and truncation like the fixed-point
/// refinement. `fp` must be accurate to at least `digits`. No guarantee.
Eigenpair approx_refine_eigenpair(const newton::FixedPoint& fp, const ApproxEigen& seed,
                                  double digits, const EigenOptions& options);
Eigenpair approx_refine_eigenpair_chord(const newton::FixedPoint& fp, const ApproxEigen& seed,
                                        double digits, const EigenOptions& options);
/// Newton-Krylov on Phi(h, lambda) = (DT h - lambda h, h_j - 1): residuals at the step's target
/// precision, corrections by GMRES with J(dh, dl) = (DT dh - lambda dh - h dl, dh_j).
Eigenpair approx_refine_eigenpair_krylov(const newton::FixedPoint& fp, const ApproxEigen& seed,
                                         double digits, const EigenOptions& options);

} // namespace renorm::spectrum
