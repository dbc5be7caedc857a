//! Random-walk Metropolis (Metropolis et al. 1953; Hastings 1970) with a Gaussian proposal
//! shaped by the pilot's covariance.

use super::{Geometry, State};
use crate::rng::Stream;
use crate::tape::Tape;
use nalgebra::DMatrix;

/// Beyond this many coordinates the proposal stays diagonal: a dense factor costs d² per step.
pub const MAX_DENSE_DIM: usize = 400;

#[derive(Clone, Debug)]
pub struct RandomWalk {
    /// Row-major lower-triangular factor, already multiplied by the scale; or, when `dense` is
    /// false, just the d scaled standard deviations.
    factor: Vec<f64>,
    dense: bool,
    z: Vec<f64>,
}

impl RandomWalk {
    pub fn new(scale: f64, blend: f64, geometry: &Geometry) -> Self {
        let d = geometry.dim();
        let dense = blend > 0.0 && d <= MAX_DENSE_DIM;
        let factor = if dense {
            let blended = DMatrix::from_fn(d, d, |i, j| {
                let c = geometry.covariance[i * d + j];
                if i == j { c } else { blend * c }
            });
            match cholesky_with_jitter(blended) {
                Some(l) => (0..d * d).map(|k| scale * l[(k / d, k % d)]).collect(),
                None => (0..d * d).map(|k| if k / d == k % d { scale * geometry.sd(k / d) } else { 0.0 }).collect(),
            }
        } else {
            (0..d).map(|i| scale * geometry.sd(i)).collect()
        };
        RandomWalk { factor, dense, z: vec![0.0; d] }
    }

    #[inline]
    pub fn step(&mut self, tape: &Tape, state: &mut State, rng: &mut Stream) {
        let d = self.z.len();
        for z in &mut self.z {
            *z = rng.normal();
        }
        for i in 0..d {
            let jump = if self.dense {
                self.factor[i * d..i * d + i + 1].iter().zip(&self.z).map(|(l, z)| l * z).sum()
            } else {
                self.factor[i] * self.z[i]
            };
            state.proposal_theta[i] = state.theta[i] + jump;
        }
        let proposed = state.evaluate_proposal(tape);
        state.proposals += 1;
        // Symmetric proposal: accept with probability min(1, p(θ′)/p(θ)).
        if libm::log(rng.open_uniform()) < proposed - state.log_density {
            state.take_proposal(proposed);
            state.moves += 1;
        }
    }
}

/// Lower Cholesky factor, adding a growing multiple of the mean diagonal when the matrix is not
/// numerically positive definite (a pilot that barely moved gives such covariances).
pub fn cholesky_with_jitter(m: DMatrix<f64>) -> Option<DMatrix<f64>> {
    let d = m.nrows();
    let scale = (0..d).map(|i| m[(i, i)].abs()).sum::<f64>() / d.max(1) as f64;
    if !(scale.is_finite() && scale > 0.0) {
        return None;
    }
    for k in 0..8 {
        let jitter = if k == 0 { 0.0 } else { scale * 1e-10 * 100f64.powi(k - 1) };
        let mut shifted = m.clone();
        for i in 0..d {
            shifted[(i, i)] += jitter;
        }
        if let Some(c) = shifted.cholesky() {
            return Some(c.l());
        }
    }
    None
}
