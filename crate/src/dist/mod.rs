//! Log-densities of the distributions a model can name, vectorised over data columns.
//!
//! INTERFACE (kept stable for the evaluator in `tape`):
//! - [`Family`]: one variant per univariate distribution, with its model-language name, its
//!   parameter names in order, and the support of its variate.
//! - [`Col`]: one argument column, a broadcast scalar (stride 0) or a slice (stride 1).
//! - [`sum_log_density`]: Σᵢ log f(xᵢ; θᵢ) over `n` elements, with per-family fast paths when the
//!   parameters are broadcast scalars (e.g. log σ computed once, not n times).
//! - [`MvNormal`]: a multivariate normal whose covariance is data, factorised once.
//!
//! All transcendental functions come from `libm` (bit-identical natively and in wasm). Parameters
//! outside their domain, variates outside the support and NaN anywhere give −∞, never a panic.
//! This module knows nothing of the model language beyond the names; it does no I/O.

mod families;
mod mvnormal;
pub mod quantile;
pub mod special;

pub use mvnormal::MvNormal;

use families::{Kernel, Params};

/// One argument column: `stride` 0 repeats `values[0]`, stride 1 walks `values`.
#[derive(Clone, Copy, Debug)]
pub struct Col<'a> {
    pub values: &'a [f64],
    pub stride: usize,
}

impl<'a> Col<'a> {
    pub fn scalar(value: &'a [f64]) -> Self {
        Col { values: value, stride: 0 }
    }
    pub fn vector(values: &'a [f64]) -> Self {
        Col { values, stride: 1 }
    }
    #[inline]
    pub fn get(&self, i: usize) -> f64 {
        self.values[i * self.stride]
    }
    /// Whether `get(i)` is in bounds for every i < n.
    #[inline]
    fn covers(&self, n: usize) -> bool {
        n == 0 || (n - 1).checked_mul(self.stride).is_some_and(|last| last < self.values.len())
    }
}

/// The values a variate may take.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Variate {
    /// Any finite real number.
    Real,
    /// x ≥ 0.
    NonNegative,
    /// x > 0.
    Positive,
    /// 0 < x < 1 (open: the beta density is infinite or zero at the ends).
    Unit,
    /// Non-negative integers.
    Count,
    /// 0 or 1.
    Binary,
    /// Between the first two parameters (the uniform distribution).
    BetweenParams,
}

impl Variate {
    /// Whether a data value can be a draw of this variate. `BetweenParams` only checks that the
    /// value is finite (the bounds may be parameters); `Count` does not know a binomial's trials.
    pub fn contains(self, x: f64) -> bool {
        match self {
            Variate::Real | Variate::BetweenParams => x.is_finite(),
            Variate::NonNegative => x >= 0.0 && x.is_finite(),
            Variate::Positive => x > 0.0 && x.is_finite(),
            Variate::Unit => x > 0.0 && x < 1.0,
            Variate::Count => families::is_count(x),
            Variate::Binary => x == 0.0 || x == 1.0,
        }
    }

    /// The support in words, for messages and the reference table.
    pub fn describe(self) -> &'static str {
        match self {
            Variate::Real => "any real number",
            Variate::NonNegative => "x ≥ 0",
            Variate::Positive => "x > 0",
            Variate::Unit => "0 < x < 1",
            Variate::Count => "0, 1, 2, …",
            Variate::Binary => "0 or 1",
            Variate::BetweenParams => "lower ≤ x ≤ upper",
        }
    }
}

/// A univariate distribution a model can name.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Family {
    Normal,
    StudentT,
    Cauchy,
    Laplace,
    Logistic,
    Exponential,
    Gamma,
    InvGamma,
    Beta,
    LogNormal,
    Uniform,
    HalfNormal,
    HalfCauchy,
    Weibull,
    Poisson,
    Binomial,
    NegBinomial,
    Bernoulli,
    BernoulliLogit,
    BinomialLogit,
    PoissonLog,
}

impl Family {
    pub const ALL: &'static [Family] = &[
        Family::Normal,
        Family::StudentT,
        Family::Cauchy,
        Family::Laplace,
        Family::Logistic,
        Family::Exponential,
        Family::Gamma,
        Family::InvGamma,
        Family::Beta,
        Family::LogNormal,
        Family::Uniform,
        Family::HalfNormal,
        Family::HalfCauchy,
        Family::Weibull,
        Family::Poisson,
        Family::Binomial,
        Family::NegBinomial,
        Family::Bernoulli,
        Family::BernoulliLogit,
        Family::BinomialLogit,
        Family::PoissonLog,
    ];

    /// The name a model writes.
    pub fn name(self) -> &'static str {
        match self {
            Family::Normal => "normal",
            Family::StudentT => "student_t",
            Family::Cauchy => "cauchy",
            Family::Laplace => "laplace",
            Family::Logistic => "logistic",
            Family::Exponential => "exponential",
            Family::Gamma => "gamma",
            Family::InvGamma => "inv_gamma",
            Family::Beta => "beta",
            Family::LogNormal => "lognormal",
            Family::Uniform => "uniform",
            Family::HalfNormal => "halfnormal",
            Family::HalfCauchy => "halfcauchy",
            Family::Weibull => "weibull",
            Family::Poisson => "poisson",
            Family::Binomial => "binomial",
            Family::NegBinomial => "negbinomial",
            Family::Bernoulli => "bernoulli",
            Family::BernoulliLogit => "bernoulli_logit",
            Family::BinomialLogit => "binomial_logit",
            Family::PoissonLog => "poisson_log",
        }
    }

    pub fn from_name(name: &str) -> Option<Family> {
        Family::ALL.iter().copied().find(|f| f.name() == name)
    }

    /// Parameter names, in the order they are written.
    pub fn params(self) -> &'static [&'static str] {
        match self {
            Family::Normal => &["mean", "sd"],
            Family::StudentT => &["dof", "location", "scale"],
            Family::Cauchy | Family::Laplace | Family::Logistic => &["location", "scale"],
            Family::Exponential | Family::Poisson => &["rate"],
            Family::Gamma => &["shape", "rate"],
            Family::InvGamma => &["shape", "scale"],
            Family::Beta => &["a", "b"],
            Family::LogNormal => &["meanlog", "sdlog"],
            Family::Uniform => &["lower", "upper"],
            Family::HalfNormal | Family::HalfCauchy => &["scale"],
            Family::Weibull => &["shape", "scale"],
            Family::Binomial => &["trials", "probability"],
            Family::NegBinomial => &["mean", "dispersion"],
            Family::Bernoulli => &["probability"],
            Family::BernoulliLogit => &["logodds"],
            Family::BinomialLogit => &["trials", "logodds"],
            Family::PoissonLog => &["lograte"],
        }
    }

    pub fn variate(self) -> Variate {
        match self {
            Family::Normal | Family::StudentT | Family::Cauchy | Family::Laplace | Family::Logistic => Variate::Real,
            Family::Exponential | Family::HalfNormal | Family::HalfCauchy => Variate::NonNegative,
            Family::Gamma | Family::InvGamma | Family::LogNormal | Family::Weibull => Variate::Positive,
            Family::Beta => Variate::Unit,
            Family::Uniform => Variate::BetweenParams,
            Family::Poisson | Family::Binomial | Family::NegBinomial | Family::BinomialLogit | Family::PoissonLog => {
                Variate::Count
            }
            Family::Bernoulli | Family::BernoulliLogit => Variate::Binary,
        }
    }

    /// The parameters' domain in words, in the order of [`Family::params`].
    pub fn param_domain(self) -> &'static str {
        match self {
            Family::Normal => "mean real, sd > 0",
            Family::StudentT => "dof > 0, location real, scale > 0",
            Family::Cauchy | Family::Laplace | Family::Logistic => "location real, scale > 0",
            Family::Exponential | Family::Poisson => "rate > 0",
            Family::Gamma => "shape > 0, rate > 0",
            Family::InvGamma => "shape > 0, scale > 0",
            Family::Beta => "a > 0, b > 0",
            Family::LogNormal => "meanlog real, sdlog > 0",
            Family::Uniform => "lower < upper, both finite",
            Family::HalfNormal | Family::HalfCauchy => "scale > 0",
            Family::Weibull => "shape > 0, scale > 0",
            Family::Binomial => "trials a non-negative integer, 0 ≤ probability ≤ 1",
            Family::NegBinomial => "mean > 0, dispersion > 0",
            Family::Bernoulli => "0 ≤ probability ≤ 1",
            Family::BernoulliLogit => "logodds real",
            Family::BinomialLogit => "trials a non-negative integer, logodds real",
            Family::PoissonLog => "lograte real",
        }
    }

    /// The log-density as a formula (natural logs), as in the README's reference table.
    pub fn describe(self) -> &'static str {
        match self {
            Family::Normal => "−½log(2π) − log σ − (x−μ)²/(2σ²)",
            Family::StudentT => "lnΓ((ν+1)/2) − lnΓ(ν/2) − ½log(νπ) − log σ − (ν+1)/2 · log(1 + ((x−μ)/σ)²/ν)",
            Family::Cauchy => "−log(πσ) − log(1 + ((x−μ)/σ)²)",
            Family::Laplace => "−log(2b) − |x−μ|/b",
            Family::Logistic => "−z − log s − 2·log(1 + e^(−z)), z = (x−μ)/s",
            Family::Exponential => "log λ − λx",
            Family::Gamma => "α log β − lnΓ(α) + (α−1) log x − βx",
            Family::InvGamma => "α log β − lnΓ(α) − (α+1) log x − β/x",
            Family::Beta => "(a−1) log x + (b−1) log(1−x) − [lnΓ(a) + lnΓ(b) − lnΓ(a+b)]",
            Family::LogNormal => "−log x − log σ − ½log(2π) − (log x − μ)²/(2σ²)",
            Family::Uniform => "−log(upper − lower)",
            Family::HalfNormal => "log 2 − ½log(2π) − log σ − x²/(2σ²)",
            Family::HalfCauchy => "log 2 − log(πσ) − log(1 + (x/σ)²)",
            Family::Weibull => "log k − log λ + (k−1) log(x/λ) − (x/λ)^k",
            Family::Poisson => "k log λ − λ − lnΓ(k+1)",
            Family::Binomial => "lnΓ(n+1) − lnΓ(k+1) − lnΓ(n−k+1) + k log p + (n−k) log(1−p)",
            Family::NegBinomial => "lnΓ(k+φ) − lnΓ(k+1) − lnΓ(φ) + k log(μ/(μ+φ)) + φ log(φ/(μ+φ))",
            Family::Bernoulli => "y log p + (1−y) log(1−p)",
            Family::BernoulliLogit => "yα − log(1 + e^α)",
            Family::BinomialLogit => "lnΓ(n+1) − lnΓ(k+1) − lnΓ(n−k+1) − k·log(1 + e^−α) − (n−k)·log(1 + e^α)",
            Family::PoissonLog => "kη − e^η − lnΓ(k+1)",
        }
    }
}

/// Σᵢ log f(xᵢ; θᵢ) for i in 0..n. Parameters outside their domain, variates outside the support
/// and NaN give −∞; so do columns too short for `n` or the wrong number of parameters (the
/// evaluator checks shapes when compiling, so that is a guard, not a path). Allocates nothing.
pub fn sum_log_density(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    if n == 0 {
        return 0.0;
    }
    if params.len() != family.params().len() || !x.covers(n) || !params.iter().all(|c| c.covers(n)) {
        return f64::NEG_INFINITY;
    }
    const ZERO: &[f64] = &[0.0];
    let mut cols = [Col::scalar(ZERO); 3];
    cols[..params.len()].copy_from_slice(params);
    let total = match family {
        Family::Normal => sum_kernel::<families::Normal>(n, x, &cols),
        Family::StudentT => sum_kernel::<families::StudentT>(n, x, &cols),
        Family::Cauchy => sum_kernel::<families::Cauchy>(n, x, &cols),
        Family::Laplace => sum_kernel::<families::Laplace>(n, x, &cols),
        Family::Logistic => sum_kernel::<families::Logistic>(n, x, &cols),
        Family::Exponential => sum_kernel::<families::Exponential>(n, x, &cols),
        Family::Gamma => sum_kernel::<families::Gamma>(n, x, &cols),
        Family::InvGamma => sum_kernel::<families::InvGamma>(n, x, &cols),
        Family::Beta => sum_kernel::<families::Beta>(n, x, &cols),
        Family::LogNormal => sum_kernel::<families::LogNormal>(n, x, &cols),
        Family::Uniform => sum_kernel::<families::Uniform>(n, x, &cols),
        Family::HalfNormal => sum_kernel::<families::HalfNormal>(n, x, &cols),
        Family::HalfCauchy => sum_kernel::<families::HalfCauchy>(n, x, &cols),
        Family::Weibull => sum_kernel::<families::Weibull>(n, x, &cols),
        Family::Poisson => sum_kernel::<families::Poisson>(n, x, &cols),
        Family::Binomial => sum_kernel::<families::Binomial>(n, x, &cols),
        Family::NegBinomial => sum_kernel::<families::NegBinomial>(n, x, &cols),
        Family::Bernoulli => sum_kernel::<families::Bernoulli>(n, x, &cols),
        Family::BernoulliLogit => sum_kernel::<families::BernoulliLogit>(n, x, &cols),
        Family::BinomialLogit => sum_kernel::<families::BinomialLogit>(n, x, &cols),
        Family::PoissonLog => sum_kernel::<families::PoissonLog>(n, x, &cols),
    };
    // NaN only arises from NaN or infinite inputs (∞ − ∞); no such point has positive density.
    if total.is_nan() { f64::NEG_INFINITY } else { total }
}

/// log f(x; θ) for one element; `params` in the order of [`Family::params`].
pub fn log_density(family: Family, x: f64, params: &[f64]) -> f64 {
    if params.len() != family.params().len() {
        return f64::NEG_INFINITY;
    }
    let xs = [x];
    let mut cols = [Col::scalar(&xs); 3];
    for (col, value) in cols.iter_mut().zip(params) {
        *col = Col::scalar(core::slice::from_ref(value));
    }
    sum_log_density(family, 1, Col::scalar(&xs), &cols[..params.len()])
}

/// The loop shared by every family: `prepare` once when every parameter it reads is a broadcast
/// scalar, once per element otherwise.
#[inline]
fn sum_kernel<K: Kernel>(n: usize, x: Col, cols: &[Col; 3]) -> f64 {
    let at = |i: usize| -> Params { [cols[0].get(i), cols[1].get(i), cols[2].get(i)] };
    let hoistable = (0..3).all(|j| K::HOISTED & (1 << j) == 0 || cols[j].stride == 0);
    let mut total = 0.0;
    if hoistable {
        let first = at(0);
        let Some(kernel) = K::prepare(&first) else {
            return f64::NEG_INFINITY;
        };
        if cols.iter().all(|c| c.stride == 0) && x.stride == 1 {
            // The commonest case (data against broadcast parameters): a plain walk over the data.
            for &xi in &x.values[..n] {
                total += kernel.eval(xi, &first);
            }
        } else {
            for i in 0..n {
                total += kernel.eval(x.get(i), &at(i));
            }
        }
    } else {
        for i in 0..n {
            total += K::direct(x.get(i), &at(i));
        }
    }
    total
}
