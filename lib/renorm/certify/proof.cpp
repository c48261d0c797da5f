#include <renorm/certify/proof.hpp>

#include <Eigen/Eigenvalues>

#include <cmath>
#include <complex>
#include <stdexcept>
#include <vector>

namespace renorm::certify {

using namespace renorm::series;
using detail::Columns;
using detail::Models;
using detail::Mutation;

const char* const theorem_statement =
    "Contraction mapping theorem, radii-polynomial (Newton-Kantorovich) form: if F is C^1 on a "
    "neighbourhood of the closed ball B(x0, rho) of a Banach space, A is an injective bounded "
    "operator, ||A F(x0)|| <= Y, sup over B(x0, rho) of ||I - A DF(x)|| <= Z and "
    "Y + Z rho < rho, then F has exactly one zero in B(x0, rho). Applied in the space of "
    "functions analytic on the disc |y - c| <= r with the norm sum |f_k| r^k, to "
    "F(G) = G - T(G) (T the period-doubling operator) and to "
    "F(h, lambda) = (DT(G*) h - lambda h, h_j - 1).";

namespace {

/// An upper bound for Y + Z rho, compared strictly with rho.
bool radii_closes(const Bound& y, const Bound& z, const Bound& rho)
{
    if (!y.is_finite() || !z.is_finite() || !rho.is_finite())
        return false;
    Bound lhs = y + z * rho;
    return lhs < rho;
}

/// rho = factor Y / (1 - Z) rounded up; infinite when Z >= 1.
Bound choose_radius(const Bound& y, const Bound& z, double factor)
{
    if (!y.is_finite() || !z.is_finite() || !(z < Bound(1.0)))
        return Bound::infinite();
    Ball one(slong{1}), zb = z.to_ball(), d;
    arb_sub(d.get(), one.get(), zb.get(), 64);
    Bound lower;
    arb_get_mag_lower(lower.get(), d.get());
    Bound out = y * Bound(factor);
    mag_div(out.get(), out.get(), lower.get());
    if (mag_is_zero(out.get()))
        mag_set_ui_2exp_si(out.get(), 1, -100000);
    return out;
}

BallMat identity(slong n)
{
    BallMat m(n, n);
    arb_mat_one(m.get());
    return m;
}

/// A = an approximate inverse of the midpoint matrix of j (exact midpoints, zero radii);
/// returns false when the floating-point inversion fails.
bool approx_inverse(BallMat& a, const BallMat& j, slong prec)
{
    BallMat mid(j.rows(), j.cols());
    arb_mat_get_mid(mid.get(), j.get());
    a = BallMat(j.rows(), j.cols());
    if (!arb_mat_approx_inv(a.get(), mid.get(), prec))
        return false;
    arb_mat_get_mid(a.get(), a.get());
    return true;
}

/// ||A x|| + kappa eps for x given as the coefficients of a model (length <= rows of A).
Bound residual_norm(const BallMat& a, const BallPoly& x, const Ball* extra, const Bound& kappa,
                    const Bound& eps, slong prec)
{
    const slong n = a.rows();
    BallMat v(n, 1);
    for (slong i = 0; i < x.length() && i < n; ++i)
        arb_set(v.entry(i, 0), x.get()->coeffs + i);
    if (extra)
        arb_set(v.entry(n - 1, 0), extra->get());
    BallMat av(n, 1);
    arb_mat_mul(av.get(), a.get(), v.get(), prec);
    return detail::column_norm(av, 0) + kappa * eps;
}

std::string mag_text(const Bound& b)
{
    return b.text(3);
}

/// The fixed-point bounds at the radius rho. Writes the failing hypothesis into *why.
/// The high-precision part of the fixed-point proof, which does not depend on rho: the residual
/// G0 - T(G0) and the derivative check. Computed once per proof.
struct HighPart {
    bool done = false;
    bool ok = false;
    std::string why;
    TaylorModel f0;
    Bound derivative_check;
};

void high_part(const ProofData& pd, Mutation mut, HighPart& hp)
{
    hp.done = true;
    const slong n = pd.n;
    // The exact residual G0 - T(G0) at high precision.
    Models hi = detail::compute_models(pd.problem, pd.g0, Bound(), n, false, mut, pd.prec);
    if (!hi.ok) {
        hp.why = "hypothesis failed at G0: " + hi.failure;
        return;
    }
    hp.f0 = tm_sub(hi.g, hi.t, pd.prec);

    // Guard: DT h against (T(G0 + e h) - T(G0)) / e for a few directions h. Not a bound of the
    // proof, so it runs at a moderate precision pc (first-order agreement needs few bits).
    {
        // (At pc bits the models drop coefficients below 2^-pc relative, so this pass is cheap.)
        const slong pc = std::max<slong>(pd.prec_low, 192);
        const slong nc = n;
        const BallPoly& gc = pd.g0;
        Models hc = detail::compute_models(pd.problem, gc, Bound(), nc, true, mut, pc);
        if (!hc.ok) {
            hp.why = "derivative check: " + hc.failure;
            return;
        }
        const slong e_exp = -(pc / 3);
        Ball e;
        arb_set_si(e.get(), 1);
        arb_mul_2exp_si(e.get(), e.get(), e_exp);
        Ball inv_e;
        arb_set_si(inv_e.get(), 1);
        arb_mul_2exp_si(inv_e.get(), inv_e.get(), -e_exp);
        Bound worst;
        const slong dirs[] = {0, 1, 2, std::min<slong>(5, nc - 1), nc / 2};
        for (slong k : dirs) {
            BallPoly h;
            h.set_coeff(k, Ball(slong{1}));
            BallPoly g1 = gc;
            BallPoly eh;
            arb_poly_scalar_mul(eh.get(), h.get(), e.get(), pc);
            arb_poly_add(g1.get(), g1.get(), eh.get(), pc);
            Models moved = detail::compute_models(pd.problem, g1, Bound(), nc, false, mut, pc);
            if (!moved.ok) {
                hp.why = "derivative check: " + moved.failure;
                return;
            }
            TaylorModel q = tm_scalar_mul(tm_sub(moved.t, hc.t, pc), inv_e, pc);
            TaylorModel dth = detail::apply_derivative(hc, h, pc);
            worst = series::max(worst, tm_norm(tm_sub(q, dth, pc)));
        }
        hp.derivative_check = worst;
        // Second-order terms are O(e) = 2^(-prec/3); a wrong formula gives O(1).
        Bound limit;
        mag_set_ui_2exp_si(limit.get(), 1, -(pc / 6));
        if (!(worst < limit)) {
            hp.why = "derivative check: ||(T(G0 + e h) - T(G0))/e - DT(G0) h|| = " +
                     mag_text(worst) + " is not O(e): DT is not the derivative of T";
            return;
        }
    }
    hp.ok = true;
}

/// The fixed-point bounds at the radius rho. Writes the failing hypothesis into *why.
FixedPointBounds fixed_point_bounds(const ProofData& pd, HighPart& hp, const Bound& rho,
                                    Mutation mut, std::string* why)
{
    FixedPointBounds fb;
    const slong n = pd.n;
    if (!hp.done)
        high_part(pd, mut, hp);
    if (!hp.ok) {
        *why = hp.why;
        return fb;
    }
    const TaylorModel& f0 = hp.f0;
    fb.residual_eps = f0.eps;
    fb.derivative_check = hp.derivative_check;

    // Z: the derivative over the whole ball, at low precision.
    Models lo = detail::compute_models(pd.problem, pd.g0, rho, n, true, mut, pd.prec_low);
    if (!lo.ok) {
        *why = "hypothesis failed on the ball B(G0, rho): " + lo.failure;
        return fb;
    }
    fb.r_u = lo.r_u;
    fb.r_v = lo.r_v;
    Columns cols = detail::derivative_columns(lo, n, pd.prec_low);
    fb.beta = cols.beta;
    BallMat im = identity(n);
    arb_mat_sub(im.get(), im.get(), cols.matrix.get(), pd.prec_low);
    BallMat a(n, n);
    if (!approx_inverse(a, im, pd.prec_low)) {
        *why = "the matrix of I - DT(G0) is numerically singular";
        return fb;
    }
    fb.norm_a = detail::matrix_norm(a);
    Bound kappa = series::max(fb.norm_a, Bound(1.0));
    BallMat b(n, n);
    arb_mat_mul(b.get(), a.get(), im.get(), pd.prec_low);
    arb_mat_sub(b.get(), identity(n).get(), b.get(), pd.prec_low);
    Bound z = kappa * cols.beta; // columns k >= N
    for (slong k = 0; k < n; ++k)
        z = series::max(z, detail::column_norm(b, k) + kappa * cols.eps[static_cast<size_t>(k)]);
    fb.z = z;
    fb.y = residual_norm(a, f0.p, nullptr, kappa, f0.eps, pd.prec_low);
    fb.closes = radii_closes(fb.y, fb.z, rho);
    if (!fb.closes)
        *why = "fixed point: Y + Z rho < rho fails (Y = " + mag_text(fb.y) + ", Z = " +
               mag_text(fb.z) + ", rho = " + mag_text(rho) + ")";
    return fb;
}

/// The eigenpair bounds for (h0, lambda0) and every G in B(G0, rho_g), at radius rho_e.
EigenBounds eigen_bounds(const ProofData& pd, const Bound& rho_e, Mutation mut, std::string* why)
{
    EigenBounds eb;
    const slong n = pd.n;
    if (pd.h0.length() > n || pd.norm_index < 0 || pd.norm_index >= n) {
        *why = "eigenvector longer than N or normalisation index out of range";
        return eb;
    }
    if (!arb_is_nonzero(pd.lambda0.get())) {
        *why = "eigenvalue centre is zero";
        return eb;
    }
    Models hi = detail::compute_models(pd.problem, pd.g0, pd.rho_g, n, true, mut, pd.prec);
    if (!hi.ok) {
        *why = "eigenpair: hypothesis failed on the fixed-point ball: " + hi.failure;
        return eb;
    }
    // Residual (DT(G) h0 - lambda0 h0, h0_j - 1) for every G in the ball.
    TaylorModel r = detail::apply_derivative(hi, pd.h0, pd.prec);
    BallPoly lh;
    arb_poly_scalar_mul(lh.get(), pd.h0.get(), pd.lambda0.get(), pd.prec);
    r = tm_sub(r, tm_from_poly(lh, n, pd.prec), pd.prec);
    Ball lres = pd.h0.coeff(pd.norm_index);
    arb_sub_ui(lres.get(), lres.get(), 1, pd.prec);

    Models lo = detail::compute_models(pd.problem, pd.g0, pd.rho_g, n, true, mut, pd.prec_low);
    if (!lo.ok) {
        *why = "eigenpair: " + lo.failure;
        return eb;
    }
    Columns cols = detail::derivative_columns(lo, n, pd.prec_low);
    // J = [[M - lambda0 I, -h0], [e_j^T, 0]]
    BallMat j(n + 1, n + 1);
    for (slong i = 0; i < n; ++i) {
        for (slong k = 0; k < n; ++k)
            arb_set(j.entry(i, k), cols.matrix.entry(i, k));
        arb_sub(j.entry(i, i), j.entry(i, i), pd.lambda0.get(), pd.prec_low);
        Ball hi_c = pd.h0.coeff(i);
        arb_neg(j.entry(i, n), hi_c.get());
    }
    arb_one(j.entry(n, pd.norm_index));
    BallMat a(n + 1, n + 1);
    if (!approx_inverse(a, j, pd.prec_low)) {
        *why = "eigenpair: the Jacobian matrix is numerically singular";
        return eb;
    }
    eb.norm_a = detail::matrix_norm(a);
    Ball inv_l;
    arb_inv(inv_l.get(), pd.lambda0.get(), pd.prec_low);
    Bound kappa = series::max(eb.norm_a, Bound::abs_upper(inv_l));
    BallMat b(n + 1, n + 1);
    arb_mat_mul(b.get(), a.get(), j.get(), pd.prec_low);
    BallMat id(n + 1, n + 1);
    arb_mat_one(id.get());
    arb_mat_sub(b.get(), id.get(), b.get(), pd.prec_low);
    Bound z0 = kappa * cols.beta; // columns k >= N
    for (slong k = 0; k < n; ++k)
        z0 = series::max(z0, detail::column_norm(b, k) + kappa * cols.eps[static_cast<size_t>(k)]);
    z0 = series::max(z0, detail::column_norm(b, n)); // the lambda column
    eb.z0 = z0;
    eb.z1 = kappa;
    eb.y = residual_norm(a, r.p, &lres, kappa, r.eps, pd.prec_low);
    Bound z = eb.z0 + eb.z1 * rho_e;
    eb.closes = radii_closes(eb.y, z, rho_e);
    if (!eb.closes)
        *why = "eigenpair: Y + Z rho < rho fails (Y = " + mag_text(eb.y) + ", Z = " +
               mag_text(z) + ", rho = " + mag_text(rho_e) + ")";
    return eb;
}

void set_unknown(Certificate& c)
{
    arb_indeterminate(c.alpha.get());
    arb_indeterminate(c.delta.get());
    arb_indeterminate(c.g_at_zero.get());
    arb_indeterminate(c.a_power_z.get());
}

/// The enclosures implied by the two balls.
void enclose(Certificate& c)
{
    const ProofData& pd = c.data;
    TaylorModel g = tm_from_poly(pd.g0, pd.n, pd.prec);
    g.eps = g.eps + pd.rho_g;
    Ball one(slong{1}), zero;
    Ball g1 = tm_evaluate(g, pd.problem.disc.to_s(one, pd.prec), pd.prec);
    arb_inv(c.alpha.get(), g1.get(), pd.prec);
    arb_neg(c.alpha.get(), c.alpha.get());
    c.g_at_zero = tm_evaluate(g, pd.problem.disc.to_s(zero, pd.prec), pd.prec);
    c.delta = pd.lambda0;
    arb_add_error_mag(c.delta.get(), pd.rho_e.get());
}

bool check_args(const ProofData& pd, std::string* why)
{
    if (pd.n < 4 || pd.prec < 64 || pd.prec_low < 64 || pd.g0.length() == 0 ||
        pd.g0.length() > pd.n) {
        *why = "bad input: need N >= 4, prec >= 64, prec_low >= 64 and 1 <= length(G0) <= N";
        return false;
    }
    if (!(pd.problem.disc.radius > 0) || !std::isfinite(pd.problem.disc.centre)) {
        *why = "bad input: the disc needs a finite centre and a positive radius";
        return false;
    }
    try {
        (void)pd.problem.order_ball(64);
    } catch (const std::invalid_argument& e) {
        *why = std::string("bad input: ") + e.what();
        return false;
    }
    return true;
}

/// m*(0) over the ball: the eigenvalue of DT in the direction that changes G(0) (a^z at the
/// fixed point). Recorded for the reader; it is not a claim of the proof.
Ball normalisation_eigenvalue(const ProofData& pd, Mutation mut)
{
    Models md = detail::compute_models(pd.problem, pd.g0, pd.rho_g, pd.n, true, mut, pd.prec_low);
    Ball out;
    if (!md.ok) {
        arb_indeterminate(out.get());
        return out;
    }
    return tm_evaluate(md.m, md.s0, pd.prec_low);
}

Certificate run_recheck(const ProofData& data, Mutation mut)
{
    Certificate c;
    c.data = data;
    set_unknown(c);
    std::string why;
    if (!check_args(data, &why)) {
        c.status = Status::bad_input;
        c.message = why;
        return c;
    }
    HighPart hp;
    c.fixed_point = fixed_point_bounds(data, hp, data.rho_g, mut, &why);
    if (!c.fixed_point.closes) {
        c.message = why;
        return c;
    }
    c.eigen = eigen_bounds(data, data.rho_e, mut, &why);
    if (!c.eigen.closes) {
        c.message = why;
        return c;
    }
    enclose(c);
    c.a_power_z = normalisation_eigenvalue(data, mut);
    c.status = Status::certified;
    c.message = "certified";
    return c;
}

Certificate run_certify(const doubling::Problem& problem, const BallPoly& g0, slong n, slong prec,
                        slong prec_low, Mutation mut)
{
    Certificate c;
    set_unknown(c);
    ProofData& pd = c.data;
    pd.problem = problem;
    pd.n = n;
    pd.prec = prec;
    pd.prec_low = prec_low;
    pd.g0 = approx_midpoints(g0);
    std::string why;
    if (!check_args(pd, &why)) {
        c.status = Status::bad_input;
        c.message = why;
        return c;
    }
    // Fixed point: bounds at rho = 0 choose rho, then the check at rho itself.
    HighPart hp;
    FixedPointBounds first = fixed_point_bounds(pd, hp, Bound(), mut, &why);
    if (!first.y.is_finite() || !first.z.is_finite() || !(first.z < Bound(1.0))) {
        c.fixed_point = first;
        c.message = (first.z.is_finite() && first.y.is_finite())
                        ? "fixed point: Z < 1 fails (Z = " + mag_text(first.z) +
                              ", of which the tail columns k >= N give ||A|| beta = " +
                              mag_text(series::max(first.norm_a, Bound(1.0)) * first.beta) +
                              "; a longer truncation or a disc that v maps deeper inside helps)"
                        : why;
        return c;
    }
    pd.rho_g = choose_radius(first.y, first.z, 1.5);
    why.clear();
    c.fixed_point = fixed_point_bounds(pd, hp, pd.rho_g, mut, &why);
    if (!c.fixed_point.closes) {
        c.message = why;
        return c;
    }
    // Eigenpair.
    detail::ApproxEigen ae = detail::approx_eigenpair(problem, pd.g0, n, prec);
    if (!ae.ok) {
        c.message = "eigenpair: no approximate eigenpair: " + ae.message;
        return c;
    }
    pd.h0 = ae.h;
    pd.lambda0 = ae.lambda;
    pd.norm_index = ae.index;
    EigenBounds e0 = eigen_bounds(pd, Bound(), mut, &why);
    if (!e0.y.is_finite() || !e0.z0.is_finite() || !(e0.z0 < Bound(1.0))) {
        c.eigen = e0;
        c.message = (e0.z0.is_finite() && e0.y.is_finite())
                        ? "eigenpair: Z < 1 fails (Z = " + mag_text(e0.z0) + ")"
                        : why;
        return c;
    }
    // The eigenpair bounds do not depend on rho_e (Z = z0 + z1 rho_e): only the check does.
    pd.rho_e = choose_radius(e0.y, e0.z0, 1.5);
    c.eigen = e0;
    c.eigen.closes = radii_closes(e0.y, e0.z0 + e0.z1 * pd.rho_e, pd.rho_e);
    if (!c.eigen.closes) {
        c.message = "eigenpair: Y + Z rho < rho fails (Y = " + mag_text(e0.y) + ", Z = " +
                    mag_text(e0.z0 + e0.z1 * pd.rho_e) + ", rho = " + mag_text(pd.rho_e) + ")";
        return c;
    }
    enclose(c);
    c.a_power_z = normalisation_eigenvalue(pd, mut);
    c.status = Status::certified;
    c.message = "certified";
    return c;
}

} // namespace

Certificate certify_constants(const doubling::Problem& problem, const BallPoly& g0, slong n,
                              slong prec, slong prec_low)
{
    return run_certify(problem, g0, n, prec, prec_low, Mutation::none);
}

Certificate recheck(const ProofData& data) { return run_recheck(data, Mutation::none); }

double approx_disc_good_enough = 0.92;

series::Disc approx_choose_disc(const doubling::Problem& problem, const BallPoly& g, slong n)
{
    const slong prec = 128;
    const double centres[] = {0.5, 0.52, 0.55, 0.58};
    const double radii[] = {0.6, 0.625, 0.65};
    series::Disc best = problem.disc;
    double best_r = 2.0;
    {
        Models md = detail::compute_models(problem, g, Bound(), std::min<slong>(n, g.length()), false,
                                           Mutation::none, prec);
        if (md.ok) {
            best_r = std::max(md.r_u.approx_double(), md.r_v.approx_double());
            if (best_r <= approx_disc_good_enough)
                return best;
        }
    }
    for (double c : centres) {
        for (double r : radii) {
            if (!(c < r))
                continue;
            // s_old = (y - c_old)/r_old with y = c + r s_new: an exact affine re-expansion.
            Ball b0, b1, cc(c), rr(r), co(problem.disc.centre), ro(problem.disc.radius);
            arb_sub(b0.get(), cc.get(), co.get(), prec);
            arb_div(b0.get(), b0.get(), ro.get(), prec);
            arb_div(b1.get(), rr.get(), ro.get(), prec);
            BallPoly gc = approx_midpoints(compose_affine(g, b0, b1, g.length(), prec));
            doubling::Problem pc = problem;
            pc.disc.centre = c;
            pc.disc.radius = r;
            Models md = detail::compute_models(pc, gc, Bound(), std::min<slong>(n, gc.length()),
                                               false, Mutation::none, prec);
            if (!md.ok)
                continue;
            const double worst = std::max(md.r_u.approx_double(), md.r_v.approx_double());
            if (worst < best_r) {
                best_r = worst;
                best = pc.disc;
            }
        }
    }
    return best;
}

namespace detail {

Certificate certify_constants_mutated(const doubling::Problem& problem, const BallPoly& g0, slong n,
                                      slong prec, slong prec_low, Mutation mutation)
{
    return run_certify(problem, g0, n, prec, prec_low, mutation);
}

Certificate recheck_mutated(const ProofData& data, Mutation mutation)
{
    return run_recheck(data, mutation);
}

ApproxEigen approx_eigenpair(const doubling::Problem& problem, const BallPoly& g0, slong n,
                             slong prec)
{
    ApproxEigen out;
    doubling::Linearization lin(g0, problem, n, prec);
    BallMat m = lin.matrix(prec);
    // Double-precision eigenvectors choose the candidate: real, > 1 in modulus, with
    // h(y = 0) ~ 0 (the invariant subspace that excludes the normalisation direction).
    Eigen::MatrixXd md(n, n);
    for (slong i = 0; i < n; ++i)
        for (slong k = 0; k < n; ++k)
            md(i, k) = arf_get_d(arb_midref(m.entry(i, k)), ARF_RND_NEAR);
    Eigen::EigenSolver<Eigen::MatrixXd> es(md);
    if (es.info() != Eigen::Success) {
        out.message = "the double eigensolver failed";
        return out;
    }
    const double s0 = lin.s_at_zero().approx_double();
    int best = -1;
    double best_abs = 1.0;
    for (int i = 0; i < static_cast<int>(n); ++i) {
        std::complex<double> l = es.eigenvalues()(i);
        if (std::abs(l.imag()) > 1e-8 * std::abs(l) || std::abs(l) <= best_abs)
            continue;
        Eigen::VectorXd v = es.eigenvectors().col(i).real();
        double h0 = 0, pw = 1, nrm = v.lpNorm<1>();
        for (slong k = 0; k < n; ++k, pw *= s0)
            h0 += v(k) * pw;
        if (std::abs(h0) > 1e-6 * nrm)
            continue;
        best = i;
        best_abs = std::abs(l);
    }
    if (best < 0) {
        out.message = "no real eigenvalue > 1 with h(0) = 0";
        return out;
    }
    Eigen::VectorXd v = es.eigenvectors().col(best).real();
    Eigen::Index jmax = 0;
    v.cwiseAbs().maxCoeff(&jmax);
    out.index = static_cast<slong>(jmax);
    v /= v(jmax);
    double lam = es.eigenvalues()(best).real();

    // Chord iteration on F(h, lambda) = (M h - lambda h, h_j - 1) = 0: F at precision prec, the
    // Jacobian [[M - lambda I, -h], [e_j^T, 0]] factored at a moderate precision and refactored
    // every few steps (midpoint arithmetic; no guarantee).
    BallMat mid(n, n);
    arb_mat_get_mid(mid.get(), m.get());
    BallMat x(n + 1, 1);
    for (slong k = 0; k < n; ++k)
        arb_set_d(x.entry(k, 0), v(k));
    arb_set_d(x.entry(n, 0), lam);
    const slong lu_prec = std::min<slong>(prec, 256);
    BallMat lu(n + 1, n + 1);
    std::vector<slong> perm(static_cast<size_t>(n + 1));
    bool converged = false;
    for (int it = 0; it < 400 && !converged; ++it) {
        if (it % 6 == 0) {
            BallMat jac(n + 1, n + 1);
            for (slong i = 0; i < n; ++i) {
                for (slong k = 0; k < n; ++k)
                    arb_set_round(jac.entry(i, k), mid.entry(i, k), lu_prec);
                arb_sub(jac.entry(i, i), jac.entry(i, i), x.entry(n, 0), lu_prec);
                arb_neg_round(jac.entry(i, n), x.entry(i, 0), lu_prec);
            }
            arb_one(jac.entry(n, out.index));
            arb_mat_get_mid(jac.get(), jac.get());
            if (!arb_mat_approx_lu(perm.data(), lu.get(), jac.get(), lu_prec)) {
                out.message = "the eigen-Newton Jacobian is singular";
                return out;
            }
        }
        BallMat hx(n, 1), mh(n, 1), f(n + 1, 1);
        for (slong k = 0; k < n; ++k)
            arb_set(hx.entry(k, 0), x.entry(k, 0));
        arb_mat_approx_mul(mh.get(), mid.get(), hx.get(), prec);
        for (slong i = 0; i < n; ++i) {
            arb_set(f.entry(i, 0), mh.entry(i, 0));
            arb_submul(f.entry(i, 0), x.entry(n, 0), x.entry(i, 0), prec);
        }
        arb_sub_ui(f.entry(n, 0), x.entry(out.index, 0), 1, prec);
        arb_mat_get_mid(f.get(), f.get());
        BallMat dx(n + 1, 1);
        arb_mat_approx_solve_lu_precomp(dx.get(), perm.data(), lu.get(), f.get(), prec);
        arb_mat_sub(x.get(), x.get(), dx.get(), prec);
        arb_mat_get_mid(x.get(), x.get());
        mag_t dn;
        mag_init(dn);
        arb_get_mag(dn, dx.entry(n, 0));
        converged = mag_cmp_2exp_si(dn, -prec + 16) < 0 && it >= 2;
        mag_clear(dn);
    }
    for (slong k = 0; k < n; ++k)
        out.h.set_coeff(k, Ball(x.entry(k, 0)));
    out.lambda = Ball(x.entry(n, 0));
    out.ok = true;
    return out;
}

} // namespace detail

} // namespace renorm::certify
