#pragma once
/// \file
/// Limits of linearly convergent sequences by extrapolation. Estimates only: nothing here is a
/// bound, and output built from these functions must say "estimate".

#include <renorm/ball/ball.hpp>

#include <string>
#include <vector>

namespace renorm::cascade {

/// One Aitken delta-squared pass: t_j = s_{j+2} - (s_{j+2} - s_{j+1})^2 / (s_{j+2} - 2 s_{j+1} + s_j).
/// Removes one geometric error term c r^j (the rate r is taken from the data). Works on
/// midpoints. No guarantee. Returns size - 2 terms (none when size < 3); a zero denominator
/// ends the output early.
std::vector<ball::Ball> approx_aitken(const std::vector<ball::Ball>& s, slong prec);

/// Aitken applied repeatedly until one term is left: the last term. No guarantee.
/// Returns NaN when fewer than 3 terms are given.
ball::Ball approx_iterated_aitken(const std::vector<ball::Ball>& s, slong prec);

/// Wynn's epsilon algorithm (P. Wynn, MTAC 10 (1956) 91-96):
///   e_{-1}^{(j)} = 0,  e_0^{(j)} = s_j,  e_{k+1}^{(j)} = e_{k-1}^{(j+1)} + 1/(e_k^{(j+1)} - e_k^{(j)}),
/// and the estimate is the even column of highest order that uses the last term. It removes
/// several geometric terms at once (the Shanks transform). No guarantee. NaN for < 3 terms.
ball::Ball approx_wynn_epsilon(const std::vector<ball::Ball>& s, slong prec);

/// Richardson extrapolation with a geometric rate r: s_inf ~ (s_n - r s_{n-1}) / (1 - r), where
/// r is the median of the last three difference ratios (s_j - s_{j-1}) / (s_{j-1} - s_{j-2}).
/// No guarantee. NaN for < 5 terms.
ball::Ball approx_richardson_geometric(const std::vector<ball::Ball>& s, slong prec);

/// An extrapolated limit with an error estimate. Not an enclosure.
struct LimitEstimate {
    bool ok = false;
    ball::Ball value;   ///< the estimate (Wynn epsilon on the last `window` terms)
    double error = 0;   ///< estimated error: the largest disagreement between the variants
    slong digits = 0;   ///< significant digits on which the variants agree
    std::string text;   ///< those digits, as decimal text
    double rate = 0;    ///< observed geometric rate of the sequence (ratio of last differences)
};

/// Number of last terms the variants use.
inline int extrapolation_window = 10;

/// Estimates lim s_j. The variants are Wynn epsilon (value), iterated Aitken, and Wynn epsilon
/// without the last term; the error is the largest difference between them, and the digits
/// shown are those that this error leaves determined. No guarantee: an estimate.
/// Returns ok == false for fewer than 4 terms.
LimitEstimate approx_limit(const std::vector<ball::Ball>& s, slong prec);

} // namespace renorm::cascade
