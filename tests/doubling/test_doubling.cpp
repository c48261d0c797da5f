// Source: central difference quotients of T and exact identities (DEVELOPERS.md), no recalled values.
// Tests of T and DT. The central one compares DT(G)h with a central finite-difference quotient
// of T at high precision: a wrong sign or a dropped term in either formula makes it fail.
// Sources of the check values: a central difference quotient of T (an independent route to DT),
// and two exact identities of the doubling equation derived in DEVELOPERS.md (T(G)(0) = 1 and
// DT 1 (0) = a^z at the fixed point).
#include <renorm/doubling/doubling.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <gtest/gtest.h>

using namespace renorm;
using namespace renorm::series;
using doubling::Problem;

namespace {
const newton::FixedPoint& fixed_point(const std::string& z)
{
    static std::map<std::string, newton::FixedPoint> cache;
    auto it = cache.find(z);
    if (it == cache.end()) {
        Problem p;
        p.order = z;
        it = cache.emplace(z, newton::approx_continuation(p, 40, 256)).first;
    }
    return it->second;
}

void check_dt_against_difference_quotient(const std::string& z, const BallPoly& g)
{
    Problem p;
    p.order = z;
    const slong n = 30, prec = 1200;
    // a perturbation with h(0) != 0 and h(1) != 0, so every term of DT is exercised
    const double hc[6] = {0.3, -0.2, 0.15, 0.05, -0.02, 0.01};
    BallPoly h = from_doubles(hc, 6);
    BallPoly gg = truncated(g, n);
    doubling::Linearization lin(gg, p, n, prec);
    BallPoly dth = lin.apply(h, prec);
    // (T(G + eps h) - T(G - eps h)) / (2 eps), error O(eps^2) = 2^-400
    Ball eps;
    arb_one(eps.get());
    arb_mul_2exp_si(eps.get(), eps.get(), -200);
    BallPoly eh, gp, gm;
    arb_poly_scalar_mul(eh.get(), h.get(), eps.get(), prec);
    arb_poly_add(gp.get(), gg.get(), eh.get(), prec);
    arb_poly_sub(gm.get(), gg.get(), eh.get(), prec);
    doubling::TImage tp = doubling::apply_T(gp, p, n, prec);
    doubling::TImage tm = doubling::apply_T(gm, p, n, prec);
    BallPoly fd;
    arb_poly_sub(fd.get(), tp.t.get(), tm.t.get(), prec);
    arb_poly_scalar_mul_2exp_si(fd.get(), fd.get(), 199);
    for (slong k = 0; k < n; ++k) {
        Ball d;
        arb_sub(d.get(), fd.coeff(k).get(), dth.coeff(k).get(), prec);
        EXPECT_LT(std::fabs(d.approx_double()), 1e-100)
            << "z = " << z << ", coefficient " << k << ": DT h = " << ball::approx_decimal(dth.coeff(k), 30)
            << ", difference quotient = " << ball::approx_decimal(fd.coeff(k), 30);
    }
}
} // namespace

TEST(Doubling, DerivativeMatchesDifferenceQuotientAtTheFixedPoint)
{
    check_dt_against_difference_quotient("2", fixed_point("2").g);
}

TEST(Doubling, DerivativeMatchesDifferenceQuotientAwayFromTheFixedPoint)
{
    // Away from the fixed point too (a perturbed G), and for a non-integer order.
    BallPoly g = fixed_point("2").g;
    Ball c = g.coeff(3);
    Ball bump(0.01);
    arb_add(c.get(), c.get(), bump.get(), ARF_PREC_EXACT);
    g.set_coeff(3, c);
    check_dt_against_difference_quotient("2", g);
    check_dt_against_difference_quotient("3.5", fixed_point("3.5").g);
}

TEST(Doubling, MatrixColumnsEqualTheOperatorOnMonomials)
{
    Problem p;
    const slong n = 12, prec = 256;
    BallPoly g = truncated(fixed_point("2").g, n);
    doubling::Linearization lin(g, p, n, prec);
    ball::BallMat m = lin.matrix(prec);
    for (slong k : {0, 1, 5, 11}) {
        BallPoly e;
        e.set_coeff(k, Ball(slong{1}));
        BallPoly col = lin.apply(e, prec);
        for (slong i = 0; i < n; ++i)
            EXPECT_TRUE(arb_overlaps(m.entry(i, k), col.coeff(i).get())) << i << "," << k;
    }
}

TEST(Doubling, NormalisationIsKeptAndTheQuotientEigenvalueIsAlphaToTheZ)
{
    // At the fixed point T(G)(0) = -a G(1) = 1, and DT h(0) = -a z G'(1) h(0) with
    // -a z G'(1) = a^z (differentiate G = T(G) at y = 0). Both are exact identities.
    for (const std::string z : {"2", "3.5"}) {
        Problem p;
        p.order = z;
        const slong n = 40, prec = 256;
        const BallPoly& g = fixed_point(z).g;
        doubling::TImage t = doubling::apply_T(g, p, n, prec);
        Ball s0 = p.disc.to_s(Ball(slong{0}), prec);
        Ball t0 = evaluate(t.t, s0, prec);
        EXPECT_NEAR(t0.approx_double(), 1.0, 1e-20) << "z = " << z;
        BallPoly one;
        one.set_coeff(0, Ball(slong{1}));
        doubling::Linearization lin(g, p, n, prec);
        Ball dt0 = evaluate(lin.apply(one, prec), s0, prec);
        Ball az;
        arb_pow(az.get(), t.a.get(), p.order_ball(prec).get(), prec);
        EXPECT_NEAR(dt0.approx_double() / az.approx_double(), 1.0, 1e-20) << "z = " << z;
    }
}

TEST(Doubling, UndefinedOperatorIsReportedNotComputed)
{
    Problem p;
    const double c[2] = {1.0, 0.5}; // G increasing: G(1) > 0, so a = -1/G(1) is not defined
    BallPoly g = from_doubles(c, 2);
    doubling::TImage t = doubling::apply_T(g, p, 10, 64);
    EXPECT_FALSE(t.a.is_finite());
    EXPECT_THROW(doubling::Linearization(g, p, 10, 64), std::invalid_argument);
    Problem bad;
    bad.order = "1";
    EXPECT_THROW(bad.order_ball(64), std::invalid_argument);
    bad.order = "abc";
    EXPECT_THROW(bad.order_ball(64), std::invalid_argument);
}
