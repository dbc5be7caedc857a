//! Both kernels, and a fixed mixture of them, recover closed-form posteriors: the conjugate
//! examples of Gelman et al. (2013), Bayesian Data Analysis 3rd ed., §2.4–2.6 and §3.3, with
//! the data and exact values of our REFERENCES.md §10 (closed forms cross-checked there by
//! quadrature). A fixed kernel that did not leave the posterior invariant would miss them.

mod common;

use common::{column, compile, kernels, sample, slices};
use mixwell::diag;

struct Case {
    model: &'static str,
    quantity: &'static str,
    mean: f64,
    sd: f64,
    q5: f64,
    q95: f64,
    /// Kurtosis of the posterior; above 5 the sample sd is too erratic to test, and the
    /// quantiles carry the check of the spread.
    kurtosis: f64,
}

const CASES: &[Case] = &[
    // BDA3 §2.5: normal mean with known σ = 1, prior N(0, 10²).
    Case {
        model: NORMAL_KNOWN_SD,
        quantity: "mu",
        mean: 2.295409181636727,
        sd: 0.4467670516087703,
        q5: 1.560542776,
        q95: 3.030275587,
        kurtosis: 3.0,
    },
    // BDA3 §3.3: normal with unknown mean and variance, normal–inverse-gamma prior; μ | y ~ t₁₂.
    Case {
        model: NORMAL_INVERSE_GAMMA,
        quantity: "mu",
        mean: 4.922222222222222,
        sd: 0.31964486466416575,
        q5: 4.402160508,
        q95: 5.442283937,
        kurtosis: 3.0 + 6.0 / (12.0 - 4.0),
    },
    // σ² | y ~ InvGamma(6, 4.598): kurtosis 3 + (30a − 66)/((a − 3)(a − 4)) = 22.
    Case {
        model: NORMAL_INVERSE_GAMMA,
        quantity: "variance",
        mean: 0.9195555555555556,
        sd: 0.4597777777777778,
        q5: 0.437340674,
        q95: 1.759568249,
        kurtosis: 22.0,
    },
    // BDA3 §2.4: beta–binomial, Beta(2, 3) prior, 7 of 20 → Beta(9, 16).
    Case {
        model: BETA_BINOMIAL,
        quantity: "theta",
        mean: 0.36,
        sd: 0.09413574486632834,
        q5: 0.211565557,
        q95: 0.521422895,
        kurtosis: 3.0,
    },
    // BDA3 §2.6: gamma–Poisson, Gamma(2, 1) prior, counts summing to 23 over 6 → Gamma(25, 7).
    Case {
        model: GAMMA_POISSON,
        quantity: "rate",
        mean: 3.5714285714285716,
        sd: 0.7142857142857143,
        q5: 2.483160835,
        q95: 4.821771896,
        kurtosis: 3.0 + 6.0 / 25.0,
    },
];

const NORMAL_KNOWN_SD: &str =
    "y = [2.1, 1.4, 3.3, 2.8, 1.9]\nmu : real\ndensity = normal(mu; 0, 10) * normal(y; mu, 1)\n";
const NORMAL_INVERSE_GAMMA: &str = "y = [4.2, 5.1, 3.7, 6.0, 4.8, 5.5, 4.1, 5.9]
mu : real
variance : positive
density = inv_gamma(variance; 2, 2) * normal(mu; 5, sqrt(variance)) * normal(y; mu, sqrt(variance))
";
const BETA_BINOMIAL: &str = "theta : unit\ndensity = beta(theta; 2, 3) * binomial(7; 20, theta)\n";
const GAMMA_POISSON: &str = "y = [3, 5, 2, 4, 6, 3]\nrate : positive\ndensity = gamma(rate; 2, 1) * poisson(y; rate)\n";

#[test]
fn conjugate_posteriors_are_recovered_by_every_kernel() {
    let mut failures = Vec::new();
    for (k, case) in CASES.iter().enumerate() {
        let tape = compile(case.model);
        for (label, settings) in kernels(tape.dim()) {
            let collected = sample(&tape, settings, 4, 1000, 5000, 100 + k as u64);
            let draws = column(&tape, &collected, case.quantity);
            let s = diag::summarise(&slices(&draws));
            // REFERENCES.md §10 advice: with bulk-ESS ≥ 1000, |mean − truth| < 4 MCSE fails with
            // probability 6e-5 for an exact sampler; likewise for the 5% and 95% quantiles with
            // their own MCSE (Vehtari et al. 2021). The sd estimate has relative sd
            // √((κ − 1)/(4 ESS)) for kurtosis κ, so 4 of those.
            assert!(
                s.bulk_ess >= 1000.0,
                "{} with {label}: bulk-ESS {} too small for the test",
                case.quantity,
                s.bulk_ess
            );
            let sd_tolerance = 4.0 * case.sd * ((case.kurtosis - 1.0) / (4.0 * s.bulk_ess)).sqrt();
            let wrong = [
                ("mean", s.mean, case.mean, 4.0 * s.mcse_mean),
                ("5% quantile", s.q5, case.q5, 4.0 * s.mcse_q5),
                ("95% quantile", s.q95, case.q95, 4.0 * s.mcse_q95),
                ("sd", s.sd, case.sd, if case.kurtosis > 5.0 { f64::INFINITY } else { sd_tolerance }),
            ];
            for (what, got, exact, tolerance) in wrong {
                if (got - exact).abs() > tolerance {
                    failures.push(format!(
                        "{} with {label}: {what} {got}, exact {exact}, tolerance {tolerance}",
                        case.quantity
                    ));
                }
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// A derived quantity is summarised like a parameter: σ = √σ² has E[σ] = √b Γ(a − ½)/Γ(a).
#[test]
fn derived_quantities_follow_their_parameters() {
    let source = format!("{NORMAL_INVERSE_GAMMA}sigma = sqrt(variance)\n");
    let tape = compile(&source);
    let collected =
        sample(&tape, mixwell::kernel::Settings::default_for(mixwell::kernel::Kind::Slice, 2), 4, 1000, 5000, 7);
    let s = diag::summarise(&slices(&column(&tape, &collected, "sigma")));
    let exact = 0.9352969302278117; // REFERENCES.md §10(b)
    assert!((s.mean - exact).abs() < 4.0 * s.mcse_mean, "E[sigma] {} vs {exact} (MCSE {})", s.mean, s.mcse_mean);
}

/// The same seed gives the same draws; another seed does not.
#[test]
fn a_seed_fixes_every_draw() {
    let tape = compile(NORMAL_KNOWN_SD);
    for (_, settings) in kernels(1) {
        let a = sample(&tape, settings.clone(), 2, 100, 200, 5);
        let b = sample(&tape, settings.clone(), 2, 100, 200, 5);
        let c = sample(&tape, settings, 2, 100, 200, 6);
        assert_eq!(a.draws, b.draws);
        assert_ne!(a.draws, c.draws);
    }
}
