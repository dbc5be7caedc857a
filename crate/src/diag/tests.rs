//! Checks of the intermediate statistics that the public functions do not expose: the classic,
//! split and rank-normalised R-hats, the folded R-hat and the two quantile ESS values.
//! The public functions are checked in crate/tests/diagnostics.rs.

use super::draws::{Draws, sorted_draws};
use super::ess::{effective_sample_size, potential_scale_reduction};
use super::{folded_rhat, quantile_ess, quantile_sorted};

fn rel(got: f64, want: f64) -> f64 {
    if got == want { 0.0 } else { (got - want).abs() / want.abs() }
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

/// Fixture inputs are decimal strings, parsed by Rust's correctly rounded parser (serde_json's
/// default float parsing is best-effort and may be an ulp off, which would break ties).
fn exact_number(v: &serde_json::Value) -> f64 {
    v.as_str().and_then(|s| s.parse().ok()).expect("a decimal string")
}

struct Intermediate {
    classic: f64,
    split: f64,
    rank_split: f64,
    folded: f64,
    ess_q05: f64,
    ess_q95: f64,
}

fn intermediate(chains: &[Vec<f64>]) -> Intermediate {
    let refs: Vec<&[f64]> = chains.iter().map(|c| c.as_slice()).collect();
    let draws = Draws::checked(&refs, 4).expect("usable chains");
    let sorted = sorted_draws(&draws.values);
    Intermediate {
        classic: potential_scale_reduction(&draws),
        split: potential_scale_reduction(&draws.split()),
        rank_split: potential_scale_reduction(&draws.split().rank_normalised()),
        folded: folded_rhat(&draws, &sorted),
        ess_q05: quantile_ess(&draws, quantile_sorted(&sorted, 0.05)),
        ess_q95: quantile_ess(&draws, quantile_sorted(&sorted, 0.95)),
    }
}

/// REFERENCES.md §3.3, fixed chains A and B ([computed] there by an independent implementation of
/// Vehtari et al. 2021): every intermediate value to 1e-10 relative, the tolerance the section
/// gives for matching conventions.
#[test]
fn fixed_chains_intermediate_values() {
    let a = columns(include_str!("../../tests/reference/fixed_chains_A.csv"));
    let b = columns(include_str!("../../tests/reference/fixed_chains_B.csv"));
    assert_eq!(&a[0][..3], &[-2.0455022083749475, -2.9536331306837376, -1.9901391191766624]);
    let cases = [
        (
            "A",
            intermediate(&a),
            [
                1.00608257640753,
                1.0174307201225554,
                1.0171332701117752,
                0.9988790498383022,
                319.1577106176441,
                481.45742915350985,
            ],
        ),
        (
            "B",
            intermediate(&b),
            [
                1.0458203066398515,
                1.0519286968806794,
                1.0519084796267724,
                0.9987280249253517,
                233.7997176370342,
                467.01182856880354,
            ],
        ),
    ];
    for (set, got, want) in cases {
        let got = [got.classic, got.split, got.rank_split, got.folded, got.ess_q05, got.ess_q95];
        let names = ["classic R-hat", "split R-hat", "rank split R-hat", "folded R-hat", "ESS_q(0.05)", "ESS_q(0.95)"];
        for i in 0..6 {
            assert!(rel(got[i], want[i]) < 1e-10, "set {set} {}: {} vs {}", names[i], got[i], want[i]);
        }
    }
}

/// The same intermediates against the independent numpy implementation
/// (crate/tests/reference/diagnostics.py, fixture diagnostics_fixture.json), 1e-10 relative.
#[test]
fn fixture_intermediate_values() {
    let fixture: serde_json::Value =
        serde_json::from_str(include_str!("../../tests/reference/diagnostics_fixture.json")).expect("fixture parses");
    let sets = fixture["chain_sets"].as_array().expect("chain sets");
    assert!(sets.len() >= 8);
    for set in sets {
        let name = set["name"].as_str().unwrap_or("?");
        let chains: Vec<Vec<f64>> = set["chains"]
            .as_array()
            .expect("chains")
            .iter()
            .map(|c| c.as_array().expect("a chain").iter().map(exact_number).collect())
            .collect();
        let got = intermediate(&chains);
        let e = &set["expected"];
        for (label, value) in [
            ("rhat_bulk", got.rank_split),
            ("rhat_folded", got.folded),
            ("ess_q05", got.ess_q05),
            ("ess_q95", got.ess_q95),
        ] {
            let want = e[label].as_f64().expect("expected value");
            assert!(rel(value, want) < 1e-10, "{name} {label}: {value} vs {want}");
        }
    }
}

/// Each chain stuck at its own value: W = 0 < B, so R-hat is +∞; var⁺ > 0 and every ρ̂_t = 1, so
/// τ̂ = −1 + 2·2·(number of pairs) and the ESS is small but defined (module table).
#[test]
fn chains_stuck_apart() {
    let a = [1.0; 8];
    let b = [2.0; 8];
    let draws = Draws::checked(&[&a, &b], 4).expect("usable");
    let split = draws.split();
    assert_eq!(potential_scale_reduction(&split), f64::INFINITY);
    // 4 split chains of 4 draws: pairs (ρ0+ρ1), (ρ2+ρ3) = 2 each, τ̂ = −1 + 2·4 = 7, ESS = 16/7.
    assert!(rel(effective_sample_size(&split), 16.0 / 7.0) < 1e-14);
}
