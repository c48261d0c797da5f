#pragma once
/// \file
/// Superstable parameters of period 2^n: the zeros mu_n of F_n(mu) = f_mu^(2^n)(c) - c.

#include <renorm/ball/ball.hpp>
#include <renorm/cascade/family.hpp>

#include <string>

namespace renorm::cascade {

/// Outcome of a proof attempt (STYLE.md §4).
enum class Status { certified, not_certified, bad_input };

/// "certified", "not_certified" or "bad_input".
const char* to_string(Status s);

/// The orbit of c under f_mu, run for 2^n steps, with its mu-derivative.
struct ReturnMap {
    bool ok = false;       ///< false when the orbit left [x_lo, x_hi] or became non-finite
    std::string problem;   ///< why (names the step)
    ball::Ball F;          ///< F_n(mu) = x_N - c,  N = 2^n,  x_0 = c, x_{k+1} = f_mu(x_k)
    ball::Ball dF;         ///< F_n'(mu) = dx_N/dmu, from dx_{k+1}/dmu = f_mu(x_k) + f_x(x_k) dx_k/dmu
    ball::Ball half;       ///< x_{N/2} - c (for n >= 1; zero for n = 0)
};

/// Runs the orbit of c for 2^n steps with ball arithmetic at `prec` bits.
/// Encloses: for every mu in the ball `mu` and every c in the ball `c`, F_n(mu), F_n'(mu) and
/// x_{N/2} - c lie in the returned balls (the ball orbit contains every point orbit).
/// Returns ok == false (and balls that are not to be used) when a ball of the orbit is not
/// finite or its midpoint leaves [x_lo, x_hi] (slack 1e-9 of the width).
/// Precision: every operation at `prec` bits. The quadratic family uses a hand-written kernel,
/// every other family the JetEvaluator (first order).
ReturnMap superstable_return(const Family& family, const ball::Ball& c, slong n,
                             const ball::Ball& mu, slong prec);

/// A proof that F_n has exactly one zero in a box, with the bounds used.
struct SuperstableCertificate {
    Status status = Status::not_certified;
    ball::Ball mu;        ///< enclosure of the unique zero of F_n in X (NaN +/- inf unless certified)
    ball::Ball box;       ///< the box X = [m - rho, m + rho]
    ball::Ball residual;  ///< F_n(m), enclosed
    ball::Ball slope;     ///< F_n'(X), enclosed over the whole box
    ball::Ball krawczyk;  ///< K(X); certified iff K lies in the interior of X
    ball::Ball half;      ///< x_{N/2} - c over the box (encloses d_n at the zero; n >= 1)
    bool exact_period = false; ///< n == 0, or 0 is not in `half`: the minimal period is 2^n
    slong prec = 0;
    std::string problem;  ///< why not certified
};

/// Proves that F_n has a unique zero in X = [m - rho, m + rho] by the Krawczyk test
///   K(X) = m - Y F_n(m) + (1 - Y F_n'(X)) (X - m),   Y = 1 / mid(F_n'(m)),
/// K(X) in the interior of X  =>  F_n has exactly one zero in X, and it lies in K(X)
/// (R. Krawczyk, Computing 4 (1969) 187-201; R. E. Moore, SIAM J. Numer. Anal. 14 (1977) 611-615;
/// A. Neumaier, Interval Methods for Systems of Equations, CUP 1990, Thm 5.1.8).
/// F_n'(X) comes from the ball orbit with mu = X (superstable_return), so it encloses F_n' over
/// all of X. `at_center` must be superstable_return(family, c, n, m exact, prec), or use the
/// overload that computes it.
/// Encloses: the zero in `mu`; d_n = f^(2^(n-1))(c) - c at that zero in `half`.
/// Returns not_certified (enclosures NaN +/- inf) when K is not inside X or the orbit fails.
/// Precision: `prec` bits. Throws std::invalid_argument for prec < 2, n < 0 or n > 40.
SuperstableCertificate certify_superstable(const Family& family, const ball::Ball& c, slong n,
                                           const ball::Ball& m, const ReturnMap& at_center,
                                           const ball::Ball& rho, slong prec);
/// The same, evaluating F_n(m) itself.
SuperstableCertificate certify_superstable(const Family& family, const ball::Ball& c, slong n,
                                           const ball::Ball& m, const ball::Ball& rho, slong prec);

/// Encloses x_{2^(n-1)} - c for every mu in the ball `mu` (n >= 1): the signed distance d_n
/// from c to the point of the cycle half a period away. NaN for n = 0 or an orbit failure.
/// Precision: `prec` bits.
ball::Ball superstable_half(const Family& family, const ball::Ball& c, slong n,
                            const ball::Ball& mu, slong prec);

/// Bits of the certified radius below the spacing |mu_n - mu_{n-1}| that the level aims for.
inline slong target_bits_below_spacing = 90;

/// Newton in mu for F_n(mu) = 0 from `guess`, one orbit pass per step, stopped when the step is
/// below spacing * 2^-(target/2 + 4), i.e. when a Krawczyk box built on the step will meet the
/// target radius. No guarantee.
struct SuperstableNewton {
    bool ok = false;
    bool precision_limited = false; ///< rounding noise too large at this precision
    std::string problem;
    ball::Ball center;     ///< the last Newton point (exact)
    ReturnMap at_center;   ///< F_n and F_n' enclosed at `center`
    ball::Ball step;       ///< F_n(center) / F_n'(center)
    ball::Ball improved;   ///< center - step (exact midpoint)
    int passes = 0;
    slong prec = 0;
};
/// `spacing` (> 0) is the expected |mu_n - mu_{n-1}|. Returns ok == false when an orbit fails,
/// the derivative contains 0, the noise is too large (precision_limited) or `max_iter` steps
/// do not converge. No guarantee.
SuperstableNewton approx_superstable(const Family& family, const ball::Ball& c, slong n,
                                     const ball::Ball& guess, double spacing, int max_iter,
                                     slong prec);

/// A located and (when possible) proved superstable parameter.
struct SuperstableLevel {
    bool ok = false;           ///< a zero was located (certified or not)
    std::string problem;       ///< why not ok / why not certified / why the radius is wide
    SuperstableCertificate cert; ///< the proof: only this carries a guarantee
    ball::Ball mu_approx;      ///< best approximation (exact midpoint); no guarantee
    ball::Ball half_approx;    ///< midpoint of d_n; no guarantee
    slong prec = 0;            ///< the precision that finished the level
    int passes = 0;            ///< orbit passes spent
};

/// Certifies the zero that approx_superstable found: certify_superstable on a box of radius
/// 4 |step| around the Newton point (256 times larger if that fails), then, while the radius
/// of K is above spacing * 2^-target_bits_below_spacing, again around the middle of K (at most
/// four rounds). Finally encloses d_n (over X, or over K by superstable_half when the box gives
/// a relative radius above 2^-64) and checks that it excludes 0 (exact period 2^n). The guarantee is in `cert` (status certified); see certify_superstable.
SuperstableLevel certify_superstable_from(const Family& family, const ball::Ball& c, slong n,
                                          const SuperstableNewton& newton, double spacing,
                                          slong prec);

/// approx_superstable followed by certify_superstable_from, at one precision.
SuperstableLevel locate_superstable(const Family& family, const ball::Ball& c, slong n,
                                    const ball::Ball& guess, double spacing, int max_iter,
                                    slong prec);

} // namespace renorm::cascade
