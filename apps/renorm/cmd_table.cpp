// renorm table: a reference table of alpha(z), delta(z) (and the next eigenvalues) over a list of
// orders z, with provenance, in CSV, JSON, Markdown or LaTeX. The rows are computed by
// lib/renorm/table (one independent solve per order, spread over threads or MPI ranks); the table
// model and its writers are lib/renorm/io/table. This file parses, checks, prints and writes.
#include "commands.hpp"
#include "progress.hpp"
#include "table_backend.hpp"

#include <renorm/io/atomic_file.hpp>
#include <renorm/io/checkpoint.hpp>
#include <renorm/io/table.hpp>
#include <renorm/table/orders.hpp>
#include <renorm/version.hpp>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <ctime>
#include <iostream>
#include <memory>
#include <mutex>
#include <thread>
#include <unistd.h>

namespace renorm::app {

namespace {

struct TableArgs {
    std::string orders;
    long digits = 30;
    int eigenvalues = 0;
    bool certify = false;
    std::string format = "csv";
    std::string out;
    bool force = false;
    bool json = false;
    bool timing = false;
    int threads = 0;
    bool quiet = false;
    std::string progress = "auto";
    std::string title;
    std::string from;
    std::vector<long> fallback;
    std::string checkpoint;
    std::string resume;
};

/// UTC date of the run, or of SOURCE_DATE_EPOCH when that is set (the reproducible-builds
/// convention), so that two runs can produce identical bytes.
std::string utc_date()
{
    std::time_t t = std::time(nullptr);
    if (const char* e = std::getenv("SOURCE_DATE_EPOCH")) {
        char* end = nullptr;
        const long long v = std::strtoll(e, &end, 10);
        if (end == e || *end != '\0' || v < 0)
            throw BadInput(std::string("SOURCE_DATE_EPOCH must be a number of seconds, got '") + e +
                           "'");
        t = static_cast<std::time_t>(v);
    }
    std::tm tm{};
    gmtime_r(&t, &tm);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return buf;
}

std::string shell_quote(const std::string& s)
{
    if (!s.empty() && s.find_first_not_of("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                          "0123456789.,:_-+/=") == std::string::npos)
        return s;
    std::string q = "'";
    for (char c : s)
        q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

/// The command that regenerates the table's content: every option that changes it, none that
/// does not (output file, threads, progress). The same under MPI, so the bytes agree.
std::string canonical_command(const TableArgs& a, const std::string& format)
{
    std::string c = "renorm table --orders " + shell_quote(a.orders) + " --digits " +
                    std::to_string(a.digits);
    if (a.eigenvalues > 0)
        c += " --eigenvalues " + std::to_string(a.eigenvalues);
    if (a.certify)
        c += " --certify";
    if (!a.fallback.empty()) {
        c += " --fallback ";
        for (size_t i = 0; i < a.fallback.size(); ++i)
            c += (i ? "," : "") + std::to_string(a.fallback[i]);
    }
    c += " --format " + format;
    if (a.timing)
        c += " --timing";
    if (!a.title.empty())
        c += " --title " + shell_quote(a.title);
    return c;
}

std::string format_name(io::TableFormat f)
{
    switch (f) {
    case io::TableFormat::csv:
        return "csv";
    case io::TableFormat::json:
        return "json";
    case io::TableFormat::markdown:
        return "markdown";
    case io::TableFormat::latex:
        return "latex";
    }
    return "csv";
}

/// Progress on stderr, only when it is a terminal: one line per finished row and a status line.
class TableProgress {
public:
    TableProgress(bool quiet, const std::vector<std::string>& orders)
        : m_on(!quiet && ::isatty(STDERR_FILENO)), m_orders(orders),
          m_running(orders.size(), false)
    {
    }
    table::RowEvent callback()
    {
        if (!m_on)
            return {};
        return [this](size_t i, const io::TableRow* row, bool done) {
            m_running[i] = !done;
            const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - m_start)
                                 .count();
            std::fprintf(stderr, "\r\033[K");
            if (done && row) {
                ++m_done;
                std::fprintf(stderr, "  z = %s: %s, alpha %ld / delta %ld digits, %.1f s\n",
                             row->order.c_str(), io::to_string(row->status).c_str(),
                             row->alpha.digits, row->delta.digits, row->seconds);
            }
            std::string running;
            for (size_t k = 0; k < m_running.size(); ++k)
                if (m_running[k])
                    running += (running.empty() ? "" : ", ") + m_orders[k];
            std::fprintf(stderr, "[%6.1fs] %zu/%zu rows done%s%s", s, m_done, m_orders.size(),
                         running.empty() ? "" : "; running z = ", running.c_str());
            std::fflush(stderr);
            m_shown = true;
        };
    }
    /// Clears the status line (before anything else is printed).
    void finish()
    {
        if (m_on && m_shown)
            std::fprintf(stderr, "\r\033[K");
        m_shown = false;
    }
    ~TableProgress() { finish(); }

private:
    bool m_on;
    std::vector<std::string> m_orders;
    std::vector<bool> m_running;
    size_t m_done = 0;
    bool m_shown = false;
    std::chrono::steady_clock::time_point m_start = std::chrono::steady_clock::now();
};

/// --from: re-renders a CSV table in another format, keeping its provenance and rows.
int convert_table(const TableArgs& a)
{
    if (!a.orders.empty() || a.certify || a.eigenvalues != 0 || a.timing || !a.title.empty() ||
        !a.fallback.empty())
        throw BadInput("--from converts an existing table and takes only --format, --out, --force");
    const io::TableFormat format = io::table_format_from_string(a.format);
    std::ifstream in(a.from, std::ios::binary);
    if (!in)
        throw BadInput("cannot read '" + a.from + "'");
    std::ostringstream ss;
    ss << in.rdbuf();
    io::Table t = io::table_from_csv(ss.str());
    if (!a.out.empty()) {
        io::check_writable(a.out, a.force);
        io::write_file_atomic(a.out, io::to_text(t, format));
    } else {
        std::cout << io::to_text(t, format);
    }
    return t.failed_rows() > 0 ? exit_failed : exit_ok;
}

int run_table(const TableArgs& a, const TableBackend& backend)
{
    const auto t0 = std::chrono::steady_clock::now();
    if (!a.from.empty()) {
        if (!backend.is_root)
            return exit_ok;
        return convert_table(a);
    }
    if (a.orders.empty())
        throw BadInput("--orders is required (a list like 2,4,6 or a range A:B:STEP with "
                       "1 < z <= 64), or --from FILE to convert a table");
    // Checks every process makes identically (same arguments): bad input throws everywhere.
    const std::vector<std::string> orders = table::parse_orders(a.orders);
    const io::TableFormat format = io::table_format_from_string(a.format);
    table::RowOptions opt;
    opt.digits = a.digits;
    opt.eigenvalues = a.eigenvalues;
    opt.certify = a.certify;
    opt.fallback_digits = a.fallback;
    // A long one-order table (thousands of digits) can be saved and continued like `solve`.
    io::Checkpoint resumed;
    if (!a.resume.empty()) {
        resumed = io::read_checkpoint(a.resume);
        opt.resume = &resumed;
    }
    opt.checkpoint_path = !a.checkpoint.empty() ? a.checkpoint : a.resume;
    table::validate(orders, opt, available_memory_bytes());
    if (opt.resume && backend.is_root && resumed.commit != renorm::git_commit)
        std::cerr << backend.program << " table: note: the checkpoint was written by commit " << resumed.commit
                  << ", this is " << renorm::git_commit << "; the result may differ in the last digits\n";
    if (!opt.checkpoint_path.empty() && backend.is_root)
        io::check_writable(opt.checkpoint_path, true);
    if (a.threads < 0 || a.threads > 256)
        throw BadInput("--threads must be between 0 (one per core) and 256, got " +
                       std::to_string(a.threads));
    if (a.json && a.out.empty())
        throw BadInput("--json prints a summary and needs --out FILE for the table (use --format "
                       "json for a JSON table on stdout)");
    const std::string date = utc_date();

    // The output file is checked on the root only; every process learns the verdict.
    std::string out_problem;
    if (backend.is_root && !a.out.empty()) {
        try {
            io::check_writable(a.out, a.force);
        } catch (const std::exception& e) {
            out_problem = e.what();
        }
    }
    if (!backend.agree(out_problem.empty())) {
        if (backend.is_root)
            throw BadInput(out_problem.empty() ? std::string("the output file cannot be written")
                                               : out_problem);
        return exit_bad_input;
    }

    const int hw = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
    const int threads = a.threads > 0 ? a.threads : hw;
    // auto: a status line per row on a terminal; lines: a line per Newton step of every row
    // (for logs of long rows), serialised here because rows run on several threads.
    const bool step_lines = !a.quiet && a.progress == "lines";
    TableProgress progress(a.quiet || a.progress != "auto" || !backend.is_root, orders);
    ProgressLine steps(step_lines ? ProgressMode::lines : ProgressMode::none);
    std::mutex steps_mutex;
    if (step_lines)
        opt.progress = [&steps_mutex, print = steps.callback()](const newton::Progress& p) {
            std::lock_guard<std::mutex> lock(steps_mutex);
            print(p);
        };
    std::vector<io::TableRow> rows = backend.compute(orders, opt, threads, progress.callback());
    progress.finish();
    if (!backend.is_root)
        return exit_ok;

    io::Table t;
    t.provenance.title =
        a.title.empty() ? "alpha(z) and delta(z), the universal constants of period doubling for "
                          "a critical point of order z (g(x) = G(|x|^z))"
                        : a.title;
    t.provenance.version = renorm::version;
    t.provenance.commit = renorm::git_commit;
    t.provenance.command = canonical_command(a, format_name(format));
    t.provenance.date = date;
    t.digits_requested = a.digits;
    t.eigenvalue_columns = a.eigenvalues;
    t.timing = a.timing;
    t.rows = std::move(rows);
    const std::string text = io::to_text(t, format);

    const long failed = t.failed_rows();
    for (const auto& r : t.rows)
        if (r.status == io::RowStatus::failed)
            std::cerr << backend.program << " table: z = " << r.order << " failed: " << r.note
                      << "\n";
    const double seconds =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    if (a.out.empty()) {
        std::cout << text;
    } else {
        io::write_file_atomic(a.out, text);
        long cert = 0, est = 0;
        for (const auto& r : t.rows) {
            cert += r.status == io::RowStatus::certified ? 1 : 0;
            est += r.status == io::RowStatus::estimated ? 1 : 0;
        }
        if (a.json) {
            nlohmann::json j;
            j["out"] = a.out;
            j["format"] = format_name(format);
            j["rows"] = t.rows.size();
            j["certified"] = cert;
            j["estimated"] = est;
            j["failed"] = failed;
            j["seconds"] = seconds;
            j["command"] = t.provenance.command;
            std::cout << j.dump() << "\n";
        } else {
            std::cout << "wrote " << a.out << ": " << t.rows.size() << " rows (" << cert
                      << " certified, " << est << " estimated, " << failed << " failed) in ";
            char buf[32];
            std::snprintf(buf, sizeof buf, "%.1f s", seconds);
            std::cout << buf << "\n";
        }
    }
    return failed > 0 ? exit_failed : exit_ok;
}

} // namespace

void register_table_with(CLI::App& app, int* code, TableBackend backend)
{
    auto args = std::make_shared<TableArgs>();
    CLI::App* sub = app.add_subcommand(
        "table", "Tabulate alpha(z), delta(z) (and the next eigenvalues) over a list of orders z, "
                 "with provenance");
    sub->add_option("--orders", args->orders,
                    "orders z: a comma-separated list of numbers and ranges A:B:STEP "
                    "(1 < z <= 64), e.g. 2,4,6 or 1.5:8:0.5,10,12");
    sub->add_option("-d,--digits", args->digits, "significant digits wanted per constant")
        ->capture_default_str();
    sub->add_option("-k,--eigenvalues", args->eigenvalues,
                    "also tabulate this many eigenvalues after delta (0-50; at most 30 digits each)")
        ->capture_default_str();
    sub->add_flag("--certify", args->certify,
                  "prove enclosures for every row (rows whose proof does not close stay estimated, "
                  "with the reason)");
    sub->add_option("--fallback", args->fallback,
                    "retry a row that fails at --digits with these fewer digits, in turn "
                    "(e.g. 30,10); the row's note says so")
        ->delimiter(',');
    sub->add_option("--format", args->format, "csv, json, markdown or latex")->capture_default_str();
    sub->add_option("-o,--out", args->out, "write the table to FILE (atomically) instead of stdout");
    sub->add_flag("--force", args->force, "replace FILE when it exists");
    sub->add_flag("--json", args->json, "with --out: print a JSON summary on stdout");
    sub->add_flag("--timing", args->timing, "add a column with each row's wall time in seconds");
    sub->add_option("--threads", args->threads,
                    "rows computed at once (0: one per core); the table does not depend on it")
        ->capture_default_str();
    sub->add_option("--title", args->title, "title line of the provenance header");
    sub->add_flag("-q,--quiet", args->quiet, "no progress on stderr (the same as --progress none)");
    sub->add_option("--progress", args->progress,
                    "auto (a status line per row when stderr is a terminal), lines (one plain line per "
                    "Newton step of every row, also into a file: for long rows), or none")
        ->check(CLI::IsMember({"auto", "lines", "none"}))
        ->capture_default_str();
    sub->add_option("--checkpoint", args->checkpoint,
                    "one-order tables: save the row's run to FILE after every Newton step (as "
                    "'renorm solve --checkpoint')")
        ->type_name("FILE");
    sub->add_option("--resume", args->resume,
                    "one-order tables: continue the run saved in FILE (by this command or by 'renorm "
                    "solve' with the same order, digits and eigenvalues); the timing column then "
                    "counts all sittings")
        ->type_name("FILE");
    sub->add_option("--from", args->from,
                    "convert the CSV table FILE (as written by this command) to --format, "
                    "keeping its provenance; computes nothing");
    sub->footer(
        "Each row is an independent solve (as 'renorm solve') of one order z; rows run in\n"
        "parallel, longest first. Estimated rows show only digits on which two truncations agree;\n"
        "with --certify, rows whose proof closes are marked certified with their enclosure\n"
        "radius. A row that fails stays in the table as 'failed' with the reason, and the exit\n"
        "code is then 1. The header records the version, commit, command and date (set\n"
        "SOURCE_DATE_EPOCH for a fixed date).\n\n"
        "Examples:\n"
        "  renorm table --orders 2,4,6 --digits 30\n"
        "  renorm table --orders 1.5:8:0.5,10,12 -d 50 --format markdown --out table.md\n"
        "  renorm table --orders 2:4:1 -d 20 --certify --eigenvalues 2 --format latex\n"
        "  renorm table --from table.csv --format markdown --out table.md\n"
        "  renorm table --orders 2 -d 10000 --timing --checkpoint z2.ckpt --out z2.csv\n"
        "  renorm table --orders 2 -d 10000 --timing --resume z2.ckpt --out z2.csv   # after a kill");
    sub->callback([args, code, backend] { *code = run_table(*args, backend); });
}

void register_table(CLI::App& app, int* code) { register_table_with(app, code, TableBackend{}); }

} // namespace renorm::app
