//! The plan of a run, one phase after another, for all chains at once: pilot, kernel set-up,
//! warm-up, sampling. The conductor hands out [`Task`]s and collects [`Outcome`]s; whoever
//! drives it (threads natively, Web Workers in the page) only carries messages.

use super::{Outcome, Record, Task};
use crate::kernel::{Geometry, Settings};
use serde::{Deserialize, Serialize};

/// Steps per task while warming up and sampling: small enough for frequent progress reports
/// and prompt cancelling, large enough that message passing costs nothing.
pub const CHUNK: usize = 250;

/// Everything that fixes a run's draws.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunConfig {
    pub chains: usize,
    pub warmup: usize,
    pub draws: usize,
    pub seed: u64,
    /// Pilot sweeps per chain.
    pub pilot: usize,
    pub settings: Settings,
}

/// Which phase the run is in and how far along.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Progress {
    pub phase: &'static str,
    pub done: usize,
    pub total: usize,
}

/// What a finished run produced.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Collected {
    pub config: RunConfig,
    pub geometry: Geometry,
    /// Per chain: `draws` rows of the tape's columns, end to end.
    pub draws: Vec<Vec<f64>>,
    /// Per chain, sampling phase only.
    pub stats: Vec<ChainStats>,
    /// Density evaluations spent before sampling (pilot and warm-up), all chains.
    pub evaluations_before_sampling: u64,
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
    Configure,
    Warmup(usize),
    Sample(usize),
    Done,
}

pub struct Conductor {
    config: RunConfig,
    dim: usize,
    phase: Phase,
    geometry: Geometry,
    draws: Vec<Vec<f64>>,
    stats: Vec<ChainStats>,
    evaluations_before_sampling: u64,
    /// Steps asked for by the task in flight.
    in_flight: usize,
}

impl Conductor {
    pub fn new(config: RunConfig, dim: usize) -> Self {
        let chains = config.chains;
        Conductor {
            dim,
            phase: if config.pilot > 0 { Phase::Pilot } else { Phase::Configure },
            geometry: Geometry::unit(dim),
            draws: vec![Vec::new(); chains],
            stats: vec![ChainStats::default(); chains],
            evaluations_before_sampling: 0,
            in_flight: 0,
            config,
        }
    }

    /// The task every chain should do next, or `None` when the run is complete.
    pub fn next_task(&mut self) -> Option<Task> {
        let chunk = |done: usize, total: usize| CHUNK.min(total - done);
        let task = match self.phase {
            Phase::Pilot => Task::Pilot { sweeps: self.config.pilot },
            Phase::Configure => {
                Task::Configure { settings: self.config.settings.clone(), geometry: self.geometry.clone() }
            }
            Phase::Warmup(done) => Task::Run { steps: chunk(done, self.config.warmup), record: Record::Nothing },
            Phase::Sample(done) => Task::Run { steps: chunk(done, self.config.draws), record: Record::Draws },
            Phase::Done => return None,
        };
        self.in_flight = match &task {
            Task::Run { steps, .. } => *steps,
            _ => 0,
        };
        Some(task)
    }

    /// Take the chains' answers to the last task (one per chain, any order).
    pub fn absorb(&mut self, mut outcomes: Vec<Outcome>) {
        outcomes.sort_by_key(|o| o.chain);
        let steps = self.in_flight;
        self.phase = match self.phase {
            Phase::Pilot => {
                self.evaluations_before_sampling += outcomes.iter().map(|o| o.evaluations).sum::<u64>();
                let rows: Vec<&[f64]> = outcomes.iter().map(|o| o.rows.as_slice()).collect();
                self.geometry = pooled_geometry(&rows, self.dim);
                Phase::Configure
            }
            Phase::Configure => self.after(0, self.config.warmup, Phase::Warmup, Phase::Sample(0)),
            Phase::Warmup(done) => {
                self.evaluations_before_sampling += outcomes.iter().map(|o| o.evaluations).sum::<u64>();
                self.after(done + steps, self.config.warmup, Phase::Warmup, Phase::Sample(0))
            }
            Phase::Sample(done) => {
                for o in outcomes {
                    self.draws[o.chain].extend_from_slice(&o.rows);
                    let s = &mut self.stats[o.chain];
                    s.evaluations += o.evaluations;
                    s.proposals += o.proposals;
                    s.moves += o.moves;
                }
                self.after(done + steps, self.config.draws, Phase::Sample, Phase::Done)
            }
            Phase::Done => Phase::Done,
        };
    }

    /// `within(done)` until `done` reaches `total`, then `next` (skipping empty phases).
    fn after(&self, done: usize, total: usize, within: fn(usize) -> Phase, next: Phase) -> Phase {
        if done < total {
            return within(done);
        }
        match next {
            Phase::Sample(0) if self.config.draws == 0 => Phase::Done,
            other => other,
        }
    }

    pub fn progress(&self) -> Progress {
        let (phase, done, total) = match self.phase {
            Phase::Pilot => ("pilot", 0, self.config.pilot),
            Phase::Configure => ("pilot", self.config.pilot, self.config.pilot),
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
        Collected {
            config: self.config,
            geometry: self.geometry,
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
