// Times the chord refinement of the fixed point (z = 2) to D digits twice, once with
// series::compose on Arb's path (compose_graded_cutoff set past every length) and once with the
// default cutoff (compose_graded), alternating, to show what the graded composition gives a whole
// solve. Reproduces the end-to-end numbers in DEVELOPERS.md ("Why compositions are computed as
// they are"). Usage: renorm_bench_refine_compose [DIGITS] [REPEATS]   (default 300 1)
#include <renorm/newton/fixed_point.hpp>
#include <renorm/series/series.hpp>

#include <cstdio>
#include <cstdlib>
#include <ctime>

using namespace renorm;

int main(int argc, char** argv)
{
    const slong digits = argc > 1 ? std::atol(argv[1]) : 300;
    const int repeats = argc > 2 ? std::atoi(argv[2]) : 1;
    const slong default_cutoff = series::compose_graded_cutoff;
    doubling::Problem p;
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    std::printf("| compose | D | N | steps | cpu (s) |\n|---|---:|---:|---:|---:|\n");
    for (int r = 0; r < repeats; ++r) {
        for (const slong cutoff : {slong{1} << 40, default_cutoff}) {
            series::compose_graded_cutoff = cutoff;
            newton::RefineOptions o;
            o.method = newton::RefineMethod::chord;
            const std::clock_t c0 = std::clock();
            newton::FixedPoint last = newton::approx_refine(start, digits, o);
            const double cpu = double(std::clock() - c0) / CLOCKS_PER_SEC;
            std::printf("| %s | %ld | %ld | %ld | %.2f |\n",
                        cutoff == default_cutoff ? "graded" : "arb", static_cast<long>(digits),
                        static_cast<long>(last.n), static_cast<long>(last.steps), cpu);
            std::fflush(stdout);
        }
    }
    return 0;
}
