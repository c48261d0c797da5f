#pragma once
/// \file
/// Writing output files so that a reader never sees half a file: write to a temporary file in the
/// same directory, flush, then rename over the target (rename is atomic on POSIX file systems).

#include <string>

namespace renorm::io {

/// Throws std::invalid_argument naming the problem when `path` cannot be written (missing
/// directory, no permission, a directory in the way), or when it exists and `overwrite` is false.
/// Creates nothing.
void check_writable(const std::string& path, bool overwrite = true);

/// Writes `content` to `path` atomically. Throws std::runtime_error on failure, leaving no
/// temporary file behind.
void write_file_atomic(const std::string& path, const std::string& content);

} // namespace renorm::io
