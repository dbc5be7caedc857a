//! Gaussian-process regression: the tuner's surrogate of a mixing score over kernel settings.
//!
//! What it is: exact GP regression with a constant mean and an ARD squared-exponential or ARD
//! Matérn-5/2 covariance (Rasmussen & Williams 2006, *Gaussian Processes for Machine Learning*,
//! Algorithm 2.1), its log marginal likelihood and gradient (eq. 5.9), and a fit of the
//! hyperparameters by maximising that likelihood — by default with weak priors on the length
//! scales and the noise, see [`FitSettings`] — from several seeded starts. What it is not: a
//! general GP library — no sparse approximations, no other kernels; it is sized for the tuner's
//! few dimensions (1–3, inputs on [0, 1]^d) and at most a few hundred observations.
//!
//! The mean is constant. [`Gp::new`] takes it as given (zero reproduces the textbook examples);
//! [`fit`] uses the sample mean of `y` and keeps it fixed while the hyperparameters move, so the
//! likelihood's gradient needs no mean term.
//!
//! Hyperparameters on log scale are ordered (log ℓ₁, …, log ℓ_d, log σ_f, log σ_n) — standard
//! deviations, not variances — as in the check values of REFERENCES §7.

use nalgebra::{DMatrix, DVector, Dyn, linalg::Cholesky};
use serde::{Deserialize, Serialize};

use crate::rng::Stream;

const SQRT_5: f64 = 2.236_067_977_499_79;
const LN_2PI: f64 = 1.837_877_066_409_345_5;

/// A covariance function: both are stationary, with one length scale per input dimension (ARD).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Kernel {
    /// k = σ_f² exp(−r²/2), with r² = Σ_j (x_j − x'_j)²/ℓ_j² (Rasmussen & Williams 2006, eqs. 5.1–5.2).
    SquaredExponential,
    /// k = σ_f² (1 + √5 r + 5r²/3) exp(−√5 r) (Rasmussen & Williams 2006, eq. 4.17, ν = 5/2).
    Matern52,
}

impl Kernel {
    /// The covariance k(a, b) under `hyper` (noise not included).
    ///
    /// # Panics
    /// If `a`, `b` and `hyper.length_scales` differ in length (a programming error).
    pub fn value(self, hyper: &Hyperparameters, a: &[f64], b: &[f64]) -> f64 {
        assert!(a.len() == b.len() && a.len() == hyper.length_scales.len(), "kernel inputs differ in dimension");
        hyper.signal_variance * self.correlation(scaled_sq_dist(a, b, &hyper.length_scales))
    }

    /// k/σ_f² as a function of the scaled squared distance r².
    fn correlation(self, r2: f64) -> f64 {
        match self {
            Kernel::SquaredExponential => libm::exp(-0.5 * r2),
            Kernel::Matern52 => {
                let r = r2.sqrt();
                (1.0 + SQRT_5 * r + 5.0 / 3.0 * r2) * libm::exp(-SQRT_5 * r)
            }
        }
    }

    /// g(r²) such that ∂k/∂log ℓ_j = σ_f² g(r²) (x_j − x'_j)²/ℓ_j². For the Matérn kernel
    /// ∂k/∂r = −σ_f² (5/3) r (1 + √5 r) e^{−√5 r} and ∂r/∂log ℓ_j = −r_j²/r, so r cancels and the
    /// derivative is smooth at r = 0.
    fn length_scale_factor(self, r2: f64) -> f64 {
        match self {
            Kernel::SquaredExponential => libm::exp(-0.5 * r2),
            Kernel::Matern52 => {
                let r = r2.sqrt();
                5.0 / 3.0 * (1.0 + SQRT_5 * r) * libm::exp(-SQRT_5 * r)
            }
        }
    }
}

fn scaled_sq_dist(a: &[f64], b: &[f64], length_scales: &[f64]) -> f64 {
    a.iter().zip(b).zip(length_scales).map(|((p, q), l)| ((p - q) / l) * ((p - q) / l)).sum()
}

/// Kernel hyperparameters, reported as fitted.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Hyperparameters {
    /// σ_f², the prior variance of the latent function.
    pub signal_variance: f64,
    /// ℓ_j, one per input dimension.
    pub length_scales: Vec<f64>,
    /// σ_n², the variance of the observation noise.
    pub noise_variance: f64,
}

impl Hyperparameters {
    /// (log ℓ₁, …, log ℓ_d, log σ_f, log σ_n): the coordinates of the fit and of the gradient.
    pub fn log_params(&self) -> Vec<f64> {
        let mut theta: Vec<f64> = self.length_scales.iter().map(|&l| libm::log(l)).collect();
        theta.push(0.5 * libm::log(self.signal_variance));
        theta.push(0.5 * libm::log(self.noise_variance));
        theta
    }

    /// Inverse of [`Hyperparameters::log_params`]; `theta` has d + 2 entries.
    fn from_log_params(theta: &[f64]) -> Self {
        let d = theta.len() - 2;
        Hyperparameters {
            signal_variance: libm::exp(2.0 * theta[d]),
            length_scales: theta[..d].iter().map(|&t| libm::exp(t)).collect(),
            noise_variance: libm::exp(2.0 * theta[d + 1]),
        }
    }

    fn check(&self, dim: usize) -> Result<(), GpError> {
        let positive = |v: f64| v.is_finite() && v > 0.0;
        if self.length_scales.len() != dim {
            return Err(GpError::BadHyperparameters("one length scale per input dimension is needed"));
        }
        if !positive(self.signal_variance) || !self.length_scales.iter().all(|&l| positive(l)) {
            return Err(GpError::BadHyperparameters("signal variance and length scales must be positive and finite"));
        }
        if !(self.noise_variance.is_finite() && self.noise_variance >= 0.0) {
            return Err(GpError::BadHyperparameters("noise variance must be non-negative and finite"));
        }
        Ok(())
    }
}

/// Why a GP could not be built or fitted.
#[derive(Clone, Debug, PartialEq)]
pub enum GpError {
    /// No observations.
    NoData,
    /// `x` does not hold `dim` coordinates for each of the `y` values, or `dim` is zero.
    ShapeMismatch { dim: usize, x_len: usize, y_len: usize },
    /// An input or target is NaN or infinite.
    NonFinite,
    /// The hyperparameters are unusable; the text says which.
    BadHyperparameters(&'static str),
    /// K + σ_n²I stayed numerically singular even with the largest jitter.
    NotPositiveDefinite,
}

impl core::fmt::Display for GpError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match self {
            GpError::NoData => write!(f, "a Gaussian process needs at least one observation"),
            GpError::ShapeMismatch { dim, x_len, y_len } => write!(
                f,
                "inputs hold {x_len} numbers, which is not {y_len} points of dimension {dim} (dimension must be at least 1)"
            ),
            GpError::NonFinite => write!(f, "an input or observed value is NaN or infinite"),
            GpError::BadHyperparameters(why) => write!(f, "bad hyperparameters: {why}"),
            GpError::NotPositiveDefinite => {
                write!(f, "the covariance matrix is singular even after adding jitter")
            }
        }
    }
}

impl std::error::Error for GpError {}

fn check_data(dim: usize, x: &[f64], y: &[f64]) -> Result<(), GpError> {
    if dim == 0 || x.len() != dim * y.len() {
        return Err(GpError::ShapeMismatch { dim, x_len: x.len(), y_len: y.len() });
    }
    if y.is_empty() {
        return Err(GpError::NoData);
    }
    if !x.iter().chain(y).all(|v| v.is_finite()) {
        return Err(GpError::NonFinite);
    }
    Ok(())
}

/// Predictive distribution at one test input.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Prediction {
    /// Predictive mean f̄* (Rasmussen & Williams 2006, eq. 2.25, plus the constant mean).
    pub mean: f64,
    /// Variance of the latent f* (eq. 2.26).
    pub latent_variance: f64,
    /// Variance of a new noisy observation y*: latent variance + σ_n² (+ any jitter).
    pub noisy_variance: f64,
}

/// Jitter starts at this fraction of the mean diagonal and grows tenfold per failed attempt.
const FIRST_JITTER: f64 = 1e-10;
const JITTER_ATTEMPTS: usize = 9;
/// A Cholesky pivot L_ii² below this fraction of the largest diagonal entry counts as singular:
/// the factor exists but would lose most digits.
const MIN_PIVOT_RATIO: f64 = 1e-12;

/// A Gaussian process conditioned on data, ready to predict (Rasmussen & Williams 2006, Alg. 2.1).
#[derive(Clone, Debug)]
pub struct Gp {
    kernel: Kernel,
    hyper: Hyperparameters,
    dim: usize,
    x: Vec<f64>,
    mean: f64,
    jitter: f64,
    chol: Cholesky<f64, Dyn>,
    alpha: DVector<f64>,
    log_ml: f64,
}

impl Gp {
    /// Condition a GP with fixed hyperparameters and constant mean `mean` on `y` observed at `x`
    /// (row-major, `dim` numbers per point). If K + σ_n²I is not numerically positive definite
    /// (e.g. duplicate inputs with no noise), jitter εI is added, ε growing tenfold from
    /// 1e-10 × the mean diagonal; [`Gp::jitter`] reports it. It is treated as extra noise.
    ///
    /// ```
    /// use mixwell::tune::gp::{Gp, Hyperparameters, Kernel};
    /// let hyper = Hyperparameters { signal_variance: 1.0, length_scales: vec![0.3], noise_variance: 1e-4 };
    /// let gp = Gp::new(Kernel::Matern52, hyper, 1, &[0.1, 0.5, 0.9], &[1.0, 2.0, 0.5], 0.0).unwrap();
    /// let p = gp.predict(&[0.5]);
    /// assert!((p.mean - 2.0).abs() < 1e-2 && p.latent_variance < 1e-3);
    /// ```
    pub fn new(
        kernel: Kernel,
        hyper: Hyperparameters,
        dim: usize,
        x: &[f64],
        y: &[f64],
        mean: f64,
    ) -> Result<Gp, GpError> {
        check_data(dim, x, y)?;
        hyper.check(dim)?;
        if !mean.is_finite() {
            return Err(GpError::NonFinite);
        }
        let n = y.len();
        let mut k = DMatrix::<f64>::zeros(n, n);
        for i in 0..n {
            let xi = &x[i * dim..(i + 1) * dim];
            for j in 0..i {
                let v = kernel.value(&hyper, xi, &x[j * dim..(j + 1) * dim]);
                k[(i, j)] = v;
                k[(j, i)] = v;
            }
            k[(i, i)] = hyper.signal_variance;
        }
        let diagonal = hyper.signal_variance + hyper.noise_variance;
        let mut jitter = 0.0;
        for attempt in 0..=JITTER_ATTEMPTS {
            let mut ky = k.clone();
            for i in 0..n {
                ky[(i, i)] += hyper.noise_variance + jitter;
            }
            if let Some(chol) = Cholesky::new(ky) {
                let l = chol.l_dirty();
                let min_pivot = (0..n).map(|i| l[(i, i)] * l[(i, i)]).fold(f64::INFINITY, f64::min);
                if min_pivot >= MIN_PIVOT_RATIO * (diagonal + jitter) {
                    let residual = DVector::from_iterator(n, y.iter().map(|v| v - mean));
                    let alpha = chol.solve(&residual);
                    let log_det_half: f64 = (0..n).map(|i| libm::log(l[(i, i)])).sum();
                    let log_ml = -0.5 * residual.dot(&alpha) - log_det_half - 0.5 * n as f64 * LN_2PI;
                    return Ok(Gp { kernel, hyper, dim, x: x.to_vec(), mean, jitter, chol, alpha, log_ml });
                }
            }
            jitter = FIRST_JITTER * diagonal * libm::pow(10.0, attempt as f64);
        }
        Err(GpError::NotPositiveDefinite)
    }

    /// Predictive mean and variances at `x_star` (Rasmussen & Williams 2006, Algorithm 2.1).
    ///
    /// # Panics
    /// If `x_star.len()` is not the dimension of the training inputs (a programming error).
    pub fn predict(&self, x_star: &[f64]) -> Prediction {
        assert_eq!(x_star.len(), self.dim, "test input has the wrong dimension");
        let n = self.alpha.len();
        let mut k_star = DVector::from_fn(n, |i, _| {
            self.kernel.value(&self.hyper, &self.x[i * self.dim..(i + 1) * self.dim], x_star)
        });
        let mean = self.mean + k_star.dot(&self.alpha);
        // v = L \ k*; the factor's diagonal is positive, so the solve cannot fail.
        self.chol.l_dirty().solve_lower_triangular_mut(&mut k_star);
        let latent_variance = (self.hyper.signal_variance - k_star.norm_squared()).max(0.0);
        Prediction { mean, latent_variance, noisy_variance: latent_variance + self.hyper.noise_variance + self.jitter }
    }

    /// [`Gp::predict`] at each of the points in `points` (row-major, `dim` numbers per point),
    /// e.g. a grid for plotting the surrogate.
    pub fn predict_points(&self, points: &[f64]) -> Vec<Prediction> {
        points.chunks_exact(self.dim).map(|p| self.predict(p)).collect()
    }

    /// log p(y | X, θ) (Rasmussen & Williams 2006, eq. 2.30, Algorithm 2.1).
    pub fn log_marginal_likelihood(&self) -> f64 {
        self.log_ml
    }

    /// ∂ log p(y | X, θ)/∂θ for θ = (log ℓ₁, …, log ℓ_d, log σ_f, log σ_n), by
    /// ½ tr((ααᵀ − K_y⁻¹) ∂K_y/∂θ_j) (Rasmussen & Williams 2006, eq. 5.9). Costs O(n³).
    pub fn log_marginal_likelihood_gradient(&self) -> Vec<f64> {
        let (n, d) = (self.alpha.len(), self.dim);
        let inverse = self.chol.inverse();
        let sf2 = self.hyper.signal_variance;
        let mut grad = vec![0.0; d + 2];
        let mut parts = vec![0.0; d];
        for i in 0..n {
            let xi = &self.x[i * d..(i + 1) * d];
            for j in 0..=i {
                let xj = &self.x[j * d..(j + 1) * d];
                // The matrices are symmetric: count each off-diagonal pair once, doubled.
                let weight = if i == j { 0.5 } else { 1.0 };
                let w = weight * (self.alpha[i] * self.alpha[j] - inverse[(i, j)]);
                let mut r2 = 0.0;
                for ((part, p), (q, l)) in parts.iter_mut().zip(xi).zip(xj.iter().zip(&self.hyper.length_scales)) {
                    *part = ((p - q) / l) * ((p - q) / l);
                    r2 += *part;
                }
                let g = sf2 * self.kernel.length_scale_factor(r2);
                for (gj, part) in grad.iter_mut().zip(&parts) {
                    *gj += w * g * part;
                }
                grad[d] += w * 2.0 * sf2 * self.kernel.correlation(r2);
                if i == j {
                    grad[d + 1] += w * 2.0 * self.hyper.noise_variance;
                }
            }
        }
        grad
    }

    /// The hyperparameters the GP was conditioned with (after [`fit`], the fitted ones).
    pub fn hyperparameters(&self) -> &Hyperparameters {
        &self.hyper
    }

    /// The covariance function.
    pub fn kernel(&self) -> Kernel {
        self.kernel
    }

    /// The constant prior mean.
    pub fn prior_mean(&self) -> f64 {
        self.mean
    }

    /// Jitter added to the diagonal to make the Cholesky factorisation succeed (0 if none).
    pub fn jitter(&self) -> f64 {
        self.jitter
    }

    /// Dimension of the inputs.
    pub fn dim(&self) -> usize {
        self.dim
    }

    /// Number of observations.
    pub fn len(&self) -> usize {
        self.alpha.len()
    }

    /// Always false: a GP is built from at least one observation.
    pub fn is_empty(&self) -> bool {
        self.alpha.is_empty()
    }
}

/// A log-normal prior: log v ~ N(log median, log_sd²).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct LogNormalPrior {
    pub median: f64,
    pub log_sd: f64,
}

impl LogNormalPrior {
    /// Log density of log v (up to a constant) and its derivative in log v.
    fn log_density(&self, log_v: f64) -> (f64, f64) {
        let distance = log_v - libm::log(self.median);
        let var = self.log_sd * self.log_sd;
        (-0.5 * distance * distance / var, -distance / var)
    }

    fn is_valid(&self) -> bool {
        self.median.is_finite() && self.median > 0.0 && self.log_sd.is_finite() && self.log_sd > 0.0
    }
}

/// Box bounds for the fit. Length scales are in input units (the tuner's inputs lie on
/// [0, 1]^d); variances are multiples of the sample variance of y (1 if y is constant), so the
/// fit does not depend on the units of the score.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct FitBounds {
    pub length_scale: (f64, f64),
    pub signal_variance: (f64, f64),
    pub noise_variance: (f64, f64),
}

/// How [`fit`] searches.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FitSettings {
    /// Number of optimiser runs; the best is kept. The first starts from `initial` if given,
    /// else from a default point; the rest from seeded random points inside the bounds.
    pub starts: usize,
    /// Seed of the random starts.
    pub seed: u64,
    /// BFGS iterations per start.
    pub max_iterations: usize,
    pub bounds: FitBounds,
    /// Prior on each length scale ℓ_j, if any.
    pub length_scale_prior: Option<LogNormalPrior>,
    /// Prior on the noise variance as a multiple of var(y), if any. With priors the fit is a
    /// maximum a posteriori estimate rather than maximum likelihood.
    pub noise_prior: Option<LogNormalPrior>,
    /// A warm start, typically the previous fit when one observation was added.
    pub initial: Option<Hyperparameters>,
}

impl Default for FitSettings {
    /// Five starts. Bounds: ℓ ∈ [0.01, 20] on the unit box; σ_f² ∈ [0.01, 100] and
    /// σ_n² ∈ [1e-6, 1] × var(y) — the noise floor keeps K_y well conditioned, the ceilings stop the
    /// fit from explaining a few points by an enormous, flat signal. Weak log-normal priors: on ℓ
    /// (median 0.5, log-sd 1.5: 95 % within about 0.03–9.5), so that a handful of noisy points is
    /// not "explained" by a length scale far shorter than their spacing; on σ_n²/var(y) (median
    /// 0.01, log-sd 2: 95 % within about 2e-4–0.5), so that noisy scores are not fitted as
    /// noise-free, which would make the surrogate over-confident between trials. These choices
    /// are common practice in Bayesian optimisation, not taken from a publication.
    fn default() -> Self {
        FitSettings {
            starts: 5,
            seed: 0x0067_7066_6974,
            max_iterations: 100,
            bounds: FitBounds {
                length_scale: (0.01, 20.0),
                signal_variance: (0.01, 100.0),
                noise_variance: (1e-6, 1.0),
            },
            length_scale_prior: Some(LogNormalPrior { median: 0.5, log_sd: 1.5 }),
            noise_prior: Some(LogNormalPrior { median: 0.01, log_sd: 2.0 }),
            initial: None,
        }
    }
}

impl FitSettings {
    /// The quantity [`fit`] maximises: log marginal likelihood + log prior density (up to a
    /// constant). `y_variance` is the scale the noise prior refers to: [`fit`] uses the sample
    /// variance of y, or 1 if y is constant ([`y_scale`]).
    pub fn objective(&self, gp: &Gp, y_variance: f64) -> f64 {
        gp.log_marginal_likelihood() + self.log_prior(&gp.hyperparameters().log_params(), y_variance).0
    }

    /// Log prior (up to a constant) and its gradient in θ = (log ℓ, log σ_f, log σ_n).
    fn log_prior(&self, theta: &[f64], y_variance: f64) -> (f64, Vec<f64>) {
        let d = theta.len() - 2;
        let mut value = 0.0;
        let mut grad = vec![0.0; d + 2];
        if let Some(prior) = self.length_scale_prior {
            for (g, &t) in grad.iter_mut().zip(&theta[..d]) {
                let (v, dv) = prior.log_density(t);
                value += v;
                *g = dv;
            }
        }
        if let Some(prior) = self.noise_prior {
            // log(σ_n²/var y) = 2θ_n − log var y.
            let (v, dv) = prior.log_density(2.0 * theta[d + 1] - libm::log(y_variance));
            value += v;
            grad[d + 1] = 2.0 * dv;
        }
        (value, grad)
    }

    fn check(&self) -> Result<(), GpError> {
        let ok = |(lo, hi): (f64, f64)| lo.is_finite() && hi.is_finite() && lo > 0.0 && hi > lo;
        let b = &self.bounds;
        if !(ok(b.length_scale) && ok(b.signal_variance) && ok(b.noise_variance)) {
            return Err(GpError::BadHyperparameters("fit bounds must satisfy 0 < lower < upper < ∞"));
        }
        if !self.length_scale_prior.iter().chain(&self.noise_prior).all(LogNormalPrior::is_valid) {
            return Err(GpError::BadHyperparameters("a prior needs a positive, finite median and log-sd"));
        }
        if self.starts == 0 {
            return Err(GpError::BadHyperparameters("at least one start is needed"));
        }
        Ok(())
    }
}

/// Fit the hyperparameters of a GP with constant mean (the sample mean of `y`) by maximising
/// [`FitSettings::objective`] over a box in θ = (log ℓ, log σ_f, log σ_n), from several starts, and
/// return the GP conditioned on the best. Deterministic for a given seed.
///
/// Method: type-II maximum likelihood (Rasmussen & Williams 2006, §5.4.1) with the analytic
/// gradient (eq. 5.9). The box is removed by the smooth change of variables
/// θ = lo + (hi − lo)·logistic(u), and u is optimised by BFGS with a backtracking Armijo line
/// search (Nocedal & Wright 2006, *Numerical Optimization*, Algorithms 6.1 and 3.1) — a few dozen
/// lines, enough for d + 2 ≤ 5 unknowns.
pub fn fit(kernel: Kernel, dim: usize, x: &[f64], y: &[f64], settings: &FitSettings) -> Result<Gp, GpError> {
    check_data(dim, x, y)?;
    settings.check()?;
    let mean = y.iter().sum::<f64>() / y.len() as f64;
    let scale = y_scale(y);

    // Bounds on θ; standard deviations are half the log of variances.
    let b = &settings.bounds;
    let log_sd_bounds = |(lo, hi): (f64, f64)| (0.5 * libm::log(lo * scale), 0.5 * libm::log(hi * scale));
    let mut bounds = vec![(libm::log(b.length_scale.0), libm::log(b.length_scale.1)); dim];
    bounds.push(log_sd_bounds(b.signal_variance));
    bounds.push(log_sd_bounds(b.noise_variance));
    let theta_of = |u: &[f64]| -> Vec<f64> {
        u.iter().zip(&bounds).map(|(&ui, &(lo, hi))| lo + (hi - lo) * logistic(ui)).collect()
    };
    let u_of = |theta: &[f64]| -> Vec<f64> {
        theta.iter().zip(&bounds).map(|(&t, &(lo, hi))| logit(((t - lo) / (hi - lo)).clamp(0.02, 0.98))).collect()
    };

    // Negative objective and its gradient in u, or +∞ where the GP cannot be built.
    let negative_objective = |u: &[f64], grad_u: &mut [f64]| -> f64 {
        let theta = theta_of(u);
        let Ok(gp) = Gp::new(kernel, Hyperparameters::from_log_params(&theta), dim, x, y, mean) else {
            return f64::INFINITY;
        };
        let (prior, prior_grad) = settings.log_prior(&theta, scale);
        let mut grad = gp.log_marginal_likelihood_gradient();
        for (g, pg) in grad.iter_mut().zip(&prior_grad) {
            *g += pg;
        }
        for ((gu, g), (&ui, &(lo, hi))) in grad_u.iter_mut().zip(&grad).zip(u.iter().zip(&bounds)) {
            let s = logistic(ui);
            *gu = -g * (hi - lo) * s * (1.0 - s);
        }
        -(gp.log_marginal_likelihood() + prior)
    };

    let mut starts = Vec::with_capacity(settings.starts);
    if let Some(initial) = &settings.initial
        && initial.check(dim).is_ok()
        && initial.noise_variance > 0.0
    {
        starts.push(u_of(&initial.log_params()));
    }
    if starts.len() < settings.starts {
        let median = settings.length_scale_prior.map_or(0.3, |p| p.median);
        let default =
            Hyperparameters { signal_variance: scale, length_scales: vec![median; dim], noise_variance: 0.01 * scale };
        starts.push(u_of(&default.log_params()));
    }
    let mut stream = Stream::new(settings.seed, 0);
    while starts.len() < settings.starts {
        starts.push((0..dim + 2).map(|_| -2.5 + 5.0 * stream.uniform()).collect());
    }

    let mut best: Option<(Vec<f64>, f64)> = None;
    for u0 in starts {
        let (u, value) = minimise_bfgs(negative_objective, u0, settings.max_iterations);
        if value.is_finite() && best.as_ref().is_none_or(|(_, v)| value < *v) {
            best = Some((u, value));
        }
    }
    let (u, _) = best.ok_or(GpError::NotPositiveDefinite)?;
    Gp::new(kernel, Hyperparameters::from_log_params(&theta_of(&u)), dim, x, y, mean)
}

/// The scale of y that [`fit`]'s bounds and noise prior refer to: the sample variance (divisor
/// n), or 1 when y is constant or has a single value.
pub fn y_scale(y: &[f64]) -> f64 {
    let n = y.len() as f64;
    let mean = y.iter().sum::<f64>() / n;
    let variance = y.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>() / n;
    if variance.is_finite() && variance > 1e-280 { variance } else { 1.0 }
}

fn logistic(u: f64) -> f64 {
    1.0 / (1.0 + libm::exp(-u))
}

fn logit(p: f64) -> f64 {
    libm::log(p / (1.0 - p))
}

/// Minimise a smooth function by BFGS on the inverse Hessian with a backtracking line search
/// under the Armijo condition (Nocedal & Wright 2006, Algorithms 6.1 and 3.1; initial scaling
/// eq. 6.20). `fg` returns f(x) and writes ∇f(x); +∞ marks points to avoid. Steps are capped at
/// length 2 in the max-norm, since in the logistic coordinates a longer step only saturates.
fn minimise_bfgs(
    mut fg: impl FnMut(&[f64], &mut [f64]) -> f64,
    x0: Vec<f64>,
    max_iterations: usize,
) -> (Vec<f64>, f64) {
    const MAX_STEP: f64 = 2.0;
    const ARMIJO: f64 = 1e-4;
    let m = x0.len();
    let mut x = x0;
    let mut g = vec![0.0; m];
    let mut fx = fg(&x, &mut g);
    if !fx.is_finite() {
        return (x, fx);
    }
    let identity = |m: usize| DMatrix::<f64>::identity(m, m);
    let mut h = identity(m);
    let mut fresh = true;
    let (mut x_new, mut g_new) = (vec![0.0; m], vec![0.0; m]);
    for _ in 0..max_iterations {
        if g.iter().all(|v| v.abs() < 1e-8) {
            break;
        }
        let grad = DVector::from_column_slice(&g);
        let mut p = -(&h * &grad);
        let mut slope = p.dot(&grad);
        if slope >= 0.0 {
            // Not a descent direction (should not happen with a positive definite H): restart.
            h = identity(m);
            fresh = true;
            p = -grad.clone();
            slope = p.dot(&grad);
        }
        let longest = p.amax();
        let mut t = if longest > MAX_STEP { MAX_STEP / longest } else { 1.0 };
        let f_new = loop {
            for i in 0..m {
                x_new[i] = x[i] + t * p[i];
            }
            let f = fg(&x_new, &mut g_new);
            if f.is_finite() && f <= fx + ARMIJO * t * slope {
                break Some(f);
            }
            t *= 0.5;
            if t < 1e-12 {
                break None;
            }
        };
        let Some(f_new) = f_new else { break };
        let s = DVector::from_iterator(m, x_new.iter().zip(&x).map(|(a, b)| a - b));
        let yv = DVector::from_iterator(m, g_new.iter().zip(&g).map(|(a, b)| a - b));
        let sy = s.dot(&yv);
        if sy > 1e-12 * s.norm() * yv.norm() {
            if fresh {
                h = identity(m) * (sy / yv.norm_squared());
                fresh = false;
            }
            // H ← (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ, written out with Hy.
            let rho = 1.0 / sy;
            let hy = &h * &yv;
            let yhy = yv.dot(&hy);
            h += (&s * s.transpose()) * (rho * rho * yhy + rho) - (&hy * s.transpose() + &s * hy.transpose()) * rho;
        }
        let decrease = fx - f_new;
        core::mem::swap(&mut x, &mut x_new);
        core::mem::swap(&mut g, &mut g_new);
        fx = f_new;
        if decrease <= 1e-12 * (1.0 + fx.abs()) {
            break;
        }
    }
    (x, fx)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// BFGS on the Rosenbrock function (Rosenbrock 1960), minimum 0 at (1, 1), from the classic
    /// start (−1.2, 1).
    #[test]
    fn bfgs_minimises_rosenbrock() {
        let rosenbrock = |x: &[f64], g: &mut [f64]| {
            let (a, b) = (x[0], x[1]);
            g[0] = -2.0 * (1.0 - a) - 400.0 * a * (b - a * a);
            g[1] = 200.0 * (b - a * a);
            (1.0 - a) * (1.0 - a) + 100.0 * (b - a * a) * (b - a * a)
        };
        let (x, f) = minimise_bfgs(rosenbrock, vec![-1.2, 1.0], 500);
        assert!(f < 1e-14 && (x[0] - 1.0).abs() < 1e-6 && (x[1] - 1.0).abs() < 1e-6, "{x:?} {f}");
    }
}
