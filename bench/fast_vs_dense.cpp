// One run of the fixed point and delta at one truncation, by one method, for bench/fast_vs_dense.sh
// (which runs each method in its own process, so that peak memory is the method's own).
// Usage: renorm_bench_fast_vs_dense METHOD DIGITS [ORDER]   (METHOD: krylov, dense or chord)
// Prints one line: method D N prec seconds peak_MB newton_steps krylov_steps alpha delta
#include <renorm/spectrum/spectrum.hpp>

#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

using namespace renorm;

int main(int argc, char** argv)
{
    if (argc < 3) {
        std::fprintf(stderr, "usage: %s krylov|dense|chord DIGITS [ORDER]\n", argv[0]);
        return 2;
    }
    const std::string method = argv[1];
    const slong digits = std::atol(argv[2]);
    doubling::Problem p;
    if (argc > 3)
        p.order = argv[3];
    newton::RefineOptions ro;
    spectrum::EigenOptions eo;
    if (method == "krylov") {
        ro.method = newton::RefineMethod::krylov;
        eo.method = spectrum::EigenMethod::krylov;
    } else if (method == "dense") {
        ro.method = newton::RefineMethod::dense;
        eo.method = spectrum::EigenMethod::dense;
    } else if (method == "chord") {
        ro.method = newton::RefineMethod::chord;
        eo.method = spectrum::EigenMethod::chord;
    } else {
        std::fprintf(stderr, "unknown method %s\n", method.c_str());
        return 2;
    }
    const auto t0 = std::chrono::steady_clock::now();
    if (std::getenv("RENORM_BENCH_PROGRESS")) {
        ro.progress = eo.progress = [t0](const newton::Progress& q) {
            std::fprintf(stderr, "  [%7.2f s] %s step %ld: N=%ld, %ld bits, residual 1e%.0f, Krylov %ld\n",
                         std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count(), q.stage.c_str(),
                         static_cast<long>(q.step), static_cast<long>(q.n), static_cast<long>(q.prec),
                         q.log10_residual, static_cast<long>(q.krylov_steps));
        };
    }
    newton::FixedPoint start = newton::approx_continuation(p, 40, 192);
    newton::FixedPoint fp = newton::approx_refine(start, digits, ro);
    if (!fp.converged) {
        std::printf("%s %ld failed: %s\n", method.c_str(), static_cast<long>(digits), fp.message.c_str());
        return 1;
    }
    fp.decay_rate = start.decay_rate;
    auto seeds = spectrum::approx_eigenvalues_dense(fp.g, p, std::min<slong>(fp.g.length(), 80), 128);
    spectrum::Eigenpair ep = spectrum::approx_refine_eigenpair(fp, seeds.at(0), static_cast<double>(digits) + 10, eo);
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    if (!ep.converged) {
        std::printf("%s %ld failed: %s\n", method.c_str(), static_cast<long>(digits), ep.message.c_str());
        return 1;
    }
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    std::printf("%s %ld %ld %ld %.2f %.0f %ld %ld %s %s\n", method.c_str(), static_cast<long>(digits),
                static_cast<long>(fp.n), static_cast<long>(fp.prec), secs, static_cast<double>(ru.ru_maxrss) / 1024.0,
                static_cast<long>(fp.steps + ep.steps), static_cast<long>(fp.krylov_steps),
                ball::approx_decimal(fp.a, 25).c_str(), ball::approx_decimal(ep.lambda, 25).c_str());
    return 0;
}
