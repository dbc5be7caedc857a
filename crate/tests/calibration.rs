//! Simulation-based calibration (Talts, Betancourt, Simpson, Vehtari & Gelman 2018,
//! arXiv:1804.06788, Algorithm 1) of each kernel on a small hierarchical model: draw parameters
//! from the prior, data given them, then posterior draws with the kernel under test; the rank of
//! the true value among the draws is uniform exactly when the kernel samples the posterior.
//!
//! The χ² test of the rank histogram uses B = 10 bins of L + 1 = 100 ranks and N = 200
//! replications (N/B = 20, as Talts et al. advise), at α = 0.001 with a Bonferroni split over
//! the three quantities tested: critical value χ²₉(1 − 0.001/3) = 30.699 (scipy.stats.chi2.ppf).
//! The last test runs the same check on a deliberately wrong random walk and requires it to fail.

mod common;

use common::{compile, kernels};
use mixwell::chain::threads;
use mixwell::diag;
use mixwell::kernel::Settings;
use mixwell::plan::{RunConfig, Tuning};
use mixwell::rng::Stream;
use mixwell::tape::Tape;

const REPLICATIONS: usize = 200;
const KEPT: usize = 99;
const BINS: usize = 10;
const CRITICAL: f64 = 30.699_186_514_950_23;
const TESTED: [&str; 3] = ["mu", "tau", "eta[1]"];

/// Prior draws (mu, tau, eta) and simulated data for one replication, as model text.
fn replication(rng: &mut Stream) -> (String, [f64; 3]) {
    let mu = rng.normal();
    let tau = rng.normal().abs();
    let eta: Vec<f64> = (0..4).map(|_| rng.normal()).collect();
    let y: Vec<String> = eta.iter().map(|e| format!("{}", mu + tau * e + rng.normal())).collect();
    let source = format!(
        "y = [{}]\nmu : real\ntau : positive\neta : real[4]\ntheta = mu + tau * eta\n\
         density = normal(mu; 0, 1) * halfnormal(tau; 1) * normal(eta; 0, 1) * normal(y; theta, 1)\n",
        y.join(", ")
    );
    (source, [mu, tau, eta[0]])
}

/// χ² statistics of the rank histograms, one per tested quantity, and the mean bulk-ESS of the
/// kept draws (which must be near `KEPT` for ranks to be uniform; Talts et al. §5).
fn calibrate(mut posterior: impl FnMut(&Tape, u64) -> Vec<Vec<f64>>) -> ([f64; 3], f64) {
    let mut rng = Stream::new(2018, 0);
    let mut counts = [[0usize; BINS]; 3];
    let mut ess_total = 0.0;
    for n in 0..REPLICATIONS {
        let (source, truth) = replication(&mut rng);
        let tape = compile(&source);
        let kept = posterior(&tape, 1000 + n as u64);
        for (q, name) in TESTED.iter().enumerate() {
            let c = tape.columns().iter().position(|c| c == name).expect("column");
            let rank = kept.iter().filter(|row| row[c] < truth[q]).count();
            counts[q][rank * BINS / (KEPT + 1)] += 1;
            if q == 0 {
                let draws: Vec<f64> = kept.iter().map(|row| row[c]).collect();
                ess_total += diag::bulk_ess(&[draws.as_slice()]);
            }
        }
    }
    let expected = REPLICATIONS as f64 / BINS as f64;
    let chi2 = counts.map(|bins| bins.iter().map(|&c| (c as f64 - expected).powi(2) / expected).sum());
    (chi2, ess_total / REPLICATIONS as f64)
}

/// `KEPT` draws, one every `thin` steps after warm-up, from one chain of our sampler.
fn thinned(tape: &Tape, settings: &Settings, thin: usize, seed: u64) -> Vec<Vec<f64>> {
    let config = RunConfig {
        chains: 1,
        warmup: 300,
        draws: KEPT * thin,
        seed,
        pilot: 100,
        settings: settings.clone(),
        tuning: Tuning::None,
    };
    let collected = threads::run(tape, config, |_| {}).expect("chain starts");
    let width = tape.columns().len();
    collected.draws[0].chunks_exact(width).step_by(thin).map(<[f64]>::to_vec).collect()
}

#[test]
fn every_kernel_is_calibrated_on_a_hierarchical_model() {
    for (label, settings) in kernels(6) {
        let thin = match label {
            "random walk" => 50,
            "slice" => 5,
            _ => 12,
        };
        let (chi2, ess) = calibrate(|tape, seed| thinned(tape, &settings, thin, seed));
        assert!(ess > 0.8 * KEPT as f64, "{label}: kept draws have mean bulk-ESS {ess:.0}; thin more");
        for (name, x) in TESTED.iter().zip(chi2) {
            assert!(x < CRITICAL, "{label}: rank histogram of {name} is not uniform (χ² = {x:.1} ≥ {CRITICAL:.1})");
        }
    }
}

/// The check has power: a random walk whose proposal drifts (θ′ = θ + s·z + s/4, an asymmetric
/// proposal) but is accepted as if it were symmetric samples the wrong distribution, and the
/// same calibration must reject it.
#[test]
fn calibration_detects_a_deliberately_wrong_kernel() {
    let (chi2, _) = calibrate(|tape, seed| {
        let mut rng = Stream::new(seed, 0);
        let d = tape.dim();
        let s = 2.38 / (d as f64).sqrt() * 0.6;
        let (mut scratch, mut theta) = (tape.scratch(), vec![0.0; d]);
        let mut lp = tape.log_density(&theta, &mut scratch);
        let mut kept = Vec::new();
        for step in 0..(300 + KEPT * 30) {
            let proposal: Vec<f64> = theta.iter().map(|t| t + s * rng.normal() + s / 4.0).collect();
            let lq = tape.log_density(&proposal, &mut scratch);
            if lq.is_finite() && libm::log(rng.open_uniform()) < lq - lp {
                (theta, lp) = (proposal, lq);
            }
            if step >= 300 && (step - 300) % 30 == 0 {
                let mut row = vec![0.0; tape.columns().len()];
                tape.log_density(&theta, &mut scratch);
                tape.write_draw(&theta, &mut scratch, &mut row);
                kept.push(row);
            }
        }
        kept
    });
    assert!(chi2.iter().any(|&x| x > CRITICAL), "the wrong kernel passed calibration: χ² = {chi2:?}");
}
