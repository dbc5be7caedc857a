//! Log-densities of the distributions a model can name, vectorised over data columns.
//!
//! INTERFACE (kept stable for the evaluator in `tape`):
//! - [`Family`]: one variant per univariate distribution, with its model-language name, its
//!   parameter names in order, and the support of its variate.
//! - [`Col`]: one argument column, a broadcast scalar (stride 0) or a slice (stride 1).
//! - [`sum_log_density`]: Σᵢ log f(xᵢ; θᵢ) over `n` elements, with per-family fast paths when the
//!   parameters are broadcast scalars (e.g. log σ computed once, not n times).
//! - [`MvNormal`]: a multivariate normal whose covariance is data, factorised once.
//!   All transcendental functions come from `libm` (bit-identical natively and in wasm).

pub mod quantile;
pub mod special;

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
}

/// The values a variate may take.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Variate {
    Real,
    NonNegative,
    Positive,
    Unit,
    /// Non-negative integers.
    Count,
    /// 0 or 1.
    Binary,
    /// Between the first two parameters (the uniform distribution).
    BetweenParams,
}

impl Variate {
    /// Whether `x` is a possible value (for `BetweenParams`, any finite number).
    pub fn contains(self, x: f64) -> bool {
        x.is_finite()
            && match self {
                Variate::Real | Variate::BetweenParams => true,
                Variate::NonNegative => x >= 0.0,
                Variate::Positive => x > 0.0,
                Variate::Unit => (0.0..=1.0).contains(&x),
                Variate::Count => x >= 0.0 && x.fract() == 0.0,
                Variate::Binary => x == 0.0 || x == 1.0,
            }
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Family {
    Normal,
}

impl Family {
    pub const ALL: &'static [Family] = &[Family::Normal];

    pub fn name(self) -> &'static str {
        match self {
            Family::Normal => "normal",
        }
    }

    pub fn from_name(name: &str) -> Option<Family> {
        Family::ALL.iter().copied().find(|f| f.name() == name)
    }

    /// Parameter names, in the order they are written.
    pub fn params(self) -> &'static [&'static str] {
        match self {
            Family::Normal => &["mean", "sd"],
        }
    }

    pub fn variate(self) -> Variate {
        match self {
            Family::Normal => Variate::Real,
        }
    }
}

/// Σᵢ log f(xᵢ; θᵢ) for i in 0..n. Parameters outside their domain give −∞.
pub fn sum_log_density(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    match family {
        Family::Normal => {
            let (mu, sigma) = (params[0], params[1]);
            let mut total = 0.0;
            for i in 0..n {
                let s = sigma.get(i);
                if s <= 0.0 {
                    return f64::NEG_INFINITY;
                }
                let z = (x.get(i) - mu.get(i)) / s;
                total += -0.5 * z * z - libm::log(s) - special::HALF_LN_2PI;
            }
            total
        }
    }
}

/// A multivariate normal with a fixed covariance: the inverse Cholesky factor is computed once.
#[derive(Clone, Debug)]
pub struct MvNormal {
    dim: usize,
    /// L⁻¹, row-major lower triangle, where Σ = L Lᵀ.
    inv_chol: Vec<f64>,
    /// −(d/2) log 2π − Σ log Lᵢᵢ.
    log_norm: f64,
}

impl MvNormal {
    /// Factorise a `dim`×`dim` row-major covariance; an error names why it is not valid.
    pub fn new(cov: &[f64], dim: usize) -> Result<Self, String> {
        let _ = (cov, dim);
        Err("not yet".into())
    }

    pub fn dim(&self) -> usize {
        self.dim
    }

    /// log N(x; μ, Σ); `x` and `mu` are columns of length `dim`.
    pub fn log_density(&self, x: Col, mu: Col) -> f64 {
        let d = self.dim;
        let mut quad = 0.0;
        for i in 0..d {
            let row = &self.inv_chol[i * d..i * d + i + 1];
            let z: f64 = row.iter().enumerate().map(|(j, l)| l * (x.get(j) - mu.get(j))).sum();
            quad += z * z;
        }
        self.log_norm - 0.5 * quad
    }
}
