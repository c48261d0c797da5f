#include <renorm/newton/detail/scaled.hpp>
#include <renorm/solve/solve.hpp>
#include <renorm/newton/collocation.hpp>
#include <renorm/spectrum/collocation.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <stdexcept>

namespace renorm::solve {

namespace detail = renorm::newton::detail;

namespace {

/// Rough coefficient decay (digits per term) for an order z, from measurements on this disc
/// (DEVELOPERS.md): 1.24 at z = 2, 0.63 at z = 4, 0.43 at z = 6. Only sizes the cost estimate.
double guess_rate(double z)
{
    return std::clamp(2.5 / z, 0.1, 1.6);
}

Estimate make_estimate(const Ball& fine, const Ball& coarse, slong requested)
{
    Estimate e;
    e.value = fine;
    const slong cap = ball::bits_to_digits(arf_bits(arb_midref(fine.get())) + 64) + 10;
    e.stable_digits = approx_agreeing_digits(fine, coarse, cap);
    Ball d;
    arb_sub(d.get(), fine.get(), coarse.get(), 64);
    e.log10_error = detail::log10_upper(d);
    const slong shown = std::min(e.stable_digits, requested);
    if (shown >= 1)
        e.text = ball::approx_decimal(fine, shown);
    return e;
}

} // namespace

slong approx_agreeing_digits(const Ball& x, const Ball& y, slong cap)
{
    Ball d;
    arb_sub(d.get(), x.get(), y.get(), ARF_PREC_EXACT);
    arb_get_mid_arb(d.get(), d.get());
    if (arb_is_zero(d.get()))
        return cap;
    const double ld = detail::log10_upper(d) - detail::log10_upper(x);
    return std::clamp<slong>(static_cast<slong>(std::floor(-ld)), 0, cap);
}

Cost estimate_cost(const Request& request)
{
    Cost c;
    auto z = ball::from_string(request.order, 64);
    const double zd = z ? z->approx_double() : 2.0;
    c.prec = ball::digits_to_bits(request.digits + 15) + 64;
    const double limb_bytes = static_cast<double>(c.prec) / 8.0 + 48.0;
    const double d = static_cast<double>(request.digits) / 1000.0;
    if (choose_basis(request) == Basis::taylor) {
        const double rate = guess_rate(zd);
        c.n = newton::approx_length_for_digits(static_cast<double>(request.digits) * 1.2 + 10, rate);
        // About 40 series of length n at prec bits live at once (T, DT and their factors), and a
        // dense double Jacobian of size min(n, 320).
        const double m = std::min<double>(static_cast<double>(c.n), 320.0);
        c.bytes = 40.0 * static_cast<double>(c.n) * limb_bytes + 3.0 * m * m * 8.0 + 64e6;
        // Fitted to bench/solve_scaling.sh at z = 2: ~90 s at 1000 digits, growing like D^3.2.
        c.seconds = 90.0 * std::pow(d, 3.2) * std::pow(1.24 / rate, 2.2);
    } else {
        // Chebyshev coefficients decay about 2.2 / sqrt(z) digits a term (measured at z = 2, 16,
        // 24, 32); four dense n x n ball matrices live at once.
        const double rate = 2.2 / std::sqrt(zd);
        c.n = newton::approx_length_for_digits(static_cast<double>(request.digits) * 1.2 + 10, rate);
        const double n = static_cast<double>(c.n);
        c.bytes = 4.0 * n * n * limb_bytes + 64e6;
        // About 12 LU factorisations of n^3/3 products at ~(prec/64)^1.6 * 10 ns each.
        c.seconds = 12.0 * n * n * n / 3.0 * 1e-8 * std::pow(static_cast<double>(c.prec) / 64.0, 1.6);
    }
    return c;
}

void validate(const Request& request, double memory_limit_bytes)
{
    auto z = ball::from_string(request.order, 128);
    if (!z || !z->is_finite())
        throw std::invalid_argument("--order must be a finite number greater than 1, got '" +
                                    request.order + "'");
    Ball one(slong{1});
    if (!arb_gt(z->get(), one.get()))
        throw std::invalid_argument("--order must be greater than 1 (accepted: 1 < z <= 64), got " +
                                    request.order);
    if (z->approx_double() > 64.0)
        throw std::invalid_argument("--order above 64 is not supported (accepted: 1 < z <= 64), got " +
                                    request.order);
    if (request.digits < 1)
        throw std::invalid_argument("--digits must be at least 1, got " + std::to_string(request.digits));
    if (request.eigenvalues < 0 || request.eigenvalues > 50)
        throw std::invalid_argument("--eigenvalues must be between 0 and 50, got " +
                                    std::to_string(request.eigenvalues));
    Cost c = estimate_cost(request);
    if (c.bytes > memory_limit_bytes) {
        char buf[256];
        std::snprintf(buf, sizeof buf,
                      "--digits %ld would need about %.1f GB of memory (N = %ld coefficients at %ld "
                      "bits) but %.1f GB are available; ask for fewer digits",
                      static_cast<long>(request.digits), c.bytes / 1e9, static_cast<long>(c.n),
                      static_cast<long>(c.prec), memory_limit_bytes / 1e9);
        throw std::invalid_argument(buf);
    }
}

std::string to_string(Basis b)
{
    switch (b) {
    case Basis::automatic:
        return "automatic";
    case Basis::taylor:
        return "taylor";
    case Basis::chebyshev:
        return "chebyshev";
    }
    return "";
}

namespace {

constexpr double guard_digits = 10;

/// Fills res.eigenvalues from the seeds after delta, refining the real ones with `refine`
/// (called as refine(seed, digits, fine?)).
template <class Refine>
void report_next_eigenvalues(Result& res, const std::vector<spectrum::ApproxEigen>& seeds, slong count,
                             slong digits, Refine&& refine)
{
    const slong next_digits = std::min<slong>(digits, 30);
    for (size_t i = 1; i < seeds.size() && static_cast<slong>(i) <= count; ++i) {
        EigenvalueReport rep;
        rep.approx = seeds[i].value;
        rep.kind = seeds[i].kind;
        rep.power = seeds[i].power;
        if (std::fabs(rep.approx.imag()) <= 1e-12 * std::abs(rep.approx)) {
            spectrum::Eigenpair c = refine(seeds[i], next_digits + guard_digits, false);
            spectrum::Eigenpair f = refine(seeds[i], next_digits + guard_digits, true);
            if (f.converged && c.converged) {
                rep.refined = make_estimate(f.lambda, c.lambda, next_digits);
                rep.is_refined = true;
            }
        }
        res.eigenvalues.push_back(std::move(rep));
    }
}

/// delta at both truncations (the shorter first: refine(seed, digits, at_fine) may start the
/// longer one from it), then the next eigenvalues; sets res.converged.
template <class Refine>
void finish_spectrum(Result& res, const Request& request, const std::vector<spectrum::ApproxEigen>& seeds,
                     Refine&& refine)
{
    if (seeds.empty() || seeds[0].kind != spectrum::Kind::relevant) {
        res.message = "no eigenvalue outside the unit disc was found";
        return;
    }
    const double dd = static_cast<double>(request.digits) + guard_digits;
    spectrum::Eigenpair d_coarse = refine(seeds[0], dd, false);
    spectrum::Eigenpair d_fine = refine(seeds[0], dd, true);
    if (!d_fine.converged || !d_coarse.converged) {
        res.message = "delta: " + (d_fine.converged ? d_coarse.message : d_fine.message);
        return;
    }
    res.delta = make_estimate(d_fine.lambda, d_coarse.lambda, request.digits);
    report_next_eigenvalues(res, seeds, request.eigenvalues, request.digits, refine);
    res.converged = true;
}

void solve_taylor(const Request& request, Result& res)
{
    newton::FixedPoint start = newton::approx_continuation(res.problem, 40, 192, request.progress);
    if (!start.converged) {
        res.message = start.message;
        return;
    }
    newton::RefineOptions ro;
    ro.progress = request.progress;
    ro.guard_digits = guard_digits;
    newton::FixedPoint coarse = newton::approx_refine(start, request.digits, ro);
    if (!coarse.converged) {
        res.message = coarse.message;
        return;
    }
    ro.min_length = static_cast<slong>(std::ceil(1.2 * static_cast<double>(coarse.n)));
    newton::FixedPoint fine = newton::approx_refine(coarse, request.digits, ro);
    if (!fine.converged) {
        res.message = fine.message;
        return;
    }
    fine.decay_rate = start.decay_rate;
    coarse.decay_rate = start.decay_rate;
    res.fixed_point = fine;
    res.coefficients = fine.g;
    res.n = coarse.n;
    res.n_check = fine.n;
    res.prec = fine.prec;
    res.log10_residual = fine.log10_residual;
    res.alpha = make_estimate(fine.a, coarse.a, request.digits);

    const slong m = std::min<slong>(fine.g.length(), 80);
    std::vector<spectrum::ApproxEigen> seeds = spectrum::approx_eigenvalues_dense(fine.g, res.problem, m, 128);
    // The eigenpair at the longer truncation starts from the one at the shorter truncation, so
    // that it needs only the steps that the extra coefficients call for.
    spectrum::Eigenpair last_coarse;
    auto refine = [&](const spectrum::ApproxEigen& seed, double digits, bool at_fine) {
        spectrum::EigenOptions o;
        o.progress = request.progress;
        if (!at_fine) {
            last_coarse = spectrum::approx_refine_eigenpair(coarse, seed, digits, o);
            return last_coarse;
        }
        o.min_length = fine.n;
        o.start = &last_coarse;
        return spectrum::approx_refine_eigenpair(fine, seed, digits, o);
    };
    finish_spectrum(res, request, seeds, refine);
}

void solve_chebyshev(const Request& request, Result& res)
{
    newton::CollocationFixedPoint start =
        newton::approx_collocation_continuation(request.order, 40, 192, request.progress);
    if (!start.converged) {
        res.message = start.message;
        return;
    }
    newton::CollocationFixedPoint coarse =
        newton::approx_collocation_refine(start, request.digits, guard_digits, 0, request.progress);
    if (!coarse.converged) {
        res.message = coarse.message;
        return;
    }
    const slong n2 = static_cast<slong>(std::ceil(1.2 * static_cast<double>(coarse.n)));
    newton::CollocationFixedPoint fine =
        newton::approx_collocation_refine(coarse, request.digits, guard_digits, n2, request.progress);
    if (!fine.converged) {
        res.message = fine.message;
        return;
    }
    res.coefficients = fine.c;
    res.n = coarse.n;
    res.n_check = fine.n;
    res.prec = fine.prec;
    res.log10_residual = fine.log10_residual;
    res.alpha = make_estimate(fine.a, coarse.a, request.digits);
    std::vector<spectrum::ApproxEigen> seeds = spectrum::approx_collocation_eigenvalues(fine, 80);
    auto refine = [&](const spectrum::ApproxEigen& seed, double digits, bool at_fine) {
        return spectrum::approx_collocation_eigenpair(at_fine ? fine : coarse, seed, digits);
    };
    finish_spectrum(res, request, seeds, refine);
}

} // namespace

Basis choose_basis(const Request& request)
{
    if (request.basis != Basis::automatic)
        return request.basis;
    auto z = ball::from_string(request.order, 64);
    return (z && z->approx_double() <= 6.0) ? Basis::taylor : Basis::chebyshev;
}

Result solve_constants(const Request& request)
{
    const auto t0 = std::chrono::steady_clock::now();
    Result res;
    res.problem.order = request.order;
    res.basis = choose_basis(request);
    if (res.basis == Basis::taylor)
        solve_taylor(request, res);
    else
        solve_chebyshev(request, res);
    res.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    return res;
}

} // namespace renorm::solve
