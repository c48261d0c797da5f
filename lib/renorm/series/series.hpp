#pragma once
/// \file
/// Functions as truncated Taylor series in the scaled variable s = (y - c) / r of a disc
/// D = {|y - c| <= r}. A function f is stored as f(y) = sum_k f_k s^k, so that the weighted
/// l1 norm of design note §5, ||f|| = sum_k |f_k|, bounds |f| on D and is a Banach algebra norm.
///
/// Every operation here encloses the exact result of a *truncated* operation: the coefficients
/// of degree < n of the exact product, composition or power of the input polynomials. What the
/// truncation discards is not bounded here; the remainder bounds of the certificate live in
/// certify/ (they are bounds on the discarded tail, not on the kept coefficients).

#include <renorm/ball/ball.hpp>

namespace renorm::series {

using ball::Ball;
using ball::BallPoly;

/// The disc {|y - centre| <= radius} and its scaled variable s = (y - centre) / radius.
/// Both numbers are doubles and therefore exact binary numbers, so a certificate can record
/// them exactly.
struct Disc {
    double centre = 0.5;
    double radius = 0.625;
    /// s for a given y. Encloses: (y - centre) / radius.
    Ball to_s(const Ball& y, slong prec) const;
};

/// The polynomial truncated to its first n coefficients (degrees 0 .. n-1). Exact.
BallPoly truncated(const BallPoly& f, slong n);

/// Coefficients of degree < n of f * g. Encloses them.
BallPoly mullow(const BallPoly& f, const BallPoly& g, slong n, slong prec);

/// Coefficients of degree < n of f(b0 + b1 s). Encloses them (the affine substitution is a
/// polynomial identity; only the truncation to n terms drops anything).
BallPoly compose_affine(const BallPoly& f, const Ball& b0, const Ball& b1, slong n, slong prec);

/// Coefficients of degree < n of f(h(s)), for any constant term h(0).
/// Encloses them. Dispatches: compose_graded() (compose_graded.hpp) for n >=
/// compose_graded_cutoff, compose_arb() below. Precision: the shift by h(0) loses about
/// log2(sum |f_k| (|h0| + 1)^k / ||f||) bits; callers working near the edge of the disc add guard
/// bits. Above the cutoff every coefficient's radius is at the level `prec` gives the l1 norm of
/// the result (compose_graded's precision note), not at `prec` relative to the coefficient.
BallPoly compose(const BallPoly& f, const BallPoly& h, slong n, slong prec);

/// Tunable cutoff of compose(): the length n from which compose_graded() is used
/// (bench/compose.cpp measures it faster from n = 9 on, 1.4-3.3x for n = 19..830).
extern slong compose_graded_cutoff;

/// The compose() variant that passes h - h(0) to Arb's arb_poly_compose_series (Brent–Kung for
/// long inputs) after a Taylor shift of f by h(0), every step at `prec`. Encloses the
/// coefficients of degree < n of f(h(s)). Aliasing: f and h may be the same polynomial.
/// Precision: as compose().
BallPoly compose_arb(const BallPoly& f, const BallPoly& h, slong n, slong prec);

/// Coefficients of degree < n of w^p = exp(p log w) as a power series about s = 0, with the
/// principal branch. Requires w(0) > 0 (throws std::invalid_argument when w(0) is not
/// certainly positive). Encloses them.
BallPoly pow_series(const BallPoly& w, const Ball& p, slong n, slong prec);

/// Derivative with respect to s. Encloses it (exact up to rounding).
BallPoly derivative(const BallPoly& f, slong prec);

/// f(s) at one point s. Encloses it.
Ball evaluate(const BallPoly& f, const Ball& s, slong prec);

/// An upper bound for sum_k |f_k| (the weighted l1 norm on the disc). Encloses: the returned
/// ball is exact-midpoint and its upper end bounds the norm; use its upper bound.
Ball norm_l1(const BallPoly& f, slong prec);

/// The midpoints of the coefficients (radii dropped). No guarantee: a starting point only.
BallPoly approx_midpoints(const BallPoly& f);

/// The polynomial with coefficients taken from doubles (exact conversion).
BallPoly from_doubles(const double* c, slong n);

/// log10 of the largest and the smallest nonzero |f_k| over a window at the end, fitted as a
/// geometric rate: returns the decay in decimal digits per term (positive when decaying),
/// measured by a least-squares line through log10|f_k| for k in [n/2, n). No guarantee.
double approx_decay_rate(const BallPoly& f);

} // namespace renorm::series
