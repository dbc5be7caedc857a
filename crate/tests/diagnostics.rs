//! The public diagnostics (`mixwell::diag`) and the quantile functions behind them
//! (`mixwell::dist::quantile`) against sources outside the project:
//! * the fixed chains and values of REFERENCES.md §3.3 ([computed] there by an implementation of
//!   Vehtari, Gelman, Simpson, Carpenter & Bürkner 2021, *Bayesian Analysis* 16(2));
//! * an independent numpy/scipy implementation, crate/tests/reference/diagnostics.py, and the
//!   fixture it writes (extra chain sets, scipy values of Φ⁻¹, I_x(a, b) and Beta quantiles);
//! * the theory and simulated spreads of REFERENCES.md §3.2 (AR(1) chains), §3.4 (iid chains),
//!   §3.5 (one shifted chain) and §4 (MCSE calibration).

use mixwell::diag::{
    Thresholds, autocorrelation, bulk_ess, mcse_mean, mcse_quantile, mean_ess, quantile, rhat, summarise, tail_ess,
    warnings,
};
use mixwell::dist::quantile::{beta_quantile, normal_quantile, regularised_incomplete_beta};
use mixwell::rng::Stream;

fn rel(got: f64, want: f64) -> f64 {
    if got == want { 0.0 } else { (got - want).abs() / want.abs() }
}

fn refs(chains: &[Vec<f64>]) -> Vec<&[f64]> {
    chains.iter().map(|c| c.as_slice()).collect()
}

/// Columns of a fixed-chain CSV file (one chain per column; `#` starts a comment line).
fn columns(csv: &str) -> Vec<Vec<f64>> {
    let rows: Vec<Vec<f64>> = csv
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| l.split(',').map(|v| v.trim().parse::<f64>().expect("a number in the fixture")).collect())
        .collect();
    (0..rows[0].len()).map(|c| rows.iter().map(|r| r[c]).collect()).collect()
}

fn fixture() -> serde_json::Value {
    serde_json::from_str(include_str!("reference/diagnostics_fixture.json")).expect("fixture parses")
}

/// Fixture inputs are decimal strings, parsed by Rust's correctly rounded parser (serde_json's
/// default float parsing is best-effort and may be an ulp off, which would break ties).
fn exact_number(v: &serde_json::Value) -> f64 {
    v.as_str().and_then(|s| s.parse().ok()).expect("a decimal string")
}

fn number(v: &serde_json::Value) -> f64 {
    v.as_f64().expect("a number")
}

/// `chains` AR(1) chains x_t = ρx_{t−1} + sqrt(1 − ρ²)ε_t of length `len`, started in the stationary
/// N(0, 1), each from its own stream of `seed` (REFERENCES.md §3.2).
fn ar1(seed: u64, chains: usize, len: usize, rho: f64) -> Vec<Vec<f64>> {
    let innovation_sd = (1.0 - rho * rho).sqrt();
    (0..chains)
        .map(|m| {
            let mut rng = Stream::new(seed, m as u64);
            let mut x = rng.normal();
            let mut chain = Vec::with_capacity(len);
            for t in 0..len {
                if t > 0 {
                    x = rho * x + innovation_sd * rng.normal();
                }
                chain.push(x);
            }
            chain
        })
        .collect()
}

fn mean(values: &[f64]) -> f64 {
    values.iter().sum::<f64>() / values.len() as f64
}

// ---------------------------------------------------------------------------------------------
// Fixed chains (REFERENCES.md §3.3)
// ---------------------------------------------------------------------------------------------

/// REFERENCES.md §3.3: (mean, sd, R-hat, basic ESS, bulk-ESS, tail-ESS, MCSE(mean), MCSE(q0.05),
/// MCSE(q0.5)) of fixed chain sets A and B, to 1e-10 relative (conventions match, see the
/// `diag` module documentation).
#[test]
fn fixed_chains_match_the_published_values() {
    let sets = [
        (
            "A",
            columns(include_str!("reference/fixed_chains_A.csv")),
            [
                0.10793139250457477,
                0.9326057659147126,
                1.0171332701117752,
                123.26348776429424,
                125.31631070329695,
                319.1577106176441,
                0.08400030639653522,
                0.11180061133806274,
                0.08522539142205962,
            ],
        ),
        (
            "B",
            columns(include_str!("reference/fixed_chains_B.csv")),
            [
                0.23293139250457479,
                0.9604816408842325,
                1.0519084796267724,
                74.58091127347073,
                74.90849714241386,
                233.7997176370342,
                0.11121803692158708,
                0.12466323792857903,
                0.11303364923154266,
            ],
        ),
    ];
    let names = ["mean", "sd", "R-hat", "basic ESS", "bulk-ESS", "tail-ESS", "MCSE mean", "MCSE q0.05", "MCSE q0.5"];
    let mut worst: f64 = 0.0;
    for (set, chains, want) in sets {
        let c = refs(&chains);
        assert_eq!((c.len(), c[0].len()), (4, 200));
        let s = summarise(&c);
        let got = [
            s.mean,
            s.sd,
            rhat(&c),
            mean_ess(&c),
            bulk_ess(&c),
            tail_ess(&c),
            mcse_mean(&c),
            mcse_quantile(&c, 0.05),
            mcse_quantile(&c, 0.5),
        ];
        for i in 0..names.len() {
            worst = worst.max(rel(got[i], want[i]));
            assert!(rel(got[i], want[i]) < 1e-10, "set {set} {}: {} vs {}", names[i], got[i], want[i]);
        }
        // The summary shares work between the diagnostics; it must give the same numbers.
        assert_eq!(
            (s.rhat, s.bulk_ess, s.tail_ess, s.mcse_mean, s.mcse_q5, s.mcse_q95),
            (rhat(&c), bulk_ess(&c), tail_ess(&c), mcse_mean(&c), mcse_quantile(&c, 0.05), mcse_quantile(&c, 0.95))
        );
    }
    eprintln!("§3.3 fixed chains: largest relative difference {worst:.2e}");
}

// ---------------------------------------------------------------------------------------------
// Independent numpy reference (crate/tests/reference/diagnostics.py)
// ---------------------------------------------------------------------------------------------

/// Every public diagnostic on the fixture's chain sets (odd length, ties, 1 and 8 chains, heavy
/// tails, unequal scales, antithetic chains that hit the τ̂ floor, 6-draw chains) against the numpy
/// reference, 1e-10 relative (REFERENCES.md §3.1: matching conventions agree to 1e-10).
#[test]
fn independent_numpy_reference_agrees() {
    let fixture = fixture();
    let sets = fixture["chain_sets"].as_array().expect("chain sets");
    assert_eq!(sets.len(), 8);
    let mut worst: f64 = 0.0;
    for set in sets {
        let name = set["name"].as_str().unwrap_or("?");
        let chains: Vec<Vec<f64>> = set["chains"]
            .as_array()
            .expect("chains")
            .iter()
            .map(|c| c.as_array().expect("a chain").iter().map(exact_number).collect())
            .collect();
        let c = refs(&chains);
        let e = &set["expected"];
        let s = summarise(&c);
        let checks = [
            ("mean", s.mean),
            ("sd", s.sd),
            ("q5", s.q5),
            ("q50", s.q50),
            ("q95", s.q95),
            ("rhat", s.rhat),
            ("bulk_ess", s.bulk_ess),
            ("tail_ess", s.tail_ess),
            ("mcse_mean", s.mcse_mean),
            ("mcse_q05", s.mcse_q5),
            ("mcse_q95", s.mcse_q95),
            ("mean_ess", mean_ess(&c)),
            ("mcse_q50", mcse_quantile(&c, 0.5)),
        ];
        for (label, got) in checks {
            let want = number(&e[label]);
            worst = worst.max(rel(got, want));
            assert!(rel(got, want) < 1e-10, "{name} {label}: {got} vs {want}");
        }
        let want_acf: Vec<f64> = e["autocorrelation"].as_array().expect("acf").iter().map(number).collect();
        let got_acf = autocorrelation(&c, 20);
        assert_eq!(got_acf.len(), want_acf.len(), "{name}: lags");
        for (t, (g, w)) in got_acf.iter().zip(&want_acf).enumerate() {
            // Relative to ρ̂_0 = 1: small autocorrelations carry the FFT's absolute rounding error.
            assert!((g - w).abs() < 1e-12, "{name} ρ̂_{t}: {g} vs {w}");
        }
    }
    eprintln!("numpy reference, 8 chain sets: largest relative difference {worst:.2e}");
}

/// Φ⁻¹ against scipy.special.ndtri (relative 1e-14, REFERENCES.md §2's advice for ndtri; scipy uses a
/// different algorithm, so this is a check of AS 241 as implemented), I_x(a, b) against
/// scipy.special.betainc and Beta quantiles against scipy.stats.beta.ppf.
#[test]
fn quantile_functions_match_scipy() {
    let fixture = fixture();
    let special = &fixture["special"];
    let mut worst = [0.0f64; 3];
    for row in special["ndtri"].as_array().expect("ndtri rows") {
        let row = row.as_array().expect("row");
        let (p, want) = (exact_number(&row[0]), number(&row[1]));
        let got = normal_quantile(p);
        worst[0] = worst[0].max(rel(got, want));
        assert!(rel(got, want) < 1e-14, "Φ⁻¹({p}) = {got}, scipy {want}");
    }
    for row in special["betainc"].as_array().expect("betainc rows") {
        let row = row.as_array().expect("row");
        let (a, b, x, want) = (exact_number(&row[0]), exact_number(&row[1]), exact_number(&row[2]), number(&row[3]));
        let got = regularised_incomplete_beta(a, b, x);
        worst[1] = worst[1].max(rel(got, want));
        // 1e-13: the continued fraction and the Stirling front factor each carry a few ulps.
        assert!(rel(got, want) < 1e-13, "I_{x}({a}, {b}) = {got}, scipy {want}");
    }
    for row in special["beta_ppf"].as_array().expect("beta_ppf rows") {
        let row = row.as_array().expect("row");
        let (a, b, q, want) = (exact_number(&row[0]), exact_number(&row[1]), exact_number(&row[2]), number(&row[3]));
        let got = beta_quantile(a, b, q);
        worst[2] = worst[2].max(rel(got, want));
        // 1e-12: the quantile inherits I_x's relative error divided by the elasticity x·f(x)/q.
        assert!(rel(got, want) < 1e-12, "Beta({a}, {b}) quantile {q}: {got}, scipy {want}");
    }
    eprintln!("scipy: Φ⁻¹ {:.1e}, I_x(a,b) {:.1e}, Beta quantile {:.1e}", worst[0], worst[1], worst[2]);
}

// ---------------------------------------------------------------------------------------------
// AR(1) chains with known autocorrelation time (REFERENCES.md §3.2)
// ---------------------------------------------------------------------------------------------

/// Theory: τ = (1 + ρ)/(1 − ρ), ESS = S(1 − ρ)/(1 + ρ) with S = 10000. One run per case must fall in
/// the one-in-a-thousand bands of §3.2 (from 2000 simulated replicates of the reference
/// implementation): bulk-ESS/theory ∈ [0.85, 1.07] (ρ = 0), [0.78, 1.14] (0.5), [0.53, 1.35] (0.9).
/// The basic ESS of the raw draws gets the same band (§3.2: within 0.2% of bulk-ESS on AR(1) chains).
#[test]
fn ar1_single_runs_fall_in_the_published_bands() {
    for (rho, lo, hi) in [(0.0, 0.85, 1.07), (0.5, 0.78, 1.14), (0.9, 0.53, 1.35)] {
        let theory = 10_000.0 * (1.0 - rho) / (1.0 + rho);
        for (layout, chains, len) in [("1×10000", 1, 10_000), ("4×2500", 4, 2500)] {
            let draws = ar1(2021, chains, len, rho);
            let c = refs(&draws);
            let bulk = bulk_ess(&c) / theory;
            let basic = mean_ess(&c) / theory;
            assert!((lo..=hi).contains(&bulk), "ρ {rho} {layout}: bulk-ESS/theory {bulk}");
            assert!((lo..=hi).contains(&basic), "ρ {rho} {layout}: basic ESS/theory {basic}");
        }
    }
}

/// Averages over 50 seeds of 4×2500 AR(1) chains (REFERENCES.md §3.2).
///
/// Bulk-ESS/theory: the reference implementation's mean ratio is 0.986–0.990 (ρ = 0), 0.993–0.995
/// (0.5), 0.993–1.001 (0.9), and one estimate has relative sd 3%, 5.3%, 11–12%, so a 50-seed mean
/// has sd 0.42%, 0.75%, 1.6%. Band = 1 ± (largest bias + about 3.5 sd of the mean):
/// ±3% (ρ = 0: 1.4% + 1.5%), ±3.5% (ρ = 0.5: 0.7% + 2.6%), ±6% (ρ = 0.9: 0.7% + 5.3%, as §3.2 states).
///
/// Tail-ESS against the simulated mean (sd) of §3.2 for the 4×2500 layout: 9735 (281), 5740 (334),
/// 1109 (153); band = 3.5 sd/√50 plus 2 sd/√2000 for the table's own Monte Carlo error.
#[test]
fn ar1_fifty_seed_averages_are_nearly_unbiased() {
    for (rho, bulk_band, tail_mean, tail_sd) in
        [(0.0, 0.03, 9735.0, 281.0), (0.5, 0.035, 5740.0, 334.0), (0.9, 0.06, 1109.0, 153.0)]
    {
        let theory = 10_000.0 * (1.0 - rho) / (1.0 + rho);
        let (mut bulk, mut tail) = (Vec::new(), Vec::new());
        for seed in 0..50 {
            let draws = ar1(1000 + seed, 4, 2500, rho);
            let c = refs(&draws);
            bulk.push(bulk_ess(&c) / theory);
            tail.push(tail_ess(&c));
        }
        let (bulk, tail) = (mean(&bulk), mean(&tail));
        assert!((bulk - 1.0).abs() < bulk_band, "ρ {rho}: mean bulk-ESS/theory {bulk}");
        let tail_band = 3.5 * tail_sd / 50f64.sqrt() + 2.0 * tail_sd / 2000f64.sqrt();
        assert!((tail - tail_mean).abs() < tail_band, "ρ {rho}: mean tail-ESS {tail}, want {tail_mean} ± {tail_band}");
        eprintln!(
            "AR(1) ρ = {rho}: 50-seed mean bulk-ESS/theory {bulk:.4}, tail-ESS {tail:.0} (reference {tail_mean})"
        );
    }
}

/// The chain-combined autocorrelation of one long AR(1) chain estimates ρ^t. Bartlett's (1946)
/// large-sample variance for an AR(1) (recalled, Box & Jenkins' textbook form):
/// var ρ̂_k ≈ [(1 + ρ²)(1 − ρ^{2k})/(1 − ρ²) − 2kρ^{2k}]/n; tolerance 5 sd.
#[test]
fn autocorrelation_of_ar1_is_rho_to_the_lag() {
    let (rho, n) = (0.5f64, 100_000);
    let draws = ar1(77, 1, n, rho);
    let acf = autocorrelation(&refs(&draws), 5);
    assert_eq!(acf.len(), 6);
    assert!((acf[0] - 1.0).abs() < 1e-12); // 1 up to the FFT's rounding
    for (k, &got) in acf.iter().enumerate().skip(1) {
        let r2k = rho.powi(2 * k as i32);
        let var = ((1.0 + rho * rho) * (1.0 - r2k) / (1.0 - rho * rho) - 2.0 * k as f64 * r2k) / n as f64;
        assert!((got - rho.powi(k as i32)).abs() < 5.0 * var.sqrt(), "lag {k}: {got}");
    }
}

// ---------------------------------------------------------------------------------------------
// R-hat (REFERENCES.md §3.4 and §3.5)
// ---------------------------------------------------------------------------------------------

/// §3.4: with 4×1000 iid normal draws the reported R-hat stayed below 1.005 in 4000 simulated runs
/// (largest 1.00294). Twenty seeds here.
#[test]
fn iid_chains_give_rhat_near_one() {
    for seed in 0..20 {
        let draws = ar1(300 + seed, 4, 1000, 0.0);
        let r = rhat(&refs(&draws));
        assert!(r < 1.005, "seed {seed}: R-hat {r}");
    }
}

/// §3.5: chains 0–2 iid N(0, 1), chain 3 iid N(1, 1). The reported R-hat lies in [1.075, 1.13] for
/// N = 1000 (simulated range 1.0793–1.1241) and in [1.05, 1.16] for N = 250 (1.0604–1.1528).
#[test]
fn one_shifted_chain_raises_rhat() {
    for (len, lo, hi) in [(1000, 1.075, 1.13), (250, 1.05, 1.16)] {
        for seed in 0..20 {
            let mut draws = ar1(500 + seed, 4, len, 0.0);
            draws[3].iter_mut().for_each(|x| *x += 1.0);
            let r = rhat(&refs(&draws));
            assert!((lo..=hi).contains(&r), "N {len} seed {seed}: R-hat {r}");
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Monte Carlo standard errors (REFERENCES.md §4)
// ---------------------------------------------------------------------------------------------

/// §4 calibration table, 4×1000 draws: the average estimated MCSE over 100 seeds must match the
/// reference implementation's average, within 4 sd of a 100-run mean (sd of one MCSE from the
/// table, divided by 10), plus 0.3% for the table's own Monte Carlo error and rounding.
/// For iid N(0, 1), S = 4000, it must also sit as close to the asymptotic values of §4,
/// 0.0158114 (mean), 0.0334124 (q0.05), 0.0198166 (q0.5), as the reference average does (0.8–3%
/// above them), give or take the same band.
#[test]
fn average_mcse_matches_the_calibration_table() {
    // (ρ, quantity, reference mean MCSE, sd of one MCSE, asymptotic value for iid draws)
    let rows = [
        (0.0, "mean", 0.01594, 0.00040, Some(0.0158114)),
        (0.0, "q0.05", 0.03445, 0.00614, Some(0.0334124)),
        (0.0, "q0.5", 0.02027, 0.00261, Some(0.0198166)),
        (0.5, "mean", 0.02745, 0.00131, None),
        (0.5, "q0.05", 0.04445, 0.00788, None),
        (0.5, "q0.5", 0.03029, 0.00333, None),
    ];
    let runs = 100;
    for (rho, quantity, want, sd, asymptotic) in rows {
        let estimates: Vec<f64> = (0..runs)
            .map(|seed| {
                let draws = ar1(7000 + seed, 4, 1000, rho);
                let c = refs(&draws);
                match quantity {
                    "mean" => mcse_mean(&c),
                    "q0.05" => mcse_quantile(&c, 0.05),
                    _ => mcse_quantile(&c, 0.5),
                }
            })
            .collect();
        let got = mean(&estimates);
        let band = 4.0 * sd / (runs as f64).sqrt() + 0.003 * want;
        assert!((got - want).abs() < band, "ρ {rho} {quantity}: mean MCSE {got}, want {want} ± {band}");
        if let Some(asymptotic) = asymptotic {
            let allowed = (want - asymptotic).abs() + band;
            assert!((got - asymptotic).abs() < allowed, "{quantity}: mean MCSE {got}, asymptotic {asymptotic}");
        }
        eprintln!("MCSE ρ = {rho} {quantity}: mean over {runs} runs {got:.5} (reference {want})");
    }
}

/// §4's coverage test: over R independent runs with known truth, |estimate − truth| ≤ 2·MCSE should
/// hold in 95% of runs, ± 2·sqrt(0.95·0.05/R); here R = 400 and the band is widened to 3.5 binomial
/// sd (±3.8%) because the quantile MCSE is itself noisy (11–18% relative sd, §4), which lowers
/// coverage slightly below 95%.
#[test]
fn two_mcse_intervals_cover_the_truth_about_95_percent() {
    let runs = 400;
    let q05 = normal_quantile(0.05);
    let mut covered = [0usize; 3];
    for seed in 0..runs {
        let draws = ar1(9000 + seed as u64, 4, 1000, 0.5);
        let s = summarise(&refs(&draws));
        let median_mcse = mcse_quantile(&refs(&draws), 0.5);
        covered[0] += usize::from(s.mean.abs() <= 2.0 * s.mcse_mean);
        covered[1] += usize::from((s.q5 - q05).abs() <= 2.0 * s.mcse_q5);
        covered[2] += usize::from(s.q50.abs() <= 2.0 * median_mcse);
    }
    let band = 3.5 * (0.95f64 * 0.05 / runs as f64).sqrt();
    for (label, hits) in ["mean", "q0.05", "q0.5"].iter().zip(covered) {
        let rate = hits as f64 / runs as f64;
        assert!((rate - 0.95).abs() < band, "{label}: coverage {rate}");
        eprintln!("coverage of ±2 MCSE, {label}: {rate:.3}");
    }
}

// ---------------------------------------------------------------------------------------------
// Properties and degenerate inputs
// ---------------------------------------------------------------------------------------------

/// Rank normalisation makes bulk-ESS and the rank-normalised R-hat invariant under any strictly
/// increasing transformation (Vehtari et al. 2021, the motivation for ranks). The ranks are
/// identical, so the values must be identical to the bit. (The folded R-hat folds about the
/// median on the original scale, so the reported R-hat is not invariant; it is not checked.)
#[test]
fn bulk_ess_ignores_monotone_transformations() {
    let draws = ar1(4, 4, 300, 0.6);
    let transformed: Vec<Vec<f64>> =
        draws.iter().map(|c| c.iter().map(|&x| libm::exp(2.0 * x) + 3.0).collect()).collect();
    assert_eq!(bulk_ess(&refs(&draws)), bulk_ess(&refs(&transformed)));
}

/// numpy.quantile (default "linear"): quantile([1, 2, 4], 0.75) = 3.0, ([0, 10], 0.3) = 3.0.
#[test]
fn quantile_is_numpy_linear() {
    assert_eq!(quantile(&[1.0, 2.0, 4.0], 0.75), 3.0);
    assert_eq!(quantile(&[0.0, 10.0], 0.3), 3.0);
    assert_eq!(quantile(&[5.0], 0.9), 5.0);
    assert!(quantile(&[], 0.5).is_nan());
}

/// A quantity that never moved: mean and quantiles are its value, sd is 0, R-hat/ESS/MCSE are NaN
/// (0/0), and the warning says it never moved (module documentation, degenerate inputs).
#[test]
fn constant_chains_are_reported_as_never_moving() {
    let stuck = vec![vec![0.1; 100]; 4];
    let c = refs(&stuck);
    let s = summarise(&c);
    assert_eq!((s.mean, s.sd, s.q5, s.q95), (0.1, 0.0, 0.1, 0.1));
    for v in [s.rhat, s.bulk_ess, s.tail_ess, s.mcse_mean, s.mcse_q5, rhat(&c), bulk_ess(&c), mean_ess(&c)] {
        assert!(v.is_nan());
    }
    assert!(autocorrelation(&c, 5).is_empty());
    let w = warnings("sigma", &s, 4, &Thresholds::default());
    assert_eq!(w.len(), 1);
    assert!(w[0].starts_with("sigma: every draw equals 0.1; the quantity never moved"), "{}", w[0]);
}

/// Each chain stuck at its own value: R-hat is +∞ and the warning says so.
#[test]
fn chains_stuck_at_different_values_give_infinite_rhat() {
    let stuck = [vec![0.1; 50], vec![0.1; 50], vec![0.3; 50]];
    let s = summarise(&refs(&stuck));
    assert_eq!(s.rhat, f64::INFINITY);
    let w = warnings("mu", &s, 3, &Thresholds::default());
    assert!(w[0].contains("R-hat is infinite"), "{}", w[0]);
}

/// Fewer than 4 draws per chain: R-hat and ESS are NaN, the point summaries are still computed.
/// Exactly 4 draws is enough.
#[test]
fn very_short_chains() {
    let three = [vec![0.1, 0.5, -0.2], vec![0.3, 0.9, 0.4]];
    let s = summarise(&refs(&three));
    assert!(s.rhat.is_nan() && s.bulk_ess.is_nan() && s.mcse_mean.is_nan());
    assert!((s.mean - 2.0 / 6.0).abs() < 1e-15);
    assert!(warnings("a", &s, 2, &Thresholds::default())[0].contains("at least 4 draws"));
    let four = [vec![0.1, 0.5, -0.2, 0.7], vec![0.3, 0.9, 0.4, -0.6]];
    assert!(rhat(&refs(&four)).is_finite() && bulk_ess(&refs(&four)).is_finite());
    let one = [vec![1.0]];
    let s = summarise(&refs(&one));
    assert_eq!(s.mean, 1.0);
    assert!(s.sd.is_nan() && s.rhat.is_nan());
    assert!(autocorrelation(&refs(&one), 3).is_empty());
}

/// NaN or infinite draws, no draws and unequal lengths never panic (module documentation).
#[test]
fn unusable_input_gives_nan_not_a_panic() {
    let with_nan = [vec![0.1, f64::NAN, 0.3, 0.4, 0.5], vec![0.1, 0.2, 0.3, 0.4, 0.5]];
    let with_inf = [vec![0.1, f64::INFINITY, 0.3, 0.4, 0.5], vec![0.1, 0.2, 0.3, 0.4, 0.5]];
    for chains in [&with_nan, &with_inf] {
        let s = summarise(&refs(chains));
        assert!(s.mean.is_nan() && s.q50.is_nan() && s.rhat.is_nan());
        assert!(tail_ess(&refs(chains)).is_nan() && mcse_quantile(&refs(chains), 0.5).is_nan());
        assert!(warnings("x", &s, 2, &Thresholds::default())[0].contains("not finite"));
    }
    assert!(summarise(&[]).mean.is_nan());
    assert!(rhat(&[]).is_nan() && autocorrelation(&[], 4).is_empty());
    let unequal = [vec![0.1, 0.2, 0.3, 0.4, 0.5], vec![0.1, 0.2, 0.3, 0.4]];
    let s = summarise(&refs(&unequal));
    assert!((s.mean - 2.5 / 9.0).abs() < 1e-15 && s.rhat.is_nan()); // mean of all 9 draws
    assert!(mcse_quantile(&refs(&[vec![1.0, 2.0, 3.0, 4.0]]), 1.5).is_nan());
}

/// A single chain works: splitting gives two (Vehtari et al. 2021; REFERENCES.md §3.2 uses 1×10000).
#[test]
fn a_single_chain_is_enough() {
    let draws = ar1(8, 1, 1000, 0.3);
    let s = summarise(&refs(&draws));
    assert!(s.rhat > 0.99 && s.rhat < 1.02, "{}", s.rhat);
    assert!(s.bulk_ess > 300.0 && s.tail_ess > 100.0);
}

/// Random inputs, including non-finite values and tiny or huge magnitudes, never panic, and every
/// ESS lies in (0, S·log10 S] (the τ̂ floor of REFERENCES.md §3.1 step 6f) when defined.
mod never_panics {
    use super::*;
    use proptest::prelude::*;

    fn value() -> impl Strategy<Value = f64> {
        prop_oneof![
            8 => -3.0f64..3.0,
            1 => prop::num::f64::ANY,
            1 => prop::sample::select(vec![0.0, 1.0, -1.0, 1e300, -1e-300]),
        ]
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 300, failure_persistence: None, ..ProptestConfig::default() })]
        #[test]
        fn diagnostics_are_total(chains in prop::collection::vec(prop::collection::vec(value(), 0..12), 0..5)) {
            let c = refs(&chains);
            let s = summarise(&c);
            let _ = warnings("x", &s, c.len(), &Thresholds::default());
            let _ = autocorrelation(&c, 30);
            let _ = mcse_quantile(&c, 0.3);
            let total = c.iter().map(|x| x.len()).sum::<usize>() as f64;
            for ess in [s.bulk_ess, s.tail_ess, mean_ess(&c)] {
                if !ess.is_nan() {
                    prop_assert!(ess > 0.0 && ess <= total * libm::log10(total) * (1.0 + 1e-12), "ESS {}", ess);
                }
            }
        }
    }
}
