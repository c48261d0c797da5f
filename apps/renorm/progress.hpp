#pragma once
// A one-line progress display on stderr, shown only when stderr is a terminal.
#include <renorm/newton/fixed_point.hpp>

#include <chrono>
#include <cstdio>
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

class ProgressLine {
public:
    explicit ProgressLine(bool quiet) : m_on(!quiet && ::isatty(STDERR_FILENO)) {}
    newton::ProgressFn callback()
    {
        if (!m_on)
            return {};
        return [this](const newton::Progress& p) {
            const double s =
                std::chrono::duration<double>(std::chrono::steady_clock::now() - m_start).count();
            std::fprintf(stderr, "\r\033[K[%6.1fs] z=%s %s step %ld: N=%ld, %ld bits, residual 1e%.0f",
                         s, p.order.c_str(), p.stage.c_str(), static_cast<long>(p.step),
                         static_cast<long>(p.n), static_cast<long>(p.prec), p.log10_residual);
            std::fflush(stderr);
            m_dirty = true;
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
    bool m_dirty = false;
    std::chrono::steady_clock::time_point m_start = std::chrono::steady_clock::now();
};

} // namespace renorm::app
