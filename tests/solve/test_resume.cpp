// Checkpoint and resume of a whole solve (solve::Request::checkpoint_path / resume): a run
// interrupted after any Newton step or stage and resumed gives bit for bit the uninterrupted
// result. The check values are the uninterrupted run's own (the property is identity), plus the
// published 100 digits of alpha and delta (reference_values.hpp, sources named there) as a
// sanity check of that run.
#include "reference_values.hpp"

#include <renorm/io/checkpoint.hpp>
#include <renorm/solve/solve.hpp>

#include <gtest/gtest.h>

#include <cstdio>
#include <string>
#include <vector>

using namespace renorm;

namespace {

struct Interrupt {};

solve::Request request_150()
{
    solve::Request q;
    q.digits = 150;
    q.eigenvalues = 2;
    return q;
}

void expect_same_estimate(const solve::Estimate& a, const solve::Estimate& b, const std::string& what)
{
    EXPECT_TRUE(arb_equal(a.value.get(), b.value.get())) << what;
    EXPECT_EQ(a.text, b.text) << what;
    EXPECT_EQ(a.stable_digits, b.stable_digits) << what;
    EXPECT_EQ(a.log10_error, b.log10_error) << what;
}

void expect_same_result(const solve::Result& a, const solve::Result& b, const std::string& where)
{
    ASSERT_TRUE(b.converged) << where << ": " << b.message;
    expect_same_estimate(a.alpha, b.alpha, "alpha, " + where);
    expect_same_estimate(a.delta, b.delta, "delta, " + where);
    EXPECT_EQ(a.n, b.n) << where;
    EXPECT_EQ(a.n_check, b.n_check) << where;
    EXPECT_EQ(a.prec, b.prec) << where;
    EXPECT_EQ(a.log10_residual, b.log10_residual) << where;
    EXPECT_EQ(a.fixed_point.steps, b.fixed_point.steps) << where;
    EXPECT_EQ(a.fixed_point.krylov_steps, b.fixed_point.krylov_steps) << where;
    EXPECT_TRUE(arb_poly_equal(a.coefficients.get(), b.coefficients.get())) << where;
    ASSERT_EQ(a.eigenvalues.size(), b.eigenvalues.size()) << where;
    for (size_t i = 0; i < a.eigenvalues.size(); ++i) {
        EXPECT_EQ(a.eigenvalues[i].is_refined, b.eigenvalues[i].is_refined) << where;
        expect_same_estimate(a.eigenvalues[i].refined, b.eigenvalues[i].refined,
                             "eigenvalue " + std::to_string(i + 1) + ", " + where);
    }
}

/// The uninterrupted run and every checkpoint it takes (computed once for all tests here).
struct Reference {
    solve::Result result;
    std::vector<io::Checkpoint> checkpoints;
};

const Reference& reference()
{
    static const Reference ref = [] {
        Reference r;
        solve::Request q = request_150();
        q.on_checkpoint = [&](const io::Checkpoint& c) { r.checkpoints.push_back(c); };
        r.result = solve::solve_constants(q);
        return r;
    }();
    return ref;
}

} // namespace

TEST(Resume, TheReferenceRunIsRightAndCheckpointsEveryStage)
{
    const Reference& ref = reference();
    ASSERT_TRUE(ref.result.converged) << ref.result.message;
    // alpha and delta to 100 digits: reference_values.hpp (OEIS A006891 and A006890).
    EXPECT_EQ(ref.result.alpha.text.substr(0, 101), std::string(test_ref::alpha_z2).substr(0, 101));
    EXPECT_EQ(ref.result.delta.text.substr(0, 101), std::string(test_ref::delta_z2).substr(0, 101));
    EXPECT_GE(ref.result.delta.stable_digits, 150);
    // Every stage finishes into the checkpoint; Newton steps are recorded in between.
    const io::Checkpoint& last = ref.checkpoints.back();
    EXPECT_TRUE(last.running.empty());
    EXPECT_EQ(last.fixed_points.size(), 2u);
    EXPECT_GE(last.eigenpairs.size(), 2u);
    size_t running = 0;
    for (const io::Checkpoint& c : ref.checkpoints)
        running += c.running.empty() ? 0 : 1;
    EXPECT_GE(running, 6u) << "Newton steps of the fixed-point and delta stages";
    // The request recorded in the checkpoint.
    EXPECT_EQ(last.order, "2");
    EXPECT_EQ(last.digits, 150);
    EXPECT_EQ(last.eigenvalues, 2);
    EXPECT_EQ(last.basis, "taylor");
}

TEST(Resume, FromAnyCheckpointGivesTheIdenticalResult)
{
    const Reference& ref = reference();
    ASSERT_TRUE(ref.result.converged) << ref.result.message;
    const size_t count = ref.checkpoints.size();
    ASSERT_GE(count, 4u);
    // Every other checkpoint, and the first and last: after Newton steps of every stage and at
    // stage boundaries (each resumed through the text format, as from a file).
    for (size_t k = 0; k < count; k += (k + 2 < count ? 2 : 1)) {
        const io::Checkpoint c = io::parse_checkpoint(io::checkpoint_text(ref.checkpoints[k]));
        solve::Request q = request_150();
        q.resume = &c;
        const std::string where = "resumed from checkpoint " + std::to_string(k + 1) + " of " +
                                  std::to_string(count) + " (running '" + c.running + "')";
        expect_same_result(ref.result, solve::solve_constants(q), where);
    }
}

TEST(Resume, AnInterruptedRunResumedFromItsFileGivesTheIdenticalResult)
{
    const Reference& ref = reference();
    ASSERT_TRUE(ref.result.converged) << ref.result.message;
    const std::string path = ::testing::TempDir() + "renorm_test_resume.ckpt";
    // Interrupt at the 2nd checkpoint (a Newton step of the fixed point at N), resume from the
    // file and interrupt that run at its 6th checkpoint (a Newton step of delta at N: after two
    // stage boundaries and three Newton steps), then resume from the file again to the end.
    solve::Request q = request_150();
    q.checkpoint_path = path;
    int seen = 0;
    q.on_checkpoint = [&](const io::Checkpoint&) {
        if (++seen == 2)
            throw Interrupt{};
    };
    EXPECT_THROW(solve::solve_constants(q), Interrupt);
    io::Checkpoint first = io::read_checkpoint(path);
    EXPECT_EQ(first.running, "fixed-point@N");

    solve::Request q2 = request_150();
    q2.checkpoint_path = path;
    q2.resume = &first;
    seen = 0;
    q2.on_checkpoint = [&](const io::Checkpoint&) {
        if (++seen == 6)
            throw Interrupt{};
    };
    EXPECT_THROW(solve::solve_constants(q2), Interrupt);
    io::Checkpoint second = io::read_checkpoint(path);
    EXPECT_EQ(second.fixed_points.size(), 2u);
    EXPECT_EQ(second.running, "delta@N");
    EXPECT_GE(second.state.step, 1);

    solve::Request q3 = request_150();
    q3.checkpoint_path = path;
    q3.resume = &second;
    expect_same_result(ref.result, solve::solve_constants(q3), "resumed twice from the file");
    // The finished file holds every stage: resuming it again only reuses them.
    io::Checkpoint done = io::read_checkpoint(path);
    EXPECT_TRUE(done.running.empty());
    solve::Request q4 = request_150();
    q4.resume = &done;
    int newton_steps = 0;
    q4.on_checkpoint = [&](const io::Checkpoint&) { ++newton_steps; };
    const solve::Result again = solve::solve_constants(q4);
    expect_same_result(ref.result, again, "resumed from the finished file");
    EXPECT_EQ(newton_steps, 0) << "no stage may run again";
    // The seconds of the three sittings add up in the file and in the result.
    EXPECT_GT(done.seconds, 0.0);
    EXPECT_GE(again.total_seconds, done.seconds);
    EXPECT_LT(again.seconds, again.total_seconds);
    done.seconds = -1; // a file that does not record them
    EXPECT_EQ(solve::solve_constants(q4).total_seconds, -1.0);
    std::remove(path.c_str());
}

TEST(Resume, StatusOfACheckpointNamesEachStageAndHowFarItGot)
{
    const Reference& ref = reference();
    ASSERT_TRUE(ref.result.converged) << ref.result.message;
    using State = solve::StageStatus::State;
    // The first checkpoint saved while delta@N runs: both fixed points finished, with alpha.
    const io::Checkpoint* mid = nullptr;
    for (const io::Checkpoint& c : ref.checkpoints)
        if (c.running == "delta@N" && c.state.step >= 1) {
            mid = &c;
            break;
        }
    ASSERT_NE(mid, nullptr);
    const std::vector<solve::StageStatus> s = solve::checkpoint_status(*mid);
    ASSERT_EQ(s.size(), 8u); // fixed point, delta and 2 eigenvalues, each at N and 1.2 N
    EXPECT_EQ(s[0].name, "fixed-point@N");
    EXPECT_EQ(s[0].state, State::finished);
    EXPECT_EQ(s[1].name, "fixed-point@1.2N");
    EXPECT_EQ(s[1].state, State::finished);
    EXPECT_GT(s[1].n, s[0].n);
    EXPECT_LT(s[1].log10_residual, -150);
    // alpha to 20 digits; the first 17 are those of OEIS A006891 (reference_values.hpp), the
    // 20th is rounded
    for (int k : {0, 1}) {
        EXPECT_EQ(s[k].value.size(), 21u) << s[k].value; // 20 digits and the point
        EXPECT_EQ(s[k].value.substr(0, 18), std::string(test_ref::alpha_z2).substr(0, 18));
    }
    EXPECT_EQ(s[2].name, "delta@N");
    EXPECT_EQ(s[2].state, State::running);
    EXPECT_EQ(s[2].step, mid->state.step);
    EXPECT_EQ(s[2].n, mid->state.n);
    EXPECT_GT(s[2].digits, 10.0);
    EXPECT_EQ(s[2].inner_steps, -1) << "saved between two Newton steps";
    for (size_t k = 3; k < s.size(); ++k)
        EXPECT_EQ(s[k].state, State::waiting) << s[k].name;
    EXPECT_EQ(s[7].name, "eigenvalue-2@1.2N");
    // Saved inside a Newton step (as at a GMRES restart of a long run): that step's truncation,
    // residual and Krylov steps so far.
    io::Checkpoint inside = *mid;
    inside.state.f = ball::BallVec(mid->state.n + 7);
    inside.state.f_log10 = -123.5;
    inside.state.inner_steps = 5;
    const solve::StageStatus r = solve::checkpoint_status(inside)[2];
    EXPECT_EQ(r.inner_steps, 5);
    EXPECT_EQ(r.step_n, mid->state.n + 6) << "the eigenvalue is not a coefficient";
    EXPECT_EQ(r.step_log10_residual, -123.5);
    // The finished run: delta at both truncations, to 20 digits (OEIS A006890's first 17).
    const std::vector<solve::StageStatus> done = solve::checkpoint_status(ref.checkpoints.back());
    for (int k : {2, 3}) {
        EXPECT_EQ(done[k].state, State::finished) << done[k].name;
        EXPECT_EQ(done[k].value.substr(0, 18), std::string(test_ref::delta_z2).substr(0, 18));
    }
}

TEST(Resume, AMismatchingRequestIsRefusedNamingTheDifference)
{
    const Reference& ref = reference();
    ASSERT_FALSE(ref.checkpoints.empty());
    const io::Checkpoint& c = ref.checkpoints.front();
    struct Case {
        void (*edit)(solve::Request&);
        const char* expect;
    };
    const Case cases[] = {
        {[](solve::Request& q) { q.digits = 151; }, "--digits 150, this run asks for --digits 151"},
        {[](solve::Request& q) { q.order = "2.0"; }, "--order 2, this run asks for --order 2.0"},
        {[](solve::Request& q) { q.eigenvalues = 1; }, "--eigenvalues 2, this run asks for --eigenvalues 1"},
        {[](solve::Request& q) { q.basis = solve::Basis::chebyshev; }, "--basis taylor, this run asks for --basis chebyshev"},
    };
    for (const Case& k : cases) {
        solve::Request q = request_150();
        k.edit(q);
        q.resume = &c;
        try {
            solve::solve_constants(q);
            ADD_FAILURE() << "accepted a checkpoint for another request: " << k.expect;
        } catch (const std::invalid_argument& e) {
            EXPECT_NE(std::string(e.what()).find(k.expect), std::string::npos) << e.what();
        }
    }
    // A stage this request does not run, and a running state of the wrong shape.
    io::Checkpoint odd = c;
    odd.running = "eigenvalue-7@N";
    solve::Request q = request_150();
    EXPECT_THROW(solve::check_resume(q, odd), std::invalid_argument);
    io::Checkpoint shape = c;
    ASSERT_EQ(shape.running, "fixed-point@N");
    shape.state.x = ball::BallVec(shape.state.n + 1);
    EXPECT_THROW(solve::check_resume(q, shape), std::invalid_argument);
}

TEST(Resume, ChebyshevBasisRefusesCheckpoints)
{
    solve::Request q;
    q.order = "8";
    q.digits = 20;
    q.checkpoint_path = ::testing::TempDir() + "renorm_never_written.ckpt";
    try {
        solve::validate(q, 1e10);
        FAIL() << "the Chebyshev basis has no checkpoints";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("Taylor basis only"), std::string::npos) << e.what();
    }
    EXPECT_THROW(solve::solve_constants(q), std::invalid_argument);
}
