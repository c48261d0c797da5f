// Tests of the Newton-Krylov path (newton/krylov.hpp). Check values: an exact rational linear
// system (Sherman-Morrison closed form), the published 105 digits of alpha (OEIS A006891, see
// reference_values.hpp) and 100 digits of delta (from memory, confirmed by the certified
// enclosure of certify/; reference_values.hpp), and the chord variants as a second route.
#include "reference_values.hpp"

#include <renorm/newton/krylov.hpp>
#include <renorm/spectrum/spectrum.hpp>

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

using namespace renorm;
using ball::Ball;
using ball::BallVec;

namespace {

slong agreeing_digits(const Ball& x, const Ball& y)
{
    Ball d;
    arb_sub(d.get(), x.get(), y.get(), ARF_PREC_EXACT);
    arb_div(d.get(), d.get(), y.get(), 64);
    arb_abs(d.get(), d.get());
    if (arb_is_zero(d.get()))
        return 100000;
    // -log10 |d| through the exponent (|d| may be far below double range).
    const double l2 = static_cast<double>(arf_abs_bound_lt_2exp_si(arb_midref(d.get())));
    return static_cast<slong>(std::floor(-l2 * 0.30102999566398120));
}

slong agreeing_digits(const Ball& x, const char* ref)
{
    auto r = ball::from_string(ref, 4000);
    return agreeing_digits(x, *r);
}

const newton::FixedPoint& start_z2()
{
    static newton::FixedPoint s = [] {
        doubling::Problem p;
        return newton::approx_continuation(p, 40, 192);
    }();
    return s;
}

} // namespace

TEST(Krylov, FgmresSolvesIdentityPlusRankOneExactly)
{
    // J = I + u v^T with u_k = 1/(k+1), v_k = 2^-k: J^-1 b = b - u (v.b) / (1 + v.u)
    // (Sherman-Morrison). Unpreconditioned GMRES needs exactly two steps on I + rank one.
    const slong n = 12, prec = 400;
    std::vector<double> u(n), v(n), b(n);
    for (slong k = 0; k < n; ++k) {
        u[k] = 1.0 / static_cast<double>(k + 1);
        v[k] = std::ldexp(1.0, static_cast<int>(-k));
        b[k] = static_cast<double>((k % 3) - 1);
    }
    auto apply = [&](BallVec& y, const BallVec& x, slong p) {
        y = BallVec(n);
        Ball vx;
        for (slong k = 0; k < n; ++k) {
            Ball t(v[k]);
            arb_addmul(vx.get(), t.get(), x[k], p);
        }
        for (slong k = 0; k < n; ++k) {
            Ball t(u[k]);
            arb_mul(y[k], t.get(), vx.get(), p);
            arb_add(y[k], y[k], x[k], p);
        }
    };
    auto identity = [](BallVec& y, const BallVec& x) { y = x; };
    BallVec rhs(n), x;
    for (slong k = 0; k < n; ++k)
        arb_set_d(rhs[k], b[k]);
    const slong steps = newton::approx_fgmres(x, rhs, apply, identity, 100, 10, 0, prec);
    EXPECT_EQ(steps, 2);
    double vb = 0, vu = 0;
    for (slong k = 0; k < n; ++k) {
        vb += v[k] * b[k];
        vu += v[k] * u[k];
    }
    for (slong k = 0; k < n; ++k) {
        const double exact = b[k] - u[k] * vb / (1 + vu);
        EXPECT_NEAR(arf_get_d(arb_midref(x[k]), ARF_RND_NEAR), exact, 1e-15) << "k = " << k;
    }
    // The residual of the computed solution is at the requested 100 digits.
    BallVec jx;
    apply(jx, x, prec);
    for (slong k = 0; k < n; ++k) {
        Ball d;
        arb_sub(d.get(), jx[k], rhs[k], prec);
        EXPECT_LT(std::fabs(d.approx_double()), 1e-95);
    }
}

TEST(Krylov, FixedPointMatchesAlphaAndDoublesTheDigitsEachStep)
{
    newton::RefineOptions o;
    o.method = newton::RefineMethod::krylov;
    std::vector<double> residuals;
    o.progress = [&](const newton::Progress& p) { residuals.push_back(p.log10_residual); };
    newton::FixedPoint fp = newton::approx_refine(start_z2(), 105, o);
    ASSERT_TRUE(fp.converged) << fp.message;
    // Source: OEIS A006891 (reference_values.hpp).
    EXPECT_GE(agreeing_digits(fp.a, test_ref::alpha_z2), 104) << ball::approx_decimal(fp.a, 110);
    EXPECT_LE(fp.log10_residual, -115);
    // Newton: from ~45 digits to 115 in at most 3 steps (one more residual confirms). A wrong
    // Jacobian (a sign, a dropped term in DT) still converges, but linearly: this catches it.
    EXPECT_LE(fp.steps - start_z2().steps, 3);
    ASSERT_GE(residuals.size(), 3u);
    EXPECT_LE(residuals[1], 1.7 * residuals[0]) << "the second residual did not square the first";
    EXPECT_GT(fp.krylov_steps, 0);
    EXPECT_LE(fp.krylov_steps, 12);
}

TEST(Krylov, FixedPointAgreesWithTheChordVariantTo250Digits)
{
    newton::RefineOptions o;
    o.method = newton::RefineMethod::krylov;
    newton::FixedPoint a = newton::approx_refine(start_z2(), 250, o);
    o.method = newton::RefineMethod::chord;
    newton::FixedPoint b = newton::approx_refine(start_z2(), 250, o);
    ASSERT_TRUE(a.converged) << a.message;
    ASSERT_TRUE(b.converged) << b.message;
    EXPECT_EQ(a.n, b.n);
    EXPECT_GE(agreeing_digits(a.a, b.a), 255);
    EXPECT_LT(a.steps, b.steps);
}

TEST(Krylov, EigenpairMatchesDeltaAndTheChordVariant)
{
    newton::RefineOptions o;
    newton::FixedPoint fp = newton::approx_refine(start_z2(), 130, o);
    ASSERT_TRUE(fp.converged) << fp.message;
    auto seeds = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    spectrum::EigenOptions eo;
    eo.method = spectrum::EigenMethod::krylov;
    spectrum::Eigenpair k = spectrum::approx_refine_eigenpair(fp, seeds[0], 115, eo);
    eo.method = spectrum::EigenMethod::chord;
    spectrum::Eigenpair c = spectrum::approx_refine_eigenpair(fp, seeds[0], 115, eo);
    ASSERT_TRUE(k.converged) << k.message;
    ASSERT_TRUE(c.converged) << c.message;
    // Source: 100 digits of delta, from memory and confirmed by certify/ (reference_values.hpp).
    EXPECT_GE(agreeing_digits(k.lambda, test_ref::delta_z2), 100) << ball::approx_decimal(k.lambda, 105);
    EXPECT_GE(agreeing_digits(k.lambda, c.lambda), 112);
    EXPECT_LE(k.log10_residual, -115);
    EXPECT_LT(k.steps, c.steps);
    // The next real eigenvalue (irrelevant, about -0.1237) converges as well.
    spectrum::Eigenpair k2 = spectrum::approx_refine_eigenpair(fp, seeds[2], 40, {});
    ASSERT_TRUE(k2.converged) << k2.message;
    EXPECT_NEAR(k2.lambda.approx_double(), -0.123652712552687, 1e-14);
}

TEST(Krylov, ResumingFromAnySavedStateGivesTheSameIterate)
{
    // Determinism is what makes checkpoints safe: continuing from the state saved after step k
    // must give bit for bit the result of the uninterrupted run.
    std::vector<newton::KrylovState> saved;
    newton::RefineOptions o;
    o.method = newton::RefineMethod::krylov;
    o.on_step = [&](const newton::KrylovState& s) { saved.push_back(s); };
    newton::FixedPoint full = newton::approx_refine(start_z2(), 200, o);
    ASSERT_TRUE(full.converged) << full.message;
    ASSERT_GE(saved.size(), 2u);
    for (size_t k = 0; k < saved.size(); ++k) {
        newton::RefineOptions r;
        r.method = newton::RefineMethod::krylov;
        r.resume = &saved[k];
        newton::FixedPoint resumed = newton::approx_refine(start_z2(), 200, r);
        ASSERT_TRUE(resumed.converged) << resumed.message;
        EXPECT_EQ(resumed.n, full.n);
        EXPECT_EQ(resumed.steps, full.steps);
        EXPECT_EQ(resumed.krylov_steps, full.krylov_steps);
        EXPECT_TRUE(arb_poly_equal(resumed.g.get(), full.g.get())) << "resumed after step " << k + 1;
    }
}

TEST(Krylov, ResumingFromInsideANewtonStepGivesTheSameIterate)
{
    // With GMRES restarted after every Krylov step, a state is saved inside every Newton step
    // that needs more than one (its residual and the correction so far); continuing from any of
    // them gives the uninterrupted run's iterate bit for bit, without recomputing that residual.
    std::vector<newton::KrylovState> saved;
    newton::RefineOptions o;
    o.method = newton::RefineMethod::krylov;
    o.krylov_cycle = 1;
    o.on_step = [&](const newton::KrylovState& s) { saved.push_back(s); };
    slong running_reports = 0; // progress inside corrections, at each restart
    o.progress = [&](const newton::Progress& p) {
        if (p.krylov_running < 1)
            return;
        ++running_reports;
        // the digits gained so far, short of the digits the correction needs (else it would
        // have stopped)
        EXPECT_GT(p.krylov_gained, 0.0);
        EXPECT_LT(p.krylov_gained, p.krylov_needed);
    };
    newton::FixedPoint full = newton::approx_refine(start_z2(), 300, o);
    ASSERT_TRUE(full.converged) << full.message;
    o.progress = nullptr;
    size_t inside = 0;
    for (size_t k = 0; k < saved.size(); ++k) {
        if (saved[k].f.size() == 0)
            continue;
        ++inside;
        EXPECT_GE(saved[k].inner_restarts, 1);
        EXPECT_EQ(saved[k].inner_steps, saved[k].inner_restarts) << "one Krylov step a cycle";
        newton::RefineOptions r = o;
        r.on_step = nullptr;
        r.resume = &saved[k];
        newton::FixedPoint resumed = newton::approx_refine(start_z2(), 300, r);
        ASSERT_TRUE(resumed.converged) << resumed.message;
        EXPECT_EQ(resumed.steps, full.steps);
        EXPECT_EQ(resumed.krylov_steps, full.krylov_steps);
        EXPECT_TRUE(arb_poly_equal(resumed.g.get(), full.g.get())) << "resumed from saved state " << k + 1;
    }
    EXPECT_GE(inside, 2u) << "some Newton step needs several Krylov steps at 300 digits";
    EXPECT_EQ(running_reports, static_cast<slong>(inside)) << "one progress report per saved restart";
    // The restarted solve reaches the same digits as the default (one cycle of up to 40 steps).
    newton::RefineOptions d;
    d.method = newton::RefineMethod::krylov;
    newton::FixedPoint plain = newton::approx_refine(start_z2(), 300, d);
    ASSERT_TRUE(plain.converged) << plain.message;
    EXPECT_GE(agreeing_digits(full.a, plain.a), 300);
}

TEST(Krylov, EigenpairResumedFromInsideANewtonStepIsTheSame)
{
    // The same for delta's eigenpair (the stage that runs longest at thousands of digits).
    newton::RefineOptions o;
    newton::FixedPoint fp = newton::approx_refine(start_z2(), 200, o);
    ASSERT_TRUE(fp.converged) << fp.message;
    auto seeds = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 60, 128);
    std::vector<newton::KrylovState> saved;
    spectrum::EigenOptions eo;
    eo.krylov_cycle = 1;
    eo.on_step = [&](const newton::KrylovState& s) { saved.push_back(s); };
    const spectrum::Eigenpair full = spectrum::approx_refine_eigenpair(fp, seeds[0], 190, eo);
    ASSERT_TRUE(full.converged) << full.message;
    // Source: 100 digits of delta, from memory and confirmed by certify/ (reference_values.hpp).
    EXPECT_GE(agreeing_digits(full.lambda, test_ref::delta_z2), 100);
    size_t inside = 0;
    for (size_t k = 0; k < saved.size(); ++k) {
        if (saved[k].f.size() == 0)
            continue;
        ++inside;
        spectrum::EigenOptions r;
        r.krylov_cycle = 1;
        r.resume = &saved[k];
        const spectrum::Eigenpair again = spectrum::approx_refine_eigenpair(fp, seeds[0], 190, r);
        ASSERT_TRUE(again.converged) << again.message;
        EXPECT_TRUE(arb_equal(again.lambda.get(), full.lambda.get())) << "resumed from saved state " << k + 1;
        EXPECT_TRUE(arb_poly_equal(again.h.get(), full.h.get())) << "resumed from saved state " << k + 1;
    }
    EXPECT_GE(inside, 1u) << "delta's last correction needs several Krylov steps at 190 digits";
}

TEST(Krylov, FgmresContinuesFromARestartExactly)
{
    // A diagonal system with eigenvalues 30 .. 59 needs many steps when restarted every 2 (each
    // cycle gains about a factor 3); the state after each cycle, resumed, ends at the same bits
    // and step count.
    const slong n = 30, prec = 300;
    auto apply = [&](BallVec& y, const BallVec& x, slong p) {
        y = BallVec(n);
        for (slong k = 0; k < n; ++k)
            arb_mul_si(y[k], x[k], 30 + k, p);
    };
    auto identity = [](BallVec& y, const BallVec& x) { y = x; };
    BallVec rhs(n);
    for (slong k = 0; k < n; ++k)
        arb_set_si(rhs[k], (k % 5) - 2);
    std::vector<newton::FgmresCycle> cycles;
    BallVec x;
    const slong steps = newton::approx_fgmres(x, rhs, apply, identity, 30, 2, 100, prec, nullptr,
                                              [&](const newton::FgmresCycle& c) { cycles.push_back(c); });
    ASSERT_GT(steps, 0);
    ASSERT_GE(cycles.size(), 2u);
    // The digits each cycle reports as gained are those of the true residual of its correction
    // (GMRES's rotated right-hand side equals ||b - A x|| up to rounding).
    auto log10_norm = [&](const BallVec& v) {
        double s = 0;
        for (slong k = 0; k < n; ++k)
            s += std::pow(arf_get_d(arb_midref(v[k]), ARF_RND_NEAR), 2);
        return 0.5 * std::log10(s);
    };
    double before = 0;
    for (const auto& c : cycles) {
        BallVec ax, r(n);
        apply(ax, c.delta, prec);
        for (slong k = 0; k < n; ++k)
            arb_sub(r[k], rhs[k], ax[k], prec);
        EXPECT_NEAR(c.gained, log10_norm(rhs) - log10_norm(r), 1e-6) << "after " << c.steps << " steps";
        EXPECT_GT(c.gained, before);
        before = c.gained;
    }
    EXPECT_LT(before, 30.0);
    for (size_t i = 0; i < cycles.size(); ++i) {
        EXPECT_EQ(cycles[i].restarts, static_cast<slong>(i + 1));
        BallVec y;
        const slong s2 = newton::approx_fgmres(y, rhs, apply, identity, 30, 2, 100, prec, &cycles[i]);
        EXPECT_EQ(s2, steps) << "from cycle " << i + 1;
        bool same = true;
        for (slong k = 0; k < n; ++k)
            same = same && arb_equal(x[k], y[k]);
        EXPECT_TRUE(same) << "from cycle " << i + 1;
    }
    // And x solves the system: x_k = rhs_k / (30 + k) to 30 digits.
    for (slong k = 0; k < n; ++k)
        EXPECT_NEAR(arf_get_d(arb_midref(x[k]), ARF_RND_NEAR), ((k % 5) - 2) / static_cast<double>(30 + k), 1e-15);
}

TEST(Krylov, DenseInnerSolveGivesTheSameDigitsInTheSameNewtonSteps)
{
    // The dense path (bench/fast_vs_dense) differs only in the linear solve of each step.
    newton::RefineOptions o;
    o.method = newton::RefineMethod::dense;
    newton::FixedPoint d = newton::approx_refine(start_z2(), 120, o);
    o.method = newton::RefineMethod::krylov;
    newton::FixedPoint k = newton::approx_refine(start_z2(), 120, o);
    ASSERT_TRUE(d.converged) << d.message;
    ASSERT_TRUE(k.converged) << k.message;
    EXPECT_EQ(d.krylov_steps, 0);
    EXPECT_EQ(d.n, k.n);
    EXPECT_LE(std::abs(d.steps - k.steps), 1);
    EXPECT_GE(agreeing_digits(d.a, k.a), 128);
    // Source: OEIS A006891 (reference_values.hpp).
    EXPECT_GE(agreeing_digits(d.a, test_ref::alpha_z2), 104);

    newton::FixedPoint fp = newton::approx_refine(start_z2(), 70, {});
    auto seeds = spectrum::approx_eigenvalues_dense(fp.g, fp.problem, 40, 128);
    spectrum::EigenOptions eo;
    eo.method = spectrum::EigenMethod::dense;
    spectrum::Eigenpair e = spectrum::approx_refine_eigenpair(fp, seeds[0], 60, eo);
    ASSERT_TRUE(e.converged) << e.message;
    // Source: delta to 100 digits, from memory and certified (reference_values.hpp).
    EXPECT_GE(agreeing_digits(e.lambda, test_ref::delta_z2), 58);
}

// The rule for building a better preconditioner, on the block sizes a 10,000-digit run of z = 2
// meets (cap 377 digits, 1161 modes; the truncation grows 411, 813, 1615, ...).
TEST(Krylov, PreconditionerIsRebuiltUpToTheCapAndNoFurther)
{
    using newton::detail::preconditioner_improves;
    // Delta's block, built at 377 digits when the truncation was 813: the full 1161-mode block
    // is only 1.43 times larger, yet it is the cap, so it is built.
    EXPECT_TRUE(preconditioner_improves(377, 813, 377, 1161, 377, 1161));
    // At the cap: never rebuilt again.
    EXPECT_FALSE(preconditioner_improves(377, 1161, 377, 1161, 377, 1161));
    // Below the cap, 1.5 times more modes or digits is worth an LU, less is not.
    EXPECT_TRUE(preconditioner_improves(131, 211, 255, 411, 377, 1161));
    EXPECT_FALSE(preconditioner_improves(255, 700, 300, 800, 377, 1161));
    EXPECT_TRUE(preconditioner_improves(255, 411, 300, 813, 377, 1161));
    // The digits may reach the cap in a step below 1.5 times (255 -> 377).
    EXPECT_TRUE(preconditioner_improves(255, 795, 377, 795, 377, 1161));
    // More modes at fewer digits (a late step whose correction needs few digits): not built.
    EXPECT_FALSE(preconditioner_improves(377, 813, 40, 1161, 377, 1161));
    EXPECT_FALSE(preconditioner_improves(377, 1161, 13, 69, 377, 1161));
}

// Inexact Krylov: a product is asked for the digits the residual still has to lose (plus a
// guard), so the precisions fall as GMRES converges, and the solution still meets the target.
// Check value: the exact solution b_k / (1 + 0.3^k) of a diagonal system (I plus a compact part,
// like I - DT).
TEST(Krylov, RelaxedProductsAskForOnlyTheDigitsStillToGain)
{
    const slong n = 40, prec = 400; // about 120 digits: the first product needs them all
    std::vector<Ball> diag(static_cast<size_t>(n));
    for (slong k = 0; k < n; ++k) {
        arb_set_d(diag[static_cast<size_t>(k)].get(), 0.3);
        arb_pow_ui(diag[static_cast<size_t>(k)].get(), diag[static_cast<size_t>(k)].get(), static_cast<ulong>(k), prec);
        arb_add_ui(diag[static_cast<size_t>(k)].get(), diag[static_cast<size_t>(k)].get(), 1, prec);
    }
    std::vector<slong> asked;
    auto apply = [&](BallVec& y, const BallVec& x, slong p) {
        asked.push_back(p);
        y = BallVec(n);
        for (slong k = 0; k < n; ++k)
            arb_mul(y[k], x[k], diag[static_cast<size_t>(k)].get(), p);
    };
    auto identity = [](BallVec& y, const BallVec& x) { y = x; };
    BallVec rhs(n);
    for (slong k = 0; k < n; ++k)
        arb_set_si(rhs[k], (k % 7) - 3);
    BallVec x;
    const slong steps = newton::approx_fgmres(x, rhs, apply, identity, 100, 40, 0, prec);
    ASSERT_GT(steps, 4);
    ASSERT_EQ(static_cast<slong>(asked.size()), steps);
    EXPECT_EQ(asked.front(), prec); // nothing gained yet: all the digits
    for (size_t i = 1; i < asked.size(); ++i)
        EXPECT_LE(asked[i], asked[i - 1]) << "product " << i;
    EXPECT_LT(asked.back(), prec / 2);
    EXPECT_GE(asked.back(), 64); // the 20-digit guard
    // The true residual meets the 100 digits, and x is the exact solution to 98 digits.
    for (slong k = 0; k < n; ++k) {
        Ball r, e;
        arb_mul(r.get(), x[k], diag[static_cast<size_t>(k)].get(), prec);
        arb_sub(r.get(), r.get(), rhs[k], prec);
        EXPECT_LT(std::fabs(r.approx_double()), 1e-99) << "k = " << k;
        arb_div(e.get(), rhs[k], diag[static_cast<size_t>(k)].get(), prec);
        arb_sub(e.get(), e.get(), x[k], prec);
        EXPECT_LT(std::fabs(e.approx_double()), 1e-98) << "k = " << k;
    }
}
