#include <renorm/newton/detail/dense_solve.hpp>
#include <renorm/newton/detail/scaled.hpp>
#include <renorm/spectrum/collocation.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace renorm::spectrum {

using ball::BallMat;
using ball::BallVec;
namespace detail = renorm::newton::detail;


std::vector<ApproxEigen> approx_collocation_eigenvalues(const newton::CollocationFixedPoint& fp, slong m)
{
    m = std::min(m, fp.n);
    BallMat dm(m, m), cm(m, m);
    if (!newton::collocation_dt_matrices(dm, cm, fp, m, 128))
        throw std::runtime_error("the doubling operator is undefined at the fixed point");
    Eigen::MatrixXd md(m, m), cd(m, m);
    for (slong i = 0; i < m; ++i)
        for (slong k = 0; k < m; ++k) {
            md(i, k) = arf_get_d(arb_midref(dm.entry(i, k)), ARF_RND_NEAR);
            cd(i, k) = arf_get_d(arb_midref(cm.entry(i, k)), ARF_RND_NEAR);
        }
    // The operator on coefficients, A = C^-1 M, composed with Q h = h - h(0); h(0) = sum c_k (-1)^k.
    Eigen::MatrixXd a = cd.partialPivLu().solve(md);
    Eigen::MatrixXd q = Eigen::MatrixXd::Identity(m, m);
    for (slong k = 0; k < m; ++k)
        q(0, k) -= (k % 2 ? -1.0 : 1.0);
    Eigen::EigenSolver<Eigen::MatrixXd> es(a * q);
    const double alpha = fp.a.approx_double();
    const double z = doubling::order_ball(fp.order, 64).approx_double();
    std::vector<ApproxEigen> out;
    const double norm = a.norm();
    for (slong i = 0; i < m; ++i) {
        ApproxEigen e;
        e.value = es.eigenvalues()(i);
        if (std::abs(e.value) <= 1e-12 * norm)
            continue;
        e.vector = es.eigenvectors().col(i);
        e.kind = approx_classify(e.value, alpha, z, 1e-6, &e.power);
        out.push_back(std::move(e));
    }
    std::sort(out.begin(), out.end(), [](const auto& x, const auto& y) { return std::abs(x.value) > std::abs(y.value); });
    return out;
}

Eigenpair approx_collocation_eigenpair(const newton::CollocationFixedPoint& fp, const ApproxEigen& seed,
                                                 double digits)
{
    Eigenpair ep;
    if (std::fabs(seed.value.imag()) > 1e-12 * std::abs(seed.value)) {
        ep.message = "complex eigenvalues are not refined";
        return ep;
    }
    const slong n = fp.n;
    slong prec = std::max(fp.prec, ball::digits_to_bits(static_cast<slong>(digits) + 5) + 64);
    BallMat m(n, n), cm(n, n);
    if (!newton::collocation_dt_matrices(m, cm, fp, n, prec)) {
        ep.message = "the doubling operator is undefined at the fixed point";
        return ep;
    }
    // The residual is absolute and the matrices' entries grow with z and n (~1e40 at z = 32,
    // n = 435): the residual then floors at 10^-(digits of prec - log10 |M|). When it stops
    // falling above the target, the matrices are rebuilt with the missing digits added (at most
    // twice); the eigenpair of the matrices at the fixed point's midpoints is what is solved for.
    int raises = 0;
    double last_res = std::numeric_limits<double>::infinity();
    // Newton on (h, lambda): M h - lambda C h = 0, h_j = 1 (generalised form, no inverse of C).
    const slong ms = std::min<slong>(n, seed.vector.size());
    Eigen::VectorXd h0 = seed.vector.real().head(ms);
    Eigen::Index js = 0;
    h0.cwiseAbs().maxCoeff(&js);
    h0 /= h0(js);
    BallVec h(n);
    for (slong k = 0; k < ms; ++k)
        arb_set_d(h[k], h0(k));
    Ball lambda(seed.value.real());
    for (slong it = 0; it < 40; ++it) {
        BallVec mh(n), ch(n), phi(n + 1);
        for (slong i = 0; i < n; ++i) {
            arb_zero(mh[i]);
            arb_zero(ch[i]);
            for (slong k = 0; k < n; ++k) {
                arb_addmul(mh[i], m.entry(i, k), h[k], prec);
                arb_addmul(ch[i], cm.entry(i, k), h[k], prec);
            }
            arb_set(phi[i], mh[i]);
            arb_submul(phi[i], lambda.get(), ch[i], prec);
        }
        arb_sub_ui(phi[n], h[js], 1, prec);
        double res = -std::numeric_limits<double>::infinity();
        for (slong i = 0; i <= n; ++i) {
            Ball b(phi[i]);
            res = std::max(res, detail::log10_upper(b));
        }
        ep.log10_residual = res;
        ep.steps = it;
        if (res <= -digits) {
            ep.converged = true;
            break;
        }
        if (res > last_res - 1.0 && raises < 2) {
            ++raises;
            prec += ball::digits_to_bits(static_cast<slong>(std::ceil(res + digits)) + 10);
            if (!newton::collocation_dt_matrices(m, cm, fp, n, prec)) {
                ep.message = "the doubling operator is undefined at the fixed point";
                return ep;
            }
            last_res = std::numeric_limits<double>::infinity();
            continue;
        }
        last_res = res;
        BallMat jb(n + 1, n + 1);
        for (slong i = 0; i < n; ++i) {
            for (slong k = 0; k < n; ++k) {
                arb_set(jb.entry(i, k), m.entry(i, k));
                arb_submul(jb.entry(i, k), lambda.get(), cm.entry(i, k), prec);
            }
            arb_neg(jb.entry(i, n), ch[i]);
        }
        arb_one(jb.entry(n, js));
        BallVec d;
        if (!detail::approx_solve_dense(d, jb, phi, prec)) {
            ep.message = "the bordered eigen-system is numerically singular";
            return ep;
        }
        for (slong k = 0; k < n; ++k) {
            arb_sub(h[k], h[k], d[k], prec);
            arb_get_mid_arb(h[k], h[k]);
        }
        arb_sub(lambda.get(), lambda.get(), d[n], prec);
        arb_get_mid_arb(lambda.get(), lambda.get());
    }
    if (!ep.converged)
        ep.message = "the collocation eigenpair did not converge";
    ep.lambda = lambda;
    ep.n = n;
    ep.prec = prec;
    return ep;
}

} // namespace renorm::spectrum
