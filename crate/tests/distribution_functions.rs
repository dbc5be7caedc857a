//! Distribution functions and the special functions beneath them, checked against 50-digit mpmath
//! values written by `tests/reference/cdfs.py` (each value from the definition: closed forms,
//! direct quadrature of the density over the smaller side, direct sums of probabilities), against
//! `statrs`, and by properties (complements add to one, monotonicity, intervals are differences,
//! NaN and out-of-domain inputs never panic).
//!
//! Tolerance: relative error ≤ 1e-12 of every value and every logarithm, except where the reference
//! is below 1e-300 in magnitude: there only an absolute bound of 1e-300 applies, because subnormal
//! doubles hold fewer digits (log P(X ≤ x) = −3e-316 cannot be stored to 12 digits).

use mixwell::dist::{Col, Family, log_ccdf, log_cdf, log_interval, special};
use proptest::prelude::*;
use serde_json::Value;

const REL_TOL: f64 = 1e-12;
const SUBNORMAL_BAND: f64 = 1e-300;

/// A number of the fixture: JSON numbers, or the strings "inf" / "-inf".
fn num(v: &Value) -> f64 {
    match v {
        Value::String(s) if s == "inf" => f64::INFINITY,
        Value::String(s) if s == "-inf" => f64::NEG_INFINITY,
        other => other.as_f64().unwrap_or_else(|| panic!("not a number: {other}")),
    }
}

fn nums(v: &Value) -> Vec<f64> {
    v.as_array().expect("array").iter().map(num).collect()
}

fn fixture() -> Value {
    serde_json::from_str(include_str!("reference/cdfs.json")).expect("fixture parses")
}

/// Relative error, with the absolute band near zero; 0 when both are the same infinity.
fn error(got: f64, want: f64) -> f64 {
    if got == want {
        0.0
    } else if want.abs() < SUBNORMAL_BAND {
        (got - want).abs() / SUBNORMAL_BAND
    } else {
        ((got - want) / want).abs()
    }
}

fn fam(name: &str) -> Family {
    Family::from_name(name).unwrap_or_else(|| panic!("no family named {name}"))
}

/// Worst error per group, with where it occurred; failures listed in full.
#[derive(Default)]
struct Ledger {
    worst: std::collections::BTreeMap<String, (f64, String)>,
    failures: Vec<String>,
    checked: usize,
}

impl Ledger {
    fn record(&mut self, group: &str, at: String, got: f64, want: f64) {
        self.checked += 1;
        let e = if got.is_nan() { f64::INFINITY } else { error(got, want) };
        let entry = self.worst.entry(group.to_string()).or_insert((0.0, String::new()));
        if e > entry.0 || entry.1.is_empty() {
            *entry = (e, at.clone());
        }
        if e > REL_TOL {
            self.failures.push(format!("{group} {at}: got {got:e}, want {want:e} (error {e:.1e})"));
        }
    }

    fn finish(self, what: &str) {
        println!("{what}: {} values; worst relative error per function:", self.checked);
        for (group, (e, at)) in &self.worst {
            println!("  {group:<32} {e:9.2e}  at {at}");
        }
        assert!(self.failures.is_empty(), "{} failures:\n{}", self.failures.len(), self.failures.join("\n"));
    }
}

// ---------------------------------------------------------------------------------------------
// Special functions against mpmath (tests/reference/cdfs.py, "special").

#[test]
fn special_functions_match_mpmath_to_1e_12() {
    let fixture = fixture();
    let mut ledger = Ledger::default();
    for case in fixture["special"].as_array().expect("special") {
        let name = case["function"].as_str().expect("function");
        let a = nums(&case["args"]);
        let got = match name {
            "erf" => special::erf(a[0]),
            "erfc" => special::erfc(a[0]),
            "erfcx" => special::erfcx(a[0]),
            "normal_cdf" => special::normal_cdf(a[0]),
            "ln_normal_cdf" => special::ln_normal_cdf(a[0]),
            "gamma_p" => special::gamma_p(a[0], a[1]),
            "gamma_q" => special::gamma_q(a[0], a[1]),
            "ln_gamma_p" => special::ln_gamma_p(a[0], a[1]),
            "ln_gamma_q" => special::ln_gamma_q(a[0], a[1]),
            "incomplete_beta" => special::incomplete_beta(a[0], a[1], a[2]),
            "incomplete_beta_complement" => special::incomplete_beta_complement(a[0], a[1], a[2]),
            "ln_incomplete_beta" => special::ln_incomplete_beta(a[0], a[1], a[2]),
            "ln_incomplete_beta_complement" => special::ln_incomplete_beta_complement(a[0], a[1], a[2]),
            other => panic!("fixture names unknown function {other}"),
        };
        ledger.record(name, format!("{a:?}"), got, num(&case["exact"]));
    }
    assert!(ledger.checked >= 700, "only {} special-function values", ledger.checked);
    ledger.finish("special functions");
}

// ---------------------------------------------------------------------------------------------
// Every family's log-CDF and log-survival against mpmath ("families"), intervals ("intervals").

#[test]
fn every_family_log_cdf_and_log_ccdf_match_mpmath_to_1e_12() {
    let fixture = fixture();
    let mut ledger = Ledger::default();
    let mut seen = std::collections::BTreeSet::new();
    for case in fixture["families"].as_array().expect("families") {
        let name = case["family"].as_str().expect("family");
        let family = fam(name);
        seen.insert(name.to_string());
        let params = nums(&case["params"]);
        let x = num(&case["x"]);
        let at = format!("{params:?} x={x:e}");
        ledger.record(&format!("{name} log_cdf"), at.clone(), log_cdf(family, x, &params), num(&case["log_cdf"]));
        ledger.record(&format!("{name} log_ccdf"), at, log_ccdf(family, x, &params), num(&case["log_ccdf"]));
    }
    for &family in Family::ALL {
        assert!(seen.contains(family.name()), "{family:?} has no reference values");
    }
    ledger.finish("log_cdf / log_ccdf");
}

#[test]
fn intervals_match_mpmath_to_1e_12() {
    let fixture = fixture();
    let mut ledger = Ledger::default();
    for case in fixture["intervals"].as_array().expect("intervals") {
        let name = case["family"].as_str().expect("family");
        let params = nums(&case["params"]);
        let (lo, hi) = (num(&case["lower"]), num(&case["upper"]));
        let got = log_interval(fam(name), lo, hi, &params);
        ledger.record(name, format!("{params:?} ({lo:e}, {hi:e}]"), got, num(&case["log_interval"]));
    }
    ledger.finish("log_interval");
}
