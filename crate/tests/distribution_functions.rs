//! Distribution functions and the special functions beneath them, checked against 50-digit mpmath
//! values written by `tests/reference/cdfs.py` (each value from the definition: closed forms,
//! direct quadrature of the density over the smaller side, direct sums of probabilities), against
//! `statrs`, and by properties (complements add to one, monotonicity, intervals are differences,
//! NaN and out-of-domain inputs never panic).
//!
//! Tolerance: relative error ≤ 1e-12 of every value and every logarithm, except where the reference
//! is below 1e-300 in magnitude: there only an absolute bound of 1e-300 applies, because subnormal
//! doubles hold fewer digits (log P(X ≤ x) = −3e-316 cannot be stored to 12 digits).

use mixwell::dist::special::LN_2;
use mixwell::dist::{
    Col, Family, log_ccdf, log_ccdf_each, log_cdf, log_cdf_each, log_density, log_density_each, log_interval,
    log_interval_each, special, sum_log_ccdf, sum_log_cdf, sum_log_density, sum_log_interval,
};
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

// ---------------------------------------------------------------------------------------------
// statrs 0.19 (an independent implementation) on a sample of central points. statrs computes the
// distribution functions in double precision by its own series and fractions; it is itself off by
// up to about 1e-10 relative here (its lognormal survival at 2.1 is 0.229062649047507, mpmath's
// 0.229062649024557), so the tolerance of this cross-check is 1e-9 (the 1e-12 contract is the
// mpmath fixture's).

#[test]
fn a_sample_agrees_with_statrs() {
    use statrs::distribution::{
        Bernoulli, Beta, Binomial, Cauchy, ContinuousCDF, DiscreteCDF, Exp, Gamma, InverseGamma, Laplace, LogNormal,
        NegativeBinomial, Normal, Poisson, StudentsT, Uniform, Weibull,
    };
    let (mut checked, mut worst) = (0, 0.0_f64);
    let mut check = |name: &str, params: &[f64], x: f64, cdf: f64, sf: f64| {
        let family = fam(name);
        let (got_cdf, got_sf) = (libm::exp(log_cdf(family, x, params)), libm::exp(log_ccdf(family, x, params)));
        for (got, want, what) in [(got_cdf, cdf, "cdf"), (got_sf, sf, "sf")] {
            let e = error(got, want);
            assert!(e <= 1e-9, "{name} {what} {params:?} x={x}: {got} vs statrs {want}");
            worst = worst.max(e);
            checked += 1;
        }
    };
    for (mu, sd) in [(0.0, 1.0), (1.5, 0.3)] {
        let d = Normal::new(mu, sd).unwrap();
        let l = LogNormal::new(mu, sd).unwrap();
        for x in [-2.0, 0.1, 1.2, 3.0] {
            check("normal", &[mu, sd], x, d.cdf(x), d.sf(x));
            check("lognormal", &[mu, sd], x.abs() + 0.1, l.cdf(x.abs() + 0.1), l.sf(x.abs() + 0.1));
        }
        let c = Cauchy::new(mu, sd).unwrap();
        let la = Laplace::new(mu, sd).unwrap();
        for x in [-3.0, 0.5, 2.0] {
            check("cauchy", &[mu, sd], x, c.cdf(x), c.sf(x));
            check("laplace", &[mu, sd], x, la.cdf(x), la.sf(x));
        }
    }
    // statrs StudentsT::new(location, scale, freedom).
    for (nu, mu, s) in [(1.0, 0.0, 1.0), (3.5, -1.0, 2.0), (30.0, 0.5, 0.5)] {
        let d = StudentsT::new(mu, s, nu).unwrap();
        for x in [-4.0, -0.3, 0.0, 1.0, 6.0] {
            check("student_t", &[nu, mu, s], x, d.cdf(x), d.sf(x));
        }
    }
    for (a, b) in [(0.5, 1.0), (2.0, 3.0), (7.5, 0.4)] {
        let g = Gamma::new(a, b).unwrap();
        let ig = InverseGamma::new(a, b).unwrap();
        let be = Beta::new(a, b).unwrap();
        let w = Weibull::new(a, b).unwrap();
        for x in [0.05, 0.4, 1.0, 3.0, 9.0] {
            check("gamma", &[a, b], x, g.cdf(x), g.sf(x));
            check("inv_gamma", &[a, b], x, ig.cdf(x), ig.sf(x));
            check("weibull", &[a, b], x, w.cdf(x), w.sf(x));
        }
        for x in [0.01, 0.3, 0.5, 0.9] {
            check("beta", &[a, b], x, be.cdf(x), be.sf(x));
        }
    }
    let e = Exp::new(0.7).unwrap();
    let u = Uniform::new(-1.0, 2.0).unwrap();
    for x in [0.1, 1.0, 1.9] {
        check("exponential", &[0.7], x, e.cdf(x), e.sf(x));
        check("uniform", &[-1.0, 2.0], x, u.cdf(x), u.sf(x));
    }
    for rate in [0.5, 7.5, 120.0] {
        let d = Poisson::new(rate).unwrap();
        for k in [0u64, 3, 7, 110, 130] {
            check("poisson", &[rate], k as f64, d.cdf(k), d.sf(k));
        }
    }
    // statrs Binomial::new(p, n); NegativeBinomial(r, p) with r = φ, p = φ/(μ + φ).
    for (n, p) in [(10u64, 0.3), (60, 0.92)] {
        let d = Binomial::new(p, n).unwrap();
        for k in [0u64, 3, 9, 55] {
            check("binomial", &[n as f64, p], k as f64, d.cdf(k), d.sf(k));
        }
    }
    for (mu, phi) in [(2.0, 1.0), (10.0, 0.5), (4.0, 30.0)] {
        let d = NegativeBinomial::new(phi, phi / (mu + phi)).unwrap();
        for k in [0u64, 2, 5, 20] {
            check("negbinomial", &[mu, phi], k as f64, d.cdf(k), d.sf(k));
        }
    }
    let b = Bernoulli::new(0.3).unwrap();
    check("bernoulli", &[0.3], 0.0, b.cdf(0), b.sf(0));
    println!("statrs: {checked} values, worst relative difference {worst:.1e}");
    assert!(checked >= 200, "only {checked} statrs comparisons");
}

// ---------------------------------------------------------------------------------------------
// Properties over random families, parameters and points.

/// Valid parameters for a family from three uniforms: scales and rates log-uniform over e^±5,
/// shapes over e^−4…e^8, locations over ±100, probabilities over (0, 1), trials up to 2000.
fn params_for(family: Family, u: [f64; 3]) -> Vec<f64> {
    let scale = |v: f64| libm::exp(-5.0 + 10.0 * v);
    let shape = |v: f64| libm::exp(-4.0 + 12.0 * v);
    let loc = |v: f64| -100.0 + 200.0 * v;
    match family {
        Family::Normal | Family::Cauchy | Family::Laplace | Family::Logistic | Family::LogNormal => {
            vec![loc(u[0]) / if family == Family::LogNormal { 20.0 } else { 1.0 }, scale(u[1])]
        }
        Family::StudentT => vec![shape(u[0]), loc(u[1]), scale(u[2])],
        Family::Exponential | Family::Poisson | Family::HalfNormal | Family::HalfCauchy => vec![scale(u[0])],
        Family::Gamma | Family::InvGamma | Family::Beta | Family::Weibull => vec![shape(u[0]), scale(u[1])],
        Family::Uniform => vec![loc(u[0]), loc(u[0]) + scale(u[1])],
        Family::Binomial => vec![(2000.0 * u[0]).floor(), u[1]],
        Family::NegBinomial => vec![scale(u[0]) * 20.0, shape(u[1])],
        Family::Bernoulli => vec![u[0]],
        Family::BernoulliLogit | Family::PoissonLog => vec![loc(u[0]) / 10.0],
        Family::BinomialLogit => vec![(2000.0 * u[0]).floor(), loc(u[1]) / 10.0],
    }
}

/// A point for a family: around its location, spread over many scales, or a count.
fn point_for(family: Family, params: &[f64], t: f64) -> f64 {
    let spread = libm::sinh(12.0 * t); // ±8e4, dense near 0
    match family {
        Family::Normal | Family::Cauchy | Family::Laplace | Family::Logistic => params[0] + params[1] * spread,
        Family::StudentT => params[1] + params[2] * spread,
        Family::Uniform => params[0] + (params[1] - params[0]) * (0.5 + 0.6 * t),
        Family::Beta => 1.0 / (1.0 + libm::exp(-3.0 * spread.signum() * spread.abs().sqrt())),
        Family::Poisson
        | Family::Binomial
        | Family::NegBinomial
        | Family::Bernoulli
        | Family::BernoulliLogit
        | Family::BinomialLogit
        | Family::PoissonLog => {
            (libm::exp(6.0 * (t + 1.0)) - 1.0).floor() // 0 … 1.6e5, increasing in t
        }
        _ => libm::exp(3.0 * spread.signum() * spread.abs().sqrt().min(12.0)),
    }
}

/// a ≤ b up to rounding (1e-12 relative), infinities included.
fn below(a: f64, b: f64) -> bool {
    a <= b || (a - b).abs() <= 1e-12 * b.abs()
}

fn family_strategy() -> impl Strategy<Value = Family> {
    (0..Family::ALL.len()).prop_map(|i| Family::ALL[i])
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    /// P(X ≤ x) + P(X > x) = 1 where both are representable; both sides are monotone in x; an
    /// interval is at most either side, and equals F(b) − F(a) where that difference does not
    /// cancel; the column forms equal the scalar forms.
    #[test]
    fn sides_are_complementary_monotone_and_consistent(
        family in family_strategy(),
        u in prop::array::uniform3(0.0f64..1.0),
        t in -1.0f64..1.0,
        step in 0.0f64..0.3,
    ) {
        let params = params_for(family, u);
        let x = point_for(family, &params, t);
        let x2 = point_for(family, &params, (t + step).min(1.0));
        let (lc, ls) = (log_cdf(family, x, &params), log_ccdf(family, x, &params));
        let (lc2, ls2) = (log_cdf(family, x2, &params), log_ccdf(family, x2, &params));
        for v in [lc, ls, lc2, ls2] {
            prop_assert!(v <= 0.0, "{family:?}{params:?} at {x}/{x2}: {v}");
        }
        if lc > -700.0 && ls > -700.0 {
            let total = libm::exp(lc) + libm::exp(ls);
            prop_assert!((total - 1.0).abs() <= 1e-12, "{family:?}{params:?} at {x}: F + S = {total}");
        }
        prop_assert!(x2 >= x);
        prop_assert!(below(lc, lc2), "{family:?}{params:?}: F({x2}) {lc2} < F({x}) {lc}");
        prop_assert!(below(ls2, ls), "{family:?}{params:?}: S({x2}) {ls2} > S({x}) {ls}");
        let li = log_interval(family, x, x2, &params);
        prop_assert!(!li.is_nan());
        prop_assert!(below(li, lc2.min(ls)), "{family:?}{params:?} ({x}, {x2}]: {li} vs {lc2}, {ls}");
        // The difference, taken on the side where it does not cancel, when it is at least a tenth
        // of the larger operand: then its own rounding is below 1e-14 relative.
        let (big, small) = if lc2 < -LN_2 { (libm::exp(lc2), libm::exp(lc)) } else if ls > -LN_2 { (libm::exp(ls), libm::exp(ls2)) } else { (1.0, libm::exp(lc) + libm::exp(ls2)) };
        let difference = big - small;
        if difference > 0.1 * big && difference > 1e-290 {
            prop_assert!((li - libm::log(difference)).abs() <= 1e-12 * libm::log(difference).abs().max(1.0),
                "{family:?}{params:?} ({x}, {x2}]: {li} vs log {difference}");
        }
        // Columns: the broadcast-parameter walk, the per-element walk and the scalar form agree bit
        // for bit.
        let xs = [x, x2, 0.5 * (x + x2)];
        let scalar: Vec<f64> = xs.iter().map(|&v| log_cdf(family, v, &params)).collect();
        let mut each = [0.0; 3];
        let broadcast: Vec<Col> = params.iter().map(|p| Col::scalar(core::slice::from_ref(p))).collect();
        log_cdf_each(family, Col::vector(&xs), &broadcast, &mut each);
        prop_assert_eq!(&each[..], &scalar[..]);
        let repeated: Vec<[f64; 3]> = params.iter().map(|&p| [p; 3]).collect();
        let per_element: Vec<Col> = repeated.iter().map(|p| Col::vector(p)).collect();
        log_cdf_each(family, Col::vector(&xs), &per_element, &mut each);
        prop_assert_eq!(&each[..], &scalar[..]);
        let sum = sum_log_cdf(family, 3, Col::vector(&xs), &broadcast);
        let want: f64 = scalar.iter().sum();
        prop_assert!(sum == want || (sum.is_infinite() && want.is_infinite()), "{sum} vs {want}");
        let mut each_s = [0.0; 3];
        log_ccdf_each(family, Col::vector(&xs), &per_element, &mut each_s);
        for (v, &xi) in each_s.iter().zip(&xs) {
            prop_assert_eq!(*v, log_ccdf(family, xi, &params));
        }
        let his = [x2, x2 + 1.0, x2];
        let mut each_i = [0.0; 3];
        log_interval_each(family, Col::vector(&xs), Col::vector(&his), &broadcast, &mut each_i);
        prop_assert_eq!(each_i[0], li);
        let total_i = sum_log_interval(family, 3, Col::vector(&xs), Col::vector(&his), &broadcast);
        prop_assert!(total_i == each_i.iter().sum::<f64>() || total_i == f64::NEG_INFINITY);
    }

    /// NaN, infinite, zero and negative parameters or points give −∞ or a log-probability ≤ 0 —
    /// never NaN, never a panic; an empty or reversed interval gives −∞.
    #[test]
    fn bad_input_never_panics_nor_gives_nan(
        family in family_strategy(),
        raw in prop::array::uniform3(prop_oneof![Just(f64::NAN), Just(f64::INFINITY), Just(f64::NEG_INFINITY), Just(0.0), Just(-1.0), Just(1e308), Just(5e-324), -10.0f64..10.0]),
        x in prop_oneof![Just(f64::NAN), Just(f64::INFINITY), Just(f64::NEG_INFINITY), Just(0.0), -1e6f64..1e6],
        y in -1e6f64..1e6,
    ) {
        let params = &raw[..family.params().len()];
        for v in [log_cdf(family, x, params), log_ccdf(family, x, params), log_interval(family, x, y, params), log_interval(family, y, x, params)] {
            prop_assert!(!v.is_nan() && v <= 0.0, "{family:?}{params:?} at {x}, {y}: {v}");
        }
        if x.is_nan() {
            prop_assert_eq!(log_cdf(family, x, params), f64::NEG_INFINITY);
            prop_assert_eq!(log_ccdf(family, x, params), f64::NEG_INFINITY);
        }
        if x.is_nan() || y.is_nan() || x >= y {
            prop_assert_eq!(log_interval(family, x, y, params), f64::NEG_INFINITY);
        }
        // Wrong numbers of parameters and columns too short are refused, not read out of bounds.
        prop_assert_eq!(log_cdf(family, 0.5, &[1.0; 4]), f64::NEG_INFINITY);
        let short = [0.5];
        let cols: Vec<Col> = params.iter().map(|p| Col::scalar(core::slice::from_ref(p))).collect();
        prop_assert_eq!(sum_log_ccdf(family, 3, Col::vector(&short), &cols), f64::NEG_INFINITY);
        let mut out = [0.0; 3];
        log_density_each(family, Col::vector(&short), &cols, &mut out);
        prop_assert!(out.iter().all(|&v| v == f64::NEG_INFINITY));
    }
}

/// Each family's density per element equals the scalar density, and the sum equals
/// `sum_log_density` (the per-observation terms a mixture needs).
#[test]
fn log_density_each_matches_the_scalar_density() {
    for &family in Family::ALL {
        let params = params_for(family, [0.4, 0.6, 0.3]);
        let xs: Vec<f64> = (0..7).map(|i| point_for(family, &params, -0.6 + 0.2 * i as f64)).collect();
        let cols: Vec<Col> = params.iter().map(|p| Col::scalar(core::slice::from_ref(p))).collect();
        let mut out = vec![0.0; xs.len()];
        log_density_each(family, Col::vector(&xs), &cols, &mut out);
        for (v, &x) in out.iter().zip(&xs) {
            assert_eq!(*v, log_density(family, x, &params), "{family:?} at {x}");
        }
        let sum = sum_log_density(family, xs.len(), Col::vector(&xs), &cols);
        assert_eq!(sum, out.iter().sum::<f64>(), "{family:?}");
    }
}

/// Parameters outside their domain (BDA3 Appendix A definitions) give −∞ for both sides and for
/// intervals, whether the parameters are broadcast or per element.
#[test]
fn parameters_outside_their_domain_give_minus_infinity() {
    let (nan, inf) = (f64::NAN, f64::INFINITY);
    let cases: &[(&str, &[f64], f64)] = &[
        ("normal", &[0.0, 0.0], 0.5),
        ("normal", &[inf, 1.0], 0.5),
        ("normal", &[0.0, -1.0], 0.5),
        ("student_t", &[0.0, 0.0, 1.0], 0.5),
        ("student_t", &[3.0, -inf, 1.0], 0.5),
        ("student_t", &[3.0, 0.0, inf], 0.5),
        ("cauchy", &[nan, 1.0], 0.5),
        ("laplace", &[0.0, 0.0], 0.5),
        ("logistic", &[inf, 1.0], 0.5),
        ("exponential", &[-1.0], 0.5),
        ("gamma", &[0.0, 1.0], 0.5),
        ("gamma", &[2.0, inf], 0.5),
        ("gamma", &[2.0, -1.0], 0.5),
        ("inv_gamma", &[2.0, 0.0], 0.5),
        ("beta", &[1.0, -2.0], 0.5),
        ("lognormal", &[-inf, 1.0], 0.5),
        ("uniform", &[2.0, 1.0], 1.5),
        ("halfnormal", &[0.0], 0.5),
        ("halfcauchy", &[nan], 0.5),
        ("weibull", &[1.0, 0.0], 0.5),
        ("poisson", &[0.0], 1.0),
        ("binomial", &[10.5, 0.5], 3.0),
        ("binomial", &[10.0, 1.5], 3.0),
        ("negbinomial", &[1.0, 0.0], 1.0),
        ("bernoulli", &[1.5], 0.0),
        ("bernoulli_logit", &[nan], 0.0),
    ];
    for &(name, params, x) in cases {
        let family = fam(name);
        let ninf = f64::NEG_INFINITY;
        assert_eq!(log_cdf(family, x, params), ninf, "{name}{params:?} log_cdf");
        assert_eq!(log_ccdf(family, x, params), ninf, "{name}{params:?} log_ccdf");
        assert_eq!(log_interval(family, x - 1.0, x + 1.0, params), ninf, "{name}{params:?} log_interval");
        // Per element: the first element valid, the second not.
        let valid = params_for(family, [0.5, 0.5, 0.5]);
        let columns: Vec<[f64; 2]> = valid.iter().zip(params).map(|(&v, &bad)| [v, bad]).collect();
        let cols: Vec<Col> = columns.iter().map(|c| Col::vector(c)).collect();
        let mut out = [0.0; 2];
        log_ccdf_each(family, Col::scalar(&[x]), &cols, &mut out);
        assert_eq!(out[0], log_ccdf(family, x, &valid), "{name}: the valid element");
        assert_eq!(out[1], ninf, "{name}{params:?} per element");
    }
}
