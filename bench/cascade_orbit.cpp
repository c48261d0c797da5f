// Cost of the orbit pass F_n(mu), dF_n/dmu per step, against precision and family.
#include <renorm/cascade/cascade.hpp>

#include <benchmark/benchmark.h>

using namespace renorm;
using namespace renorm::cascade;

namespace {

void orbit(benchmark::State& state, const char* name, double mu)
{
    const slong prec = state.range(0);
    const slong n = 12;
    Family f = make_builtin_family(name);
    ball::Ball c = critical_point(f, prec).c;
    ball::Ball m(mu);
    for (auto _ : state) {
        ReturnMap r = superstable_return(f, c, n, m, prec);
        benchmark::DoNotOptimize(r.F.get());
    }
    state.SetItemsProcessed(state.iterations() * (int64_t(1) << n));
}

} // namespace

BENCHMARK_CAPTURE(orbit, quadratic, "quadratic", 1.4011551)->Arg(128)->Arg(192)->Arg(256)->Arg(320);
BENCHMARK_CAPTURE(orbit, logistic, "logistic", 3.5699456)->Arg(128)->Arg(256);
BENCHMARK_CAPTURE(orbit, cubic, "cubic", 1.6148569)->Arg(128)->Arg(256);
BENCHMARK_CAPTURE(orbit, sine, "sine", 0.8655792)->Arg(128)->Arg(256);
