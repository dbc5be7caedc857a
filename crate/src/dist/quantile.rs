//! The standard normal distribution function and quantiles used by diagnostics and the tuner:
//! Φ, φ, Φ⁻¹, the regularised incomplete beta function and the Beta quantile.
//!
//! Only `libm` supplies transcendental functions, so every value here is bit-identical natively and
//! in wasm. These are not log-densities (those live in the parent module); they are the quantile
//! machinery that rank normalisation and the Monte Carlo standard error of quantiles need.
//! Equation and section numbers of the cited books are recalled from memory.

/// Φ(z), the standard normal distribution function.
pub fn normal_cdf(z: f64) -> f64 {
    0.5 * libm::erfc(-z * core::f64::consts::FRAC_1_SQRT_2)
}

/// φ(z), the standard normal density.
pub fn normal_pdf(z: f64) -> f64 {
    libm::exp(-0.5 * z * z) / (2.0 * core::f64::consts::PI).sqrt()
}

// AS 241 (PPND16) coefficients, exactly as published, highest power first. Central region
// |p − ½| ≤ 0.425: a rational function of r = 0.425² − q², times q.
#[allow(clippy::excessive_precision)]
const CENTRAL_NUM: [f64; 8] = [
    2.5090809287301226727e+3,
    3.3430575583588128105e+4,
    6.7265770927008700853e+4,
    4.5921953931549871457e+4,
    1.3731693765509461125e+4,
    1.9715909503065514427e+3,
    1.3314166789178437745e+2,
    3.3871328727963666080e+0,
];
#[allow(clippy::excessive_precision)]
const CENTRAL_DEN: [f64; 8] = [
    5.2264952788528545610e+3,
    2.8729085735721942674e+4,
    3.9307895800092710610e+4,
    2.1213794301586595867e+4,
    5.3941960214247511077e+3,
    6.8718700749205790830e+2,
    4.2313330701600911252e+1,
    1.0,
];
// Intermediate tail, r = sqrt(−log min(p, 1 − p)) ≤ 5: a rational function of r − 1.6.
#[allow(clippy::excessive_precision)]
const NEAR_NUM: [f64; 8] = [
    7.74545014278341407640e-4,
    2.27238449892691845833e-2,
    2.41780725177450611770e-1,
    1.27045825245236838258e+0,
    3.64784832476320460504e+0,
    5.76949722146069140550e+0,
    4.63033784615654529590e+0,
    1.42343711074968357734e+0,
];
#[allow(clippy::excessive_precision)]
const NEAR_DEN: [f64; 8] = [
    1.05075007164441684324e-9,
    5.47593808499534494600e-4,
    1.51986665636164571966e-2,
    1.48103976427480074590e-1,
    6.89767334985100004550e-1,
    1.67638483018380384940e+0,
    2.05319162663775882187e+0,
    1.0,
];
// Far tail, r > 5: a rational function of r − 5.
#[allow(clippy::excessive_precision)]
const FAR_NUM: [f64; 8] = [
    2.01033439929228813265e-7,
    2.71155556874348757815e-5,
    1.24266094738807843860e-3,
    2.65321895265761230930e-2,
    2.96560571828504891230e-1,
    1.78482653991729133580e+0,
    5.46378491116411436990e+0,
    6.65790464350110377720e+0,
];
#[allow(clippy::excessive_precision)]
const FAR_DEN: [f64; 8] = [
    2.04426310338993978564e-15,
    1.42151175831644588870e-7,
    1.84631831751005468180e-5,
    7.86869131145613259100e-4,
    1.48753612908506148525e-2,
    1.36929880922735805310e-1,
    5.99832206555887937690e-1,
    1.0,
];

/// Σ cᵢ x^(n−1−i) by Horner's rule, coefficients highest power first.
fn horner(coeffs: &[f64], x: f64) -> f64 {
    coeffs.iter().fold(0.0, |acc, &c| acc * x + c)
}

/// Φ⁻¹(p), the standard normal quantile, to full double precision.
///
/// Wichura, M. J. (1988), "Algorithm AS 241: The percentage points of the normal distribution",
/// *Applied Statistics* 37(3), 477–484, routine PPND16 (relative accuracy about 1e-16), with its
/// published coefficients. `p ≤ 0` gives −∞, `p ≥ 1` gives +∞, NaN gives NaN.
///
/// ```
/// use mixwell::dist::quantile::normal_quantile;
/// assert!((normal_quantile(0.975) - 1.959963984540054).abs() < 1e-15);
/// ```
pub fn normal_quantile(p: f64) -> f64 {
    if p.is_nan() {
        return f64::NAN;
    }
    if p <= 0.0 {
        return f64::NEG_INFINITY;
    }
    if p >= 1.0 {
        return f64::INFINITY;
    }
    let q = p - 0.5;
    if q.abs() <= 0.425 {
        let r = 0.180625 - q * q;
        return q * horner(&CENTRAL_NUM, r) / horner(&CENTRAL_DEN, r);
    }
    let tail = if q < 0.0 { p } else { 1.0 - p };
    let r = libm::sqrt(-libm::log(tail));
    let x = if r <= 5.0 {
        horner(&NEAR_NUM, r - 1.6) / horner(&NEAR_DEN, r - 1.6)
    } else {
        horner(&FAR_NUM, r - 5.0) / horner(&FAR_DEN, r - 5.0)
    };
    if q < 0.0 { -x } else { x }
}

/// log B(a, b) = log Γ(a) + log Γ(b) − log Γ(a + b).
fn ln_beta(a: f64, b: f64) -> f64 {
    libm::lgamma(a) + libm::lgamma(b) - libm::lgamma(a + b)
}

/// Both parameters at least this large use the Stirling form of [`ln_beta_front`].
const STIRLING_FROM: f64 = 10.0;

/// log of xᵃ(1 − x)ᵇ / B(a, b), for 0 < x < 1.
///
/// For large a and b the three log-gamma values nearly cancel, and the naive sum loses about
/// log10((a + b)·log(a + b)) digits. There the Stirling form is used instead (the device of
/// DiDonato & Morris 1992, ACM TOMS 18(3), algorithm 708): with x₀ = a/(a + b) and d = x − x₀,
/// a·log1p(d/x₀) + b·log1p(−d/(1 − x₀)) + ½·log(ab/(a + b)) − ½·log 2π − Δ(a) − Δ(b) + Δ(a + b),
/// where Δ is the remainder of Stirling's series. An error in x₀ cancels to first order, because
/// x₀ is where the first two terms peak.
fn ln_beta_front(a: f64, b: f64, x: f64) -> f64 {
    if a < STIRLING_FROM || b < STIRLING_FROM {
        return a * libm::log(x) + b * libm::log1p(-x) - ln_beta(a, b);
    }
    let total = a + b;
    let (x0, y0) = (a / total, b / total);
    let d = x - x0;
    a * libm::log1p(d / x0) + b * libm::log1p(-d / y0) + 0.5 * libm::log(a * b / total)
        - crate::dist::special::HALF_LN_2PI
        - stirling_remainder(a)
        - stirling_remainder(b)
        + stirling_remainder(total)
}

/// Δ(x) = log Γ(x) − [(x − ½)·log x − x + ½·log 2π], for x ≥ 10, by the asymptotic series
/// Σ B₂ₖ / (2k(2k − 1) x^{2k−1}) (Abramowitz & Stegun 1964, eq. 6.1.40); eight terms leave an
/// error below 1e-17 at x = 10.
fn stirling_remainder(x: f64) -> f64 {
    const COEFFS: [f64; 8] = [
        1.0 / 12.0,
        -1.0 / 360.0,
        1.0 / 1260.0,
        -1.0 / 1680.0,
        1.0 / 1188.0,
        -691.0 / 360360.0,
        1.0 / 156.0,
        -3617.0 / 122400.0,
    ];
    let inv = 1.0 / x;
    let inv2 = inv * inv;
    let mut sum = 0.0;
    for c in COEFFS.iter().rev() {
        sum = sum * inv2 + c;
    }
    sum * inv
}

/// The continued fraction for I_x(a, b) (Abramowitz & Stegun 1964, eq. 26.5.8), evaluated by the
/// modified Lentz method (Lentz 1976; Thompson & Barnett 1986). Converges fast for
/// x < (a + 1)/(a + b + 2), in about O(√max(a, b)) terms.
fn beta_continued_fraction(a: f64, b: f64, x: f64) -> f64 {
    const MAX_TERMS: usize = 100_000;
    let (qab, qap, qam) = (a + b, a + 1.0, a - 1.0);
    let mut c = 1.0;
    let mut d = 1.0 - qab * x / qap;
    if d.abs() < TINY {
        d = TINY;
    }
    d = 1.0 / d;
    let mut h = d;
    for m in 1..=MAX_TERMS {
        let m = m as f64;
        let m2 = 2.0 * m;
        // Even step.
        h *= lentz_step(m * (b - m) * x / ((qam + m2) * (a + m2)), &mut c, &mut d);
        // Odd step.
        let delta = lentz_step(-(a + m) * (qab + m) * x / ((a + m2) * (qap + m2)), &mut c, &mut d);
        h *= delta;
        if (delta - 1.0).abs() <= f64::EPSILON {
            break;
        }
    }
    h
}

/// I_x(a, b), the regularised incomplete beta function: the Beta(a, b) distribution function at x.
///
/// Continued fraction of Abramowitz & Stegun (1964) eq. 26.5.8 with the symmetry
/// I_x(a, b) = 1 − I_{1−x}(b, a) to stay where it converges fast (as in Press et al. 2007,
/// *Numerical Recipes*, §6.4). Against scipy's `betainc` the relative error is below 1e-13 for
/// a, b up to 3·10⁴ (crate/tests/diagnostics.rs). When one parameter is below 10 and the other
/// is large, the log-gamma cancellation costs about ε·b·log b.
/// Invalid arguments (a ≤ 0, b ≤ 0, NaN) give NaN; x is clamped to [0, 1].
pub fn regularised_incomplete_beta(a: f64, b: f64, x: f64) -> f64 {
    if a.is_nan() || b.is_nan() || x.is_nan() || a <= 0.0 || b <= 0.0 {
        return f64::NAN;
    }
    if x <= 0.0 {
        return 0.0;
    }
    if x >= 1.0 {
        return 1.0;
    }
    if x < (a + 1.0) / (a + b + 2.0) {
        libm::exp(ln_beta_front(a, b, x)) * beta_continued_fraction(a, b, x) / a
    } else {
        1.0 - libm::exp(ln_beta_front(b, a, 1.0 - x)) * beta_continued_fraction(b, a, 1.0 - x) / b
    }
}

/// The Beta(a, b) density at x, 0 < x < 1.
fn beta_density(a: f64, b: f64, x: f64) -> f64 {
    libm::exp(ln_beta_front(a, b, x)) / (x * (1.0 - x))
}

/// The q-quantile of Beta(a, b): the x with I_x(a, b) = q.
///
/// Newton's method on I_x(a, b) − q, kept inside a shrinking bracket by bisection whenever a step
/// leaves it. The starting point is the one of Press et al. (2007), *Numerical Recipes* §6.14.1:
/// Abramowitz & Stegun (1964) eq. 26.5.22 for a, b ≥ 1, otherwise a two-term power approximation.
/// q ≤ 0 gives 0, q ≥ 1 gives 1; invalid a, b or NaN give NaN.
pub fn beta_quantile(a: f64, b: f64, q: f64) -> f64 {
    if a.is_nan() || b.is_nan() || q.is_nan() || a <= 0.0 || b <= 0.0 {
        return f64::NAN;
    }
    if q <= 0.0 {
        return 0.0;
    }
    if q >= 1.0 {
        return 1.0;
    }
    let mut x = beta_quantile_start(a, b, q);
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..300 {
        let err = regularised_incomplete_beta(a, b, x) - q;
        if err == 0.0 {
            return x;
        }
        if err < 0.0 {
            lo = x;
        } else {
            hi = x;
        }
        let density = beta_density(a, b, x);
        let newton = x - err / density;
        let next = if density > 0.0 && newton > lo && newton < hi { newton } else { 0.5 * (lo + hi) };
        if (next - x).abs() <= 4.0 * f64::EPSILON * x.max(f64::MIN_POSITIVE) || hi - lo <= f64::EPSILON * hi {
            return next;
        }
        x = next;
    }
    x
}

/// Starting point for [`beta_quantile`] (Press et al. 2007, §6.14.1).
fn beta_quantile_start(a: f64, b: f64, q: f64) -> f64 {
    let x = if a >= 1.0 && b >= 1.0 {
        // A&S 26.5.22: a normal approximation on a transformed scale.
        let pp = if q < 0.5 { q } else { 1.0 - q };
        let t = libm::sqrt(-2.0 * libm::log(pp));
        let mut z = (2.30753 + t * 0.27061) / (1.0 + t * (0.99229 + t * 0.04481)) - t;
        if q < 0.5 {
            z = -z;
        }
        let al = (z * z - 3.0) / 6.0;
        let h = 2.0 / (1.0 / (2.0 * a - 1.0) + 1.0 / (2.0 * b - 1.0));
        let w = z * libm::sqrt(al + h) / h
            - (1.0 / (2.0 * b - 1.0) - 1.0 / (2.0 * a - 1.0)) * (al + 5.0 / 6.0 - 2.0 / (3.0 * h));
        a / (a + b * libm::exp(2.0 * w))
    } else {
        let lna = libm::log(a / (a + b));
        let lnb = libm::log(b / (a + b));
        let t = libm::exp(a * lna) / a;
        let u = libm::exp(b * lnb) / b;
        let w = t + u;
        if q < t / w { libm::pow(a * w * q, 1.0 / a) } else { 1.0 - libm::pow(b * w * (1.0 - q), 1.0 / b) }
    };
    if x > 0.0 && x < 1.0 { x } else { 0.5 }
}

/// Smallest magnitude the Lentz ratios may take, so no division by zero occurs.
const TINY: f64 = 1e-300;

/// One step of the modified Lentz algorithm for a continued fraction with partial numerator
/// `aa`: updates the running ratios `c` and `d` (kept away from zero) and returns the factor c·d.
fn lentz_step(aa: f64, c: &mut f64, d: &mut f64) -> f64 {
    *d = 1.0 + aa * *d;
    if d.abs() < TINY {
        *d = TINY;
    }
    *c = 1.0 + aa / *c;
    if c.abs() < TINY {
        *c = TINY;
    }
    *d = 1.0 / *d;
    *d * *c
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(a: f64, b: f64) -> f64 {
        if a == b { 0.0 } else { (a - b).abs() / b.abs() }
    }

    /// Φ⁻¹ check values of REFERENCES.md §2 (scipy `ndtri` and mpmath at 50 digits), relative
    /// tolerance 1e-14 as advised there.
    #[test]
    #[allow(clippy::excessive_precision)] // the 17 significant digits printed in REFERENCES.md §2
    fn normal_quantile_matches_reference_table() {
        let table = [
            (0.5, 0.0),
            (0.975, 1.9599639845400539),
            (0.95, 1.6448536269514723),
            (0.8413447460685429, 0.99999999999999991),
            (1e-10, -6.3613409024040562),
            (0.999, 3.0902323061678133),
        ];
        for (p, want) in table {
            let got = normal_quantile(p);
            assert!(if want == 0.0 { got == 0.0 } else { rel(got, want) < 1e-14 }, "Φ⁻¹({p}) = {got}, want {want}");
        }
    }

    /// Φ(Φ⁻¹(p)) = p, using the erfc-based Φ (an independent route); the tolerance allows the
    /// conditioning |dΦ/dz · z / Φ| of Φ at the point, times a few ulps.
    #[test]
    fn normal_quantile_inverts_the_distribution_function() {
        for k in 1..2000 {
            let p = k as f64 / 2000.0;
            let z = normal_quantile(p);
            let back = normal_cdf(z);
            let cond = (normal_pdf(z) * z.abs() / p).max(1.0);
            assert!(rel(back, p) < 8.0 * f64::EPSILON * cond, "p {p}: Φ(Φ⁻¹(p)) = {back}");
        }
    }

    #[test]
    fn normal_quantile_edges() {
        assert_eq!(normal_quantile(0.0), f64::NEG_INFINITY);
        assert_eq!(normal_quantile(1.0), f64::INFINITY);
        assert!(normal_quantile(f64::NAN).is_nan());
        assert!(normal_quantile(1e-300).is_finite());
    }

    /// Stirling's series with its remainder reproduces log Γ (REFERENCES.md §2: lgamma(10) =
    /// log 9! = 12.80182748008147; the others against libm's lgamma).
    #[test]
    fn stirling_remainder_completes_log_gamma() {
        let stirling =
            |x: f64| (x - 0.5) * libm::log(x) - x + crate::dist::special::HALF_LN_2PI + stirling_remainder(x);
        assert!(rel(stirling(10.0), 12.80182748008147) < 1e-15);
        for &x in &[13.5, 41.0, 761.0, 1e5] {
            assert!(rel(stirling(x), libm::lgamma(x)) < 1e-14, "x = {x}");
        }
    }

    /// Exact identities: I_x(1, 1) = x, I_x(a, 1) = xᵃ, I_x(1, b) = 1 − (1 − x)ᵇ, and
    /// I_{1/2}(a, a) = 1/2 by symmetry (Abramowitz & Stegun 1964, 26.5.14–26.5.16).
    #[test]
    fn incomplete_beta_identities() {
        for &x in &[0.01, 0.2, 0.5, 0.77, 0.999] {
            assert!(rel(regularised_incomplete_beta(1.0, 1.0, x), x) < 1e-14);
            assert!(rel(regularised_incomplete_beta(3.5, 1.0, x), libm::pow(x, 3.5)) < 1e-13);
            assert!(rel(regularised_incomplete_beta(1.0, 2.5, x), 1.0 - libm::pow(1.0 - x, 2.5)) < 1e-13);
        }
        for &a in &[0.3, 1.0, 7.5, 120.0, 4000.0] {
            assert!(rel(regularised_incomplete_beta(a, a, 0.5), 0.5) < 1e-12, "a = {a}");
        }
        assert!(regularised_incomplete_beta(-1.0, 1.0, 0.5).is_nan());
        assert_eq!(regularised_incomplete_beta(2.0, 3.0, -0.1), 0.0);
        assert_eq!(regularised_incomplete_beta(2.0, 3.0, 1.5), 1.0);
    }

    /// The Beta quantile inverts the incomplete beta function; Beta(1, 1) is uniform.
    #[test]
    fn beta_quantile_round_trips() {
        for &(a, b) in &[(0.5, 0.5), (1.0, 1.0), (2.0, 5.0), (41.0, 761.0), (2501.0, 47501.0), (0.2, 30.0)] {
            for &q in &[1e-6, 0.01, 0.1586552539314571, 0.5, 0.8413447460685429, 0.99] {
                let x = beta_quantile(a, b, q);
                let back = regularised_incomplete_beta(a, b, x);
                assert!(rel(back, q) < 1e-11, "Beta({a}, {b}) q {q}: x {x}, I_x = {back}");
            }
        }
        assert_eq!(beta_quantile(1.0, 1.0, 0.25), 0.25);
        assert!(beta_quantile(0.0, 1.0, 0.5).is_nan());
        assert_eq!(beta_quantile(2.0, 2.0, 0.0), 0.0);
        assert_eq!(beta_quantile(2.0, 2.0, 1.0), 1.0);
    }
}
