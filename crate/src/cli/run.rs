//! `mixwell run`: tune, sample, then print the summary and write the report and draws.

use super::args::{FreezeKind, RunArgs, RunOptions, SamplerKind, ScoreKind, TuneMethod};
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

pub fn run(args: &RunArgs) -> Result<String, Failure> {
    let (name, tape, config) = match &args.link {
        Some(link) => {
            if args.options.any() {
                return Err("--link fixes the whole run: drop the other run options (--seed, --draws, …)".into());
            }
            let shared = crate::link::decode(link)?;
            let model = crate::model::check(&shared.model).map_err(|d| Failure(d.render("<link>", &shared.model)))?;
            ("<link>".to_string(), Tape::new(&model), shared.run)
        }
        None => {
            let (name, _, model) = load(args.model.as_deref().unwrap_or("-"))?;
            let tape = Tape::new(&model);
            let config = build_config(&args.options, tape.dim())?;
            (name, tape, config)
        }
    };
    if !(args.max_memory.is_finite() && args.max_memory > 0.0) {
        return Err(format!("--max-memory must be a positive number of GiB, not {}", args.max_memory).into());
    }
    let gib = config.draw_bytes(tape.columns().len()) / (1u64 << 30) as f64;
    if gib > args.max_memory {
        return Err(format!(
            "this run would need about {gib:.1} GiB for its draws ({} chains × {} draws × {} values), more than \
             --max-memory {}; raise --max-memory if you mean it",
            config.chains,
            config.draws,
            tape.columns().len(),
            args.max_memory
        )
        .into());
    }
    let bar = progress_bar(args.quiet);
    let (collected, report) = if args.compare {
        let bo = match &config.tuning {
            Tuning::Bo(bo) => bo.clone(),
            _ => match build_config(&RunOptions { tune: Some(TuneMethod::Bo), ..args.options.clone() }, tape.dim())?
                .tuning
            {
                Tuning::Bo(bo) => bo,
                _ => BoConfig::default(),
            },
        };
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
    if let Some(path) = &args.csv {
        super::write_file(path, &report::csv(&collected, tape.columns()))?;
    }
    let json = serde_json::to_string_pretty(&report)? + "\n";
    match args.json.as_deref() {
        Some("-") => Ok(json),
        Some(path) => {
            super::write_file(path, &json)?;
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

/// Turn the run flags into a validated run configuration for a model with `dim` coordinates:
/// the defaults of [`RunConfig::default_for`], overridden by what was given.
pub fn build_config(options: &RunOptions, dim: usize) -> Result<RunConfig, Failure> {
    let kind = match options.sampler.unwrap_or(SamplerKind::Rwm) {
        SamplerKind::Rwm => "rwm",
        SamplerKind::Slice => "slice",
    };
    let not_for = if kind == "rwm" {
        [("--width", options.width.is_some()), ("--stepout", options.stepout.is_some())]
    } else {
        [("--scale", options.scale.is_some()), ("--blend", options.blend.is_some())]
    };
    if let Some((flag, _)) = not_for.iter().find(|(_, given)| *given) {
        return Err(format!("{flag} does not apply to --sampler {kind}").into());
    }
    let given =
        options.scale.is_some() || options.blend.is_some() || options.width.is_some() || options.stepout.is_some();
    let tune = match options.tune {
        Some(TuneMethod::Bo) => "bo",
        Some(TuneMethod::Rm) => "rm",
        Some(TuneMethod::Am) => "am",
        Some(TuneMethod::None) => "none",
        None if given => "none",
        None => "bo",
    };
    let seed = options.seed.unwrap_or_else(Stream::entropy_seed);
    let mut config = RunConfig::default_for(kind, tune, dim, seed)?;
    match &mut config.settings {
        Settings::RandomWalk { scale, blend } => {
            *scale = options.scale.unwrap_or(*scale);
            *blend = options.blend.unwrap_or(*blend);
        }
        Settings::Slice { width, stepout } => {
            *width = options.width.unwrap_or(*width);
            *stepout = options.stepout.unwrap_or(*stepout);
        }
        Settings::Mixture { .. } => {}
    }
    let default = BoConfig::default();
    let (trials, window) = (options.trials.unwrap_or(default.trials), options.window.unwrap_or(default.window));
    match &mut config.tuning {
        Tuning::Bo(bo) => {
            *bo = BoConfig {
                score: match options.score {
                    Some(ScoreKind::Acf) => Score::Acf,
                    Some(ScoreKind::EssPerEval) => Score::EssPerEval,
                    Some(ScoreKind::JumpPerEval) => Score::JumpPerEval,
                    None => bo.score,
                },
                trials,
                window,
                freeze: match options.freeze {
                    Some(FreezeKind::Mixture) => Freeze::Mixture,
                    Some(FreezeKind::Best) | None => Freeze::Best,
                },
            }
        }
        Tuning::Rm { steps } | Tuning::Am { steps } => *steps = trials.saturating_mul(window),
        Tuning::None => {}
    }
    config.chains = options.chains.unwrap_or(config.chains);
    config.warmup = options.warmup.unwrap_or(config.warmup);
    config.draws = options.draws.unwrap_or(config.draws);
    config.pilot = options.pilot.unwrap_or(config.pilot);
    config.validate()?;
    Ok(config)
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
