#include <renorm/newton/detail/scaled.hpp>
#include <renorm/newton/krylov.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace renorm::newton {

namespace {

/// Radii dropped: the iterations here are approximate, and radii would only grow.
void drop_radii(BallVec& v)
{
    for (slong i = 0; i < v.size(); ++i)
        mag_zero(arb_radref(v[i]));
}

Ball dot(const BallVec& a, const BallVec& b, slong prec)
{
    Ball out;
    arb_approx_dot(out.get(), nullptr, 0, a.data(), 1, b.data(), 1, a.size(), prec);
    return out;
}

Ball norm2(const BallVec& a, slong prec)
{
    Ball s = dot(a, a, prec);
    arb_sqrtpos(s.get(), s.get(), prec);
    arb_get_mid_arb(s.get(), s.get());
    return s;
}

/// a <- a + c b (midpoints).
void axpy(BallVec& a, const Ball& c, const BallVec& b, slong prec)
{
    for (slong i = 0; i < a.size(); ++i)
        arb_addmul(a[i], c.get(), b[i], prec);
    drop_radii(a);
}

/// x's series part cut or zero-padded from n_old to n_new coefficients, extras kept at the end.
BallVec resized(const BallVec& x, slong n_old, slong n_new, slong extras)
{
    BallVec out(n_new + extras);
    for (slong k = 0; k < std::min(n_old, n_new); ++k)
        arb_set(out[k], x[k]);
    for (slong e = 0; e < extras; ++e)
        arb_set(out[n_new + e], x[n_old + e]);
    return out;
}

double log10_of(const Ball& x)
{
    return detail::log10_upper(x);
}

slong bits_for(double digits)
{
    return ball::digits_to_bits(static_cast<slong>(std::ceil(std::max(digits, 1.0))) + 5) + 64;
}

/// The preconditioner block for q digits a Krylov step: m ~ 3q + 30 modes (DEVELOPERS.md),
/// between 8 and `limit`.
slong block_for(double q, slong limit)
{
    return std::clamp<slong>(static_cast<slong>(std::ceil(3.0 * q)) + 30, 8, limit);
}

/// Digits a relaxed Krylov product keeps beyond those the residual still needs (and its least).
constexpr double kRelaxGuardDigits = 20;

/// The relative cost of a step at truncation n and precision prec: a composition costs about
/// n prec^1.9 (bench/compose measures it).
double step_size(slong n, slong prec)
{
    return static_cast<double>(n) * std::pow(static_cast<double>(prec), 1.9);
}

/// The dense alternative to GMRES: delta = J^-1 b with J the problem's whole n x n (+ extras)
/// Jacobian, LU at prec. Returns 0 (no Krylov steps), or -1 when J is singular.
slong dense_solve(BallVec& delta, const KrylovProblem& problem, const BallVec& x, const BallVec& b, slong n,
                  slong prec)
{
    const slong len = n + problem.extras();
    BallMat j = problem.small_jacobian(x, n, prec);
    arb_mat_get_mid(j.get(), j.get());
    BallMat rhs(len, 1), sol(len, 1);
    for (slong i = 0; i < len; ++i)
        arb_set(rhs.entry(i, 0), b[i]);
    if (!arb_mat_approx_solve(sol.get(), j.get(), rhs.get(), prec))
        return -1;
    delta = BallVec(len);
    for (slong i = 0; i < len; ++i)
        arb_set(delta[i], sol.entry(i, 0));
    drop_radii(delta);
    return 0;
}

} // namespace

namespace detail {

bool preconditioner_improves(double pc_digits, slong pc_size, double q_want, slong m_want, double q_cap,
                             slong m_cap)
{
    const bool more_digits = q_want > pc_digits && q_want >= std::min(1.5 * pc_digits, q_cap);
    const bool more_modes = m_want > pc_size && q_want >= pc_digits &&
                            static_cast<double>(m_want) >= std::min(1.5 * static_cast<double>(pc_size),
                                                                    static_cast<double>(m_cap));
    return more_digits || more_modes;
}

} // namespace detail

BallPoly krylov_series(const BallVec& x, slong n)
{
    BallPoly p;
    arb_poly_fit_length(p.get(), n);
    for (slong k = 0; k < n; ++k)
        arb_set(p.get()->coeffs + k, x[k]);
    _arb_poly_set_length(p.get(), n);
    _arb_poly_normalise(p.get());
    return p;
}

BallVec krylov_vector(const BallPoly& p, slong n, slong extras)
{
    BallVec v(n + extras);
    for (slong k = 0; k < std::min(n, p.length()); ++k)
        arb_set(v[k], p.get()->coeffs + k);
    return v;
}

KrylovPreconditioner::KrylovPreconditioner(const KrylovProblem& problem, const BallVec& point, slong m,
                                           slong prec)
    : m_m(m), m_extras(problem.extras()), m_prec(prec), m_tail(problem.tail_scale(point)),
      m_lu(m + problem.extras(), m + problem.extras()), m_perm(static_cast<size_t>(m + problem.extras()))
{
    BallMat a = problem.small_jacobian(point, m, prec);
    arb_mat_get_mid(a.get(), a.get());
    if (!arb_mat_approx_lu(m_perm.data(), m_lu.get(), a.get(), prec))
        throw std::runtime_error("the preconditioner's Jacobian block is numerically singular");
}

void KrylovPreconditioner::apply(BallVec& y, const BallVec& v, slong n, slong prec) const
{
    const slong p = std::min(prec, m_prec);
    const slong mm = std::min(m_m, n);
    BallMat rhs(m_m + m_extras, 1), sol(m_m + m_extras, 1);
    for (slong k = 0; k < mm; ++k)
        arb_set(rhs.entry(k, 0), v[k]);
    for (slong e = 0; e < m_extras; ++e)
        arb_set(rhs.entry(m_m + e, 0), v[n + e]);
    arb_mat_approx_solve_lu_precomp(sol.get(), m_perm.data(), m_lu.get(), rhs.get(), p);
    y = BallVec(n + m_extras);
    for (slong k = 0; k < mm; ++k)
        arb_set(y[k], sol.entry(k, 0));
    for (slong e = 0; e < m_extras; ++e)
        arb_set(y[n + e], sol.entry(m_m + e, 0));
    Ball tail(m_tail);
    for (slong k = mm; k < n; ++k)
        arb_div(y[k], v[k], tail.get(), prec);
    drop_radii(y);
}

slong approx_fgmres(BallVec& delta, const BallVec& b, const FgmresApply& apply_j,
                    const std::function<void(BallVec&, const BallVec&)>& precondition, double rel_digits,
                    slong max_steps, slong restarts, slong prec, const FgmresCycle* resume,
                    const std::function<void(const FgmresCycle&)>& on_restart)
{
    const slong len = b.size();
    delta = resume ? resume->delta : BallVec(len);
    if (delta.size() != len)
        throw std::invalid_argument("approx_fgmres: the resumed correction has the wrong length");
    const double target = log10_of(norm2(b, prec)) - rel_digits;
    if (!std::isfinite(target))
        return 0; // b = 0: delta = 0
    slong total = resume ? resume->steps : 0;
    const double b_log10 = target + rel_digits;
    double gained = resume ? resume->gained : -1;
    for (slong restart = resume ? resume->restarts : 0; restart <= restarts; ++restart) {
        if (restart > 0 && on_restart && !(resume && restart == resume->restarts))
            on_restart(FgmresCycle{delta, restart, total, gained});
        BallVec r(len);
        if (restart == 0) {
            r = b;
        } else {
            BallVec jd;
            apply_j(jd, delta, prec);
            for (slong i = 0; i < len; ++i)
                arb_sub(r[i], b[i], jd[i], prec);
            drop_radii(r);
        }
        const Ball beta = norm2(r, prec);
        if (log10_of(beta) <= target)
            return total;
        const slong k_max = max_steps;
        std::vector<BallVec> v, z;
        v.reserve(static_cast<size_t>(k_max + 1));
        z.reserve(static_cast<size_t>(k_max));
        {
            BallVec v0 = r;
            for (slong i = 0; i < len; ++i)
                arb_div(v0[i], v0[i], beta.get(), prec);
            drop_radii(v0);
            v.push_back(std::move(v0));
        }
        // Hessenberg matrix (column j holds h_{0..j+1, j}), Givens rotations, rotated rhs.
        std::vector<std::vector<Ball>> h(static_cast<size_t>(k_max));
        std::vector<Ball> cs(static_cast<size_t>(k_max)), sn(static_cast<size_t>(k_max));
        std::vector<Ball> g(static_cast<size_t>(k_max + 1));
        g[0] = beta;
        slong k = 0;
        bool reached = false;
        for (slong j = 0; j < k_max; ++j) {
            BallVec zj, w;
            precondition(zj, v[static_cast<size_t>(j)]);
            // Inexact Krylov (relaxation): this product's error enters the correction times the
            // coefficient of z_j, which is at most about |g_j|, the residual still left; so it
            // needs only the digits from there down to the target (plus a guard), not all of
            // them. The later products of a long solve thus run at a fraction of prec.
            const double need = log10_of(g[static_cast<size_t>(j)]) - target + kRelaxGuardDigits;
            apply_j(w, zj, std::isfinite(need) ? std::min(prec, bits_for(std::max(need, kRelaxGuardDigits))) : prec);
            ++total;
            auto& col = h[static_cast<size_t>(j)];
            col.resize(static_cast<size_t>(j + 2));
            for (slong i = 0; i <= j; ++i) { // modified Gram-Schmidt
                col[static_cast<size_t>(i)] = dot(w, v[static_cast<size_t>(i)], prec);
                Ball mc;
                arb_neg(mc.get(), col[static_cast<size_t>(i)].get());
                axpy(w, mc, v[static_cast<size_t>(i)], prec);
            }
            const Ball wn = norm2(w, prec);
            col[static_cast<size_t>(j + 1)] = wn;
            for (slong i = 0; i < j; ++i) { // earlier rotations
                Ball a = col[static_cast<size_t>(i)], c = col[static_cast<size_t>(i + 1)], t1, t2;
                arb_mul(t1.get(), cs[static_cast<size_t>(i)].get(), a.get(), prec);
                arb_addmul(t1.get(), sn[static_cast<size_t>(i)].get(), c.get(), prec);
                arb_mul(t2.get(), cs[static_cast<size_t>(i)].get(), c.get(), prec);
                arb_submul(t2.get(), sn[static_cast<size_t>(i)].get(), a.get(), prec);
                arb_get_mid_arb(col[static_cast<size_t>(i)].get(), t1.get());
                arb_get_mid_arb(col[static_cast<size_t>(i + 1)].get(), t2.get());
            }
            { // the new rotation zeroes h_{j+1, j}
                Ball a = col[static_cast<size_t>(j)], c = col[static_cast<size_t>(j + 1)], rr;
                arb_hypot(rr.get(), a.get(), c.get(), prec);
                arb_get_mid_arb(rr.get(), rr.get());
                if (arb_is_zero(rr.get()))
                    break;
                arb_div(cs[static_cast<size_t>(j)].get(), a.get(), rr.get(), prec);
                arb_div(sn[static_cast<size_t>(j)].get(), c.get(), rr.get(), prec);
                arb_get_mid_arb(cs[static_cast<size_t>(j)].get(), cs[static_cast<size_t>(j)].get());
                arb_get_mid_arb(sn[static_cast<size_t>(j)].get(), sn[static_cast<size_t>(j)].get());
                col[static_cast<size_t>(j)] = rr;
                arb_zero(col[static_cast<size_t>(j + 1)].get());
                Ball gj = g[static_cast<size_t>(j)];
                arb_mul(g[static_cast<size_t>(j)].get(), cs[static_cast<size_t>(j)].get(), gj.get(), prec);
                arb_mul(g[static_cast<size_t>(j + 1)].get(), sn[static_cast<size_t>(j)].get(), gj.get(), prec);
                arb_neg(g[static_cast<size_t>(j + 1)].get(), g[static_cast<size_t>(j + 1)].get());
                arb_get_mid_arb(g[static_cast<size_t>(j)].get(), g[static_cast<size_t>(j)].get());
                arb_get_mid_arb(g[static_cast<size_t>(j + 1)].get(), g[static_cast<size_t>(j + 1)].get());
            }
            z.push_back(std::move(zj));
            k = j + 1;
            if (log10_of(g[static_cast<size_t>(j + 1)]) <= target || arb_is_zero(wn.get())) {
                reached = true;
                break;
            }
            for (slong i = 0; i < len; ++i)
                arb_div(w[i], w[i], wn.get(), prec);
            drop_radii(w);
            v.push_back(std::move(w));
        }
        // y = R^-1 g (back substitution), delta += Z y.
        std::vector<Ball> y(static_cast<size_t>(k));
        for (slong i = k - 1; i >= 0; --i) {
            Ball s = g[static_cast<size_t>(i)];
            for (slong l = i + 1; l < k; ++l)
                arb_submul(s.get(), h[static_cast<size_t>(l)][static_cast<size_t>(i)].get(),
                           y[static_cast<size_t>(l)].get(), prec);
            arb_div(y[static_cast<size_t>(i)].get(), s.get(), h[static_cast<size_t>(i)][static_cast<size_t>(i)].get(),
                    prec);
            arb_get_mid_arb(y[static_cast<size_t>(i)].get(), y[static_cast<size_t>(i)].get());
        }
        for (slong i = 0; i < k; ++i)
            axpy(delta, y[static_cast<size_t>(i)], z[static_cast<size_t>(i)], prec);
        if (reached)
            return total;
        gained = b_log10 - log10_of(g[static_cast<size_t>(k)]);
    }
    return -1;
}

KrylovResult approx_newton_krylov(KrylovProblem& problem, KrylovState state, double digits,
                                  const KrylovOptions& options)
{
    if (state.n < 1 || state.x.size() != state.n + problem.extras())
        throw std::invalid_argument("approx_newton_krylov: the start state has no iterate");
    KrylovResult res;
    const slong ex = problem.extras();
    const double d_work = digits + options.guard_digits;
    if (state.n_final == 0)
        state.n_final = std::max(problem.length_for(d_work), options.min_length);
    const double q_auto = 150.0 * std::pow(std::max(d_work, 1.0) / 1000.0, d_work < 1000 ? 1.0 : 0.4);
    const double q_cap =
        std::clamp(d_work / 4.0, 20.0, options.precond_digits > 0 ? options.precond_digits : q_auto);
    std::unique_ptr<KrylovPreconditioner> pc;
    if (state.pc_size > 0)
        pc = std::make_unique<KrylovPreconditioner>(problem, state.pc_point, state.pc_size, state.pc_prec);

    double prev = -std::numeric_limits<double>::infinity();
    slong stalls = 0;
    double seconds_per_size = 0; // measured cost model for the time estimate
    double measured_size = 0;    // the size of the step it was measured on
    for (; state.step < options.max_newton;) {
        const auto t_start = std::chrono::steady_clock::now();
        const double e = state.digits;
        double t = std::min(d_work, std::max(2.0 * e - 2.0, e + 4.0));
        if (t >= 0.9 * d_work) // the last steps share one truncation and precision (and so the
            t = d_work;        // eigen problem's DT, built once per truncation and precision)
        slong n = std::max(state.n, std::min(problem.length_for(t), state.n_final));
        if (t >= d_work)
            n = std::max(n, state.n_final);
        const slong prec = bits_for(t);
        BallVec x = resized(state.x, state.n, n, ex);
        BallVec f;
        // A state saved inside this step brings its residual (the same n and prec follow from
        // the same state) and GMRES's correction so far.
        const bool mid_step = state.f.size() > 0;
        if (mid_step && state.f.size() != n + ex)
            throw std::invalid_argument("approx_newton_krylov: the saved residual has length " +
                                        std::to_string(state.f.size()) + ", the step needs " +
                                        std::to_string(n + ex));
        const double r = mid_step ? state.f_log10 : problem.residual(f, x, n, prec);
        if (mid_step) {
            f = std::move(state.f);
            state.f = BallVec();
        }
        if (!std::isfinite(r)) {
            res.message = "Newton-Krylov: the residual is not finite at step " + std::to_string(state.step) +
                          " (n = " + std::to_string(n) + ")";
            break;
        }
        res.log10_residual = r;
        res.prec = prec;
        const double now = -r;
        if (options.progress) {
            // Time left: the steps still to come, sized like the one just measured. Not from
            // steps below 1% of the last one's size: their fixed costs (a preconditioner's LU)
            // dominate, and the estimate came out at thousands of hours at 10,000 digits.
            double left = -1;
            if (seconds_per_size > 0 &&
                measured_size >= 0.01 * step_size(state.n_final, bits_for(d_work))) {
                double tt = t, ee = std::min(t, 2.0 * now - 2.0), size = 0;
                for (int guard = 0; guard < 64 && ee < d_work; ++guard) {
                    tt = std::min(d_work, std::max(2.0 * ee - 2.0, ee + 4.0));
                    size += step_size(std::max(n, std::min(problem.length_for(tt), state.n_final)), bits_for(tt));
                    ee = tt;
                }
                size += step_size(state.n_final, bits_for(d_work)); // the confirming residual
                left = size * seconds_per_size;
            }
            options.progress({options.stage, state.step, n, prec, r, options.order, left,
                              res.krylov_steps.empty() ? -1 : res.krylov_steps.back()});
        }
        if (now >= d_work && n >= state.n_final && state.step >= options.min_steps) {
            if (problem.long_enough(x, n, d_work)) {
                state.x = std::move(x);
                state.n = n;
                state.digits = now;
                res.converged = true;
                break;
            }
            state.n_final = static_cast<slong>(std::ceil(1.25 * static_cast<double>(n)));
            state.x = std::move(x);
            state.n = n;
            continue;
        }
        if (now < prev + 0.5) {
            if (++stalls >= 3) {
                res.message = "Newton-Krylov stalled at residual 1e" + std::to_string(static_cast<int>(r)) +
                              " (n = " + std::to_string(n) + ", " + std::to_string(prec) + " bits)";
                break;
            }
        } else {
            stalls = 0;
        }
        prev = now;

        // The preconditioner: built at this iterate when none exists or when a much better one
        // (more digits, or a larger block now that the truncation has grown) is worth it. It
        // needs no more digits than this step's correction.
        const double k_rel = std::max(3.0, t - now + 3.0);
        const double q_want = std::min({now, q_cap, k_rel + 10.0});
        const slong m_want = block_for(q_want, std::min(options.precond_max, n));
        const slong m_cap = block_for(q_cap, options.precond_max);
        if (!pc || detail::preconditioner_improves(state.pc_digits, state.pc_size, q_want, m_want, q_cap, m_cap)) {
            state.pc_size = m_want;
            state.pc_prec = bits_for(q_want + 10);
            // Kept at the preconditioner's own precision: all it is used at, and a small
            // checkpoint (a resumed run rebuilds the same LU from it).
            state.pc_point = BallVec(x.size());
            for (slong i = 0; i < x.size(); ++i)
                arb_set_round(state.pc_point[i], x[i], state.pc_prec);
            state.pc_digits = q_want;
            pc = std::make_unique<KrylovPreconditioner>(problem, state.pc_point, state.pc_size, state.pc_prec);
        }

        // The correction needs t - now digits relative, on the modes where the residual exceeds
        // 10^-t (beyond them the tail rule is accurate enough). Modes the truncation has just
        // added carry residuals of the size of G's coefficients there, so the last such index
        // is read off the residual, not predicted.
        slong n_in = std::min(pc->size(), n);
        for (slong k = n - 1; k >= n_in; --k)
            if (detail::log10_upper(Ball(f[k])) > -(t + 2.0)) {
                n_in = k + 1;
                break;
            }
        const slong p_in = bits_for(k_rel);
        problem.linearize(x, n_in, p_in);
        BallVec b = resized(f, n, n_in, ex);
        BallVec d_in;
        // Restart cycles of bounded work (a checkpoint at each), the same total budget of steps.
        const slong cycle = options.cycle > 0 ? options.cycle : std::clamp<slong>(
            static_cast<slong>(options.restart_work / (static_cast<double>(n_in) * static_cast<double>(p_in))),
            std::min<slong>(6, options.max_krylov), options.max_krylov);
        const slong budget = options.max_krylov * (options.max_restarts + 1);
        const slong cycles = (budget + cycle - 1) / cycle;
        FgmresCycle saved;
        if (mid_step) {
            saved = FgmresCycle{std::move(state.inner), state.inner_restarts, state.inner_steps};
            state.inner = BallVec();
        }
        auto on_restart = [&](const FgmresCycle& c) {
            if (options.progress) {
                Progress p{options.stage, state.step, n, prec, r, options.order, -1, -1};
                p.krylov_running = c.steps;
                p.krylov_gained = c.gained;
                p.krylov_needed = k_rel;
                options.progress(p);
            }
            if (!options.on_step)
                return;
            state.f = f;
            state.f_log10 = r;
            state.inner = c.delta;
            state.inner_restarts = c.restarts;
            state.inner_steps = c.steps;
            options.on_step(state);
            state.f = BallVec();
            state.inner = BallVec();
            state.inner_restarts = state.inner_steps = 0;
            state.f_log10 = 0;
        };
        const slong ks = options.dense_inner ? dense_solve(d_in, problem, x, b, n_in, p_in) : approx_fgmres(
            d_in, b, [&](BallVec& y, const BallVec& v, slong p) { problem.apply(y, v, p); },
            [&](BallVec& y, const BallVec& v) { pc->apply(y, v, n_in, p_in); }, k_rel, cycle,
            cycles - 1, p_in, mid_step ? &saved : nullptr, on_restart);
        if (ks < 0 && options.dense_inner) {
            res.message = "Newton: the dense Jacobian is numerically singular at step " + std::to_string(state.step);
            break;
        }
        if (ks < 0) {
            res.message = "Newton-Krylov: GMRES did not reach 1e-" + std::to_string(static_cast<int>(k_rel)) +
                          " in " + std::to_string(cycle * cycles) +
                          " steps at Newton step " + std::to_string(state.step);
            break;
        }
        res.krylov_steps.push_back(ks);
        // delta: GMRES on the first n_in modes, the tail scale beyond (those components are
        // below 10^-t; the tail rule only keeps them from being left at F).
        BallVec delta = resized(d_in, n_in, n, ex);
        Ball tail(problem.tail_scale(x));
        for (slong k = n_in; k < n; ++k)
            arb_div(delta[k], f[k], tail.get(), prec);
        for (slong i = 0; i < n + ex; ++i)
            arb_sub(x[i], x[i], delta[i], prec);
        drop_radii(x);
        state.x = std::move(x);
        state.n = n;
        state.digits = std::max(now + 3.0, std::min(t, 2.0 * now - 2.0));
        state.krylov_total += ks;
        ++state.step;
        const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_start).count();
        measured_size = step_size(n, prec);
        seconds_per_size = secs / measured_size;
        if (options.on_step)
            options.on_step(state);
    }
    if (!res.converged && res.message.empty())
        res.message = "Newton-Krylov did not converge in " + std::to_string(options.max_newton) + " steps";
    res.state = std::move(state);
    return res;
}

} // namespace renorm::newton
