//! Multivariate densities checked against outside references: scipy.stats and 50-digit mpmath
//! values from `tests/reference/multivariate.py`, the data-covariance `MvNormal`, the
//! Dirichlet–multinomial closed form, and for LKJ (Lewandowski, Kurowicka & Joe 2009) the
//! normalising constant by quadrature and the marginal of one correlation,
//! (r + 1)/2 ~ Beta(η − 1 + d/2, η − 1 + d/2) (LKJ 2009, §3.2; section from memory), by
//! importance sampling with a tolerance of 4 Monte Carlo standard errors.

// Check values are copied digit for digit from REFERENCES.md (17 significant digits of a 50-digit
// mpmath value), more digits than a double holds; one of them is log 2 by design.
#![allow(clippy::excessive_precision, clippy::approx_constant)]

use mixwell::dist::{
    Col, MvNormal, categorical_log_density, categorical_scores_log_density, dirichlet_log_density,
    lkj_cholesky_log_density, lkj_log_normaliser, multinomial_log_density, multinomial_scores_log_density,
    mvnormal_cholesky_log_density, mvnormal_covariance_log_density, special, sum_categorical_log_density,
    sum_categorical_scores_log_density,
};
use mixwell::rng::Stream;
use proptest::prelude::*;
use serde_json::Value;

fn fixture() -> Value {
    serde_json::from_str(include_str!("reference/multivariate.json")).expect("fixture parses")
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array().expect("array").iter().map(|x| x.as_f64().expect("number")).collect()
}

fn rel(got: f64, want: f64) -> f64 {
    if got == want { 0.0 } else { ((got - want) / want).abs() }
}

/// The product contract for log densities (as in distributions.rs): 1e-12 relative, with an
/// absolute floor of 1e-12 for values near zero.
fn close(got: f64, want: f64, tol: f64) -> bool {
    got == want || (got - want).abs() <= tol.max(tol * want.abs())
}

// ---------------------------------------------------------------------------------------------
// Fixture: scipy 1.17.1 and mpmath 50 digits.

#[test]
fn dirichlet_matches_scipy_and_mpmath() {
    for case in fixture()["dirichlet"].as_array().expect("dirichlet") {
        let (x, alpha) = (floats(&case["x"]), floats(&case["alpha"]));
        let got = dirichlet_log_density(&x, Col::vector(&alpha));
        let exact = case["exact"].as_f64().unwrap();
        // Large shapes (α ≈ 10⁴) put the log-beta terms at ≈ 2·10⁵, whose rounding is ≈ 4e-11.
        assert!(close(got, exact, 1e-11), "α {alpha:?} x {x:?}: {got} vs mpmath {exact}");
        let scipy = case["scipy"].as_f64().unwrap();
        assert!(close(got, scipy, 1e-8), "α {alpha:?}: {got} vs scipy {scipy}");
        if let Some(published) = case.get("published").and_then(Value::as_f64) {
            // REFERENCES.md §1, dirichlet_3d rows.
            assert!(close(got, published, 1e-14), "α {alpha:?}: {got} vs REFERENCES.md {published}");
        }
    }
    // Symmetric Dirichlet through a broadcast α equals the spelled-out vector.
    let x = [0.1, 0.6, 0.3];
    assert_eq!(dirichlet_log_density(&x, Col::scalar(&[2.5])), dirichlet_log_density(&x, Col::vector(&[2.5; 3])));
}

#[test]
fn multinomial_matches_scipy_and_mpmath() {
    for case in fixture()["multinomial"].as_array().expect("multinomial") {
        let (k, p) = (floats(&case["k"]), floats(&case["p"]));
        let got = multinomial_log_density(&k, &p);
        let exact = case["exact"].as_f64().unwrap();
        assert!(close(got, exact, 1e-12), "k {k:?} p {p:?}: {got} vs mpmath {exact}");
        let scipy = case["scipy"].as_f64().unwrap();
        // scipy sums log-gamma values of order n log n: for n = 10⁶ its rounding is ≈ 1e-9.
        assert!(close(got, scipy, 1e-8), "k {k:?}: {got} vs scipy {scipy}");
        // Scores: p = softmax(log p), the same distribution renormalised — the fixture's p sum to
        // 1 only to within 1e-16, which n = 10⁶ turns into 1e-10 of log probability.
        let scores: Vec<f64> = p.iter().map(|v| libm::log(*v)).collect();
        let via_scores = multinomial_scores_log_density(&k, &scores);
        assert!(close(via_scores, exact, 1e-10), "k {k:?}: scores {via_scores} vs {exact}");
    }
}

#[test]
fn categorical_matches_references() {
    // REFERENCES.md §1, categorical rows (0-based there, 1-based here).
    let theta = [0.2, 0.5, 0.3];
    for (k, want) in [(1.0, -1.6094379124341003), (2.0, -0.69314718055994531), (3.0, -1.203972804325936)] {
        assert!(close(categorical_log_density(k, &theta), want, 1e-15), "k = {k}");
    }
    assert!(close(
        sum_categorical_log_density(&[1.0, 2.0, 2.0], &theta),
        -1.6094379124341003 - 2.0 * 0.69314718055994531,
        1e-15
    ));
    // scipy.special.log_softmax and mpmath at 50 digits.
    for case in fixture()["softmax"].as_array().expect("softmax") {
        let scores = floats(&case["scores"]);
        let exact = floats(&case["exact"]);
        let scipy = floats(&case["scipy"]);
        for (i, (&e, &s)) in exact.iter().zip(&scipy).enumerate() {
            let got = categorical_scores_log_density((i + 1) as f64, &scores);
            assert!(close(got, e, 1e-14), "scores {scores:?} k {}: {got} vs mpmath {e}", i + 1);
            assert!(close(got, s, 1e-12), "scores {scores:?} k {}: {got} vs scipy {s}", i + 1);
        }
        let ks: Vec<f64> = (1..=scores.len()).map(|k| k as f64).collect();
        let total: f64 = exact.iter().sum();
        assert!(close(sum_categorical_scores_log_density(&ks, &scores), total, 1e-13));
    }
}

#[test]
fn mvnormal_parameter_forms_match_scipy_mpmath_and_the_data_form() {
    for case in fixture()["mvnormal"].as_array().expect("mvnormal") {
        let d = case["dim"].as_u64().unwrap() as usize;
        let (x, mean, chol, cov) =
            (floats(&case["x"]), floats(&case["mean"]), floats(&case["chol"]), floats(&case["cov"]));
        let mut scratch = vec![0.0; d * d + d];
        let by_chol = mvnormal_cholesky_log_density(&x, &mean, &chol, d, &mut scratch);
        let by_cov = mvnormal_covariance_log_density(&x, &mean, &cov, d, &mut scratch);
        for (got, key) in [(by_chol, "chol"), (by_cov, "cov")] {
            let exact = case[format!("exact_{key}")].as_f64().unwrap();
            let scipy = case[format!("scipy_{key}")].as_f64().unwrap();
            assert!(close(got, exact, 1e-12), "d {d} {key}: {got} vs mpmath {exact}");
            assert!(close(got, scipy, 1e-10), "d {d} {key}: {got} vs scipy {scipy}");
        }
        // The data-covariance form (nalgebra's factorisation, inverse factor kept) agrees.
        let data = MvNormal::new(&cov, d).expect("fixture covariance is valid");
        let rows = data.log_density_rows(&x, &mean);
        assert!(close(rows, by_cov, 1e-12), "d {d}: data form {rows} vs parameter form {by_cov}");
        // A mean per row gives the same as the shared mean repeated.
        let repeated: Vec<f64> = (0..x.len() / d).flat_map(|_| mean.iter().copied()).collect();
        assert_eq!(mvnormal_cholesky_log_density(&x, &repeated, &chol, d, &mut scratch), by_chol);
    }
}

// ---------------------------------------------------------------------------------------------
// LKJ: the normalising constant by quadrature, the marginal of a correlation by importance sampling.

/// ∫₋₁¹ f by the tanh–sinh rule (Takahasi & Mori 1974), which is indifferent to the endpoint
/// singularities of (1 − r²)^(η−1); step h over |t| ≤ 3.5.
fn tanh_sinh(f: &mut impl FnMut(f64) -> f64, h: f64) -> f64 {
    let half_pi = core::f64::consts::FRAC_PI_2;
    let n = (3.5 / h) as i64;
    let mut total = 0.0;
    for i in -n..=n {
        let t = i as f64 * h;
        let u = half_pi * libm::sinh(t);
        let x = libm::tanh(u);
        let w = half_pi * libm::cosh(t) / (libm::cosh(u) * libm::cosh(u));
        if x.abs() < 1.0 {
            total += w * f(x);
        }
    }
    h * total
}

/// The Cholesky factor with free entries below the diagonal, rows completed to unit length.
fn factor(below: &[&[f64]]) -> Vec<f64> {
    let d = below.len() + 1;
    let mut l = vec![0.0; d * d];
    l[0] = 1.0;
    for (i, row) in below.iter().enumerate() {
        let r = i + 1;
        let mut length = 0.0;
        for (j, &v) in row.iter().enumerate() {
            l[r * d + j] = v;
            length += v * v;
        }
        l[r * d + r] = libm::sqrt(1.0 - length);
    }
    l
}

/// d = 2: the constant matches mpmath's quadrature of (1 − r²)^(η−1), and the density of L
/// integrates to 1 over its one free entry.
#[test]
fn lkj_normaliser_for_two_dimensions_matches_quadrature() {
    for case in fixture()["lkj_d2"].as_array().expect("lkj_d2") {
        let eta = case["eta"].as_f64().unwrap();
        let log_integral = case["log_integral"].as_f64().unwrap();
        assert!(close(lkj_log_normaliser(2, eta), -log_integral, 1e-14), "η = {eta}");
        // r = sin(πu/2): the factor (1 − r²)^(η−½) of the substitution is bounded for η ≥ ½.
        let total = tanh_sinh(
            &mut |u| {
                let theta = core::f64::consts::FRAC_PI_2 * u;
                let l = [1.0, 0.0, libm::sin(theta), libm::cos(theta)];
                libm::exp(lkj_cholesky_log_density(&l, 2, eta)) * core::f64::consts::FRAC_PI_2 * libm::cos(theta)
            },
            1.0 / 64.0,
        );
        assert!(rel(total, 1.0) < 1e-12, "η = {eta}: ∫ = {total}");
    }
}

/// d = 3: the density of the three free entries of L — L₂₁ ∈ (−1, 1) and (L₃₁, L₃₂) in the unit
/// disk, in polar coordinates — integrates to 1. L₂₁ = sin θ and radius ρ = sin ψ make the
/// integrand bounded at the edges for η ≥ ½ (as in the d = 2 test).
#[test]
fn lkj_density_for_three_dimensions_integrates_to_one() {
    use core::f64::consts::{FRAC_PI_2, FRAC_PI_4, TAU};
    for eta in [0.8, 1.0, 2.0, 4.5] {
        let total = tanh_sinh(
            &mut |u| {
                let theta = FRAC_PI_2 * u;
                let l21 = libm::sin(theta);
                let inner = tanh_sinh(
                    &mut |v| {
                        let psi = FRAC_PI_4 * (1.0 + v);
                        let rho = libm::sin(psi);
                        // Only the diagonal enters the density, so 8 trapezoid points in the angle
                        // integrate it exactly; they still exercise the whole factor.
                        let mut ring = 0.0;
                        for k in 0..8 {
                            let phi = TAU * k as f64 / 8.0;
                            let l = factor(&[&[l21], &[rho * libm::cos(phi), rho * libm::sin(phi)]]);
                            ring += libm::exp(lkj_cholesky_log_density(&l, 3, eta));
                        }
                        ring * TAU / 8.0 * rho * libm::cos(psi) * FRAC_PI_4
                    },
                    1.0 / 32.0,
                );
                inner * libm::cos(theta) * FRAC_PI_2
            },
            1.0 / 32.0,
        );
        assert!(rel(total, 1.0) < 1e-11, "η = {eta}: ∫ = {total}");
    }
}

/// A point uniform in the unit ball of dimension k (a normal direction, radius U^(1/k)).
fn uniform_in_ball(rng: &mut Stream, k: usize, out: &mut [f64]) {
    let mut norm = 0.0;
    for v in out[..k].iter_mut() {
        *v = rng.normal();
        norm += *v * *v;
    }
    let radius = libm::pow(rng.uniform(), 1.0 / k as f64) / libm::sqrt(norm);
    out[..k].iter_mut().for_each(|v| *v *= radius);
}

/// The marginal of the last correlation r_{d−1,d} = Σₖ L_{d−1,k} L_{d,k} — which involves every
/// part of the factor — against Beta(η − 1 + d/2, η − 1 + d/2) for (r + 1)/2 (statrs' Beta
/// distribution function), by self-normalised importance sampling from the uniform distribution
/// on the rows' balls. Each estimate must be within 4 of its Monte Carlo standard errors (delta
/// method for a ratio estimator).
#[test]
fn lkj_marginal_of_one_correlation_is_the_published_beta() {
    use statrs::distribution::{Beta, ContinuousCDF};
    for (d, eta, seed) in [(3usize, 1.5, 11u64), (4, 1.0, 12), (4, 3.0, 13)] {
        let beta = eta - 1.0 + d as f64 / 2.0;
        let reference = Beta::new(beta, beta).unwrap();
        let thresholds = [0.1, 0.25, 0.5, 0.75, 0.9];
        let mut rng = Stream::new(seed, 0);
        let n = 400_000;
        let mut weights = Vec::with_capacity(n);
        let mut values = Vec::with_capacity(n);
        let mut row = [0.0; 4];
        let mut l = vec![0.0; d * d];
        for _ in 0..n {
            l.iter_mut().for_each(|v| *v = 0.0);
            l[0] = 1.0;
            for r in 1..d {
                uniform_in_ball(&mut rng, r, &mut row);
                let mut length = 0.0;
                for j in 0..r {
                    l[r * d + j] = row[j];
                    length += row[j] * row[j];
                }
                l[r * d + r] = libm::sqrt(1.0 - length);
            }
            // The uniform proposal's density is constant, so the weight is the LKJ density.
            weights.push(libm::exp(lkj_cholesky_log_density(&l, d, eta)));
            let (a, b) = (d - 2, d - 1);
            values.push((0..=a).map(|k| l[a * d + k] * l[b * d + k]).sum::<f64>());
        }
        let total: f64 = weights.iter().sum();
        let estimate = |f: &dyn Fn(f64) -> f64| -> (f64, f64) {
            let mean = weights.iter().zip(&values).map(|(w, &r)| w * f(r)).sum::<f64>() / total;
            let var =
                weights.iter().zip(&values).map(|(w, &r)| (w * (f(r) - mean)).powi(2)).sum::<f64>() / (total * total);
            (mean, var.sqrt())
        };
        for t in thresholds {
            let (p, mcse) = estimate(&|r| if 0.5 * (r + 1.0) <= t { 1.0 } else { 0.0 });
            let want = reference.cdf(t);
            assert!((p - want).abs() <= 4.0 * mcse, "d {d} η {eta} t {t}: {p} ± {mcse} vs Beta {want}");
        }
        // Var r = 4 Var((r + 1)/2) = 4β²/((2β)²(2β + 1)) = 1/(2β + 1), and E r = 0.
        let (second, mcse) = estimate(&|r| r * r);
        let want = 1.0 / (2.0 * beta + 1.0);
        assert!((second - want).abs() <= 4.0 * mcse, "d {d} η {eta}: E r² = {second} ± {mcse} vs {want}");
    }
}

// ---------------------------------------------------------------------------------------------
// Dirichlet–multinomial conjugacy: Dir(p; α) Mult(k; p) / Dir(p; α + k) does not depend on p and
// equals the Dirichlet-multinomial probability Γ(A) n! Πᵢ Γ(αᵢ + kᵢ) / (Γ(A + n) Πᵢ Γ(αᵢ) kᵢ!),
// A = Σα (closed form; e.g. BDA3 §3.4 for the conjugacy).

fn simplex_point(raw: &[f64]) -> Vec<f64> {
    let total: f64 = raw.iter().sum();
    let mut p: Vec<f64> = raw.iter().map(|v| v / total).collect();
    let head: f64 = p[..p.len() - 1].iter().sum();
    let last = p.len() - 1;
    p[last] = 1.0 - head;
    p
}

proptest! {
    #[test]
    fn dirichlet_multinomial_conjugacy(
        alpha in prop::collection::vec(0.2f64..20.0, 3),
        counts in prop::collection::vec(0u32..40, 3),
        raw in prop::collection::vec(0.05f64..1.0, 3),
    ) {
        let p = simplex_point(&raw);
        prop_assume!(p.iter().all(|&v| v > 0.0));
        let k: Vec<f64> = counts.iter().map(|&c| f64::from(c)).collect();
        let posterior: Vec<f64> = alpha.iter().zip(&k).map(|(a, c)| a + c).collect();
        let ratio = dirichlet_log_density(&p, Col::vector(&alpha)) + multinomial_log_density(&k, &p)
            - dirichlet_log_density(&p, Col::vector(&posterior));
        let (a_total, n): (f64, f64) = (alpha.iter().sum(), k.iter().sum());
        let mut closed = special::lgamma(a_total) + special::ln_factorial(n) - special::lgamma(a_total + n);
        for (a, c) in alpha.iter().zip(&k) {
            closed += special::lgamma(a + c) - special::lgamma(*a) - special::ln_factorial(*c);
        }
        prop_assert!((ratio - closed).abs() <= 1e-11 * (1.0 + closed.abs()), "{} vs {}", ratio, closed);
    }

    #[test]
    fn multivariate_densities_never_panic(
        values in prop::collection::vec(prop_oneof![Just(f64::NAN), Just(f64::INFINITY), Just(-1.0), Just(0.0), -5.0f64..5.0], 1..10),
        d in 1usize..4,
    ) {
        let mut scratch = vec![0.0; 32];
        let _ = dirichlet_log_density(&values, Col::vector(&values));
        let _ = multinomial_log_density(&values, &values);
        let _ = multinomial_scores_log_density(&values, &values);
        let _ = categorical_log_density(values[0], &values);
        let _ = categorical_scores_log_density(values[0], &values);
        let _ = lkj_cholesky_log_density(&values, d, values[0]);
        let _ = mvnormal_cholesky_log_density(&values, &values, &values, d, &mut scratch);
        let _ = mvnormal_covariance_log_density(&values, &values, &values, d, &mut scratch);
    }
}
