//! One log-density kernel per univariate family, split into what depends only on the parameters
//! (computed once per parameter value) and what must be computed per data element.
//!
//! Each family implements [`Kernel`]: `prepare` checks the parameters' domain and hoists logs,
//! log-gamma values and reciprocals; `eval` finishes the density of one element. The driver in
//! `dist` calls `prepare` once when the parameters it depends on are broadcast scalars, and once
//! per element otherwise — one formula, two costs. Forms follow BDA3 Appendix A (Gelman et al.
//! 2013) with the numerically stable rewrites noted beside each family.

use super::special::{self, HALF_LN_2PI, LN_2, LN_PI};
use libm::{exp, log, log1p};

/// Parameter values of one element, in the family's order, padded with zeros to three.
pub(super) type Params = [f64; 3];

const NEG_INF: f64 = f64::NEG_INFINITY;

/// A family's log-density, split so the parameter-only work can be done once.
pub(super) trait Kernel: Sized {
    /// Bit j set: `prepare` reads parameter j. Bits clear: parameters `eval` reads itself
    /// (locations, trials), which cost nothing to read per element.
    const HOISTED: u8;

    /// Checks the parameters' domain and computes the constants; `None` outside the domain.
    fn prepare(p: &Params) -> Option<Self>;

    /// log f(x; p) for one element, −∞ outside the support; may read the non-hoisted parameters.
    fn eval(&self, x: f64, p: &Params) -> f64;

    /// log f(x; p) without reusing anything (the path when hoisted parameters vary).
    #[inline]
    fn direct(x: f64, p: &Params) -> f64 {
        match Self::prepare(p) {
            Some(kernel) => kernel.eval(x, p),
            None => NEG_INF,
        }
    }
}

/// Finite and strictly positive (false for NaN).
#[inline]
fn positive(v: f64) -> bool {
    v > 0.0 && v < f64::INFINITY
}

/// A finite non-negative integer (false for NaN).
#[inline]
pub(super) fn is_count(v: f64) -> bool {
    v >= 0.0 && v.is_finite() && v == v.trunc()
}

/// k·log v with the convention 0·log 0 = 0, given log v.
#[inline]
fn times_log(k: f64, log_v: f64) -> f64 {
    if k == 0.0 { 0.0 } else { k * log_v }
}

/// 1/scale and −log scale, shared by every location–scale family.
#[derive(Clone, Copy)]
struct Scale {
    inv: f64,
    neg_log: f64,
}

impl Scale {
    #[inline]
    fn new(scale: f64) -> Option<Scale> {
        positive(scale).then(|| Scale { inv: 1.0 / scale, neg_log: -log(scale) })
    }
}

/// normal(mean, sd): −½log(2π) − log σ − z²/2, z = (x − μ)/σ.
pub(super) struct Normal {
    inv_sd: f64,
    norm: f64,
}

impl Kernel for Normal {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[1]).map(|s| Normal { inv_sd: s.inv, norm: s.neg_log - HALF_LN_2PI })
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        let z = (x - p[0]) * self.inv_sd;
        self.norm - 0.5 * z * z
    }
}

/// student_t(dof, location, scale):
/// lnΓ((ν+1)/2) − lnΓ(ν/2) − ½log(νπ) − log σ − (ν+1)/2 · log1p(z²/ν).
///
/// The three constant terms equal log[(ν/2)_½ / (ν/2)^½] − ½log(2π), computed without the
/// cancellation of two large log-gamma values when ν is large.
pub(super) struct StudentT {
    half_dof_plus_half: f64,
    inv_dof: f64,
    inv_scale: f64,
    norm: f64,
}

impl Kernel for StudentT {
    const HOISTED: u8 = 0b101;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let dof = p[0];
        let scale = Scale::new(p[2]).filter(|_| positive(dof))?;
        Some(StudentT {
            half_dof_plus_half: 0.5 * dof + 0.5,
            inv_dof: 1.0 / dof,
            inv_scale: scale.inv,
            norm: special::ln_poch_over_pow(0.5 * dof, 0.5) - HALF_LN_2PI + scale.neg_log,
        })
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        let z = (x - p[1]) * self.inv_scale;
        self.norm - self.half_dof_plus_half * log1p(z * z * self.inv_dof)
    }
}

/// cauchy(location, scale): −log(πσ) − log1p(z²).
pub(super) struct Cauchy(Scale);

impl Kernel for Cauchy {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[1]).map(Cauchy)
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        let z = (x - p[0]) * self.0.inv;
        self.0.neg_log - LN_PI - log1p(z * z)
    }
}

/// laplace(location, scale): −log(2b) − |x − μ|/b.
pub(super) struct Laplace(Scale);

impl Kernel for Laplace {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[1]).map(Laplace)
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        self.0.neg_log - LN_2 - (x - p[0]).abs() * self.0.inv
    }
}

/// logistic(location, scale): −|z| − log s − 2·log1p(e^{−|z|}); the density is symmetric in z, and
/// with |z| the exponential never overflows.
pub(super) struct Logistic(Scale);

impl Kernel for Logistic {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[1]).map(Logistic)
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        let a = ((x - p[0]) * self.0.inv).abs();
        self.0.neg_log - a - 2.0 * log1p(exp(-a))
    }
}

/// exponential(rate): log λ − λx on x ≥ 0.
pub(super) struct Exponential {
    rate: f64,
    log_rate: f64,
}

impl Kernel for Exponential {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let rate = p[0];
        positive(rate).then(|| Exponential { rate, log_rate: log(rate) })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if x >= 0.0 { self.log_rate - self.rate * x } else { NEG_INF }
    }
}

/// Shapes from here on use the saddle-point forms of the gamma, inverse-gamma and beta densities:
/// below it the log-gamma values subtracted in the textbook form cost at most about 1e-13
/// absolute; beyond it that grows like ε·α·log α (2e-11 at α = 10⁴).
const LARGE_SHAPE: f64 = 1000.0;

/// gamma(shape, rate): α log β − lnΓ(α) + (α − 1) log x − βx on x > 0. For α ≥ 1000 it is
/// log α − log x + log[(βx)^α e^{−βx}/Γ(α + 1)], the last in Loader's (2000) saddle-point form
/// (see `special::IncompleteGamma`), which does not subtract log-gamma values of order α log α.
pub(super) struct Gamma {
    shape_minus_1: f64,
    rate: f64,
    norm: f64,
    large: Option<special::IncompleteGamma>,
}

impl Kernel for Gamma {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (shape, rate) = (p[0], p[1]);
        if !(positive(shape) && positive(rate)) {
            return None;
        }
        if shape >= LARGE_SHAPE {
            let large = special::IncompleteGamma::new(shape);
            return Some(Gamma { shape_minus_1: shape - 1.0, rate, norm: log(shape), large });
        }
        Some(Gamma { shape_minus_1: shape - 1.0, rate, norm: shape * log(rate) - special::lgamma(shape), large: None })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        match &self.large {
            _ if x.is_nan() || x <= 0.0 => NEG_INF,
            Some(front) => self.norm - log(x) + front.ln_front(self.rate * x),
            None => self.norm + self.shape_minus_1 * log(x) - self.rate * x,
        }
    }
}

/// inv_gamma(shape, scale): α log β − lnΓ(α) − (α + 1) log x − β/x on x > 0; for α ≥ 1000,
/// log α − log x + log[(β/x)^α e^{−β/x}/Γ(α + 1)] in the saddle-point form, as for `Gamma`.
pub(super) struct InvGamma {
    shape_plus_1: f64,
    scale: f64,
    norm: f64,
    large: Option<special::IncompleteGamma>,
}

impl Kernel for InvGamma {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (shape, scale) = (p[0], p[1]);
        if !(positive(shape) && positive(scale)) {
            return None;
        }
        if shape >= LARGE_SHAPE {
            let large = special::IncompleteGamma::new(shape);
            return Some(InvGamma { shape_plus_1: shape + 1.0, scale, norm: log(shape), large });
        }
        let norm = shape * log(scale) - special::lgamma(shape);
        Some(InvGamma { shape_plus_1: shape + 1.0, scale, norm, large: None })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        match &self.large {
            _ if x.is_nan() || x <= 0.0 => NEG_INF,
            Some(front) => self.norm - log(x) + front.ln_front(self.scale / x),
            None => self.norm - self.shape_plus_1 * log(x) - self.scale / x,
        }
    }
}

/// beta(a, b): (a − 1) log x + (b − 1) log1p(−x) − log B(a, b) on 0 < x < 1; when both shapes are
/// at least 1000, log[xᵃ(1−x)ᵇ/B(a, b)] − log x − log1p(−x) with the first term in its saddle-point
/// form (see `special::IncompleteBeta`).
pub(super) struct Beta {
    a_minus_1: f64,
    b_minus_1: f64,
    norm: f64,
    large: Option<special::IncompleteBeta>,
}

impl Kernel for Beta {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (a, b) = (p[0], p[1]);
        if !(positive(a) && positive(b)) {
            return None;
        }
        let large = if a >= LARGE_SHAPE && b >= LARGE_SHAPE { special::IncompleteBeta::new(a, b) } else { None };
        let norm = if large.is_some() { 0.0 } else { -special::lbeta(a, b) };
        Some(Beta { a_minus_1: a - 1.0, b_minus_1: b - 1.0, norm, large })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if !(x > 0.0 && x < 1.0) {
            NEG_INF
        } else if let Some(front) = &self.large {
            front.ln_front(x, 1.0 - x) - log(x) - log1p(-x)
        } else {
            self.norm + self.a_minus_1 * log(x) + self.b_minus_1 * log1p(-x)
        }
    }
}

/// lognormal(meanlog, sdlog): −log x − log σ − ½log(2π) − (log x − μ)²/(2σ²) on x > 0.
pub(super) struct LogNormal(Normal);

impl Kernel for LogNormal {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Normal::prepare(p).map(LogNormal)
    }
    #[inline]
    fn eval(&self, x: f64, p: &Params) -> f64 {
        if x > 0.0 {
            let log_x = log(x);
            self.0.eval(log_x, p) - log_x
        } else {
            NEG_INF
        }
    }
}

/// uniform(lower, upper): −log(upper − lower) on lower ≤ x ≤ upper.
pub(super) struct Uniform {
    lower: f64,
    upper: f64,
    /// −log(upper − lower).
    pub(super) norm: f64,
}

impl Kernel for Uniform {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (lower, upper) = (p[0], p[1]);
        if !(lower.is_finite() && upper.is_finite() && lower < upper) {
            return None;
        }
        Some(Uniform { lower, upper, norm: -ln_distance(lower, upper) })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if x >= self.lower && x <= self.upper { self.norm } else { NEG_INF }
    }
}

/// log(b − a) for finite a ≤ b: two finite numbers can still be further apart than the largest
/// double, and then the difference of the halves is taken.
#[inline]
pub(super) fn ln_distance(a: f64, b: f64) -> f64 {
    let width = b - a;
    if width.is_finite() { log(width) } else { log(0.5 * b - 0.5 * a) + LN_2 }
}

/// halfnormal(scale): log 2 − ½log(2π) − log σ − x²/(2σ²) on x ≥ 0.
pub(super) struct HalfNormal(Scale);

impl Kernel for HalfNormal {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[0]).map(HalfNormal)
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if x >= 0.0 {
            let z = x * self.0.inv;
            self.0.neg_log + (LN_2 - HALF_LN_2PI) - 0.5 * z * z
        } else {
            NEG_INF
        }
    }
}

/// halfcauchy(scale): log 2 − log(πσ) − log1p((x/σ)²) on x ≥ 0.
pub(super) struct HalfCauchy(Scale);

impl Kernel for HalfCauchy {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        Scale::new(p[0]).map(HalfCauchy)
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if x >= 0.0 {
            let z = x * self.0.inv;
            self.0.neg_log + (LN_2 - LN_PI) - log1p(z * z)
        } else {
            NEG_INF
        }
    }
}

/// weibull(shape, scale): log k − log λ + (k − 1) log(x/λ) − (x/λ)ᵏ on x > 0; (x/λ)ᵏ is
/// exp(k·log(x/λ)), reusing the logarithm instead of a second one inside `pow`.
pub(super) struct Weibull {
    shape: f64,
    shape_minus_1: f64,
    log_scale: f64,
    norm: f64,
}

impl Kernel for Weibull {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (shape, scale) = (p[0], p[1]);
        (positive(shape) && positive(scale)).then(|| {
            let log_scale = log(scale);
            Weibull { shape, shape_minus_1: shape - 1.0, log_scale, norm: log(shape) - log_scale }
        })
    }
    #[inline]
    fn eval(&self, x: f64, _: &Params) -> f64 {
        if x > 0.0 {
            // log x − log λ rather than log(x/λ): the quotient can underflow, the difference cannot.
            let log_ratio = log(x) - self.log_scale;
            self.norm + self.shape_minus_1 * log_ratio - exp(self.shape * log_ratio)
        } else {
            NEG_INF
        }
    }
}

/// Counts from here on use Loader's saddle-point forms instead of log k! from the table.
const LARGE_COUNT: f64 = special::FACTORIAL_TABLE_LEN as f64;

/// poisson(rate): k log λ − λ − log k! on k = 0, 1, 2, …
///
/// For k ≥ 256 the three terms are large and nearly cancel when k ≈ λ, so there it is
/// −δ(k) − D(k, λ) − ½log(2πk) (Loader 2000; δ = Stirling's error, D = deviance term).
pub(super) struct Poisson {
    rate: f64,
    log_rate: f64,
}

impl Kernel for Poisson {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let rate = p[0];
        positive(rate).then(|| Poisson { rate, log_rate: log(rate) })
    }
    #[inline]
    fn eval(&self, k: f64, _: &Params) -> f64 {
        if !is_count(k) {
            NEG_INF
        } else if k < LARGE_COUNT {
            k * self.log_rate - self.rate - special::ln_factorial(k)
        } else {
            -special::stirling_error(k) - special::deviance_term(k, self.rate) - HALF_LN_2PI - 0.5 * log(k)
        }
    }
}

/// binomial(trials, probability): log C(n, k) + k log p + (n − k) log1p(−p) on k = 0, …, n.
/// p = 0 and p = 1 are allowed (0·log 0 = 0); trials must be a non-negative integer. For n ≥ 256
/// it is Loader's (2000) saddle-point form, which does not cancel (`special::ln_binomial_saddle`).
pub(super) struct Binomial {
    prob: f64,
    log_p: f64,
    log_q: f64,
}

impl Kernel for Binomial {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let prob = p[1];
        (0.0..=1.0).contains(&prob).then(|| Binomial { prob, log_p: log(prob), log_q: log1p(-prob) })
    }
    #[inline]
    fn eval(&self, k: f64, p: &Params) -> f64 {
        let n = p[0];
        if !(is_count(k) && is_count(n) && k <= n) {
            NEG_INF
        } else if n < LARGE_COUNT {
            let log_choose = special::ln_factorial(n) - special::ln_factorial(k) - special::ln_factorial(n - k);
            log_choose + times_log(k, self.log_p) + times_log(n - k, self.log_q)
        } else {
            special::ln_binomial_saddle(k, n, self.prob, 1.0 - self.prob)
        }
    }
}

/// negbinomial(mean μ, dispersion φ), Var = μ + μ²/φ:
/// lnΓ(k+φ) − lnΓ(φ) − log k! + k log(μ/(μ+φ)) + φ log(φ/(μ+φ)).
///
/// Evaluated as log[(φ)ₖ/φᵏ] + k log μ − (k + φ)·log1p(μ/φ) − log k!, which stays accurate as
/// φ → ∞ (the Poisson limit) where the textbook form subtracts two huge log-gamma values; for
/// k ≥ 256 as log(φ/(φ+k)) + log Binomial(φ; φ + k, φ/(μ+φ)) in Loader's (2000) saddle-point form.
pub(super) struct NegBinomial {
    dispersion: f64,
    poch: special::PochOverPow,
    log_mean: f64,
    log1p_mean_over_dispersion: f64,
    /// φ/(μ+φ) and μ/(μ+φ), each computed directly so neither loses digits as 1 − the other.
    p: f64,
    q: f64,
}

impl Kernel for NegBinomial {
    const HOISTED: u8 = 0b011;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let (mean, dispersion) = (p[0], p[1]);
        (positive(mean) && positive(dispersion)).then(|| NegBinomial {
            dispersion,
            poch: special::PochOverPow::new(dispersion),
            log_mean: log(mean),
            log1p_mean_over_dispersion: log1p(mean / dispersion),
            p: dispersion / (mean + dispersion),
            q: mean / (mean + dispersion),
        })
    }
    #[inline]
    fn eval(&self, k: f64, _: &Params) -> f64 {
        let phi = self.dispersion;
        if !is_count(k) {
            NEG_INF
        } else if k < LARGE_COUNT {
            self.poch.ln_at(k) + k * self.log_mean
                - (k + phi) * self.log1p_mean_over_dispersion
                - special::ln_factorial(k)
        } else {
            log(phi / (phi + k)) + special::ln_binomial_saddle(phi, phi + k, self.p, self.q)
        }
    }
}

/// bernoulli(probability): log p if y = 1, log1p(−p) if y = 0; p in [0, 1].
pub(super) struct Bernoulli {
    log_p: f64,
    log_q: f64,
}

impl Kernel for Bernoulli {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let prob = p[0];
        (0.0..=1.0).contains(&prob).then(|| Bernoulli { log_p: log(prob), log_q: log1p(-prob) })
    }
    #[inline]
    fn eval(&self, y: f64, _: &Params) -> f64 {
        binary_choice(y, self.log_p, self.log_q)
    }
}

/// bernoulli_logit(logodds α): yα − log(1 + e^α), i.e. −softplus(−α) if y = 1 and −softplus(α)
/// if y = 0 — never log(1 − expit(α)), which loses every digit once expit(α) rounds to 1.
pub(super) struct BernoulliLogit {
    log_p: f64,
    log_q: f64,
}

impl Kernel for BernoulliLogit {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let logodds = p[0];
        Some(BernoulliLogit { log_p: -special::log1p_exp(-logodds), log_q: -special::log1p_exp(logodds) })
    }
    #[inline]
    fn eval(&self, y: f64, _: &Params) -> f64 {
        binary_choice(y, self.log_p, self.log_q)
    }
    /// With a log-odds per element (logistic regression) only the softplus that is used is computed.
    #[inline]
    fn direct(y: f64, p: &Params) -> f64 {
        let logodds = p[0];
        if y == 1.0 {
            -special::log1p_exp(-logodds)
        } else if y == 0.0 {
            -special::log1p_exp(logodds)
        } else {
            NEG_INF
        }
    }
}

/// binomial(trials n, logodds α): log C(n, k) − k·softplus(−α) − (n − k)·softplus(α), the
/// binomial with p = 1/(1 + e^−α) and both log p and log(1 − p) computed without forming p.
/// For n ≥ 256 the log C(n, k) + … is Loader's (2000) saddle-point form with p and q = 1 − p
/// each computed directly, while both are normal numbers; past that (|α| > 700 or so) it is
/// log C(n, k) from the saddle-point form at p = ½ plus the two stable terms.
pub(super) struct BinomialLogit {
    pub(super) p: f64,
    pub(super) q: f64,
    log_p: f64,
    log_q: f64,
}

impl Kernel for BinomialLogit {
    const HOISTED: u8 = 0b010;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let logodds = p[1];
        if logodds.is_nan() {
            return None;
        }
        let (log_p, log_q) = (-special::log1p_exp(-logodds), -special::log1p_exp(logodds));
        Some(BinomialLogit { p: exp(log_p), q: exp(log_q), log_p, log_q })
    }
    #[inline]
    fn eval(&self, k: f64, p: &Params) -> f64 {
        let n = p[0];
        if !(is_count(k) && is_count(n) && k <= n) {
            NEG_INF
        } else if n < LARGE_COUNT {
            let log_choose = special::ln_factorial(n) - special::ln_factorial(k) - special::ln_factorial(n - k);
            log_choose + times_log(k, self.log_p) + times_log(n - k, self.log_q)
        } else if self.p.min(self.q) >= f64::MIN_POSITIVE {
            special::ln_binomial_saddle(k, n, self.p, self.q)
        } else {
            let log_choose = special::ln_binomial_saddle(k, n, 0.5, 0.5) + n * LN_2;
            log_choose + times_log(k, self.log_p) + times_log(n - k, self.log_q)
        }
    }
}

/// poisson(lograte η): kη − e^η − log k!, the Poisson with rate e^η and no rate formed where
/// it would underflow. For k ≥ 256 it is the saddle-point form of [`Poisson`] when e^η is a
/// normal number; when e^η underflows the three terms no longer cancel and the direct form is exact.
pub(super) struct PoissonLog {
    lograte: f64,
    pub(super) rate: f64,
}

impl Kernel for PoissonLog {
    const HOISTED: u8 = 0b001;
    #[inline]
    fn prepare(p: &Params) -> Option<Self> {
        let lograte = p[0];
        (!lograte.is_nan() && lograte < f64::INFINITY).then(|| PoissonLog { lograte, rate: exp(lograte) })
    }
    #[inline]
    fn eval(&self, k: f64, _: &Params) -> f64 {
        if !is_count(k) {
            NEG_INF
        } else if k < LARGE_COUNT || self.rate < f64::MIN_POSITIVE {
            times_log(k, self.lograte) - self.rate - special::ln_factorial(k)
        } else {
            -special::stirling_error(k) - special::deviance_term(k, self.rate) - HALF_LN_2PI - 0.5 * log(k)
        }
    }
}

/// log p for y = 1, log q for y = 0, −∞ for anything else.
#[inline]
fn binary_choice(y: f64, log_p: f64, log_q: f64) -> f64 {
    if y == 1.0 {
        log_p
    } else if y == 0.0 {
        log_q
    } else {
        NEG_INF
    }
}
