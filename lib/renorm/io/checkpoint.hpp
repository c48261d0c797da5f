#pragma once
/// \file
/// Checkpoints of a long `solve` run: the request, the stages already finished (fixed points and
/// eigenpairs, every ball exact) and the Newton-Krylov state of the stage that was running. The
/// Newton-Krylov driver is deterministic, so a run continued from a checkpoint reproduces the
/// uninterrupted run bit for bit (DEVELOPERS.md, "Checkpoints").
///
/// The file is text of our own design, one item a line:
///
///     renorm-checkpoint 1
///     written-by <version> <commit>
///     order <z text> / digits <D> / eigenvalues <k> / basis <taylor|chebyshev>
///     seconds <wall seconds of all sittings so far>   (optional: absent in older files)
///     fixed-point <name>      (then n, prec, log10-residual, steps, krylov-steps, decay-rate,
///                              converged, disc, a <ball>, g <count> and one ball a line)
///     eigenpair <name>        (then n, prec, log10-residual, steps, converged, lambda <ball>,
///                              h <count> and one ball a line)
///     running <name>          (then the KrylovState: n, digits, step, krylov-total, n-final,
///                              pc-size, pc-prec, pc-digits, x <count> ..., pc-point <count> ...,
///                              and inside a Newton step: f-log10, f <count> ...,
///                              inner-restarts, inner-steps, inner <count> ...)
///     sha256 <hex digest of every byte before this line>
///
/// Balls are ball::dump strings (exact); doubles are written with 17 significant digits, which
/// read back to the same double. Nothing here is a guarantee: it stores estimates.

#include <renorm/newton/fixed_point.hpp>
#include <renorm/newton/krylov.hpp>
#include <renorm/spectrum/spectrum.hpp>

#include <map>
#include <string>

namespace renorm::io {

/// The version written in the first line; reading refuses any other.
inline constexpr int checkpoint_format_version = 1;

/// The state of an interrupted `solve` run.
struct Checkpoint {
    // The request the run answers (a resumed run must ask the same).
    std::string order;      ///< z as decimal text
    slong digits = 0;
    slong eigenvalues = 0;
    std::string basis;      ///< the basis actually used: "taylor" or "chebyshev"
    /// Wall seconds the run has spent so far, over all sittings (when written); -1 when the file
    /// does not say (written before this field existed).
    double seconds = -1;
    // Provenance, from renorm/version.hpp when written (informative: not checked on reading).
    std::string version;
    std::string commit;
    /// Finished stages by name (converged results only).
    std::map<std::string, newton::FixedPoint> fixed_points;
    std::map<std::string, spectrum::Eigenpair> eigenpairs;
    /// The stage that was running (empty: none), and its state after its last Newton step.
    std::string running;
    newton::KrylovState state;
};

/// The checkpoint as text (the format above). Stage names must be non-empty words without
/// spaces; throws std::invalid_argument otherwise.
std::string checkpoint_text(const Checkpoint& c);

/// Parses checkpoint_text() output. Throws std::invalid_argument with a message naming the line
/// and what was expected for truncated, altered (checksum), malformed or wrong-version text.
/// Never aborts: balls are read through the hardened ball::load.
Checkpoint parse_checkpoint(const std::string& text);

/// Writes checkpoint_text(c) to `path` atomically (temporary file, then rename): a reader or a
/// resumed run sees the old checkpoint or the new one, never a mixture. Throws
/// std::runtime_error when the file cannot be written.
void write_checkpoint(const std::string& path, const Checkpoint& c);

/// Reads and parses `path`. Throws std::invalid_argument naming the file when it cannot be read
/// or is not a valid checkpoint.
Checkpoint read_checkpoint(const std::string& path);

} // namespace renorm::io
