//! The targets of the tuning-quality benchmark, each written as a mixwell model, with the source
//! it comes from and log-density values it must reproduce (checked before anything is timed).

use super::list;
use mixwell::rng::Stream;

pub struct Target {
    pub name: &'static str,
    /// Where the target comes from, and the choices made here.
    pub source: &'static str,
    pub model: String,
    /// Costly to evaluate (tens of times more than the others): measured with fewer draws.
    pub dear: bool,
    /// Points on the unconstrained scale and the log density there, with where each value comes from.
    pub checks: Vec<Check>,
}

pub struct Check {
    pub theta: Vec<f64>,
    pub log_density: f64,
    pub from: &'static str,
}

pub fn all() -> Vec<Target> {
    vec![ill_conditioned_gaussian(), banana(), funnel(), two_modes(), logistic()]
}

const HALF_LN_2PI: f64 = 0.918_938_533_204_672_8;

/// N(0, Σ) in 10 dimensions with Σ = Q·diag(λ)·Qᵀ: eigenvalues λ log-spaced from 0.01 to 1 (so
/// standard deviations along the principal axes from 0.1 to 1, condition number exactly 100),
/// turned by a fixed random rotation Q (the QR factor of a seeded Gaussian matrix, signs fixed so
/// it is Haar-distributed; Mezzadri 2007), so every pair of coordinates is correlated.
fn ill_conditioned_gaussian() -> Target {
    let d = 10;
    let mut rng = Stream::new(21, 0);
    let g = nalgebra::DMatrix::from_fn(d, d, |_, _| rng.normal());
    let qr = g.qr();
    let (mut q, r) = (qr.q(), qr.r());
    for j in 0..d {
        if r[(j, j)] < 0.0 {
            q.column_mut(j).neg_mut();
        }
    }
    let lambda: Vec<f64> = (0..d).map(|i| 0.01 * libm::pow(100.0, i as f64 / (d - 1) as f64)).collect();
    let sigma = nalgebra::DMatrix::from_fn(d, d, |i, j| (0..d).map(|k| q[(i, k)] * lambda[k] * q[(j, k)]).sum::<f64>());
    let sigma = (&sigma + sigma.transpose()) * 0.5;
    let rows: Vec<String> = (0..d).map(|i| list(&sigma.row(i).iter().copied().collect::<Vec<_>>())).collect();
    let model = format!(
        "# 10-d Gaussian, condition number 100, rotated\nS = [{}]\nx : real[{d}]\ndensity = mvnormal(x; 0, S)\n",
        rows.join(", ")
    );
    // log N(x; 0, Σ) = −(d/2)log 2π − ½ Σ log λ_k − ½ Σ_k (q_kᵀx)²/λ_k, from the eigen-decomposition.
    let log_density = |x: &[f64]| {
        let mut lp = -(d as f64) * HALF_LN_2PI;
        for k in 0..d {
            let z: f64 = (0..d).map(|i| q[(i, k)] * x[i]).sum();
            lp -= 0.5 * (libm::log(lambda[k]) + z * z / lambda[k]);
        }
        lp
    };
    let points = [vec![0.0; d], (0..d).map(|i| 0.1 * i as f64 - 0.3).collect::<Vec<_>>()];
    let checks = points
        .into_iter()
        .map(|theta| Check {
            log_density: log_density(&theta),
            theta,
            from: "the eigen-decomposition used to build Σ (the model's mvnormal Cholesky path is independent)",
        })
        .collect();
    Target {
        name: "Gaussian 10-d, κ = 100",
        source: "eigen-sds 0.1–1 log-spaced, Haar rotation (common practice; cf. the random-covariance Gaussian \
                 of Roberts & Rosenthal 2009, JCGS 18(2), from memory)",
        model,
        dear: false,
        checks,
    }
}

/// The twisted Gaussian of Haario, Saksman & Tamminen (1999), f_b = N(0, diag(100, 1, …)) ∘ φ_b with
/// φ_b(x) = (x₁, x₂ + b·x₁² − 100b, x₃, …). b = 0.03 in d = 8 is the "moderately twisted" case of
/// Haario, Saksman & Tamminen (2001, from memory) with check values in REFERENCES §12.3: x₂ has
/// variance 19 against a conditional variance of 1, so a proposal shaped by the global covariance
/// is too wide across the arm. The strongly twisted b = 0.1 is left out: already at b = 0.03 a
/// random walk's ESS estimates from 100,000 draws per chain scatter by about 20%, and a stronger
/// twist slows the walk further.
fn banana() -> Target {
    let model = "# Twisted Gaussian, Haario, Saksman & Tamminen (1999), b = 0.03, d = 8\n\
                 x1 : real\nx2 : real\nrest : real[6]\n\
                 density = normal(x1; 0, 10) * normal(x2 + 0.03 * x1^2 - 3; 0, 1) * normal(rest; 0, 1)\n";
    let at = |x1: f64, x2: f64| {
        let mut theta = vec![0.0; 8];
        theta[0] = x1;
        theta[1] = x2;
        theta
    };
    Target {
        name: "banana 8-d, b = 0.03",
        source: "Haario, Saksman & Tamminen (1999), Comput. Stat. 14(3); REFERENCES §12.3",
        model: model.into(),
        dear: false,
        checks: vec![
            Check { theta: at(0.0, 0.0), log_density: -14.154093358631426, from: "REFERENCES §12.3 (0 ∈ ℝ⁸)" },
            // The 2-d check values plus the six N(0, 1) coordinates at 0: −8.6404… − 1 − 6·½log 2π.
            Check {
                theta: at(10.0, -5.0),
                log_density: -17.14046215940339 - 6.0 * HALF_LN_2PI,
                from: "REFERENCES §12.3 ((10, −5) in 2-d, plus six coordinates at 0)",
            },
            Check {
                theta: at(-5.0, 2.0),
                log_density: -4.296712159403391 - 6.0 * HALF_LN_2PI,
                from: "REFERENCES §12.3 ((−5, 2) in 2-d, plus six coordinates at 0)",
            },
        ],
    }
}

/// Neal's (2003) funnel in 10 dimensions, centred: v ~ N(0, 3), x_k | v ~ N(0, e^{v/2}), k = 1..9.
fn funnel() -> Target {
    let model = "# Neal's funnel (2003), centred, 10-d\nv : real\nx : real[9]\n\
                 density = normal(v; 0, 3) * normal(x; 0, exp(v / 2))\n";
    let at = |v: f64, x: &dyn Fn(usize) -> f64| std::iter::once(v).chain((1..=9).map(x)).collect::<Vec<f64>>();
    Target {
        name: "funnel 10-d",
        source: "Neal (2003), Ann. Statist. 31(3); REFERENCES §12.4",
        model: model.into(),
        dear: false,
        checks: vec![
            Check { theta: at(0.0, &|_| 0.0), log_density: -10.287997620714837, from: "REFERENCES §12.4" },
            Check { theta: at(-3.0, &|_| 0.1), log_density: 1.8081532177417179, from: "REFERENCES §12.4" },
            Check { theta: at(2.0, &|k| k as f64 - 5.0), log_density: -23.570278340035436, from: "REFERENCES §12.4" },
        ],
    }
}

/// An equal mixture of N((−3, −3), I) and N((3, 3), I): two modes 6√2 ≈ 8.5 sds apart, with the
/// density midway 2e^{−9} of the peaks'. A random walk crosses only by long jumps along the
/// diagonal, which the pilot's covariance (when it saw both modes) points along.
fn two_modes() -> Target {
    let model = "# Two modes, equal weights\nx : real[2]\n\
                 density = 0.5 * normal(x; -3, 1) + 0.5 * normal(x; 3, 1)\n";
    let from = "scipy 1.17.1: logaddexp of log 0.5 + norm.logpdf sums";
    Target {
        name: "two modes 2-d",
        source: "common practice: the simplest target a random walk can only mix on by jumping",
        model: model.into(),
        dear: false,
        checks: vec![
            Check { theta: vec![0.0, 0.0], log_density: -10.837877066409344, from },
            Check { theta: vec![3.0, 3.0], log_density: -2.5310242469692903, from },
            Check { theta: vec![1.0, -2.0], log_density: -11.02854856183156, from },
        ],
    }
}

/// The benchmark logistic regression with 100 rows instead of 500: the same posterior shape
/// (6 correlated coefficients, close to Gaussian) at a fifth of the cost per evaluation, so the
/// oracle's grid of long slice runs fits the time budget.
fn logistic() -> Target {
    let bench = super::logistic(100, "logistic regression, 100 rows × 5 predictors");
    let checks = [vec![0.0; 6], vec![0.3, 0.5, -1.0, 0.25, 0.0, 2.0], vec![-1.0, 1.0, 1.0, -1.0, 0.5, -0.5]]
        .into_iter()
        .map(|theta| Check {
            log_density: (bench.by_hand)(&theta),
            theta,
            from: "the hand-written density of the evaluator benchmark",
        })
        .collect();
    Target {
        name: "logistic 100×5",
        source: "simulated data, a ~ N(0, 2.5), b ~ N(0, 1) (as the evaluator benchmark)",
        model: bench.source,
        dear: true,
        checks,
    }
}
