//! How well a trial mixed: the numbers the tuner maximises, computed from the unconstrained draws
//! that every chain made during one trial window.

use crate::chain::Outcome;
use crate::diag;
use serde::{Deserialize, Serialize};

/// Which mixing score a trial is judged by.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Score {
    /// Minus the mean absolute autocorrelation over lags 1..=L, averaged over coordinates and
    /// chains — the objective of the Bayesian-optimisation tuner of Mahendran, Wang, Hamze &
    /// de Freitas (2012), "Adaptive MCMC with Bayesian optimization", AISTATS (from memory).
    Acf,
    /// log(smallest bulk-ESS over coordinates ÷ density evaluations): effective draws bought per
    /// evaluation, so a slice sampler pays for its stepping out.
    EssPerEval,
}

/// Lags of the autocorrelation score.
pub const ACF_LAGS: usize = 10;
/// Effective sample sizes are floored here: a window in which a coordinate never moved has no
/// defined ESS, and is worse than any window that moved.
const ESS_FLOOR: f64 = 0.1;

impl Score {
    /// The score of one trial: every chain's outcome, whose rows are `dim` unconstrained
    /// coordinates per step.
    pub fn of(self, outcomes: &[Outcome], dim: usize) -> f64 {
        let coordinate = |i: usize| -> Vec<Vec<f64>> {
            outcomes.iter().map(|o| o.rows.iter().skip(i).step_by(dim).copied().collect()).collect()
        };
        match self {
            Score::Acf => {
                let mut total = 0.0;
                for i in 0..dim {
                    let chains = coordinate(i);
                    for chain in &chains {
                        let rho = diag::autocorrelation(&[chain.as_slice()], ACF_LAGS);
                        let mean_abs = rho.iter().skip(1).map(|r| r.abs()).sum::<f64>() / ACF_LAGS as f64;
                        // A coordinate that never moved is perfectly autocorrelated.
                        total += if mean_abs.is_finite() { mean_abs.min(1.0) } else { 1.0 };
                    }
                }
                -total / (dim * outcomes.len()) as f64
            }
            Score::EssPerEval => {
                let evaluations: u64 = outcomes.iter().map(|o| o.evaluations).sum();
                let smallest = (0..dim)
                    .map(|i| {
                        let chains = coordinate(i);
                        let slices: Vec<&[f64]> = chains.iter().map(Vec::as_slice).collect();
                        let ess = diag::bulk_ess(&slices);
                        if ess.is_finite() { ess.max(ESS_FLOOR) } else { ESS_FLOOR }
                    })
                    .fold(f64::INFINITY, f64::min);
                libm::log(smallest / evaluations.max(1) as f64)
            }
        }
    }
}
