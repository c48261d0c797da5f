#pragma once
// How `table` spreads its rows: over threads of this process (the default, `renorm table`) or over
// the ranks of an MPI job (`renorm-mpi table`, built with -DRENORM_WITH_MPI=ON). The command's
// parsing, checks and output are the same code either way (cmd_table.cpp), so both produce the
// same bytes.
#include "commands.hpp"

#include <renorm/table/compute.hpp>

#include <functional>
#include <string>
#include <vector>

namespace renorm::app {

struct TableBackend {
    /// Only the root process prints, writes files and reports errors.
    bool is_root = true;
    /// Name used in messages ("renorm" or "renorm-mpi").
    std::string program = "renorm";
    /// Every process calls this with its own verdict on the checks only the root can make (the
    /// output file); returns the root's verdict on every process.
    std::function<bool(bool root_ok)> agree = [](bool ok) { return ok; };
    /// Computes the rows; on the root returns all of them in the order of `orders` (other
    /// processes may return an empty vector). Throws std::runtime_error when a worker failed as a
    /// whole (not a failed row: those are rows).
    std::function<std::vector<io::TableRow>(const std::vector<std::string>& orders,
                                            const table::RowOptions& options, int threads,
                                            const table::RowEvent& event)>
        compute = [](const std::vector<std::string>& orders, const table::RowOptions& options,
                     int threads, const table::RowEvent& event) {
            return table::compute_rows(orders, options, threads, event);
        };
};

/// Adds the `table` subcommand computing its rows with `backend`.
void register_table_with(CLI::App& app, int* code, TableBackend backend);

} // namespace renorm::app
