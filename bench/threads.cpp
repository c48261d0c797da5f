// What FLINT's threads (solve::Request::threads, `renorm solve --threads`) buy inside the
// solver's largest operations: one product of two series (arb_poly_mullow) and one composition
// (series::compose_graded), each at the sizes of a D-digit run's last Newton step (n = 0.83 D
// terms, 3.33 D + 100 bits; coefficients decaying like G's, 2^(-4k)), on 1 and on 2 threads.
// Prints a Markdown table with the ratio. The results are the same bits on any thread count
// (checked here). Compositions above 3000 digits are left out (minutes each); the default sizes
// above that put n on both sides of a size where two threads are slower (n = 8150 and 8300).
// Usage: renorm_bench_threads [D ...]   (default 1000 3000 9820 10000 11807)
#include <renorm/series/compose_graded.hpp>
#include <renorm/series/series.hpp>

#include <flint/flint.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <functional>
#include <vector>

using namespace renorm;
using ball::Ball;
using ball::BallPoly;

namespace {

BallPoly decaying(flint_rand_t st, slong len, slong offset, slong prec)
{
    BallPoly p;
    for (slong k = 0; k < len; ++k) {
        Ball x;
        arb_urandom(x.get(), st, prec);
        arb_mul_2exp_si(x.get(), x.get(), -4 * k - offset);
        p.set_coeff(k, x);
    }
    return p;
}

/// Seconds of one call of fn (the best of `reps`).
double seconds(const std::function<void()>& fn, int reps)
{
    double best = 1e300;
    for (int r = 0; r < reps; ++r) {
        const auto t0 = std::chrono::steady_clock::now();
        fn();
        best = std::min(best, std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    }
    return best;
}

bool same(const BallPoly& a, const BallPoly& b)
{
    return arb_poly_equal(a.get(), b.get()) != 0;
}

} // namespace

int main(int argc, char** argv)
{
    std::vector<long> ds;
    for (int i = 1; i < argc; ++i)
        ds.push_back(std::atol(argv[i]));
    if (ds.empty())
        ds = {1000, 3000, 9820, 10000, 11807};
    std::printf("| D | n | bits | operation | 1 thread s | 2 threads s | ratio | same bits |\n");
    std::printf("|---:|---:|---:|---|---:|---:|---:|---|\n");
    for (long d : ds) {
        const slong n = static_cast<slong>(0.83 * static_cast<double>(d));
        const slong prec = static_cast<slong>(3.33 * static_cast<double>(d)) + 100;
        flint_rand_t st;
        flint_randinit(st);
        const BallPoly f = decaying(st, n, 0, prec);
        const BallPoly g = decaying(st, n, 1, prec);
        // An inner map like the solver's v on its disc: v(0) = 0.4, v'(0) = 0.6, small tail.
        BallPoly v = decaying(st, n, 3, prec);
        v.set_coeff(0, Ball(0.4));
        v.set_coeff(1, Ball(0.6));
        const int reps = d <= 3000 ? 3 : 1;
        struct Op {
            const char* name;
            std::function<BallPoly()> run;
        };
        const std::vector<Op> ops = {
            {"product (mullow)",
             [&] {
                 BallPoly r;
                 arb_poly_mullow(r.get(), f.get(), g.get(), n, prec);
                 return r;
             }},
            {"composition (graded)", [&] { return series::compose_graded(f, v, n, prec); }},
        };
        for (const Op& op : ops) {
            if (d > 3000 && op.name[0] == 'c')
                continue;
            double t[2];
            BallPoly r[2];
            for (int k = 0; k < 2; ++k) {
                flint_set_num_threads(k + 1);
                t[k] = seconds([&] { r[k] = op.run(); }, reps);
            }
            flint_set_num_threads(1);
            std::printf("| %ld | %ld | %ld | %s | %.3f | %.3f | %.2f | %s |\n", d, static_cast<long>(n),
                        static_cast<long>(prec), op.name, t[0], t[1], t[0] / t[1], same(r[0], r[1]) ? "yes" : "NO");
            std::fflush(stdout);
        }
        flint_randclear(st);
    }
    flint_cleanup_master();
    return 0;
}
