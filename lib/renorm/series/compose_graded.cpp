#include <renorm/series/compose_graded.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <thread>
#include <vector>

#include <flint/flint.h>

namespace renorm::series {

using ball::BallVec;

namespace {

/// Threads for one composition: FLINT's setting of the calling thread (solve::Request::threads
/// sets it), used only when the work is large enough to pay for starting threads.
int threads_for(slong n, slong prec)
{
    const int t = flint_get_num_threads();
    return (t > 1 && static_cast<double>(n) * static_cast<double>(prec) >= 4e6) ? t : 1;
}

/// fn(lo, hi) over [0, count) cut into `threads` contiguous parts, the first in the calling
/// thread and the others in new ones (which release FLINT's thread-local caches when done).
/// fn must write only what its part owns; the result does not depend on `threads`.
template <class Fn>
void split_run(slong count, int threads, const Fn& fn)
{
    if (threads <= 1 || count < 2) {
        fn(slong{0}, count);
        return;
    }
    const slong parts = std::min<slong>(threads, count);
    std::vector<std::thread> pool;
    for (slong t = 1; t < parts; ++t)
        pool.emplace_back([&fn, t, parts, count] {
            fn(count * t / parts, count * (t + 1) / parts);
            flint_cleanup();
        });
    fn(slong{0}, count / parts);
    for (auto& th : pool)
        th.join();
}

constexpr double minus_inf = -std::numeric_limits<double>::infinity();

// An owning mag_t (an upper bound with an unbounded exponent).
class Mag {
public:
    Mag() { mag_init(m_x); }
    Mag(const Mag& o)
    {
        mag_init(m_x);
        mag_set(m_x, o.m_x);
    }
    Mag& operator=(const Mag& o)
    {
        mag_set(m_x, o.m_x);
        return* this;
    }
    ~Mag() { mag_clear(m_x); }
    mag_struct* get() { return m_x; }
    const mag_struct* get() const { return m_x; }

private:
    mag_t m_x;
};

// An upper bound of sum_(k<len) |x_k|.
void l1_norm(mag_struct* out, arb_srcptr x, slong len)
{
    mag_t t;
    mag_init(t);
    mag_zero(out);
    for (slong k = 0; k < len; ++k) {
        arb_get_mag(t, x + k);
        mag_add(out, out, t);
    }
    mag_clear(t);
}

// log2 of a mag (minus infinity for 0). Picks precisions only, never a bound; it works on the
// exponent, so 2^-100000 does not underflow.
double log2_mag(const mag_struct* x)
{
    return mag_is_zero(x) ? minus_inf : mag_get_d_log2_approx(x);
}

bool all_finite(const BallPoly& p)
{
    return _arb_vec_is_finite(p.get()->coeffs, p.length()) != 0;
}

} // namespace

BallPoly compose_graded(const BallPoly& f, const BallPoly& h, slong n, slong prec)
{
    if (prec < 2)
        throw std::invalid_argument("series: prec must be >= 2");
    if (n < 0)
        throw std::invalid_argument("series: the truncation length must be >= 0");
    BallPoly out;
    if (n == 0)
        return out;

    // f(h) = F(w) with F(t) = f(h0 + t) (Taylor shift) and w = h - h0, which has valuation 1;
    // w^k has valuation k, so F is needed only to degree n - 1.
    Ball h0 = h.coeff(0);
    BallPoly shifted;
    arb_poly_taylor_shift(shifted.get(), f.get(), h0.get(), prec);
    arb_poly_truncate(shifted.get(), n);
    const slong len = shifted.length();
    // g = w / s, needed to degree n - 2.
    BallPoly g;
    arb_poly_shift_right(g.get(), h.get(), 1);
    arb_poly_truncate(g.get(), n - 1);
    if (len <= 1 || g.length() == 0 || n == 1)
        return truncated(shifted, 1);
    if (!all_finite(shifted) || !all_finite(g)) {
        // Magnitudes cannot grade anything: every block at full precision is what compose_arb
        // does.
        return compose_arb(f, h, n, prec);
    }
    arb_srcptr F = shifted.get()->coeffs;

    // Block size m and number of blocks J (F has len <= n coefficients).
    // m ~ sqrt(n / 2) rather than Brent–Kung's sqrt(n): the m baby steps are full products at
    // `prec`, while most giant steps are shorter and at lower precision, so fewer baby steps and
    // more giant steps pay (bench/compose.cpp: 5.7 s with sqrt(n / 2), 6.4 s with sqrt(n / 4),
    // at n = 1660, 6760 bits).
    const slong m = std::max<slong>(2, static_cast<slong>(std::sqrt(static_cast<double>(n) / 2)));
    const slong blocks = (len + m - 1) / m;
    slong J = blocks;

    // Baby steps: row i of W holds the coefficients of w^i of degree < n (row 0 is 1), stored
    // as an m x n matrix so that column k (the s^k coefficients of all powers) has stride n.
    // The giant step G = w^m / s^m is kept apart, to length n - m.
    // All at `prec`: block 0, the largest in the decaying case, uses every row in full.
    const slong glen = std::min(g.length(), n - 1);
    arb_srcptr gc = g.get()->coeffs;
    BallVec W(m * n);
    arb_one(W[0]);
    for (slong k = 0; k < glen; ++k)
        arb_set(W[n + 1 + k], gc + k);
    // w^i = s^i g^i with g^i = g^ceil(i/2) g^floor(i/2) (half of them squares), to the n - i
    // coefficients past the valuation; G = g^m likewise.
    auto power = [&](arb_ptr out_coeffs, slong i, slong out_len) {
        const slong a = (i + 1) / 2, b = i / 2;
        _arb_poly_mullow(out_coeffs, W[a * n + a], std::min(n - a, out_len), W[b * n + b],
                         std::min(n - b, out_len), out_len, prec);
    };
    // Rows i .. i + t - 1 depend only on rows <= ceil((i + t - 1) / 2) < i once i > t, so they
    // are computed side by side on t threads (each product at the caller's FLINT setting of 1).
    const int threads = threads_for(n, prec);
    slong i0 = 2;
    for (; i0 < m && i0 <= threads; ++i0)
        power(W[i0 * n + i0], i0, n - i0);
    for (slong i = i0; i < m; i += threads) {
        const slong batch = std::min<slong>(threads, m - i);
        split_run(batch, threads, [&](slong lo, slong hi) {
            for (slong r = i + lo; r < i + hi; ++r)
                power(W[r * n + r], r, n - r);
        });
    }
    BallPoly G;
    if (n > m) {
        arb_poly_fit_length(G.get(), n - m);
        power(G.get()->coeffs, m, n - m);
        _arb_poly_set_length(G.get(), n - m);
        _arb_poly_normalise(G.get());
    }

    if (G.length() == 0) // w^m vanishes to degree < n: F_k w^k with k >= m drops out
        J = 1;

    // Sizes, as rigorous upper bounds in mag_t (which has no underflow): nw[i] >= ||w^i|| and
    // B[j] >= the l1 norm of block j's contribution S_j(w) w^(jm) truncated to degree < n,
    //   B_j = (sum_i |F_(jm+i)| ||w^i||) ||trunc_L(G)||^j,  L = n - jm,
    // since trunc_n(w^(jm)) = s^(jm) trunc_L(G^j) and ||trunc_L(G^j)|| <= ||trunc_L(G)||^j
    // (the l1 norm is submultiplicative, and coefficients of degree < L of a product need only
    // those of degree < L of the factors). The bounds pick precisions and bound the blocks
    // that are dropped.
    std::vector<Mag> nw(static_cast<size_t>(m)), B(static_cast<size_t>(J));
    for (slong i = 0; i < m; ++i)
        l1_norm(nw[static_cast<size_t>(i)].get(), W[i * n + i], n - i);
    {
        Mag gl, t, sum;
        slong done = 0; // |G_k| summed for k < done
        for (slong j = J - 1; j >= 0; --j) {
            mag_struct* bj = B[static_cast<size_t>(j)].get();
            const slong L = n - j * m;
            for (; done < std::min(L, G.length()); ++done) {
                arb_get_mag(t.get(), G.get()->coeffs + done);
                mag_add(gl.get(), gl.get(), t.get());
            }
            for (slong i = 0; i < m && j * m + i < len; ++i) {
                arb_get_mag(t.get(), F + j * m + i);
                mag_addmul(bj, t.get(), nw[static_cast<size_t>(i)].get());
            }
            if (j > 0) {
                mag_pow_ui(t.get(), gl.get(), static_cast<ulong>(j));
                mag_mul(bj, bj, t.get());
            }
        }
    }
    std::vector<double> c(static_cast<size_t>(J));
    double ref = minus_inf;
    for (slong j = 0; j < J; ++j) {
        c[static_cast<size_t>(j)] = log2_mag(B[static_cast<size_t>(j)].get());
        ref = std::max(ref, c[static_cast<size_t>(j)]);
    }
    if (ref == minus_inf)
        return truncated(shifted, 1);

    // Blocks j >= Jc whose sum is below the rounding level of the result are not computed:
    // their contribution has valuation >= Jc m and l1 norm <= tail = sum_(j>=Jc) B_j, so adding
    // tail to the radius of every coefficient of degree >= Jc m encloses it.
    constexpr slong guard = 32;
    Mag tail;
    slong Jc = J;
    {
        Mag t;
        const double level =
            ref - static_cast<double>(prec + guard) - std::log2(static_cast<double>(n));
        for (slong j = J - 1; j >= 1; --j) {
            mag_add(t.get(), t.get(), B[static_cast<size_t>(j)].get());
            if (!(log2_mag(t.get()) < level))
                break;
            Jc = j;
            mag_set(tail.get(), t.get());
        }
    }
    J = Jc;

    // Working precisions: block j at p[j]; the Horner value R_j = sum_(j'>=j) S_j' G^(j'-j)
    // at q[j] = max_(j'>=j) p[j'].
    constexpr slong min_prec = 64;
    std::vector<slong> p(static_cast<size_t>(J)), q(static_cast<size_t>(J));
    for (slong j = 0; j < J; ++j) {
        const double cj = c[static_cast<size_t>(j)];
        slong pj = min_prec;
        if (cj != minus_inf) {
            const double drop = std::floor(ref - cj);
            pj = drop >= static_cast<double>(prec) ? min_prec
                                                   : prec - static_cast<slong>(drop) + guard;
        }
        p[static_cast<size_t>(j)] = std::clamp<slong>(pj, std::min(min_prec, prec), prec);
    }
    q[static_cast<size_t>(J - 1)] = p[static_cast<size_t>(J - 1)];
    for (slong j = J - 2; j >= 0; --j)
        q[static_cast<size_t>(j)] =
            std::max(p[static_cast<size_t>(j)], q[static_cast<size_t>(j + 1)]);

    // Giant steps (Horner in G): R_(J-1) = S_(J-1); R_j = S_j + s^m G R_(j+1), each to length
    // n - jm. Block j's coefficients S_j(w)_k = sum_i F_(jm+i) (w^i)_k are dot products down
    // column k of W, rounded once at p[j].
    BallVec R(n), T(n), Gr(n);
    slong rlen = 0;
    for (slong j = J - 1; j >= 0; --j) {
        const slong L = n - j * m;
        const slong mi = std::min(m, len - j * m);
        const slong pj = p[static_cast<size_t>(j)];
        const slong qj = q[static_cast<size_t>(j)];
        if (rlen > 0) {
            // T = trunc_(L - m)(G R_(j+1)), then R_j = S_j + s^m T.
            const slong tl = L - m;
            // Both factors are rounded to the product's precision first: Arb's product does
            // not get cheaper with a lower `prec` when its inputs carry more bits (measured:
            // 0.38 s against 0.09 s for the 29 steps at n = 830, 3430 bits).
            const slong qm = q[static_cast<size_t>(j + 1)];
            const slong gl = std::min(G.length(), tl);
            const slong rl = std::min(rlen, tl);
            if (qm < prec) {
                for (slong k = 0; k < gl; ++k)
                    arb_set_round(Gr[k], G.get()->coeffs + k, qm);
                for (slong k = 0; k < rl; ++k)
                    arb_set_round(R[k], R[k], qm);
                _arb_poly_mullow(T.data(), Gr.data(), gl, R.data(), rl, tl, qm);
            } else {
                _arb_poly_mullow(T.data(), G.get()->coeffs, gl, R.data(), rl, tl, qm);
            }
            for (slong k = L - 1; k >= m; --k)
                arb_swap(R[k], T[k - m]);
            for (slong k = 0; k < m; ++k)
                arb_zero(R[k]);
        } else {
            _arb_vec_zero(R.data(), L);
        }
        // The powers w^i with i > k have no s^k term: column k needs only rows 0..min(k, mi-1).
        // Columns are independent: on several threads each owns a range of k.
        const bool horner = rlen > 0;
        split_run(L, threads, [&](slong lo, slong hi) {
            Ball acc;
            for (slong k = lo; k < hi; ++k) {
                const slong rows = std::min(mi, k + 1);
                arb_dot(acc.get(), horner ? R[k] : nullptr, 0, F + j * m, 1, W[k], n, rows,
                        horner ? qj : pj);
                arb_swap(R[k], acc.get());
            }
        });
        rlen = L;
    }
    if (Jc < blocks && G.length() > 0)
        for (slong k = Jc * m; k < n; ++k)
            arb_add_error_mag(R[k], tail.get());
    arb_poly_fit_length(out.get(), n);
    _arb_vec_set(out.get()->coeffs, R.data(), n);
    _arb_poly_set_length(out.get(), n);
    _arb_poly_normalise(out.get());
    return out;
}

} // namespace renorm::series
