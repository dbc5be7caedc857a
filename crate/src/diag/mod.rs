//! Convergence diagnostics for the draws of one scalar quantity from several chains: rank-normalised
//! split R-hat, bulk- and tail-ESS, Monte Carlo standard errors and the chain-combined
//! autocorrelation, following
//!
//! A. Vehtari, A. Gelman, D. Simpson, B. Carpenter, P.-C. Bürkner (2021), "Rank-normalization,
//! folding, and localization: an improved R̂ for assessing convergence of MCMC", *Bayesian
//! Analysis* 16(2), 667–718, with Geyer's (1992) initial monotone sequence for the ESS. Section
//! numbers of the paper quoted here are from memory.
//!
//! This module only computes; it prints nothing. Each function takes one slice per chain, all of
//! the same length, and allocates freely (it runs once per quantity and once per tuning trial),
//! with no work quadratic in the number of draws: one sort per pooled ranking, FFTs for the
//! autocovariances.
//!
//! # Conventions where the method leaves a choice
//! * **Split.** Every chain of N draws becomes two of ⌊N/2⌋; for odd N the middle draw is dropped.
//! * **Pooled point statistics** — mean, sd (divisor S − 1), the quantiles q̂_p (numpy's default
//!   "linear" rule, Hyndman & Fan type 7), the median about which draws are folded (middle value,
//!   or the mean of the two middle values), and the sorted draws of the quantile MCSE — use every
//!   draw, including a middle draw the split drops.
//! * **Rank normalisation** pools the split draws only; ties get their average rank; Blom's
//!   (r − 3/8)/(S + 1/4).
//! * **Chain combination** of autocorrelations uses the paper's s_m²ρ̂_{t,m} = c_{t,m}·N/(N − 1)
//!   with the biased (1/N) autocovariance c_{t,m}.
//! * **Geyer truncation.** P̂_0 = ρ̂_0 + ρ̂_1 is always kept; the sum stops before the first later
//!   P̂_k ≤ 0, or when lag 2k + 1 would reach N; τ̂ ≥ 1/log10(S) with S the number of split draws.
//! * **Tail-ESS** = min(ESS of I(θ ≤ q̂_0.05), ESS of I(θ ≤ q̂_0.95)), on split indicator chains;
//!   NaN if either is undefined.
//! * **mean_ess** is the same ESS on the raw split draws (no ranks), the one MCSE(mean) needs.
//! * **autocorrelation** is for plots and the tuner, so it uses the chains as given (no split).
//!
//! With these choices the module reproduces the fixed-chain values of REFERENCES.md §3.3 and an
//! independent numpy implementation (crate/tests/reference/diagnostics.py) to about 1e-13.
//!
//! # Degenerate inputs (never a panic)
//! | input | R-hat, ESS, MCSE | mean, sd, quantiles |
//! |---|---|---|
//! | no chains, or empty chains | NaN | NaN |
//! | any draw NaN or ±∞ | NaN | NaN |
//! | chains of unequal length | NaN | computed from all draws |
//! | fewer than 4 draws per chain (a split half needs 2) | NaN | computed |
//! | every draw the same value | NaN (0/0: nothing moved); MCSE NaN | computed, sd = 0 |
//! | each chain constant, at different values | R-hat +∞; ESS about one per chain | computed |
//! | a quantile indicator that is constant (heavy ties at the extremes) | tail-ESS and that MCSE NaN | computed |
//!
//! A single chain is fine: splitting makes two. [`warnings`] turns these cases into plain words.

mod draws;
mod ess;
mod fft;
mod mcse;
mod warnings;

pub use warnings::{Thresholds, warnings};

use draws::{Draws, mean_and_sd, median_sorted, quantile_sorted, sorted_draws};
use ess::{combined_autocorrelation, effective_sample_size, potential_scale_reduction};
use mcse::{mcse_of_mean, mcse_of_quantile};

/// Fewest draws per chain for R-hat and ESS: each split half needs two draws for a variance.
const MIN_DRAWS: usize = 4;

/// The posterior summary and diagnostics of one scalar quantity.
///
/// ```
/// use mixwell::diag::summarise;
/// let a: Vec<f64> = (0..100).map(|i| ((i * 37) % 100) as f64).collect();
/// let b: Vec<f64> = (0..100).map(|i| ((i * 59 + 13) % 100) as f64).collect();
/// let s = summarise(&[&a, &b]);
/// assert_eq!(s.mean, 49.5);
/// assert!(s.rhat < 1.05 && s.bulk_ess > 0.0);
/// ```
#[derive(Clone, Debug, serde::Serialize, PartialEq)]
pub struct Summary {
    pub mean: f64,
    /// Sample standard deviation of all draws (divisor S − 1).
    pub sd: f64,
    /// 5%, 50% and 95% quantiles of all draws (type 7).
    pub q5: f64,
    pub q50: f64,
    pub q95: f64,
    pub mcse_mean: f64,
    pub mcse_q5: f64,
    pub mcse_q95: f64,
    pub bulk_ess: f64,
    pub tail_ess: f64,
    pub rhat: f64,
}

/// Everything in [`Summary`], sharing the sort, the split and the rank normalisation.
pub fn summarise(chains: &[&[f64]]) -> Summary {
    let undefined = f64::NAN;
    let all: Vec<f64> = chains.concat();
    let mut summary = Summary {
        mean: undefined,
        sd: undefined,
        q5: undefined,
        q50: undefined,
        q95: undefined,
        mcse_mean: undefined,
        mcse_q5: undefined,
        mcse_q95: undefined,
        bulk_ess: undefined,
        tail_ess: undefined,
        rhat: undefined,
    };
    if all.is_empty() || all.iter().any(|x| !x.is_finite()) {
        return summary;
    }
    let (mean, sd) = mean_and_sd(&all);
    let sorted = sorted_draws(&all);
    summary.mean = mean;
    summary.sd = sd;
    summary.q5 = quantile_sorted(&sorted, 0.05);
    summary.q50 = quantile_sorted(&sorted, 0.5);
    summary.q95 = quantile_sorted(&sorted, 0.95);
    let Ok(draws) = Draws::checked(chains, MIN_DRAWS) else {
        return summary;
    };
    let split = draws.split();
    let ranked = split.rank_normalised();
    summary.bulk_ess = effective_sample_size(&ranked);
    summary.rhat = potential_scale_reduction(&ranked).max(folded_rhat(&draws, &sorted));
    summary.mcse_mean = mcse_of_mean(sd, effective_sample_size(&split));
    let ess_q5 = quantile_ess(&draws, summary.q5);
    let ess_q95 = quantile_ess(&draws, summary.q95);
    summary.tail_ess = min_or_nan(ess_q5, ess_q95);
    summary.mcse_q5 = mcse_of_quantile(&sorted, 0.05, ess_q5);
    summary.mcse_q95 = mcse_of_quantile(&sorted, 0.95, ess_q95);
    summary
}

/// Reported R-hat: the larger of the rank-normalised split-R-hat and its folded version
/// (Vehtari et al. 2021). NaN only when both are undefined; see the module table for the cases.
///
/// ```
/// use mixwell::diag::rhat;
/// let a = [0.1, -0.4, 0.3, 0.9, -1.2, 0.5, 0.0, -0.3];
/// let b = [2.1, 1.6, 2.3, 2.9, 0.8, 2.5, 2.0, 1.7];
/// assert!(rhat(&[&a, &b]) > 1.5); // the chains sit in different places
/// ```
pub fn rhat(chains: &[&[f64]]) -> f64 {
    let Ok(draws) = Draws::checked(chains, MIN_DRAWS) else {
        return f64::NAN;
    };
    let sorted = sorted_draws(&draws.values);
    potential_scale_reduction(&draws.split().rank_normalised()).max(folded_rhat(&draws, &sorted))
}

/// Rank-normalised split-R-hat of |θ − median(θ)|: catches chains that differ in scale.
fn folded_rhat(draws: &Draws, sorted: &[f64]) -> f64 {
    potential_scale_reduction(&draws.folded(median_sorted(sorted)).split().rank_normalised())
}

/// Bulk-ESS: the ESS of the rank-normalised split chains (Vehtari et al. 2021).
pub fn bulk_ess(chains: &[&[f64]]) -> f64 {
    match Draws::checked(chains, MIN_DRAWS) {
        Ok(draws) => effective_sample_size(&draws.split().rank_normalised()),
        Err(_) => f64::NAN,
    }
}

/// Tail-ESS: the smaller ESS of the split indicator chains I(θ ≤ q̂_0.05) and I(θ ≤ q̂_0.95)
/// (Vehtari et al. 2021); NaN if either is undefined.
pub fn tail_ess(chains: &[&[f64]]) -> f64 {
    let Ok(draws) = Draws::checked(chains, MIN_DRAWS) else {
        return f64::NAN;
    };
    let sorted = sorted_draws(&draws.values);
    let lower = quantile_ess(&draws, quantile_sorted(&sorted, 0.05));
    let upper = quantile_ess(&draws, quantile_sorted(&sorted, 0.95));
    min_or_nan(lower, upper)
}

/// The basic split-chain ESS of the raw draws (no rank normalisation): the one that sets the Monte
/// Carlo error of the mean.
pub fn mean_ess(chains: &[&[f64]]) -> f64 {
    match Draws::checked(chains, MIN_DRAWS) {
        Ok(draws) => effective_sample_size(&draws.split()),
        Err(_) => f64::NAN,
    }
}

/// MCSE of the mean of all draws: sd/sqrt(mean ESS).
pub fn mcse_mean(chains: &[&[f64]]) -> f64 {
    let Ok(draws) = Draws::checked(chains, MIN_DRAWS) else {
        return f64::NAN;
    };
    let (_, sd) = mean_and_sd(&draws.values);
    mcse_of_mean(sd, effective_sample_size(&draws.split()))
}

/// MCSE of the p-quantile (0 < p < 1) of all draws, by the Beta-interval construction of
/// Vehtari et al. (2021) over the ESS of the indicator I(θ ≤ q̂_p).
pub fn mcse_quantile(chains: &[&[f64]], p: f64) -> f64 {
    let Ok(draws) = Draws::checked(chains, MIN_DRAWS) else {
        return f64::NAN;
    };
    let sorted = sorted_draws(&draws.values);
    let ess = quantile_ess(&draws, quantile_sorted(&sorted, p));
    mcse_of_quantile(&sorted, p, ess)
}

/// The p-quantile of already sorted draws, numpy's default "linear" rule (Hyndman & Fan 1996,
/// type 7): linear interpolation between order statistics at position (S − 1)p. NaN for no
/// draws or p outside [0, 1]. The input is not checked for order.
///
/// ```
/// use mixwell::diag::quantile;
/// assert_eq!(quantile(&[1.0, 2.0, 4.0], 0.75), 3.0);
/// ```
pub fn quantile(sorted: &[f64], p: f64) -> f64 {
    quantile_sorted(sorted, p)
}

/// The chain-combined autocorrelation ρ̂_t, t = 0..=max_lag, of the chains as given (not split),
/// combined as in Vehtari et al. (2021) so that chains which disagree raise it. Lags beyond N − 1
/// are left out; the result is empty when there is nothing to correlate (fewer than 2 draws per
/// chain, unequal lengths, non-finite draws, or no variation at all).
///
/// ```
/// use mixwell::diag::autocorrelation;
/// let x = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0];
/// let rho = autocorrelation(&[&x], 3);
/// assert_eq!(rho.len(), 4);
/// assert!((rho[0] - 1.0).abs() < 1e-15 && rho[1] > 0.5);
/// ```
pub fn autocorrelation(chains: &[&[f64]], max_lag: usize) -> Vec<f64> {
    match Draws::checked(chains, 2) {
        Ok(draws) => combined_autocorrelation(&draws, max_lag),
        Err(_) => Vec::new(),
    }
}

/// ESS of the split indicator chains I(θ ≤ threshold).
fn quantile_ess(draws: &Draws, threshold: f64) -> f64 {
    effective_sample_size(&draws.indicator(threshold).split())
}

fn min_or_nan(a: f64, b: f64) -> f64 {
    if a.is_nan() || b.is_nan() { f64::NAN } else { a.min(b) }
}

#[cfg(test)]
mod tests;
