// The compiled half of the Python module `renorm` (python/renorm/__init__.py is the other half):
// thin bindings that call lib/ and return plain Python values (decimal strings, ints, lists,
// dicts). The Python half turns them into documented result classes.
#include <renorm/cascade/cascade.hpp>
#include <renorm/certify/proof.hpp>
#include <renorm/io/atomic_file.hpp>
#include <renorm/io/certificate_file.hpp>
#include <renorm/newton/fixed_point.hpp>
#include <renorm/solve/solve.hpp>
#include <renorm/table/compute.hpp>
#include <renorm/table/orders.hpp>
#include <renorm/version.hpp>

#include <pybind11/complex.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <algorithm>
#include <cstdio>
#include <stdexcept>
#include <string>
#include <unistd.h>

namespace py = pybind11;
using namespace renorm;

namespace {

/// 80% of physical memory: what a run may plan to use (as the command does).
double memory_limit_bytes()
{
    const long pages = ::sysconf(_SC_PHYS_PAGES);
    const long size = ::sysconf(_SC_PAGE_SIZE);
    if (pages <= 0 || size <= 0)
        return 4e9;
    return 0.8 * static_cast<double>(pages) * static_cast<double>(size);
}

std::string eigen_text(const solve::EigenvalueReport& e)
{
    if (e.is_refined && !e.refined.text.empty())
        return e.refined.text;
    char buf[64];
    if (e.approx.imag() == 0)
        std::snprintf(buf, sizeof buf, "%.12g", e.approx.real());
    else
        std::snprintf(buf, sizeof buf, "%.12g%+.12gj", e.approx.real(), e.approx.imag());
    return buf;
}

std::string kind_text(const solve::EigenvalueReport& e)
{
    if (e.kind == spectrum::Kind::coordinate_change)
        return "coordinate change, alpha^(-z*" + std::to_string(e.power) + ")";
    return spectrum::to_string(e.kind);
}

/// solve::solve_constants as a dict of plain values. Throws ValueError for bad input.
py::dict solve_dict(const std::string& order, slong digits, slong eigenvalues)
{
    solve::Request req;
    req.order = order;
    req.digits = digits;
    req.eigenvalues = eigenvalues;
    solve::validate(req, memory_limit_bytes()); // std::invalid_argument -> ValueError
    solve::Result r;
    {
        py::gil_scoped_release unlocked;
        r = solve::solve_constants(req);
    }
    py::dict d;
    d["order"] = order;
    d["converged"] = r.converged;
    d["message"] = r.message;
    if (!r.converged)
        return d;
    d["alpha"] = r.alpha.text;
    d["delta"] = r.delta.text;
    d["alpha_digits"] = std::min(r.alpha.stable_digits, digits);
    d["delta_digits"] = std::min(r.delta.stable_digits, digits);
    py::list ev;
    for (const auto& e : r.eigenvalues) {
        py::dict x;
        x["value"] = eigen_text(e);
        x["approx"] = py::cast(e.approx);
        x["kind"] = kind_text(e);
        x["digits"] = e.is_refined ? std::min<slong>(e.refined.stable_digits, 30) : 12;
        ev.append(x);
    }
    d["eigenvalues"] = ev;
    d["N"] = r.n;
    d["N_check"] = r.n_check;
    d["precision_bits"] = r.prec;
    d["log10_residual"] = r.log10_residual;
    d["seconds"] = r.seconds;
    d["disc"] = py::make_tuple(r.problem.disc.centre, r.problem.disc.radius);
    py::list coeffs;
    for (slong k = 0; k < r.fixed_point.g.length(); ++k)
        coeffs.append(ball::approx_decimal(r.fixed_point.g.coeff(k), digits + 10));
    d["coefficients"] = coeffs;
    return d;
}

std::string determined(const ball::Ball& b, slong max_digits)
{
    slong count = 0;
    std::string s = ball::determined_digits(b, max_digits, &count);
    return count == 0 ? std::string() : s;
}

/// The proof of `renorm certify` (same steps: continuation, disc choice, refinement, proof).
py::dict certify_dict(const std::string& order, slong digits)
{
    if (digits < 5 || digits > 2000)
        throw std::invalid_argument("digits must be between 5 and 2000");
    doubling::Problem problem;
    problem.order = order;
    (void)problem.order_ball(64); // throws std::invalid_argument for a bad order
    py::dict d;
    d["order"] = order;
    certify::Certificate c;
    bool enough = false;
    std::string failure;
    {
        py::gil_scoped_release unlocked;
        newton::FixedPoint start = newton::approx_continuation(problem, 40, 192);
        if (start.converged) {
            series::Disc disc = certify::approx_choose_disc(problem, start.g, start.n);
            if (disc.centre != problem.disc.centre || disc.radius != problem.disc.radius) {
                problem.disc = disc;
                start = newton::approx_continuation(problem, 40, 192);
            }
        }
        newton::FixedPoint fp;
        if (start.converged)
            fp = newton::approx_refine(start, digits + 15, newton::RefineOptions{});
        if (!start.converged || !fp.converged) {
            failure = start.converged ? fp.message : start.message;
        } else {
            c = certify::certify_constants(problem, fp.g, fp.n, ball::digits_to_bits(digits + 25, 32),
                                           128);
            if (c.status == certify::Status::certified) {
                // radius < 10^-digits, compared exactly
                ball::Ball need;
                arb_set_ui(need.get(), 10);
                arb_pow_ui(need.get(), need.get(), static_cast<ulong>(digits), 64);
                arb_inv(need.get(), need.get(), 64);
                series::Bound lower;
                arb_get_mag_lower(lower.get(), need.get());
                enough = series::Bound::radius_of(c.alpha) < lower &&
                         series::Bound::radius_of(c.delta) < lower;
            }
        }
    }
    if (!failure.empty()) {
        d["status"] = "failed";
        d["message"] = failure;
        return d;
    }
    d["status"] = c.status == certify::Status::certified
                      ? (enough ? "certified" : "too_wide")
                      : (c.status == certify::Status::bad_input ? "bad_input" : "not_certified");
    d["message"] = c.message;
    d["N"] = c.data.n;
    d["precision_bits"] = c.data.prec;
    d["disc"] = py::make_tuple(problem.disc.centre, problem.disc.radius);
    if (c.status == certify::Status::certified) {
        d["alpha"] = determined(c.alpha, digits + 30);
        d["delta"] = determined(c.delta, digits + 30);
        d["alpha_enclosure"] = ball::enclosure_string(c.alpha, digits + 10);
        d["delta_enclosure"] = ball::enclosure_string(c.delta, digits + 10);
        d["alpha_radius"] = c.alpha.radius_upper();
        d["delta_radius"] = c.delta.radius_upper();
    }
    if (enough)
        d["document"] = io::certificate_to_json(c).dump(1) + "\n";
    return d;
}

py::dict verify_dict(const std::string& text)
{
    io::Verdict v;
    {
        py::gil_scoped_release unlocked;
        v = io::verify_certificate(text);
    }
    py::dict d;
    d["accepted"] = v.accepted;
    d["bad_input"] = v.bad_input;
    d["reason"] = v.reason;
    d["proved"] = v.proved;
    return d;
}

std::string ratio_text(const cascade::CascadeLevel& l, const ball::Ball& x)
{
    if (l.status == cascade::Status::certified) {
        std::string s = determined(x, 40);
        return s.empty() ? "?" : s;
    }
    return ball::approx_decimal(x, 20);
}

py::dict limit_dict(const cascade::LimitEstimate& e)
{
    py::dict d;
    d["ok"] = e.ok && e.digits > 0;
    d["value"] = e.ok ? e.text : std::string();
    d["digits"] = e.ok ? e.digits : 0;
    d["error"] = e.ok ? e.error : 0.0;
    return d;
}

py::dict cascade_dict(const std::string& family, const std::string& map, const std::string& critical,
                      const std::string& order, int levels, const std::string& kind)
{
    cascade::Family fam = map.empty() ? cascade::make_builtin_family(family, order)
                                      : cascade::make_user_family(map, critical, -1, 1, 0, 4);
    cascade::CascadeOptions opt;
    if (kind == "superstable")
        opt.kind = cascade::SequenceKind::superstable;
    else if (kind == "doubling")
        opt.kind = cascade::SequenceKind::doubling;
    else
        throw std::invalid_argument("kind must be 'superstable' or 'doubling' (got '" + kind + "')");
    if (levels < 1 || levels > cascade::max_cascade_level)
        throw std::invalid_argument("levels must be in 1.." +
                                    std::to_string(cascade::max_cascade_level));
    opt.levels = levels;
    cascade::CascadeResult res;
    {
        py::gil_scoped_release unlocked;
        res = cascade::run_cascade(fam, opt);
    }
    py::dict d;
    d["family"] = fam.name;
    d["formula"] = fam.formula;
    d["kind"] = kind;
    d["critical_point"] = determined(res.critical, 30);
    py::list ls;
    for (const auto& l : res.levels) {
        py::dict x;
        x["n"] = l.n;
        x["period"] = l.period;
        x["certified"] = l.status == cascade::Status::certified;
        x["mu"] = l.status == cascade::Status::certified ? determined(l.mu, 60)
                                                          : ball::approx_decimal(l.mu, 40);
        x["mu_radius"] = l.mu.radius_upper();
        x["delta"] = l.has_delta ? py::cast(ratio_text(l, l.delta)) : py::none();
        x["alpha"] = l.has_alpha ? py::cast(ratio_text(l, l.alpha)) : py::none();
        ls.append(x);
    }
    d["levels"] = ls;
    d["failed"] = res.failed;
    d["failure"] = res.failure;
    d["accumulation_point"] = limit_dict(res.mu_limit);
    d["delta"] = limit_dict(res.delta_limit);
    d["alpha"] = limit_dict(res.alpha_limit);
    return d;
}

py::list table_rows(const std::string& orders_spec, long digits, int eigenvalues, bool certify,
                    int threads)
{
    const std::vector<std::string> orders = table::parse_orders(orders_spec);
    table::RowOptions opt;
    opt.digits = digits;
    opt.eigenvalues = eigenvalues;
    opt.certify = certify;
    table::validate(orders, opt, memory_limit_bytes());
    if (threads < 1 || threads > 256)
        throw std::invalid_argument("threads must be in 1..256");
    std::vector<io::TableRow> rows;
    {
        py::gil_scoped_release unlocked;
        rows = table::compute_rows(orders, opt, threads);
    }
    py::list out;
    for (const auto& r : rows) {
        py::dict x;
        x["order"] = r.order;
        x["status"] = io::to_string(r.status);
        x["alpha"] = r.alpha.text;
        x["alpha_digits"] = r.alpha.digits;
        x["delta"] = r.delta.text;
        x["delta_digits"] = r.delta.digits;
        py::list ev;
        for (const auto& e : r.eigenvalues)
            ev.append(py::make_tuple(e.value.text, e.value.digits, e.kind));
        x["eigenvalues"] = ev;
        x["radius"] = r.radius;
        x["N"] = r.n;
        x["N_check"] = r.n_check;
        x["precision_bits"] = r.prec;
        x["seconds"] = r.seconds;
        x["note"] = r.note;
        out.append(x);
    }
    return out;
}

} // namespace

PYBIND11_MODULE(_renorm, m)
{
    m.doc() = "Compiled core of the renorm Python module; use `import renorm`.";
    m.attr("version") = renorm::version;
    m.attr("git_commit") = renorm::git_commit;
    m.def("solve", &solve_dict, py::arg("order"), py::arg("digits"), py::arg("eigenvalues"));
    m.def("certify", &certify_dict, py::arg("order"), py::arg("digits"));
    m.def("verify", &verify_dict, py::arg("text"));
    m.def("cascade", &cascade_dict, py::arg("family"), py::arg("map"), py::arg("critical"),
          py::arg("order"), py::arg("levels"), py::arg("kind"));
    m.def("table", &table_rows, py::arg("orders"), py::arg("digits"), py::arg("eigenvalues"),
          py::arg("certify"), py::arg("threads"));
    m.def("cascade_families", &cascade::builtin_family_names);
    py::register_exception<cascade::ParseError>(m, "ExpressionError", PyExc_ValueError);
}
