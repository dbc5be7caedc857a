//! Monte Carlo standard errors of the posterior mean and of posterior quantiles.

use crate::dist::quantile::{beta_quantile, normal_cdf};

/// MCSE(θ̄) = sd(θ)/sqrt(ESS_mean) (Vehtari et al. 2021; Geyer 1992), with sd the sample standard
/// deviation of all draws and ESS_mean the split-chain ESS of the raw draws.
pub(crate) fn mcse_of_mean(sd: f64, mean_ess: f64) -> f64 {
    sd / mean_ess.sqrt()
}

/// MCSE of the p-quantile by the Beta-interval construction of Vehtari et al. (2021), as laid out
/// in REFERENCES.md §4 (recalled, not checked against the paper's text):
///
/// with S_eff = ESS of I(θ ≤ q̂_p), take a_lo, a_hi = the Φ(−1) and Φ(1) quantiles of
/// Beta(S_eff·p + 1, S_eff·(1 − p) + 1); with θ_(1) ≤ … ≤ θ_(S) the sorted draws,
/// MCSE = (θ_(min(⌈a_hi·S⌉, S)) − θ_(max(⌊a_lo·S⌋, 1)))/2 — half the width of a ±1 sd interval.
///
/// NaN when S_eff is NaN or p is outside (0, 1).
pub(crate) fn mcse_of_quantile(sorted: &[f64], p: f64, quantile_ess: f64) -> f64 {
    let s = sorted.len();
    if s == 0 || !(p > 0.0 && p < 1.0) || quantile_ess.is_nan() || quantile_ess <= 0.0 {
        return f64::NAN;
    }
    let (a, b) = (quantile_ess * p + 1.0, quantile_ess * (1.0 - p) + 1.0);
    let a_lo = beta_quantile(a, b, normal_cdf(-1.0));
    let a_hi = beta_quantile(a, b, normal_cdf(1.0));
    // 1-based order-statistic positions, kept inside 1..=S.
    let lo = (libm::floor(a_lo * s as f64) as usize).clamp(1, s);
    let hi = (libm::ceil(a_hi * s as f64) as usize).clamp(1, s);
    (sorted[hi - 1] - sorted[lo - 1]) / 2.0
}
