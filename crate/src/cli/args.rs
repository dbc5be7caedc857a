//! The command line as written: subcommands and flags, validated only for form.

use crate::kernel::Kind;
use crate::names::Named;
use crate::plan::{Method, Options};
use crate::tune::policy::Freeze;
use crate::tune::score::Score;
use clap::{Args, Parser, Subcommand};

#[derive(Parser, Debug)]
#[command(name = "mixwell", version, about = "Check a density model, tune a sampler, sample, and judge the draws.")]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Subcommand, Debug)]
pub enum Command {
    /// List a model's parameters, data and derived quantities, or say what is wrong with it.
    Check(CheckArgs),
    /// Evaluate the log density at one point given on the constrained scale.
    Density(DensityArgs),
    /// Tune a sampler, sample a model with several chains, and report diagnostics.
    Run(RunArgs),
    /// Print a link that carries a model and a run, for the page or `mixwell run --link`.
    Link(LinkArgs),
    /// Judge draws from CSV files made by any sampler: the same summary, diagnostics and
    /// warnings as `run`.
    Diagnose(super::diagnose::DiagnoseArgs),
}

#[derive(Args, Debug)]
pub struct CheckArgs {
    /// Model file, or `-` for standard input.
    pub model: String,
    /// Print machine-readable JSON.
    #[arg(long)]
    pub json: bool,
}

#[derive(Args, Debug)]
pub struct DensityArgs {
    /// Model file, or `-` for standard input.
    pub model: String,
    /// A parameter's value(s): NAME=VALUE or NAME=V1,V2,… for a vector; repeat for each parameter.
    #[arg(long = "at", value_name = "NAME=VALUE", required = true)]
    pub at: Vec<String>,
    /// Print machine-readable JSON.
    #[arg(long)]
    pub json: bool,
}

/// What fixes a run's draws, as written; the same flags make a link. Their meaning (defaults,
/// ranges, what applies to what) is [`Options::resolve`]'s, not this struct's.
#[derive(Args, Clone, Debug, Default)]
pub struct RunFlags {
    /// The kernel: random-walk Metropolis or slice sampling [default: rwm].
    #[arg(long, value_parser = choice::<Kind>())]
    pub sampler: Option<Kind>,
    /// Random-walk scale, multiplying the pilot's covariance factor [default: 2.38/√d].
    #[arg(long)]
    pub scale: Option<f64>,
    /// Random walk: 0 uses only the pilot's variances, 1 its full covariance [default: 1].
    #[arg(long)]
    pub blend: Option<f64>,
    /// Slice width in pilot standard deviations [default: 3].
    #[arg(long)]
    pub width: Option<f64>,
    /// Slice step-out limit, in widths [default: 20].
    #[arg(long)]
    pub stepout: Option<u64>,
    /// How to choose the kernel's settings before sampling: Bayesian optimisation, Robbins–Monro
    /// acceptance targeting, adaptive Metropolis, or none [default: bo, or none when a setting
    /// such as --scale or --width is given].
    #[arg(long, value_parser = choice::<Method>())]
    pub tune: Option<Method>,
    /// What a tuning trial is judged by [default: ess-per-eval for rwm, jump-per-eval for slice].
    #[arg(long, value_parser = choice::<Score>())]
    pub score: Option<Score>,
    /// Bayesian optimisation: number of trials; Robbins–Monro and adaptive Metropolis adapt for
    /// trials × window steps [default: 100].
    #[arg(long)]
    pub trials: Option<u64>,
    /// Bayesian optimisation: steps per chain in each trial [default: 100].
    #[arg(long)]
    pub window: Option<u64>,
    /// After tuning: the single best setting, or a fixed mixture of good ones [default: best].
    #[arg(long, value_parser = choice::<Freeze>())]
    pub freeze: Option<Freeze>,
    /// Number of chains [default: 4].
    #[arg(long)]
    pub chains: Option<u64>,
    /// Warm-up steps per chain, discarded [default: 1000].
    #[arg(long)]
    pub warmup: Option<u64>,
    /// Draws per chain, kept [default: 1000].
    #[arg(long)]
    pub draws: Option<u64>,
    /// Pilot sweeps per chain, used only to measure the target's scale [default: 200].
    #[arg(long)]
    pub pilot: Option<u64>,
    /// Seed for every random number of the run [default: a fresh one, which is reported].
    #[arg(long)]
    pub seed: Option<u64>,
}

impl RunFlags {
    /// The flags as run options.
    pub fn options(&self) -> Options {
        let RunFlags {
            sampler,
            scale,
            blend,
            width,
            stepout,
            tune,
            score,
            trials,
            window,
            freeze,
            chains,
            warmup,
            draws,
            pilot,
            seed,
        } = self.clone();
        Options {
            sampler,
            scale,
            blend,
            width,
            stepout,
            tune,
            score,
            trials,
            window,
            freeze,
            chains,
            warmup,
            draws,
            pilot,
            seed,
        }
    }
}

/// A flag whose values are the names of a closed set of choices.
fn choice<T: Named + Send + Sync>() -> impl clap::builder::TypedValueParser<Value = T> {
    use clap::builder::TypedValueParser as _;
    clap::builder::PossibleValuesParser::new(T::ALL.iter().map(|c| c.name())).try_map(|name| T::from_name(&name))
}

#[derive(Args, Debug)]
#[command(allow_negative_numbers = true)]
pub struct RunArgs {
    /// Model file, or `-` for standard input (not needed with --link).
    #[arg(required_unless_present = "link")]
    pub model: Option<String>,
    #[command(flatten)]
    pub options: RunFlags,
    /// Repeat the run a link carries (made by `mixwell link` or the page's share button).
    #[arg(long, value_name = "URL", conflicts_with = "model")]
    pub link: Option<String>,
    /// Also run every other tuning method that applies, with the same budget, and compare them.
    #[arg(long)]
    pub compare: bool,
    /// Autocorrelation is reported for lags 0 to this.
    #[arg(long, default_value_t = 20)]
    pub lags: usize,
    /// Write the JSON report to this file, or `-` for standard output (instead of the table).
    #[arg(long, value_name = "FILE|-")]
    pub json: Option<String>,
    /// Write the draws to this CSV file.
    #[arg(long, value_name = "FILE")]
    pub csv: Option<String>,
    /// Refuse runs that would need more memory than this many GiB at their peak (pilot, tuning
    /// trials, adaptation and draws together).
    #[arg(long, default_value_t = 2.0, value_name = "GIB")]
    pub max_memory: f64,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
}

#[derive(Args, Debug)]
#[command(allow_negative_numbers = true)]
pub struct LinkArgs {
    /// Model file, or `-` for standard input.
    pub model: String,
    #[command(flatten)]
    pub options: RunFlags,
    /// The address of the page the link opens.
    #[arg(long, default_value = "http://127.0.0.1:8000/", value_name = "URL")]
    pub page: String,
}

pub fn parse() -> Result<Cli, clap::Error> {
    Cli::try_parse()
}
