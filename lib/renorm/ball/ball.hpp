#pragma once
/// \file
/// RAII wrappers over Arb balls: the one header of renorm that includes Arb.
///
/// A Ball is an arb_t: a midpoint and a radius, standing for every real number in
/// [mid - rad, mid + rad]. Rounding operations take `prec` (bits) last; see STYLE.md §3.

#include <arb.h>
#include <arb_mat.h>
#include <arb_poly.h>
#include <acb.h>

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace renorm::ball {

/// A real ball (owning wrapper over arb_t).
class Ball {
public:
    Ball() { arb_init(m_x); }
    explicit Ball(double v)
    {
        arb_init(m_x);
        arb_set_d(m_x, v);
    }
    explicit Ball(slong v)
    {
        arb_init(m_x);
        arb_set_si(m_x, v);
    }
    explicit Ball(const arb_t v)
    {
        arb_init(m_x);
        arb_set(m_x, v);
    }
    Ball(const Ball& o)
    {
        arb_init(m_x);
        arb_set(m_x, o.m_x);
    }
    Ball(Ball&& o) noexcept
    {
        arb_init(m_x);
        arb_swap(m_x, o.m_x);
    }
    Ball& operator=(const Ball& o)
    {
        if (this != &o)
            arb_set(m_x, o.m_x);
        return *this;
    }
    Ball& operator=(Ball&& o) noexcept
    {
        arb_swap(m_x, o.m_x);
        return *this;
    }
    ~Ball() { arb_clear(m_x); }

    arb_ptr get() { return m_x; }
    arb_srcptr get() const { return m_x; }

    /// The midpoint rounded to a double. No guarantee.
    double approx_double() const { return arf_get_d(arb_midref(m_x), ARF_RND_NEAR); }
    /// An upper bound for the radius, as a double (rounded up).
    double radius_upper() const { return mag_get_d(arb_radref(m_x)); }
    bool is_finite() const { return arb_is_finite(m_x) != 0; }

private:
    arb_t m_x;
};

/// Parses a decimal string (e.g. "2.5", "1e-3", "[1.5 +/- 1e-10]") into a ball containing it.
/// Encloses: the decimal number (or interval) the string denotes.
/// Returns: std::nullopt when the string is not a number.
/// Precision: the conversion rounds at `prec` bits, outward.
std::optional<Ball> from_string(const std::string& s, slong prec);

/// Decimal text of the ball's midpoint with `digits` significant digits (no radius). No guarantee.
std::string approx_decimal(const Ball& x, slong digits);

/// Decimal text "[m +/- r]" with `digits` digits, as Arb prints it. Encloses: the ball.
std::string enclosure_string(const Ball& x, slong digits);

/// Decimal text of the digits of x that the ball determines: Arb's rounding, in which the
/// printed midpoint is correct to within one unit in its last digit for every point of x
/// (at most `max_digits` digits, no radius). Encloses: x lies within one unit of the last printed
/// digit of the text. Returns the number of significant digits printed through `count`.
std::string determined_digits(const Ball& x, slong max_digits, slong* count = nullptr);

/// Exact, lossless text of a ball (Arb's dump format: mid and rad as exact binary numbers).
std::string dump(const Ball& x);
/// Inverse of dump(). Returns std::nullopt for malformed text.
std::optional<Ball> load(const std::string& s);

/// True when x certainly contains y.
inline bool contains(const Ball& x, const Ball& y) { return arb_contains(x.get(), y.get()) != 0; }
/// True when x and y certainly share a point.
inline bool overlaps(const Ball& x, const Ball& y) { return arb_overlaps(x.get(), y.get()) != 0; }

/// Bits needed for `digits` decimal digits: ceil(digits * log2 10) + guard.
slong digits_to_bits(slong digits, slong guard = 0);
/// Decimal digits that `bits` bits of relative accuracy give: floor(bits * log10 2).
slong bits_to_digits(slong bits);

/// A vector of balls (owning wrapper over an arb_ptr).
class BallVec {
public:
    BallVec() = default;
    explicit BallVec(slong n) : m_n(n), m_v(n > 0 ? _arb_vec_init(n) : nullptr) {}
    BallVec(const BallVec& o) : BallVec(o.m_n) { _arb_vec_set(m_v, o.m_v, m_n); }
    BallVec(BallVec&& o) noexcept : m_n(std::exchange(o.m_n, 0)), m_v(std::exchange(o.m_v, nullptr))
    {
    }
    BallVec& operator=(BallVec o) noexcept
    {
        std::swap(m_n, o.m_n);
        std::swap(m_v, o.m_v);
        return *this;
    }
    ~BallVec()
    {
        if (m_v)
            _arb_vec_clear(m_v, m_n);
    }
    slong size() const { return m_n; }
    arb_ptr data() { return m_v; }
    arb_srcptr data() const { return m_v; }
    arb_ptr operator[](slong i) { return m_v + i; }
    arb_srcptr operator[](slong i) const { return m_v + i; }

private:
    slong m_n = 0;
    arb_ptr m_v = nullptr;
};

/// A polynomial with ball coefficients (owning wrapper over arb_poly_t).
class BallPoly {
public:
    BallPoly() { arb_poly_init(m_p); }
    BallPoly(const BallPoly& o)
    {
        arb_poly_init(m_p);
        arb_poly_set(m_p, o.m_p);
    }
    BallPoly(BallPoly&& o) noexcept
    {
        arb_poly_init(m_p);
        arb_poly_swap(m_p, o.m_p);
    }
    BallPoly& operator=(const BallPoly& o)
    {
        if (this != &o)
            arb_poly_set(m_p, o.m_p);
        return *this;
    }
    BallPoly& operator=(BallPoly&& o) noexcept
    {
        arb_poly_swap(m_p, o.m_p);
        return *this;
    }
    ~BallPoly() { arb_poly_clear(m_p); }

    arb_poly_struct* get() { return m_p; }
    const arb_poly_struct* get() const { return m_p; }
    /// Number of stored coefficients (degree + 1; 0 for the zero polynomial).
    slong length() const { return arb_poly_length(m_p); }
    /// Coefficient k (a zero ball past the length).
    Ball coeff(slong k) const
    {
        Ball b;
        arb_poly_get_coeff_arb(b.get(), m_p, k);
        return b;
    }
    void set_coeff(slong k, const Ball& b) { arb_poly_set_coeff_arb(m_p, k, b.get()); }

private:
    arb_poly_t m_p;
};

/// A dense matrix of balls (owning wrapper over arb_mat_t).
class BallMat {
public:
    BallMat(slong rows, slong cols) { arb_mat_init(m_m, rows, cols); }
    BallMat(const BallMat& o)
    {
        arb_mat_init(m_m, arb_mat_nrows(o.m_m), arb_mat_ncols(o.m_m));
        arb_mat_set(m_m, o.m_m);
    }
    BallMat(BallMat&& o) noexcept
    {
        arb_mat_init(m_m, 0, 0);
        arb_mat_swap(m_m, o.m_m);
    }
    BallMat& operator=(BallMat o) noexcept
    {
        arb_mat_swap(m_m, o.m_m);
        return *this;
    }
    ~BallMat() { arb_mat_clear(m_m); }
    arb_mat_struct* get() { return m_m; }
    const arb_mat_struct* get() const { return m_m; }
    slong rows() const { return arb_mat_nrows(m_m); }
    slong cols() const { return arb_mat_ncols(m_m); }
    arb_ptr entry(slong i, slong j) { return arb_mat_entry(m_m, i, j); }
    arb_srcptr entry(slong i, slong j) const { return arb_mat_entry(m_m, i, j); }

private:
    arb_mat_t m_m;
};

/// Outcome of an escalation driven by with_increasing_prec().
struct Escalation {
    bool succeeded = false; ///< fn returned true at some precision <= max_prec
    slong prec = 0;         ///< the last precision tried
};

/// Calls fn(prec) for prec = start, 2 start, 4 start, ... while fn returns false and
/// prec <= max_prec. The one place where precision escalates (STYLE.md §3).
/// Returns: whether fn succeeded and at which precision; reaching max_prec is reported by
/// succeeded == false. Throws std::invalid_argument for start < 2 or max_prec < start.
Escalation with_increasing_prec(slong start, slong max_prec, const std::function<bool(slong)>& fn);

} // namespace renorm::ball
