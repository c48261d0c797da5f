// `renorm plot WHAT --out FILE.svg|FILE.png`: pictures of a real run, drawn by gnuplot.
// The data come from lib/ (solve, cascade); this file turns them into one gnuplot script with
// the data inline (datablocks) and pipes it to gnuplot. --script keeps the script.
#include "commands.hpp"

#include <renorm/cascade/cascade.hpp>
#include <renorm/solve/solve.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <memory>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>

namespace renorm::app {

namespace {

struct PlotArgs {
    std::string what;
    std::string out;
    std::string order = "2";
    slong digits = 0; ///< 0: the default of each picture
    std::string family = "quadratic";
    int levels = 0;   ///< 0: the default of each picture
    int eigenvalues = 12;
    std::string script;
    bool quiet = false;
};

const std::vector<std::string> plot_kinds = {"fixed-point", "coefficients", "spectrum", "cascade",
                                             "bifurcation"};

/// A double for display (never for a bound).
double d(const ball::Ball& b) { return b.approx_double(); }

/// log10 |x| through Arb (no underflow for tiny coefficients). -inf for 0.
double log10_abs(const ball::Ball& x)
{
    ball::Ball t;
    arb_abs(t.get(), x.get());
    if (arb_is_zero(t.get()))
        return -INFINITY;
    arb_log_base_ui(t.get(), t.get(), 10, 64);
    return t.approx_double();
}

std::string quoted(const std::string& s)
{
    std::string q = "'";
    for (char c : s)
        q += (c == '\'') ? std::string("''") : std::string(1, c);
    return q + "'";
}

/// A gnuplot double-quoted string; "\n" in `s` becomes a line break.
std::string dquoted(const std::string& s)
{
    std::string q = "\"";
    for (char c : s) {
        if (c == '"' || c == '\\')
            q += '\\';
        if (c == '\n')
            q += "\\n";
        else
            q += c;
    }
    return q + "\"";
}

std::string num(double x)
{
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.10g", x);
    return buf;
}

/// The terminal line and the file extension check.
std::string terminal_for(const std::string& out, int width, int height)
{
    auto ends_with = [&](const char* ext) {
        const std::string e(ext);
        return out.size() > e.size() && out.compare(out.size() - e.size(), e.size(), e) == 0;
    };
    if (ends_with(".svg"))
        return "set terminal svg size " + std::to_string(width) + "," + std::to_string(height) +
               " dynamic enhanced font 'DejaVu Sans,15' background rgb 'white'\n";
    if (ends_with(".png"))
        return "set terminal pngcairo size " + std::to_string(width) + "," +
               std::to_string(height) +
               " enhanced font 'DejaVu Sans,12' background rgb 'white'\n";
    throw BadInput("--out must end in .svg or .png (got '" + out + "')");
}

solve::Result run_solve(const PlotArgs& a, slong digits, slong eigenvalues)
{
    solve::Request req;
    req.order = a.order;
    req.digits = digits;
    req.eigenvalues = eigenvalues;
    solve::validate(req, 4e9);
    solve::Result r = solve::solve_constants(req);
    if (!r.converged)
        throw std::runtime_error("no fixed point for z = " + a.order + ": " + r.message);
    return r;
}

/// G(y) from the coefficients in s = (y - c)/r (Horner, doubles: display only).
struct DoubleSeries {
    std::vector<double> c;
    double centre = 0.5, radius = 0.625, z = 2;
    double G(double y) const
    {
        const double s = (y - centre) / radius;
        double acc = 0;
        for (auto it = c.rbegin(); it != c.rend(); ++it)
            acc = acc * s + *it;
        return acc;
    }
    double g(double x) const { return G(std::pow(std::fabs(x), z)); }
};

std::string plot_fixed_point(const PlotArgs& a)
{
    const solve::Result r = run_solve(a, a.digits ? a.digits : 20, 0);
    DoubleSeries s;
    for (slong k = 0; k < r.fixed_point.g.length(); ++k)
        s.c.push_back(d(r.fixed_point.g.coeff(k)));
    s.centre = r.problem.disc.centre;
    s.radius = r.problem.disc.radius;
    s.z = std::stod(a.order);
    const double alpha = d(r.alpha.value);
    std::ostringstream os;
    os << "$g << EOD\n";
    for (int i = 0; i <= 800; ++i) {
        const double x = -1 + i / 400.0;
        os << num(x) << " " << num(s.g(x)) << " " << num(s.g(s.g(x))) << "\n";
    }
    os << "EOD\n$t << EOD\n";
    for (int i = 0; i <= 40; ++i) {
        const double x = -1 + i / 20.0;
        os << num(x) << " " << num(-alpha * s.g(s.g(x / alpha))) << "\n";
    }
    os << "EOD\n";
    const double b = 1 / alpha;
    os << "set title " << quoted("Fixed point of the doubling operator, z = " + a.order +
                                 ": g(x) = G(|x|^z) and -α g(g(x/α)),  α = " +
                                 r.alpha.text.substr(0, 12))
       << " noenhanced\n"
       << "set xlabel 'x (dimensionless)'\nset ylabel 'g(x) (dimensionless)'\n"
       << "set xrange [-1:1]\nset yrange [-0.82:1.2]\nset grid lc rgb '#dddddd'\n"
       << "set key at first 0, first -0.64 center center box opaque vertical\n"
       << "set object 1 rect from " << num(-b) << "," << num(-b) << " to " << num(b) << ","
       << num(b) << " fs empty border lc rgb '#2a9d8f' dt 2 lw 1.5\n"
       << "set label 1 'dashed box [-1/α, 1/α] × [-1/α, 1/α]: inside it, g(g(x)) is g turned "
          "upside down and shrunk by α' at "
       << num(-0.97) << "," << num(1.12) << " left noenhanced tc rgb '#2a9d8f'\n"
       << "plot $g using 1:2 with lines lw 3 lc rgb '#1d3557' title 'g(x)', \\\n"
       << "     $g using 1:3 with lines lw 2.5 dt 2 lc rgb '#2a9d8f' title 'g(g(x))', \\\n"
       << "     $t using 1:2 with points pt 6 ps 1.3 lw 1.5 lc rgb '#e63946' "
          "title '-α g(g(x/α)) (the doubling construction)' noenhanced\n";
    return os.str();
}

std::string plot_coefficients(const PlotArgs& a)
{
    const solve::Result r = run_solve(a, a.digits ? a.digits : 60, 0);
    const slong n = r.fixed_point.g.length();
    std::vector<double> lg(static_cast<size_t>(n));
    for (slong k = 0; k < n; ++k)
        lg[static_cast<size_t>(k)] = log10_abs(r.fixed_point.g.coeff(k));
    // Least-squares line through the last two thirds: the geometric decay rate (display only).
    double sx = 0, sy = 0, sxx = 0, sxy = 0, m = 0;
    for (slong k = n / 3; k < n; ++k) {
        const double y = lg[static_cast<size_t>(k)];
        if (!std::isfinite(y))
            continue;
        sx += k, sy += y, sxx += double(k) * k, sxy += k * y, m += 1;
    }
    const double slope = (m * sxy - sx * sy) / (m * sxx - sx * sx);
    const double icpt = (sy - slope * sx) / m;
    std::ostringstream os;
    os << "$c << EOD\n";
    for (slong k = 0; k < n; ++k)
        if (std::isfinite(lg[static_cast<size_t>(k)]))
            os << k << " " << num(lg[static_cast<size_t>(k)]) << "\n";
    os << "EOD\n";
    char rate[96];
    std::snprintf(rate, sizeof rate, "least-squares line 10^{%.2f - %.3f k}: %.2f digits per term",
                  icpt, -slope, -slope);
    os << "set title " << quoted("Coefficients of the fixed point G(y) = Σ c_k s^k, s = (y - " +
                                 num(r.problem.disc.centre) + ")/" + num(r.problem.disc.radius) +
                                 ", z = " + a.order + ", N = " + std::to_string(n))
       << " noenhanced\n"
       << "set xlabel 'index k of the coefficient'\n"
       << "set ylabel '|c_k| (log scale)' noenhanced\n"
       << "set format y '10^{%g}'\nset grid lc rgb '#dddddd'\nset key bottom left box opaque\n"
       << "set xrange [-1:" << n << "]\n"
       << "plot $c using 1:2 with points pt 7 ps 0.7 lc rgb '#1d3557' title '|c_k|', \\\n"
       << "     " << num(icpt) << " + " << num(slope) << "*x with lines dt 2 lw 2 lc rgb '#e63946' "
       << "title " << quoted(rate) << "\n";
    return os.str();
}

std::string plot_spectrum(const PlotArgs& a)
{
    const solve::Result r = run_solve(a, a.digits ? a.digits : 20, a.eigenvalues);
    const double delta = d(r.delta.value);
    std::ostringstream os;
    // columns: Re, Im, rank by modulus (0 = delta), |lambda|, a short label
    auto row = [&](double re, double im, int rank) {
        char lab[48];
        if (im == 0)
            std::snprintf(lab, sizeof lab, "%.4g", re);
        else
            std::snprintf(lab, sizeof lab, "%.3g%+.3gi", re, im);
        os << num(re) << " " << num(im) << " " << rank << " " << num(std::hypot(re, im)) << " \""
           << lab << "\"\n";
    };
    os << "$delta << EOD\n";
    row(delta, 0, 0);
    os << "EOD\n";
    const char* names[] = {"$coord", "$irr"};
    int count[2] = {0, 0};
    for (int pass = 0; pass < 2; ++pass) {
        os << names[pass] << " << EOD\n";
        int rank = 0;
        for (const auto& e : r.eigenvalues) {
            ++rank;
            const bool coord = e.kind == spectrum::Kind::coordinate_change;
            if (coord != (pass == 0))
                continue;
            row(e.is_refined ? d(e.refined.value) : e.approx.real(), e.approx.imag(), rank);
            ++count[pass];
        }
        os << "EOD\n";
    }
    // gnuplot warns about empty data sets: leave out the plot clauses of an empty kind.
    auto clause = [&](int pass, const std::string& text) {
        return count[pass] > 0 ? text : std::string();
    };
    const std::string pts_delta = "pt 7 ps 1.8 lc rgb '#e63946'";
    const std::string pts_coord = "pt 9 ps 1.6 lc rgb '#2a9d8f'";
    const std::string pts_irr = "pt 5 ps 1.2 lc rgb '#1d3557'";
    os << "set multiplot title " << quoted(
              "Eigenvalues of DT at the fixed point, z = " + a.order +
              " (the normalisation eigenvalue α^z is removed)")
       << " noenhanced\n"
       << "set grid lc rgb '#dddddd'\n"
       // top: the complex plane
       << "set origin 0,0.5\nset size 1,0.45\nset size ratio -1\n"
       << "set xzeroaxis\nset yzeroaxis\nset xlabel 'Re λ'\nset ylabel 'Im λ'\n"
       << "set parametric\nset trange [0:2*pi]\nset key outside right box\n"
       << "set title 'complex plane, with the unit circle'\n"
       << "set xrange [-1.4:" << num(delta + 0.8) << "]\nset yrange [-1.3:1.3]\n"
       << "set label 1 " << quoted("δ = " + r.delta.text.substr(0, 12)) << " at " << num(delta)
       << ",0.35 center tc rgb '#e63946'\n"
       << "plot cos(t),sin(t) with lines lc rgb '#888888' dt 2 title '|λ| = 1', \\\n"
       << "     $delta using 1:2 with points " << pts_delta << " title 'relevant: δ'"
       << clause(0, ", $coord using 1:2 with points " + pts_coord +
                        " title 'coordinate change α^{-zm}'")
       << clause(1, ", $irr using 1:2 with points " + pts_irr + " title 'irrelevant'") << "\n"
       << "unset label 1\nunset parametric\nunset xzeroaxis\nunset yzeroaxis\n"
       // bottom: moduli on a log scale, by rank
       << "set origin 0,0\nset size 1,0.5\nset size noratio\nset logscale y\n"
       << "set format y '10^{%L}'\nset title 'moduli by rank (log scale), labelled with the "
          "eigenvalue'\n"
       << "set xlabel 'rank k by modulus (0: δ)'\nset ylabel '|λ_k|'\n"
       << "set xrange [-0.6:" << r.eigenvalues.size() + 0.8 << "]\nset autoscale y\n"
       << "set offsets 0, 0, graph 0.12, graph 0.1\nset key off\n"
       << "plot 1 with lines lc rgb '#888888' dt 2, \\\n"
       << "     $delta using 3:4 with points " << pts_delta
       << clause(0, ", $coord using 3:4 with points " + pts_coord)
       << clause(1, ", $irr using 3:4 with points " + pts_irr)
       << ", $delta using 3:4:5 with labels offset 0,1.1 font ',10' tc rgb '#e63946'"
       << clause(0, ", $coord using 3:4:5 with labels offset 0,1.1 font ',10' tc rgb '#2a9d8f'")
       << clause(1, ", $irr using 3:4:5 with labels offset 0,-1.1 font ',10' tc rgb '#1d3557'")
       << "\n"
       << "unset multiplot\n";
    return os.str();
}

cascade::Family family_of(const PlotArgs& a)
{
    try {
        return cascade::make_builtin_family(a.family, a.family == "power" ? a.order : "2");
    } catch (const std::invalid_argument& e) {
        throw BadInput(e.what());
    }
}

cascade::CascadeResult run_cascade_for(const cascade::Family& fam, int levels)
{
    if (levels < 2 || levels > 18)
        throw BadInput("--levels must be in 2..18 for plots (got " + std::to_string(levels) + ")");
    cascade::CascadeOptions opt;
    opt.levels = levels;
    cascade::CascadeResult res = cascade::run_cascade(fam, opt);
    if (res.levels.empty())
        throw std::runtime_error("the cascade found no level: " + res.failure);
    return res;
}

std::string plot_cascade(const PlotArgs& a)
{
    const cascade::Family fam = family_of(a);
    const cascade::CascadeResult res = run_cascade_for(fam, a.levels ? a.levels : 11);
    const bool have_d = res.delta_limit.ok && res.delta_limit.digits > 0;
    const bool have_a = res.alpha_limit.ok && res.alpha_limit.digits > 0;
    const double dl = have_d ? d(res.delta_limit.value) : NAN;
    const double al = have_a ? std::fabs(d(res.alpha_limit.value)) : NAN;
    std::ostringstream os;
    os << "$r << EOD\n";
    for (const auto& l : res.levels) {
        if (!l.has_delta && !l.has_alpha)
            continue;
        const double dn = l.has_delta ? d(l.delta) : NAN;
        const double an = l.has_alpha ? std::fabs(d(l.alpha)) : NAN;
        auto lg = [](double v) { return std::isfinite(v) && v > 0 ? num(std::log10(v)) : "NaN"; };
        os << l.n << " " << (l.has_delta ? num(dn) : "NaN") << " "
           << (l.has_alpha ? num(an) : "NaN") << " "
           << (have_d && l.has_delta ? lg(std::fabs(dn - dl)) : "NaN") << " "
           << (have_a && l.has_alpha ? lg(std::fabs(an - al)) : "NaN") << "\n";
    }
    os << "EOD\n";
    const std::string dtext = have_d ? res.delta_limit.text : "?";
    std::string atext = have_a ? res.alpha_limit.text : "?";
    if (!atext.empty() && atext[0] == '-')
        atext.erase(0, 1); // the panel shows |alpha_n|
    os << "set multiplot layout 1,3 title " << quoted(
              "Cascade of superstable parameters of the " + fam.name + " family f(x) = " +
              fam.formula + ": ratios and their extrapolated limits (estimates)")
       << " noenhanced\n"
       << "set grid lc rgb '#dddddd'\nset xlabel 'level n (period 2^n)'\nset key bottom right box opaque\n"
       << "set title 'δ_n = (μ_{n-1} - μ_{n-2}) / (μ_n - μ_{n-1})'\nset ylabel 'δ_n'\n"
       << "plot $r using 1:2 with linespoints pt 7 lc rgb '#1d3557' title 'δ_n'"
       << (have_d ? ", " + num(dl) + " with lines dt 2 lw 2 lc rgb '#e63946' title " +
                        quoted("limit ≈ " + dtext.substr(0, 14))
                  : std::string())
       << "\n"
       << "set title '|α_n| = |d_{n-1} / d_n|'\nset ylabel '|α_n|'\nset key top right\n"
       << "set offsets 0, 0, graph 0.05, graph 0.05\n"
       << "plot $r using 1:3 with linespoints pt 7 lc rgb '#1d3557' title '|α_n|'"
       << (have_a ? ", " + num(al) + " with lines dt 2 lw 2 lc rgb '#e63946' title " +
                        quoted("limit ≈ " + atext.substr(0, 14))
                  : std::string())
       << "\n"
       << "set title 'distance to the extrapolated limit'\nset ylabel 'distance (log scale)'\n"
       << "set offsets 0, 0, 0, 0\n"
       << "set format y '10^{%g}'\nset key top right\n"
       << "plot $r using 1:4 with linespoints pt 7 lc rgb '#e63946' title '|δ_n - δ|', \\\n"
       << "     $r using 1:5 with linespoints pt 5 lc rgb '#2a9d8f' title '||α_n| - |α||'\n"
       << "unset multiplot\n";
    return os.str();
}

/// f(x, mu) in doubles from the parsed expression (display only).
double eval_double(const cascade::Expression& e, double x, double mu, std::vector<double>& v)
{
    using cascade::Op;
    const auto& nodes = e.nodes();
    v.resize(nodes.size());
    for (size_t i = 0; i < nodes.size(); ++i) {
        const auto& n = nodes[i];
        const double p = n.a >= 0 ? v[static_cast<size_t>(n.a)] : 0;
        const double q = n.b >= 0 ? v[static_cast<size_t>(n.b)] : 0;
        double r = 0;
        switch (n.op) {
        case Op::number: r = std::strtod(n.text.c_str(), nullptr); break;
        case Op::pi: r = M_PI; break;
        case Op::e: r = M_E; break;
        case Op::var_x: r = x; break;
        case Op::var_mu: r = mu; break;
        case Op::add: r = p + q; break;
        case Op::sub: r = p - q; break;
        case Op::mul: r = p * q; break;
        case Op::div: r = p / q; break;
        case Op::pow: r = std::pow(p, q); break;
        case Op::neg: r = -p; break;
        case Op::sin: r = std::sin(p); break;
        case Op::cos: r = std::cos(p); break;
        case Op::tan: r = std::tan(p); break;
        case Op::exp: r = std::exp(p); break;
        case Op::log: r = std::log(p); break;
        case Op::sqrt: r = std::sqrt(p); break;
        case Op::abs: r = std::fabs(p); break;
        }
        v[i] = r;
    }
    return v.back();
}

std::string plot_bifurcation(const PlotArgs& a)
{
    const cascade::Family fam = family_of(a);
    const cascade::CascadeResult res = run_cascade_for(fam, a.levels ? a.levels : 6);
    const double c = d(res.critical);
    const bool svg = a.out.size() > 4 && a.out.compare(a.out.size() - 4, 4, ".svg") == 0;
    // Two panels: the whole parameter range, and a zoom on the cascade near its accumulation.
    const double mu_first = d(res.levels.front().mu);
    const double mu_acc = res.mu_limit.ok ? d(res.mu_limit.value) : d(res.levels.back().mu);
    struct Panel {
        double lo, hi;
        std::string title;
    };
    // The zoom starts half a step before the second superstable parameter shown and ends a little
    // after the accumulation point, so that three or four levels are visible.
    const size_t nl = res.levels.size();
    const double m1 = nl > 1 ? d(res.levels[1].mu) : mu_first;
    const double m2 = nl > 2 ? d(res.levels[2].mu) : mu_acc;
    const double zlo = nl > 2 ? m1 - 0.5 * (m2 - m1) : mu_first - 0.15 * (mu_acc - mu_first);
    const double zhi = mu_acc + 0.6 * (mu_acc - m2) + 1e-9;
    std::vector<Panel> panels = {{fam.mu_lo, fam.mu_hi, "whole parameter range"},
                                 {zlo, zhi, "zoom on the cascade"}};
    const int cols = svg ? 500 : 900, rows = svg ? 260 : 500;
    const int transient = 2000, kept = 400;
    std::vector<double> scratch;
    std::ostringstream os;
    for (size_t p = 0; p < panels.size(); ++p) {
        const Panel& pn = panels[p];
        std::vector<double> density(static_cast<size_t>(cols * rows), 0);
        for (int i = 0; i < cols; ++i) {
            const double mu = pn.lo + (pn.hi - pn.lo) * (i + 0.5) / cols;
            double x = c + 1e-9;
            bool escaped = false;
            for (int k = 0; k < transient + kept && !escaped; ++k) {
                x = eval_double(fam.expr, x, mu, scratch);
                if (!std::isfinite(x) || x < fam.x_lo - 1 || x > fam.x_hi + 1)
                    escaped = true;
                else if (k >= transient) {
                    const int j = static_cast<int>((x - fam.x_lo) / (fam.x_hi - fam.x_lo) * rows);
                    if (j >= 0 && j < rows)
                        density[static_cast<size_t>(j * cols + i)] += 1;
                }
            }
        }
        os << "$d" << p << " << EOD\n";
        for (int j = 0; j < rows; ++j) {
            for (int i = 0; i < cols; ++i) {
                const double v = density[static_cast<size_t>(j * cols + i)];
                os << (v > 0 ? num(std::min(1.0, 0.35 + 0.65 * std::sqrt(v / 40.0))) : "0")
                   << (i + 1 < cols ? " " : "\n");
            }
        }
        os << "EOD\n";
    }
    os << "$mu << EOD\n";
    for (const auto& l : res.levels)
        os << num(d(l.mu)) << " " << num(c) << " " << l.n << "\n";
    os << "EOD\n";
    os << "set multiplot layout 2,1 title " << dquoted(
              "Bifurcation diagram of the " + fam.name + " family f(x) = " + fam.formula +
              "\nred: superstable parameters μ_n (the critical point c lies on a cycle of "
              "period 2^n)")
       << " noenhanced\n"
       << "set palette defined (0 'white', 0.001 '#c8d0dc', 1 '#0b1d3a')\nunset colorbox\n"
       << "set cbrange [0:1]\nset xlabel 'parameter μ'\nset ylabel 'x (orbit after transients)'\n"
       << "set key bottom left box opaque\n";
    for (size_t p = 0; p < panels.size(); ++p) {
        const Panel& pn = panels[p];
        const double dx = (pn.hi - pn.lo) / cols, dy = (fam.x_hi - fam.x_lo) / rows;
        os << "set title " << quoted(pn.title) << "\n"
           << "set xrange [" << num(pn.lo) << ":" << num(pn.hi) << "]\nset yrange ["
           << num(fam.x_lo) << ":" << num(fam.x_hi) << "]\n"
           << "plot $d" << p << " matrix using (" << num(pn.lo + dx / 2) << " + $1*" << num(dx)
           << "):(" << num(fam.x_lo + dy / 2) << " + $2*" << num(dy)
           << "):3 with image" << (svg ? "" : " pixels") << " notitle, \\\n"
           << "     " << num(c) << " with lines dt 3 lc rgb '#888888' title 'x = c (critical point)', \\\n"
           << "     $mu using 1:2 with points pt 7 ps 1.2 lc rgb '#e63946' title 'μ_n', \\\n"
           << "     $mu using 1:2:(sprintf('μ_{%d}', $3)) every ::" << (p == 0 ? "0::2" : "1::4")
           << " with labels offset 0,1.2 tc rgb '#e63946' notitle\n";
        (void)mu_first;
    }
    os << "unset multiplot\n";
    return os.str();
}

int run_plot(const PlotArgs& a)
{
    if (std::find(plot_kinds.begin(), plot_kinds.end(), a.what) == plot_kinds.end())
        throw BadInput("WHAT must be one of fixed-point, coefficients, spectrum, cascade, "
                       "bifurcation (got '" + a.what + "')");
    if (a.digits != 0 && (a.digits < 5 || a.digits > 2000))
        throw BadInput("--digits must be in 5..2000");
    if (a.eigenvalues < 1 || a.eigenvalues > 50)
        throw BadInput("--eigenvalues must be in 1..50");
    const bool wide = a.what == "cascade";
    const bool tall = a.what == "bifurcation";
    std::string script = terminal_for(a.out, wide ? 1500 : 1000, tall ? 1000 : (wide ? 560 : 700));
    script += "set encoding utf8\n";
    if (a.what == "fixed-point")
        script += plot_fixed_point(a);
    else if (a.what == "coefficients")
        script += plot_coefficients(a);
    else if (a.what == "spectrum")
        script += plot_spectrum(a);
    else if (a.what == "cascade")
        script += plot_cascade(a);
    else
        script += plot_bifurcation(a);

    // Write to a temporary file next to the target, then rename: no half-written picture.
    const std::string tmp = a.out + ".tmp" + std::to_string(::getpid());
    const std::string full = script.substr(0, script.find('\n') + 1) + "set output " +
                             quoted(tmp) + "\n" + script.substr(script.find('\n') + 1) +
                             "unset output\n";
    if (!a.script.empty()) {
        std::ofstream f(a.script, std::ios::binary);
        if (!f || !(f << script.substr(0, script.find('\n') + 1) << "set output " << quoted(a.out)
                      << "\n"
                      << script.substr(script.find('\n') + 1)))
            throw BadInput("cannot write '" + a.script + "'");
    }
    FILE* pipe = ::popen("gnuplot", "w");
    if (!pipe)
        throw std::runtime_error("cannot start gnuplot");
    const bool written = std::fwrite(full.data(), 1, full.size(), pipe) == full.size();
    const int status = ::pclose(pipe);
    if (!written || status == -1 || !WIFEXITED(status) || WEXITSTATUS(status) != 0) {
        std::remove(tmp.c_str());
        if (WIFEXITED(status) && WEXITSTATUS(status) == 127)
            throw std::runtime_error("gnuplot not found (Debian: apt-get install gnuplot-nox)");
        throw std::runtime_error("gnuplot failed (its messages are above)");
    }
    if (std::rename(tmp.c_str(), a.out.c_str()) != 0) {
        std::remove(tmp.c_str());
        throw BadInput("cannot write '" + a.out + "'");
    }
    if (!a.quiet)
        std::cerr << "renorm plot: wrote " << a.out << "\n";
    return exit_ok;
}

} // namespace

void register_plot(CLI::App& app, int* code)
{
    auto args = std::make_shared<PlotArgs>();
    CLI::App* sub = app.add_subcommand(
        "plot", "Draw a picture of a real run with gnuplot: the fixed point, its coefficients, "
                "the spectrum of DT, the cascade of ratios, or a bifurcation diagram");
    sub->add_option("what", args->what,
                    "fixed-point | coefficients | spectrum | cascade | bifurcation")
        ->required();
    sub->add_option("-o,--out", args->out, "output file, FILE.svg or FILE.png")->required();
    sub->add_option("-z,--order", args->order,
                    "order z > 1 of the critical point (fixed-point, coefficients, spectrum; "
                    "and --family power)")
        ->capture_default_str();
    sub->add_option("-d,--digits", args->digits,
                    "digits of the solve behind the picture (default 20; 60 for coefficients)");
    sub->add_option("--family", args->family,
                    "map family for cascade and bifurcation: quadratic, logistic, sine, power, "
                    "cubic")
        ->capture_default_str();
    sub->add_option("--levels", args->levels,
                    "last cascade level (default 11 for cascade, 6 for bifurcation; 2..18)");
    sub->add_option("-k,--eigenvalues", args->eigenvalues,
                    "how many eigenvalues after delta (spectrum; 1..50)")
        ->capture_default_str();
    sub->add_option("--script", args->script,
                    "also write the gnuplot script (data included) to FILE");
    sub->add_flag("-q,--quiet", args->quiet, "do not report the file written");
    sub->footer("Needs gnuplot (Debian: gnuplot-nox). Numbers are drawn in double precision;\n"
                "the computations behind them are those of 'renorm solve' and 'renorm cascade'.\n\n"
                "Examples:\n"
                "  renorm plot fixed-point --out g.svg\n"
                "  renorm plot spectrum --order 4 --out spectrum4.png\n"
                "  renorm plot bifurcation --family logistic --levels 7 --out bif.png");
    sub->callback([args, code] { *code = run_plot(*args); });
}

} // namespace renorm::app
