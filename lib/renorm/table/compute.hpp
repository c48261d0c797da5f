#pragma once
/// \file
/// Computing the rows of a reference table: one independent solve (and optionally a proof) per
/// order, spread over threads in this process or over the ranks of an MPI job. Estimates promise
/// nothing; rows marked certified come from certify::certify_constants and carry its radius.

#include <renorm/io/checkpoint.hpp>
#include <renorm/io/table.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <functional>
#include <string>
#include <vector>

namespace renorm::table {

/// What every row computes.
struct RowOptions {
    long digits = 30;    ///< significant digits wanted for alpha and delta
    int eigenvalues = 0; ///< eigenvalues after delta to report (0-50)
    bool certify = false;///< also prove enclosures (certify::certify_constants)
    /// Digit counts to retry an order with, in turn, when its estimate fails at `digits` (each
    /// below `digits`); the row then says in its note what failed and at how many digits it
    /// was retried. Empty: no retry.
    std::vector<long> fallback_digits;
    /// One-order tables only (validate refuses more orders, fallback digits or --certify with
    /// these): the row's solve saves its state to this file after every Newton step and
    /// continues from `resume` (solve::Request's fields of the same names). A resumed row's
    /// seconds are those of all sittings (unknown, -1, when the checkpoint does not record them).
    std::string checkpoint_path;
    const io::Checkpoint* resume = nullptr;
    /// Called with every Newton step of every row's solve (Progress::order names the row), from
    /// the worker threads at once: the callee must be thread-safe. Empty: none.
    newton::ProgressFn progress;
};

/// Checks the options (digits >= 1, eigenvalues 0-50, checkpoints with one order only) and every order against the solver's
/// limits, including its memory estimate. Throws std::invalid_argument naming the problem.
void validate(const std::vector<std::string>& orders, const RowOptions& options,
              double memory_limit_bytes);

/// One row. Never throws for a numerical failure: a failed solve, a failed proof or an exception
/// becomes a row with status failed (or estimated, when only the proof failed) and the reason
/// in `note`. No guarantee for estimated rows; certified rows show only digits their enclosure
/// determines.
io::TableRow compute_row(const std::string& order, const RowOptions& options,
                         const newton::ProgressFn& progress = {});

/// Called from worker threads (serialised by a mutex) when a row starts (done == false) or ends.
using RowEvent = std::function<void(size_t index, const io::TableRow* row, bool done)>;

/// compute_row over `orders` on `threads` threads (at least 1, at most one per order): each thread
/// takes the next order from a queue sorted by decreasing estimated cost, so the longest rows start
/// first. Returns the rows in the order of `orders`, whatever the number of threads.
std::vector<io::TableRow> compute_rows(const std::vector<std::string>& orders,
                                       const RowOptions& options, int threads,
                                       const RowEvent& event = {});

/// Estimated relative cost of an order's row (solve::estimate_cost's seconds). No guarantee.
double approx_row_cost(const std::string& order, const RowOptions& options);

/// Assigns orders to `parts` workers (e.g. MPI ranks): largest estimated cost first, each to the
/// least loaded worker (ties to the lowest index). Deterministic: every rank computes the same
/// assignment. Returns for each order the worker index.
std::vector<int> assign_orders(const std::vector<std::string>& orders, const RowOptions& options,
                               int parts);

/// The rows as JSON text and back (for sending rows between processes). Exact round trip.
std::string rows_to_message(const std::vector<std::pair<size_t, io::TableRow>>& rows);
std::vector<std::pair<size_t, io::TableRow>> rows_from_message(const std::string& text);

} // namespace renorm::table
