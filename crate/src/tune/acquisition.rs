//! Expected improvement: how much a trial at a setting is expected to beat the best score so far,
//! under the surrogate's normal predictive distribution. The tuner maximises it to pick the next
//! setting.
//!
//! What it is not: a choice of incumbent or margin (the tuning policy decides those) or an
//! optimiser (see [`super::polish::maximise_on_box`]).
//!
//! Numerics: EI = σ·h(Z) with h(z) = zΦ(z) + φ(z). For z ≥ −2 the two terms lose at most a few
//! digits to cancellation and are summed directly. Below that, h(−t) = φ(t) − tΦ(−t) cancels
//! badly (t² digits' worth: at Z = −14 the direct sum is off by about 1e-12 relative, REFERENCES
//! §8), so it is rewritten with the continued fraction of Mills' ratio R(t) = Φ(−t)/φ(t)
//! (Laplace's fraction; Abramowitz & Stegun 1964, eq. 26.2.14, number from memory):
//! R(t) = 1/(t + K(t)) with K(t) = 1/(t + 2/(t + 3/(t + …))), whence 1 − tR(t) = K(t)R(t) and
//! h(−t) = φ(t) R(t) K(t) — a product of positive terms, evaluated in log space so that
//! [`log_expected_improvement`] stays finite where EI itself underflows.

use crate::dist::quantile::{normal_cdf, normal_pdf};

/// ½ log(2π).
const HALF_LN_2PI: f64 = 0.918_938_533_204_672_8;
/// Below z = −2 the continued fraction replaces the direct sum.
const TAIL_START: f64 = -2.0;
/// Terms of the continued fraction: at t = 2 the truncation error is about 1e-16 relative after
/// 160 terms and falls quickly for larger t (checked against 50-digit mpmath while writing this).
const FRACTION_TERMS: usize = 160;

/// Expected improvement over `incumbent` for **maximisation**, with margin `margin` ≥ 0:
/// EI = (μ − f⁺ − ξ)Φ(Z) + σφ(Z), Z = (μ − f⁺ − ξ)/σ, and max(μ − f⁺ − ξ, 0) when σ = 0
/// (Jones, Schonlau & Welch 1998, *J. Global Optimization* 13, eq. 15 — number from memory — there
/// for minimisation;
/// the margin ξ is from later Bayesian-optimisation practice, e.g. Lizotte 2008). `sd` is the
/// predictive standard deviation, not the variance. NaN inputs or a negative `sd` give NaN.
///
/// ```
/// use mixwell::tune::acquisition::expected_improvement;
/// // At μ = f⁺ the improvement is half-normal: EI = σ/√(2π).
/// assert!((expected_improvement(1.0, 1.0, 1.0, 0.0) - 0.398_942_280_401_432_7).abs() < 1e-15);
/// ```
pub fn expected_improvement(mean: f64, sd: f64, incumbent: f64, margin: f64) -> f64 {
    let gain = mean - incumbent - margin;
    if sd.is_nan() || sd < 0.0 || gain.is_nan() {
        return f64::NAN;
    }
    if sd == 0.0 {
        return gain.max(0.0);
    }
    let z = gain / sd;
    if z >= TAIL_START {
        // gain·Φ(Z), not σ·Z·Φ(Z): σ·(gain/σ) need not round back to gain.
        gain * normal_cdf(z) + sd * normal_pdf(z)
    } else {
        sd * libm::exp(log_h_tail(-z))
    }
}

/// log EI, accurate where EI underflows (Z far below zero), −∞ where EI is exactly zero
/// (σ = 0 and no gain). Same arguments as [`expected_improvement`].
pub fn log_expected_improvement(mean: f64, sd: f64, incumbent: f64, margin: f64) -> f64 {
    let gain = mean - incumbent - margin;
    if sd.is_nan() || sd < 0.0 || gain.is_nan() {
        return f64::NAN;
    }
    if sd == 0.0 {
        return if gain > 0.0 { libm::log(gain) } else { f64::NEG_INFINITY };
    }
    let z = gain / sd;
    if z >= TAIL_START { libm::log(gain * normal_cdf(z) + sd * normal_pdf(z)) } else { libm::log(sd) + log_h_tail(-z) }
}

/// log h(−t) = log φ(t) + log R(t) + log K(t) for t > 2 (see the module notes).
fn log_h_tail(t: f64) -> f64 {
    let mut tail = 0.0;
    for k in (2..=FRACTION_TERMS).rev() {
        tail = k as f64 / (t + tail);
    }
    let k = 1.0 / (t + tail);
    -0.5 * t * t - HALF_LN_2PI + libm::log(k / (t + k))
}
