#include <renorm/newton/detail/scaled.hpp>
#include <renorm/solve/solve.hpp>
#include <renorm/newton/collocation.hpp>
#include <renorm/spectrum/collocation.hpp>
#include <renorm/version.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <stdexcept>
#include <thread>
#include <type_traits>

#include <flint/flint.h>

namespace renorm::solve {

namespace detail = renorm::newton::detail;

namespace {

/// FLINT's thread count for the calling thread (thread-local in FLINT), set for one scope.
class FlintThreads {
public:
    explicit FlintThreads(int wanted) : saved_(flint_get_num_threads())
    {
        flint_set_num_threads(wanted > 0 ? wanted
                                         : static_cast<int>(std::max(1u, std::thread::hardware_concurrency())));
    }
    ~FlintThreads() { flint_set_num_threads(saved_); }
    FlintThreads(const FlintThreads&) = delete;
    FlintThreads& operator=(const FlintThreads&) = delete;

private:
    int saved_;
};

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
        const double n = static_cast<double>(c.n);
        // Newton-Krylov (newton/krylov.hpp): about 40 series of length n at prec bits, the GMRES
        // basis (up to 2 x 40 vectors at half the precision), and the preconditioner's block of
        // m = 3 q + 30 modes at q digits (three m x m ball matrices at once).
        const double dd = static_cast<double>(request.digits) + 10.0;
        const double q = 150.0 * std::pow(dd / 1000.0, dd < 1000 ? 1.0 : 0.4);
        const double m = std::min({n, 3.0 * q + 30.0, 1500.0});
        const double pc_bytes = (q + 10.0) * 3.33 / 8.0 + 56.0;
        c.bytes = 40.0 * n * limb_bytes + 80.0 * n * (limb_bytes / 2.0 + 24.0) + 3.0 * m * m * pc_bytes + 64e6;
        // bench/fast_vs_dense.sh at z = 2: 25.6 s at 1000 digits for one truncation, growing like
        // D^2 to 3000 and D^3.2 beyond (Krylov steps ~ D/q); the second truncation adds ~20%.
        c.seconds = (d < 3.0 ? 30.0 * d * d : 270.0 * std::pow(d / 3.0, 3.2)) * std::pow(1.24 / rate, 2.2);
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
    if (request.threads < 0 || request.threads > 256)
        throw std::invalid_argument("--threads must be between 0 (one per core) and 256, got " +
                                    std::to_string(request.threads));
    if (request.eigenvalues < 0 || request.eigenvalues > 50)
        throw std::invalid_argument("--eigenvalues must be between 0 and 50, got " +
                                    std::to_string(request.eigenvalues));
    if ((!request.checkpoint_path.empty() || request.resume) && choose_basis(request) != Basis::taylor)
        throw std::invalid_argument("checkpoints (--checkpoint, --resume) are supported for the Taylor basis "
                                    "only (z <= 6, or --basis taylor); z = " + request.order +
                                    " uses the Chebyshev basis");
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

std::vector<std::string> stage_names(const Request& request)
{
    std::vector<std::string> names{"fixed-point@N", "fixed-point@1.2N", "delta@N", "delta@1.2N"};
    for (slong k = 1; k <= request.eigenvalues; ++k) {
        names.push_back("eigenvalue-" + std::to_string(k) + "@N");
        names.push_back("eigenvalue-" + std::to_string(k) + "@1.2N");
    }
    return names;
}

namespace {

/// Every stage but the two fixed points solves an eigenpair (its unknowns end with the eigenvalue).
bool is_eigen_stage(const std::string& name)
{
    return name.rfind("fixed-point@", 0) != 0;
}

} // namespace

std::vector<StageStatus> checkpoint_status(const io::Checkpoint& c)
{
    Request q;
    q.eigenvalues = c.eigenvalues;
    std::vector<StageStatus> out;
    for (const std::string& name : stage_names(q)) {
        StageStatus s;
        s.name = name;
        auto finished = [&s](const auto& r, const Ball& value) {
            s.state = StageStatus::State::finished;
            s.n = r.n;
            s.prec = r.prec;
            s.log10_residual = r.log10_residual;
            s.value = ball::approx_decimal(value, 20);
        };
        if (auto it = c.fixed_points.find(name); it != c.fixed_points.end()) {
            finished(it->second, it->second.a);
        } else if (auto e = c.eigenpairs.find(name); e != c.eigenpairs.end()) {
            finished(e->second, e->second.lambda);
        } else if (name == c.running) {
            s.state = StageStatus::State::running;
            s.n = c.state.n;
            s.digits = c.state.digits;
            s.step = c.state.step;
            s.krylov_steps = c.state.krylov_total;
            s.target_n = c.state.n_final;
            if (c.state.f.size() > 0) {
                s.inner_steps = c.state.inner_steps;
                s.step_n = c.state.f.size() - (is_eigen_stage(name) ? 1 : 0);
                s.step_log10_residual = c.state.f_log10;
            }
        }
        out.push_back(std::move(s));
    }
    return out;
}

void check_resume(const Request& request, const io::Checkpoint& c)
{
    auto differs = [](const std::string& what, const std::string& saved, const std::string& asked) {
        throw std::invalid_argument("the checkpoint was written for " + what + " " + saved + ", this run asks for " +
                                    what + " " + asked + " (resume with the same request)");
    };
    if (c.order != request.order)
        differs("--order", c.order, request.order);
    if (c.digits != request.digits)
        differs("--digits", std::to_string(c.digits), std::to_string(request.digits));
    if (c.eigenvalues != request.eigenvalues)
        differs("--eigenvalues", std::to_string(c.eigenvalues), std::to_string(request.eigenvalues));
    if (c.basis != to_string(choose_basis(request)))
        differs("--basis", c.basis, to_string(choose_basis(request)));
    const std::vector<std::string> names = stage_names(request);
    auto known = [&](const std::string& name, bool eigen) {
        if (std::find(names.begin(), names.end(), name) == names.end() || is_eigen_stage(name) != eigen)
            throw std::invalid_argument("the checkpoint names a stage '" + name + "' that this run does not have");
    };
    for (const auto& [name, fp] : c.fixed_points)
        known(name, false);
    for (const auto& [name, ep] : c.eigenpairs)
        known(name, true);
    if (!c.running.empty()) {
        const bool eigen = is_eigen_stage(c.running);
        known(c.running, eigen);
        // The unknowns: n series coefficients, and the eigenvalue after them for an eigenpair.
        if (c.state.x.size() != c.state.n + (eigen ? 1 : 0))
            throw std::invalid_argument("the checkpoint's running stage '" + c.running + "' has " +
                                        std::to_string(c.state.x.size()) + " unknowns for truncation " +
                                        std::to_string(c.state.n));
    }
}

namespace {

constexpr double guard_digits = 10;

/// What a stage runs with: the saved state to continue from (or null), the per-step checkpoint
/// callback, and a progress callback labelled with the stage's name.
struct StageHooks {
    const newton::KrylovState* resume = nullptr;
    std::function<void(const newton::KrylovState&)> on_step;
    newton::ProgressFn progress;
};

/// The stages of one run and their checkpoint: a stage finished in the resumed checkpoint is
/// reused, the running one continues from its state, any other runs; every Newton step and every
/// finished stage is recorded (and written when the request names a file).
class Stages {
public:
    Stages(const Request& request, Basis basis)
        : m_request(request), m_start(std::chrono::steady_clock::now())
    {
        m_active = !request.checkpoint_path.empty() || request.resume || request.on_checkpoint;
        if (request.resume) {
            check_resume(request, *request.resume);
            m_ck = *request.resume;
        } else {
            m_ck.order = request.order;
            m_ck.digits = request.digits;
            m_ck.eigenvalues = request.eigenvalues;
            m_ck.basis = to_string(basis);
        }
        m_ck.version = renorm::version;
        m_ck.commit = renorm::git_commit;
    }

    /// fn(const StageHooks&) -> newton::FixedPoint or spectrum::Eigenpair.
    template <class Fn>
    auto run(const std::string& name, Fn&& fn)
    {
        using R = std::invoke_result_t<Fn, const StageHooks&>;
        auto& done = finished(static_cast<R*>(nullptr));
        if (auto it = done.find(name); it != done.end())
            return it->second;
        StageHooks h;
        if (m_request.resume && m_request.resume->running == name)
            h.resume = &m_request.resume->state;
        if (m_request.progress)
            h.progress = [this, name](const newton::Progress& p) {
                newton::Progress q = p;
                q.stage = name;
                m_request.progress(q);
            };
        if (m_active)
            h.on_step = [this, name](const newton::KrylovState& s) {
                m_ck.running = name;
                m_ck.state = s;
                save();
            };
        R r = fn(h);
        if (m_active && r.converged) {
            done[name] = r;
            m_ck.running.clear();
            m_ck.state = newton::KrylovState{};
            save();
        }
        return r;
    }

private:
    std::map<std::string, newton::FixedPoint>& finished(newton::FixedPoint*) { return m_ck.fixed_points; }
    std::map<std::string, spectrum::Eigenpair>& finished(spectrum::Eigenpair*) { return m_ck.eigenpairs; }

    void save()
    {
        // The seconds of earlier sittings plus this one's; unknown stays unknown.
        const double before = m_request.resume ? m_request.resume->seconds : 0.0;
        m_ck.seconds = before < 0 ? -1.0
                                  : before + std::chrono::duration<double>(std::chrono::steady_clock::now() -
                                                                           m_start).count();
        if (!m_request.checkpoint_path.empty())
            io::write_checkpoint(m_request.checkpoint_path, m_ck);
        if (m_request.on_checkpoint)
            m_request.on_checkpoint(m_ck);
    }

    const Request& m_request;
    std::chrono::steady_clock::time_point m_start;
    bool m_active = false;
    io::Checkpoint m_ck;
};

/// Fills res.eigenvalues from the seeds after delta, refining the real ones with `refine`
/// (called as refine(seed, digits, fine?, label) with label "eigenvalue-K").
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
            const std::string label = "eigenvalue-" + std::to_string(i);
            spectrum::Eigenpair c = refine(seeds[i], next_digits + guard_digits, false, label);
            spectrum::Eigenpair f = refine(seeds[i], next_digits + guard_digits, true, label);
            if (f.converged && c.converged) {
                rep.refined = make_estimate(f.lambda, c.lambda, next_digits);
                rep.is_refined = true;
            }
        }
        res.eigenvalues.push_back(std::move(rep));
    }
}

/// delta at both truncations (the shorter first: refine(seed, digits, at_fine, label) may start
/// the longer one from it), then the next eigenvalues; sets res.converged.
template <class Refine>
void finish_spectrum(Result& res, const Request& request, const std::vector<spectrum::ApproxEigen>& seeds,
                     Refine&& refine)
{
    if (seeds.empty() || seeds[0].kind != spectrum::Kind::relevant) {
        res.message = "no eigenvalue outside the unit disc was found";
        return;
    }
    const double dd = static_cast<double>(request.digits) + guard_digits;
    spectrum::Eigenpair d_coarse = refine(seeds[0], dd, false, "delta");
    spectrum::Eigenpair d_fine = refine(seeds[0], dd, true, "delta");
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
    // The continuation and the dense seeds are cheap and deterministic: a resumed run recomputes
    // them. The four kinds of Newton-Krylov stages go through `stages` (checkpoint and resume).
    Stages stages(request, Basis::taylor);
    newton::FixedPoint start = newton::approx_continuation(res.problem, 40, 192, request.progress);
    if (!start.converged) {
        res.message = start.message;
        return;
    }
    auto refine_fixed_point = [&](const newton::FixedPoint& from, slong min_length) {
        return [&from, min_length, &request](const StageHooks& h) {
            newton::RefineOptions ro;
            ro.progress = h.progress;
            ro.on_step = h.on_step;
            ro.resume = h.resume;
            ro.guard_digits = guard_digits;
            ro.min_length = min_length;
            ro.min_steps = min_length > 0 ? 1 : 0; // the second truncation is solved, not padded
            return newton::approx_refine(from, request.digits, ro);
        };
    };
    newton::FixedPoint coarse = stages.run("fixed-point@N", refine_fixed_point(start, 0));
    if (!coarse.converged) {
        res.message = coarse.message;
        return;
    }
    const slong n_fine = static_cast<slong>(std::ceil(1.2 * static_cast<double>(coarse.n)));
    newton::FixedPoint fine = stages.run("fixed-point@1.2N", refine_fixed_point(coarse, n_fine));
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
    auto refine = [&](const spectrum::ApproxEigen& seed, double digits, bool at_fine, const std::string& label) {
        auto run = [&](const StageHooks& h) {
            spectrum::EigenOptions o;
            o.progress = h.progress;
            o.on_step = h.on_step;
            o.resume = h.resume;
            if (!at_fine)
                return spectrum::approx_refine_eigenpair(coarse, seed, digits, o);
            o.min_length = fine.n;
            o.min_steps = 1;
            o.start = &last_coarse;
            return spectrum::approx_refine_eigenpair(fine, seed, digits, o);
        };
        if (!at_fine) {
            last_coarse = stages.run(label + "@N", run);
            return last_coarse;
        }
        return stages.run(label + "@1.2N", run);
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
    auto refine = [&](const spectrum::ApproxEigen& seed, double digits, bool at_fine, const std::string&) {
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
    const FlintThreads threads(request.threads);
    Result res;
    res.problem.order = request.order;
    res.basis = choose_basis(request);
    if (request.resume)
        check_resume(request, *request.resume);
    if (res.basis == Basis::taylor) {
        solve_taylor(request, res);
    } else {
        if (!request.checkpoint_path.empty() || request.resume)
            throw std::invalid_argument("checkpoints are supported for the Taylor basis only (z <= 6, or "
                                        "--basis taylor)");
        solve_chebyshev(request, res);
    }
    res.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    const double before = request.resume ? request.resume->seconds : 0.0;
    res.total_seconds = before < 0 ? -1.0 : before + res.seconds;
    return res;
}

} // namespace renorm::solve
