//! Quantiles used by diagnostics and the tuner: Φ⁻¹ and the Beta quantile.
//!
//! Only `libm` supplies transcendental functions, so every value here is bit-identical natively and
//! in wasm. The distribution functions these invert (Φ, the incomplete beta function) live in
//! [`super::special`]; they are re-exported here under the names the diagnostics have always used.
//! Equation and section numbers of the cited books are recalled from memory.

use super::special::IncompleteBeta;
pub use super::special::incomplete_beta as regularised_incomplete_beta;
pub use super::special::{normal_cdf, normal_pdf};

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
    let Some(beta) = IncompleteBeta::new(a, b) else {
        return f64::NAN;
    };
    let mut x = beta_quantile_start(a, b, q);
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..300 {
        let err = beta.tail(x, 1.0 - x).lower_value() - q;
        if err == 0.0 {
            return x;
        }
        if err < 0.0 {
            lo = x;
        } else {
            hi = x;
        }
        let density = libm::exp(beta.ln_front(x, 1.0 - x)) / (x * (1.0 - x));
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
