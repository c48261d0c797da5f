#include <renorm/cascade/extrapolate.hpp>

#include <algorithm>
#include <cmath>

namespace renorm::cascade {

namespace {

ball::Ball mid_of(const ball::Ball& b)
{
    ball::Ball m;
    arb_get_mid_arb(m.get(), b.get());
    return m;
}

ball::Ball nan_ball()
{
    ball::Ball b;
    arb_indeterminate(b.get());
    return b;
}

std::vector<ball::Ball> mids(const std::vector<ball::Ball>& s)
{
    std::vector<ball::Ball> out;
    out.reserve(s.size());
    for (const auto& b : s)
        out.push_back(mid_of(b));
    return out;
}

std::vector<ball::Ball> last(const std::vector<ball::Ball>& s, std::size_t k)
{
    if (s.size() <= k)
        return s;
    return std::vector<ball::Ball>(s.end() - static_cast<std::ptrdiff_t>(k), s.end());
}

} // namespace

std::vector<ball::Ball> approx_aitken(const std::vector<ball::Ball>& s_in, slong prec)
{
    std::vector<ball::Ball> s = mids(s_in);
    std::vector<ball::Ball> out;
    ball::Ball d1, d2, den, t;
    for (std::size_t j = 0; j + 2 < s.size(); ++j) {
        arb_sub(d1.get(), s[j + 2].get(), s[j + 1].get(), prec);
        arb_sub(d2.get(), s[j + 1].get(), s[j].get(), prec);
        arb_sub(den.get(), d1.get(), d2.get(), prec);
        if (arb_is_zero(den.get()))
            break;
        arb_sqr(t.get(), d1.get(), prec);
        arb_div(t.get(), t.get(), den.get(), prec);
        ball::Ball v;
        arb_sub(v.get(), s[j + 2].get(), t.get(), prec);
        out.push_back(mid_of(v));
    }
    return out;
}

ball::Ball approx_iterated_aitken(const std::vector<ball::Ball>& s, slong prec)
{
    if (s.size() < 3)
        return nan_ball();
    std::vector<ball::Ball> cur = mids(s);
    while (cur.size() >= 3) {
        std::vector<ball::Ball> next = approx_aitken(cur, prec);
        if (next.empty())
            break;
        cur = std::move(next);
    }
    return cur.back();
}

ball::Ball approx_wynn_epsilon(const std::vector<ball::Ball>& s_in, slong prec)
{
    const std::size_t m = s_in.size();
    if (m < 3)
        return nan_ball();
    // prev = column k-1, cur = column k; column k has m - k entries e_k^{(j)}, j = 0..m-k-1.
    std::vector<ball::Ball> prev(m + 1); // column -1: zeros
    std::vector<ball::Ball> cur = mids(s_in);
    ball::Ball best = cur.back();
    ball::Ball d;
    for (std::size_t k = 0; k + 1 < m; ++k) {
        std::vector<ball::Ball> next;
        bool stop = false;
        for (std::size_t j = 0; j + 1 < cur.size(); ++j) {
            arb_sub(d.get(), cur[j + 1].get(), cur[j].get(), prec);
            if (arb_is_zero(d.get())) {
                stop = true;
                break;
            }
            ball::Ball v;
            arb_inv(v.get(), d.get(), prec);
            arb_add(v.get(), v.get(), prev[j + 1].get(), prec);
            next.push_back(mid_of(v));
        }
        if (stop || next.empty())
            break;
        prev = std::move(cur);
        cur = std::move(next);
        if ((k + 1) % 2 == 0)
            best = cur.back(); // even column k+1, the entry that uses the last term
    }
    return best;
}

ball::Ball approx_richardson_geometric(const std::vector<ball::Ball>& s_in, slong prec)
{
    if (s_in.size() < 5)
        return nan_ball();
    std::vector<ball::Ball> s = mids(s_in);
    const std::size_t n = s.size() - 1;
    std::vector<double> ratios;
    ball::Ball a, b, r;
    for (std::size_t j = n - 2; j <= n; ++j) {
        arb_sub(a.get(), s[j].get(), s[j - 1].get(), prec);
        arb_sub(b.get(), s[j - 1].get(), s[j - 2].get(), prec);
        arb_div(r.get(), a.get(), b.get(), prec);
        ratios.push_back(r.approx_double());
    }
    std::sort(ratios.begin(), ratios.end());
    const double rate = ratios[1];
    if (!std::isfinite(rate) || rate == 1)
        return nan_ball();
    ball::Ball R(rate), v, t;
    arb_mul(t.get(), R.get(), s[n - 1].get(), prec);
    arb_sub(v.get(), s[n].get(), t.get(), prec);
    arb_sub_ui(t.get(), R.get(), 1, prec);
    arb_neg(t.get(), t.get());
    arb_div(v.get(), v.get(), t.get(), prec);
    return mid_of(v);
}

LimitEstimate approx_limit(const std::vector<ball::Ball>& s, slong prec)
{
    LimitEstimate out;
    if (s.size() < 4)
        return out;
    const std::size_t w = static_cast<std::size_t>(std::max(4, extrapolation_window));
    std::vector<ball::Ball> win = last(s, w);
    std::vector<ball::Ball> win_prev(s.end() - static_cast<std::ptrdiff_t>(std::min(w, s.size() - 1)) - 1,
                                     s.end() - 1);
    ball::Ball wynn = approx_wynn_epsilon(win, prec);
    ball::Ball aitken = approx_iterated_aitken(win, prec);
    ball::Ball wynn_prev = approx_wynn_epsilon(win_prev, prec);
    if (!wynn.is_finite() || !aitken.is_finite() || !wynn_prev.is_finite())
        return out;
    ball::Ball d;
    double err = 0;
    for (const ball::Ball* o : {&aitken, &wynn_prev}) {
        arb_sub(d.get(), wynn.get(), o->get(), prec);
        err = std::max(err, std::fabs(d.approx_double()));
    }
    // The variants can agree to the last bit; never claim more than the working precision.
    const double floor_err = std::ldexp(std::fabs(wynn.approx_double()), -static_cast<int>(prec) + 8);
    err = std::max(err, floor_err);
    out.value = wynn;
    out.error = err;
    ball::Ball shown = wynn;
    mag_set_d(arb_radref(shown.get()), err);
    out.text = ball::determined_digits(shown, 60, &out.digits);
    ball::Ball a, b;
    const std::size_t n = s.size() - 1;
    arb_sub(a.get(), s[n].get(), s[n - 1].get(), prec);
    arb_sub(b.get(), s[n - 1].get(), s[n - 2].get(), prec);
    arb_div(a.get(), a.get(), b.get(), prec);
    out.rate = a.approx_double();
    out.ok = true;
    return out;
}

} // namespace renorm::cascade
