//! How fast the two kernels sample at their default settings, untuned, natively.
//!
//! Run: `cargo bench -p mixwell --bench sampling` (about a minute on 2 cores), or with `-- --quick`
//! for one repetition instead of three. For each benchmark model and kernel it makes a whole run
//! (4 chains, one thread each, fixed seed, pilot and warm-up as the command line does) and times
//! the sampling phase only, taking the fastest of the repetitions (the draws are the same every
//! time; only the clock varies, and on a shared machine other work only ever slows it down). It prints draws per second, the smallest bulk-ESS over the
//! parameters per second and density evaluations per draw, and baselines measured in the same
//! run: slice ÷ random walk in ESS per second; the time per evaluation of the bare density on one
//! thread and inside one chain driven directly in a single task (the difference is the kernel's
//! own work); and the speed-up of the threaded run over that one chain, in evaluations per second
//! (at best min(chains, cores); less means thread hand-offs, or other load on the machine).

use mixwell::chain::conductor::Progress;
use mixwell::chain::{Chain, Moments, Record, Task, threads};
use mixwell::diag;
use mixwell::kernel::{Kind, Settings};
use mixwell::model::check;
use mixwell::plan::{Phase, RunConfig, Tuning};
use mixwell::rng::Stream;
use mixwell::tape::Tape;
use std::hint::black_box;
use std::time::Instant;

mod models;

const CHAINS: usize = 4;
const SEED: u64 = 2024;
const PILOT: usize = 200;
const WARMUP: usize = 1000;
/// Draws per chain: enough for a minimum bulk-ESS in the thousands on these models, which puts
/// the noise of the ESS estimate at a few per cent (Vehtari et al. 2021).
const RW_DRAWS: usize = 20_000;
const SLICE_DRAWS: usize = 4_000;

struct Measured {
    seconds: f64,
    min_ess: f64,
    evaluations: u64,
}

fn main() {
    let quick = std::env::args().any(|a| a == "--quick") || std::env::var_os("MIXWELL_BENCH_QUICK").is_some();
    let repetitions = if quick { 1 } else { 3 };
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    println!(
        "sampling, default settings, no tuning: {CHAINS} chains on {cores} cores, seed {SEED}, {RW_DRAWS} (random \
         walk) / {SLICE_DRAWS} (slice) draws per chain, fastest of {repetitions} timings"
    );
    println!(
        "{:<44} {:<12} {:>10} {:>9} {:>10} {:>11} {:>14} {:>10} {:>10} {:>9}",
        "model",
        "kernel",
        "draws/s",
        "min ESS",
        "ESS/s",
        "evals/draw",
        "slice÷rw ESS/s",
        "µs/ev bare",
        "µs/ev chain",
        "speed-up"
    );
    for bench in models::all() {
        let tape =
            Tape::new(&check(&bench.source).unwrap_or_else(|d| panic!("{}", d.render(bench.name, &bench.source))));
        let bare = fastest(repetitions, || bare_seconds_per_evaluation(&tape));
        let mut rw_ess_per_second = f64::NAN;
        for (kind, draws) in [(Kind::RandomWalk, RW_DRAWS), (Kind::Slice, SLICE_DRAWS)] {
            let settings = Settings::default_for(kind, tape.dim());
            let mut runs: Vec<Measured> = (0..repetitions).map(|_| sample(&tape, settings.clone(), draws)).collect();
            runs.sort_by(|a, b| a.seconds.total_cmp(&b.seconds));
            let m = &runs[0];
            let total_draws = (CHAINS * draws) as f64;
            let ess_per_second = m.min_ess / m.seconds;
            let versus = if kind == Kind::RandomWalk {
                rw_ess_per_second = ess_per_second;
                "1".to_string()
            } else {
                format!("{:.2}", ess_per_second / rw_ess_per_second)
            };
            let direct = fastest(repetitions, || direct_seconds_per_evaluation(&tape, settings.clone(), draws));
            println!(
                "{:<44} {:<12} {:>10.0} {:>9.0} {:>10.0} {:>11.2} {:>14} {:>10.3} {:>10.3} {:>9.2}",
                bench.name,
                if kind == Kind::RandomWalk { "random walk" } else { "slice" },
                total_draws / m.seconds,
                m.min_ess,
                ess_per_second,
                m.evaluations as f64 / total_draws,
                versus,
                1e6 * bare,
                1e6 * direct,
                m.evaluations as f64 / m.seconds * direct
            );
        }
    }
}

/// One whole run; the seconds of its sampling phase, its smallest bulk-ESS over the parameters,
/// and the evaluations made while sampling.
fn sample(tape: &Tape, settings: Settings, draws: usize) -> Measured {
    let config =
        RunConfig { chains: CHAINS, warmup: WARMUP, draws, seed: SEED, pilot: PILOT, settings, tuning: Tuning::None };
    let mut started: Option<Instant> = None;
    let mut seconds = 0.0;
    let collected = threads::run(tape, config, |p: &Progress| match p.phase {
        Phase::Sampling if started.is_none() => started = Some(Instant::now()),
        Phase::Done => seconds = started.map_or(0.0, |t| t.elapsed().as_secs_f64()),
        _ => {}
    })
    .expect("chains start");
    let width = tape.columns().len();
    let min_ess = (0..tape.dim())
        .map(|c| {
            let columns: Vec<Vec<f64>> =
                collected.draws.iter().map(|rows| rows.iter().skip(c).step_by(width).copied().collect()).collect();
            let slices: Vec<&[f64]> = columns.iter().map(Vec::as_slice).collect();
            diag::bulk_ess(&slices)
        })
        .fold(f64::INFINITY, f64::min);
    Measured { seconds, min_ess, evaluations: collected.stats.iter().map(|s| s.evaluations).sum() }
}

/// The smallest of `n` timings.
fn fastest(n: usize, mut time: impl FnMut() -> f64) -> f64 {
    (0..n).map(|_| time()).fold(f64::INFINITY, f64::min)
}

/// Seconds per evaluation inside one chain that runs `draws` steps as a single task on this
/// thread, after the same pilot and warm-up as chain 1 of the threaded run.
fn direct_seconds_per_evaluation(tape: &Tape, settings: Settings, draws: usize) -> f64 {
    let mut chain = Chain::new(tape, SEED, 0).expect("the chain starts");
    let pilot = chain.perform(tape, &Task::Pilot { sweeps: PILOT }).rows;
    let geometry = Moments::pooled(&[pilot.as_slice()], tape.dim()).geometry();
    chain.perform(tape, &Task::Configure { settings, geometry });
    chain.perform(tape, &Task::Run { steps: WARMUP, record: Record::Nothing });
    let start = Instant::now();
    let out = chain.perform(tape, &Task::Run { steps: draws, record: Record::Draws });
    start.elapsed().as_secs_f64() / out.evaluations as f64
}

/// Seconds per evaluation of the bare log density on one thread, over about 0.2 s.
fn bare_seconds_per_evaluation(tape: &Tape) -> f64 {
    let mut rng = Stream::new(1, 0);
    let points: Vec<Vec<f64>> = (0..64).map(|_| (0..tape.dim()).map(|_| 0.5 * rng.normal()).collect()).collect();
    let mut scratch = tape.scratch();
    let mut reps = 1;
    loop {
        let start = Instant::now();
        let mut sink = 0.0;
        for _ in 0..reps {
            for p in &points {
                sink += tape.log_density(black_box(p), &mut scratch);
            }
        }
        black_box(sink);
        let elapsed = start.elapsed().as_secs_f64();
        if elapsed > 0.2 {
            return elapsed / (reps * points.len()) as f64;
        }
        reps *= 2;
    }
}
