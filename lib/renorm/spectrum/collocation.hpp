#pragma once
/// \file
/// Eigenvalues of DT in the Chebyshev collocation basis (newton/collocation.hpp). No guarantee.

#include <renorm/newton/collocation.hpp>
#include <renorm/spectrum/spectrum.hpp>

#include <vector>

namespace renorm::spectrum {

/// Eigenvalues of DT Q from the dense double collocation matrices of size m: the operator on
/// coefficients is C^-1 M, composed with Q h = h - h(0). Sorted by modulus. No guarantee.
std::vector<ApproxEigen> approx_collocation_eigenvalues(const newton::CollocationFixedPoint& fp, slong m);

/// Refines a real eigenvalue by Newton on (h, lambda) for M h = lambda C h with h_j = 1, at the
/// fixed point's size and at least the precision `digits` needs. No guarantee.
Eigenpair approx_collocation_eigenpair(const newton::CollocationFixedPoint& fp, const ApproxEigen& seed,
                                       double digits);

} // namespace renorm::spectrum
