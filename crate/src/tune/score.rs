//! How well a trial mixed: the numbers the tuner maximises, computed from the unconstrained draws
//! that every chain made during one trial window.

use crate::chain::Outcome;
use crate::diag;
use crate::kernel::Geometry;
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
    /// log(smallest mean squared jump per step, in pilot variances, ÷ density evaluations per
    /// step): the expected squared jump distance of Pasarica & Gelman (2010), "Adaptively scaling
    /// the Metropolis algorithm using expected squared jumped distance", Statistica Sinica 20
    /// (from memory), per evaluation. In a short window it cannot be fooled by a chain that
    /// barely moves, as an ESS estimate can (which saturates near the number of chains), so it is
    /// the default for the slice sampler, whose cost varies with its setting.
    JumpPerEval,
}

/// Lags of the autocorrelation score.
pub const ACF_LAGS: usize = 10;
/// Effective sample sizes are floored here: a window in which a coordinate never moved has no
/// defined ESS, and is worse than any window that moved.
const ESS_FLOOR: f64 = 0.1;
/// Mean squared jumps (in pilot variances) are floored here, for the same reason.
const JUMP_FLOOR: f64 = 1e-12;

impl Score {
    /// The default score for a kernel: ESS per evaluation for a random walk (one evaluation per
    /// step, so cost never misleads it), jump per evaluation for a slice sampler.
    pub fn default_for(settings: &crate::kernel::Settings) -> Score {
        match settings {
            crate::kernel::Settings::Slice { .. } => Score::JumpPerEval,
            _ => Score::EssPerEval,
        }
    }

    /// The score of one trial: every chain's outcome, whose rows are the unconstrained
    /// coordinates at each step; `geometry` is the pilot's (its dimension is the rows' width).
    pub fn of(self, outcomes: &[Outcome], geometry: &Geometry) -> f64 {
        let dim = geometry.dim();
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
            Score::JumpPerEval => {
                let evaluations: u64 = outcomes.iter().map(|o| o.evaluations).sum();
                let steps: usize = outcomes.iter().map(|o| o.steps).sum();
                let smallest = (0..dim)
                    .map(|i| {
                        let (mut total, mut jumps) = (0.0, 0usize);
                        for chain in coordinate(i) {
                            for pair in chain.windows(2) {
                                total += (pair[1] - pair[0]) * (pair[1] - pair[0]);
                                jumps += 1;
                            }
                        }
                        let variance = geometry.covariance[i * dim + i];
                        total / (jumps.max(1) as f64 * variance)
                    })
                    .fold(f64::INFINITY, f64::min);
                let per_step = evaluations.max(1) as f64 / steps.max(1) as f64;
                libm::log(smallest.max(JUMP_FLOOR) / per_step)
            }
        }
    }
}
