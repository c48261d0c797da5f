// Time per level of the certified superstable cascade.
//
//   renorm_bench_cascade_levels [LEVELS=25] [FAMILY=quadratic] [THREADS=2]
//
// Prints one row per level (the level's own time, counting both threads, and the wall time so
// far), then the total wall time and the estimates of the limits.
#include <renorm/cascade/cascade.hpp>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>

using namespace renorm;
using namespace renorm::cascade;

int main(int argc, char** argv)
{
    const int levels = argc > 1 ? std::atoi(argv[1]) : 25;
    const std::string family = argc > 2 ? argv[2] : "quadratic";
    const int threads = argc > 3 ? std::atoi(argv[3]) : 2;
    CascadeOptions o;
    o.levels = levels;
    o.threads = threads;
    Family f = make_builtin_family(family);
    std::printf("family %s, levels up to %d, %d thread(s); model estimate %.0f s on one core\n",
                family.c_str(), levels, threads, approx_cascade_seconds(f, o));
    std::printf("%3s %10s %6s %10s %10s %10s %s\n", "n", "period", "bits", "level_s", "wall_s",
                "radius", "status");
    const auto t0 = std::chrono::steady_clock::now();
    CascadeResult r = run_cascade(f, o, [&](const CascadeLevel& l) {
        const double wall =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        std::printf("%3d %10llu %6ld %10.3f %10.3f %10.1e %s\n", l.n,
                    static_cast<unsigned long long>(l.period), static_cast<long>(l.prec),
                    l.seconds, wall, l.mu.radius_upper(), to_string(l.status));
        std::fflush(stdout);
    });
    const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    std::printf("total wall %.2f s, %s%s\n", wall,
                r.all_certified() ? "all levels certified" : "NOT all certified",
                r.failed ? (", failed: " + r.failure).c_str() : "");
    std::printf("estimates: accumulation %s (%ld digits), delta %s (%ld digits), alpha %s (%ld "
                "digits)\n",
                r.mu_limit.text.c_str(), static_cast<long>(r.mu_limit.digits),
                r.delta_limit.text.c_str(), static_cast<long>(r.delta_limit.digits),
                r.alpha_limit.text.c_str(), static_cast<long>(r.alpha_limit.digits));
    return r.failed ? 1 : 0;
}
