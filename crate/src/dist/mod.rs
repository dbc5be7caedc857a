//! Densities and distribution functions of the distributions a model can name, vectorised over
//! data columns.
//!
//! INTERFACE (for the evaluator in `tape` and the checker in `model`; all allocation-free):
//!
//! Univariate families.
//! - [`Family`]: one variant per univariate distribution, with its model-language name, its
//!   parameter names in order, the support of its variate, and its log-density as a formula.
//! - [`Col`]: one argument column, a broadcast scalar (stride 0) or a slice (stride 1).
//! - Sums over n elements, per-family fast paths when the parameters are broadcast scalars:
//!   [`sum_log_density`] Σ log f(xᵢ), [`sum_log_cdf`] Σ log P(X ≤ xᵢ) (left-censored),
//!   [`sum_log_ccdf`] Σ log P(X > xᵢ) (right-censored), [`sum_log_interval`]
//!   Σ log P(lᵢ < X ≤ uᵢ) (interval-censored).
//! - Per-element writers into a caller's slice (n = `out.len()`): [`log_density_each`] (the
//!   per-observation terms of a mixture), [`log_cdf_each`], [`log_ccdf_each`],
//!   [`log_interval_each`] (per-element truncation and censoring).
//! - Scalars: [`log_density`], [`log_cdf`], [`log_ccdf`], [`log_interval`].
//!
//! Discrete families are evaluated at ⌊x⌋: P(X ≤ 2.7) = P(X ≤ 2), P(X > 2.7) = P(X > 2), and an
//! interval is P(⌊l⌋ < X ≤ ⌊u⌋). Truncation to lo ≤ X ≤ hi of a count is therefore
//! `log_interval(lo − 1, hi)`; of a continuous variate `log_interval(lo, hi)`. Infinite ends are
//! allowed (P(X ≤ ∞) = 1).
//!
//! Multivariate ([`Multivariate`] names them and gives their formulas): [`dirichlet_log_density`],
//! [`multinomial_log_density`], [`multinomial_scores_log_density`], [`categorical_log_density`],
//! [`sum_categorical_log_density`], [`categorical_scores_log_density`],
//! [`sum_categorical_scores_log_density`], [`lkj_cholesky_log_density`],
//! [`lkj_correlation_log_density`], [`lkj_log_normaliser`], [`mvnormal_cholesky_log_density`],
//! [`mvnormal_covariance_log_density`] (a parameter covariance, factorised into caller scratch),
//! and [`MvNormal`] (a covariance that is data, factorised once; [`MvNormal::log_density_rows`]).
//!
//! Special functions live in [`special`]: erf, erfc, erfcx, Φ and log Φ, the regularised
//! incomplete gamma functions P, Q and their logs, the regularised incomplete beta function, its
//! complement and their logs, log-sum-exp and friends.
//!
//! Conventions. Every log-density and log-probability here is −∞ for parameters outside their
//! domain, variates outside the support, NaN anywhere, lengths that do not fit and empty
//! intervals — never NaN, never a panic. The special functions instead return NaN for arguments
//! outside their domain (they are mathematical functions, not likelihood terms). Accuracy: the
//! distribution functions to 1e-12 relative in their logarithm, far tails included
//! (crate/tests/distribution_functions.rs against 50-digit mpmath values).
//!
//! All transcendental functions come from `libm` (bit-identical natively and in wasm). This module
//! knows nothing of the model language beyond the names; it does no I/O.

mod cdf;
mod families;
mod lkj;
mod mvnormal;
pub mod quantile;
mod simplex;
pub mod special;

pub use lkj::{UNIT_TOLERANCE, lkj_cholesky_log_density, lkj_correlation_log_density, lkj_log_normaliser};
pub use mvnormal::{MvNormal, mvnormal_cholesky_log_density, mvnormal_covariance_log_density};
pub use simplex::{
    SIMPLEX_TOLERANCE, categorical_log_density, categorical_scores_log_density, dirichlet_log_density,
    multinomial_log_density, multinomial_scores_log_density, sum_categorical_log_density,
    sum_categorical_scores_log_density,
};

use cdf::Tails;
use core::marker::PhantomData;
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

/// A multivariate distribution a model can name; the functions that evaluate each are listed in
/// the module's INTERFACE notes. Names and parameter orders read as on paper; the link forms
/// `categorical(k; softmax(s))` and `multinomial(k; softmax(s))` are the `*_scores_*` functions.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Multivariate {
    Dirichlet,
    Multinomial,
    Categorical,
    Lkj,
    MvNormal,
}

impl Multivariate {
    pub const ALL: &'static [Multivariate] = &[
        Multivariate::Dirichlet,
        Multivariate::Multinomial,
        Multivariate::Categorical,
        Multivariate::Lkj,
        Multivariate::MvNormal,
    ];

    /// The name a model writes.
    pub fn name(self) -> &'static str {
        match self {
            Multivariate::Dirichlet => "dirichlet",
            Multivariate::Multinomial => "multinomial",
            Multivariate::Categorical => "categorical",
            Multivariate::Lkj => "lkj",
            Multivariate::MvNormal => MvNormal::NAME,
        }
    }

    /// Parameter names, in the order they are written.
    pub fn params(self) -> &'static [&'static str] {
        match self {
            Multivariate::Dirichlet => &["concentration"],
            Multivariate::Multinomial | Multivariate::Categorical => &["probability"],
            Multivariate::Lkj => &["shape"],
            Multivariate::MvNormal => MvNormal::PARAMS,
        }
    }

    /// The variate in words.
    pub fn variate(self) -> &'static str {
        match self {
            Multivariate::Dirichlet => "a simplex: K ≥ 2 components, each > 0, summing to 1",
            Multivariate::Multinomial => "K counts (non-negative integers); the total is their sum",
            Multivariate::Categorical => "a category 1, …, K",
            Multivariate::Lkj => "the Cholesky factor of a d×d correlation matrix",
            Multivariate::MvNormal => "a vector of length d, or the rows of a matrix with d columns",
        }
    }

    /// The parameters' domain in words.
    pub fn param_domain(self) -> &'static str {
        match self {
            Multivariate::Dirichlet => "concentration: K values > 0, or one (symmetric)",
            Multivariate::Multinomial | Multivariate::Categorical => {
                "probability: K values ≥ 0 summing to 1 (or softmax of K scores)"
            }
            Multivariate::Lkj => "shape η > 0",
            Multivariate::MvNormal => {
                "mean: d values; covariance: d×d symmetric positive definite, or its Cholesky factor"
            }
        }
    }

    /// The log-density as a formula (natural logs), as in the README's reference table.
    pub fn describe(self) -> &'static str {
        match self {
            Multivariate::Dirichlet => "lnΓ(Σα) − Σ lnΓ(αᵢ) + Σ (αᵢ−1) log xᵢ",
            Multivariate::Multinomial => "lnΓ(n+1) − Σ lnΓ(kᵢ+1) + Σ kᵢ log pᵢ, n = Σ kᵢ",
            Multivariate::Categorical => "log p_k (with scores s: s_k − log Σ e^{sⱼ})",
            Multivariate::Lkj => {
                "Σᵢ₌₂ᵈ (d − i + 2η − 2) log Lᵢᵢ − Σₖ₌₁ᵈ⁻¹ (d−k)[(2βₖ−1) log 2 + log B(βₖ, βₖ)], βₖ = η + (d−1−k)/2"
            }
            Multivariate::MvNormal => "−(d/2) log 2π − Σ log Lᵢᵢ − ½‖L⁻¹(x − μ)‖², Σ = L Lᵀ",
        }
    }
}

/// Dispatches on a family with `$k` its density kernel and `$t` its distribution-function type.
macro_rules! with_family {
    ($family:expr, |$k:ident, $t:ident| $body:expr) => {
        match $family {
            Family::Normal => with_family!(@ families::Normal, families::Normal, $k, $t, $body),
            Family::StudentT => with_family!(@ families::StudentT, cdf::StudentTTails, $k, $t, $body),
            Family::Cauchy => with_family!(@ families::Cauchy, families::Cauchy, $k, $t, $body),
            Family::Laplace => with_family!(@ families::Laplace, families::Laplace, $k, $t, $body),
            Family::Logistic => with_family!(@ families::Logistic, families::Logistic, $k, $t, $body),
            Family::Exponential => with_family!(@ families::Exponential, families::Exponential, $k, $t, $body),
            Family::Gamma => with_family!(@ families::Gamma, cdf::GammaTails<false>, $k, $t, $body),
            Family::InvGamma => with_family!(@ families::InvGamma, cdf::GammaTails<true>, $k, $t, $body),
            Family::Beta => with_family!(@ families::Beta, cdf::BetaTails, $k, $t, $body),
            Family::LogNormal => with_family!(@ families::LogNormal, families::LogNormal, $k, $t, $body),
            Family::Uniform => with_family!(@ families::Uniform, families::Uniform, $k, $t, $body),
            Family::HalfNormal => with_family!(@ families::HalfNormal, families::HalfNormal, $k, $t, $body),
            Family::HalfCauchy => with_family!(@ families::HalfCauchy, families::HalfCauchy, $k, $t, $body),
            Family::Weibull => with_family!(@ families::Weibull, families::Weibull, $k, $t, $body),
            Family::Poisson => with_family!(@ families::Poisson, families::Poisson, $k, $t, $body),
            Family::Binomial => with_family!(@ families::Binomial, families::Binomial, $k, $t, $body),
            Family::NegBinomial => with_family!(@ families::NegBinomial, cdf::NegBinomialTails, $k, $t, $body),
            Family::Bernoulli => with_family!(@ families::Bernoulli, families::Bernoulli, $k, $t, $body),
            Family::BernoulliLogit => {
                with_family!(@ families::BernoulliLogit, families::BernoulliLogit, $k, $t, $body)
            }
            Family::BinomialLogit => {
                with_family!(@ families::BinomialLogit, families::BinomialLogit, $k, $t, $body)
            }
            Family::PoissonLog => with_family!(@ families::PoissonLog, families::PoissonLog, $k, $t, $body),
        }
    };
    (@ $kernel:ty, $tails:ty, $k:ident, $t:ident, $body:expr) => {{
        // Each caller uses one or both.
        #[allow(dead_code)]
        type $k = $kernel;
        #[allow(dead_code)]
        type $t = $tails;
        $body
    }};
}

/// One per-element function of a family: what is prepared once per parameter value and what is
/// done per element. `x` is the variate, `y` a second variate (an interval's upper end) or 0.
trait Elementwise {
    type State;
    /// Bit j set: `prepare` reads parameter j.
    const HOISTED: u8;
    fn prepare(p: &Params) -> Option<Self::State>;
    fn eval(state: &Self::State, x: f64, y: f64, p: &Params) -> f64;
    /// Without reusing anything (the path when hoisted parameters vary).
    #[inline]
    fn direct(x: f64, y: f64, p: &Params) -> f64 {
        match Self::prepare(p) {
            Some(state) => Self::eval(&state, x, y, p),
            None => f64::NEG_INFINITY,
        }
    }
}

/// log f(x).
struct Density<K>(PhantomData<K>);
/// log P(X ≤ x) (`UPPER` false) or log P(X > x) (`UPPER` true).
struct LnSide<T, const UPPER: bool>(PhantomData<T>);
/// log P(x < X ≤ y).
struct LnInterval<K, T>(PhantomData<(K, T)>);

impl<K: Kernel> Elementwise for Density<K> {
    type State = K;
    const HOISTED: u8 = K::HOISTED;
    #[inline]
    fn prepare(p: &Params) -> Option<K> {
        K::prepare(p)
    }
    #[inline]
    fn eval(kernel: &K, x: f64, _: f64, p: &Params) -> f64 {
        kernel.eval(x, p)
    }
    #[inline]
    fn direct(x: f64, _: f64, p: &Params) -> f64 {
        K::direct(x, p)
    }
}

impl<T: Tails, const UPPER: bool> Elementwise for LnSide<T, UPPER> {
    type State = T;
    const HOISTED: u8 = T::HOISTED;
    #[inline]
    fn prepare(p: &Params) -> Option<T> {
        T::prepare(p)
    }
    #[inline]
    fn eval(tails: &T, x: f64, _: f64, p: &Params) -> f64 {
        let tail = tails.tail(x, p);
        if UPPER { tail.ln_upper() } else { tail.ln_lower() }
    }
}

impl<K: Kernel, T: Tails> Elementwise for LnInterval<K, T> {
    type State = T;
    const HOISTED: u8 = T::HOISTED;
    #[inline]
    fn prepare(p: &Params) -> Option<T> {
        T::prepare(p)
    }
    #[inline]
    fn eval(tails: &T, lo: f64, hi: f64, p: &Params) -> f64 {
        cdf::ln_interval::<K, T>(tails, lo, hi, p)
    }
}

/// Walks elements 0..n, handing each value to `sink`: `prepare` once when every parameter it reads
/// is a broadcast scalar, once per element otherwise. Columns must cover n.
#[inline]
fn walk<E: Elementwise>(n: usize, x: Col, y: Col, cols: &[Col; 3], mut sink: impl FnMut(usize, f64)) {
    let at = |i: usize| -> Params { [cols[0].get(i), cols[1].get(i), cols[2].get(i)] };
    let hoistable = (0..3).all(|j| E::HOISTED & (1 << j) == 0 || cols[j].stride == 0);
    if hoistable {
        let first = at(0);
        let Some(state) = E::prepare(&first) else {
            (0..n).for_each(|i| sink(i, f64::NEG_INFINITY));
            return;
        };
        if cols.iter().all(|c| c.stride == 0) && x.stride == 1 && y.stride == 0 {
            // The commonest case (data against broadcast parameters): a plain walk over the data.
            let y0 = y.values[0];
            for (i, &xi) in x.values[..n].iter().enumerate() {
                sink(i, E::eval(&state, xi, y0, &first));
            }
        } else {
            for i in 0..n {
                sink(i, E::eval(&state, x.get(i), y.get(i), &at(i)));
            }
        }
    } else {
        for i in 0..n {
            sink(i, E::direct(x.get(i), y.get(i), &at(i)));
        }
    }
}

/// The parameter columns padded to three, or `None` when the shapes do not cover n elements.
#[inline]
fn padded<'a>(family: Family, n: usize, variates: &[Col], params: &[Col<'a>]) -> Option<[Col<'a>; 3]> {
    const ZERO: &[f64] = &[0.0];
    if params.len() != family.params().len()
        || !variates.iter().all(|c| c.covers(n))
        || !params.iter().all(|c| c.covers(n))
    {
        return None;
    }
    let mut cols = [Col::scalar(ZERO); 3];
    cols[..params.len()].copy_from_slice(params);
    Some(cols)
}

/// The unused second variate.
const NO_Y: Col<'static> = Col { values: &[0.0], stride: 0 };

/// NaN only arises from NaN or infinite inputs (∞ − ∞); no such point has positive probability.
#[inline]
fn nan_to_neg_inf(v: f64) -> f64 {
    if v.is_nan() { f64::NEG_INFINITY } else { v }
}

/// Σᵢ of a per-element function; −∞ for bad shapes. Kept out of line: one small function per
/// family and function, rather than every family's loop inlined into one dispatcher.
#[inline(never)]
fn sum_of<E: Elementwise>(n: usize, x: Col, y: Col, cols: Option<[Col; 3]>) -> f64 {
    if n == 0 {
        return 0.0;
    }
    let Some(cols) = cols else {
        return f64::NEG_INFINITY;
    };
    let mut total = 0.0;
    walk::<E>(n, x, y, &cols, |_, v| total += v);
    nan_to_neg_inf(total)
}

/// A per-element function into `out`; all −∞ for bad shapes (out of line, as [`sum_of`]).
#[inline(never)]
fn each_of<E: Elementwise>(x: Col, y: Col, cols: Option<[Col; 3]>, out: &mut [f64]) {
    let Some(cols) = cols else {
        out.fill(f64::NEG_INFINITY);
        return;
    };
    if out.is_empty() {
        return;
    }
    walk::<E>(out.len(), x, y, &cols, |i, v| out[i] = nan_to_neg_inf(v));
}

/// Σᵢ log f(xᵢ; θᵢ) for i in 0..n. Parameters outside their domain, variates outside the support
/// and NaN give −∞; so do columns too short for `n` or the wrong number of parameters (the
/// evaluator checks shapes when compiling, so that is a guard, not a path). Allocates nothing.
pub fn sum_log_density(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    let cols = padded(family, n, &[x], params);
    with_family!(family, |K, T| sum_of::<Density<K>>(n, x, NO_Y, cols))
}

/// Σᵢ log P(X ≤ xᵢ; θᵢ) (left censoring: each xᵢ is only known to be at least the value). Discrete
/// families at ⌊xᵢ⌋. Same conventions as [`sum_log_density`].
pub fn sum_log_cdf(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    let cols = padded(family, n, &[x], params);
    with_family!(family, |K, T| sum_of::<LnSide<T, false>>(n, x, NO_Y, cols))
}

/// Σᵢ log P(X > xᵢ; θᵢ) (right censoring). Discrete families at ⌊xᵢ⌋.
pub fn sum_log_ccdf(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    let cols = padded(family, n, &[x], params);
    with_family!(family, |K, T| sum_of::<LnSide<T, true>>(n, x, NO_Y, cols))
}

/// Σᵢ log P(lowerᵢ < X ≤ upperᵢ; θᵢ) (interval censoring). An empty interval (lower ≥ upper, or the
/// same count after flooring) gives −∞.
pub fn sum_log_interval(family: Family, n: usize, lower: Col, upper: Col, params: &[Col]) -> f64 {
    let cols = padded(family, n, &[lower, upper], params);
    with_family!(family, |K, T| sum_of::<LnInterval<K, T>>(n, lower, upper, cols))
}

/// log f(xᵢ; θᵢ) into `out[i]` for i in 0..out.len() (per-observation mixtures need the terms, not
/// their sum). Every entry is −∞ if the columns do not cover `out.len()` elements.
pub fn log_density_each(family: Family, x: Col, params: &[Col], out: &mut [f64]) {
    let cols = padded(family, out.len(), &[x], params);
    with_family!(family, |K, T| each_of::<Density<K>>(x, NO_Y, cols, out))
}

/// log P(X ≤ xᵢ; θᵢ) into `out[i]` (truncation and censoring of lists).
pub fn log_cdf_each(family: Family, x: Col, params: &[Col], out: &mut [f64]) {
    let cols = padded(family, out.len(), &[x], params);
    with_family!(family, |K, T| each_of::<LnSide<T, false>>(x, NO_Y, cols, out))
}

/// log P(X > xᵢ; θᵢ) into `out[i]`.
pub fn log_ccdf_each(family: Family, x: Col, params: &[Col], out: &mut [f64]) {
    let cols = padded(family, out.len(), &[x], params);
    with_family!(family, |K, T| each_of::<LnSide<T, true>>(x, NO_Y, cols, out))
}

/// log P(lowerᵢ < X ≤ upperᵢ; θᵢ) into `out[i]` (truncation to a range, per element).
pub fn log_interval_each(family: Family, lower: Col, upper: Col, params: &[Col], out: &mut [f64]) {
    let cols = padded(family, out.len(), &[lower, upper], params);
    with_family!(family, |K, T| each_of::<LnInterval<K, T>>(lower, upper, cols, out))
}

/// Columns of one element each, for the scalar forms (as many as there are parameters, so that a
/// wrong count is still refused by the column forms).
#[inline]
fn scalar_cols(params: &[f64]) -> ([Col<'_>; 4], usize) {
    const ZERO: &[f64] = &[0.0];
    let mut cols = [Col::scalar(ZERO); 4];
    for (col, value) in cols.iter_mut().zip(params) {
        *col = Col::scalar(core::slice::from_ref(value));
    }
    (cols, params.len().min(4))
}

/// log f(x; θ) for one element; `params` in the order of [`Family::params`].
pub fn log_density(family: Family, x: f64, params: &[f64]) -> f64 {
    let (cols, len) = scalar_cols(params);
    sum_log_density(family, 1, Col::scalar(core::slice::from_ref(&x)), &cols[..len])
}

/// log P(X ≤ x; θ) for one element (discrete families at ⌊x⌋).
pub fn log_cdf(family: Family, x: f64, params: &[f64]) -> f64 {
    let (cols, len) = scalar_cols(params);
    sum_log_cdf(family, 1, Col::scalar(core::slice::from_ref(&x)), &cols[..len])
}

/// log P(X > x; θ) for one element (discrete families at ⌊x⌋).
pub fn log_ccdf(family: Family, x: f64, params: &[f64]) -> f64 {
    let (cols, len) = scalar_cols(params);
    sum_log_ccdf(family, 1, Col::scalar(core::slice::from_ref(&x)), &cols[..len])
}

/// log P(lower < X ≤ upper; θ) for one element; −∞ for an empty interval.
pub fn log_interval(family: Family, lower: f64, upper: f64, params: &[f64]) -> f64 {
    let (cols, len) = scalar_cols(params);
    let (lo, hi) = (Col::scalar(core::slice::from_ref(&lower)), Col::scalar(core::slice::from_ref(&upper)));
    sum_log_interval(family, 1, lo, hi, &cols[..len])
}
