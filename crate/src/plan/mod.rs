//! The plan of a run, as plain data: what fixes its draws ([`RunConfig`]), how its kernel is
//! tuned ([`Tuning`]), the limits on both, the options a user gives ([`Options`]) and the one
//! function that turns them into a validated configuration ([`Options::resolve`]), the runs of a
//! comparison of methods ([`Plan`]), and the memory a run will need ([`memory`]).
//!
//! The command line, the page and share links all go through here, so a run means the same
//! wherever it was asked for. What it is not: the conductor that carries a run out
//! (`chain::conductor`) — nothing here knows of chains, threads or workers.

pub mod memory;
mod options;

pub use memory::{Estimate, Face, Shape};
pub use options::{Opt, Options, Plan, PlanError};

use crate::kernel::{Kind, Settings};
use crate::names::Named;
use crate::tune::policy::BoConfig;
use serde::{Deserialize, Serialize};

crate::named! {
    /// How a kernel's settings are chosen before sampling.
    pub enum Method: "tuning method" {
        /// Keep the given settings.
        None = "none",
        /// Bayesian optimisation.
        Bo = "bo",
        /// Robbins–Monro acceptance targeting.
        Rm = "rm",
        /// Adaptive Metropolis.
        Am = "am",
    }
}

impl Method {
    /// Whether the method can tune a kernel of `kind`: Robbins–Monro and adaptive Metropolis
    /// adapt a random walk only.
    pub fn applies_to(self, kind: Kind) -> bool {
        matches!(self, Method::None | Method::Bo) || kind == Kind::RandomWalk
    }
}

crate::named! {
    /// The phases of a run, in order. Progress reports name the phase under way.
    pub enum Phase: "phase" {
        /// Slice sweeps that measure the target's scale.
        Pilot = "pilot",
        /// Bayesian optimisation: one trial window after another.
        Tuning = "tuning",
        /// Robbins–Monro or adaptive Metropolis adapting a random walk.
        Adapting = "adapting",
        /// The frozen kernel runs; its draws are discarded.
        WarmUp = "warm-up",
        /// The frozen kernel runs; its draws are kept.
        Sampling = "sampling",
        Done = "done",
    }
}

/// How the kernel's settings are chosen before sampling, with the method's budget.
/// Written as `{"method": "bo", …}` in links.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "method", rename_all = "snake_case")]
pub enum Tuning {
    /// Keep the given settings.
    None,
    /// Bayesian optimisation of the settings.
    Bo(BoConfig),
    /// Robbins–Monro scaling of a random walk for `steps` steps.
    Rm { steps: usize },
    /// Adaptive Metropolis for `steps` steps.
    Am { steps: usize },
}

impl Tuning {
    pub fn method(&self) -> Method {
        match self {
            Tuning::None => Method::None,
            Tuning::Bo(_) => Method::Bo,
            Tuning::Rm { .. } => Method::Rm,
            Tuning::Am { .. } => Method::Am,
        }
    }
}

/// Everything that fixes a run's draws.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunConfig {
    pub chains: usize,
    pub warmup: usize,
    pub draws: usize,
    pub seed: u64,
    /// Pilot sweeps per chain.
    pub pilot: usize,
    /// The kernel to run, or, when tuning, the kind of kernel to tune.
    pub settings: Settings,
    pub tuning: Tuning,
}

/// The usual run: four chains of 1,000 draws after 1,000 warm-up steps and a 200-sweep pilot.
pub const DEFAULT_CHAINS: usize = 4;
pub const DEFAULT_WARMUP: usize = 1000;
pub const DEFAULT_DRAWS: usize = 1000;
pub const DEFAULT_PILOT: usize = 200;

/// Most chains a run may have.
pub const MAX_CHAINS: usize = 64;
/// Fewest draws per chain: split R-hat needs two halves of at least two.
pub const MIN_DRAWS: usize = 4;
/// Most draws, warm-up steps, pilot sweeps and adaptation steps per chain.
pub const MAX_DRAWS: usize = 10_000_000;
pub const MAX_WARMUP: usize = 100_000_000;
pub const MAX_PILOT: usize = 1_000_000;
pub const MAX_ADAPT_STEPS: usize = 100_000_000;
/// Largest seed: 2⁵³ − 1, so that a seed travels through JavaScript and JSON exactly.
pub const MAX_SEED: u64 = (1 << 53) - 1;
/// Most tuning trials, and fewest and most steps in one trial window.
pub const MAX_TRIALS: usize = 10_000;
pub const WINDOW_RANGE: (usize, usize) = (4, 100_000);

/// `value` as a count of `what`, if it lies from `low` to `high`; the error names `option`.
fn within(option: Opt, what: &str, value: u64, (low, high): (usize, usize)) -> Result<usize, PlanError> {
    if (low as u64..=high as u64).contains(&value) {
        Ok(value as usize)
    } else {
        Err(PlanError::of(option, format!("{what} must be from {low} to {high}, not {value}")))
    }
}

impl RunConfig {
    /// Why this configuration cannot run, if it cannot, naming the option at fault.
    pub fn validate(&self) -> Result<(), PlanError> {
        if self.seed > MAX_SEED {
            return Err(PlanError::of(
                Opt::Seed,
                format!("the seed must be at most 2^53 − 1 = {MAX_SEED}, not {}", self.seed),
            ));
        }
        within(Opt::Chains, "the number of chains", self.chains as u64, (1, MAX_CHAINS))?;
        within(Opt::Draws, "the number of draws per chain", self.draws as u64, (MIN_DRAWS, MAX_DRAWS))?;
        within(Opt::Warmup, "the number of warm-up steps", self.warmup as u64, (0, MAX_WARMUP))?;
        within(Opt::Pilot, "the number of pilot sweeps", self.pilot as u64, (0, MAX_PILOT))?;
        self.settings
            .validate()
            .map_err(|(setting, message)| PlanError { option: Opt::from_name(setting).ok(), message })?;
        let Some(kind) = self.settings.kind() else {
            return match self.tuning {
                Tuning::None => Ok(()),
                _ => Err(PlanError::of(
                    Opt::Tune,
                    "a mixture of kernels cannot be tuned; give a random walk or a slice sampler".into(),
                )),
            };
        };
        if !self.tuning.method().applies_to(kind) {
            return Err(PlanError::of(
                Opt::Tune,
                "Robbins–Monro and adaptive Metropolis adapt a random walk, not a slice sampler".into(),
            ));
        }
        match &self.tuning {
            Tuning::None => Ok(()),
            Tuning::Bo(bo) => {
                within(Opt::Trials, "the number of tuning trials", bo.trials as u64, (1, MAX_TRIALS))?;
                within(Opt::Window, "the steps per tuning trial", bo.window as u64, WINDOW_RANGE).map(drop)
            }
            Tuning::Rm { steps } | Tuning::Am { steps } => {
                within(Opt::Trials, "the number of adaptation steps", *steps as u64, (1, MAX_ADAPT_STEPS)).map(drop)
            }
        }
    }

    /// The kind of kernel run or tuned, or `None` for a given mixture.
    pub fn kind(&self) -> Option<Kind> {
        self.settings.kind()
    }
}

#[cfg(test)]
mod tests;
