//! Slice sampling, one coordinate at a time, with stepping out and shrinkage
//! (Neal 2003, "Slice sampling", Annals of Statistics 31(3), Figs. 3 and 5).

use super::{Geometry, State};
use crate::rng::Stream;
use crate::tape::Tape;

/// Shrinkage halts after this many rejected points and leaves the coordinate where it was; only a
/// density that is not finite where it was just evaluated as finite could need more.
const MAX_SHRINKS: usize = 200;

#[derive(Clone, Debug)]
pub struct Slice {
    /// Initial interval width per coordinate: width × pilot sd.
    widths: Vec<f64>,
    stepout: u32,
}

impl Slice {
    pub fn new(width: f64, stepout: u32, geometry: &Geometry) -> Self {
        let widths = (0..geometry.dim())
            .map(|i| {
                let sd = geometry.sd(i);
                width * if sd.is_finite() && sd > 0.0 { sd } else { 1.0 }
            })
            .collect();
        Slice { widths, stepout }
    }

    /// One sweep: each coordinate in turn.
    pub fn step(&mut self, tape: &Tape, state: &mut State, rng: &mut Stream) {
        for i in 0..self.widths.len() {
            self.update(i, tape, state, rng);
        }
    }

    fn update(&self, i: usize, tape: &Tape, state: &mut State, rng: &mut Stream) {
        let w = self.widths[i];
        let x0 = state.theta[i];
        state.proposal_theta.copy_from_slice(&state.theta);
        let at = |state: &mut State, x: f64| {
            state.proposal_theta[i] = x;
            state.evaluate_proposal(tape)
        };
        // The slice level, in logs: log y = log f(x0) − e with e ~ Exp(1).
        let level = state.log_density - rng.exponential();
        // Stepping out: a randomly placed interval, grown by at most `stepout` widths in all.
        let mut left = x0 - w * rng.uniform();
        let mut right = left + w;
        let m = self.stepout as u64;
        let mut j = rng.below(m);
        let mut k = m - 1 - j;
        while j > 0 && level < at(state, left) {
            left -= w;
            j -= 1;
        }
        while k > 0 && level < at(state, right) {
            right += w;
            k -= 1;
        }
        // Shrinkage: draw from the interval, pulling the end on the rejected side inwards.
        state.proposals += 1;
        for _ in 0..MAX_SHRINKS {
            let x1 = left + rng.uniform() * (right - left);
            let lp = at(state, x1);
            if level < lp {
                state.take_proposal(lp);
                state.moves += 1;
                return;
            }
            if x1 < x0 {
                left = x1;
            } else {
                right = x1;
            }
        }
    }
}
