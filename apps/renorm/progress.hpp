#pragma once
// Progress on stderr: one line rewritten in place on a terminal, or plain lines for logs.
#include <renorm/newton/fixed_point.hpp>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <string>
#include <unistd.h>

namespace renorm::app {

/// Physical memory of the machine in bytes (80% of it: what a run may plan to use).
inline double available_memory_bytes()
{
    const long pages = ::sysconf(_SC_PHYS_PAGES);
    const long size = ::sysconf(_SC_PAGE_SIZE);
    if (pages <= 0 || size <= 0)
        return 4e9;
    return 0.8 * static_cast<double>(pages) * static_cast<double>(size);
}

/// "<1 s", "~12 s", "~7 min", "~2.5 h"; empty for a negative (unknown) duration.
inline std::string approx_duration_text(double seconds)
{
    if (!(seconds >= 0))
        return "";
    char buf[48];
    if (seconds < 1)
        std::snprintf(buf, sizeof buf, "<1 s");
    else if (seconds < 120)
        std::snprintf(buf, sizeof buf, "~%.0f s", seconds);
    else if (seconds < 7200)
        std::snprintf(buf, sizeof buf, "~%.0f min", seconds / 60);
    else
        std::snprintf(buf, sizeof buf, "~%.1f h", seconds / 3600);
    return buf;
}

/// "~12 min left" and the like; empty for a negative (unknown) estimate.
inline std::string time_left_text(double seconds)
{
    const std::string d = approx_duration_text(seconds);
    return d.empty() ? d : d + " left";
}

/// How progress is shown.
enum class ProgressMode {
    automatic, ///< one line rewritten in place when stderr is a terminal, nothing otherwise
    lines,     ///< one plain line per step, terminal or not (for logs of long runs)
    none,
};

class ProgressLine {
public:
    explicit ProgressLine(ProgressMode mode)
        : m_on(mode == ProgressMode::lines || (mode == ProgressMode::automatic && ::isatty(STDERR_FILENO))),
          m_lines(mode == ProgressMode::lines)
    {
    }
    explicit ProgressLine(bool quiet) : ProgressLine(quiet ? ProgressMode::none : ProgressMode::automatic) {}

    newton::ProgressFn callback()
    {
        if (!m_on)
            return {};
        return [this](const newton::Progress& p) {
            const double s =
                std::chrono::duration<double>(std::chrono::steady_clock::now() - m_start).count();
            const std::string left = time_left_text(p.seconds_left);
            std::string krylov =
                p.krylov_running >= 0 ? ", correcting: " + std::to_string(p.krylov_running) + " Krylov steps so far"
                : p.krylov_steps >= 0 ? ", " + std::to_string(p.krylov_steps) + " Krylov steps"
                                      : "";
            if (p.krylov_running >= 0 && p.krylov_gained >= 0 && p.krylov_needed > 0)
                krylov += " (" + std::to_string(std::lround(p.krylov_gained)) + " of " +
                          std::to_string(std::lround(p.krylov_needed)) + " digits)";
            std::fprintf(stderr, "%s[%6.1fs] z=%s %s step %ld: N=%ld, %ld bits, residual 1e%.0f%s%s%s%s",
                         m_lines ? "" : "\r\033[K", s, p.order.c_str(), p.stage.c_str(),
                         static_cast<long>(p.step), static_cast<long>(p.n), static_cast<long>(p.prec),
                         p.log10_residual, krylov.c_str(), left.empty() ? "" : ", ", left.c_str(),
                         m_lines ? "\n" : "");
            std::fflush(stderr);
            m_dirty = !m_lines;
        };
    }
    void finish()
    {
        if (m_dirty)
            std::fprintf(stderr, "\r\033[K");
        m_dirty = false;
    }
    ~ProgressLine() { finish(); }

private:
    bool m_on;
    bool m_lines;
    bool m_dirty = false;
    std::chrono::steady_clock::time_point m_start = std::chrono::steady_clock::now();
};

} // namespace renorm::app
