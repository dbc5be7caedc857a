//! `mixwell run`: sample, then print the summary and write the report and draws.

use super::args::{RunArgs, SamplerKind};
use super::{Failure, load};
use crate::chain::conductor::RunConfig;
use crate::chain::threads;
use crate::kernel::Settings;
use crate::report::{self, Report};
use crate::rng::Stream;
use crate::tape::Tape;
use std::io::IsTerminal;

/// Most chains a run may have.
pub const MAX_CHAINS: usize = 64;
/// Fewest draws per chain: split R-hat needs two halves of at least two.
pub const MIN_DRAWS: usize = 4;

pub fn run(args: &RunArgs) -> Result<String, Failure> {
    let (name, _, model) = load(&args.model)?;
    let tape = Tape::new(&model);
    let config = config(args, tape.dim(), tape.columns().len())?;
    let bar = progress_bar(args.quiet);
    let collected = threads::run(&tape, config, |p| bar.show(p.phase, p.done, p.total))?;
    bar.finish();
    let report = Report::new(&collected, tape.columns(), tape.dim(), args.lags);
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

/// Turn the flags into a run configuration, refusing what cannot work.
fn config(args: &RunArgs, dim: usize, columns: usize) -> Result<RunConfig, Failure> {
    if args.chains == 0 || args.chains > MAX_CHAINS {
        return Err(format!("--chains must be from 1 to {MAX_CHAINS}, not {}", args.chains).into());
    }
    if args.draws < MIN_DRAWS {
        return Err(format!("--draws must be at least {MIN_DRAWS} per chain, not {}", args.draws).into());
    }
    // Draws are held once as rows and once more, column by column, while summarising.
    let bytes = 2.0 * 8.0 * args.draws as f64 * args.chains as f64 * columns as f64;
    let gib = bytes / (1u64 << 30) as f64;
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
    Ok(RunConfig {
        chains: args.chains,
        warmup: args.warmup,
        draws: args.draws,
        seed: args.seed.unwrap_or_else(Stream::entropy_seed),
        pilot: args.pilot,
        settings,
    })
}

/// A progress bar on standard error, shown only when it is a terminal.
struct Bar(Option<indicatif::ProgressBar>);

fn progress_bar(quiet: bool) -> Bar {
    if quiet || !std::io::stderr().is_terminal() {
        return Bar(None);
    }
    let bar = indicatif::ProgressBar::new(0);
    if let Ok(style) = indicatif::ProgressStyle::with_template("{msg:>9} [{bar:40}] {pos}/{len} steps per chain") {
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
