//! Markov kernels that leave the model's density invariant: random-walk Metropolis and slice
//! sampling, and fixed mixtures of them.
//!
//! A kernel is built from plain-data [`Settings`] and the [`Geometry`] a pilot run measured; it
//! then moves a [`State`] one step at a time. Building does the work (a Cholesky factor, per-
//! coordinate widths) so that a step allocates nothing. Every evaluation of the density is
//! counted, because a slice step can cost many.

mod adaptive;
mod random_walk;
mod slice;

pub use adaptive::{Adapter, Scheme};
pub use random_walk::{MAX_DENSE_DIM, RandomWalk};
pub use slice::Slice;

use crate::rng::Stream;
use crate::tape::{Scratch, Tape};
use serde::{Deserialize, Serialize};

crate::named! {
    /// The kinds of kernel a user can ask for (a mixture is made only by freezing a tuner).
    pub enum Kind: "sampler" {
        /// Random-walk Metropolis.
        RandomWalk = "rwm",
        /// Coordinate-wise slice sampling.
        Slice = "slice",
    }
}

/// A kernel's settings, as a user or the tuner chooses them.
/// Written as `{"kind": "rwm", "settings": {"scale": …, "blend": …}}` in reports and links.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", content = "settings")]
pub enum Settings {
    /// Random-walk Metropolis with proposal `scale · L z`, where L Lᵀ is
    /// `(1 − blend)·diag(pilot variances) + blend·(pilot covariance)`.
    #[serde(rename = "rwm")]
    RandomWalk { scale: f64, blend: f64 },
    /// Coordinate-wise slice sampling with stepping out and shrinkage (Neal 2003): interval
    /// width `width · pilot sd` per coordinate, at most `stepout` widths in all.
    #[serde(rename = "slice")]
    Slice { width: f64, stepout: u32 },
    /// Before each step, one component drawn with probability proportional to its weight.
    #[serde(rename = "mixture")]
    Mixture { components: Vec<(Settings, f64)> },
}

impl Settings {
    /// The usual starting point when the user gives no setting: the random-walk scale 2.38/√d
    /// with the pilot's full covariance (Gelman, Roberts & Gilks 1996), or a slice width of three
    /// pilot standard deviations with up to 20 step-outs (Neal 2003 advises a width somewhat
    /// larger than the typical slice; on a normal target the cost per draw is lowest near 4 sd
    /// and within 2% of that from 3 to 6 sd).
    pub fn default_for(kind: Kind, dim: usize) -> Settings {
        match kind {
            Kind::Slice => Settings::Slice { width: 3.0, stepout: 20 },
            Kind::RandomWalk => Settings::RandomWalk { scale: 2.38 / (dim.max(1) as f64).sqrt(), blend: 1.0 },
        }
    }

    /// The kind of kernel, or `None` for a mixture.
    pub fn kind(&self) -> Option<Kind> {
        match self {
            Settings::RandomWalk { .. } => Some(Kind::RandomWalk),
            Settings::Slice { .. } => Some(Kind::Slice),
            Settings::Mixture { .. } => None,
        }
    }

    /// A short human description, e.g. "random-walk Metropolis, scale 0.84, blend 1".
    pub fn describe(&self) -> String {
        match self {
            Settings::RandomWalk { scale, blend } => {
                format!("random-walk Metropolis, scale {scale:.4}, blend {blend:.3}")
            }
            Settings::Slice { width, stepout } => {
                format!("slice sampling, width {width:.4} sd, step-out limit {stepout}")
            }
            Settings::Mixture { components } => format!("a mixture of {} kernels", components.len()),
        }
    }

    /// Why these settings cannot make a valid kernel, if they cannot: the setting at fault
    /// (`"scale"`, `"blend"`, `"width"`, `"stepout"`, or `"weight"` in a mixture) and why.
    pub fn validate(&self) -> Result<(), (&'static str, String)> {
        match self {
            Settings::RandomWalk { scale, blend } => {
                if !(scale.is_finite() && *scale > 0.0) {
                    return Err(("scale", format!("the random-walk scale must be a positive number, not {scale}")));
                }
                if !(0.0..=1.0).contains(blend) {
                    return Err(("blend", format!("the blend must be between 0 and 1, not {blend}")));
                }
            }
            Settings::Slice { width, stepout } => {
                if !(width.is_finite() && *width > 0.0) {
                    return Err(("width", format!("the slice width must be a positive number, not {width}")));
                }
                if !(1..=MAX_STEPOUT).contains(stepout) {
                    return Err((
                        "stepout",
                        format!("the step-out limit must be a whole number from 1 to {MAX_STEPOUT}, not {stepout}"),
                    ));
                }
            }
            Settings::Mixture { components } => {
                if components.is_empty() {
                    return Err(("weight", "a mixture needs at least one component".into()));
                }
                for (settings, weight) in components {
                    if !(weight.is_finite() && *weight > 0.0) {
                        return Err(("weight", format!("mixture weights must be positive, not {weight}")));
                    }
                    settings.validate()?;
                }
            }
        }
        Ok(())
    }
}

/// Largest step-out limit: beyond it a flat density could keep a slice step busy for minutes.
pub const MAX_STEPOUT: u32 = 10_000;

/// The scale of the target on the unconstrained coordinates, measured by a pilot run.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Geometry {
    pub mean: Vec<f64>,
    /// Row-major d×d covariance.
    pub covariance: Vec<f64>,
}

impl Geometry {
    /// Unit scales: what is known before any pilot.
    pub fn unit(dim: usize) -> Self {
        let mut covariance = vec![0.0; dim * dim];
        for i in 0..dim {
            covariance[i * dim + i] = 1.0;
        }
        Geometry { mean: vec![0.0; dim], covariance }
    }

    pub fn dim(&self) -> usize {
        self.mean.len()
    }

    /// Standard deviation of coordinate `i`.
    pub fn sd(&self, i: usize) -> f64 {
        self.covariance[i * self.dim() + i].sqrt()
    }
}

/// Where a chain is, and what it has cost.
#[derive(Clone, Debug)]
pub struct State {
    pub theta: Vec<f64>,
    pub log_density: f64,
    /// Evaluation values of `theta`, kept for recording derived quantities.
    pub current: Scratch,
    /// Work space for proposals; swapped with `current` when a proposal is taken.
    pub proposal: Scratch,
    pub proposal_theta: Vec<f64>,
    pub evaluations: u64,
    /// Proposals (random walk) or coordinate updates (slice) made, and how many moved.
    pub proposals: u64,
    pub moves: u64,
}

impl State {
    /// A state at `theta`, or `None` if the density there is not finite.
    pub fn new(tape: &Tape, theta: Vec<f64>) -> Option<State> {
        let mut current = tape.scratch();
        let log_density = tape.log_density(&theta, &mut current);
        log_density.is_finite().then(|| State {
            proposal_theta: theta.clone(),
            theta,
            log_density,
            proposal: current.clone(),
            current,
            evaluations: 1,
            proposals: 0,
            moves: 0,
        })
    }

    /// Log density at `proposal_theta`, into the proposal scratch. Anything not finite is −∞,
    /// so NaN or infinite densities are rejected rather than accepted or propagated.
    #[inline]
    fn evaluate_proposal(&mut self, tape: &Tape) -> f64 {
        self.evaluations += 1;
        let lp = tape.log_density(&self.proposal_theta, &mut self.proposal);
        if lp.is_finite() { lp } else { f64::NEG_INFINITY }
    }

    /// Make the proposal the current state.
    #[inline]
    fn take_proposal(&mut self, log_density: f64) {
        std::mem::swap(&mut self.theta, &mut self.proposal_theta);
        std::mem::swap(&mut self.current, &mut self.proposal);
        self.log_density = log_density;
    }
}

/// A kernel ready to step.
#[derive(Clone, Debug)]
pub enum Kernel {
    RandomWalk(RandomWalk),
    Slice(Slice),
    Mixture { components: Vec<Kernel>, cumulative: Vec<f64> },
}

impl Kernel {
    /// Build from validated settings and a geometry.
    pub fn new(settings: &Settings, geometry: &Geometry) -> Kernel {
        match settings {
            Settings::RandomWalk { scale, blend } => Kernel::RandomWalk(RandomWalk::new(*scale, *blend, geometry)),
            Settings::Slice { width, stepout } => Kernel::Slice(Slice::new(*width, *stepout, geometry)),
            Settings::Mixture { components } => {
                let total: f64 = components.iter().map(|(_, w)| w).sum();
                let mut running = 0.0;
                let cumulative = components
                    .iter()
                    .map(|(_, w)| {
                        running += w / total;
                        running
                    })
                    .collect();
                let components = components.iter().map(|(s, _)| Kernel::new(s, geometry)).collect();
                Kernel::Mixture { components, cumulative }
            }
        }
    }

    /// One step. A fixed kernel leaves the density invariant; so does a fixed mixture, as each
    /// component does and the choice does not depend on the state.
    pub fn step(&mut self, tape: &Tape, state: &mut State, rng: &mut Stream) {
        match self {
            Kernel::RandomWalk(k) => k.step(tape, state, rng),
            Kernel::Slice(k) => k.step(tape, state, rng),
            Kernel::Mixture { components, cumulative } => {
                let u = rng.uniform();
                let i = cumulative.iter().position(|&c| u < c).unwrap_or(components.len() - 1);
                components[i].step(tape, state, rng);
            }
        }
    }
}

#[cfg(test)]
mod tests;
