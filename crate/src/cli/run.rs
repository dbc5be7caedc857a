//! `mixwell run`: tune, sample, then print the summary and write the report and draws.

use super::args::RunArgs;
use super::{Failure, load, write_file};
use crate::chain::conductor::{Collected, Progress};
use crate::chain::threads;
use crate::names::Named;
use crate::plan::{Estimate, Face, Phase, Plan, PlanError, RunConfig, Shape};
use crate::report::{self, Comparison, Report};
use crate::tape::Tape;
use std::io::IsTerminal;
use std::time::Instant;

const GIB: f64 = (1u64 << 30) as f64;

impl From<PlanError> for Failure {
    /// The message, after the flag at fault: `--chains: the number of chains must be …`.
    fn from(error: PlanError) -> Failure {
        match error.option {
            Some(option) => Failure(format!("--{}: {}", option.name(), error.message)),
            None => Failure(error.message),
        }
    }
}

pub fn run(args: &RunArgs) -> Result<String, Failure> {
    if !(args.max_memory.is_finite() && args.max_memory > 0.0) {
        return Err(format!("--max-memory must be a positive number of GiB, not {}", args.max_memory).into());
    }
    let (name, tape, plan) = match &args.link {
        Some(link) => {
            if args.options.options().any() {
                return Err("--link fixes the whole run: drop the other run options (--seed, --draws, …)".into());
            }
            let shared = crate::link::decode(link)?;
            let model = crate::model::check(&shared.model).map_err(|d| Failure(d.render("<link>", &shared.model)))?;
            let tape = Tape::new(&model);
            let plan = Plan::of_config(shared.run, tape.dim(), args.compare)?;
            ("<link>".to_string(), tape, plan)
        }
        None => {
            let (name, _, model) = load(args.model.as_deref().unwrap_or("-"))?;
            let tape = Tape::new(&model);
            let plan = Plan::new(&args.options.options(), tape.dim(), args.compare)?;
            (name, tape, plan)
        }
    };
    guard_memory(&plan, Shape::of(&tape), args.max_memory)?;
    let bar = progress_bar(args.quiet);
    let compare = plan.runs.len() > 1;
    let mut primary = None;
    let mut rows = Vec::new();
    for (i, config) in plan.runs.into_iter().enumerate() {
        let method = config.tuning.method();
        let (collected, seconds) = execute(&tape, config, &bar)?;
        let report = Report::new(&collected, tape.columns(), tape.dim(), args.lags);
        rows.push(Comparison::of(method, &report, seconds));
        if i == plan.chosen {
            primary = Some((collected, report));
        }
    }
    bar.finish();
    let (collected, mut report) = primary.ok_or("the chosen run did not take place")?;
    if compare {
        report.comparison = Some(rows);
    }
    if let Some(path) = &args.csv {
        write_file(path, |out| report::write_csv(&collected, tape.columns(), out))?;
    }
    let json = serde_json::to_string_pretty(&report)? + "\n";
    match args.json.as_deref() {
        Some("-") => Ok(json),
        Some(path) => {
            write_file(path, |out| out.write_all(json.as_bytes()))?;
            Ok(report::table(&report, &name))
        }
        None => Ok(report::table(&report, &name)),
    }
}

/// Refuse, before anything is allocated, runs whose peak would exceed `max_gib`.
fn guard_memory(plan: &Plan, shape: Shape, max_gib: f64) -> Result<(), Failure> {
    Estimate::of_plan(plan, shape, Face::Native).check(max_gib * GIB).map_err(|too_large| {
        Failure(format!(
            "{}; lower --{}, or raise --max-memory if you mean it",
            too_large.message(&format!("--max-memory {max_gib}")),
            too_large.part.lowered_by.name()
        ))
    })
}

/// Write a file through a buffer, naming it in any error.
/// One run, and the seconds its sampling phase took (wall clock).
fn execute(tape: &Tape, config: RunConfig, bar: &Bar) -> Result<(Collected, f64), Failure> {
    let mut sampling_started: Option<Instant> = None;
    let mut seconds = 0.0;
    let collected = threads::run(tape, config, |p: &Progress| {
        bar.show(p.phase, p.done, p.total);
        match p.phase {
            Phase::Sampling if sampling_started.is_none() => sampling_started = Some(Instant::now()),
            Phase::Done => seconds = sampling_started.map_or(0.0, |t| t.elapsed().as_secs_f64()),
            _ => {}
        }
    })?;
    Ok((collected, seconds))
}

/// A progress bar on standard error, shown only when it is a terminal.
struct Bar(Option<indicatif::ProgressBar>);

fn progress_bar(quiet: bool) -> Bar {
    if quiet || !std::io::stderr().is_terminal() {
        return Bar(None);
    }
    let bar = indicatif::ProgressBar::new(0);
    if let Ok(style) = indicatif::ProgressStyle::with_template("{msg:>9} [{bar:40}] {pos}/{len}") {
        bar.set_style(style.progress_chars("=> "));
    }
    Bar(Some(bar))
}

impl Bar {
    fn show(&self, phase: Phase, done: usize, total: usize) {
        if let Some(bar) = &self.0 {
            bar.set_message(phase.name());
            bar.set_length(total as u64);
            bar.set_position(done as u64);
        }
    }

    fn finish(&self) {
        if let Some(bar) = &self.0 {
            bar.finish_and_clear();
        }
    }
}
