#pragma once
/// \file
/// Reference tables over orders z: the table model (one row per order, with its provenance) and
/// its four text forms (CSV, JSON, Markdown, LaTeX), plus a CSV reader so that a shipped table can
/// be read back and re-checked. Values are decimal text exactly as computed; this module formats
/// and parses, it computes nothing and promises nothing about the numbers.

#include <string>
#include <utility>
#include <vector>

namespace renorm::io {

/// How a row's numbers were obtained. `certified` rows carry enclosure radii; `estimated` rows
/// show only digits that two truncations agree on; `failed` rows carry the reason in `note`.
enum class RowStatus { certified, estimated, failed };

std::string to_string(RowStatus s);
/// Inverse of to_string(RowStatus). Throws std::invalid_argument for any other text.
RowStatus row_status_from_string(const std::string& s);

/// One constant in a row: decimal text and the number of significant digits it claims.
struct TableValue {
    std::string text; ///< empty when nothing is claimed
    long digits = 0;  ///< significant digits claimed (stable, or determined by the enclosure)
    bool operator==(const TableValue&) const = default;
};

/// One eigenvalue of DT after delta: value, digits claimed and its kind ("relevant",
/// "irrelevant", "coordinate change alpha^(-z*m)").
struct TableEigenvalue {
    TableValue value;
    std::string kind;
    bool operator==(const TableEigenvalue&) const = default;
};

/// One row: one order z.
struct TableRow {
    std::string order;                    ///< z, canonical decimal text
    RowStatus status = RowStatus::failed;
    TableValue alpha, delta;
    std::vector<TableEigenvalue> eigenvalues; ///< as many as the table's `eigenvalues`
    std::string radius;  ///< certified rows: the larger enclosure radius of alpha and delta
    long n = 0;          ///< truncation (estimates: the coarser of the two compared)
    long n_check = 0;    ///< the second truncation (estimates) or 0
    long prec = 0;       ///< working precision, bits
    std::string basis;   ///< the basis G was solved in ("taylor", "chebyshev"); N counts its terms
    double seconds = -1; ///< wall time of the row; < 0 when not recorded
    std::string note;    ///< failure reason, or a remark (e.g. fewer digits than requested)
    bool operator==(const TableRow&) const = default;
};

/// Where a table comes from. Every writer prints all of it.
struct Provenance {
    std::string title;    ///< one line saying what the table holds
    std::string version;  ///< renorm version
    std::string commit;   ///< git commit of the build
    std::string command;  ///< the command that regenerates the table
    std::string date;     ///< UTC, ISO 8601
    bool operator==(const Provenance&) const = default;
};

/// A whole table.
struct Table {
    Provenance provenance;
    long digits_requested = 0;
    int eigenvalue_columns = 0; ///< eigenvalues after delta shown per row
    bool timing = false;        ///< whether the seconds column is present
    std::vector<TableRow> rows;
    bool operator==(const Table&) const = default;

    /// "certified" (all rows), "estimated" (no row certified), "mixed", or "failed" (no row
    /// succeeded); counts failed rows separately in the header.
    std::string certification_summary() const;
    long failed_rows() const;
};

enum class TableFormat { csv, json, markdown, latex };

/// Parses "csv", "json", "markdown" (or "md"), "latex" (or "tex"). Throws std::invalid_argument
/// naming the accepted formats otherwise.
TableFormat table_format_from_string(const std::string& s);

/// CSV (RFC 4180 quoting) preceded by "# key: value" provenance lines.
std::string to_csv(const Table& t);
/// One JSON object {"format": "renorm-table", "version": 1, "provenance": {...}, "rows": [...]},
/// every number as a decimal string except counts.
std::string to_json(const Table& t);
/// A provenance list followed by a pipe table (cells escaped for Markdown).
std::string to_markdown(const Table& t);
/// "%" provenance comments followed by a tabular environment (cells escaped for LaTeX).
std::string to_latex(const Table& t);
/// Dispatches on the format.
std::string to_text(const Table& t, TableFormat f);

/// Reads what to_csv() writes. Throws std::invalid_argument naming the line for malformed text
/// (unknown header, wrong number of fields, bad status, bad number).
Table table_from_csv(const std::string& text);

/// Escapes text for a Markdown table cell (|, \, *, _, `, <, >, [, ]).
std::string escape_markdown(const std::string& s);
/// Escapes text for LaTeX (\, &, %, $, #, _, {, }, ~, ^).
std::string escape_latex(const std::string& s);

} // namespace renorm::io
