//! One Markov chain: its state, its own random stream, and the kernel it currently runs.
//!
//! A chain does what a [`Task`] says and answers with an [`Outcome`]; it never decides what to do
//! next. The [`conductor`] decides, for all chains together, so the same run can be driven by
//! threads natively or by one Web Worker per chain in the browser, with identical draws.

pub mod conductor;
pub mod moments;
#[cfg(not(target_arch = "wasm32"))]
pub mod threads;

pub use moments::Moments;

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
    /// Run the scale-finding pilot: slice sweeps with widths learned as it goes. Answers with
    /// the running moments of its second half's unconstrained draws ([`Moments::to_rows`]);
    /// the draws themselves are not kept.
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

    /// Slice sweeps whose widths follow the spread seen so far. The first half starts from unit
    /// widths and re-estimates them at the ends of doubling windows, each from the sweeps of that
    /// window alone: at sweep n (for n = h, h/2, h/4, … down to 10, where h is half the sweeps)
    /// from sweeps n/2 to n, the later half of what has been seen. The second half runs with
    /// widths fixed at three standard deviations of the first half's last window, and its running
    /// moments are returned. Memory stays a few rows and one covariance, whatever the sweeps.
    fn pilot(&mut self, tape: &Tape, sweeps: usize) -> Vec<f64> {
        let d = tape.dim();
        let first = sweeps / 2;
        let mut ends: Vec<usize> =
            std::iter::successors(Some(first), |n| Some(n / 2)).take_while(|&n| n >= PILOT_FIRST_WINDOW).collect();
        ends.reverse();
        let mut ends = ends.into_iter().peekable();
        let mut window = Moments::diagonal(d);
        let mut kernel = Kernel::new(&PILOT_SLICE, &Geometry::unit(d));
        for sweep in 0..first {
            kernel.step(tape, &mut self.state, &mut self.rng);
            let Some(&end) = ends.peek() else { continue };
            if sweep >= end / 2 {
                window.add(&self.state.theta);
            }
            if sweep + 1 == end {
                kernel = Kernel::new(&PILOT_SLICE, &window.geometry());
                window = Moments::diagonal(d);
                ends.next();
            }
        }
        let mut moments = Moments::full(d);
        for _ in first..sweeps {
            kernel.step(tape, &mut self.state, &mut self.rng);
            moments.add(&self.state.theta);
        }
        moments.to_rows()
    }
}

/// The first half of the pilot first re-estimates its widths after this many sweeps or more.
const PILOT_FIRST_WINDOW: usize = 10;

/// The pilot's slice kernel: three standard deviations wide, generous stepping out.
const PILOT_SLICE: Settings = Settings::Slice { width: 3.0, stepout: 50 };
