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

pub fn parse() -> Result<Cli, clap::Error> {
    Cli::try_parse()
}
