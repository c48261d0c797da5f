#include <renorm/certify/proof.hpp>
#include <renorm/newton/fixed_point.hpp>

#include <gtest/gtest.h>

#include <chrono>
#include <iostream>

using namespace renorm;

namespace {
struct Solved {
    doubling::Problem problem;
    newton::FixedPoint fp;
};
Solved solve(const std::string& order, slong digits)
{
    Solved s;
    s.problem.order = order;
    newton::FixedPoint start = newton::approx_continuation(s.problem, 40, 192);
    newton::RefineOptions opt;
    s.fp = newton::approx_refine(start, digits, opt);
    return s;
}
} // namespace

TEST(Proof, Order2Alpha)
{
    auto t0 = std::chrono::steady_clock::now();
    Solved s = solve("2", 110);
    ASSERT_TRUE(s.fp.converged) << s.fp.message;
    auto t1 = std::chrono::steady_clock::now();
    slong prec = ball::digits_to_bits(130);
    certify::Certificate c = certify::certify_constants(s.problem, s.fp.g, s.fp.n, prec, 128);
    auto t2 = std::chrono::steady_clock::now();
    std::cout << "n=" << s.fp.n << " solve " << std::chrono::duration<double>(t1 - t0).count()
              << " s, certify " << std::chrono::duration<double>(t2 - t1).count() << " s\n";
    std::cout << c.message << "\n";
    std::cout << "Y=" << c.fixed_point.y.approx_double() << " Z=" << c.fixed_point.z.approx_double()
              << " rho=" << c.data.rho_g.approx_double() << " |A|=" << c.fixed_point.norm_a.approx_double()
              << " beta=" << c.fixed_point.beta.approx_double() << " Ru=" << c.fixed_point.r_u.approx_double()
              << " Rv=" << c.fixed_point.r_v.approx_double() << " eps=" << c.fixed_point.residual_eps.approx_double()
              << " dcheck=" << c.fixed_point.derivative_check.approx_double() << "\n";
    std::cout << "eig Y=" << c.eigen.y.approx_double() << " Z0=" << c.eigen.z0.approx_double()
              << " Z1=" << c.eigen.z1.approx_double() << " rho=" << c.data.rho_e.approx_double() << "\n";
    std::cout << ball::enclosure_string(c.alpha, 120) << "\n" << ball::enclosure_string(c.delta, 120) << "\n";
    EXPECT_EQ(c.status, certify::Status::certified);
}
