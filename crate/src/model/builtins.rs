//! The functions a model can call, by name, and their definitions on numbers and slices.
//!
//! The checker looks names up here; [`super::compute`] applies the definitions to slices for both
//! the constant folder and the compiled evaluator.

/// A function of one number, applied element by element.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum UnaryFn {
    Neg,
    Exp,
    Log,
    Log1p,
    Expm1,
    Sqrt,
    Abs,
    Lgamma,
    Logistic,
    Logit,
    Sin,
    Cos,
}

impl UnaryFn {
    #[inline]
    pub fn apply(self, x: f64) -> f64 {
        match self {
            UnaryFn::Neg => -x,
            UnaryFn::Exp => libm::exp(x),
            UnaryFn::Log => libm::log(x),
            UnaryFn::Log1p => libm::log1p(x),
            UnaryFn::Expm1 => libm::expm1(x),
            UnaryFn::Sqrt => x.sqrt(),
            UnaryFn::Abs => x.abs(),
            UnaryFn::Lgamma => libm::lgamma(x),
            UnaryFn::Logistic => logistic(x),
            UnaryFn::Logit => libm::log(x) - libm::log1p(-x),
            UnaryFn::Sin => libm::sin(x),
            UnaryFn::Cos => libm::cos(x),
        }
    }
}

/// A function of two numbers, applied element by element with scalars broadcast.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinaryFn {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
    Min,
    Max,
    /// log(eᵃ + eᵇ): the log of a sum of two factors, e.g. a mixture.
    LogAddExp,
    /// log(eᵃ − eᵇ); NaN when b > a.
    LogSubExp,
}

impl BinaryFn {
    #[inline]
    pub fn apply(self, a: f64, b: f64) -> f64 {
        match self {
            BinaryFn::Add => a + b,
            BinaryFn::Sub => a - b,
            BinaryFn::Mul => a * b,
            BinaryFn::Div => a / b,
            BinaryFn::Pow => libm::pow(a, b),
            BinaryFn::Min => a.min(b),
            BinaryFn::Max => a.max(b),
            BinaryFn::LogAddExp => log_add_exp(a, b),
            BinaryFn::LogSubExp => log_sub_exp(a, b),
        }
    }

    /// The value `x` for which `f(x, y) = y`, the result of folding no terms: 0 for a sum, 1 for
    /// a product, −∞ for a log-sum-exp or a maximum, +∞ for a minimum (NaN where there is none).
    pub fn identity(self) -> f64 {
        match self {
            BinaryFn::Add => 0.0,
            BinaryFn::Mul => 1.0,
            BinaryFn::Min => f64::INFINITY,
            BinaryFn::Max | BinaryFn::LogAddExp => f64::NEG_INFINITY,
            BinaryFn::Sub | BinaryFn::Div | BinaryFn::Pow | BinaryFn::LogSubExp => f64::NAN,
        }
    }
}

/// A function from a whole vector (or matrix) to one number.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ReduceFn {
    Sum,
    Prod,
    Mean,
    Min,
    Max,
    /// log Σ exp(xᵢ), shifted by the largest element so that it neither overflows nor underflows.
    LogSumExp,
}

impl ReduceFn {
    pub fn apply(self, xs: &[f64]) -> f64 {
        match self {
            ReduceFn::Sum => xs.iter().sum(),
            ReduceFn::Prod => xs.iter().product(),
            ReduceFn::Mean => xs.iter().sum::<f64>() / xs.len() as f64,
            ReduceFn::Min => xs.iter().copied().fold(f64::INFINITY, f64::min),
            ReduceFn::Max => xs.iter().copied().fold(f64::NEG_INFINITY, f64::max),
            ReduceFn::LogSumExp => log_sum_exp(xs),
        }
    }

    /// The element-wise operation that folds terms the way this reduces elements; `None` for
    /// the mean, which is a sum divided by the count.
    pub fn pairwise(self) -> Option<BinaryFn> {
        match self {
            ReduceFn::Sum => Some(BinaryFn::Add),
            ReduceFn::Prod => Some(BinaryFn::Mul),
            ReduceFn::Min => Some(BinaryFn::Min),
            ReduceFn::Max => Some(BinaryFn::Max),
            ReduceFn::LogSumExp => Some(BinaryFn::LogAddExp),
            ReduceFn::Mean => None,
        }
    }
}

/// log Σ exp(xᵢ) (`dist::special`), called rather than inlined into every reduction.
#[inline(never)]
fn log_sum_exp(xs: &[f64]) -> f64 {
    crate::dist::special::log_sum_exp(xs)
}

/// What a function name means and how many arguments it takes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Builtin {
    Unary(UnaryFn),
    /// `pow(a, b)`, the same as `a ^ b`.
    Pow,
    /// `min`/`max`: one vector argument reduces it; two arguments compare element by element.
    MinMax(ReduceFn, BinaryFn),
    Reduce(ReduceFn),
    /// `dot(a, b)`: Σ aᵢbᵢ.
    Dot,
    /// `matvec(M, v)`: the matrix–vector product, kept apart from element-wise `*`.
    MatVec,
    /// `cumsum(x)`: running sums.
    CumSum,
    /// `diff(x)`, `diff(x, k)`: differences of elements k apart.
    Diff,
    /// `length(x)`: the number of elements of a list, or of rows of a matrix.
    Length,
}

/// Every callable name except the distributions, with a one-line description for help texts.
pub const FUNCTIONS: &[(&str, Builtin, &str)] = &[
    ("exp", Builtin::Unary(UnaryFn::Exp), "eˣ"),
    ("log", Builtin::Unary(UnaryFn::Log), "natural logarithm"),
    ("log1p", Builtin::Unary(UnaryFn::Log1p), "log(1 + x), accurate for small x"),
    ("expm1", Builtin::Unary(UnaryFn::Expm1), "eˣ − 1, accurate for small x"),
    ("sqrt", Builtin::Unary(UnaryFn::Sqrt), "square root"),
    ("abs", Builtin::Unary(UnaryFn::Abs), "absolute value"),
    ("lgamma", Builtin::Unary(UnaryFn::Lgamma), "log |Γ(x)|"),
    ("logistic", Builtin::Unary(UnaryFn::Logistic), "1 / (1 + e⁻ˣ)"),
    ("logit", Builtin::Unary(UnaryFn::Logit), "log(x / (1 − x))"),
    ("sin", Builtin::Unary(UnaryFn::Sin), "sine (radians)"),
    ("cos", Builtin::Unary(UnaryFn::Cos), "cosine (radians)"),
    ("pow", Builtin::Pow, "pow(a, b) = a ^ b"),
    ("min", Builtin::MinMax(ReduceFn::Min, BinaryFn::Min), "smallest element, or element-wise minimum of two"),
    ("max", Builtin::MinMax(ReduceFn::Max, BinaryFn::Max), "largest element, or element-wise maximum of two"),
    ("sum", Builtin::Reduce(ReduceFn::Sum), "sum of the elements"),
    ("prod", Builtin::Reduce(ReduceFn::Prod), "product of the elements"),
    ("mean", Builtin::Reduce(ReduceFn::Mean), "mean of the elements"),
    ("logsumexp", Builtin::Reduce(ReduceFn::LogSumExp), "log Σ exp(xᵢ), without overflow or underflow"),
    ("dot", Builtin::Dot, "dot(a, b) = Σ aᵢ·bᵢ"),
    ("matvec", Builtin::MatVec, "matvec(M, v): matrix–vector product"),
    ("cumsum", Builtin::CumSum, "running sums x₁, x₁ + x₂, …"),
    ("diff", Builtin::Diff, "diff(x) = x[2:n] − x[1:n−1]; diff(x, k): elements k apart"),
    ("length", Builtin::Length, "number of elements of a list (rows of a matrix)"),
];

pub fn lookup(name: &str) -> Option<Builtin> {
    FUNCTIONS.iter().find(|(n, ..)| *n == name).map(|&(_, b, _)| b)
}

/// 1 / (1 + e⁻ˣ), without overflow for large |x|.
#[inline]
pub fn logistic(x: f64) -> f64 {
    if x >= 0.0 {
        1.0 / (1.0 + libm::exp(-x))
    } else {
        let e = libm::exp(x);
        e / (1.0 + e)
    }
}

/// log logistic(x) = −log(1 + e⁻ˣ), accurate in both tails.
#[inline]
pub fn log_logistic(x: f64) -> f64 {
    -crate::dist::special::log1p_exp(-x)
}

/// log(eᵃ + eᵇ) without overflow.
#[inline]
pub fn log_add_exp(a: f64, b: f64) -> f64 {
    let (hi, lo) = if a >= b { (a, b) } else { (b, a) };
    if hi == f64::NEG_INFINITY { hi } else { hi + libm::log1p(libm::exp(lo - hi)) }
}

/// log(eᵃ − eᵇ); NaN when b > a, −∞ when they are equal.
#[inline]
pub fn log_sub_exp(a: f64, b: f64) -> f64 {
    if b > a {
        f64::NAN
    } else if b == f64::NEG_INFINITY {
        a
    } else {
        a + libm::log(-libm::expm1(b - a))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Values from REFERENCES.md §2 (scipy/mpmath; softplus and logsumexp rows).
    #[test]
    fn stable_forms_match_reference_values() {
        assert!((log_logistic(-30.0) - -30.000000000000092).abs() < 1e-13);
        assert!((-log_logistic(30.0) - 9.357622968839737e-14).abs() < 1e-27);
        assert!((log_add_exp(1000.0, 1000.0) - 1000.6931471805599).abs() < 1e-12);
        assert!((log_add_exp(-1000.0, -1000.5) - -999.5259230158199).abs() < 1e-12);
        assert_eq!(log_add_exp(f64::NEG_INFINITY, 0.0), 0.0);
        assert!((log_sub_exp(0.0, libm::log(0.25)) - libm::log(0.75)).abs() < 1e-15);
        assert!(log_sub_exp(0.0, 1.0).is_nan());
        assert!((logistic(0.0) - 0.5).abs() == 0.0 && logistic(-800.0) == 0.0 && logistic(800.0) == 1.0);
    }

    #[test]
    fn every_function_name_is_found() {
        for (name, builtin, _) in FUNCTIONS {
            assert_eq!(lookup(name), Some(*builtin));
        }
        assert_eq!(lookup("normal"), None);
    }
}
