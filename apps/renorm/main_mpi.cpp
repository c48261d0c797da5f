// renorm-mpi: the `table` command spread over the ranks of an MPI job (built with
// -DRENORM_WITH_MPI=ON). Every rank parses the same arguments and makes the same checks; the orders
// are assigned to ranks by estimated cost (table::assign_orders, the same on every rank); each
// rank computes its rows (on --threads threads) and sends them to rank 0, which writes the one
// table, byte for byte the table `renorm table` writes with the same arguments.
//
// A rank whose work throws sends the error instead of rows; rank 0 then reports it and writes
// nothing. A rank that dies makes mpirun end the whole job; no table is written either, since
// rank 0 writes only after every rank has reported (and atomically).
#include "commands.hpp"
#include "table_backend.hpp"

#include <renorm/version.hpp>

#include <mpi.h>

#include <cstdlib>
#include <exception>
#include <iostream>
#include <stdexcept>

namespace {

using namespace renorm;

int rank_of_world()
{
    int r = 0;
    MPI_Comm_rank(MPI_COMM_WORLD, &r);
    return r;
}

int size_of_world()
{
    int n = 1;
    MPI_Comm_size(MPI_COMM_WORLD, &n);
    return n;
}

constexpr int tag_header = 1, tag_payload = 2;

void send_text(const std::string& s, int status)
{
    long long head[2] = {status, static_cast<long long>(s.size())};
    MPI_Send(head, 2, MPI_LONG_LONG, 0, tag_header, MPI_COMM_WORLD);
    MPI_Send(s.data(), static_cast<int>(s.size()), MPI_CHAR, 0, tag_payload, MPI_COMM_WORLD);
}

std::pair<int, std::string> receive_text(int from)
{
    long long head[2] = {0, 0};
    MPI_Recv(head, 2, MPI_LONG_LONG, from, tag_header, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
    std::string s(static_cast<size_t>(head[1]), '\0');
    MPI_Recv(s.data(), static_cast<int>(head[1]), MPI_CHAR, from, tag_payload, MPI_COMM_WORLD,
             MPI_STATUS_IGNORE);
    return {static_cast<int>(head[0]), s};
}

app::TableBackend mpi_backend()
{
    app::TableBackend b;
    const int rank = rank_of_world(), size = size_of_world();
    b.is_root = rank == 0;
    b.program = "renorm-mpi";
    b.agree = [](bool root_ok) {
        int ok = root_ok ? 1 : 0;
        MPI_Bcast(&ok, 1, MPI_INT, 0, MPI_COMM_WORLD);
        return ok != 0;
    };
    b.compute = [rank, size](const std::vector<std::string>& orders,
                             const table::RowOptions& options, int threads,
                             const table::RowEvent& event) {
        const std::vector<int> owner = table::assign_orders(orders, options, size);
        std::vector<std::string> mine;
        std::vector<size_t> where;
        for (size_t i = 0; i < orders.size(); ++i)
            if (owner[i] == rank) {
                mine.push_back(orders[i]);
                where.push_back(i);
            }
        // Compute this rank's rows; an exception here is a failure of the rank, not of a row.
        std::string error;
        std::vector<std::pair<size_t, io::TableRow>> done;
        try {
            // Test hook: RENORM_TABLE_FAIL_RANK=r makes rank r fail as a whole.
            if (const char* f = std::getenv("RENORM_TABLE_FAIL_RANK"); f && std::atoi(f) == rank)
                throw std::runtime_error("failure injected by RENORM_TABLE_FAIL_RANK");
            auto local_event = [&](size_t i, const io::TableRow* row, bool fin) {
                if (event)
                    event(where[i], row, fin);
            };
            std::vector<io::TableRow> rows =
                table::compute_rows(mine, options, threads, event ? table::RowEvent(local_event)
                                                                  : table::RowEvent());
            for (size_t k = 0; k < rows.size(); ++k)
                done.emplace_back(where[k], std::move(rows[k]));
        } catch (const std::exception& e) {
            error = e.what();
        }
        if (rank != 0) {
            if (error.empty())
                send_text(table::rows_to_message(done), 0);
            else
                send_text(error, 1);
            return std::vector<io::TableRow>{};
        }
        // Rank 0: gather every rank's rows (receiving from all, even after a failure, so that no
        // rank is left blocked), then fail if any rank failed.
        std::vector<io::TableRow> all(orders.size());
        std::vector<bool> have(orders.size(), false);
        std::string failures;
        if (!error.empty())
            failures = "rank 0 failed: " + error;
        for (auto& [i, r] : done) {
            all[i] = std::move(r);
            have[i] = true;
        }
        for (int from = 1; from < size; ++from) {
            auto [status, text] = receive_text(from);
            if (status != 0) {
                failures += (failures.empty() ? "" : "; ") + std::string("rank ") +
                            std::to_string(from) + " failed: " + text;
                continue;
            }
            for (auto& [i, r] : table::rows_from_message(text)) {
                if (i >= all.size() || have[i])
                    throw std::runtime_error("rank " + std::to_string(from) +
                                             " sent a row it does not own");
                all[i] = std::move(r);
                have[i] = true;
            }
        }
        if (!failures.empty())
            throw std::runtime_error(failures + "; no table written");
        for (size_t i = 0; i < have.size(); ++i)
            if (!have[i])
                throw std::runtime_error("no rank computed z = " + orders[i] + "; no table written");
        return all;
    };
    return b;
}

} // namespace

int main(int argc, char** argv)
{
    using namespace renorm::app;
    MPI_Init(&argc, &argv);
    const bool root = rank_of_world() == 0;
    int code = exit_ok;
    {
        CLI::App app{"renorm-mpi: the 'table' command of renorm with its rows spread over the ranks "
                     "of an MPI job (mpirun -np R renorm-mpi table ...). Rank 0 writes the table, "
                     "identical to the one 'renorm table' writes."};
        app.set_version_flag("--version", std::string("renorm-mpi ") + renorm::version +
                                              " (commit " + renorm::git_commit + ")");
        app.require_subcommand(1);
        app.footer("Exit codes: 0 ok, 1 computation failed (a row or a rank), 2 bad input.");
        register_table_with(app, &code, mpi_backend());
        try {
            app.parse(argc, argv);
        } catch (const CLI::ParseError& e) {
            // Help, version and parse errors: every rank sees the same; rank 0 prints.
            const int c = root ? app.exit(e) : e.get_exit_code();
            code = (c == 0) ? exit_ok : exit_bad_input;
        } catch (const BadInput& e) {
            if (root)
                std::cerr << "renorm-mpi: error: " << e.what() << "\n";
            code = exit_bad_input;
        } catch (const std::invalid_argument& e) {
            if (root)
                std::cerr << "renorm-mpi: error: " << e.what() << "\n";
            code = exit_bad_input;
        } catch (const std::exception& e) {
            if (root)
                std::cerr << "renorm-mpi: failed: " << e.what() << "\n";
            code = exit_failed;
        }
    }
    // Rank 0's code is the job's: make every rank return it, so mpirun reports it.
    MPI_Bcast(&code, 1, MPI_INT, 0, MPI_COMM_WORLD);
    MPI_Finalize();
    return code;
}
