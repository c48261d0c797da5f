#include <renorm/table/compute.hpp>

#include <renorm/certify/proof.hpp>
#include <renorm/solve/solve.hpp>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <exception>
#include <mutex>
#include <numeric>
#include <stdexcept>
#include <thread>

#include <flint/flint.h>

namespace renorm::table {

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0)
{
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

std::string approx_text(std::complex<double> v)
{
    char buf[64];
    if (v.imag() == 0)
        std::snprintf(buf, sizeof buf, "%.6g", v.real());
    else
        std::snprintf(buf, sizeof buf, "%.6g %c %.6gi", v.real(), v.imag() > 0 ? '+' : '-',
                      std::fabs(v.imag()));
    return buf;
}

std::string kind_text(const solve::EigenvalueReport& e)
{
    if (e.kind == spectrum::Kind::coordinate_change)
        return "coordinate change alpha^(-z*" + std::to_string(e.power) + ")";
    return spectrum::to_string(e.kind);
}

/// The estimate part of a row, from the solver.
io::TableRow estimated_row(const std::string& order, const RowOptions& o,
                           const newton::ProgressFn& progress)
{
    io::TableRow row;
    row.order = order;
    solve::Request req;
    req.order = order;
    req.digits = o.digits;
    req.eigenvalues = o.eigenvalues;
    req.progress = progress;
    req.checkpoint_path = o.checkpoint_path;
    req.resume = o.resume;
    solve::Result r = solve::solve_constants(req);
    row.n = r.n;
    row.n_check = r.n_check;
    row.prec = r.prec;
    row.basis = solve::to_string(r.basis);
    if (!r.converged) {
        row.status = io::RowStatus::failed;
        row.note = "solver did not converge: " + r.message;
        return row;
    }
    row.alpha = {r.alpha.text, std::min<long>(r.alpha.stable_digits, o.digits)};
    row.delta = {r.delta.text, std::min<long>(r.delta.stable_digits, o.digits)};
    if (row.alpha.text.empty())
        row.alpha.digits = 0;
    if (row.delta.text.empty())
        row.delta.digits = 0;
    for (int k = 0; k < o.eigenvalues; ++k) {
        io::TableEigenvalue e;
        if (k < static_cast<int>(r.eigenvalues.size())) {
            const auto& rep = r.eigenvalues[static_cast<size_t>(k)];
            e.kind = kind_text(rep);
            if (rep.is_refined && !rep.refined.text.empty()) {
                e.value = {rep.refined.text,
                           std::min<long>(rep.refined.stable_digits, std::min<long>(o.digits, 30))};
            } else {
                // from the dense double matrix: shown, but no digit is claimed
                e.value = {approx_text(rep.approx), 0};
                e.kind += " (unrefined)";
            }
        }
        row.eigenvalues.push_back(std::move(e));
    }
    if (row.alpha.digits == 0 || row.delta.digits == 0) {
        row.status = io::RowStatus::failed;
        row.note = "no stable digit of " + std::string(row.alpha.digits == 0 ? "alpha" : "delta") +
                   " between truncations N and N_check";
        return row;
    }
    row.status = io::RowStatus::estimated;
    if (row.alpha.digits < o.digits || row.delta.digits < o.digits)
        row.note = "fewer stable digits than the " + std::to_string(o.digits) + " requested";
    return row;
}

/// Replaces the estimate by certified enclosures when the proof closes; otherwise keeps the
/// estimate and says why in the note.
void certify_row(io::TableRow& row, const RowOptions& o, const newton::ProgressFn& progress)
{
    auto not_certified = [&](const std::string& why) {
        row.note = (row.note.empty() ? "" : row.note + "; ") + "not certified: " + why;
    };
    doubling::Problem problem;
    problem.order = row.order;
    newton::FixedPoint start = newton::approx_continuation(problem, 40, 192, progress);
    if (!start.converged)
        return not_certified("no approximate fixed point: " + start.message);
    // The proof needs u and v to map the disc well inside itself; choose one (no guarantee,
    // the proof checks it).
    const series::Disc d = certify::approx_choose_disc(problem, start.g, start.n);
    if (d.centre != problem.disc.centre || d.radius != problem.disc.radius) {
        problem.disc = d;
        start = newton::approx_continuation(problem, 40, 192, progress);
        if (!start.converged)
            return not_certified("no approximate fixed point on the chosen disc: " + start.message);
    }
    newton::RefineOptions ro;
    ro.progress = progress;
    const newton::FixedPoint fp = newton::approx_refine(start, o.digits + 15, ro);
    if (!fp.converged)
        return not_certified("the approximate fixed point did not converge: " + fp.message);
    const slong prec = ball::digits_to_bits(o.digits + 25, 32);
    const certify::Certificate c = certify::certify_constants(problem, fp.g, fp.n, prec, 128);
    if (c.status != certify::Status::certified)
        return not_certified(c.message);
    slong ca = 0, cd = 0;
    std::string ta = ball::determined_digits(c.alpha, o.digits, &ca);
    std::string td = ball::determined_digits(c.delta, o.digits, &cd);
    if (ca == 0 || cd == 0)
        return not_certified("the enclosures determine no digit");
    // The estimate and the proof come from different runs; they must agree where both claim.
    auto agree = [](const io::TableValue& est, const ball::Ball& enclosure) {
        auto e = ball::from_string(est.text, 64 + 4 * static_cast<slong>(est.text.size()));
        if (!e)
            return false;
        const slong k = solve::approx_agreeing_digits(*e, enclosure, est.digits + 2);
        return k + 1 >= est.digits;
    };
    const bool consistent = agree(row.alpha, c.alpha) && agree(row.delta, c.delta);
    row.status = io::RowStatus::certified;
    row.alpha = {ta, ca};
    row.delta = {td, cd};
    row.radius = series::max(series::Bound::radius_of(c.alpha), series::Bound::radius_of(c.delta))
                     .text(3);
    row.n = c.data.n;
    row.n_check = 0;
    row.prec = c.data.prec;
    row.basis = "taylor";
    row.note.clear();
    if (ca < o.digits || cd < o.digits)
        row.note = "the enclosures determine fewer digits than the " + std::to_string(o.digits) +
                   " requested";
    if (!consistent)
        row.note += std::string(row.note.empty() ? "" : "; ") +
                    "the estimate disagreed with the enclosure (the enclosure is shown)";
}

} // namespace

void validate(const std::vector<std::string>& orders, const RowOptions& options,
              double memory_limit_bytes)
{
    if (options.digits < 1)
        throw std::invalid_argument("--digits must be at least 1, got " + std::to_string(options.digits));
    if (!options.checkpoint_path.empty() || options.resume) {
        if (orders.size() != 1)
            throw std::invalid_argument("--checkpoint and --resume need a table of one order, got " +
                                        std::to_string(orders.size()));
        if (!options.fallback_digits.empty() || options.certify)
            throw std::invalid_argument("--checkpoint and --resume cover the estimate only: not with "
                                        "--fallback or --certify");
    }
    if (options.eigenvalues < 0 || options.eigenvalues > 50)
        throw std::invalid_argument("--eigenvalues must be between 0 and 50, got " +
                                    std::to_string(options.eigenvalues));
    for (long d : options.fallback_digits)
        if (d < 1 || d >= options.digits)
            throw std::invalid_argument("--fallback digits must be between 1 and --digits - 1, got " +
                                        std::to_string(d));
    if (options.certify && options.digits < 5)
        throw std::invalid_argument("--certify needs --digits of at least 5, got " +
                                    std::to_string(options.digits));
    for (const auto& z : orders) {
        solve::Request req;
        req.order = z;
        req.digits = options.digits;
        req.eigenvalues = options.eigenvalues;
        req.checkpoint_path = options.checkpoint_path;
        req.resume = options.resume;
        solve::validate(req, memory_limit_bytes);
        if (options.resume)
            solve::check_resume(req, *options.resume);
    }
}

io::TableRow compute_row(const std::string& order, const RowOptions& options,
                         const newton::ProgressFn& progress)
{
    const auto t0 = std::chrono::steady_clock::now();
    io::TableRow row;
    row.order = order;
    try {
        row = estimated_row(order, options, progress ? progress : options.progress);
        for (long d : options.fallback_digits) {
            if (row.status != io::RowStatus::failed || d >= options.digits)
                break;
            const std::string why = row.note;
            RowOptions lower = options;
            lower.digits = d;
            row = estimated_row(order, lower, progress);
            row.note = "no result at " + std::to_string(options.digits) + " digits (" + why +
                       "); retried at " + std::to_string(d) + " digits" +
                       (row.note.empty() ? "" : ": " + row.note);
        }
        if (options.certify && row.status == io::RowStatus::estimated)
            certify_row(row, options, progress);
    } catch (const std::exception& e) {
        row.status = io::RowStatus::failed;
        row.note = std::string("error: ") + e.what();
    }
    row.seconds = seconds_since(t0);
    if (options.resume)
        row.seconds = options.resume->seconds < 0 ? -1.0 : row.seconds + options.resume->seconds;
    return row;
}

double approx_row_cost(const std::string& order, const RowOptions& options)
{
    solve::Request req;
    req.order = order;
    req.digits = options.digits;
    try {
        return solve::estimate_cost(req).seconds * (options.certify ? 3.0 : 1.0);
    } catch (const std::exception&) {
        return 0;
    }
}

std::vector<int> assign_orders(const std::vector<std::string>& orders, const RowOptions& options,
                               int parts)
{
    if (parts < 1)
        throw std::invalid_argument("assign_orders: parts must be at least 1");
    std::vector<double> cost(orders.size());
    for (size_t i = 0; i < orders.size(); ++i)
        cost[i] = approx_row_cost(orders[i], options);
    std::vector<size_t> idx(orders.size());
    std::iota(idx.begin(), idx.end(), size_t{0});
    std::stable_sort(idx.begin(), idx.end(), [&](size_t a, size_t b) { return cost[a] > cost[b]; });
    std::vector<double> load(static_cast<size_t>(parts), 0.0);
    std::vector<int> owner(orders.size(), 0);
    for (size_t i : idx) {
        const auto it = std::min_element(load.begin(), load.end());
        owner[i] = static_cast<int>(it - load.begin());
        *it += cost[i] + 1e-9; // the epsilon spreads rows of zero estimated cost
    }
    return owner;
}

std::vector<io::TableRow> compute_rows(const std::vector<std::string>& orders,
                                       const RowOptions& options, int threads,
                                       const RowEvent& event)
{
    std::vector<io::TableRow> rows(orders.size());
    if (orders.empty())
        return rows;
    std::vector<size_t> queue(orders.size());
    std::iota(queue.begin(), queue.end(), size_t{0});
    std::vector<double> cost(orders.size());
    for (size_t i = 0; i < orders.size(); ++i)
        cost[i] = approx_row_cost(orders[i], options);
    std::stable_sort(queue.begin(), queue.end(),
                     [&](size_t a, size_t b) { return cost[a] > cost[b]; });
    const int n = std::clamp(threads, 1, static_cast<int>(orders.size()));
    std::atomic<size_t> next{0};
    std::mutex event_mutex;
    auto work = [&] {
        for (;;) {
            const size_t q = next.fetch_add(1);
            if (q >= queue.size())
                break;
            const size_t i = queue[q];
            if (event) {
                std::lock_guard<std::mutex> lock(event_mutex);
                event(i, nullptr, false);
            }
            rows[i] = compute_row(orders[i], options);
            if (event) {
                std::lock_guard<std::mutex> lock(event_mutex);
                event(i, &rows[i], true);
            }
        }
        flint_cleanup(); // this thread's caches (constants, primes)
    };
    if (n == 1) {
        for (;;) {
            const size_t q = next.fetch_add(1);
            if (q >= queue.size())
                break;
            const size_t i = queue[q];
            if (event)
                event(i, nullptr, false);
            rows[i] = compute_row(orders[i], options);
            if (event)
                event(i, &rows[i], true);
        }
        return rows;
    }
    std::vector<std::thread> pool;
    for (int t = 0; t < n; ++t)
        pool.emplace_back(work);
    for (auto& t : pool)
        t.join();
    return rows;
}

std::string rows_to_message(const std::vector<std::pair<size_t, io::TableRow>>& rows)
{
    using nlohmann::json;
    json a = json::array();
    for (const auto& [i, r] : rows) {
        json ev = json::array();
        for (const auto& e : r.eigenvalues)
            ev.push_back({e.value.text, e.value.digits, e.kind});
        a.push_back({{"index", i},
                     {"z", r.order},
                     {"status", io::to_string(r.status)},
                     {"alpha", {r.alpha.text, r.alpha.digits}},
                     {"delta", {r.delta.text, r.delta.digits}},
                     {"eigenvalues", ev},
                     {"radius", r.radius},
                     {"n", r.n},
                     {"n_check", r.n_check},
                     {"prec", r.prec},
                     {"basis", r.basis},
                     {"seconds", r.seconds},
                     {"note", r.note}});
    }
    return a.dump();
}

std::vector<std::pair<size_t, io::TableRow>> rows_from_message(const std::string& text)
{
    std::vector<std::pair<size_t, io::TableRow>> out;
    try {
        const auto a = nlohmann::json::parse(text);
        for (const auto& o : a) {
            io::TableRow r;
            r.order = o.at("z").get<std::string>();
            r.status = io::row_status_from_string(o.at("status").get<std::string>());
            r.alpha = {o.at("alpha").at(0).get<std::string>(), o.at("alpha").at(1).get<long>()};
            r.delta = {o.at("delta").at(0).get<std::string>(), o.at("delta").at(1).get<long>()};
            for (const auto& e : o.at("eigenvalues"))
                r.eigenvalues.push_back(
                    {{e.at(0).get<std::string>(), e.at(1).get<long>()}, e.at(2).get<std::string>()});
            r.radius = o.at("radius").get<std::string>();
            r.n = o.at("n").get<long>();
            r.n_check = o.at("n_check").get<long>();
            r.prec = o.at("prec").get<long>();
            r.basis = o.at("basis").get<std::string>();
            r.seconds = o.at("seconds").get<double>();
            r.note = o.at("note").get<std::string>();
            out.emplace_back(o.at("index").get<size_t>(), std::move(r));
        }
    } catch (const nlohmann::json::exception& e) {
        throw std::invalid_argument(std::string("malformed row message: ") + e.what());
    }
    return out;
}

} // namespace renorm::table
