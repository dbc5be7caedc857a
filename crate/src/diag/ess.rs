//! Effective sample size of a set of chains, and the potential scale reduction factor they share
//! their variance summaries with.

use super::draws::Draws;
use super::fft::autocovariances;

/// The classic potential scale reduction factor R̂ = sqrt(var⁺/W) (Gelman & Rubin 1992; in the
/// split form of Gelman et al. 2013, BDA3 §11.4, when given split chains).
///
/// IEEE arithmetic gives the degenerate cases their meaning: W = 0 with B > 0 (every chain stuck
/// at its own value) gives +∞; W = B = 0 (no variation at all) gives NaN.
pub(crate) fn potential_scale_reduction(draws: &Draws) -> f64 {
    let moments = draws.moments();
    (moments.var_plus / moments.within).sqrt()
}

/// The chain-combined autocorrelation ρ̂_t for t = 0..=max_lag (at most N − 1), as combined by
/// Vehtari et al. (2021, §3.2; section number from memory):
/// ρ̂_t = 1 − (W − (1/M) Σ_m s_m² ρ̂_{t,m}) / var⁺, with s_m² ρ̂_{t,m} = c_{t,m}·N/(N − 1) computed
/// in that product form so a constant chain contributes 0 instead of 0/0.
/// Returns an empty vector when var⁺ is zero or not finite (nothing moved).
pub(crate) fn combined_autocorrelation(draws: &Draws, max_lag: usize) -> Vec<f64> {
    let (m, n) = (draws.chains, draws.len);
    let moments = draws.moments();
    if !(moments.var_plus > 0.0 && moments.var_plus.is_finite()) {
        return Vec::new();
    }
    let acov = autocovariances(&draws.values, n);
    let lags = max_lag.min(n - 1) + 1;
    let unbias = n as f64 / (n as f64 - 1.0);
    (0..lags)
        .map(|t| {
            let mean_s2_rho = (0..m).map(|j| acov[j * n + t] * unbias).sum::<f64>() / m as f64;
            1.0 - (moments.within - mean_s2_rho) / moments.var_plus
        })
        .collect()
}

/// Effective sample size of the chains as given (callers split them first), Vehtari et al. (2021)
/// with Geyer's (1992) truncation:
///
/// 1. ρ̂_t from [`combined_autocorrelation`];
/// 2. initial positive sequence: paired sums P̂_k = ρ̂_{2k} + ρ̂_{2k+1}, kept up to the last k before
///    the first P̂_k ≤ 0 (P̂_0 is always kept; pairs stop when lag 2k + 1 would reach N);
/// 3. initial monotone sequence: P̂_k ← min(P̂_k, P̂_{k−1});
/// 4. τ̂ = −1 + 2 Σ P̂_k, capped below at 1/log10(MN) (a safeguard recalled from practice, not a
///    formula of the paper: antithetic chains may give ESS > MN, but at most MN·log10(MN));
/// 5. ESS = MN/τ̂.
///
/// NaN when N < 2, nothing moved (var⁺ = 0) or the autocovariances overflow.
pub(crate) fn effective_sample_size(draws: &Draws) -> f64 {
    let (m, n) = (draws.chains, draws.len);
    if n < 2 || m == 0 {
        return f64::NAN;
    }
    let rho = combined_autocorrelation(draws, n - 1);
    if rho.is_empty() {
        return f64::NAN;
    }
    let mut sum = 0.0;
    let mut previous = f64::INFINITY;
    let mut k = 0;
    while 2 * k + 1 < rho.len() {
        let pair = rho[2 * k] + rho[2 * k + 1];
        if k > 0 && pair <= 0.0 {
            break;
        }
        let pair = if pair < previous { pair } else { previous };
        sum += pair;
        previous = pair;
        k += 1;
    }
    let total = (m * n) as f64;
    let tau = -1.0 + 2.0 * sum;
    // Not finite when the autocovariances overflowed (draws near 1e154): no estimate.
    if !tau.is_finite() {
        return f64::NAN;
    }
    let tau_floor = 1.0 / libm::log10(total);
    total / if tau < tau_floor { tau_floor } else { tau }
}
