//! Distribution functions of the univariate families: log P(X ≤ x), log P(X > x) and
//! log P(a < X ≤ b), accurate far into both tails.
//!
//! Each family implements [`Tails`]: at a point it returns a [`Tail`], the logarithm of the side it
//! computes directly (always the one that is not close to 1), so the other side is a complement
//! that keeps its digits — log P(X ≤ x) near 0 comes from log1p(−P(X > x)), never from log of a
//! number that rounded to 1. Discrete families are at P(X ≤ ⌊x⌋).
//!
//! The relations used (Abramowitz & Stegun 1964, ch. 26, and Johnson, Kotz & Balakrishnan,
//! *Univariate Discrete Distributions* (2005) §3.6, §4.5, §5.6 for the discrete ones; section
//! numbers from memory): Student-t through I_{ν/(ν+t²)}(ν/2, ½); gamma and inverse gamma through
//! P and Q; beta through I; Poisson P(X ≤ k) = Q(k + 1, λ); binomial P(X ≤ k) = I_{1−p}(n − k,
//! k + 1); negative binomial P(X ≤ k) = I_{φ/(μ+φ)}(φ, k + 1). The rest are closed forms.
//!
//! An interval's probability is a difference of two sides taken in logarithms: of the two upper
//! sides when both ends are at or above the median, of the two lower sides when both are below,
//! and 1 − F(a) − S(b) when the interval straddles the median. When the two sides are so close
//! that the difference would cancel (within 1% of each other), the probability is instead the
//! integral of the density over the interval (adaptive Gauss–Legendre) or, for counts, the sum of
//! the probabilities in it — so it is never 0 or negative for a non-empty interval.

use super::families::{self, Kernel, Params, is_count};
use super::special::{self, IncompleteBeta, IncompleteGamma, LN_2, LN_PI, Tail, ln_1m_exp, ln_normal_cdf, log1p_exp};
use libm::{log, log1p};
use std::sync::OnceLock;

const NEG_INF: f64 = f64::NEG_INFINITY;

/// A family's distribution function, split so the parameter-only work can be done once.
pub(super) trait Tails: Sized {
    /// Bit j set: `prepare` reads parameter j (as in [`Kernel::HOISTED`]).
    const HOISTED: u8;
    /// Counts: the variate is floored, and an interval's probability is a sum of probabilities.
    const DISCRETE: bool = false;

    /// Checks the parameters' domain and computes the constants; `None` outside the domain.
    fn prepare(p: &Params) -> Option<Self>;

    /// The directly computed side at x; a NaN `ln` when x is NaN (or a per-element parameter
    /// such as the binomial's trials is invalid).
    fn tail(&self, x: f64, p: &Params) -> Tail;
}

/// The lower side is empty: P(X ≤ x) = 0.
const NONE_BELOW: Tail = Tail { ln: NEG_INF, upper: false };
/// The upper side is empty: P(X > x) = 0.
const NONE_ABOVE: Tail = Tail { ln: NEG_INF, upper: true };
/// An invalid point.
const INVALID: Tail = Tail { ln: f64::NAN, upper: false };

/// The standard normal's sides at z: Φ(z) below the median, 1 − Φ(z) = Φ(−z) above it.
#[inline]
fn normal_tail(z: f64) -> Tail {
    if z < 0.0 { Tail::lower(ln_normal_cdf(z)) } else { Tail::upper(ln_normal_cdf(-z)) }
}

/// The sides of a distribution with cumulative hazard h at x, S = e^{−h}: the survival side once
/// it is below ½, log(1 − e^{−h}) = log(−expm1(−h)) before.
#[inline]
fn hazard_tail(h: f64) -> Tail {
    if h > LN_2 { Tail::upper(-h) } else { Tail::lower(log(-libm::expm1(-h))) }
}

/// Implements [`Tails`] for a family whose density kernel already checks what the tails need.
macro_rules! tails_from_kernel {
    ($family:ty, $discrete:expr, |$self_:ident, $x:ident, $p:ident| $body:expr) => {
        impl Tails for $family {
            const HOISTED: u8 = <$family as Kernel>::HOISTED;
            const DISCRETE: bool = $discrete;
            #[inline]
            fn prepare(p: &Params) -> Option<Self> {
                <$family as Kernel>::prepare(p)
            }
            #[inline]
            fn tail(&$self_, $x: f64, $p: &Params) -> Tail {
                $body
            }
        }
    };
}

/// A location parameter must be finite (the density kernels need not check it: an infinite
/// location already gives density 0 there, but it would give a distribution function of 0 or 1).
#[inline]
fn located(location: f64, tail: impl FnOnce() -> Tail) -> Tail {
    if location.is_finite() { tail() } else { INVALID }
}

// normal(mean, sd): Φ((x − μ)/σ).
tails_from_kernel!(families::Normal, false, |self, x, p| located(p[0], || normal_tail((x - p[0]) / p[1])));

// lognormal(meanlog, sdlog): Φ((log x − μ)/σ) on x > 0.
tails_from_kernel!(families::LogNormal, false, |self, x, p| {
    located(p[0], || if x <= 0.0 { NONE_BELOW } else { normal_tail((log(x) - p[0]) / p[1]) })
});

// cauchy(location, scale): F(z) = atan2(1, −z)/π, S(z) = atan2(1, z)/π, each exact on its side.
tails_from_kernel!(families::Cauchy, false, |self, x, p| {
    let z = (x - p[0]) / p[1];
    located(p[0], || {
        if z < 0.0 {
            Tail::lower(log(libm::atan2(1.0, -z)) - LN_PI)
        } else {
            Tail::upper(log(libm::atan2(1.0, z)) - LN_PI)
        }
    })
});

// laplace(location, scale): ½e^{z} below the location, ½e^{−z} above.
tails_from_kernel!(families::Laplace, false, |self, x, p| {
    let z = (x - p[0]) / p[1];
    located(p[0], || if z < 0.0 { Tail::lower(z - LN_2) } else { Tail::upper(-z - LN_2) })
});

// logistic(location, scale): log F = −log(1 + e^{−z}), log S = −log(1 + e^{z}).
tails_from_kernel!(families::Logistic, false, |self, x, p| {
    let z = (x - p[0]) / p[1];
    located(p[0], || if z < 0.0 { Tail::lower(-log1p_exp(-z)) } else { Tail::upper(-log1p_exp(z)) })
});

// exponential(rate): S = e^{−λx}.
tails_from_kernel!(families::Exponential, false, |self, x, p| {
    if x <= 0.0 { NONE_BELOW } else { hazard_tail(p[0] * x) }
});

// weibull(shape, scale): S = exp(−(x/λ)ᵏ), (x/λ)ᵏ = exp(k(log x − log λ)).
tails_from_kernel!(families::Weibull, false, |self, x, p| {
    if x <= 0.0 { NONE_BELOW } else { hazard_tail(libm::exp(p[0] * (log(x) - log(p[1])))) }
});

// uniform(lower, upper): (x − lower)/(upper − lower), whichever end is nearer.
tails_from_kernel!(families::Uniform, false, |self, x, p| {
    let (lo, hi) = (p[0], p[1]);
    if x <= lo {
        NONE_BELOW
    } else if x >= hi {
        NONE_ABOVE
    } else if x - lo <= hi - x {
        Tail::lower(families::ln_distance(lo, x) + self.norm)
    } else {
        Tail::upper(families::ln_distance(x, hi) + self.norm)
    }
});

/// The median of the half-normal in units of its scale: Φ⁻¹(¾).
const HALFNORMAL_MEDIAN: f64 = 0.674_489_750_196_081_7;

// halfnormal(scale): F = erf(z/√2), S = 2Φ(−z).
tails_from_kernel!(families::HalfNormal, false, |self, x, p| {
    let z = x / p[0];
    if x <= 0.0 {
        NONE_BELOW
    } else if z > HALFNORMAL_MEDIAN {
        Tail::upper(LN_2 + ln_normal_cdf(-z))
    } else {
        Tail::lower(log(special::erf(z * core::f64::consts::FRAC_1_SQRT_2)))
    }
});

/// log(2/π).
const LN_2_OVER_PI: f64 = -0.451_582_705_289_454_9;

// halfcauchy(scale): F = (2/π)atan(z), S = (2/π)atan(1/z).
tails_from_kernel!(families::HalfCauchy, false, |self, x, p| {
    let z = x / p[0];
    if x <= 0.0 {
        NONE_BELOW
    } else if z <= 1.0 {
        Tail::lower(log(libm::atan(z)) + LN_2_OVER_PI)
    } else {
        Tail::upper(log(libm::atan(1.0 / z)) + LN_2_OVER_PI)
    }
});

/// ⌊x⌋ for a count variate, or the tail that decides it: `Err` for NaN, below 0 or +∞.
#[inline]
fn floor_count(x: f64) -> Result<f64, Tail> {
    if x.is_nan() {
        Err(INVALID)
    } else if x < 0.0 {
        Err(NONE_BELOW)
    } else if x == f64::INFINITY {
        Err(NONE_ABOVE)
    } else {
        Ok(libm::floor(x))
    }
}

// poisson(rate): P(X ≤ k) = Q(k + 1, λ).
tails_from_kernel!(families::Poisson, true, |self, x, p| {
    match floor_count(x) {
        Err(tail) => tail,
        Ok(k) => IncompleteGamma::new(k + 1.0).map_or(INVALID, |g| g.tail(p[0]).flip()),
    }
});

// poisson with a log rate η: the Poisson's tails at λ = e^η.
tails_from_kernel!(families::PoissonLog, true, |self, x, _p| {
    match floor_count(x) {
        Err(tail) => tail,
        Ok(k) => IncompleteGamma::new(k + 1.0).map_or(INVALID, |g| g.tail(self.rate).flip()),
    }
});

// binomial(trials, probability): P(X ≤ k) = I_{1−p}(n − k, k + 1).
tails_from_kernel!(families::Binomial, true, |self, x, p| binomial_tail(p[0], x, p[1], 1.0 - p[1]));

// binomial with a log-odds η: p and q = 1 − p each from their own softplus, so that q keeps its
// digits at η = +800.
tails_from_kernel!(families::BinomialLogit, true, |self, x, p| binomial_tail(p[0], x, self.p, self.q));

/// The binomial's sides at x for n trials and success probability `prob`, with q = 1 − p given
/// separately so that a q close to 0 (from a log-odds, say) keeps its digits.
pub(super) fn binomial_tail(n: f64, x: f64, prob: f64, q: f64) -> Tail {
    if !is_count(n) {
        return INVALID;
    }
    let k = match floor_count(x) {
        Err(tail) => return tail,
        Ok(k) => k,
    };
    if k >= n || prob == 0.0 {
        NONE_ABOVE
    } else if q == 0.0 {
        NONE_BELOW
    } else {
        IncompleteBeta::new(n - k, k + 1.0).map_or(INVALID, |b| b.tail(q, prob))
    }
}

// bernoulli(probability): F = 1 − p on 0 ≤ x < 1.
tails_from_kernel!(families::Bernoulli, true, |self, x, p| {
    let prob = p[0];
    bernoulli_tail(x, prob <= 0.5, if prob <= 0.5 { log(prob) } else { log1p(-prob) })
});

// bernoulli with a log-odds α: log p = −log(1 + e^{−α}), log(1 − p) = −log(1 + e^{α}).
tails_from_kernel!(families::BernoulliLogit, true, |self, x, p| {
    let alpha = p[0];
    bernoulli_tail(x, alpha <= 0.0, if alpha <= 0.0 { -log1p_exp(-alpha) } else { -log1p_exp(alpha) })
});

/// A 0/1 variate's sides at x, given the log of its smaller side: P(X = 1) (`upper`) or P(X = 0).
#[inline]
fn bernoulli_tail(x: f64, upper: bool, ln_smaller: f64) -> Tail {
    if x.is_nan() || ln_smaller.is_nan() {
        INVALID
    } else if x < 0.0 {
        NONE_BELOW
    } else if x >= 1.0 {
        NONE_ABOVE
    } else {
        Tail { ln: ln_smaller, upper }
    }
}

/// student_t(dof, location, scale): P(T ≤ −|t|) = ½ I_{ν/(ν+t²)}(ν/2, ½).
pub(super) struct StudentTTails {
    beta: IncompleteBeta,
    /// (ν/2 − 1) log ν − log B(ν/2, ½): the far tail is this − ν log|t|.
    far: f64,
}

/// Beyond t² = 10²⁹⁰ ν the tail is its leading term (the next is 10⁻²⁹⁰ relative).
const STUDENT_FAR: f64 = 1e290;

impl Tails for StudentTTails {
    const HOISTED: u8 = 0b101;
    fn prepare(p: &Params) -> Option<Self> {
        let (dof, scale) = (p[0], p[2]);
        if !(scale > 0.0 && scale < f64::INFINITY) {
            return None;
        }
        let beta = IncompleteBeta::new(0.5 * dof, 0.5)?;
        Some(StudentTTails { beta, far: (0.5 * dof - 1.0) * log(dof) - special::lbeta(0.5 * dof, 0.5) })
    }
    fn tail(&self, x: f64, p: &Params) -> Tail {
        if !p[1].is_finite() {
            return INVALID;
        }
        let (dof, t) = (p[0], (x - p[1]) / p[2]);
        let tt = t * t;
        let ln_small = if tt.is_nan() {
            f64::NAN
        } else if tt > STUDENT_FAR * dof {
            self.far - dof * log(t.abs())
        } else {
            // x and y = 1 − x, each computed directly.
            let (beta_x, beta_y) = (dof / (dof + tt), tt / (dof + tt));
            -LN_2 + self.beta.tail(beta_x, beta_y).ln_lower()
        };
        if t < 0.0 { Tail::lower(ln_small) } else { Tail::upper(ln_small) }
    }
}

/// gamma(shape, rate): P(α, βx); with `INVERSE`, inv_gamma(shape, scale): P(X ≤ x) = Q(α, β/x).
pub(super) struct GammaTails<const INVERSE: bool>(IncompleteGamma);

impl<const INVERSE: bool> Tails for GammaTails<INVERSE> {
    const HOISTED: u8 = 0b001;
    fn prepare(p: &Params) -> Option<Self> {
        IncompleteGamma::new(p[0]).map(GammaTails)
    }
    /// The rate (or scale) is checked here, so that a shape shared by every element is prepared
    /// once while each element has its own rate (a gamma regression).
    fn tail(&self, x: f64, p: &Params) -> Tail {
        if !(p[1] > 0.0 && p[1] < f64::INFINITY) {
            INVALID
        } else if x <= 0.0 {
            NONE_BELOW
        } else if INVERSE {
            self.0.tail(p[1] / x).flip()
        } else {
            self.0.tail(p[1] * x)
        }
    }
}

/// beta(a, b): I_x(a, b).
pub(super) struct BetaTails(IncompleteBeta);

impl Tails for BetaTails {
    const HOISTED: u8 = 0b011;
    fn prepare(p: &Params) -> Option<Self> {
        IncompleteBeta::new(p[0], p[1]).map(BetaTails)
    }
    fn tail(&self, x: f64, _: &Params) -> Tail {
        if x <= 0.0 {
            NONE_BELOW
        } else if x >= 1.0 {
            NONE_ABOVE
        } else {
            self.0.tail(x, 1.0 - x)
        }
    }
}

/// negbinomial(mean μ, dispersion φ): P(X ≤ k) = I_p(φ, k + 1), p = φ/(μ+φ).
pub(super) struct NegBinomialTails {
    /// φ/(μ+φ) and μ/(μ+φ), each computed directly.
    p: f64,
    q: f64,
}

impl Tails for NegBinomialTails {
    const HOISTED: u8 = 0b011;
    const DISCRETE: bool = true;
    fn prepare(p: &Params) -> Option<Self> {
        let (mean, dispersion) = (p[0], p[1]);
        let positive = |v: f64| v > 0.0 && v < f64::INFINITY;
        (positive(mean) && positive(dispersion))
            .then(|| NegBinomialTails { p: dispersion / (mean + dispersion), q: mean / (mean + dispersion) })
    }
    fn tail(&self, x: f64, p: &Params) -> Tail {
        match floor_count(x) {
            Err(tail) => tail,
            Ok(k) => IncompleteBeta::new(p[1], k + 1.0).map_or(INVALID, |b| b.tail(self.p, self.q)),
        }
    }
}

/// Sides closer than this (in log) are differenced by integrating or summing instead: a log1mexp
/// of −0.01 loses two digits; closer ones would lose more.
const NARROW: f64 = -0.01;
/// Counts summed one by one at most, for a narrow interval of a discrete family.
const MAX_SUMMED: f64 = 1024.0;

/// log P(lo < X ≤ hi) for one element (see the module notes); −∞ for an empty interval or an
/// invalid point.
pub(super) fn ln_interval<K: Kernel, T: Tails>(tails: &T, lo: f64, hi: f64, p: &Params) -> f64 {
    let (lo, hi) = if T::DISCRETE { (libm::floor(lo), libm::floor(hi)) } else { (lo, hi) };
    if lo.is_nan() || hi.is_nan() {
        return f64::NAN;
    }
    if lo >= hi {
        return NEG_INF;
    }
    let (a, b) = (tails.tail(lo, p), tails.tail(hi, p));
    if a.ln.is_nan() || b.ln.is_nan() {
        return f64::NAN;
    }
    let (value, narrow) = match (a.upper, b.upper) {
        // Both in the upper half: S(a) − S(b).
        (true, true) => (a.ln + ln_1m_exp(b.ln - a.ln), b.ln - a.ln > NARROW),
        // Straddling the median: 1 − F(a) − S(b).
        (false, true) => {
            let inside = log1p(-(libm::exp(a.ln) + libm::exp(b.ln)));
            (inside, inside < log(-libm::expm1(NARROW)))
        }
        // Both lower (or, after rounding, an upper a and a lower b): F(b) − F(a).
        _ => {
            let (fa, fb) = (a.ln_lower(), b.ln_lower());
            (fb + ln_1m_exp(fa - fb), fa - fb > NARROW)
        }
    };
    if !narrow && !value.is_nan() {
        return value;
    }
    let closer = if T::DISCRETE {
        (hi - lo <= MAX_SUMMED).then(|| sum_probabilities::<K>(lo, hi, p))
    } else {
        integrate_density::<K>(lo, hi, p)
    };
    match closer {
        Some(v) if !v.is_nan() => v,
        _ => value,
    }
}

/// log Σ P(X = k) for k = lo + 1, …, hi, by a running log-sum-exp.
fn sum_probabilities<K: Kernel>(lo: f64, hi: f64, p: &Params) -> f64 {
    let mut total = NEG_INF;
    let mut k = lo + 1.0;
    while k <= hi {
        total = special::log_add_exp(total, K::direct(k, p));
        k += 1.0;
    }
    total
}

/// log ∫ f over [lo, hi] by adaptive Gauss–Legendre quadrature, `None` when the density is not
/// finite at the midpoint (the scale the integrand is measured against).
fn integrate_density<K: Kernel>(lo: f64, hi: f64, p: &Params) -> Option<f64> {
    let shift = K::direct(0.5 * lo + 0.5 * hi, p);
    if !shift.is_finite() {
        return None;
    }
    let f = |x: f64| libm::exp(K::direct(x, p) - shift);
    let mut budget = MAX_PANELS;
    let total = adaptive(&f, lo, hi, gauss_legendre(&f, lo, hi), 0, &mut budget);
    (total > 0.0).then(|| log(total) + shift)
}

/// Deepest bisection of the adaptive quadrature (a narrow interval is smooth at its own scale, so
/// this is reached only beside a singularity of the density, such as a gamma's at 0)…
const MAX_DEPTH: u32 = 24;
/// …and the most panels it may split, so that degenerate parameters (a shape of 1e-300, say)
/// cost at most about a millisecond.
const MAX_PANELS: u32 = 256;

fn adaptive(f: &impl Fn(f64) -> f64, lo: f64, hi: f64, whole: f64, depth: u32, budget: &mut u32) -> f64 {
    let mid = 0.5 * lo + 0.5 * hi;
    let (left, right) = (gauss_legendre(f, lo, mid), gauss_legendre(f, mid, hi));
    let halves = left + right;
    if halves.is_nan() || depth >= MAX_DEPTH || *budget == 0 || (halves - whole).abs() <= 1e-15 * halves.abs() {
        return halves;
    }
    *budget -= 1;
    adaptive(f, lo, mid, left, depth + 1, budget) + adaptive(f, mid, hi, right, depth + 1, budget)
}

/// Nodes and weights of 10-point Gauss–Legendre quadrature on [−1, 1] (only the positive half;
/// the rule is symmetric).
const GL_POINTS: usize = 10;

fn gauss_legendre(f: &impl Fn(f64) -> f64, lo: f64, hi: f64) -> f64 {
    let (centre, half) = (0.5 * lo + 0.5 * hi, 0.5 * hi - 0.5 * lo);
    let rule = legendre_rule();
    half * rule.iter().map(|&(x, w)| w * (f(centre - half * x) + f(centre + half * x))).sum::<f64>()
}

/// The positive nodes of the Legendre polynomial P₁₀ and their weights, by Newton's method from
/// the usual starting guesses cos(π(i − ¼)/(n + ½)) (Press et al. 2007, *Numerical Recipes* §4.6).
fn legendre_rule() -> &'static [(f64, f64); GL_POINTS / 2] {
    static RULE: OnceLock<[(f64, f64); GL_POINTS / 2]> = OnceLock::new();
    RULE.get_or_init(|| {
        let n = GL_POINTS as f64;
        core::array::from_fn(|i| {
            let mut x = libm::cos(core::f64::consts::PI * (i as f64 + 0.75) / (n + 0.5));
            let mut derivative = 1.0;
            for _ in 0..100 {
                // P_n(x) and P_n'(x) by the three-term recurrence.
                let (mut p0, mut p1) = (1.0, x);
                for k in 2..=GL_POINTS {
                    let k = k as f64;
                    (p0, p1) = (p1, ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k);
                }
                derivative = n * (x * p1 - p0) / (x * x - 1.0);
                let step = p1 / derivative;
                x -= step;
                if step.abs() <= 1e-16 {
                    break;
                }
            }
            (x, 2.0 / ((1.0 - x * x) * derivative * derivative))
        })
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Gauss–Legendre with 10 points integrates polynomials up to degree 19 exactly (Press et al.
    /// 2007, §4.6): ∫₀¹ x¹⁹ dx = 1/20, and the weights sum to 2.
    #[test]
    fn gauss_legendre_is_exact_to_degree_19() {
        let weights: f64 = legendre_rule().iter().map(|&(_, w)| 2.0 * w).sum();
        assert!((weights - 2.0).abs() < 1e-15, "{weights}");
        let got = gauss_legendre(&|x: f64| libm::pow(x, 19.0), 0.0, 1.0);
        assert!((got - 0.05).abs() < 1e-15, "{got}");
    }
}
