//! Helpers shared by the statistical tests: compile a model, run chains, pull out one column.
#![allow(dead_code)]

use mixwell::chain::conductor::Collected;
use mixwell::chain::threads;
use mixwell::kernel::{Kind, Settings};
use mixwell::model::check;
use mixwell::plan::{RunConfig, Tuning};
use mixwell::tape::Tape;

pub fn compile(source: &str) -> Tape {
    Tape::new(&check(source).unwrap_or_else(|d| panic!("{}", d.render("test model", source))))
}

pub fn sample(tape: &Tape, settings: Settings, chains: usize, warmup: usize, draws: usize, seed: u64) -> Collected {
    let config = RunConfig { chains, warmup, draws, seed, pilot: 200, settings, tuning: Tuning::None };
    threads::run(tape, config, |_| {}).expect("chains start")
}

/// One column of the draws, per chain.
pub fn column(tape: &Tape, collected: &Collected, name: &str) -> Vec<Vec<f64>> {
    let width = tape.columns().len();
    let c = tape.columns().iter().position(|n| n == name).unwrap_or_else(|| panic!("no column {name}"));
    collected.draws.iter().map(|rows| rows.iter().skip(c).step_by(width).copied().collect()).collect()
}

pub fn slices(columns: &[Vec<f64>]) -> Vec<&[f64]> {
    columns.iter().map(Vec::as_slice).collect()
}

/// The kernels every statistical test runs: both defaults and a fixed mixture of the two.
pub fn kernels(dim: usize) -> Vec<(&'static str, Settings)> {
    let rwm = Settings::default_for(Kind::RandomWalk, dim);
    let slice = Settings::default_for(Kind::Slice, dim);
    vec![
        ("random walk", rwm.clone()),
        ("slice", slice.clone()),
        ("mixture", Settings::Mixture { components: vec![(rwm, 2.0), (slice, 1.0)] }),
    ]
}
