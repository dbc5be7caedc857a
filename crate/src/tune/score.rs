//! How well a trial mixed: the numbers the tuner maximises, computed from the unconstrained draws
//! that every chain made during one trial window.
//!
//! A score reads plain data (a [`Window`]), not the chains' messages, so the tuner knows nothing
//! of how chains are run.

use crate::diag;
use crate::kernel::{Geometry, Kind};

/// What every chain did in one trial window.
#[derive(Clone, Copy, Debug)]
pub struct Window<'a> {
    /// Per chain, in chain order: the unconstrained coordinates at each step, row after row.
    pub rows: &'a [&'a [f64]],
    /// Density evaluations, all chains.
    pub evaluations: u64,
    /// Steps, all chains.
    pub steps: usize,
}

crate::named! {
    /// Which mixing score a trial is judged by.
    pub enum Score: "score" {
        /// Minus the mean absolute autocorrelation over lags 1..=L, averaged over coordinates and
        /// chains — the objective of the Bayesian-optimisation tuner of Mahendran, Wang, Hamze &
        /// de Freitas (2012), "Adaptive MCMC with Bayesian optimization", AISTATS (from memory).
        Acf = "acf",
        /// log(smallest bulk-ESS over coordinates ÷ density evaluations): effective draws bought per
        /// evaluation, so a slice sampler pays for its stepping out.
        EssPerEval = "ess-per-eval",
        /// log(smallest mean squared jump per step, in pilot variances, ÷ density evaluations per
        /// step): the expected squared jump distance of Pasarica & Gelman (2010), "Adaptively scaling
        /// the Metropolis algorithm using expected squared jumped distance", Statistica Sinica 20
        /// (from memory), per evaluation. In a short window it cannot be fooled by a chain that
        /// barely moves, as an ESS estimate can (which saturates near the number of chains), so it is
        /// the default for the slice sampler, whose cost varies with its setting.
        JumpPerEval = "jump-per-eval",
    }
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
    pub fn default_for(kind: Kind) -> Score {
        match kind {
            Kind::Slice => Score::JumpPerEval,
            Kind::RandomWalk => Score::EssPerEval,
        }
    }

    /// The score of one trial window; `geometry` is the pilot's (its dimension is the rows'
    /// width).
    pub fn of(self, window: &Window, geometry: &Geometry) -> f64 {
        let dim = geometry.dim();
        let chains = window.rows.len();
        let coordinate = |i: usize| -> Vec<Vec<f64>> {
            window.rows.iter().map(|rows| rows.iter().skip(i).step_by(dim).copied().collect()).collect()
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
                -total / (dim * chains) as f64
            }
            Score::EssPerEval => {
                let smallest = (0..dim)
                    .map(|i| {
                        let chains = coordinate(i);
                        let slices: Vec<&[f64]> = chains.iter().map(Vec::as_slice).collect();
                        let ess = diag::bulk_ess(&slices);
                        if ess.is_finite() { ess.max(ESS_FLOOR) } else { ESS_FLOOR }
                    })
                    .fold(f64::INFINITY, f64::min);
                libm::log(smallest / window.evaluations.max(1) as f64)
            }
            Score::JumpPerEval => {
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
                let per_step = window.evaluations.max(1) as f64 / window.steps.max(1) as f64;
                libm::log(smallest.max(JUMP_FLOOR) / per_step)
            }
        }
    }
}
