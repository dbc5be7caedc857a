//! `mixwell run`: tune, sample, then print the summary and write the report and draws.

use super::args::{FreezeKind, RunArgs, SamplerKind, ScoreKind, TuneMethod};
use super::{Failure, load};
use crate::chain::conductor::{Collected, Progress, RunConfig, Tuning};
use crate::chain::threads;
use crate::kernel::Settings;
use crate::report::{self, Comparison, Report};
use crate::rng::Stream;
use crate::tape::Tape;
use crate::tune::policy::{BoConfig, Freeze};
use crate::tune::score::Score;
use std::io::IsTerminal;
use std::time::Instant;

/// Most chains a run may have.
pub const MAX_CHAINS: usize = 64;
/// Fewest draws per chain: split R-hat needs two halves of at least two.
pub const MIN_DRAWS: usize = 4;
/// Most tuning trials, and most steps in one trial window.
pub const MAX_TRIALS: usize = 10_000;
pub const MAX_WINDOW: usize = 100_000;

pub fn run(args: &RunArgs) -> Result<String, Failure> {
    let (name, _, model) = load(&args.model)?;
    let tape = Tape::new(&model);
    let config = config(args, tape.dim(), tape.columns().len())?;
    let bar = progress_bar(args.quiet);
    let (collected, mut report) = if args.compare {
        let bo = bo_config(args);
        let mut primary = None;
        let mut rows = Vec::new();
        for method in Tuning::alternatives(&config.settings, &bo) {
            let name = method.name();
            let chosen = name == config.tuning.name();
            let (collected, seconds) = execute(&tape, RunConfig { tuning: method, ..config.clone() }, &bar)?;
            let report = Report::new(&collected, tape.columns(), tape.dim(), args.lags);
            rows.push(Comparison::of(name, &report, seconds));
            if chosen {
                primary = Some((collected, report));
            }
        }
        let (collected, mut report) = primary.ok_or("--compare: the chosen method does not apply")?;
        report.comparison = Some(rows);
        (collected, report)
    } else {
        let (collected, _) = execute(&tape, config, &bar)?;
        let report = Report::new(&collected, tape.columns(), tape.dim(), args.lags);
        (collected, report)
    };
    bar.finish();
    report.warnings.dedup();
    if let Some(path) = &args.csv {
        std::fs::write(path, report::csv(&collected, tape.columns()))
            .map_err(|e| format!("cannot write `{path}`: {e}"))?;
    }
    let json = serde_json::to_string_pretty(&report)? + "\n";
    match args.json.as_deref() {
        Some("-") => Ok(json),
        Some(path) => {
            std::fs::write(path, json).map_err(|e| format!("cannot write `{path}`: {e}"))?;
            Ok(report::table(&report, &name))
        }
        None => Ok(report::table(&report, &name)),
    }
}

/// One run, and the seconds its sampling phase took (wall clock).
fn execute(tape: &Tape, config: RunConfig, bar: &Bar) -> Result<(Collected, f64), Failure> {
    let mut sampling_started: Option<Instant> = None;
    let mut seconds = 0.0;
    let collected = threads::run(tape, config, |p: &Progress| {
        bar.show(p.phase, p.done, p.total);
        match p.phase {
            "sampling" if sampling_started.is_none() => sampling_started = Some(Instant::now()),
            "done" => seconds = sampling_started.map_or(0.0, |t| t.elapsed().as_secs_f64()),
            _ => {}
        }
    })?;
    Ok((collected, seconds))
}

fn bo_config(args: &RunArgs) -> BoConfig {
    BoConfig {
        score: match args.score {
            ScoreKind::Acf => Score::Acf,
            ScoreKind::EssPerEval => Score::EssPerEval,
        },
        trials: args.trials,
        window: args.window,
        freeze: match args.freeze {
            FreezeKind::Best => Freeze::Best,
            FreezeKind::Mixture => Freeze::Mixture,
        },
    }
}

/// Turn the flags into a run configuration, refusing what cannot work.
fn config(args: &RunArgs, dim: usize, columns: usize) -> Result<RunConfig, Failure> {
    if args.chains == 0 || args.chains > MAX_CHAINS {
        return Err(format!("--chains must be from 1 to {MAX_CHAINS}, not {}", args.chains).into());
    }
    if args.draws < MIN_DRAWS {
        return Err(format!("--draws must be at least {MIN_DRAWS} per chain, not {}", args.draws).into());
    }
    if !(1..=MAX_TRIALS).contains(&args.trials) {
        return Err(format!("--trials must be from 1 to {MAX_TRIALS}, not {}", args.trials).into());
    }
    if !(4..=MAX_WINDOW).contains(&args.window) {
        return Err(format!("--window must be from 4 to {MAX_WINDOW} steps, not {}", args.window).into());
    }
    // Draws are held once as rows and once more, column by column, while summarising.
    let bytes = 2.0 * 8.0 * args.draws as f64 * args.chains as f64 * columns as f64;
    let gib = bytes / (1u64 << 30) as f64;
    if !(args.max_memory.is_finite() && args.max_memory > 0.0) {
        return Err(format!("--max-memory must be a positive number of GiB, not {}", args.max_memory).into());
    }
    if gib > args.max_memory {
        return Err(format!(
            "this run would need about {gib:.1} GiB for its draws ({} chains × {} draws × {columns} values), more than \
             --max-memory {}; raise --max-memory if you mean it",
            args.chains, args.draws, args.max_memory
        )
        .into());
    }
    let (kind, other) = match args.sampler {
        SamplerKind::Rwm => ("rwm", [("--width", args.width.is_some()), ("--stepout", args.stepout.is_some())]),
        SamplerKind::Slice => ("slice", [("--scale", args.scale.is_some()), ("--blend", args.blend.is_some())]),
    };
    if let Some((flag, _)) = other.iter().find(|(_, given)| *given) {
        return Err(format!("{flag} does not apply to --sampler {kind}").into());
    }
    let given = args.scale.is_some() || args.blend.is_some() || args.width.is_some() || args.stepout.is_some();
    let settings = match Settings::default_for(kind, dim) {
        Settings::RandomWalk { scale, blend } => {
            Settings::RandomWalk { scale: args.scale.unwrap_or(scale), blend: args.blend.unwrap_or(blend) }
        }
        Settings::Slice { width, stepout } => {
            Settings::Slice { width: args.width.unwrap_or(width), stepout: args.stepout.unwrap_or(stepout) }
        }
        other => other,
    };
    settings.validate()?;
    let method = args.tune.unwrap_or(if given { TuneMethod::None } else { TuneMethod::Bo });
    let budget = args.trials * args.window;
    let tuning = match method {
        TuneMethod::Bo => Tuning::Bo(bo_config(args)),
        TuneMethod::None => Tuning::None,
        TuneMethod::Rm | TuneMethod::Am if kind == "slice" => {
            return Err("--tune rm and --tune am adapt a random walk; use them with --sampler rwm".into());
        }
        TuneMethod::Rm => Tuning::Rm { steps: budget },
        TuneMethod::Am => Tuning::Am { steps: budget },
    };
    Ok(RunConfig {
        chains: args.chains,
        warmup: args.warmup,
        draws: args.draws,
        seed: args.seed.unwrap_or_else(Stream::entropy_seed),
        pilot: args.pilot,
        settings,
        tuning,
    })
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
    fn show(&self, phase: &str, done: usize, total: usize) {
        if let Some(bar) = &self.0 {
            bar.set_message(phase.to_string());
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
