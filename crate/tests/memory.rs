//! The memory a run takes, measured by counting every allocation, against the estimate the
//! guard refuses runs by (`plan::memory`): the estimate must not fall short of what a run takes
//! at its peak, nor overstate it wildly, and a long pilot must not take memory per sweep.
//!
//! One test function only: the counter is global, so nothing else may run beside it.

mod common;

use common::compile;
use mixwell::chain::threads;
use mixwell::plan::{Estimate, Face, Method, Options, Plan, RunConfig, Shape};
use mixwell::report::Report;
use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};

/// The system allocator, counting the bytes in use and their peak.
struct Counting;

static IN_USE: AtomicUsize = AtomicUsize::new(0);
static PEAK: AtomicUsize = AtomicUsize::new(0);

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let now = IN_USE.fetch_add(layout.size(), Ordering::SeqCst) + layout.size();
        PEAK.fetch_max(now, Ordering::SeqCst);
        unsafe { System.alloc(layout) }
    }

    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        IN_USE.fetch_sub(layout.size(), Ordering::SeqCst);
        unsafe { System.dealloc(ptr, layout) }
    }

    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        let now = IN_USE.fetch_add(new_size, Ordering::SeqCst) + new_size;
        PEAK.fetch_max(now, Ordering::SeqCst);
        let moved = unsafe { System.realloc(ptr, layout, new_size) };
        IN_USE.fetch_sub(layout.size(), Ordering::SeqCst);
        moved
    }
}

#[global_allocator]
static COUNTING: Counting = Counting;

/// Bytes a run of `config` takes beyond what was in use before it: its peak while it runs and
/// its report is made.
fn measured(source: &str, config: RunConfig) -> (f64, f64) {
    let tape = compile(source);
    let plan = Plan::of_config(config.clone(), tape.dim(), false).expect("a valid run");
    let estimate = Estimate::of_plan(&plan, Shape::of(&tape), Face::Native).peak();
    let before = IN_USE.load(Ordering::SeqCst);
    PEAK.store(before, Ordering::SeqCst);
    let collected = threads::run(&tape, config, |_| {}).expect("chains start");
    let report = Report::new(&collected, tape.columns(), tape.dim(), 20);
    assert!(report.complete);
    drop((report, collected));
    ((PEAK.load(Ordering::SeqCst) - before) as f64, estimate)
}

fn config(options: Options, dim: usize) -> RunConfig {
    Options { seed: Some(5), ..options }.resolve(dim).expect("valid")
}

fn normal(d: usize) -> String {
    format!("x : real[{d}]\ndensity = normal(x; 0, 1)\n")
}

#[test]
fn runs_take_no_more_than_their_estimate_and_a_long_pilot_takes_no_more_than_a_short_one() {
    let untuned = |draws: u64| Options { tune: Some(Method::None), draws: Some(draws), ..Options::default() };
    // Each run is dominated by one part of the estimate: trial windows, draws, adaptation.
    let windows = Options { window: Some(20_000), trials: Some(6), draws: Some(100), ..Options::default() };
    let adapting =
        Options { tune: Some(Method::Am), trials: Some(2), window: Some(50), draws: Some(100), ..Options::default() };
    let cases = [("trial windows", 20, windows), ("draws", 30, untuned(30_000)), ("adaptation", 120, adapting)];
    for (what, dim, options) in cases {
        let (peak, estimate) = measured(&normal(dim), config(options, dim));
        // The model's evaluation space and small bookkeeping are not estimated: allow 1 MiB.
        assert!(peak <= estimate + (1 << 20) as f64, "{what}: measured {peak} bytes, estimated only {estimate}");
        assert!(estimate <= 4.0 * peak, "{what}: estimated {estimate} bytes, more than 4 × the measured {peak}");
    }
    // A pilot of 8,000 sweeps would have kept 4,000 × 60 numbers (1.9 MB) per chain.
    let pilot = |sweeps: u64| config(Options { pilot: Some(sweeps), warmup: Some(0), ..untuned(100) }, 60);
    let short = measured(&normal(60), pilot(200)).0;
    let long = measured(&normal(60), pilot(8_000)).0;
    assert!(long <= short + (256 << 10) as f64, "an 8,000-sweep pilot took {long} bytes, a 200-sweep one {short}");
}
