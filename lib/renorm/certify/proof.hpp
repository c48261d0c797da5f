#pragma once
/// \file
/// Computer-assisted proofs of the fixed point of the doubling operator T and of an eigenvalue
/// of its derivative, in the Banach space X of functions f(s) = sum_k f_k s^k analytic on the
/// closed disc D = {|y - c| <= r} (s = (y - c)/r) with ||f|| = sum_k |f_k| < infinity
/// (a Banach algebra; ||f|| bounds sup_D |f|).
///
/// Theorem used (contraction mapping in the "radii polynomial" form of the Newton-Kantorovich
/// theorem; e.g. Kantorovich & Akilov, Functional Analysis, ch. XVIII; van den Berg & Lessard,
/// Notices AMS 62 (2015)): let F: U -> X be C^1 on an
/// open U containing the closed ball B = B(x0, rho), A a bounded linear operator, and
///     ||A F(x0)|| <= Y,   sup_{x in B} ||I - A DF(x)|| <= Z,   Y + Z rho < rho.
/// Then x -> x - A F(x) maps B into itself and is a contraction there (constant Z < 1), A is
/// injective (here A = A_N (+) I with A_N a square matrix such that I - A_N DF_N has norm
/// < 1, so A_N is invertible), and F has exactly one zero in B.
///
/// Applied to F(G) = G - T(G) (fixed point) and to F(h, lambda) = (DT(G) h - lambda h,
/// h_j - 1) on X x R with ||(h, lambda)|| = ||h|| + |lambda| (eigenpair), with G ranging over
/// the proved ball. See docs/certify-notes.md for how each bound is computed.

#include <renorm/certify/detail/models.hpp>
#include <renorm/doubling/doubling.hpp>
#include <renorm/series/taylor_model.hpp>

#include <string>

namespace renorm::certify {

using ball::Ball;
using ball::BallPoly;
using ball::BallMat;
using series::Bound;

/// Outcome of a proof (STYLE.md §4).
enum class Status { certified, not_certified, bad_input };

/// The theorem every certificate rests on, in words.
extern const char* const theorem_statement;

/// Everything a re-check needs: the problem, the truncation, the precisions, the centres and
/// the radii. Centres are exact binary numbers (balls of radius zero).
struct ProofData {
    doubling::Problem problem;
    slong n = 0;        ///< number of polynomial modes N (A = A_N (+) identity beyond)
    slong prec = 0;     ///< working precision of the residual bounds Y, bits
    slong prec_low = 0; ///< working precision of the derivative bounds Z, bits
    BallPoly g0;        ///< centre of the fixed-point ball
    Bound rho_g;        ///< its radius
    BallPoly h0;        ///< centre of the eigenvector ball
    Ball lambda0;       ///< centre of the eigenvalue ball
    slong norm_index = 0; ///< j of the normalisation h_j = 1
    Bound rho_e;        ///< radius of the eigenpair ball
};

/// The bounds of the fixed-point proof.
struct FixedPointBounds {
    Bound y;          ///< Y >= ||A (G0 - T(G0))||
    Bound z;          ///< Z >= sup_{B(G0, rho)} ||I - A (I - DT(G))||
    Bound norm_a;     ///< ||A_N|| (l1 operator norm)
    Bound beta;       ///< sup_{k>=N} ||DT(G) s^k|| over the ball
    Bound r_u, r_v;   ///< ||sigma_u||, ||sigma_v|| (both < 1)
    Bound residual_eps;       ///< remainder bound of G0 - T(G0) (what truncation drops)
    Bound derivative_check;   ///< largest mismatch of DT against difference quotients of T
    bool closes = false;      ///< Y + Z rho < rho
};

/// The bounds of the eigenpair proof.
struct EigenBounds {
    Bound y;       ///< Y >= ||A F(h0, lambda0)|| for every G in the fixed-point ball
    Bound z0;      ///< the part of Z independent of rho_e
    Bound z1;      ///< Z = z0 + z1 rho_e (z1 = ||A||)
    Bound norm_a;  ///< ||A_N+1||
    bool closes = false; ///< Y + (z0 + z1 rho_e) rho_e < rho_e
};

/// A proof outcome: status, the bounds, and the enclosures (NaN +/- inf unless certified).
struct Certificate {
    Status status = Status::not_certified;
    std::string message; ///< the bound or hypothesis that failed, or "certified"
    ProofData data;
    FixedPointBounds fixed_point;
    EigenBounds eigen;
    Ball alpha;      ///< -1/G*(1) for the fixed point G*
    Ball delta;      ///< the eigenvalue of DT(G*) near lambda0
    Ball g_at_zero;  ///< G*(0)
    Ball a_power_z;  ///< m*(0) = the eigenvalue of the normalisation direction (enclosed)
};

/// Proves that T has a unique fixed point G* within rho of g0, and that DT(G*) has a unique
/// eigenpair (h, lambda), h_j = 1, near an approximate eigenpair computed here (largest real
/// eigenvalue > 1 whose eigenvector has h(y = 0) ~ 0).
/// Encloses: alpha = -1/G*(1), G*(0), lambda, each for the exact fixed point of the exact
/// (untruncated) operator T. Hypotheses checked: those of the theorem above (Y, Z, rho for
/// both proofs), that u and v map D into its interior (||sigma_u||, ||sigma_v|| < 1), that
/// G(u) stays in a disc around a positive number not containing 0, and that DT agrees with
/// difference quotients of T (a guard against a wrong derivative formula).
/// Returns: not_certified with the failing bound named in `message`; bad_input for
/// n < 4, prec < 64, prec_low < 64, an empty g0.
/// Precision: Y is computed at prec, Z at prec_low (Z only needs to be < 1).
Certificate certify_constants(const doubling::Problem& problem, const BallPoly& g0, slong n,
                              slong prec, slong prec_low);

/// Recomputes every bound of a proof from its data alone (no solver) and reports whether the
/// claims follow. Encloses: as certify_constants, for the stored radii.
Certificate recheck(const ProofData& data);

/// A disc on which the proof is likely to close: problem.disc when good enough, else one chosen from a small grid of centres and radii
/// (c < r, so that u = y a^-z maps the disc into itself) by the smallest max(||sigma_u||,
/// ||sigma_v||) at an approximate fixed point g (given on problem.disc, re-expanded exactly as a
/// polynomial on each candidate). No guarantee: the proof checks every hypothesis itself.
/// The given disc is kept when max(||sigma_u||, ||sigma_v||) is at most this (tunable).
extern double approx_disc_good_enough;
series::Disc approx_choose_disc(const doubling::Problem& problem, const BallPoly& g, slong n);

namespace detail {
/// certify_constants with a deliberate error in T or DT (tests only).
Certificate certify_constants_mutated(const doubling::Problem& problem, const BallPoly& g0, slong n,
                                      slong prec, slong prec_low, Mutation mutation);
/// recheck with a deliberate error (tests only).
Certificate recheck_mutated(const ProofData& data, Mutation mutation);

/// The approximate eigenpair used as a centre. No guarantee.
struct ApproxEigen {
    bool ok = false;
    BallPoly h;
    Ball lambda;
    slong index = 0;
    std::string message;
};
ApproxEigen approx_eigenpair(const doubling::Problem& problem, const BallPoly& g0, slong n,
                             slong prec);
} // namespace detail

} // namespace renorm::certify
