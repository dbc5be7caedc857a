//! The plan of a run, one phase after another, for all chains at once: pilot, tuning, freezing
//! the kernel, warm-up, sampling. The conductor hands out [`Task`]s and collects [`Outcome`]s;
//! whoever drives it (threads natively, Web Workers in the page) only carries messages, so a
//! run's draws do not depend on how it is driven.

use super::{Outcome, Record, Task};
use crate::kernel::{Geometry, Scheme, Settings};
use crate::tune::policy::{Axis, BoConfig, Space, Surrogate, Trial, Tuner};
use crate::tune::score::Score;
use serde::{Deserialize, Serialize};

/// Steps per task while adapting, warming up and sampling: small enough for frequent progress
/// reports and prompt cancelling, large enough that passing messages costs nothing.
pub const CHUNK: usize = 250;

/// How the kernel's settings are chosen before sampling.
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
    /// Every method that applies to `settings`' kind of kernel, with the budget of `bo`: the
    /// given setting untouched, Bayesian optimisation, and for a random walk also Robbins–Monro
    /// and adaptive Metropolis for as many steps as the optimisation's trials take.
    pub fn alternatives(settings: &Settings, bo: &BoConfig) -> Vec<Tuning> {
        let steps = bo.trials * bo.window;
        let mut methods = vec![Tuning::None, Tuning::Bo(bo.clone())];
        if matches!(settings, Settings::RandomWalk { .. }) {
            methods.extend([Tuning::Rm { steps }, Tuning::Am { steps }]);
        }
        methods
    }

    pub fn name(&self) -> &'static str {
        match self {
            Tuning::None => "none",
            Tuning::Bo(_) => "bo",
            Tuning::Rm { .. } => "rm",
            Tuning::Am { .. } => "am",
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

/// Most chains a run may have.
pub const MAX_CHAINS: usize = 64;
/// Fewest draws per chain: split R-hat needs two halves of at least two.
pub const MIN_DRAWS: usize = 4;
/// Most draws, warm-up steps, pilot sweeps and adaptation steps per chain.
pub const MAX_DRAWS: usize = 10_000_000;
pub const MAX_WARMUP: usize = 100_000_000;
pub const MAX_PILOT: usize = 1_000_000;
pub const MAX_ADAPT_STEPS: usize = 100_000_000;
/// Most tuning trials, and fewest and most steps in one trial window.
pub const MAX_TRIALS: usize = 10_000;
pub const WINDOW_RANGE: (usize, usize) = (4, 100_000);

impl RunConfig {
    /// Why this configuration cannot run, if it cannot.
    pub fn validate(&self) -> Result<(), String> {
        let within = |what: &str, value: usize, lo: usize, hi: usize| {
            if (lo..=hi).contains(&value) {
                Ok(())
            } else {
                Err(format!("{what} must be from {lo} to {hi}, not {value}"))
            }
        };
        within("the number of chains", self.chains, 1, MAX_CHAINS)?;
        within("the number of draws per chain", self.draws, MIN_DRAWS, MAX_DRAWS)?;
        within("the number of warm-up steps", self.warmup, 0, MAX_WARMUP)?;
        within("the number of pilot sweeps", self.pilot, 0, MAX_PILOT)?;
        self.settings.validate()?;
        if matches!(self.settings, Settings::Mixture { .. }) && self.tuning != Tuning::None {
            return Err("a mixture of kernels cannot be tuned; give a random walk or a slice sampler".into());
        }
        match &self.tuning {
            Tuning::None => Ok(()),
            Tuning::Bo(bo) => {
                within("the number of tuning trials", bo.trials, 1, MAX_TRIALS)?;
                within("the steps per tuning trial", bo.window, WINDOW_RANGE.0, WINDOW_RANGE.1)
            }
            Tuning::Rm { steps } | Tuning::Am { steps } => {
                if !matches!(self.settings, Settings::RandomWalk { .. }) {
                    return Err("Robbins–Monro and adaptive Metropolis adapt a random walk, not a slice sampler".into());
                }
                within("the number of adaptation steps", *steps, 1, MAX_ADAPT_STEPS)
            }
        }
    }

    /// Bytes the draws will take while being summarised (held as rows and once more as columns),
    /// for a model with `columns` values per draw.
    pub fn draw_bytes(&self, columns: usize) -> f64 {
        2.0 * 8.0 * self.draws as f64 * self.chains as f64 * columns as f64
    }
}

/// Which phase the run is in and how far along.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Progress {
    pub phase: &'static str,
    pub done: usize,
    pub total: usize,
}

/// What the tuning phase did, for the report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TuningRecord {
    pub method: &'static str,
    pub score: Option<Score>,
    /// Steps per chain per trial (Bayesian optimisation only).
    pub window: Option<usize>,
    pub axes: Option<[Axis; 2]>,
    pub trials: Vec<Trial>,
    pub surrogate: Option<Surrogate>,
    /// Density evaluations spent tuning, all chains.
    pub evaluations: u64,
}

/// What a finished run produced.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Collected {
    pub config: RunConfig,
    /// The kernel that made the draws.
    pub settings: Settings,
    pub geometry: Geometry,
    pub tuning: Option<TuningRecord>,
    /// Per chain: `draws` rows of the tape's columns, end to end.
    pub draws: Vec<Vec<f64>>,
    /// Per chain, sampling phase only.
    pub stats: Vec<ChainStats>,
    /// Density evaluations spent before sampling (pilot, tuning and warm-up), all chains.
    pub evaluations_before_sampling: u64,
    /// False when the run was stopped early; the draws are then those made so far.
    pub complete: bool,
}

#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct ChainStats {
    pub evaluations: u64,
    pub proposals: u64,
    pub moves: u64,
}

#[derive(Clone, Copy, Debug, PartialEq)]
enum Phase {
    Pilot,
    /// Bayesian optimisation: set up the next trial's kernel, then run it.
    TrialSetup,
    TrialRun,
    /// Adaptive baselines: give the chains the pilot's geometry, then adapt.
    AdaptSetup,
    Adapt(usize),
    Freeze,
    Warmup(usize),
    Sample(usize),
    Done,
}

pub struct Conductor {
    config: RunConfig,
    dim: usize,
    phase: Phase,
    geometry: Geometry,
    settings: Settings,
    tuner: Option<Tuner>,
    tuning_evaluations: u64,
    draws: Vec<Vec<f64>>,
    stats: Vec<ChainStats>,
    evaluations_before_sampling: u64,
    /// Steps asked for by the task in flight.
    in_flight: usize,
}

impl Conductor {
    pub fn new(config: RunConfig, dim: usize) -> Self {
        let chains = config.chains;
        let tuner = match &config.tuning {
            Tuning::Bo(bo) => Some(Tuner::new(bo.clone(), Space::for_settings(&config.settings, dim), config.seed)),
            _ => None,
        };
        let mut conductor = Conductor {
            dim,
            phase: Phase::Pilot,
            geometry: Geometry::unit(dim),
            settings: config.settings.clone(),
            tuner,
            tuning_evaluations: 0,
            draws: vec![Vec::new(); chains],
            stats: vec![ChainStats::default(); chains],
            evaluations_before_sampling: 0,
            in_flight: 0,
            config,
        };
        if conductor.config.pilot == 0 {
            conductor.phase = conductor.after_pilot();
        }
        conductor
    }

    fn after_pilot(&self) -> Phase {
        match self.config.tuning {
            Tuning::None => Phase::Freeze,
            Tuning::Bo(_) => Phase::TrialSetup,
            Tuning::Rm { .. } | Tuning::Am { .. } => Phase::AdaptSetup,
        }
    }

    fn adapt_steps(&self) -> (usize, Scheme) {
        match self.config.tuning {
            Tuning::Am { steps } => (steps, Scheme::AdaptiveMetropolis),
            Tuning::Rm { steps } => (steps, Scheme::RobbinsMonro),
            _ => (0, Scheme::RobbinsMonro),
        }
    }

    /// The task every chain should do next, or `None` when the run is complete.
    pub fn next_task(&mut self) -> Option<Task> {
        let chunk = |done: usize, total: usize| CHUNK.min(total - done);
        let configure =
            |settings: Settings, geometry: &Geometry| Task::Configure { settings, geometry: geometry.clone() };
        let task = loop {
            break match self.phase {
                Phase::Pilot => Task::Pilot { sweeps: self.config.pilot },
                Phase::TrialSetup => match self.tuner.as_mut().and_then(Tuner::propose) {
                    Some(settings) => configure(settings, &self.geometry),
                    None => {
                        self.phase = Phase::Freeze;
                        continue;
                    }
                },
                Phase::TrialRun => {
                    let window = self.tuner.as_ref().map_or(0, |t| t.config().window);
                    Task::Run { steps: window, record: Record::Unconstrained }
                }
                Phase::AdaptSetup => configure(self.config.settings.clone(), &self.geometry),
                Phase::Adapt(done) => {
                    let (total, scheme) = self.adapt_steps();
                    Task::Adapt { scheme, steps: chunk(done, total) }
                }
                Phase::Freeze => {
                    if let Some(tuner) = self.tuner.as_mut() {
                        self.settings = tuner.freeze();
                    }
                    configure(self.settings.clone(), &self.geometry)
                }
                Phase::Warmup(done) => Task::Run { steps: chunk(done, self.config.warmup), record: Record::Nothing },
                Phase::Sample(done) => Task::Run { steps: chunk(done, self.config.draws), record: Record::Draws },
                Phase::Done => return None,
            };
        };
        self.in_flight = match &task {
            Task::Run { steps, .. } | Task::Adapt { steps, .. } => *steps,
            _ => 0,
        };
        Some(task)
    }

    /// Take the chains' answers to the last task (one per chain, any order).
    pub fn absorb(&mut self, mut outcomes: Vec<Outcome>) {
        outcomes.sort_by_key(|o| o.chain);
        let steps = self.in_flight;
        let spent: u64 = outcomes.iter().map(|o| o.evaluations).sum();
        if !matches!(self.phase, Phase::Sample(_)) {
            self.evaluations_before_sampling += spent;
        }
        if matches!(self.phase, Phase::TrialRun | Phase::Adapt(_)) {
            self.tuning_evaluations += spent;
        }
        self.phase = match self.phase {
            Phase::Pilot => {
                let rows: Vec<&[f64]> = outcomes.iter().map(|o| o.rows.as_slice()).collect();
                self.geometry = pooled_geometry(&rows, self.dim);
                self.after_pilot()
            }
            Phase::TrialSetup => Phase::TrialRun,
            Phase::TrialRun => {
                if let Some(tuner) = self.tuner.as_mut() {
                    tuner.observe(&outcomes, self.dim);
                }
                Phase::TrialSetup
            }
            Phase::AdaptSetup => Phase::Adapt(0),
            Phase::Adapt(done) => {
                let (total, scheme) = self.adapt_steps();
                if done + steps < total {
                    Phase::Adapt(done + steps)
                } else {
                    self.freeze_adapted(scheme, &outcomes);
                    Phase::Freeze
                }
            }
            Phase::Freeze => self.after(0, self.config.warmup, Phase::Warmup),
            Phase::Warmup(done) => self.after(done + steps, self.config.warmup, Phase::Warmup),
            Phase::Sample(done) => {
                for o in outcomes {
                    self.draws[o.chain].extend_from_slice(&o.rows);
                    let s = &mut self.stats[o.chain];
                    s.evaluations += o.evaluations;
                    s.proposals += o.proposals;
                    s.moves += o.moves;
                }
                if done + steps < self.config.draws { Phase::Sample(done + steps) } else { Phase::Done }
            }
            Phase::Done => Phase::Done,
        };
    }

    /// Warm-up until `done` reaches `total`, then sampling.
    fn after(&self, done: usize, total: usize, within: fn(usize) -> Phase) -> Phase {
        if done < total {
            within(done)
        } else if self.config.draws == 0 {
            Phase::Done
        } else {
            Phase::Sample(0)
        }
    }

    /// The frozen random walk of an adaptive baseline: the chains' learned log scales averaged
    /// (Robbins–Monro), or their learned covariances averaged with the scale 2.38/√d (adaptive
    /// Metropolis). Averaging in chain order keeps the result independent of how chains ran.
    fn freeze_adapted(&mut self, scheme: Scheme, outcomes: &[Outcome]) {
        let n = outcomes.len().max(1) as f64;
        let d = self.dim;
        match scheme {
            Scheme::RobbinsMonro => {
                let log_scale = outcomes.iter().map(|o| o.rows.first().copied().unwrap_or(0.0)).sum::<f64>() / n;
                self.settings = Settings::RandomWalk { scale: libm::exp(log_scale), blend: 1.0 };
            }
            Scheme::AdaptiveMetropolis => {
                let mut covariance = vec![0.0; d * d];
                for o in outcomes {
                    for (c, v) in covariance.iter_mut().zip(&o.rows) {
                        *c += v / n;
                    }
                }
                self.geometry = Geometry { mean: self.geometry.mean.clone(), covariance };
                self.settings = Settings::RandomWalk { scale: 2.38 / (d as f64).sqrt(), blend: 1.0 };
            }
        }
    }

    pub fn progress(&self) -> Progress {
        let trials = self.tuner.as_ref().map_or((0, 0), |t| (t.trials().len(), t.config().trials));
        let (phase, done, total) = match self.phase {
            Phase::Pilot => ("pilot", 0, self.config.pilot),
            Phase::TrialSetup | Phase::TrialRun => ("tuning", trials.0, trials.1),
            Phase::AdaptSetup => ("adapting", 0, self.adapt_steps().0),
            Phase::Adapt(done) => ("adapting", done, self.adapt_steps().0),
            Phase::Freeze => ("warm-up", 0, self.config.warmup),
            Phase::Warmup(done) => ("warm-up", done, self.config.warmup),
            Phase::Sample(done) => ("sampling", done, self.config.draws),
            Phase::Done => ("done", self.config.draws, self.config.draws),
        };
        Progress { phase, done, total }
    }

    pub fn is_done(&self) -> bool {
        self.phase == Phase::Done
    }

    /// The draws so far (complete once [`Conductor::is_done`]).
    pub fn finish(self) -> Collected {
        let tuning = match &self.config.tuning {
            Tuning::None => None,
            method => Some(TuningRecord {
                method: method.name(),
                score: self.tuner.as_ref().map(|t| t.config().score),
                window: self.tuner.as_ref().map(|t| t.config().window),
                axes: self.tuner.as_ref().map(|t| t.space().axes()),
                trials: self.tuner.as_ref().map(|t| t.trials().to_vec()).unwrap_or_default(),
                surrogate: self.tuner.as_ref().and_then(Tuner::surrogate),
                evaluations: self.tuning_evaluations,
            }),
        };
        Collected {
            complete: self.phase == Phase::Done,
            config: self.config,
            settings: self.settings,
            geometry: self.geometry,
            tuning,
            draws: self.draws,
            stats: self.stats,
            evaluations_before_sampling: self.evaluations_before_sampling,
        }
    }
}

/// Mean and covariance of all chains' pilot draws pooled (summed in chain order, so the result
/// is the same however the chains were run). A coordinate that never moved gets unit variance.
pub fn pooled_geometry(chains: &[&[f64]], d: usize) -> Geometry {
    let rows: Vec<&[f64]> = chains.iter().flat_map(|c| c.chunks_exact(d.max(1))).collect();
    let n = rows.len();
    if n < 2 || d == 0 {
        return Geometry::unit(d);
    }
    let mut mean = vec![0.0; d];
    for row in &rows {
        for (m, x) in mean.iter_mut().zip(*row) {
            *m += x / n as f64;
        }
    }
    let mut covariance = vec![0.0; d * d];
    for row in &rows {
        for i in 0..d {
            let di = row[i] - mean[i];
            for j in 0..=i {
                covariance[i * d + j] += di * (row[j] - mean[j]) / (n - 1) as f64;
            }
        }
    }
    for i in 0..d {
        for j in 0..i {
            covariance[j * d + i] = covariance[i * d + j];
        }
    }
    for i in 0..d {
        let v = covariance[i * d + i];
        if !(v.is_finite() && v > 0.0) {
            for j in 0..d {
                covariance[i * d + j] = 0.0;
                covariance[j * d + i] = 0.0;
            }
            covariance[i * d + i] = 1.0;
        }
    }
    Geometry { mean, covariance }
}
