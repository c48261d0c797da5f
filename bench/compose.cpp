// Times the two composition variants, series::compose_arb (Taylor shift + Arb's
// arb_poly_compose_series) and series::compose_graded (blocks at the length and precision their
// size needs), on random series with geometrically decaying coefficients: f_k ~ 2^(-4k) (about
// 1.2 decimal digits a term, as the fixed point G at z = 2) and h_k ~ 2^(-4k-1), at n = 0.83 D and
// prec = 3.33 D + 100 bits for D decimal digits (the sizes of the solver's final compositions).
// A second row per D ("inner 0.87") keeps f but takes an inner map like the solver's v on its disc:
// h = 0.4 + 0.6 s + sum_(k>=2) h_k s^k with |h_k| <= 0.25 * 2^(-4(k-2)), so ||h - h(0)|| ~ 0.87
// (0.90 at the fixed point for z = 2) and the blocks shrink only as fast as f decays. A third row
// ("flat") takes f without decay (|f_k| <= 1, as a direction the derivative DT is applied to) with
// the same inner map: nothing can be graded there, so it shows the cost of trying.
// Prints a Markdown table. Reproduces the numbers in DEVELOPERS.md ("Why compositions are computed
// as they are"). Usage: renorm_bench_compose [D ...]   (default 300 1000 2000)
#include <renorm/series/compose_graded.hpp>
#include <renorm/series/series.hpp>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

using namespace renorm;
using ball::Ball;
using ball::BallPoly;

namespace {
BallPoly random_decaying(flint_rand_t st, slong len, slong bits_per_term, slong offset, slong prec)
{
    BallPoly p;
    for (slong k = 0; k < len; ++k) {
        Ball x;
        arb_urandom(x.get(), st, prec);
        arb_mul_2exp_si(x.get(), x.get(), -bits_per_term * k - offset);
        if (k % 3 == 1)
            arb_neg(x.get(), x.get());
        p.set_coeff(k, x);
    }
    return p;
}
// log2 of sum_k rad(p_k): the radius in the l1 norm the solver works in.
double log2_l1_radius(const BallPoly& p)
{
    mag_t r;
    mag_init(r);
    for (slong k = 0; k < p.length(); ++k)
        mag_add(r, r, arb_radref(p.get()->coeffs + k));
    const double l = mag_get_d_log2_approx(r);
    mag_clear(r);
    return l;
}
// max over k of log2(rad(b_k) / rad(a_k)): how much wider b is coefficient by coefficient.
double log2_worst_radius_ratio(const BallPoly& a, const BallPoly& b)
{
    double worst = -1e300;
    for (slong k = 0; k < a.length() && k < b.length(); ++k) {
        const double ra = mag_get_d_log2_approx(arb_radref(a.get()->coeffs + k));
        const double rb = mag_get_d_log2_approx(arb_radref(b.get()->coeffs + k));
        worst = std::max(worst, rb - ra);
    }
    return worst;
}
BallPoly solver_like_inner(flint_rand_t st, slong len, slong prec)
{
    BallPoly p = random_decaying(st, len, 4, 0, prec);
    arb_poly_shift_left(p.get(), p.get(), 2);
    arb_poly_scalar_mul_2exp_si(p.get(), p.get(), -2);
    arb_poly_truncate(p.get(), len);
    p.set_coeff(0, Ball(0.4));
    p.set_coeff(1, Ball(0.6));
    return p;
}
template <class Fn> double seconds(Fn&& fn)
{
    const auto t0 = std::chrono::steady_clock::now();
    fn();
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}
} // namespace

int main(int argc, char **argv)
{
    std::vector<slong> ds;
    for (int a = 1; a < argc; ++a)
        ds.push_back(std::atol(argv[a]));
    if (ds.empty())
        ds = {300, 1000, 2000};
    flint_rand_t st;
    flint_randinit(st);
    std::printf(
        "| D | f | inner | n | prec | Arb compose (s) | graded (s) | ratio | log2 l1 rad Arb | "
        "log2 l1 rad graded | worst coeff rad ratio (log2) | overlap |\n"
        "|---:|---|---|---:|---:|---:|---:|---:|---:|---:|---:|:---:|\n");
    for (slong d : ds) {
        const slong n = (83 * d) / 100;
        const slong prec = (333 * d) / 100 + 100;
        BallPoly f = random_decaying(st, n, 4, 0, prec);
        BallPoly flat = random_decaying(st, n, 0, 0, prec);
        for (int inner = 0; inner < 3; ++inner) {
            BallPoly h =
                inner == 0 ? random_decaying(st, n, 4, 1, prec) : solver_like_inner(st, n, prec);
            const BallPoly& outer = inner == 2 ? flat : f;
            BallPoly a, g;
            const double ta = seconds([&] { a = series::compose_arb(outer, h, n, prec); });
            const double tg = seconds([&] { g = series::compose_graded(outer, h, n, prec); });
            bool ok = a.length() == g.length();
            for (slong k = 0; ok && k < a.length(); ++k)
                ok = arb_overlaps(a.get()->coeffs + k, g.get()->coeffs + k) != 0;
            std::printf(
                "| %ld | %s | %s | %ld | %ld | %.3f | %.3f | %.2f | %.1f | %.1f | %.1f | %s |\n",
                static_cast<long>(d), inner == 2 ? "flat" : "2^-4k",
                inner == 0 ? "2^-4k-1" : "0.87", static_cast<long>(n), static_cast<long>(prec), ta,
                tg, ta / tg, log2_l1_radius(a), log2_l1_radius(g), log2_worst_radius_ratio(a, g),
                ok ? "yes" : "NO");
            std::fflush(stdout);
        }
    }
    flint_randclear(st);
    return 0;
}
