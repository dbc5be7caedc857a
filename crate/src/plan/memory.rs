//! The memory a run needs at its peak, estimated from its configuration and the model's shape
//! before anything is allocated, so that a run too large for the machine (or the page) is refused
//! with a message that says what is too big and which option makes it smaller, instead of
//! aborting halfway when an allocation fails.
//!
//! A run holds some things throughout (the pilot's geometry and each chain's kernel) and others
//! only in one phase (the pilot's moments, the trial windows, the adaptation, the draws). The
//! peak is the first plus the largest of the second. Counted are the buffers that grow with the
//! run's options and the model's dimension; the model's own evaluation space and fixed overheads
//! are not. Figures are upper estimates in bytes, per chain (what a chain holds, in its thread or
//! worker) and shared (what the conductor holds, collected from all chains).

use super::{Opt, Phase, Plan, RunConfig, Tuning};
use crate::kernel::MAX_DENSE_DIM;
use crate::tape::Tape;
use crate::tune::policy::Freeze;

/// Bytes of one number.
const NUMBER: f64 = 8.0;
/// Most values one chain records in one task of sampling (8 MiB): the conductor cuts sampling
/// into tasks no larger, so a chain's buffer stays small whatever the draws and columns.
pub const MAX_TASK_VALUES: usize = 1 << 20;
/// Working copies of one quantity's draws while it is summarised (split, ranked, normal scores,
/// folded, two indicators, sorted pairs, and the autocorrelation's padded FFT buffers): about
/// this many numbers per draw, counted in `diag`, rounded up.
const SUMMARY_COPIES: f64 = 16.0;
/// The surrogate of Bayesian optimisation holds about this many trials × trials matrices while
/// it is refitted (covariance, its noisy copy, Cholesky factor, inverse, and the previous fit's).
const SURROGATE_MATRICES: f64 = 6.0;
/// Bytes per value of the draws as CSV text: a comma and at most 24 characters for the shortest
/// text that reads back as the same number (e.g. `-2.2250738585072014e-308`); and per row, the
/// chain and iteration numbers and the line's end.
const CSV_VALUE: f64 = 25.0;
const CSV_ROW: f64 = 22.0;
/// Components a frozen mixture has at most (the tuner's resampling draws).
const MIXTURE_COMPONENTS: f64 = 8.0;

/// The model as a run sees it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Shape {
    /// Unconstrained coordinates.
    pub dim: usize,
    /// Values recorded per draw: parameter elements and derived quantities.
    pub columns: usize,
}

impl Shape {
    pub fn of(tape: &Tape) -> Shape {
        Shape { dim: tape.dim(), columns: tape.columns().len() }
    }
}

/// Where a run is carried out: natively (one process; CSV streamed to its file), or in the page
/// (draws and messages copied between the engine's memory and JavaScript's, and the report's JSON
/// and CSV texts made in memory).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Face {
    Native,
    Page,
}

/// One thing a run holds.
#[derive(Clone, Debug, PartialEq)]
pub struct Part {
    pub what: &'static str,
    /// Its size in the run's terms, e.g. "4 chains × 100000 steps × 2000 coordinates".
    pub detail: String,
    /// The phase it is held in, or `None` for the whole run.
    pub phase: Option<Phase>,
    pub per_chain: f64,
    pub shared: f64,
    /// The option that makes it smaller.
    pub lowered_by: Opt,
}

/// What a run, or the runs of a comparison, need.
#[derive(Clone, Debug, PartialEq)]
pub struct Estimate {
    pub chains: usize,
    pub parts: Vec<Part>,
    /// Bytes a finished run keeps: its draws (and in the page, their copy and CSV text).
    pub kept: f64,
}

/// A run refused for its memory.
#[derive(Clone, Debug, PartialEq)]
pub struct TooLarge {
    /// Bytes at the peak, in all and in each chain's own state, and the number of chains.
    pub peak: f64,
    pub per_chain: f64,
    pub chains: usize,
    /// The largest part at the peak.
    pub part: Part,
    pub part_bytes: f64,
}

impl TooLarge {
    /// The refusal in words, for a limit described as `limit` ("--max-memory 2", "the 1 GiB a
    /// page can hold"), without the remedy, which each face words itself.
    pub fn message(&self, limit: &str) -> String {
        let chains = if self.per_chain * self.chains as f64 >= 0.1 * self.peak {
            format!(" ({} of it in each chain)", size(self.per_chain))
        } else {
            String::new()
        };
        format!(
            "this run would need about {} at its peak{chains}, more than {limit}: {} alone would take {} ({})",
            size(self.peak),
            self.part.what,
            size(self.part_bytes),
            self.part.detail
        )
    }
}

/// Bytes as a reader would say them: "6.0 GiB", "64 MiB".
pub fn size(bytes: f64) -> String {
    const GIB: f64 = (1u64 << 30) as f64;
    if bytes >= 0.1 * GIB { format!("{:.1} GiB", bytes / GIB) } else { format!("{:.0} MiB", bytes / (1 << 20) as f64) }
}

impl Estimate {
    /// What one run of `config` needs for a model of `shape`, carried out on `face`.
    ///
    /// Natively a chain's answer moves to the conductor without a copy; in the page it is
    /// copied into JavaScript in the chain's worker and back into the engine's memory in the
    /// planning worker, so the page counts those copies too (`p` below is 1 in the page).
    pub fn of(config: &RunConfig, shape: Shape, face: Face) -> Estimate {
        let Shape { dim, columns } = shape;
        let (d, c, n) = (dim as f64, columns as f64, config.chains as f64);
        let (w, t) = match &config.tuning {
            Tuning::Bo(bo) => (bo.window as f64, bo.trials as f64),
            _ => (0.0, 0.0),
        };
        let draws = config.draws as f64;
        let p = if face == Face::Page { 1.0 } else { 0.0 };
        let chains = config.chains;
        let mut parts = Vec::new();
        let mut part = |what, detail, phase, per_chain: f64, shared: f64, lowered_by| {
            parts.push(Part {
                what,
                detail,
                phase,
                per_chain: NUMBER * per_chain,
                shared: NUMBER * shared,
                lowered_by,
            });
        };

        // The conductor's geometry and the one in the task that configures the chains; each
        // chain's own copy (and in the page, the task's) and its kernel: a dense random-walk
        // factor is built through two more matrices of its size.
        let geometry = d * d + d;
        let components = match &config.tuning {
            Tuning::Bo(bo) if bo.freeze == Freeze::Mixture => MIXTURE_COMPONENTS,
            _ => 1.0,
        };
        let kernel = components * if dim <= MAX_DENSE_DIM { 3.0 * d * d } else { 2.0 * d };
        let detail = format!("{chains} chains × {dim} × {dim} covariances and factors");
        part(
            "the pilot's geometry and the kernels",
            detail,
            None,
            geometry * (1.0 + 2.0 * p) + kernel,
            2.0 * geometry,
            Opt::Chains,
        );
        if config.pilot > 0 {
            // Per chain: the accumulator, its answer, the first half's variances; shared: the
            // pooled moments and the geometry made from them.
            let moments = 1.0 + d + d * (d + 1.0) / 2.0;
            let detail = format!("{chains} chains × the mean and covariance of {dim} coordinates");
            let per_chain = (2.0 + p) * moments + 3.0 * d;
            part(
                "the pilot's running moments",
                detail,
                Some(Phase::Pilot),
                per_chain,
                moments + geometry + 2.0 * p * n * moments,
                Opt::Chains,
            );
        }
        match &config.tuning {
            Tuning::None => {}
            Tuning::Bo(bo) => {
                // Each chain's recorded rows, which move to the conductor; the score works on one
                // coordinate at a time, with the working copies of a summary (its ESS).
                let detail = format!("{chains} chains × {} steps × {dim} coordinates", bo.window);
                part(
                    "the trial windows",
                    detail,
                    Some(Phase::Tuning),
                    (1.0 + p) * w * d,
                    SUMMARY_COPIES * n * w + 2.0 * p * n * w * d,
                    Opt::Window,
                );
                let detail = format!(
                    "{SURROGATE_MATRICES} matrices of {} × {}, a row and a column per trial",
                    bo.trials, bo.trials
                );
                part("the surrogate", detail, Some(Phase::Tuning), 0.0, SURROGATE_MATRICES * t * t, Opt::Trials);
            }
            Tuning::Rm { .. } | Tuning::Am { .. } => {
                // Per chain: the proposal's factor, the scatter, and while refactorising, the
                // covariance, its matrix and its factor; and the answer with the covariance.
                let detail = format!("{chains} chains × 6 matrices of {dim} × {dim}");
                part(
                    "the adaptation",
                    detail,
                    Some(Phase::Adapting),
                    (6.0 + p) * d * d,
                    d * d + 2.0 * p * n * d * d,
                    Opt::Chains,
                );
            }
        }
        // The conductor's rows of draws (and in the page, their copy for JavaScript); each
        // chain's rows of one task.
        let task = (config.draws * columns).min(MAX_TASK_VALUES) as f64;
        let detail = format!("{chains} chains × {} draws × {columns} values", config.draws);
        part("the draws", detail, Some(Phase::Sampling), (1.0 + p) * task, (1.0 + p) * n * draws * c, Opt::Draws);
        let detail = format!("{SUMMARY_COPIES} working copies of one quantity's {chains} × {} draws", config.draws);
        part("summarising the draws", detail, Some(Phase::Sampling), 0.0, SUMMARY_COPIES * n * draws, Opt::Draws);
        if face == Face::Page {
            // Made in the engine's memory, then once more as a JavaScript string.
            let text = n * draws * (c * CSV_VALUE + CSV_ROW);
            let detail = format!("{chains} chains × {} rows of {columns} values", config.draws);
            part("the draws as CSV text", detail, Some(Phase::Sampling), 0.0, 2.0 * text / NUMBER, Opt::Draws);
        }
        let kept = NUMBER * (1.0 + p) * n * draws * c + p * n * draws * (c * CSV_VALUE + CSV_ROW);
        Estimate { chains, parts, kept }
    }

    /// What the runs of `plan` need: they run one after another, and the chosen run's draws
    /// (with, in the page, its texts) are kept while the others run.
    pub fn of_plan(plan: &Plan, shape: Shape, face: Face) -> Estimate {
        let mut largest = plan
            .runs
            .iter()
            .map(|config| Estimate::of(config, shape, face))
            .max_by(|a, b| a.peak().total_cmp(&b.peak()))
            .unwrap_or(Estimate { chains: 0, parts: Vec::new(), kept: 0.0 });
        if plan.runs.len() > 1 {
            let chosen = plan.config();
            largest.parts.push(Part {
                what: "the chosen method's draws, kept while the others run",
                detail: format!("{} chains × {} draws × {} values", chosen.chains, chosen.draws, shape.columns),
                phase: None,
                per_chain: 0.0,
                shared: Estimate::of(chosen, shape, face).kept,
                lowered_by: Opt::Draws,
            });
        }
        largest
    }

    /// Bytes of `part` in all.
    pub fn bytes(&self, part: &Part) -> f64 {
        self.chains as f64 * part.per_chain + part.shared
    }

    /// The phase whose parts, added to what is held throughout, make the peak (ties: the earlier).
    fn peak_phase(&self) -> Option<Phase> {
        let in_phase = |phase: Phase| self.parts.iter().filter(|p| p.phase == Some(phase)).map(|p| self.bytes(p)).sum();
        let mut best: Option<(Phase, f64)> = None;
        for phase in self.parts.iter().filter_map(|p| p.phase) {
            let bytes: f64 = in_phase(phase);
            if best.is_none_or(|(_, b)| bytes > b) {
                best = Some((phase, bytes));
            }
        }
        best.map(|(phase, _)| phase)
    }

    fn at_peak(&self) -> impl Iterator<Item = &Part> {
        let phase = self.peak_phase();
        self.parts.iter().filter(move |p| p.phase.is_none() || p.phase == phase)
    }

    /// Bytes at the run's peak, all chains and the conductor together.
    pub fn peak(&self) -> f64 {
        self.at_peak().map(|p| self.bytes(p)).sum()
    }

    /// Bytes each chain holds at the run's peak.
    pub fn per_chain(&self) -> f64 {
        self.at_peak().map(|p| p.per_chain).sum()
    }

    /// Whether the run fits in `limit` bytes; if not, what is too large.
    pub fn check(&self, limit: f64) -> Result<(), TooLarge> {
        let peak = self.peak();
        if peak <= limit {
            return Ok(());
        }
        let part = self.at_peak().max_by(|a, b| self.bytes(a).total_cmp(&self.bytes(b))).cloned();
        let part = part.unwrap_or_else(|| Part {
            what: "the run",
            detail: String::new(),
            phase: None,
            per_chain: 0.0,
            shared: peak,
            lowered_by: Opt::Draws,
        });
        Err(TooLarge { peak, per_chain: self.per_chain(), chains: self.chains, part_bytes: self.bytes(&part), part })
    }
}
