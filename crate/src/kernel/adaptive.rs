//! The standard adaptation schemes mixwell compares its tuner with. Both adapt a random-walk
//! proposal while they run — so their chains are not Markov and their draws are never reported —
//! and end in settings that are then frozen like any other.
//!
//! - Robbins–Monro scaling (Andrieu & Thoms 2008, "A tutorial on adaptive MCMC", Statistics and
//!   Computing 18(4), Algorithm 4 with the covariance held at the pilot's): the log scale moves by
//!   γᵢ(αᵢ − α*) after each step, γᵢ = i^−0.6, with αᵢ the acceptance probability
//!   (Rao–Blackwellised) and α* = 0.234, or 0.44 in one dimension (Roberts, Gelman & Gilks 1997;
//!   Gelman, Roberts & Gilks 1996).
//! - Adaptive Metropolis (Haario, Saksman & Tamminen 2001, Bernoulli 7(2)): after t₀ steps the
//!   proposal covariance is s_d·(Cov(X₀…X_{t−1}) + εI) with s_d = 2.38²/d (Gelman, Roberts &
//!   Gilks 1996).

use super::random_walk::cholesky_with_jitter;
use super::{Geometry, State};
use crate::rng::Stream;
use crate::tape::Tape;
use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

/// The Robbins–Monro step-size exponent: γᵢ = i^−κ with κ ∈ (½, 1] (Andrieu & Thoms 2008).
const RM_EXPONENT: f64 = 0.6;
/// Adaptive Metropolis refactorises its covariance every this many steps (a common economy: the
/// covariance changes by O(1/t) per step).
const AM_REFRESH: u64 = 10;

#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Scheme {
    RobbinsMonro,
    AdaptiveMetropolis,
}

impl Scheme {
    /// The target acceptance rate of Robbins–Monro scaling in `d` dimensions.
    pub fn target_acceptance(d: usize) -> f64 {
        if d == 1 { 0.44 } else { 0.234 }
    }
}

/// One chain's adaptation in progress.
#[derive(Clone, Debug)]
pub struct Adapter {
    scheme: Scheme,
    log_scale: f64,
    steps: u64,
    /// Proposal factor: lower-triangular, row-major, without the scale.
    factor: Vec<f64>,
    mean: Vec<f64>,
    /// Running sum of squared deviations (Welford), row-major d×d.
    scatter: Vec<f64>,
    /// ε of Haario et al.: small relative to the target's size.
    epsilon: f64,
    /// Steps before the covariance is adapted.
    initial_period: u64,
    z: Vec<f64>,
}

impl Adapter {
    pub fn new(scheme: Scheme, geometry: &Geometry) -> Self {
        let d = geometry.dim();
        let factor = lower_factor(&geometry.covariance, d);
        let mean_variance = (0..d).map(|i| geometry.covariance[i * d + i]).sum::<f64>() / d as f64;
        Adapter {
            scheme,
            log_scale: libm::log(2.38 / (d as f64).sqrt()),
            steps: 0,
            factor,
            mean: vec![0.0; d],
            scatter: vec![0.0; d * d],
            epsilon: 1e-6 * mean_variance,
            initial_period: (10 * d as u64).max(100),
            z: vec![0.0; d],
        }
    }

    pub fn step(&mut self, tape: &Tape, state: &mut State, rng: &mut Stream) {
        let d = self.z.len();
        for z in &mut self.z {
            *z = rng.normal();
        }
        let scale = libm::exp(self.log_scale);
        for i in 0..d {
            let jump: f64 = self.factor[i * d..i * d + i + 1].iter().zip(&self.z).map(|(l, z)| l * z).sum();
            state.proposal_theta[i] = state.theta[i] + scale * jump;
        }
        let proposed = state.evaluate_proposal(tape);
        state.proposals += 1;
        let log_ratio = proposed - state.log_density;
        if libm::log(rng.open_uniform()) < log_ratio {
            state.take_proposal(proposed);
            state.moves += 1;
        }
        self.steps += 1;
        match self.scheme {
            Scheme::RobbinsMonro => {
                let acceptance = if log_ratio >= 0.0 { 1.0 } else { libm::exp(log_ratio) };
                let gamma = libm::pow(self.steps as f64, -RM_EXPONENT);
                self.log_scale += gamma * (acceptance - Scheme::target_acceptance(d));
            }
            Scheme::AdaptiveMetropolis => self.learn_covariance(&state.theta),
        }
    }

    /// Welford's update of the running mean and scatter, and a refreshed proposal after t₀.
    fn learn_covariance(&mut self, x: &[f64]) {
        let d = x.len();
        let n = self.steps as f64;
        let delta: Vec<f64> = x.iter().zip(&self.mean).map(|(a, m)| a - m).collect();
        for (m, dl) in self.mean.iter_mut().zip(&delta) {
            *m += dl / n;
        }
        for (i, di) in delta.iter().enumerate() {
            let row = &mut self.scatter[i * d..i * d + i + 1];
            for ((s, xj), mj) in row.iter_mut().zip(x).zip(&self.mean) {
                *s += di * (xj - mj);
            }
        }
        if self.steps > self.initial_period && self.steps.is_multiple_of(AM_REFRESH) {
            self.factor = lower_factor(&self.covariance(), d);
        }
    }

    /// The learned covariance (with ε on the diagonal), row-major d×d.
    fn covariance(&self) -> Vec<f64> {
        let d = self.z.len();
        let n = (self.steps as f64 - 1.0).max(1.0);
        let mut c = vec![0.0; d * d];
        for i in 0..d {
            for j in 0..=i {
                c[i * d + j] = self.scatter[i * d + j] / n;
                c[j * d + i] = c[i * d + j];
            }
            c[i * d + i] += self.epsilon;
        }
        c
    }

    /// What the adaptation learned: the log scale (Robbins–Monro), or the covariance, row-major
    /// (adaptive Metropolis; its scale is s_d).
    pub fn learned(&self) -> Vec<f64> {
        match self.scheme {
            Scheme::RobbinsMonro => vec![self.log_scale],
            Scheme::AdaptiveMetropolis => self.covariance(),
        }
    }
}

/// Lower Cholesky factor of a row-major covariance, or its diagonal square roots if it is not
/// positive definite even with jitter.
fn lower_factor(covariance: &[f64], d: usize) -> Vec<f64> {
    let m = DMatrix::from_row_slice(d, d, covariance);
    match cholesky_with_jitter(m) {
        Some(l) => (0..d * d).map(|k| l[(k / d, k % d)]).collect(),
        None => (0..d * d).map(|k| if k / d == k % d { covariance[k].abs().sqrt() } else { 0.0 }).collect(),
    }
}
