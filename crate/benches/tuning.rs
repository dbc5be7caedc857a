//! How good are the settings each tuning method freezes? The tuning-quality table.
//!
//! Run: `cargo bench -p mixwell --bench tuning` (10–15 minutes on 2 shared cores), or
//! `cargo bench -p mixwell --bench tuning -- --quick` (or `MIXWELL_BENCH_QUICK=1`) for a rough
//! version in about a minute. Further arguments keep only the targets whose name contains one of
//! them, and `--rwm` / `--slice` keep one kernel.
//!
//! For every target, seed and kernel:
//! 1. A pilot run (as in every mixwell run: 4 chains, 200 slice sweeps) fixes the starting states
//!    and the geometry that settings are relative to.
//! 2. Each method chooses its setting through the library's own run, configured as
//!    `mixwell run --tune METHOD` configures it: `bo` (100 trials × 100 steps, scored by
//!    effective draws per evaluation for the random walk and by jump distance per evaluation for
//!    the slice sampler), `rm` and `am` (the same steps), `none` (the default setting untouched).
//! 3. The oracle searches a grid of settings by brute force, a long run at each point, refined
//!    twice around the best point; the best three are measured once more and the best mean wins.
//!    The search runs on chains of other seeds (with this seed's geometry), independent of step 4,
//!    so picking the best of many noisy estimates does not flatter the oracle.
//! 4. Every frozen kernel — the methods' and the oracle's — is then measured the same way from the
//!    pilot's end states with the same random streams: warm-up, then a long run; the score is the
//!    smallest bulk-ESS over the parameters (Vehtari et al. 2021) per density evaluation.
//!
//! Ratios to the oracle are paired by seed. ESS estimates are noisy, so the table shows every seed
//! and the measurement noise: the relative difference between two measurements of one kernel on
//! independent streams. Every figure except the seconds is fixed by the seeds, so it is the same
//! on any machine and however the threads are scheduled.

use mixwell::chain::{Chain, Moments, Record, Task, threads};
use mixwell::diag;
use mixwell::kernel::{Geometry, Settings};
use mixwell::model::check;
use mixwell::plan::{Options, RunConfig};
use mixwell::tape::Tape;
use std::sync::Mutex;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Instant;

mod models;

use models::targets::{self, Target};

/// Dear targets are measured with this many times fewer draws.
const DEAR: usize = 5;

/// How big a run to make.
struct Plan {
    chains: usize,
    pilot: usize,
    warmup: usize,
    /// Draws per chain of every measuring run: random walk, slice; a fifth as many on dear targets.
    rw_draws: usize,
    slice_draws: usize,
    seeds: Vec<u64>,
    /// Refinement stages of the oracle's grid after the first.
    refinements: usize,
    quick: bool,
}

impl Plan {
    fn new(quick: bool) -> Plan {
        if quick {
            Plan {
                chains: 4,
                pilot: 200,
                warmup: 500,
                rw_draws: 10_000,
                slice_draws: 1_000,
                seeds: vec![1],
                refinements: 1,
                quick,
            }
        } else {
            Plan {
                chains: 4,
                pilot: 200,
                warmup: 1_000,
                rw_draws: 100_000,
                slice_draws: 10_000,
                seeds: vec![1, 2, 3],
                refinements: 2,
                quick,
            }
        }
    }

    fn draws(&self, kind: Kind, dear: bool) -> usize {
        let draws = match kind {
            Kind::RandomWalk => self.rw_draws,
            Kind::Slice => self.slice_draws,
        };
        if dear { draws / DEAR } else { draws }
    }
}

#[derive(Clone, Copy, PartialEq)]
enum Kind {
    RandomWalk,
    Slice,
}

impl Kind {
    fn name(self) -> &'static str {
        match self {
            Kind::RandomWalk => "random walk",
            Kind::Slice => "slice",
        }
    }

    /// The kind of kernel as the library knows it.
    fn library(self) -> mixwell::kernel::Kind {
        if self == Kind::RandomWalk { mixwell::kernel::Kind::RandomWalk } else { mixwell::kernel::Kind::Slice }
    }

    fn default_settings(self, dim: usize) -> Settings {
        Settings::default_for(self.library(), dim)
    }

    fn methods(self) -> &'static [&'static str] {
        match self {
            Kind::RandomWalk => &["oracle", "bo", "rm", "am", "none"],
            Kind::Slice => &["oracle", "bo", "none"],
        }
    }
}

/// One measuring run of a frozen kernel.
#[derive(Clone, Debug)]
struct Measured {
    /// Smallest bulk-ESS over the parameters, per density evaluation (all chains).
    ess_per_eval: f64,
    /// Random walk: share of proposals accepted.
    acceptance: f64,
    evals_per_step: f64,
    /// Density evaluations of the whole run, warm-up included.
    spent: u64,
}

/// What a method chose, and what choosing cost.
#[derive(Clone, Debug)]
struct Frozen {
    settings: Settings,
    geometry: Geometry,
    /// Density evaluations spent choosing, all chains (the shared pilot not counted).
    evaluations: u64,
    seconds: f64,
    /// The oracle's choice lies on the edge of its first grid's x₀ range.
    on_edge: bool,
}

/// One method on one seed: its choice and how the choice measured.
struct Outcome {
    frozen: Frozen,
    measured: Measured,
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).filter(|a| a != "--bench").collect();
    let quick = args.iter().any(|a| a == "--quick") || std::env::var_os("MIXWELL_BENCH_QUICK").is_some();
    let kinds: Vec<Kind> = match (args.iter().any(|a| a == "--rwm"), args.iter().any(|a| a == "--slice")) {
        (true, false) => vec![Kind::RandomWalk],
        (false, true) => vec![Kind::Slice],
        _ => vec![Kind::RandomWalk, Kind::Slice],
    };
    let names: Vec<&String> = args.iter().filter(|a| !a.starts_with("--")).collect();
    let plan = Plan::new(quick);
    let started = Instant::now();
    println!(
        "tuning quality{}: {} chains, pilot {}, warm-up {}, measuring runs of {} (random walk) / {} (slice) draws \
         per chain ({DEAR}× fewer on dear targets), seeds {:?}; ESS/eval = min bulk-ESS over parameters ÷ \
         evaluations, shown ×1000",
        if plan.quick { " (QUICK: rough figures)" } else { "" },
        plan.chains,
        plan.pilot,
        plan.warmup,
        plan.rw_draws,
        plan.slice_draws,
        plan.seeds
    );
    let mut summary = Vec::new();
    for target in targets::all() {
        if !names.is_empty() && !names.iter().any(|n| target.name.contains(n.as_str())) {
            continue;
        }
        let tape = compile(&target);
        println!("\n== {} — {}", target.name, target.source);
        for &kind in &kinds {
            let t = Instant::now();
            let case = Case { tape: &tape, kind, plan: &plan, draws: plan.draws(kind, target.dear) };
            let per_seed: Vec<Seeded> = plan.seeds.iter().map(|&seed| compare(&case, seed)).collect();
            summary.push(print_table(&target, &case, &per_seed, t.elapsed().as_secs_f64()));
        }
    }
    print_summary(&summary);
    println!("\ntotal {:.0} s", started.elapsed().as_secs_f64());
}

fn compile(target: &Target) -> Tape {
    let model = check(&target.model).unwrap_or_else(|d| panic!("{}", d.render(target.name, &target.model)));
    let tape = Tape::new(&model);
    let mut scratch = tape.scratch();
    for c in &target.checks {
        let got = tape.log_density(&c.theta, &mut scratch);
        assert!(
            (got - c.log_density).abs() <= 1e-10 * c.log_density.abs().max(1.0),
            "{}: log density {got} at {:?}, expected {} ({})",
            target.name,
            c.theta,
            c.log_density,
            c.from
        );
    }
    tape
}

/// Every method on one seed and kernel.
struct Seeded {
    outcomes: Vec<(&'static str, Outcome)>,
    /// The default kernel's ESS/eval measured on two independent streams (for the noise estimate).
    repeat: (f64, f64),
}

/// One target and kernel under test.
struct Case<'a> {
    tape: &'a Tape,
    kind: Kind,
    plan: &'a Plan,
    /// Draws per chain of each measuring run.
    draws: usize,
}

fn compare(case: &Case, seed: u64) -> Seeded {
    let Case { tape, kind, plan, .. } = *case;
    let (chains, geometry) = pilot(tape, seed, plan);
    // Chains on independent streams for the oracle's search and the noise estimate: those of
    // another seed after their own pilot, run with this seed's geometry.
    let other_stream = pilot(tape, seed + OTHER_STREAMS, plan).0;
    let third_stream = pilot(tape, seed + 2 * OTHER_STREAMS, plan).0;
    let default = kind.default_settings(tape.dim());
    let tuned = parallel_map(kind.methods(), |&method| match method {
        "oracle" => oracle(case, [&other_stream, &third_stream], &geometry),
        "none" => Frozen {
            settings: default.clone(),
            geometry: geometry.clone(),
            evaluations: 0,
            seconds: 0.0,
            on_edge: false,
        },
        method => tune(tape, kind, method, seed, plan, &geometry),
    });
    let mut jobs: Vec<(&[Chain], &Frozen)> = tuned.iter().map(|f| (chains.as_slice(), f)).collect();
    let none = tuned.last().expect("`none` is the last method");
    jobs.push((other_stream.as_slice(), none));
    let mut measured = parallel_map(&jobs, |(chains, f)| measure(case, chains, &f.settings, &f.geometry));
    let again = measured.pop().expect("the repeat measurement");
    let repeat = (measured.last().expect("`none`").ess_per_eval, again.ess_per_eval);
    let outcomes = kind
        .methods()
        .iter()
        .zip(tuned)
        .zip(measured)
        .map(|((m, frozen), measured)| (*m, Outcome { frozen, measured }));
    Seeded { outcomes: outcomes.collect(), repeat }
}

/// Seeds this far apart give the chains the oracle searches with.
const OTHER_STREAMS: u64 = 1_000_000;

/// The chains after the pilot, and the pilot's geometry — exactly what a library run with this
/// seed computes before tuning.
fn pilot(tape: &Tape, seed: u64, plan: &Plan) -> (Vec<Chain>, Geometry) {
    let mut chains: Vec<Chain> = (0..plan.chains).map(|i| Chain::new(tape, seed, i).expect("chains start")).collect();
    let rows: Vec<Vec<f64>> =
        chains.iter_mut().map(|c| c.perform(tape, &Task::Pilot { sweeps: plan.pilot }).rows).collect();
    let slices: Vec<&[f64]> = rows.iter().map(Vec::as_slice).collect();
    (chains, Moments::pooled(&slices, tape.dim()).geometry())
}

/// A method's choice through the library's own run (no draws: tuning only).
fn tune(tape: &Tape, kind: Kind, method: &str, seed: u64, plan: &Plan, pilot_geometry: &Geometry) -> Frozen {
    // Exactly what `mixwell run --tune METHOD` would do (default budget, and the score the
    // product uses for this kernel), with the bench's chains and pilot and no draws.
    let options = Options {
        sampler: Some(kind.library()),
        tune: Some(method.parse().expect("a known method")),
        seed: Some(seed),
        ..Options::default()
    };
    let config = RunConfig {
        chains: plan.chains,
        warmup: 0,
        draws: 0,
        pilot: plan.pilot,
        ..options.resolve(tape.dim()).expect("a valid run")
    };
    let t = Instant::now();
    let collected = threads::run(tape, config, |_| {}).expect("chains start");
    let seconds = t.elapsed().as_secs_f64();
    if method != "am" {
        assert_eq!(&collected.geometry, pilot_geometry, "the bench's pilot differs from the library's");
    }
    Frozen {
        settings: collected.settings,
        geometry: collected.geometry,
        evaluations: collected.tuning.map_or(0, |t| t.evaluations),
        seconds,
        on_edge: false,
    }
}

/// Measure a frozen kernel from the given chain states: warm-up, then `draws` recorded steps.
fn measure(case: &Case, chains: &[Chain], settings: &Settings, geometry: &Geometry) -> Measured {
    let Case { tape, plan, draws, .. } = *case;
    let (mut evaluations, mut proposals, mut moves, mut spent) = (0, 0, 0, 0);
    let mut rows = Vec::with_capacity(chains.len());
    for chain in chains {
        let mut chain = chain.clone();
        chain.perform(tape, &Task::Configure { settings: settings.clone(), geometry: geometry.clone() });
        spent += chain.perform(tape, &Task::Run { steps: plan.warmup, record: Record::Nothing }).evaluations;
        let out = chain.perform(tape, &Task::Run { steps: draws, record: Record::Unconstrained });
        evaluations += out.evaluations;
        spent += out.evaluations;
        proposals += out.proposals;
        moves += out.moves;
        rows.push(out.rows);
    }
    let d = tape.dim();
    // Bulk-ESS works on ranks, so it is the same on the unconstrained scale as on the parameters'.
    let min_ess = (0..d)
        .map(|i| {
            let columns: Vec<Vec<f64>> = rows.iter().map(|r| r.iter().skip(i).step_by(d).copied().collect()).collect();
            let slices: Vec<&[f64]> = columns.iter().map(Vec::as_slice).collect();
            let ess = diag::bulk_ess(&slices);
            if ess.is_finite() { ess } else { 0.0 }
        })
        .fold(f64::INFINITY, f64::min);
    Measured {
        ess_per_eval: min_ess / evaluations.max(1) as f64,
        acceptance: moves as f64 / proposals.max(1) as f64,
        evals_per_step: evaluations as f64 / (draws * chains.len()).max(1) as f64,
        spent,
    }
}

/// A point of the oracle's grid: x₀ = log₂ of the scale over its default (random walk) or of the
/// width in pilot sds (slice); x₁ = the blend, or an index into [`STEPOUTS`].
type Point = [f64; 2];

/// The oracle's best grid points that are measured a second time before it chooses.
const FINALISTS: usize = 3;

const STEPOUTS: [u32; 9] = [1, 2, 3, 5, 10, 20, 30, 50, 100];

fn grid_settings(kind: Kind, p: Point, dim: usize) -> Settings {
    match kind {
        Kind::RandomWalk => {
            Settings::RandomWalk { scale: 2.38 / (dim as f64).sqrt() * libm::exp2(p[0]), blend: p[1].clamp(0.0, 1.0) }
        }
        Kind::Slice => Settings::Slice { width: libm::exp2(p[0]), stepout: STEPOUTS[p[1] as usize] },
    }
}

/// The oracle: a coarse grid over the settings, then `plan.refinements` finer grids of the 3×3
/// neighbours of the best point so far, spacing halved each time; every point is one measuring run
/// on the first of `streams`. The best [`FINALISTS`] are measured again on the second, and the best
/// mean wins. The random walk's grid covers scales from 1/16 to 16 times the default (the tuner
/// searches 1/10 to 10) and blends 0, ½, 1; the slice's covers widths of ¼ to 32 pilot sds and
/// step-out limits 1, 3, 10 and 100, plus the default setting (3 sds, 20).
fn oracle(case: &Case, streams: [&[Chain]; 2], geometry: &Geometry) -> Frozen {
    let chains = streams[0];
    let Case { tape, kind, plan, .. } = *case;
    let t = Instant::now();
    let mut first: Vec<Point> = Vec::new();
    let (mut step, mut index_step) = match kind {
        Kind::RandomWalk => {
            let scales: Vec<f64> =
                if plan.quick { (-3..=3).map(f64::from).collect() } else { (-4..=4).map(f64::from).collect() };
            let blends: &[f64] = if plan.quick { &[0.0, 1.0] } else { &[0.0, 0.5, 1.0] };
            for &s in &scales {
                for &b in blends {
                    first.push([s, b]);
                }
            }
            (0.5, if plan.quick { 0.5 } else { 0.25 })
        }
        Kind::Slice => {
            let widths: Vec<f64> =
                if plan.quick { (-1..=4).map(f64::from).collect() } else { (-2..=5).map(f64::from).collect() };
            let stepouts: &[f64] = if plan.quick { &[0.0, 4.0] } else { &[0.0, 2.0, 4.0, 8.0] };
            for &w in &widths {
                for &m in stepouts {
                    first.push([w, m]);
                }
            }
            // The default setting, so that the oracle always considers it.
            let twenty = STEPOUTS.iter().position(|&m| m == 20).expect("20 is on the ladder");
            first.push([libm::log2(3.0), twenty as f64]);
            (0.5, 1.0)
        }
    };
    let mut tried: Vec<(Point, f64)> = Vec::new();
    let mut evaluations = 0;
    let low = first.iter().map(|p| p[0]).fold(f64::INFINITY, f64::min);
    let high = first.iter().map(|p| p[0]).fold(f64::NEG_INFINITY, f64::max);
    let mut batch = first;
    for stage in 0..=plan.refinements {
        let results = parallel_map(&batch, |p| {
            let settings = grid_settings(kind, *p, tape.dim());
            measure(case, chains, &settings, geometry)
        });
        for (p, m) in batch.iter().zip(results) {
            tried.push((*p, m.ess_per_eval));
            evaluations += m.spent;
        }
        if stage == plan.refinements {
            break;
        }
        let best = tried.iter().max_by(|a, b| a.1.total_cmp(&b.1)).expect("a grid").0;
        batch = Vec::new();
        for di in [-1.0, 0.0, 1.0] {
            for dj in [-1.0, 0.0, 1.0] {
                let mut p = [best[0] + di * step, best[1] + dj * index_step];
                p[1] = match kind {
                    Kind::RandomWalk => p[1].clamp(0.0, 1.0),
                    Kind::Slice => p[1].clamp(0.0, (STEPOUTS.len() - 1) as f64),
                };
                let new = |q: &Point| (q[0] - p[0]).abs() > 1e-9 || (q[1] - p[1]).abs() > 1e-9;
                if tried.iter().all(|(q, _)| new(q)) && batch.iter().all(new) {
                    batch.push(p);
                }
            }
        }
        step /= 2.0;
        if kind == Kind::RandomWalk {
            index_step /= 2.0;
        }
    }
    // The best few, measured again on the second stream: the choice goes by the mean of the two,
    // which halves the variance that picking a maximum among noisy estimates rewards.
    tried.sort_by(|a, b| b.1.total_cmp(&a.1));
    let finalists: Vec<(Point, f64)> = tried.iter().take(FINALISTS).copied().collect();
    let again =
        parallel_map(&finalists, |(p, _)| measure(case, streams[1], &grid_settings(kind, *p, tape.dim()), geometry));
    evaluations += again.iter().map(|m| m.spent).sum::<u64>();
    let best = finalists
        .iter()
        .zip(&again)
        .map(|((p, first), m)| (*p, first + m.ess_per_eval))
        .max_by(|a, b| a.1.total_cmp(&b.1))
        .expect("finalists")
        .0;
    Frozen {
        settings: grid_settings(kind, best, tape.dim()),
        geometry: geometry.clone(),
        evaluations,
        seconds: t.elapsed().as_secs_f64(),
        on_edge: best[0] <= low || best[0] >= high,
    }
}

/// Run `f` on every item, on as many threads as there are cores; results in item order.
fn parallel_map<T: Sync, R: Send>(items: &[T], f: impl Fn(&T) -> R + Sync) -> Vec<R> {
    let workers = std::thread::available_parallelism().map_or(2, |n| n.get()).clamp(1, items.len().max(1));
    let next = AtomicUsize::new(0);
    let results: Mutex<Vec<Option<R>>> = Mutex::new((0..items.len()).map(|_| None).collect());
    std::thread::scope(|s| {
        for _ in 0..workers {
            s.spawn(|| {
                loop {
                    let i = next.fetch_add(1, Ordering::Relaxed);
                    if i >= items.len() {
                        break;
                    }
                    let r = f(&items[i]);
                    results.lock().expect("no worker panicked")[i] = Some(r);
                }
            });
        }
    });
    results.into_inner().expect("no worker panicked").into_iter().map(|r| r.expect("every item done")).collect()
}

/// One target and kernel in the closing summary: per method, the per-seed ratios to the oracle.
struct Row {
    target: &'static str,
    kind: Kind,
    ratios: Vec<(&'static str, Vec<f64>)>,
    /// Mean evaluations spent choosing: `bo`, `rm`, the oracle.
    bo_evaluations: f64,
    oracle_evaluations: f64,
    /// Relative difference of the two measurements of the default kernel, per seed.
    noise: Vec<f64>,
}

fn print_table(target: &Target, case: &Case, per_seed: &[Seeded], seconds: f64) -> Row {
    let (kind, dim) = (case.kind, case.tape.dim());
    println!("-- {}: measuring runs of {} draws per chain ({seconds:.0} s)", kind.name(), case.draws);
    println!(
        "{:<7} {:<26} {:<24} {:>11} {:>10} {:>8}  {:<37} {:>8}",
        "method",
        "ESS/eval ×1000, per seed",
        "÷ oracle: mean (seeds)",
        "tuning ev.",
        "÷ oracle's",
        "seconds",
        "frozen setting (first seed)",
        if kind == Kind::RandomWalk { "accept" } else { "ev/sweep" }
    );
    let oracle: Vec<f64> = per_seed.iter().map(|s| s.outcomes[0].1.measured.ess_per_eval).collect();
    let mean = |xs: &[f64]| xs.iter().sum::<f64>() / xs.len().max(1) as f64;
    let oracle_evaluations =
        mean(&per_seed.iter().map(|s| s.outcomes[0].1.frozen.evaluations as f64).collect::<Vec<_>>());
    let mut ratios = Vec::new();
    let mut bo_evaluations = 0.0;
    for (k, method) in kind.methods().iter().enumerate() {
        let outcomes: Vec<&Outcome> = per_seed.iter().map(|s| &s.outcomes[k].1).collect();
        let values: Vec<f64> = outcomes.iter().map(|o| o.measured.ess_per_eval).collect();
        let ratio: Vec<f64> = values.iter().zip(&oracle).map(|(v, o)| v / o).collect();
        let evaluations = mean(&outcomes.iter().map(|o| o.frozen.evaluations as f64).collect::<Vec<_>>());
        let spent_seconds = mean(&outcomes.iter().map(|o| o.frozen.seconds).collect::<Vec<_>>());
        if *method == "bo" {
            bo_evaluations = evaluations;
        }
        let first = outcomes[0];
        println!(
            "{:<7} {:<26} {:<24} {:>11} {:>10} {:>8.1}  {:<37} {:>8.3}",
            method,
            values.iter().map(|v| format!("{:.3}", 1000.0 * v)).collect::<Vec<_>>().join(" "),
            format!("{:.2} ({})", mean(&ratio), ratio.iter().map(|r| format!("{r:.2}")).collect::<Vec<_>>().join(" ")),
            format!("{evaluations:.3e}"),
            format!("{:.4}", evaluations / oracle_evaluations),
            spent_seconds,
            describe(&first.frozen, method, dim),
            if kind == Kind::RandomWalk { first.measured.acceptance } else { first.measured.evals_per_step }
        );
        ratios.push((*method, ratio));
    }
    let noise: Vec<f64> =
        per_seed.iter().map(|s| (s.repeat.0 - s.repeat.1).abs() / (0.5 * (s.repeat.0 + s.repeat.1))).collect();
    println!(
        "noise: the default kernel measured on two independent streams differs by {} per seed",
        noise.iter().map(|n| format!("{:.1}%", 100.0 * n)).collect::<Vec<_>>().join(", ")
    );
    Row { target: target.name, kind, ratios, bo_evaluations, oracle_evaluations, noise }
}

/// Settings in the units they are searched in.
fn describe(frozen: &Frozen, method: &str, dim: usize) -> String {
    match &frozen.settings {
        Settings::RandomWalk { scale, blend } => format!(
            "scale {:.3}×2.38/√d, blend {blend:.2}{}",
            scale / (2.38 / (dim as f64).sqrt()),
            if method == "am" {
                " (AM cov.)"
            } else if frozen.on_edge {
                " GRID EDGE"
            } else {
                ""
            }
        ),
        Settings::Slice { width, stepout } => {
            format!("width {width:.2} sd, step-out {stepout}{}", if frozen.on_edge { " GRID EDGE" } else { "" })
        }
        Settings::Mixture { components } => format!("mixture of {}", components.len()),
    }
}

fn print_summary(rows: &[Row]) {
    println!("
== summary: ESS/eval ÷ the oracle's, mean over seeds (lowest seed); goals for bo: ≥ 0.9 of the oracle, ≤ 0.1 of its evaluations, ≥ rm");
    println!(
        "{:<24} {:<12} {:<13} {:<13} {:<13} {:<13} {:>12}  goals (0.9 / 0.1 / ≥ rm)",
        "target", "kernel", "bo", "rm", "am", "none", "bo ev./orc."
    );
    let mean = |xs: &[f64]| xs.iter().sum::<f64>() / xs.len().max(1) as f64;
    let lowest = |xs: &[f64]| xs.iter().copied().fold(f64::INFINITY, f64::min);
    let mut noise = Vec::new();
    for row in rows {
        let cell = |method: &str| {
            row.ratios
                .iter()
                .find(|(m, _)| *m == method)
                .map_or("—".to_string(), |(_, r)| format!("{:.2} ({:.2})", mean(r), lowest(r)))
        };
        let get = |method: &str| row.ratios.iter().find(|(m, _)| *m == method).map(|(_, r)| mean(r));
        let bo = get("bo").unwrap_or(f64::NAN);
        let share = row.bo_evaluations / row.oracle_evaluations;
        let verdict = |ok: bool| if ok { "yes" } else { "NO" };
        println!(
            "{:<24} {:<12} {:<13} {:<13} {:<13} {:<13} {:>12.4}  {} / {} / {}",
            row.target,
            row.kind.name(),
            cell("bo"),
            cell("rm"),
            cell("am"),
            cell("none"),
            share,
            verdict(bo >= 0.9),
            verdict(share <= 0.1),
            get("rm").map_or("—", |rm| verdict(bo >= rm))
        );
        noise.extend(&row.noise);
    }
    noise.sort_by(f64::total_cmp);
    if !noise.is_empty() {
        println!(
            "measurement noise: two measurements of one kernel on independent streams differ by a median {:.1}% \
             (largest {:.1}%), so single ratios carry roughly that much noise",
            100.0 * noise[noise.len() / 2],
            100.0 * noise[noise.len() - 1]
        );
    }
}
