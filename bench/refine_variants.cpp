// Times the two fixed-point refinement variants (chord, inexact Newton) and one series composition
// at the final size, for z = 2 at D digits (default 300). Reproduces the numbers quoted in
// DEVELOPERS.md ("Newton steps at two precisions", "Why compositions are computed as they are").
// Usage: renorm_bench_refine_variants [DIGITS]
#include <renorm/newton/fixed_point.hpp>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>

using namespace renorm;

int main(int argc, char** argv)
{
    const slong digits = argc > 1 ? std::atol(argv[1]) : 300;
    doubling::Problem p;
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    newton::FixedPoint last;
    std::printf("| variant | D | N | steps | wall (s) | cpu (s) |\n|---|---:|---:|---:|---:|---:|\n");
    for (auto m : {newton::RefineMethod::chord, newton::RefineMethod::newton}) {
        newton::RefineOptions o;
        o.method = m;
        const auto w0 = std::chrono::steady_clock::now();
        const std::clock_t c0 = std::clock();
        last = newton::approx_refine(start, digits, o);
        const double cpu = double(std::clock() - c0) / CLOCKS_PER_SEC;
        const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - w0).count();
        std::printf("| %s | %ld | %ld | %ld | %.2f | %.2f |\n", m == newton::RefineMethod::chord ? "chord" : "newton",
                    static_cast<long>(digits), static_cast<long>(last.n), static_cast<long>(last.steps), wall, cpu);
    }
    doubling::InnerMaps im = doubling::inner_maps(last.g, p, last.n, last.prec);
    const std::clock_t c0 = std::clock();
    ball::BallPoly out = series::compose(last.g, im.sigma_v, last.n, last.prec);
    std::printf("\none composition G(v) at N = %ld, %ld bits: %.2f s cpu\n", static_cast<long>(last.n),
                static_cast<long>(last.prec), double(std::clock() - c0) / CLOCKS_PER_SEC);
    return out.length() > 0 ? 0 : 1;
}
