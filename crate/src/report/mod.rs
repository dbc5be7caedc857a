//! The results of a run as plain data: per-quantity summaries and diagnostics, per-chain
//! statistics, and warnings in plain words. Serialised as the JSON report; the command line
//! and the page only format it.
//!
//! The field names of the JSON report are a contract that other tools read; keep them stable.

mod draws;
mod text;

pub use draws::{ChainSource, DrawsReport, Layout};
pub use text::{draws_table, fixed, significant, table};

use crate::chain::conductor::{Collected, TuningRecord};
use crate::diag::{self, Summary};
use crate::kernel::Settings;
use crate::plan::Method;
use serde::Serialize;

/// Said in every report: what diagnostics can and cannot do.
pub const CAUTION: &str = "Diagnostics can reveal a problem but never prove convergence. \
Consequential analyses deserve review by a qualified statistician.";

/// Acceptance rates of random-walk Metropolis outside this band usually mean a badly scaled
/// proposal (common practice; the optimum is near 0.234 in many dimensions and 0.44 in one,
/// Roberts, Gelman & Gilks 1997; Gelman, Roberts & Gilks 1996).
pub const ACCEPTANCE_BAND: (f64, f64) = (0.1, 0.9);

#[derive(Clone, Debug, Serialize)]
pub struct Report {
    pub mixwell: &'static str,
    pub seed: u64,
    pub chains: usize,
    pub warmup: usize,
    pub draws: usize,
    /// The kernel that made the draws (after tuning, the frozen one).
    pub sampler: Settings,
    pub tuning: Option<TuningRecord>,
    /// Present when methods were compared (`--compare`).
    pub comparison: Option<Vec<Comparison>>,
    /// False when the run was stopped before all draws were made.
    pub complete: bool,
    pub parameters: Vec<Quantity>,
    pub derived: Vec<Quantity>,
    pub chain_stats: Vec<ChainReport>,
    /// Density evaluations: before sampling (pilot, warm-up) and while sampling, all chains.
    pub evaluations: Evaluations,
    pub warnings: Vec<String>,
    pub caution: &'static str,
}

#[derive(Clone, Debug, Serialize)]
pub struct Quantity {
    pub name: String,
    #[serde(flatten)]
    pub summary: Summary,
    /// Chain-combined autocorrelation at lags 0, 1, ….
    pub autocorrelation: Vec<f64>,
}

impl Quantity {
    /// The summary, diagnostics and autocorrelation (lags 0 to `lags`) of one quantity from its
    /// draws, one slice per chain, with the warnings they call for.
    pub fn of(name: &str, chains: &[&[f64]], lags: usize) -> (Quantity, Vec<String>) {
        let summary = diag::summarise(chains);
        let warnings = diag::warnings(name, &summary, chains.len(), &diag::Thresholds::default());
        (Quantity { name: name.to_string(), autocorrelation: diag::autocorrelation(chains, lags), summary }, warnings)
    }
}

#[derive(Clone, Debug, Serialize)]
pub struct ChainReport {
    /// 1-based, as printed.
    pub chain: usize,
    /// Share of random-walk proposals accepted, or of slice updates that moved.
    pub acceptance: f64,
    pub evals_per_draw: f64,
}

#[derive(Clone, Debug, Serialize)]
pub struct Evaluations {
    pub before_sampling: u64,
    pub sampling: u64,
}

impl Report {
    /// Summarise collected draws. `columns` are the tape's column names; the first `dim` are
    /// parameter elements, the rest derived quantities.
    pub fn new(collected: &Collected, columns: &[String], dim: usize, lags: usize) -> Report {
        let config = &collected.config;
        let width = columns.len();
        let mut warnings = Vec::new();
        let quantities: Vec<Quantity> = columns
            .iter()
            .enumerate()
            .map(|(c, name)| {
                let per_chain: Vec<Vec<f64>> =
                    collected.draws.iter().map(|rows| rows.iter().skip(c).step_by(width).copied().collect()).collect();
                let slices: Vec<&[f64]> = per_chain.iter().map(Vec::as_slice).collect();
                let (quantity, said) = Quantity::of(name, &slices, lags);
                warnings.extend(said);
                quantity
            })
            .collect();
        let chain_stats: Vec<ChainReport> = collected
            .stats
            .iter()
            .enumerate()
            .map(|(i, s)| ChainReport {
                chain: i + 1,
                acceptance: s.moves as f64 / s.proposals.max(1) as f64,
                evals_per_draw: s.evaluations as f64 / config.draws.max(1) as f64,
            })
            .collect();
        for (s, report) in collected.stats.iter().zip(&chain_stats) {
            if s.moves == 0 && s.proposals > 0 {
                warnings.push(format!(
                    "chain {} never moved while sampling: every proposal was rejected. The step is far too large, \
                     or the density is zero or undefined around where the chain stands.",
                    report.chain
                ));
            } else if s.proposals > 0
                && matches!(collected.settings, Settings::RandomWalk { .. })
                && !(ACCEPTANCE_BAND.0..=ACCEPTANCE_BAND.1).contains(&report.acceptance)
            {
                warnings.push(format!(
                    "chain {}: {:.0}% of proposals were accepted, outside {:.0}–{:.0}% (common practice for random-walk \
                     Metropolis; the optimum is near 23% in many dimensions, Roberts, Gelman & Gilks 1997). \
                     The scale is probably too {}.",
                    report.chain,
                    100.0 * report.acceptance,
                    100.0 * ACCEPTANCE_BAND.0,
                    100.0 * ACCEPTANCE_BAND.1,
                    if report.acceptance < ACCEPTANCE_BAND.0 {
                        "large"
                    } else {
                        "small — or the density is flat in some direction (an improper posterior: does every \
                         parameter have a prior?)"
                    }
                ));
            }
        }
        let mut quantities = quantities;
        let derived = quantities.split_off(dim.min(quantities.len()));
        Report {
            mixwell: env!("CARGO_PKG_VERSION"),
            seed: config.seed,
            chains: config.chains,
            warmup: config.warmup,
            draws: config.draws,
            sampler: collected.settings.clone(),
            tuning: collected.tuning.clone(),
            comparison: None,
            complete: collected.complete,
            parameters: quantities,
            derived,
            chain_stats,
            evaluations: Evaluations {
                before_sampling: collected.spent.before_sampling(),
                sampling: collected.stats.iter().map(|s| s.evaluations).sum(),
            },
            warnings,
            caution: CAUTION,
        }
    }

    /// The smallest bulk-ESS over the parameters.
    pub fn min_bulk_ess(&self) -> f64 {
        self.parameters.iter().map(|q| q.summary.bulk_ess).fold(f64::INFINITY, f64::min)
    }
}

/// One method's line in a comparison: what it froze and what that bought.
#[derive(Clone, Debug, Serialize, serde::Deserialize)]
pub struct Comparison {
    pub method: Method,
    pub settings: Settings,
    /// Mean over chains.
    pub acceptance: f64,
    /// Smallest bulk-ESS over the parameters per density evaluation while sampling.
    pub bulk_ess_per_eval: f64,
    /// Smallest bulk-ESS over the parameters per second of sampling (wall clock; varies
    /// between machines and runs).
    pub min_bulk_ess_per_second: f64,
    /// Largest R-hat over the parameters.
    pub rhat: f64,
    /// Density evaluations spent tuning (all chains).
    pub tuning_evaluations: u64,
}

impl Comparison {
    pub fn of(method: Method, report: &Report, sampling_seconds: f64) -> Comparison {
        let chains = report.chain_stats.len().max(1) as f64;
        Comparison {
            method,
            settings: report.sampler.clone(),
            acceptance: report.chain_stats.iter().map(|c| c.acceptance).sum::<f64>() / chains,
            bulk_ess_per_eval: report.min_bulk_ess() / report.evaluations.sampling.max(1) as f64,
            min_bulk_ess_per_second: report.min_bulk_ess() / sampling_seconds.max(1e-9),
            rhat: report.parameters.iter().map(|q| q.summary.rhat).fold(f64::NEG_INFINITY, f64::max),
            tuning_evaluations: report.tuning.as_ref().map_or(0, |t| t.evaluations),
        }
    }
}

/// The draws as CSV (RFC 4180): `chain,iteration,` then one column per parameter element and
/// derived quantity. Matrix elements such as `m[1,2]` contain a comma and are quoted.
pub fn csv(collected: &Collected, columns: &[String]) -> String {
    let mut out = Vec::new();
    // Writing into memory cannot fail, and every piece written is UTF-8.
    let _ = write_csv(collected, columns, &mut out);
    String::from_utf8(out).unwrap_or_default()
}

/// [`csv`], written to `out` as it is made (so a file of draws needs no copy of it in memory).
pub fn write_csv(
    collected: &Collected,
    columns: &[String],
    out: &mut (impl std::io::Write + ?Sized),
) -> std::io::Result<()> {
    let width = columns.len();
    let header: Vec<String> =
        columns.iter().map(|c| if c.contains(',') { format!("\"{c}\"") } else { c.clone() }).collect();
    writeln!(out, "chain,iteration,{}", header.join(","))?;
    for (chain, rows) in collected.draws.iter().enumerate() {
        for (i, row) in rows.chunks_exact(width).enumerate() {
            write!(out, "{},{}", chain + 1, i + 1)?;
            for v in row {
                write!(out, ",{v}")?;
            }
            out.write_all(b"\n")?;
        }
    }
    Ok(())
}
