//! The command line as written: subcommands and flags, validated only for form.

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
    /// Sample a model with several chains and report diagnostics.
    Run(RunArgs),
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

#[derive(Args, Debug)]
#[command(allow_negative_numbers = true)]
pub struct RunArgs {
    /// Model file, or `-` for standard input.
    pub model: String,
    /// The kernel: random-walk Metropolis or slice sampling.
    #[arg(long, value_enum, default_value = "rwm")]
    pub sampler: SamplerKind,
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
    pub stepout: Option<u32>,
    /// How to choose the kernel's settings before sampling: Bayesian optimisation, Robbins–Monro
    /// acceptance targeting, adaptive Metropolis, or none [default: bo, or none when a setting
    /// such as --scale or --width is given].
    #[arg(long, value_enum)]
    pub tune: Option<TuneMethod>,
    /// Also run every other method that applies, with the same budget, and compare them.
    #[arg(long)]
    pub compare: bool,
    /// What a tuning trial is judged by.
    #[arg(long, value_enum, default_value = "ess-per-eval")]
    pub score: ScoreKind,
    /// Bayesian optimisation: number of trials.
    #[arg(long, default_value_t = 100)]
    pub trials: usize,
    /// Bayesian optimisation: steps per chain in each trial.
    #[arg(long, default_value_t = 100)]
    pub window: usize,
    /// After tuning: the single best setting, or a fixed mixture of good ones.
    #[arg(long, value_enum, default_value = "best")]
    pub freeze: FreezeKind,
    /// Number of chains.
    #[arg(long, default_value_t = 4)]
    pub chains: usize,
    /// Warm-up steps per chain, discarded.
    #[arg(long, default_value_t = 1000)]
    pub warmup: usize,
    /// Draws per chain, kept.
    #[arg(long, default_value_t = 1000)]
    pub draws: usize,
    /// Pilot sweeps per chain, used only to measure the target's scale.
    #[arg(long, default_value_t = 200)]
    pub pilot: usize,
    /// Seed for every random number of the run [default: a fresh one, which is reported].
    #[arg(long)]
    pub seed: Option<u64>,
    /// Autocorrelation is reported for lags 0 to this.
    #[arg(long, default_value_t = 20)]
    pub lags: usize,
    /// Write the JSON report to this file, or `-` for standard output (instead of the table).
    #[arg(long, value_name = "FILE|-")]
    pub json: Option<String>,
    /// Write the draws to this CSV file.
    #[arg(long, value_name = "FILE")]
    pub csv: Option<String>,
    /// Refuse runs whose draws would need more memory than this many GiB.
    #[arg(long, default_value_t = 2.0, value_name = "GIB")]
    pub max_memory: f64,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
}

#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum TuneMethod {
    Bo,
    Rm,
    Am,
    None,
}

#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum ScoreKind {
    Acf,
    EssPerEval,
}

#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum FreezeKind {
    Best,
    Mixture,
}

#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum SamplerKind {
    Rwm,
    Slice,
}

pub fn parse() -> Result<Cli, clap::Error> {
    Cli::try_parse()
}
