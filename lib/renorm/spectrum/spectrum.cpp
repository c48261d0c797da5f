#include <renorm/newton/detail/scaled.hpp>
#include <renorm/spectrum/spectrum.hpp>

#include <Spectra/GenEigsSolver.h>

#include <algorithm>
#include <climits>
#include <cmath>
#include <limits>
#include <memory>
#include <stdexcept>

namespace renorm::spectrum {

using namespace renorm::series;
using ball::BallVec;
using doubling::Linearization;
namespace detail = renorm::newton::detail;

std::string to_string(Kind k)
{
    switch (k) {
    case Kind::relevant:
        return "relevant";
    case Kind::coordinate_change:
        return "coordinate change";
    case Kind::irrelevant:
        return "irrelevant";
    }
    return "";
}

Kind approx_classify(std::complex<double> lambda, double alpha, double z, double tol, int* power)
{
    if (power)
        *power = 0;
    if (std::abs(lambda) > 1.0)
        return Kind::relevant;
    if (std::abs(lambda.imag()) <= tol * std::abs(lambda)) {
        for (int m = 1; m < 64; ++m) {
            const double t = std::pow(alpha, -z * m);
            if (t < 1e-300)
                break;
            if (std::fabs(lambda.real() - t) <= tol * t) {
                if (power)
                    *power = m;
                return Kind::coordinate_change;
            }
        }
    }
    return Kind::irrelevant;
}

std::vector<ApproxEigen> approx_eigenvalues_dense(const BallPoly& g, const doubling::Problem& problem,
                                                  slong m, slong prec)
{
    if (m < 2)
        throw std::invalid_argument("approx_eigenvalues_dense: m must be >= 2");
    BallPoly gm = truncated(g, std::max(m, g.length()));
    Linearization lin(gm, problem, m, prec);
    Eigen::MatrixXd dt = lin.approx_matrix(m, prec);
    // Q h = h - h(0) 1, with h(0) = sum_k h_k s0^k: Q = I - e_0 l0^T.
    Eigen::RowVectorXd l0(m);
    const double s0 = lin.s_at_zero().approx_double();
    for (slong k = 0; k < m; ++k)
        l0(k) = std::pow(s0, static_cast<double>(k));
    Eigen::MatrixXd q = Eigen::MatrixXd::Identity(m, m);
    q.row(0) -= l0;
    Eigen::EigenSolver<Eigen::MatrixXd> es(dt * q);
    if (es.info() != Eigen::Success)
        throw std::runtime_error("approx_eigenvalues_dense: the eigenvalue iteration failed");
    const double alpha = lin.a().approx_double();
    const double z = problem.order_ball(64).approx_double();
    std::vector<ApproxEigen> out;
    const double norm = dt.norm();
    for (slong i = 0; i < m; ++i) {
        ApproxEigen e;
        e.value = es.eigenvalues()(i);
        if (std::abs(e.value) <= 1e-13 * norm)
            continue;
        e.vector = es.eigenvectors().col(i);
        e.kind = approx_classify(e.value, alpha, z, 1e-6, &e.power);
        out.push_back(std::move(e));
    }
    std::sort(out.begin(), out.end(),
              [](const ApproxEigen& x, const ApproxEigen& y) { return std::abs(x.value) > std::abs(y.value); });
    // The eigenvalue 0 of Q's kernel may be resolved as a tiny nonzero number: drop anything
    // at the level of rounding relative to the largest.
    return out;
}

slong dense_eigen_cutoff = 200;

namespace {

/// x -> DT(G) Q x in double precision, for Spectra (rows, cols, perform_op).
class MatrixFreeDT {
public:
    using Scalar = double;
    MatrixFreeDT(const Linearization& lin, slong m, slong prec) : m_lin(lin), m_m(m), m_prec(prec)
    {
        const double s0 = lin.s_at_zero().approx_double();
        m_l0.resize(m);
        for (slong k = 0; k < m; ++k)
            m_l0[k] = std::pow(s0, static_cast<double>(k));
    }
    Eigen::Index rows() const { return m_m; }
    Eigen::Index cols() const { return m_m; }
    void perform_op(const double* x, double* y) const
    {
        // Q x = x - x(0) 1, x(0) = sum_k x_k s0^k
        double h0 = 0;
        for (slong k = 0; k < m_m; ++k)
            h0 += x[k] * m_l0[k];
        std::vector<double> qx(x, x + m_m);
        qx[0] -= h0;
        BallPoly h = from_doubles(qx.data(), m_m);
        BallPoly out = m_lin.apply(h, m_prec);
        for (slong k = 0; k < m_m; ++k)
            y[k] = out.coeff(k).approx_double();
    }

private:
    const Linearization& m_lin;
    slong m_m;
    slong m_prec;
    std::vector<double> m_l0;
};

} // namespace

std::vector<ApproxEigen> approx_eigenvalues_matfree(const BallPoly& g, const doubling::Problem& problem,
                                                    slong m, slong count, slong prec)
{
    if (m < 4 || count < 1)
        throw std::invalid_argument("approx_eigenvalues_matfree: need m >= 4 and count >= 1");
    count = std::min(count, m - 2);
    BallPoly gm = truncated(g, std::max(m, g.length()));
    Linearization lin(gm, problem, m, prec);
    MatrixFreeDT op(lin, m, prec);
    const slong ncv = std::min<slong>(m, std::max<slong>(2 * count + 1, 24));
    Spectra::GenEigsSolver<MatrixFreeDT> eigs(op, count, ncv);
    eigs.init();
    eigs.compute(Spectra::SortRule::LargestMagn, 1000, 1e-12);
    std::vector<ApproxEigen> out;
    if (eigs.info() != Spectra::CompInfo::Successful)
        return out;
    const Eigen::VectorXcd values = eigs.eigenvalues();
    const Eigen::MatrixXcd vectors = eigs.eigenvectors();
    const double alpha = lin.a().approx_double();
    const double z = problem.order_ball(64).approx_double();
    for (Eigen::Index i = 0; i < values.size(); ++i) {
        ApproxEigen e;
        e.value = values(i);
        e.vector = vectors.col(i);
        e.kind = approx_classify(e.value, alpha, z, 1e-6, &e.power);
        out.push_back(std::move(e));
    }
    std::sort(out.begin(), out.end(),
              [](const ApproxEigen& x, const ApproxEigen& y) { return std::abs(x.value) > std::abs(y.value); });
    return out;
}

std::vector<ApproxEigen> approx_eigenvalues(const BallPoly& g, const doubling::Problem& problem, slong m,
                                            slong count, slong prec)
{
    if (m <= dense_eigen_cutoff)
        return approx_eigenvalues_dense(g, problem, m, prec);
    return approx_eigenvalues_matfree(g, problem, m, count, prec);
}

Eigenpair approx_refine_eigenpair_chord(const newton::FixedPoint& fp, const ApproxEigen& seed,
                                        double digits, const EigenOptions& options)
{
    Eigenpair ep;
    if (std::fabs(seed.value.imag()) > 1e-12 * std::abs(seed.value)) {
        ep.message = "complex eigenvalues are not refined";
        return ep;
    }
    const doubling::Problem& problem = fp.problem;
    const double lambda0 = seed.value.real();
    const double rate = fp.decay_rate > 0.05 ? fp.decay_rate : 0.5;
    const slong n_final =
        std::min(fp.n, std::max(newton::approx_length_for_digits(digits + 5, rate), options.min_length));
    const slong m = std::min<slong>({options.jacobian_size, n_final, static_cast<slong>(seed.vector.size())});
    if (m < 2) {
        ep.message = "the seed eigenvector is too short";
        return ep;
    }

    // Normalisation index: the largest coefficient of the seed among the first m modes.
    Eigen::VectorXd h0 = seed.vector.real().head(m);
    Eigen::Index jstar = 0;
    h0.cwiseAbs().maxCoeff(&jstar);
    h0 /= h0(jstar);

    // Bordered chord matrix [[DT - lambda0 I, -h0], [e_j^T, 0]] in double.
    Eigen::PartialPivLU<Eigen::MatrixXd> lu;
    {
        BallPoly gm = truncated(fp.g, std::max(m, std::min(fp.g.length(), m)));
        Linearization lin(gm, problem, m, 128);
        Eigen::MatrixXd b = Eigen::MatrixXd::Zero(m + 1, m + 1);
        b.topLeftCorner(m, m) = lin.approx_matrix(m, 128) - lambda0 * Eigen::MatrixXd::Identity(m, m);
        b.block(0, m, m, 1) = -h0;
        b(m, jstar) = 1.0;
        lu.compute(b);
    }

    BallPoly h = from_doubles(h0.data(), m);
    Ball lambda(lambda0);
    double e = 0; // digits reached
    slong n = m;
    if (options.start && options.start->converged) {
        h = options.start->h;
        lambda = options.start->lambda;
        e = -options.start->log10_residual;
        n = std::min(n_final, std::max(n, options.start->n));
    }
    double gain = 10;
    double prev = std::numeric_limits<double>::infinity();
    slong stalls = 0;
    const double d_work = digits;
    std::unique_ptr<Linearization> lin;
    slong lin_prec = 0, lin_n = 0;
    for (slong step = 0; step < options.max_steps; ++step) {
        const double t = std::min(d_work, e + gain);
        n = std::min(n_final, std::max(n, newton::approx_length_for_digits(t, rate)));
        if (t >= d_work)
            n = n_final;
        const slong want_prec = ball::digits_to_bits(static_cast<slong>(std::ceil(t)) + 5) + 64;
        // Rebuild DT only when the precision must grow by half or the truncation grows.
        if (!lin || want_prec > lin_prec || n > lin_n) {
            lin_prec = std::max(want_prec, std::min<slong>(2 * lin_prec, ball::digits_to_bits(
                                                              static_cast<slong>(d_work) + 5) + 64));
            lin_n = std::min(n_final, std::max(n, newton::approx_length_for_digits(
                                                      ball::bits_to_digits(lin_prec - 64), rate)));
            lin = std::make_unique<Linearization>(truncated(fp.g, lin_n), problem, lin_n, lin_prec);
        }
        n = lin_n;
        const slong prec = lin_prec;
        h = truncated(h, n);
        // Phi = (DT h - lambda h, h_j - 1)
        BallPoly r = lin->apply(h, prec);
        BallPoly lh;
        arb_poly_scalar_mul(lh.get(), h.get(), lambda.get(), prec);
        arb_poly_sub(r.get(), r.get(), lh.get(), prec);
        arb_poly_truncate(r.get(), n);
        r = approx_midpoints(r);
        BallVec phi(n + 1);
        for (slong k = 0; k < n; ++k)
            arb_poly_get_coeff_arb(phi[k], r.get(), k);
        Ball hj = h.coeff(jstar);
        arb_sub_ui(phi[n], hj.get(), 1, prec);
        arb_get_mid_arb(phi[n], phi[n]);
        Ball rn = norm_l1(r, prec);
        const double res = detail::log10_upper(rn) - detail::log10_upper(norm_l1(h, prec));
        ep.log10_residual = res;
        ep.n = n;
        ep.prec = prec;
        ep.steps = step;
        if (options.progress)
            options.progress({"eigen", step, n, prec, res, problem.order});
        if (res <= -d_work && n >= n_final) {
            ep.converged = true;
            break;
        }
        if (res > prev - 0.5) {
            if (++stalls >= 4) {
                ep.message = "the eigenpair refinement stalled at residual 1e" +
                             std::to_string(static_cast<int>(res));
                break;
            }
        } else {
            stalls = 0;
            if (std::isfinite(prev))
                gain = std::clamp(prev - res, 3.0, 14.0);
        }
        prev = res;
        e = -res;
        // Correction: low modes and lambda from the bordered LU, high modes from -lambda0 I.
        const slong mm = std::min(m, n);
        Eigen::VectorXd x = Eigen::VectorXd::Zero(m + 1);
        BallVec low(m + 1);
        for (slong k = 0; k < mm; ++k)
            arb_set(low[k], phi[k]);
        arb_set(low[m], phi[n]);
        const slong ex = detail::max_exponent(low.data(), m + 1);
        BallVec corr(m + 1);
        if (ex > LONG_MIN / 4) {
            x = detail::to_scaled_doubles(low.data(), m + 1, ex);
            Eigen::VectorXd y = lu.solve(x);
            detail::from_scaled_doubles(corr.data(), y, ex);
        }
        for (slong k = 0; k < n; ++k) {
            Ball hk = h.coeff(k);
            if (k < mm) {
                arb_sub(hk.get(), hk.get(), corr[k], prec);
            } else {
                Ball d, ml(-lambda0);
                arb_div(d.get(), phi[k], ml.get(), prec);
                arb_sub(hk.get(), hk.get(), d.get(), prec);
            }
            h.set_coeff(k, hk);
        }
        h = approx_midpoints(h);
        arb_sub(lambda.get(), lambda.get(), corr[m], prec);
        arb_get_mid_arb(lambda.get(), lambda.get());
    }
    if (!ep.converged && ep.message.empty())
        ep.message = "the eigenpair refinement did not converge";
    ep.h = h;
    ep.lambda = lambda;
    return ep;
}

namespace {

/// Phi(h, lambda) = (DT h - lambda h, h_j - 1) = 0 for the Newton-Krylov driver, at a fixed
/// point G known to more digits than asked.
class EigenEquation final : public newton::KrylovProblem {
public:
    EigenEquation(const newton::FixedPoint& fp, slong jstar, double rate)
        : m_fp(fp), m_jstar(jstar), m_rate(rate)
    {
    }
    slong extras() const override { return 1; }
    slong length_for(double digits) const override
    {
        return std::min(m_fp.n, newton::approx_length_for_digits(digits, m_rate));
    }
    double residual(BallVec& f, const BallVec& x, slong n, slong prec) override
    {
        // DT at the residual's truncation and precision, kept while they do not change.
        if (!m_res_lin || m_res_n != n || m_res_prec != prec) {
            m_res_lin = std::make_unique<Linearization>(m_fp.g, m_fp.problem, n, prec);
            m_res_n = n;
            m_res_prec = prec;
        }
        BallPoly h = newton::krylov_series(x, n);
        BallPoly r = m_res_lin->apply(h, prec);
        BallPoly lh;
        arb_poly_scalar_mul(lh.get(), h.get(), x[n], prec);
        arb_poly_sub(r.get(), r.get(), lh.get(), prec);
        arb_poly_truncate(r.get(), n);
        r = approx_midpoints(r);
        f = newton::krylov_vector(r, n, 1);
        arb_sub_ui(f[n], x[m_jstar], 1, prec);
        arb_get_mid_arb(f[n], f[n]);
        return detail::log10_upper(norm_l1(r, prec)) - detail::log10_upper(norm_l1(h, prec));
    }
    void linearize(const BallVec& x, slong n, slong prec) override
    {
        m_lin = std::make_unique<Linearization>(m_fp.g, m_fp.problem, n, prec);
        m_h = newton::krylov_series(x, n);
        m_lambda = Ball(x[x.size() - 1]);
        m_n = n;
    }
    void apply(BallVec& y, const BallVec& v, slong prec) const override
    {
        // J (dh, dl) = (DT dh - lambda dh - h dl, dh_j)
        BallPoly dh = newton::krylov_series(v, m_n);
        BallPoly out = m_lin->apply(dh, prec);
        BallPoly t;
        arb_poly_scalar_mul(t.get(), dh.get(), m_lambda.get(), prec);
        arb_poly_sub(out.get(), out.get(), t.get(), prec);
        arb_poly_scalar_mul(t.get(), m_h.get(), v[m_n], prec);
        arb_poly_sub(out.get(), out.get(), t.get(), prec);
        arb_poly_truncate(out.get(), m_n);
        y = newton::krylov_vector(out, m_n, 1);
        arb_set(y[m_n], v[m_jstar]);
    }
    ball::BallMat small_jacobian(const BallVec& x, slong m, slong prec) const override
    {
        const slong n = x.size() - 1;
        Linearization lin(m_fp.g, m_fp.problem, m, prec);
        ball::BallMat dt = lin.matrix(prec);
        ball::BallMat j(m + 1, m + 1);
        for (slong r = 0; r < m; ++r) {
            for (slong c = 0; c < m; ++c)
                arb_set(j.entry(r, c), dt.entry(r, c));
            arb_sub(j.entry(r, r), j.entry(r, r), x[n], prec);
            if (r < n)
                arb_neg(j.entry(r, m), x[r]);
        }
        arb_one(j.entry(m, m_jstar));
        return j;
    }
    double tail_scale(const BallVec& x) const override
    {
        return -arf_get_d(arb_midref(x[x.size() - 1]), ARF_RND_NEAR);
    }

private:
    const newton::FixedPoint& m_fp;
    slong m_jstar;
    double m_rate;
    std::unique_ptr<Linearization> m_res_lin, m_lin;
    slong m_res_n = 0, m_res_prec = 0, m_n = 0;
    BallPoly m_h;
    Ball m_lambda;
};

} // namespace

Eigenpair approx_refine_eigenpair_krylov(const newton::FixedPoint& fp, const ApproxEigen& seed, double digits,
                                         const EigenOptions& options)
{
    Eigenpair ep;
    if (std::fabs(seed.value.imag()) > 1e-12 * std::abs(seed.value)) {
        ep.message = "complex eigenvalues are not refined";
        return ep;
    }
    const double rate = fp.decay_rate > 0.05 ? fp.decay_rate : 0.5;
    const slong m0 = std::min<slong>(static_cast<slong>(seed.vector.size()), fp.g.length());
    if (m0 < 2) {
        ep.message = "the seed eigenvector is too short";
        return ep;
    }
    // Normalisation index: the largest coefficient of the seed (the same rule as the chord
    // variant, so that both normalise the same way).
    const slong m = std::min<slong>(options.jacobian_size, m0);
    Eigen::VectorXd h0 = seed.vector.real().head(m);
    Eigen::Index jstar = 0;
    h0.cwiseAbs().maxCoeff(&jstar);
    h0 /= h0(jstar);

    EigenEquation eq(fp, static_cast<slong>(jstar), rate);
    newton::KrylovState s;
    if (options.resume) {
        s = *options.resume;
    } else if (options.start && options.start->converged) {
        s.n = options.start->n;
        s.x = newton::krylov_vector(options.start->h, s.n, 1);
        arb_set(s.x[s.n], options.start->lambda.get());
        s.digits = std::max(1.0, -options.start->log10_residual);
    } else {
        s.n = m;
        BallPoly hp = from_doubles(h0.data(), m);
        s.x = newton::krylov_vector(hp, m, 1);
        arb_set_d(s.x[m], seed.value.real());
        s.digits = 8; // a double eigenpair: the first residual tells the truth
    }
    newton::KrylovOptions ko;
    ko.guard_digits = 0; // `digits` already includes the caller's guard
    ko.min_length = std::min(options.min_length, fp.n);
    ko.min_steps = options.min_steps;
    ko.cycle = options.krylov_cycle;
    ko.max_newton = std::min<slong>(options.max_steps, 200);
    ko.progress = options.progress;
    ko.on_step = options.on_step;
    ko.stage = "eigen";
    ko.dense_inner = options.method == EigenMethod::dense;
    ko.order = fp.problem.order;
    newton::KrylovResult kr = newton::approx_newton_krylov(eq, std::move(s), digits, ko);
    ep.converged = kr.converged;
    ep.message = kr.message;
    ep.n = kr.state.n;
    ep.prec = kr.prec;
    ep.log10_residual = kr.log10_residual;
    ep.steps = kr.state.step;
    ep.h = newton::krylov_series(kr.state.x, kr.state.n);
    ep.lambda = Ball(kr.state.x[kr.state.n]);
    return ep;
}

Eigenpair approx_refine_eigenpair(const newton::FixedPoint& fp, const ApproxEigen& seed, double digits,
                                  const EigenOptions& options)
{
    return options.method == EigenMethod::chord ? approx_refine_eigenpair_chord(fp, seed, digits, options)
                                                : approx_refine_eigenpair_krylov(fp, seed, digits, options);
}

} // namespace renorm::spectrum
