//! The benchmark models, each as model text and as a hand-written log density on the
//! unconstrained scale (Jacobian included). Data are simulated with a fixed seed.
//!
//! Shared by several bench targets, each of which uses only part of it.
#![allow(dead_code)]

pub mod targets;

use mixwell::rng::Stream;
use std::fmt::Write as _;

/// A log density written by hand, on the unconstrained scale.
pub type Density = Box<dyn Fn(&[f64]) -> f64>;

pub struct Bench {
    pub name: &'static str,
    pub source: String,
    pub by_hand: Density,
}

const HALF_LN_2PI: f64 = 0.918_938_533_204_672_8;

fn list(values: &[f64]) -> String {
    let items: Vec<String> = values.iter().map(|v| format!("{v}")).collect();
    format!("[{}]", items.join(", "))
}

pub fn all() -> Vec<Bench> {
    vec![normal_1000(), logistic(500, "logistic regression, 500 rows × 5 predictors"), correlated_gaussian_10()]
}

/// mu ~ N(0, 10), sigma ~ half-normal(5), y_i ~ N(mu, sigma), i = 1..1000.
fn normal_1000() -> Bench {
    let mut rng = Stream::new(11, 0);
    let y: Vec<f64> = (0..1000).map(|_| 3.0 + 2.0 * rng.normal()).collect();
    let source = format!(
        "y = {}\nmu : real\nsigma : positive\ndensity = normal(mu; 0, 10) * halfnormal(sigma; 5) * normal(y; mu, sigma)\n",
        list(&y)
    );
    let by_hand = move |theta: &[f64]| {
        let (mu, log_sigma) = (theta[0], theta[1]);
        let sigma = libm::exp(log_sigma);
        let prior_mu = -0.5 * (mu / 10.0) * (mu / 10.0) - libm::log(10.0) - HALF_LN_2PI;
        let prior_sigma = libm::log(2.0) - 0.5 * (sigma / 5.0) * (sigma / 5.0) - libm::log(5.0) - HALF_LN_2PI;
        let mut ss = 0.0;
        for &v in &y {
            ss += (v - mu) * (v - mu);
        }
        let likelihood = -0.5 * ss / (sigma * sigma) - y.len() as f64 * (libm::log(sigma) + HALF_LN_2PI);
        prior_mu + prior_sigma + likelihood + log_sigma
    };
    Bench { name: "normal, 1,000 data points", source, by_hand: Box::new(by_hand) }
}

/// Logistic regression on `n` simulated rows of 5 predictors: a ~ N(0, 2.5), b_j ~ N(0, 1),
/// y_i ~ Bernoulli(logistic(a + x_i·b)).
pub fn logistic(n: usize, name: &'static str) -> Bench {
    let k = 5;
    let mut rng = Stream::new(12, 0);
    let x: Vec<f64> = (0..n * k).map(|_| rng.normal()).collect();
    let truth = [0.5, -1.0, 0.25, 0.0, 2.0];
    let y: Vec<f64> = (0..n)
        .map(|i| {
            let eta: f64 = 0.3 + (0..k).map(|j| x[i * k + j] * truth[j]).sum::<f64>();
            f64::from(rng.uniform() < 1.0 / (1.0 + libm::exp(-eta)))
        })
        .collect();
    let mut rows = String::from("[");
    for i in 0..n {
        let _ = write!(rows, "{}{}", if i > 0 { ", " } else { "" }, list(&x[i * k..(i + 1) * k]));
    }
    rows.push(']');
    let source = format!(
        "y = {}\nX = {rows}\na : real\nb : real[{k}]\ndensity = normal(a; 0, 2.5) * normal(b; 0, 1) * bernoulli(y; logistic(a + matvec(X, b)))\n",
        list(&y)
    );
    let softplus = |v: f64| if v > 0.0 { v + libm::log1p(libm::exp(-v)) } else { libm::log1p(libm::exp(v)) };
    let by_hand = move |theta: &[f64]| {
        let (a, b) = (theta[0], &theta[1..]);
        let mut lp = -0.5 * (a / 2.5) * (a / 2.5) - libm::log(2.5) - HALF_LN_2PI;
        for &bj in b {
            lp += -0.5 * bj * bj - HALF_LN_2PI;
        }
        for i in 0..n {
            let mut eta = a;
            for j in 0..k {
                eta += x[i * k + j] * b[j];
            }
            lp += if y[i] == 1.0 { -softplus(-eta) } else { -softplus(eta) };
        }
        lp
    };
    Bench { name, source, by_hand: Box::new(by_hand) }
}

/// x ~ N(0, Σ) in 10 dimensions with Σ_ij = 0.5^|i−j| · s_i s_j.
fn correlated_gaussian_10() -> Bench {
    let d: usize = 10;
    let sd: Vec<f64> = (0..d).map(|i| 0.5 + 0.25 * i as f64).collect();
    let cov: Vec<f64> =
        (0..d * d).map(|k| libm::pow(0.5, (k / d).abs_diff(k % d) as f64) * sd[k / d] * sd[k % d]).collect();
    let rows: Vec<String> = (0..d).map(|i| list(&cov[i * d..(i + 1) * d])).collect();
    let source = format!("S = [{}]\nx : real[{d}]\ndensity = mvnormal(x; 0, S)\n", rows.join(", "));
    let l = nalgebra::DMatrix::from_row_slice(d, d, &cov).cholesky().expect("positive definite").l();
    let inverse = l.clone().try_inverse().expect("invertible");
    let inv: Vec<f64> = (0..d * d).map(|k| inverse[(k / d, k % d)]).collect();
    let log_norm = -(d as f64) * HALF_LN_2PI - (0..d).map(|i| libm::log(l[(i, i)])).sum::<f64>();
    let by_hand = move |x: &[f64]| {
        let mut quad = 0.0;
        for i in 0..d {
            let mut z = 0.0;
            for j in 0..=i {
                z += inv[i * d + j] * x[j];
            }
            quad += z * z;
        }
        log_norm - 0.5 * quad
    };
    Bench { name: "correlated Gaussian, 10 dimensions", source, by_hand: Box::new(by_hand) }
}
