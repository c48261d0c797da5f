#pragma once
/// \file
/// Module overview: the period-doubling cascade of a concrete one-parameter family, computed
/// directly as an independent cross-check of the renormalization fixed point.
///
///  - expression.hpp       a map typed in ordinary notation (recursive-descent parser)
///  - jet_evaluator.hpp    forward-mode automatic differentiation over Arb balls
///  - family.hpp           built-in families and user maps, critical point
///  - superstable.hpp      superstable parameters mu_n: Newton in mu, Krawczyk certificate
///  - period_doubling.hpp  period-doubling parameters b_n (estimates)
///  - extrapolate.hpp      Aitken, Wynn epsilon, Richardson: limits as estimates
///  - run.hpp              the driver: levels, ratios delta_n and alpha_n, limits
///
/// Only certify_superstable (and the levels whose status is certified) make guarantees.

#include <renorm/cascade/expression.hpp>
#include <renorm/cascade/extrapolate.hpp>
#include <renorm/cascade/family.hpp>
#include <renorm/cascade/jet_evaluator.hpp>
#include <renorm/cascade/period_doubling.hpp>
#include <renorm/cascade/run.hpp>
#include <renorm/cascade/superstable.hpp>
