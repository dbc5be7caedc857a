//! A run carried out, one phase after another, for all chains at once: pilot, tuning, freezing
//! the kernel, warm-up, sampling (the [`Phase`]s). The conductor hands out [`Task`]s and collects
//! [`Outcome`]s; whoever drives it (threads natively, Web Workers in the page) only carries
//! messages, so a run's draws do not depend on how it is driven. What to run comes from a
//! [`RunConfig`] (see `plan`); the conductor decides nothing that the configuration does not say.

use super::{Moments, Outcome, Record, Task};
use crate::kernel::{Geometry, Scheme, Settings};
use crate::plan::memory::MAX_TASK_VALUES;
use crate::plan::{Method, Phase, RunConfig, Shape, Tuning};
use crate::tune::policy::{Axis, Space, Surrogate, Trial, Tuner};
use crate::tune::score::{Score, Window};
use serde::{Deserialize, Serialize};

/// Steps per task while adapting, warming up and sampling, unless the driver sets another size:
/// small enough for frequent progress reports and prompt cancelling in the page. How steps are cut
/// into tasks never changes the draws (a chain simply continues).
pub const CHUNK: usize = 250;

/// Which phase the run is in and how far along.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Progress {
    pub phase: Phase,
    pub done: usize,
    pub total: usize,
}

/// Density evaluations spent in each phase, all chains: the run's cost.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
pub struct Spent {
    pub pilot: u64,
    /// Tuning trials or adaptation.
    pub tuning: u64,
    pub warmup: u64,
    pub sampling: u64,
}

impl Spent {
    fn charge(&mut self, phase: Phase, evaluations: u64) {
        match phase {
            Phase::Pilot => self.pilot += evaluations,
            Phase::Tuning | Phase::Adapting => self.tuning += evaluations,
            Phase::WarmUp => self.warmup += evaluations,
            Phase::Sampling | Phase::Done => self.sampling += evaluations,
        }
    }

    /// Everything before sampling: pilot, tuning and warm-up.
    pub fn before_sampling(&self) -> u64 {
        self.pilot + self.tuning + self.warmup
    }
}

/// What the tuning phase did, for the report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TuningRecord {
    pub method: Method,
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
    /// Density evaluations spent in each phase.
    pub spent: Spent,
    /// False when the run was stopped early; the draws are then those made so far.
    pub complete: bool,
}

#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct ChainStats {
    pub evaluations: u64,
    pub proposals: u64,
    pub moves: u64,
}

/// Where the conductor is: a [`Phase`], cut into the steps its tasks take.
#[derive(Clone, Copy, Debug, PartialEq)]
enum At {
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

impl At {
    fn phase(self) -> Phase {
        match self {
            At::Pilot => Phase::Pilot,
            At::TrialSetup | At::TrialRun => Phase::Tuning,
            At::AdaptSetup | At::Adapt(_) => Phase::Adapting,
            At::Freeze | At::Warmup(_) => Phase::WarmUp,
            At::Sample(_) => Phase::Sampling,
            At::Done => Phase::Done,
        }
    }
}

pub struct Conductor {
    config: RunConfig,
    dim: usize,
    at: At,
    geometry: Geometry,
    settings: Settings,
    tuner: Option<Tuner>,
    draws: Vec<Vec<f64>>,
    stats: Vec<ChainStats>,
    spent: Spent,
    /// Steps asked for by the task in flight.
    in_flight: usize,
    chunk: usize,
    /// Values per draw.
    columns: usize,
    /// Most steps in one sampling task, so that a chain's recorded rows stay small.
    max_sample_steps: usize,
}

impl Conductor {
    /// The conductor of a run of `config` (already validated, see `plan`) on a model of `shape`.
    pub fn new(config: RunConfig, shape: Shape) -> Self {
        let chains = config.chains;
        let dim = shape.dim;
        let tuner = match (&config.tuning, config.kind()) {
            (Tuning::Bo(bo), Some(kind)) => Some(Tuner::new(bo.clone(), Space::for_kind(kind, dim), config.seed)),
            _ => None,
        };
        let mut conductor = Conductor {
            dim,
            at: At::Pilot,
            geometry: Geometry::unit(dim),
            settings: config.settings.clone(),
            tuner,
            draws: vec![Vec::new(); chains],
            stats: vec![ChainStats::default(); chains],
            spent: Spent::default(),
            in_flight: 0,
            chunk: CHUNK,
            columns: shape.columns,
            max_sample_steps: (MAX_TASK_VALUES / shape.columns.max(1)).max(1),
            config,
        };
        if conductor.config.pilot == 0 {
            conductor.at = conductor.after_pilot();
        }
        conductor
    }

    fn after_pilot(&self) -> At {
        match self.config.tuning {
            Tuning::None => At::Freeze,
            Tuning::Bo(_) => At::TrialSetup,
            Tuning::Rm { .. } | Tuning::Am { .. } => At::AdaptSetup,
        }
    }

    /// The stopping rule of sampling: whether `done` draws per chain are enough. Today a fixed
    /// number, the configuration's; a rule that reads the draws so far belongs here.
    fn sampled_enough(&self, done: usize) -> bool {
        done >= self.config.draws
    }

    fn adapt_steps(&self) -> (usize, Scheme) {
        match self.config.tuning {
            Tuning::Am { steps } => (steps, Scheme::AdaptiveMetropolis),
            Tuning::Rm { steps } => (steps, Scheme::RobbinsMonro),
            _ => (0, Scheme::RobbinsMonro),
        }
    }

    /// Cut adaptation, warm-up and sampling into tasks of `steps` steps (at least 1).
    pub fn set_chunk(&mut self, steps: usize) {
        self.chunk = steps.max(1);
    }

    /// The task every chain should do next, or `None` when the run is complete.
    pub fn next_task(&mut self) -> Option<Task> {
        let size = self.chunk;
        let chunk = |done: usize, total: usize| size.min(total - done);
        let configure =
            |settings: Settings, geometry: &Geometry| Task::Configure { settings, geometry: geometry.clone() };
        let task = loop {
            break match self.at {
                At::Pilot => Task::Pilot { sweeps: self.config.pilot },
                At::TrialSetup => match self.tuner.as_mut().and_then(Tuner::propose) {
                    Some(settings) => configure(settings, &self.geometry),
                    None => {
                        self.at = At::Freeze;
                        continue;
                    }
                },
                At::TrialRun => {
                    let window = self.tuner.as_ref().map_or(0, |t| t.config().window);
                    Task::Run { steps: window, record: Record::Unconstrained }
                }
                At::AdaptSetup => configure(self.config.settings.clone(), &self.geometry),
                At::Adapt(done) => {
                    let (total, scheme) = self.adapt_steps();
                    Task::Adapt { scheme, steps: chunk(done, total) }
                }
                At::Freeze => {
                    if let Some(tuner) = self.tuner.as_mut() {
                        self.settings = tuner.freeze();
                    }
                    configure(self.settings.clone(), &self.geometry)
                }
                At::Warmup(done) => Task::Run { steps: chunk(done, self.config.warmup), record: Record::Nothing },
                At::Sample(done) => Task::Run {
                    steps: chunk(done, self.config.draws).min(self.max_sample_steps),
                    record: Record::Draws,
                },
                At::Done => return None,
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
        self.spent.charge(self.at.phase(), outcomes.iter().map(|o| o.evaluations).sum());
        self.at = match self.at {
            At::Pilot => {
                let answers: Vec<&[f64]> = outcomes.iter().map(|o| o.rows.as_slice()).collect();
                self.geometry = Moments::pooled(&answers, self.dim).geometry();
                self.after_pilot()
            }
            At::TrialSetup => At::TrialRun,
            At::TrialRun => {
                if let Some(tuner) = self.tuner.as_mut() {
                    let rows: Vec<&[f64]> = outcomes.iter().map(|o| o.rows.as_slice()).collect();
                    let window = Window {
                        rows: &rows,
                        evaluations: outcomes.iter().map(|o| o.evaluations).sum(),
                        steps: outcomes.iter().map(|o| o.steps).sum(),
                    };
                    tuner.observe(&window, &self.geometry);
                }
                At::TrialSetup
            }
            At::AdaptSetup => At::Adapt(0),
            At::Adapt(done) => {
                let (total, scheme) = self.adapt_steps();
                if done + steps < total {
                    At::Adapt(done + steps)
                } else {
                    self.freeze_adapted(scheme, &outcomes);
                    At::Freeze
                }
            }
            At::Freeze => self.after_warmup(0),
            At::Warmup(done) => self.after_warmup(done + steps),
            At::Sample(done) => {
                for o in outcomes {
                    if done == 0 {
                        // Room for every draw at once: growing by doubling would hold up to
                        // three times the draws while the last copy is made.
                        self.draws[o.chain].reserve_exact(self.config.draws * self.columns);
                    }
                    self.draws[o.chain].extend_from_slice(&o.rows);
                    let s = &mut self.stats[o.chain];
                    s.evaluations += o.evaluations;
                    s.proposals += o.proposals;
                    s.moves += o.moves;
                }
                if self.sampled_enough(done + steps) { At::Done } else { At::Sample(done + steps) }
            }
            At::Done => At::Done,
        };
    }

    /// Warm-up until `done` reaches its length, then sampling.
    fn after_warmup(&self, done: usize) -> At {
        if done < self.config.warmup {
            At::Warmup(done)
        } else if self.sampled_enough(0) {
            At::Done
        } else {
            At::Sample(0)
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
        let (done, total) = match self.at {
            At::Pilot => (0, self.config.pilot),
            At::TrialSetup | At::TrialRun => trials,
            At::AdaptSetup => (0, self.adapt_steps().0),
            At::Adapt(done) => (done, self.adapt_steps().0),
            At::Freeze => (0, self.config.warmup),
            At::Warmup(done) => (done, self.config.warmup),
            At::Sample(done) => (done, self.config.draws),
            At::Done => (self.config.draws, self.config.draws),
        };
        Progress { phase: self.at.phase(), done, total }
    }

    pub fn is_done(&self) -> bool {
        self.at == At::Done
    }

    /// The draws so far (complete once [`Conductor::is_done`]).
    pub fn finish(self) -> Collected {
        let tuning = match &self.config.tuning {
            Tuning::None => None,
            method => Some(TuningRecord {
                method: method.method(),
                score: self.tuner.as_ref().map(|t| t.config().score),
                window: self.tuner.as_ref().map(|t| t.config().window),
                axes: self.tuner.as_ref().map(|t| t.space().axes()),
                trials: self.tuner.as_ref().map(|t| t.trials().to_vec()).unwrap_or_default(),
                surrogate: self.tuner.as_ref().and_then(Tuner::surrogate),
                evaluations: self.spent.tuning,
            }),
        };
        Collected {
            complete: self.at == At::Done,
            config: self.config,
            settings: self.settings,
            geometry: self.geometry,
            tuning,
            draws: self.draws,
            stats: self.stats,
            spent: self.spent,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chain::Chain;
    use crate::plan::{Options, Phase};
    use crate::tape::Tape;

    /// Drive a run on this thread, noting the phase after every task.
    fn drive(options: Options) -> (Vec<Phase>, Collected, u64) {
        let model =
            crate::model::check("mu : real\nsigma : positive\ndensity = normal(mu; 0, 1) * exponential(sigma; 1)\n")
                .expect("reads");
        let tape = Tape::new(&model);
        let config = Options { seed: Some(3), ..options }.resolve(tape.dim()).expect("valid");
        let mut chains: Vec<Chain> = (0..config.chains).map(|i| Chain::new(&tape, 3, i).expect("starts")).collect();
        let mut conductor = Conductor::new(config, Shape::of(&tape));
        let mut phases = vec![conductor.progress().phase];
        let mut spent = 0;
        while let Some(task) = conductor.next_task() {
            let outcomes: Vec<Outcome> = chains.iter_mut().rev().map(|c| c.perform(&tape, &task)).collect();
            spent += outcomes.iter().map(|o| o.evaluations).sum::<u64>();
            conductor.absorb(outcomes);
            if phases.last() != Some(&conductor.progress().phase) {
                phases.push(conductor.progress().phase);
            }
        }
        (phases, conductor.finish(), spent)
    }

    #[test]
    fn a_run_goes_through_its_phases_in_order_and_charges_every_evaluation_to_one() {
        let small =
            Options { chains: Some(2), draws: Some(20), warmup: Some(10), pilot: Some(20), ..Options::default() };
        let cases = [
            (
                Options { trials: Some(3), window: Some(10), ..small.clone() },
                vec![Phase::Pilot, Phase::Tuning, Phase::WarmUp, Phase::Sampling, Phase::Done],
            ),
            (
                Options { tune: Some(Method::Am), trials: Some(2), window: Some(10), pilot: Some(0), ..small.clone() },
                vec![Phase::Adapting, Phase::WarmUp, Phase::Sampling, Phase::Done],
            ),
            (
                Options { tune: Some(Method::None), warmup: Some(0), ..small },
                vec![Phase::Pilot, Phase::WarmUp, Phase::Sampling, Phase::Done],
            ),
        ];
        for (options, expected) in cases {
            let (phases, collected, spent) = drive(options.clone());
            assert_eq!(phases, expected, "{options:?}");
            let s = collected.spent;
            assert_eq!(s.before_sampling() + s.sampling, spent, "{options:?}: {s:?}");
            assert_eq!(s.sampling, collected.stats.iter().map(|c| c.evaluations).sum::<u64>());
            assert_eq!(collected.tuning.map_or(0, |t| t.evaluations), s.tuning);
            assert!(collected.complete && collected.draws.iter().all(|d| d.len() == 20 * 2), "{options:?}");
        }
    }
}
