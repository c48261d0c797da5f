// Source: none needed - the check values are the written values themselves (round trips).
// Checkpoint files (lib/renorm/io/checkpoint.hpp): exact round trip of every field, and clear
// rejection of truncated, altered, malformed and wrong-version files. The check values are the
// written values themselves (a round trip must reproduce them bit for bit).
#include <renorm/io/checkpoint.hpp>
#include <renorm/io/sha256.hpp>

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <limits>
#include <string>

using namespace renorm;
using ball::Ball;
using ball::BallPoly;
using ball::BallVec;

namespace {

/// A ball with a long odd midpoint and a nonzero radius: pi * (k + 1) / 3 at `prec` bits.
Ball sample(slong k, slong prec)
{
    Ball b;
    arb_const_pi(b.get(), prec);
    arb_mul_si(b.get(), b.get(), k + 1, prec);
    arb_div_si(b.get(), b.get(), 3, prec);
    if (k % 2)
        arb_neg(b.get(), b.get());
    return b;
}

BallPoly sample_poly(slong n, slong prec)
{
    BallPoly p;
    for (slong k = 0; k < n; ++k)
        p.set_coeff(k, sample(k, prec));
    return p;
}

BallVec sample_vec(slong n, slong prec)
{
    BallVec v(n);
    for (slong k = 0; k < n; ++k)
        arb_set(v[k], sample(k + 7, prec).get());
    return v;
}

io::Checkpoint sample_checkpoint()
{
    io::Checkpoint c;
    c.order = "3.5";
    c.digits = 150;
    c.eigenvalues = 2;
    c.basis = "taylor";
    c.version = "1.2.3";
    c.commit = "abc123-dirty";
    newton::FixedPoint fp;
    fp.problem.order = "3.5";
    fp.problem.disc.centre = 0.55;
    fp.problem.disc.radius = 0.625;
    fp.g = sample_poly(30, 700);
    fp.a = sample(99, 700);
    fp.n = 31; // a zero last coefficient: the length is below n
    fp.prec = 700;
    fp.log10_residual = -163.12345678901234;
    fp.steps = 12;
    fp.krylov_steps = 57;
    fp.decay_rate = 1.2400000000000002;
    fp.converged = true;
    c.fixed_points["fixed-point@N"] = fp;
    spectrum::Eigenpair ep;
    ep.h = sample_poly(25, 500);
    ep.lambda = sample(5, 500);
    ep.n = 25;
    ep.prec = 500;
    ep.log10_residual = -std::numeric_limits<double>::infinity();
    ep.steps = 4;
    ep.converged = true;
    c.eigenpairs["delta@N"] = ep;
    c.running = "delta@1.2N";
    c.state.x = sample_vec(41, 900);
    c.state.n = 40;
    c.state.digits = 87.300000000000011;
    c.state.step = 3;
    c.state.krylov_total = 19;
    c.state.n_final = 50;
    c.state.pc_point = sample_vec(33, 200);
    c.state.pc_size = 32;
    c.state.pc_prec = 200;
    c.state.pc_digits = 43.5;
    // inside a Newton step: its residual at n = 45 (+ lambda) and the correction on 30 + 1 modes
    c.state.f = sample_vec(46, 900);
    c.state.f_log10 = -88.25;
    c.state.inner = sample_vec(31, 300);
    c.state.inner_restarts = 2;
    c.state.inner_steps = 16;
    return c;
}

bool same_poly(const BallPoly& a, const BallPoly& b)
{
    return a.length() == b.length() && arb_poly_equal(a.get(), b.get());
}

bool same_vec(const BallVec& a, const BallVec& b)
{
    if (a.size() != b.size())
        return false;
    for (slong i = 0; i < a.size(); ++i)
        if (!arb_equal(a[i], b[i]))
            return false;
    return true;
}

/// text with its final sha256 line recomputed: an edit the checksum does not catch.
std::string resign(std::string text)
{
    const size_t last = text.rfind("sha256 ");
    text.resize(last);
    return text + "sha256 " + io::sha256_hex(text) + "\n";
}

std::string replaced(std::string text, const std::string& from, const std::string& to)
{
    const size_t at = text.find(from);
    EXPECT_NE(at, std::string::npos) << from;
    if (at != std::string::npos)
        text.replace(at, from.size(), to);
    return text;
}

/// The message of the std::invalid_argument parse_checkpoint throws ("" when it accepts).
std::string rejection(const std::string& text)
{
    try {
        io::parse_checkpoint(text);
    } catch (const std::invalid_argument& e) {
        return e.what();
    }
    return "";
}

} // namespace

TEST(Checkpoint, RoundTripKeepsEveryBitAndEveryField)
{
    const io::Checkpoint c = sample_checkpoint();
    const std::string text = io::checkpoint_text(c);
    ASSERT_EQ(text.rfind("renorm-checkpoint 1\n", 0), 0u) << text.substr(0, 40);
    const io::Checkpoint r = io::parse_checkpoint(text);
    EXPECT_EQ(io::checkpoint_text(r), text);
    EXPECT_EQ(r.order, "3.5");
    EXPECT_EQ(r.digits, 150);
    EXPECT_EQ(r.eigenvalues, 2);
    EXPECT_EQ(r.basis, "taylor");
    EXPECT_EQ(r.version, "1.2.3");
    EXPECT_EQ(r.commit, "abc123-dirty");

    ASSERT_EQ(r.fixed_points.size(), 1u);
    const newton::FixedPoint& f = r.fixed_points.at("fixed-point@N");
    const newton::FixedPoint& f0 = c.fixed_points.at("fixed-point@N");
    EXPECT_TRUE(same_poly(f.g, f0.g));
    EXPECT_TRUE(arb_equal(f.a.get(), f0.a.get())); // midpoint and radius
    EXPECT_EQ(f.problem.order, "3.5");
    EXPECT_EQ(f.problem.disc.centre, 0.55);
    EXPECT_EQ(f.problem.disc.radius, 0.625);
    EXPECT_EQ(f.n, 31);
    EXPECT_EQ(f.prec, 700);
    EXPECT_EQ(f.log10_residual, f0.log10_residual); // exact double equality
    EXPECT_EQ(f.steps, 12);
    EXPECT_EQ(f.krylov_steps, 57);
    EXPECT_EQ(f.decay_rate, f0.decay_rate);
    EXPECT_TRUE(f.converged);

    ASSERT_EQ(r.eigenpairs.size(), 1u);
    const spectrum::Eigenpair& e = r.eigenpairs.at("delta@N");
    const spectrum::Eigenpair& e0 = c.eigenpairs.at("delta@N");
    EXPECT_TRUE(same_poly(e.h, e0.h));
    EXPECT_TRUE(arb_equal(e.lambda.get(), e0.lambda.get()));
    EXPECT_EQ(e.n, 25);
    EXPECT_EQ(e.prec, 500);
    EXPECT_TRUE(std::isinf(e.log10_residual) && e.log10_residual < 0);
    EXPECT_EQ(e.steps, 4);
    EXPECT_TRUE(e.converged);

    EXPECT_EQ(r.running, "delta@1.2N");
    EXPECT_TRUE(same_vec(r.state.x, c.state.x));
    EXPECT_TRUE(same_vec(r.state.pc_point, c.state.pc_point));
    EXPECT_EQ(r.state.n, 40);
    EXPECT_EQ(r.state.digits, c.state.digits);
    EXPECT_EQ(r.state.step, 3);
    EXPECT_EQ(r.state.krylov_total, 19);
    EXPECT_EQ(r.state.n_final, 50);
    EXPECT_EQ(r.state.pc_size, 32);
    EXPECT_EQ(r.state.pc_prec, 200);
    EXPECT_EQ(r.state.pc_digits, 43.5);
    EXPECT_TRUE(same_vec(r.state.f, c.state.f));
    EXPECT_TRUE(same_vec(r.state.inner, c.state.inner));
    EXPECT_EQ(r.state.f_log10, -88.25);
    EXPECT_EQ(r.state.inner_restarts, 2);
    EXPECT_EQ(r.state.inner_steps, 16);
}

TEST(Checkpoint, AStateBetweenNewtonStepsHasNoMidStepLines)
{
    io::Checkpoint c = sample_checkpoint();
    c.state.f = BallVec();
    c.state.inner = BallVec();
    const std::string text = io::checkpoint_text(c);
    EXPECT_EQ(text.find("\nf-log10 "), std::string::npos);
    const io::Checkpoint r = io::parse_checkpoint(text);
    EXPECT_EQ(r.state.f.size(), 0);
    EXPECT_EQ(r.state.inner.size(), 0);
    // A saved correction longer than the saved residual is refused with the line.
    io::Checkpoint bad = sample_checkpoint();
    bad.state.inner = sample_vec(47, 300);
    EXPECT_NE(rejection(io::checkpoint_text(bad)).find("the saved correction has 47 entries"), std::string::npos);
}

TEST(Checkpoint, NoRunningStageAndNoStagesRoundTrip)
{
    io::Checkpoint c;
    c.order = "2";
    c.digits = 10;
    c.eigenvalues = 0;
    c.basis = "taylor";
    const io::Checkpoint r = io::parse_checkpoint(io::checkpoint_text(c));
    EXPECT_TRUE(r.running.empty());
    EXPECT_TRUE(r.fixed_points.empty());
    EXPECT_TRUE(r.eigenpairs.empty());
    EXPECT_EQ(r.state.x.size(), 0);
    EXPECT_EQ(r.seconds, -1.0) << "a file without 'seconds' (older files) reads as unknown";
}

TEST(Checkpoint, SecondsOfAllSittingsRoundTripAndMustBeSane)
{
    io::Checkpoint c;
    c.order = "2";
    c.digits = 10;
    c.basis = "taylor";
    c.seconds = 12345.678901234567;
    const std::string text = io::checkpoint_text(c);
    EXPECT_NE(text.find("\nseconds 12345.678901234567\n"), std::string::npos) << text;
    EXPECT_EQ(io::parse_checkpoint(text).seconds, c.seconds);
    EXPECT_NE(rejection(resign(replaced(text, "seconds 12345.678901234567", "seconds -3"))).find("'seconds'"),
              std::string::npos);
    EXPECT_NE(rejection(resign(replaced(text, "seconds 12345.678901234567", "seconds inf"))).find("'seconds'"),
              std::string::npos);
}

TEST(Checkpoint, FileRoundTripThroughAtomicWrite)
{
    const std::string path = ::testing::TempDir() + "renorm_test_checkpoint.ckpt";
    const io::Checkpoint c = sample_checkpoint();
    io::write_checkpoint(path, c);
    const io::Checkpoint r = io::read_checkpoint(path);
    EXPECT_EQ(io::checkpoint_text(r), io::checkpoint_text(c));
    std::remove(path.c_str());
    try {
        io::read_checkpoint(path);
        FAIL() << "a missing file must be refused";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("cannot read checkpoint"), std::string::npos) << e.what();
    }
}

TEST(Checkpoint, WrongFormatOrVersionIsRefusedByName)
{
    EXPECT_NE(rejection("").find("not a renorm checkpoint"), std::string::npos);
    EXPECT_NE(rejection("{\"format\": \"renorm-coefficients\"}\n").find("not a renorm checkpoint"), std::string::npos);
    const std::string text = io::checkpoint_text(sample_checkpoint());
    const std::string v2 = resign(replaced(text, "renorm-checkpoint 1\n", "renorm-checkpoint 2\n"));
    EXPECT_NE(rejection(v2).find("version '2' is not supported"), std::string::npos) << rejection(v2);
}

TEST(Checkpoint, TruncatedFilesAreRefusedAtEveryLength)
{
    const std::string text = io::checkpoint_text(sample_checkpoint());
    // Every cut inside the file (a kill during a non-atomic copy, a full disc): never accepted.
    const size_t step = std::max<size_t>(1, text.size() / 97);
    for (size_t len = 20; len < text.size(); len += step) {
        const std::string msg = rejection(text.substr(0, len));
        EXPECT_FALSE(msg.empty()) << "accepted a file cut at byte " << len;
        EXPECT_TRUE(msg.find("truncated") != std::string::npos || msg.find("corrupted") != std::string::npos)
            << msg;
    }
    EXPECT_NE(rejection(text.substr(0, text.size() - 1)).find("truncated"), std::string::npos);
}

TEST(Checkpoint, AlteredContentFailsTheChecksum)
{
    const std::string text = io::checkpoint_text(sample_checkpoint());
    std::string bad = text;
    const size_t at = bad.find("\nx ") + 40; // inside a ball of the iterate
    bad[at] = bad[at] == '1' ? '2' : '1';
    EXPECT_NE(rejection(bad).find("corrupted"), std::string::npos) << rejection(bad);
}

TEST(Checkpoint, MalformedContentWithAValidChecksumIsRefusedWithTheLine)
{
    const std::string text = io::checkpoint_text(sample_checkpoint());
    struct Case {
        std::string from, to, expect;
    };
    const Case cases[] = {
        {"digits 150\n", "digits abc\n", "'digits' must be an integer"},
        {"digits 150\n", "digits 0\n", "'digits' must be an integer"},
        {"basis taylor\n", "basis fourier\n", "'basis' must be taylor or chebyshev"},
        {"eigenvalues 2\n", "", "expected 'eigenvalues ...'"},
        {"fixed-point fixed-point@N\n", "fixed-point-x fixed-point@N\n", "expected 'fixed-point', 'eigenpair'"},
        {"log10-residual -163", "log10-residual x163", "'log10-residual' must be a number"},
        {"converged 1\n", "converged 2\n", "'converged' must be an integer in [0, 1]"},
        {"disc 0.55", "disc 0.55x", "'disc centre' must be a number"},
        {"\ng 30\n", "\ng 99999999999999\n", "'g' must be an integer in [0, "},
        {"\nn 40\n", "\nn 38\n", "expected n or n + 1"},
        {"pc-size 32\n", "pc-size 34\n", "does not fit its size 34"},
        {"\nlambda ", "\nlambda zz", "'lambda' is not an exact ball"},
        {"running delta@1.2N\n", "", "expected 'fixed-point', 'eigenpair' or 'running'"},
    };
    for (const Case& c : cases) {
        const std::string msg = rejection(resign(replaced(text, c.from, c.to)));
        EXPECT_NE(msg.find(c.expect), std::string::npos) << "edit '" << c.from << "' -> '" << c.to << "': " << msg;
        EXPECT_NE(msg.find("line "), std::string::npos) << msg;
    }
    // Ball text that Arb itself would abort on (a negative radius mantissa, a zero mantissa with
    // an exponent Arb never writes): refused, not aborted.
    const size_t g = text.find("\ng 30\n") + 6;
    const size_t g_end = text.find('\n', g);
    for (const char* bad : {"1 0 -1 0", "0 5 0 0", "1 0 1 0 1", "1  0 1 0", "", "1 0 7fffffffffff 0"}) {
        std::string t = text;
        t.replace(g, g_end - g, bad);
        const std::string msg = rejection(resign(t));
        EXPECT_NE(msg.find("'g' entry 0 is not an exact ball"), std::string::npos) << bad << ": " << msg;
    }
    // Two running stages, a stage twice.
    const size_t run = text.find("running ");
    const size_t sha = text.rfind("sha256 ");
    const std::string twice = text.substr(0, sha) + text.substr(run, sha - run);
    EXPECT_NE(rejection(resign(twice + "sha256 x\n")).find("two running stages"), std::string::npos);
    const size_t fp = text.find("fixed-point ");
    const size_t ep = text.find("eigenpair ");
    const std::string dup = text.substr(0, ep) + text.substr(fp, ep - fp) + text.substr(ep);
    EXPECT_NE(rejection(resign(dup)).find("appears twice"), std::string::npos);
}

TEST(Checkpoint, StageNamesMustBeWords)
{
    io::Checkpoint c = sample_checkpoint();
    c.running = "delta at N";
    EXPECT_THROW(io::checkpoint_text(c), std::invalid_argument);
}
