#pragma once
/// \file
/// The cascade driver: the superstable (or period-doubling) parameters of one family for
/// levels n = first..L, their ratios delta_n and alpha_n, and extrapolated limits.

#include <renorm/ball/ball.hpp>
#include <renorm/cascade/extrapolate.hpp>
#include <renorm/cascade/family.hpp>
#include <renorm/cascade/superstable.hpp>

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

namespace renorm::cascade {

/// Which sequence of parameters to compute.
enum class SequenceKind {
    superstable, ///< mu_n: c lies on a cycle of period 2^n (certified by Krawczyk)
    doubling,    ///< b_n: the 2^n cycle has multiplier -1 (certified by a 2x2 Krawczyk test)
};

/// Settings of run_cascade.
struct CascadeOptions {
    SequenceKind kind = SequenceKind::superstable;
    int levels = 12;            ///< the last level L (period 2^L); 1..max_cascade_level
    int threads = 2;            ///< 2: prove level n while locating level n+1
    slong prec_base = 112;      ///< start precision at level n: prec_base + prec_per_level n,
    slong prec_per_level = 3;   ///< rounded up to a multiple of 64 (whole limbs)
    slong max_prec = 16384;     ///< escalation cap (bits)
    int max_newton = 60;
};

/// The largest level run_cascade accepts.
inline constexpr int max_cascade_level = 34;

/// One level of the cascade.
struct CascadeLevel {
    int n = 0;
    std::uint64_t period = 1;   ///< 2^n
    Status status = Status::not_certified;
    ball::Ball mu;              ///< the parameter: an enclosure when certified, else the estimate
    ball::Ball d;               ///< d_n = f^(2^(n-1))(c) - c (superstable, n >= 1)
    bool has_d = false;
    ball::Ball delta;           ///< delta_n = (mu_{n-1} - mu_{n-2}) / (mu_n - mu_{n-1})
    bool has_delta = false;
    ball::Ball alpha;           ///< alpha_n = d_{n-1} / d_n
    bool has_alpha = false;
    slong prec = 0;             ///< bits used at this level
    double seconds = 0;         ///< time spent on this level (all threads)
    std::string note;           ///< a remark (e.g. why not certified)
};

/// Everything run_cascade found, in order of n.
struct CascadeResult {
    SequenceKind kind = SequenceKind::superstable;
    std::vector<CascadeLevel> levels;
    ball::Ball critical;        ///< enclosure of c
    bool failed = false;        ///< a level could not be computed; `levels` holds those before it
    int failed_level = -1;
    std::string failure;
    LimitEstimate mu_limit;     ///< estimate of the accumulation point
    LimitEstimate delta_limit;  ///< estimate of delta
    LimitEstimate alpha_limit;  ///< estimate of alpha (signed)
    bool all_certified() const;
};

/// Runs the cascade. `on_level` (may be empty) is called after each level, in order.
/// The ball fields of certified levels are enclosures (the ratios delta_n and alpha_n are then
/// enclosures of the finite-n ratios); limits are estimates (approx_limit), never bounds.
/// Throws std::invalid_argument for levels outside 1..max_cascade_level or threads not 1 or 2.
/// Numerical failure is reported in the result (failed, failed_level, failure).
CascadeResult run_cascade(const Family& family, const CascadeOptions& options,
                          const std::function<void(const CascadeLevel&)>& on_level = {});

/// A rough estimate of the seconds run_cascade needs on one core (a cost model: orbit steps
/// times a per-step cost growing with the precision). No guarantee.
double approx_cascade_seconds(const Family& family, const CascadeOptions& options);

} // namespace renorm::cascade
