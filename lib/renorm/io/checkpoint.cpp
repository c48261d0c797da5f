#include <renorm/io/atomic_file.hpp>
#include <renorm/io/checkpoint.hpp>
#include <renorm/io/sha256.hpp>

#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <string_view>

namespace renorm::io {

namespace {

using ball::Ball;
using ball::BallPoly;
using ball::BallVec;

constexpr std::string_view magic = "renorm-checkpoint";

void check_name(const std::string& name)
{
    if (name.empty() || name.find_first_of(" \t\r\n") != std::string::npos)
        throw std::invalid_argument("checkpoint: a stage name must be a non-empty word, got '" + name + "'");
}

// ---- writing ------------------------------------------------------------------------------

class Writer {
public:
    explicit Writer(std::string& out) : m_out(out) {}
    void line(std::string_view key, std::string_view value)
    {
        m_out.append(key);
        m_out.push_back(' ');
        m_out.append(value);
        m_out.push_back('\n');
    }
    void integer(std::string_view key, slong v) { line(key, std::to_string(v)); }
    void real(std::string_view key, double v)
    {
        // 17 significant digits read back to the same double (IEEE 754 binary64).
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.17g", v);
        line(key, buf);
    }
    void ball(std::string_view key, const Ball& b) { line(key, ball::dump(b)); }
    void balls(std::string_view key, arb_srcptr v, slong count)
    {
        integer(key, count);
        Ball b;
        for (slong i = 0; i < count; ++i) {
            arb_set(b.get(), v + i);
            m_out.append(ball::dump(b));
            m_out.push_back('\n');
        }
    }

private:
    std::string& m_out;
};

void write_fixed_point(Writer& w, const std::string& name, const newton::FixedPoint& fp)
{
    check_name(name);
    w.line("fixed-point", name);
    w.integer("n", fp.n);
    w.integer("prec", fp.prec);
    w.real("log10-residual", fp.log10_residual);
    w.integer("steps", fp.steps);
    w.integer("krylov-steps", fp.krylov_steps);
    w.real("decay-rate", fp.decay_rate);
    w.integer("converged", fp.converged ? 1 : 0);
    char buf[96];
    std::snprintf(buf, sizeof buf, "%.17g %.17g", fp.problem.disc.centre, fp.problem.disc.radius);
    w.line("disc", buf);
    w.ball("a", fp.a);
    w.balls("g", fp.g.get()->coeffs, fp.g.length());
}

void write_eigenpair(Writer& w, const std::string& name, const spectrum::Eigenpair& ep)
{
    check_name(name);
    w.line("eigenpair", name);
    w.integer("n", ep.n);
    w.integer("prec", ep.prec);
    w.real("log10-residual", ep.log10_residual);
    w.integer("steps", ep.steps);
    w.integer("converged", ep.converged ? 1 : 0);
    w.ball("lambda", ep.lambda);
    w.balls("h", ep.h.get()->coeffs, ep.h.length());
}

void write_state(Writer& w, const std::string& name, const newton::KrylovState& s)
{
    check_name(name);
    w.line("running", name);
    w.integer("n", s.n);
    w.real("digits", s.digits);
    w.integer("step", s.step);
    w.integer("krylov-total", s.krylov_total);
    w.integer("n-final", s.n_final);
    w.integer("pc-size", s.pc_size);
    w.integer("pc-prec", s.pc_prec);
    w.real("pc-digits", s.pc_digits);
    w.balls("x", s.x.data(), s.x.size());
    w.balls("pc-point", s.pc_point.data(), s.pc_point.size());
    if (s.f.size() > 0) { // inside a Newton step (optional: absent between steps)
        w.real("f-log10", s.f_log10);
        w.balls("f", s.f.data(), s.f.size());
        w.integer("inner-restarts", s.inner_restarts);
        w.integer("inner-steps", s.inner_steps);
        w.balls("inner", s.inner.data(), s.inner.size());
    }
}

// ---- reading ------------------------------------------------------------------------------

class Reader {
public:
    explicit Reader(std::string_view text) : m_s(text) {}

    bool at_end() const { return m_pos >= m_s.size(); }

    [[noreturn]] void fail(const std::string& what) const
    {
        throw std::invalid_argument("line " + std::to_string(m_line) + ": " + what);
    }

    std::string_view next_line(std::string_view expected)
    {
        if (at_end())
            throw std::invalid_argument("truncated after line " + std::to_string(m_line) + " (expected " +
                                        std::string(expected) + ")");
        const size_t end = m_s.find('\n', m_pos);
        const size_t stop = end == std::string_view::npos ? m_s.size() : end;
        std::string_view l = m_s.substr(m_pos, stop - m_pos);
        m_pos = stop + 1;
        ++m_line;
        return l;
    }

    /// The word after the first space of a line "key value"; the line must start with `key`.
    std::string_view peek_key() const
    {
        const size_t end = m_s.find_first_of(" \n", m_pos);
        return m_s.substr(m_pos, (end == std::string_view::npos ? m_s.size() : end) - m_pos);
    }

    std::string value(std::string_view key)
    {
        std::string_view l = next_line("'" + std::string(key) + " ...'");
        if (l.size() <= key.size() || l.substr(0, key.size()) != key || l[key.size()] != ' ')
            fail("expected '" + std::string(key) + " ...', got '" + shorten(l) + "'");
        return std::string(l.substr(key.size() + 1));
    }

    slong integer(std::string_view key, slong lo, slong hi)
    {
        const std::string v = value(key);
        errno = 0;
        char* end = nullptr;
        const long long x = std::strtoll(v.c_str(), &end, 10);
        if (v.empty() || *end != '\0' || errno != 0 || x < lo || x > hi)
            fail("'" + std::string(key) + "' must be an integer in [" + std::to_string(lo) + ", " +
                 std::to_string(hi) + "], got '" + shorten(v) + "'");
        return static_cast<slong>(x);
    }

    double real_text(std::string_view key, const std::string& v)
    {
        char* end = nullptr;
        const double x = std::strtod(v.c_str(), &end);
        if (v.empty() || *end != '\0' || std::isspace(static_cast<unsigned char>(v[0])))
            fail("'" + std::string(key) + "' must be a number, got '" + shorten(v) + "'");
        return x;
    }

    double real(std::string_view key) { return real_text(key, value(key)); }

    Ball ball_text(std::string_view key, const std::string& v)
    {
        std::optional<Ball> b = ball::load(v);
        if (!b)
            fail("'" + std::string(key) + "' is not an exact ball (mid and radius in hexadecimal), got '" +
                 shorten(v) + "'");
        return std::move(*b);
    }

    Ball ball(std::string_view key) { return ball_text(key, value(key)); }

    /// "key count" and `count` lines of one ball each.
    BallVec balls(std::string_view key)
    {
        // Each ball line has at least 8 bytes ("0 0 0 0\n"): a larger count cannot be in the file,
        // and refusing it here avoids allocating for a corrupted count.
        const slong most = static_cast<slong>((m_s.size() - std::min(m_pos, m_s.size())) / 8);
        const slong count = integer(key, 0, most);
        BallVec v(count);
        for (slong i = 0; i < count; ++i) {
            std::string_view l = next_line(std::string(key) + " entry " + std::to_string(i));
            std::optional<Ball> b = ball::load(std::string(l));
            if (!b)
                fail("'" + std::string(key) + "' entry " + std::to_string(i) + " is not an exact ball, got '" +
                     shorten(l) + "'");
            arb_swap(v[i], b->get());
        }
        return v;
    }

    BallPoly poly(std::string_view key)
    {
        BallVec v = balls(key);
        BallPoly p;
        arb_poly_fit_length(p.get(), v.size());
        for (slong i = 0; i < v.size(); ++i)
            arb_swap(p.get()->coeffs + i, v[i]);
        _arb_poly_set_length(p.get(), v.size());
        _arb_poly_normalise(p.get());
        return p;
    }

    static std::string shorten(std::string_view s)
    {
        return s.size() <= 60 ? std::string(s) : std::string(s.substr(0, 57)) + "...";
    }

private:
    std::string_view m_s;
    size_t m_pos = 0;
    long m_line = 0;
};

constexpr slong max_count = std::numeric_limits<slong>::max() / 4;
constexpr slong max_prec = slong{1} << 40;

newton::FixedPoint read_fixed_point(Reader& r, const std::string& order)
{
    newton::FixedPoint fp;
    fp.problem.order = order;
    fp.n = r.integer("n", 1, max_count);
    fp.prec = r.integer("prec", 2, max_prec);
    fp.log10_residual = r.real("log10-residual");
    fp.steps = r.integer("steps", 0, max_count);
    fp.krylov_steps = r.integer("krylov-steps", 0, max_count);
    fp.decay_rate = r.real("decay-rate");
    fp.converged = r.integer("converged", 0, 1) == 1;
    {
        const std::string disc = r.value("disc");
        const size_t sp = disc.find(' ');
        if (sp == std::string::npos)
            r.fail("'disc' must be two numbers (centre radius), got '" + Reader::shorten(disc) + "'");
        fp.problem.disc.centre = r.real_text("disc centre", disc.substr(0, sp));
        fp.problem.disc.radius = r.real_text("disc radius", disc.substr(sp + 1));
        if (!(fp.problem.disc.radius > 0) || !std::isfinite(fp.problem.disc.centre))
            r.fail("'disc' must have a finite centre and a positive radius");
    }
    fp.a = r.ball("a");
    fp.g = r.poly("g");
    if (fp.g.length() > fp.n)
        r.fail("the fixed point has more coefficients than its truncation n = " + std::to_string(fp.n));
    return fp;
}

spectrum::Eigenpair read_eigenpair(Reader& r)
{
    spectrum::Eigenpair ep;
    ep.n = r.integer("n", 1, max_count);
    ep.prec = r.integer("prec", 2, max_prec);
    ep.log10_residual = r.real("log10-residual");
    ep.steps = r.integer("steps", 0, max_count);
    ep.converged = r.integer("converged", 0, 1) == 1;
    ep.lambda = r.ball("lambda");
    ep.h = r.poly("h");
    if (ep.h.length() > ep.n)
        r.fail("the eigenvector has more coefficients than its truncation n = " + std::to_string(ep.n));
    return ep;
}

newton::KrylovState read_state(Reader& r)
{
    newton::KrylovState s;
    s.n = r.integer("n", 1, max_count);
    s.digits = r.real("digits");
    s.step = r.integer("step", 0, max_count);
    s.krylov_total = r.integer("krylov-total", 0, max_count);
    s.n_final = r.integer("n-final", 0, max_count);
    s.pc_size = r.integer("pc-size", 0, max_count);
    s.pc_prec = r.integer("pc-prec", 0, max_prec);
    s.pc_digits = r.real("pc-digits");
    s.x = r.balls("x");
    if (s.x.size() < s.n || s.x.size() > s.n + 1)
        r.fail("the iterate has " + std::to_string(s.x.size()) + " entries for truncation n = " +
               std::to_string(s.n) + " (expected n or n + 1)");
    s.pc_point = r.balls("pc-point");
    if (s.pc_point.size() > 0 && (s.pc_point.size() < s.pc_size || s.pc_prec < 2 || s.pc_size < 1))
        r.fail("the preconditioner's point does not fit its size " + std::to_string(s.pc_size) +
               " and precision " + std::to_string(s.pc_prec));
    if (!std::isfinite(s.digits) || !std::isfinite(s.pc_digits))
        r.fail("'digits' and 'pc-digits' must be finite");
    if (!r.at_end() && r.peek_key() == "f-log10") {
        s.f_log10 = r.real("f-log10");
        if (!std::isfinite(s.f_log10))
            r.fail("'f-log10' must be finite");
        s.f = r.balls("f");
        if (s.f.size() < s.x.size())
            r.fail("the saved residual has " + std::to_string(s.f.size()) + " entries, fewer than the iterate's " +
                   std::to_string(s.x.size()));
        s.inner_restarts = r.integer("inner-restarts", 1, max_count);
        s.inner_steps = r.integer("inner-steps", 0, max_count);
        s.inner = r.balls("inner");
        if (s.inner.size() < 1 || s.inner.size() > s.f.size())
            r.fail("the saved correction has " + std::to_string(s.inner.size()) + " entries for a residual of " +
                   std::to_string(s.f.size()));
    }
    return s;
}

Checkpoint parse_body(Reader& r)
{
    Checkpoint c;
    r.next_line("the header"); // checked by the caller
    {
        const std::string w = r.value("written-by");
        const size_t sp = w.find(' ');
        c.version = w.substr(0, sp);
        c.commit = sp == std::string::npos ? "" : w.substr(sp + 1);
    }
    c.order = r.value("order");
    if (c.order.empty() || c.order.find(' ') != std::string::npos)
        r.fail("'order' must be one number");
    c.digits = r.integer("digits", 1, max_count);
    c.eigenvalues = r.integer("eigenvalues", 0, 1000);
    c.basis = r.value("basis");
    if (c.basis != "taylor" && c.basis != "chebyshev")
        r.fail("'basis' must be taylor or chebyshev, got '" + Reader::shorten(c.basis) + "'");
    if (!r.at_end() && r.peek_key() == "seconds") {
        c.seconds = r.real("seconds");
        if (!std::isfinite(c.seconds) || c.seconds < 0)
            r.fail("'seconds' must be a finite number >= 0");
    }
    while (!r.at_end()) {
        const std::string_view key = r.peek_key();
        if (key == "fixed-point") {
            const std::string name = r.value("fixed-point");
            if (c.fixed_points.count(name) || c.eigenpairs.count(name))
                r.fail("stage '" + name + "' appears twice");
            c.fixed_points.emplace(name, read_fixed_point(r, c.order));
        } else if (key == "eigenpair") {
            const std::string name = r.value("eigenpair");
            if (c.fixed_points.count(name) || c.eigenpairs.count(name))
                r.fail("stage '" + name + "' appears twice");
            c.eigenpairs.emplace(name, read_eigenpair(r));
        } else if (key == "running") {
            if (!c.running.empty())
                r.fail("two running stages");
            c.running = r.value("running");
            c.state = read_state(r);
        } else {
            r.next_line("");
            r.fail("expected 'fixed-point', 'eigenpair' or 'running', got '" + Reader::shorten(key) + "'");
        }
    }
    return c;
}

} // namespace

std::string checkpoint_text(const Checkpoint& c)
{
    // One string, sized up front: the running state alone can be tens of megabytes.
    size_t bytes = 4096;
    auto ball_bytes = [](arb_srcptr v, slong n) {
        size_t b = 0;
        for (slong i = 0; i < n; ++i)
            b += static_cast<size_t>(arf_bits(arb_midref(v + i))) / 4 + 48;
        return b;
    };
    for (const auto& [name, fp] : c.fixed_points)
        bytes += ball_bytes(fp.g.get()->coeffs, fp.g.length()) + 512;
    for (const auto& [name, ep] : c.eigenpairs)
        bytes += ball_bytes(ep.h.get()->coeffs, ep.h.length()) + 512;
    bytes += ball_bytes(c.state.x.data(), c.state.x.size()) +
             ball_bytes(c.state.pc_point.data(), c.state.pc_point.size());
    std::string out;
    out.reserve(bytes);
    Writer w(out);
    w.integer(magic, checkpoint_format_version);
    w.line("written-by", c.version + " " + c.commit);
    if (c.order.empty() || c.order.find_first_of(" \n") != std::string::npos)
        throw std::invalid_argument("checkpoint: the order must be one number, got '" + c.order + "'");
    w.line("order", c.order);
    w.integer("digits", c.digits);
    w.integer("eigenvalues", c.eigenvalues);
    w.line("basis", c.basis);
    if (c.seconds >= 0)
        w.real("seconds", c.seconds);
    for (const auto& [name, fp] : c.fixed_points)
        write_fixed_point(w, name, fp);
    for (const auto& [name, ep] : c.eigenpairs)
        write_eigenpair(w, name, ep);
    if (!c.running.empty())
        write_state(w, c.running, c.state);
    w.line("sha256", sha256_hex(out));
    return out;
}

Checkpoint parse_checkpoint(const std::string& text)
{
    // The header first, so that another format or version gets its own message.
    const size_t eol = text.find('\n');
    const std::string first = text.substr(0, std::min(eol, size_t{80}));
    if (first.rfind(std::string(magic) + " ", 0) != 0)
        throw std::invalid_argument("not a renorm checkpoint (the first line is not '" + std::string(magic) +
                                    " <version>')");
    const std::string ver = first.substr(magic.size() + 1);
    if (ver != std::to_string(checkpoint_format_version))
        throw std::invalid_argument("checkpoint format version '" + ver + "' is not supported (this renorm reads version " +
                                    std::to_string(checkpoint_format_version) + ")");
    // The digest line ends the file: without it the file was cut short; with a different digest
    // it was altered.
    const std::string_view tv(text);
    if (tv.empty() || tv.back() != '\n')
        throw std::invalid_argument("truncated checkpoint (it does not end with a complete line)");
    const size_t last = tv.rfind('\n', tv.size() - 2);
    const size_t start = last == std::string_view::npos ? 0 : last + 1;
    const std::string_view digest_line = tv.substr(start, tv.size() - 1 - start);
    if (digest_line.rfind("sha256 ", 0) != 0)
        throw std::invalid_argument("truncated checkpoint (the final sha256 line is missing)");
    const std::string_view body = tv.substr(0, start);
    if (sha256_hex(std::string(body)) != digest_line.substr(7))
        throw std::invalid_argument("corrupted checkpoint (the sha256 of its contents does not match)");
    Reader r(body);
    return parse_body(r);
}

void write_checkpoint(const std::string& path, const Checkpoint& c)
{
    write_file_atomic(path, checkpoint_text(c));
}

Checkpoint read_checkpoint(const std::string& path)
{
    std::ifstream in(path, std::ios::binary);
    if (!in)
        throw std::invalid_argument("cannot read checkpoint '" + path + "'");
    std::ostringstream ss;
    ss << in.rdbuf();
    if (!in.good() && !in.eof())
        throw std::invalid_argument("cannot read checkpoint '" + path + "'");
    try {
        return parse_checkpoint(ss.str());
    } catch (const std::invalid_argument& e) {
        throw std::invalid_argument("checkpoint '" + path + "': " + e.what());
    }
}

} // namespace renorm::io
