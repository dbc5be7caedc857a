//! The error function, its complement and scaled complement, and the standard normal distribution
//! function Φ with its logarithm, accurate in both tails.
//!
//! erf and erfc are fdlibm's (Sun Microsystems 1993, `s_erf.c`: rational approximations on five
//! intervals, error below 1 ulp), taken from `libm`. What this module adds is the far tail, where
//! erfc underflows: the scaled complement erfcx(x) = e^{x²} erfc(x) and log Φ(z) for z down to
//! −10¹⁵⁴, by Laplace's asymptotic series for erfcx (Abramowitz & Stegun 1964, eq. 7.1.23; number
//! from memory) and an exact split of x² so that e^{−x²} loses nothing to the rounding of x².

use core::f64::consts::FRAC_1_SQRT_2;

/// erf(x) = (2/√π)∫₀ˣ e^{−t²} dt (fdlibm via `libm`).
#[inline]
pub fn erf(x: f64) -> f64 {
    libm::erf(x)
}

/// erfc(x) = 1 − erf(x), without cancellation for large x (fdlibm via `libm`). Underflows to a
/// subnormal beyond x ≈ 26.5 and to 0 beyond x ≈ 27.3; use [`erfcx`] or [`ln_normal_cdf`] there.
#[inline]
pub fn erfc(x: f64) -> f64 {
    libm::erfc(x)
}

/// Below this erfcx is e^{x²}·erfc(x) (both factors representable); above, the asymptotic series.
const ERFCX_SERIES_FROM: f64 = 26.0;

/// x² = hi + lo exactly (Dekker 1971, "A floating-point technique for extending the available
/// precision"; Veltkamp's split), for |x| < 1e150.
#[inline]
fn exact_square(x: f64) -> (f64, f64) {
    let hi = x * x;
    let c = 134_217_729.0 * x; // 2²⁷ + 1
    let x_hi = c - (c - x);
    let x_lo = x - x_hi;
    (hi, ((x_hi * x_hi - hi) + 2.0 * x_hi * x_lo) + x_lo * x_lo)
}

/// e^{−x²/2·s} for s = 1 or 2, i.e. e^{−x²/2} or e^{−x²}, without the error of rounding x².
#[inline]
fn exp_neg_square(x: f64, half: bool) -> f64 {
    let (hi, lo) = exact_square(x);
    let (hi, lo) = if half { (0.5 * hi, 0.5 * lo) } else { (hi, lo) };
    libm::exp(-hi) * (1.0 - lo)
}

/// erfcx(x) = e^{x²}·erfc(x), the scaled complementary error function; +∞ where it overflows
/// (x < −26.6), NaN for NaN. Relative error a few ulp.
///
/// For x < 26 it is e^{x²}·erfc(x) with x² split exactly, so the rounding of x² costs nothing; from
/// 26 on, Laplace's asymptotic series erfcx(x) ~ (1/(x√π)) Σₙ (−1)ⁿ (2n−1)!!/(2x²)ⁿ, whose ninth
/// term is below 1e-19 relative there.
pub fn erfcx(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    if x < ERFCX_SERIES_FROM {
        if x < -26.6 {
            return f64::INFINITY;
        }
        let (hi, lo) = exact_square(x);
        return libm::exp(hi) * (1.0 + lo) * erfc(x);
    }
    if x == f64::INFINITY {
        return 0.0;
    }
    let t = 0.5 / (x * x);
    (1.0 - t * laplace_series_tail(t)) / (x * SQRT_PI)
}

/// √π.
const SQRT_PI: f64 = 1.772_453_850_905_516;

/// 1 − 3t(1 − 5t(1 − 7t(… (1 − 17t)))), t = 1/(2x²): Laplace's series for x√π·erfcx(x) after its
/// first two terms, in nested form; the first omitted term is 19!!·t¹⁰ relative.
#[inline]
fn laplace_series_tail(t: f64) -> f64 {
    let mut acc = 1.0;
    for k in (1..=8).rev() {
        acc = 1.0 - f64::from(2 * k + 1) * t * acc;
    }
    acc
}

/// Below this z, Φ(z) is computed from erfcx; above, from erfc directly (bit for bit the form the
/// tuner and the diagnostics have always used).
const NORMAL_TAIL_FROM: f64 = -2.0;

/// Φ(z), the standard normal distribution function. Relative error a few ulp everywhere, including
/// the lower tail down to the underflow of Φ near z = −38.5.
///
/// ```
/// use mixwell::dist::special::normal_cdf;
/// assert!((normal_cdf(1.959963984540054) - 0.975).abs() < 1e-16);
/// ```
pub fn normal_cdf(z: f64) -> f64 {
    if z >= NORMAL_TAIL_FROM {
        0.5 * erfc(-z * FRAC_1_SQRT_2)
    } else if z > -1e150 {
        // The split e^{−z²/2} is exact where erfc(−z/√2) would magnify the rounding of z/√2.
        0.5 * exp_neg_square(z, true) * erfcx(-z * FRAC_1_SQRT_2)
    } else {
        0.0
    }
}

/// φ(z), the standard normal density.
pub fn normal_pdf(z: f64) -> f64 {
    libm::exp(-0.5 * z * z) / (2.0 * core::f64::consts::PI).sqrt()
}

/// log Φ(z), accurate to a few ulp relative from z = −10¹⁵⁴ (where it is ≈ −5e307) to z = +38.5
/// (where it is ≈ −1e-324 and underflows). log(1 − Φ(z)) is `ln_normal_cdf(-z)` (exact negation).
///
/// For z < −2 it is −z²/2 + log(erfcx(−z/√2)/2), so nothing underflows; for z > 0 it is
/// log1p(−Φ(−z)), so the digits of a probability close to 1 are not lost.
///
/// ```
/// use mixwell::dist::special::ln_normal_cdf;
/// // REFERENCES.md §2: log Φ(−37.5) (mpmath, 50 digits).
/// assert!((ln_normal_cdf(-37.5) / -707.66898931750719 - 1.0).abs() < 1e-15);
/// ```
pub fn ln_normal_cdf(z: f64) -> f64 {
    if z.is_nan() {
        f64::NAN
    } else if z < NORMAL_TAIL_FROM {
        -0.5 * z * z + libm::log(0.5 * erfcx(-z * FRAC_1_SQRT_2))
    } else if z <= 0.0 {
        libm::log(normal_cdf(z))
    } else {
        libm::log1p(-normal_cdf(-z))
    }
}

#[cfg(test)]
#[allow(clippy::excessive_precision)]
mod tests {
    use super::*;

    fn rel(got: f64, want: f64) -> f64 {
        ((got - want) / want).abs()
    }

    /// REFERENCES.md §2 (mpmath 50-digit column), tolerance 1e-14 as advised there for erf.
    #[test]
    fn erf_and_erfc_match_references_section_2() {
        for (x, want) in [(0.5, 0.52049987781304654), (1.0, 0.84270079294971487), (2.0, 0.99532226501895273)] {
            assert!(rel(erf(x), want) < 1e-14, "erf({x})");
        }
        assert!(rel(erf(-0.3), -0.32862675945912742) < 1e-14);
        for (x, want) in [(1.0, 0.15729920705028513), (3.0, 2.2090496998585441e-5), (10.0, 2.0884875837625448e-45)] {
            assert!(rel(erfc(x), want) < 1e-14, "erfc({x})");
        }
    }

    /// The two forms of erfcx meet at x = 26 to a few ulp (both are accurate there).
    #[test]
    fn erfcx_is_continuous_where_its_method_changes() {
        let below = libm::exp(26.0 * 26.0) * erfc(26.0);
        let t = 0.5 / (26.0 * 26.0);
        let above = (1.0 - t * laplace_series_tail(t)) / (26.0 * SQRT_PI);
        assert!(rel(below, above) < 1e-14, "{below} vs {above}");
        assert_eq!(erfcx(f64::INFINITY), 0.0);
        assert_eq!(erfcx(-30.0), f64::INFINITY);
        assert!(erfcx(f64::NAN).is_nan());
    }

    /// REFERENCES.md §2: Φ and log Φ in the tails (mpmath 50 digits); Φ(−10) 1e-13 as advised.
    #[test]
    fn normal_cdf_matches_references_section_2() {
        assert!(rel(normal_cdf(1.0), 0.84134474606854295) < 1e-15);
        assert!(rel(normal_cdf(-3.0), 0.0013498980316300945) < 1e-14);
        assert!(rel(normal_cdf(-10.0), 7.6198530241605261e-24) < 1e-13);
        assert!(rel(normal_cdf(-37.5), 4.6053530095819548e-308) < 1e-13);
        assert!(rel(ln_normal_cdf(-10.0), -53.231285150512471) < 1e-15);
        assert!(rel(ln_normal_cdf(5.0), -2.8665161296376359e-7) < 1e-14);
        assert_eq!(ln_normal_cdf(f64::INFINITY), 0.0);
        assert_eq!(ln_normal_cdf(f64::NEG_INFINITY), f64::NEG_INFINITY);
        assert!(ln_normal_cdf(f64::NAN).is_nan());
    }
}
