//! One Markov chain: its state, its own random stream, and the kernel it currently runs.
//!
//! A chain does what a [`Task`] says and answers with an [`Outcome`]; it never decides what to do
//! next. The [`conductor`] decides, for all chains together, so the same run can be driven by
//! threads natively or by one Web Worker per chain in the browser, with identical draws.

pub mod conductor;
#[cfg(not(target_arch = "wasm32"))]
pub mod threads;

use crate::kernel::{Adapter, Geometry, Kernel, Scheme, Settings, State};
use crate::rng::Stream;
use crate::tape::Tape;
use serde::{Deserialize, Serialize};

/// Starting points are drawn uniformly from this box on the unconstrained scale (common practice:
/// dispersed enough for R-hat to see chains that have not mixed).
pub const START_BOX: f64 = 2.0;
/// Attempts at a starting point with a finite density before giving up.
pub const START_ATTEMPTS: usize = 100;

/// What a chain is asked to do.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "task", rename_all = "snake_case")]
pub enum Task {
    /// Run the scale-finding pilot: slice sweeps with widths learned as it goes. Returns the
    /// unconstrained draws of its second half (never reported as posterior draws).
    Pilot { sweeps: usize },
    /// Use this kernel from now on.
    Configure { settings: Settings, geometry: Geometry },
    /// Take `steps` steps with the current kernel, recording what `record` says.
    Run { steps: usize, record: Record },
    /// Take `steps` steps of an adaptive random walk, continuing any adaptation under way;
    /// answer with what it has learned (see [`Adapter::learned`]).
    Adapt { scheme: Scheme, steps: usize },
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Record {
    Nothing,
    /// Unconstrained coordinates, one row of `dim` per step.
    Unconstrained,
    /// Constrained parameters and derived quantities, one row per step (the tape's columns).
    Draws,
}

/// What a chain reports back after a task.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Outcome {
    pub chain: usize,
    /// Recorded rows, end to end.
    pub rows: Vec<f64>,
    pub steps: usize,
    pub evaluations: u64,
    pub proposals: u64,
    pub moves: u64,
}

/// One chain of a run.
#[derive(Clone, Debug)]
pub struct Chain {
    pub index: usize,
    rng: Stream,
    state: State,
    kernel: Option<Kernel>,
    /// The geometry of the last configuration, which adaptation starts from.
    geometry: Option<Geometry>,
    adapter: Option<Adapter>,
}

impl Chain {
    /// Chain `index` of the run seeded by `seed`, at a dispersed starting point.
    pub fn new(tape: &Tape, seed: u64, index: usize) -> Result<Chain, String> {
        let mut rng = Stream::new(seed, index as u64);
        for _ in 0..START_ATTEMPTS {
            let theta = (0..tape.dim()).map(|_| START_BOX * (2.0 * rng.uniform() - 1.0)).collect();
            if let Some(state) = State::new(tape, theta) {
                return Ok(Chain { index, rng, state, kernel: None, geometry: None, adapter: None });
            }
        }
        Err(format!(
            "chain {}: no starting point with a finite density in {START_ATTEMPTS} tries; the density may be zero \
             (log −∞) or undefined almost everywhere — check the data against each distribution's support",
            index + 1
        ))
    }

    /// Do `task`.
    pub fn perform(&mut self, tape: &Tape, task: &Task) -> Outcome {
        let before = (self.state.evaluations, self.state.proposals, self.state.moves);
        let mut rows = Vec::new();
        let steps = match task {
            Task::Pilot { sweeps } => {
                rows = self.pilot(tape, *sweeps);
                *sweeps
            }
            Task::Configure { settings, geometry } => {
                self.kernel = Some(Kernel::new(settings, geometry));
                self.geometry = Some(geometry.clone());
                0
            }
            Task::Adapt { scheme, steps } => {
                let geometry = self.geometry.get_or_insert_with(|| Geometry::unit(tape.dim()));
                let adapter = self.adapter.get_or_insert_with(|| Adapter::new(*scheme, geometry));
                for _ in 0..*steps {
                    adapter.step(tape, &mut self.state, &mut self.rng);
                }
                rows = adapter.learned();
                *steps
            }
            Task::Run { steps, record } => {
                self.run(tape, *steps, *record, &mut rows);
                *steps
            }
        };
        Outcome {
            chain: self.index,
            rows,
            steps,
            evaluations: self.state.evaluations - before.0,
            proposals: self.state.proposals - before.1,
            moves: self.state.moves - before.2,
        }
    }

    fn run(&mut self, tape: &Tape, steps: usize, record: Record, rows: &mut Vec<f64>) {
        let Some(kernel) = self.kernel.as_mut() else {
            return; // the conductor always configures before running
        };
        let width = match record {
            Record::Nothing => 0,
            Record::Unconstrained => tape.dim(),
            Record::Draws => tape.columns().len(),
        };
        rows.reserve(steps * width);
        for _ in 0..steps {
            kernel.step(tape, &mut self.state, &mut self.rng);
            match record {
                Record::Nothing => {}
                Record::Unconstrained => rows.extend_from_slice(&self.state.theta),
                Record::Draws => {
                    let start = rows.len();
                    rows.resize(start + width, 0.0);
                    tape.write_draw(&self.state.theta, &mut self.state.current, &mut rows[start..]);
                }
            }
        }
    }

    /// Slice sweeps whose widths follow the spread seen so far: the first half starts from unit
    /// widths and re-estimates them every few sweeps; the second half runs with widths fixed at
    /// three standard deviations of the first half, and its draws are returned.
    fn pilot(&mut self, tape: &Tape, sweeps: usize) -> Vec<f64> {
        let d = tape.dim();
        let first = sweeps / 2;
        let mut geometry = Geometry::unit(d);
        let mut seen: Vec<f64> = Vec::with_capacity(first * d);
        let mut kernel = Kernel::new(&PILOT_SLICE, &geometry);
        for sweep in 0..first {
            kernel.step(tape, &mut self.state, &mut self.rng);
            seen.extend_from_slice(&self.state.theta);
            if sweep >= 9 && (sweep + 1) % 10 == 0 {
                geometry = spread(&seen[(seen.len() / d / 2) * d..], d);
                kernel = Kernel::new(&PILOT_SLICE, &geometry);
            }
        }
        let mut rows = Vec::with_capacity((sweeps - first) * d);
        for _ in first..sweeps {
            kernel.step(tape, &mut self.state, &mut self.rng);
            rows.extend_from_slice(&self.state.theta);
        }
        rows
    }
}

/// The pilot's slice kernel: three standard deviations wide, generous stepping out.
const PILOT_SLICE: Settings = Settings::Slice { width: 3.0, stepout: 50 };

/// A diagonal geometry from rows of draws: each coordinate's sd (unit when it never moved).
fn spread(rows: &[f64], d: usize) -> Geometry {
    let n = (rows.len() / d.max(1)) as f64;
    let mut g = Geometry::unit(d);
    for i in 0..d {
        let mean = rows.iter().skip(i).step_by(d).sum::<f64>() / n;
        let var = rows.iter().skip(i).step_by(d).map(|x| (x - mean) * (x - mean)).sum::<f64>() / (n - 1.0).max(1.0);
        g.mean[i] = mean;
        g.covariance[i * d + i] = if var.is_finite() && var > 0.0 { var } else { 1.0 };
    }
    g
}
