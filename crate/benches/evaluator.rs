//! How close the compiled evaluator comes to a hand-written Rust function of the same model.
//!
//! Run: `cargo bench -p mixwell --bench evaluator`. For each benchmark model it times the tape's
//! log density and a hand-written function (same formulas, same `libm` calls, the obvious loop),
//! alternating the two in rounds and printing the median time of each and their ratio.
//! Both are checked to agree before anything is timed.

use mixwell::model::check;
use mixwell::rng::Stream;
use mixwell::tape::Tape;
use std::hint::black_box;
use std::time::Instant;

mod models;

fn main() {
    println!("{:<44} {:>12} {:>12} {:>7}", "model", "evaluator", "by hand", "ratio");
    for bench in models::all() {
        let tape =
            Tape::new(&check(&bench.source).unwrap_or_else(|d| panic!("{}", d.render(bench.name, &bench.source))));
        let mut scratch = tape.scratch();
        let mut rng = Stream::new(1, 0);
        let points: Vec<Vec<f64>> = (0..64).map(|_| (0..tape.dim()).map(|_| 0.5 * rng.normal()).collect()).collect();
        for p in &points {
            let (ours, theirs) = (tape.log_density(p, &mut scratch), (bench.by_hand)(p));
            assert!((ours - theirs).abs() <= 1e-9 * theirs.abs().max(1.0), "{}: {ours} vs {theirs}", bench.name);
        }
        let mut tape_times = Vec::new();
        let mut hand_times = Vec::new();
        for _ in 0..15 {
            tape_times.push(time_per_call(&points, |p| tape.log_density(p, &mut scratch)));
            hand_times.push(time_per_call(&points, |p| (bench.by_hand)(p)));
        }
        let (t, h) = (median(&mut tape_times), median(&mut hand_times));
        println!("{:<44} {:>9.3} µs {:>9.3} µs {:>7.2}", bench.name, t * 1e6, h * 1e6, t / h);
    }
}

/// Seconds per evaluation, over enough repetitions to last about 20 ms.
fn time_per_call(points: &[Vec<f64>], mut f: impl FnMut(&[f64]) -> f64) -> f64 {
    let mut reps = 1;
    loop {
        let start = Instant::now();
        let mut sink = 0.0;
        for _ in 0..reps {
            for p in points {
                sink += f(black_box(p));
            }
        }
        black_box(sink);
        let elapsed = start.elapsed().as_secs_f64();
        if elapsed > 0.02 {
            return elapsed / (reps * points.len()) as f64;
        }
        reps *= 2;
    }
}

fn median(xs: &mut [f64]) -> f64 {
    xs.sort_by(f64::total_cmp);
    xs[xs.len() / 2]
}
