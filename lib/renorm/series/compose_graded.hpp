#pragma once
/// \file
/// Composition of truncated series by baby steps and giant steps (Paterson–Stockmeyer /
/// Brent–Kung) in which every block works only to the length and the precision its
/// contribution to the result needs. See DEVELOPERS.md, "Why compositions are computed as they
/// are".

#include <renorm/series/series.hpp>

namespace renorm::series {

/// Coefficients of degree < n of f(h(s)), for any constant term h(0).
/// Encloses them: all arithmetic is Arb ball arithmetic, so the result encloses the truncated
/// composition whatever precisions the blocks use; only the radii depend on that choice.
/// Returns: a polynomial of length <= n (n = 0 gives the zero polynomial).
/// Aliasing: f and h may be the same polynomial (arguments are read only).
/// Precision: f is first shifted by h(0) at `prec` (as in compose()). With w = h - h(0) and
/// m ~ sqrt(n), f(h) = sum_j S_j(w) w^(jm), S_j = sum_(i<m) f_(jm+i) w^i. Block j is needed only to
/// length n - jm, and its size is bounded by c_j = max_i |f_(jm+i)| ||w^i|| ||w^m / s^m||^j
/// (truncated l1 norms). Block j and the Horner steps above it work at
/// prec - log2(max_j' c_j' / c_j) + guard bits (never above `prec`, never below 64): every
/// term's absolute rounding error stays at the level `prec` gives the largest term, which is
/// the level of the radius arb_poly_compose_series leaves at `prec`, measured in the l1 norm
/// (coefficient by coefficient, the far tail of a decaying result is wider than Arb's, whose
/// products keep each coefficient to `prec` bits relative to itself). Blocks whose bound lies
/// below that level are not computed; their bound is added to the radii. This is an exception
/// to "never below prec" of STYLE.md §3, by design (DEVELOPERS.md). Measured 2.5-3.2x faster
/// than compose_arb() at n = 830 when the coefficients of f(h(0) + t) decay geometrically, 1.9x
/// when they do not (bench/compose.cpp). Memory: an m x n table of balls, as Arb's.
BallPoly compose_graded(const BallPoly& f, const BallPoly& h, slong n, slong prec);

} // namespace renorm::series
