//! The regularised incomplete beta function I_x(a, b) = B(x; a, b)/B(a, b), its complement
//! 1 − I_x(a, b) = I_{1−x}(b, a), and their logarithms.
//!
//! The continued fraction of Abramowitz & Stegun (1964) eq. 26.5.8 (number from memory), evaluated
//! by the modified Lentz method (Lentz 1976; Thompson & Barnett 1986), is used on the side where it
//! converges fast, x < (a + 1)/(a + b + 2), and the symmetry I_x(a, b) = 1 − I_{1−x}(b, a) covers
//! the other side (as in Press et al. 2007, *Numerical Recipes* §6.4). Near the mean it takes
//! O((ab/(a+b))^¼) terms: about 400 at a = b = 10⁶, 40,000 at 10¹⁴, where it is cut off.
//!
//! The factor xᵃ(1 − x)ᵇ/B(a, b) is computed in logarithms; when both shapes are at least 10 it is
//! (ab/(a+b)) times a binomial probability in Loader's (2000) saddle-point form, so the log-gamma
//! values of large shapes never cancel. Callers pass y = 1 − x separately when they know it more
//! accurately than 1 − x rounds (the Student-t, binomial and negative-binomial tails do).

use super::{HALF_LN_2PI, MAX_TERMS, Tail, deviance_term, lbeta, lentz_step, stirling_error};

/// Both shapes at least this large use the saddle-point form of the factor.
const SADDLE_FROM: f64 = 10.0;

/// The incomplete beta function of one pair of shapes, with what depends on them alone hoisted.
#[derive(Clone, Copy, Debug)]
pub(crate) struct IncompleteBeta {
    a: f64,
    b: f64,
    ln_a: f64,
    ln_b: f64,
    saddle: bool,
    /// δ(a+b) − δ(a) − δ(b) + ½log(ab/(a+b)) − ½log 2π with the saddle form, −log B(a, b) without.
    front: f64,
}

impl IncompleteBeta {
    /// `None` unless both shapes are finite and positive.
    pub(crate) fn new(a: f64, b: f64) -> Option<Self> {
        let valid = |s: f64| s > 0.0 && s < f64::INFINITY;
        if !(valid(a) && valid(b)) {
            return None;
        }
        let saddle = a >= SADDLE_FROM && b >= SADDLE_FROM;
        let front = if saddle {
            let n = a + b;
            stirling_error(n) - stirling_error(a) - stirling_error(b) + 0.5 * libm::log(a / n * b) - HALF_LN_2PI
        } else {
            -lbeta(a, b)
        };
        Some(IncompleteBeta { a, b, ln_a: libm::log(a), ln_b: libm::log(b), saddle, front })
    }

    /// log[xᵃ yᵇ / B(a, b)] for 0 < x < 1, y = 1 − x.
    pub(crate) fn ln_front(&self, x: f64, y: f64) -> f64 {
        let (a, b) = (self.a, self.b);
        if self.saddle {
            let n = a + b;
            self.front - deviance_term(a, n * x) - deviance_term(b, n * y)
        } else {
            // The logarithm of the smaller of x and y is exact; the other is log1p of it.
            let (ln_x, ln_y) = if x <= y { (libm::log(x), libm::log1p(-x)) } else { (libm::log1p(-y), libm::log(y)) };
            a * ln_x + b * ln_y + self.front
        }
    }

    /// log I_x(a, b) or log(1 − I_x(a, b)), whichever is computed directly; y must be 1 − x.
    /// x ≤ 0 gives I = 0 and y ≤ 0 gives I = 1; NaN gives NaN.
    pub(crate) fn tail(&self, x: f64, y: f64) -> Tail {
        let (a, b) = (self.a, self.b);
        if x.is_nan() || y.is_nan() {
            return Tail::lower(f64::NAN);
        }
        if x <= 0.0 {
            return Tail::lower(f64::NEG_INFINITY);
        }
        if y <= 0.0 {
            return Tail::upper(f64::NEG_INFINITY);
        }
        // One shape large and the variate close to the end it crowds against: there the continued
        // fraction cancels (its denominators are 1 − x·(1 + O(1/a))), so expand instead.
        if a >= EXPANSION_FROM
            && b < a
            && y < EXPANSION_NEAR
            && y * b <= 1.0
            && let Some(tail) = large_first_shape(a, b, y)
        {
            return tail;
        }
        if b >= EXPANSION_FROM
            && a < b
            && x < EXPANSION_NEAR
            && x * a <= 1.0
            && let Some(tail) = large_first_shape(b, a, x)
        {
            return tail.flip();
        }
        let front = self.ln_front(x, y);
        if x < (a + 1.0) / (a + b + 2.0) {
            Tail::lower(front - self.ln_a + libm::log(continued_fraction(a, b, x)))
        } else {
            Tail::upper(front - self.ln_b + libm::log(continued_fraction(b, a, y)))
        }
    }
}

/// The expansion for a large first shape is used from this shape on…
const EXPANSION_FROM: f64 = 15.0;
/// …when 1 − x is below this (elsewhere the continued fraction loses at most a few digits).
const EXPANSION_NEAR: f64 = 0.01;
/// Most terms of the expansion (far more than the region needs: its terms fall at least like
/// (b y)ᵏ or ((b + 2k)/(2π(a + (b−1)/2)))²ᵏ).
const EXPANSION_TERMS: usize = 30;

/// I_x(a, b) for a large shape a ≥ 15 and y = 1 − x small (b y ≤ 1), as a [`Tail`] of the
/// Beta(a, b) distribution at x; `None` if the expansion does not settle (then the continued
/// fraction is used).
///
/// With t = e^{−s} and T = a + (b − 1)/2, B(a, b)·I_x = ∫_{s₀}^∞ e^{−Ts} s^{b−1} g(s) ds, s₀ = −log x,
/// where g(s) = (sinh(s/2)/(s/2))^{b−1} = Σₖ gₖ s²ᵏ is even and analytic for |s| < 2π. Integrating
/// term by term gives incomplete gamma functions of shapes b + 2k at z = T s₀ (the device of
/// DiDonato & Morris 1992, ACM TOMS 18, 360–373, "BGRAT", after Temme; recalled from memory, the
/// terms here derived afresh):
///   I_x = [Γ(a+b)/(Γ(a) Tᵇ)] Σₖ gₖ (b)₂ₖ T^{−2k} Q(b + 2k, z),
///   1 − I_x = [Γ(a+b)/(Γ(a) Tᵇ)] Σₖ gₖ (b)₂ₖ T^{−2k} P(b + 2k, z),
/// the first (an asymptotic series in 1/T) for z ≥ b, where I_x is the small side, the second (a
/// convergent one, since s₀ < 2π) below.
/// The ratios Q(b + j, z)/Q(b, z) and P(b + j, z)/P(b, z) come from the recurrences of P and Q
/// run in their stable directions, so only P(b, z) or Q(b, z) itself is evaluated.
fn large_first_shape(a: f64, b: f64, y: f64) -> Option<Tail> {
    let t = a + 0.5 * (b - 1.0);
    let s0 = -libm::log1p(-y);
    let z = t * s0;
    // log[Γ(a + b)/(Γ(a) Tᵇ)] = log[(a)_b/aᵇ] + b log(a/T).
    let prefactor = super::ln_poch_over_pow(a, b) - b * libm::log1p(0.5 * (b - 1.0) / a);
    let gamma = super::IncompleteGamma::new(b)?.tail(z);
    let mut g = SinhPower::new(b);
    let mut sum = 0.0;
    if z >= b {
        // ρⱼ = (b)ⱼ T^{−j} Q(b + j, z)/Q(b, z), from Q(α + 1, z) = Q(α, z) + z^α e^{−z}/Γ(α + 1):
        // ρⱼ₊₁ = ρⱼ (b + j)/T + νⱼ with ν₀ = b z^b e^{−z}/(Γ(b + 1) Q(b, z) T) and νⱼ₊₁ = νⱼ s₀.
        let ln_q = gamma.ln_upper();
        let mut nu = libm::exp(b * libm::log(z) - z - super::ln_gamma_1p(b) - ln_q) * b / t;
        let mut rho = 1.0;
        let mut j = 0.0;
        for k in 0..EXPANSION_TERMS {
            let term = g.next() * rho;
            sum += term;
            if k > 0 && term.abs() <= 0.5 * f64::EPSILON * sum.abs() {
                return Some(Tail::lower(prefactor + ln_q + libm::log(sum)));
            }
            for _ in 0..2 {
                rho = rho * (b + j) / t + nu;
                nu *= s0;
                j += 1.0;
            }
        }
        None
    } else {
        // The upper side, ∫₀^{s₀}: with M(α, z) = Σₙ zⁿ/((α+1)…(α+n)), P(α, z) = z^α e^{−z} M(α, z)/Γ(α+1),
        // each term is gₖ s₀²ᵏ (b/(b + 2k)) M(b + 2k, z)/M(b, z) times the k = 0 one; M is run down
        // from its largest shape by M(α − 1, z) = 1 + z M(α, z)/α, which only adds.
        let ln_p = gamma.ln_lower();
        let mut m = [0.0; 2 * EXPANSION_TERMS + 1];
        let top = b + (2 * EXPANSION_TERMS) as f64;
        let (mut term, mut series, mut ap) = (1.0, 1.0, top);
        for _ in 0..super::MAX_TERMS {
            ap += 1.0;
            term *= z / ap;
            series += term;
            if term <= 0.5 * f64::EPSILON * series {
                break;
            }
        }
        m[2 * EXPANSION_TERMS] = series;
        for j in (0..2 * EXPANSION_TERMS).rev() {
            m[j] = 1.0 + z * m[j + 1] / (b + (j + 1) as f64);
        }
        let mut power = 1.0;
        for k in 0..EXPANSION_TERMS {
            let term = g.next() * power * b / (b + (2 * k) as f64) * m[2 * k] / m[0];
            sum += term;
            if k > 0 && term.abs() <= 0.5 * f64::EPSILON * sum.abs() {
                return Some(Tail::upper(prefactor + ln_p + libm::log(sum)));
            }
            power *= s0 * s0;
        }
        None
    }
}

/// The coefficients gₖ of (sinh(s/2)/(s/2))^c = Σₖ gₖ s²ᵏ, c = b − 1, one at a time: with
/// log(sinh(s/2)/(s/2)) = Σⱼ ℓⱼ s²ʲ, ℓⱼ = B₂ⱼ/(2j (2j)!) = (−1)^{j+1} ζ(2j)/(j (2π)^{2j}) (Euler's
/// formula for the Bernoulli numbers), and k gₖ = c Σⱼ₌₁ᵏ j ℓⱼ gₖ₋ⱼ (differentiating g = e^{cL}).
struct SinhPower {
    c: f64,
    g: [f64; EXPANSION_TERMS],
    k: usize,
}

impl SinhPower {
    fn new(b: f64) -> Self {
        SinhPower { c: b - 1.0, g: [0.0; EXPANSION_TERMS], k: 0 }
    }

    fn next(&mut self) -> f64 {
        let k = self.k;
        let value = if k == 0 {
            1.0
        } else {
            let ell = log_sinh_coefficients();
            (1..=k).map(|j| j as f64 * ell[j] * self.g[k - j]).sum::<f64>() * self.c / k as f64
        };
        self.g[k] = value;
        self.k += 1;
        value
    }
}

/// ℓⱼ for j = 0..EXPANSION_TERMS (ℓ₀ = 0), from ζ(2j): exact π-powers for j ≤ 5, and
/// ζ(2j) = Σₙ₌₁⁶⁴ n^{−2j} beyond (the first omitted term is below 1e-21).
fn log_sinh_coefficients() -> &'static [f64; EXPANSION_TERMS] {
    static ELL: std::sync::OnceLock<[f64; EXPANSION_TERMS]> = std::sync::OnceLock::new();
    ELL.get_or_init(|| {
        let pi2 = core::f64::consts::PI * core::f64::consts::PI;
        // ζ(2j) = π^{2j}·r for j = 1..5, r = 1/6, 1/90, 1/945, 1/9450, 1/93555.
        let exact = [1.0 / 6.0, 1.0 / 90.0, 1.0 / 945.0, 1.0 / 9450.0, 1.0 / 93555.0];
        core::array::from_fn(|j| {
            if j == 0 {
                return 0.0;
            }
            let two_pi_power = libm::pow(4.0 * pi2, j as f64);
            let zeta = if j <= exact.len() {
                libm::pow(pi2, j as f64) * exact[j - 1]
            } else {
                (1..=64).rev().map(|n| libm::pow(f64::from(n), -2.0 * j as f64)).sum()
            };
            let sign = if j % 2 == 1 { 1.0 } else { -1.0 };
            sign * zeta / (j as f64 * two_pi_power)
        })
    })
}

/// The continued fraction of A&S 26.5.8: I_x(a, b) = xᵃ(1−x)ᵇ/(a B(a, b)) · 1/(1 + d₁/(1 + d₂/(1 + …))),
/// d₂ₘ₊₁ = −(a+m)(a+b+m)x/((a+2m)(a+2m+1)), d₂ₘ = m(b−m)x/((a+2m−1)(a+2m)).
fn continued_fraction(a: f64, b: f64, x: f64) -> f64 {
    let (qab, qap, qam) = (a + b, a + 1.0, a - 1.0);
    let mut c = 1.0;
    let mut d = 1.0 - qab * x / qap;
    if d.abs() < super::TINY {
        d = super::TINY;
    }
    d = 1.0 / d;
    let mut h = d;
    for m in 1..MAX_TERMS {
        let m = m as f64;
        let m2 = 2.0 * m;
        h *= lentz_step(m * (b - m) * x / ((qam + m2) * (a + m2)), 1.0, &mut c, &mut d);
        let factor = lentz_step(-(a + m) * (qab + m) * x / ((a + m2) * (qap + m2)), 1.0, &mut c, &mut d);
        h *= factor;
        if (factor - 1.0).abs() <= f64::EPSILON {
            break;
        }
    }
    h
}

/// The tail at x, or `None` (meaning NaN) for invalid shapes or NaN; x is clamped to [0, 1].
fn tail(a: f64, b: f64, x: f64) -> Option<Tail> {
    if x.is_nan() {
        return None;
    }
    let x = x.clamp(0.0, 1.0);
    Some(IncompleteBeta::new(a, b)?.tail(x, 1.0 - x))
}

/// I_x(a, b), the regularised incomplete beta function: the Beta(a, b) distribution function at x.
/// NaN for a ≤ 0, b ≤ 0, infinite shapes or NaN; x is clamped to [0, 1].
///
/// ```
/// use mixwell::dist::special::incomplete_beta;
/// // I_x(a, 1) = xᵃ.
/// assert!((incomplete_beta(3.0, 1.0, 0.5) - 0.125).abs() < 1e-16);
/// ```
pub fn incomplete_beta(a: f64, b: f64, x: f64) -> f64 {
    tail(a, b, x).map_or(f64::NAN, Tail::lower_value)
}

/// 1 − I_x(a, b), computed without cancellation (= I_{1−x}(b, a)).
pub fn incomplete_beta_complement(a: f64, b: f64, x: f64) -> f64 {
    tail(a, b, x).map_or(f64::NAN, Tail::upper_value)
}

/// log I_x(a, b), finite however small I_x is.
pub fn ln_incomplete_beta(a: f64, b: f64, x: f64) -> f64 {
    tail(a, b, x).map_or(f64::NAN, Tail::ln_lower)
}

/// log(1 − I_x(a, b)), finite however small the complement is.
pub fn ln_incomplete_beta_complement(a: f64, b: f64, x: f64) -> f64 {
    tail(a, b, x).map_or(f64::NAN, Tail::ln_upper)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(a: f64, b: f64) -> f64 {
        if a == b { 0.0 } else { (a - b).abs() / b.abs() }
    }

    /// Exact identities: I_x(1, 1) = x, I_x(a, 1) = xᵃ, I_x(1, b) = 1 − (1 − x)ᵇ, and
    /// I_{1/2}(a, a) = 1/2 by symmetry (Abramowitz & Stegun 1964, 26.5.14–26.5.16, from memory).
    #[test]
    fn identities() {
        for &x in &[0.01, 0.2, 0.5, 0.77, 0.999] {
            assert!(rel(incomplete_beta(1.0, 1.0, x), x) < 1e-14);
            assert!(rel(incomplete_beta(3.5, 1.0, x), libm::pow(x, 3.5)) < 1e-13);
            assert!(rel(incomplete_beta(1.0, 2.5, x), 1.0 - libm::pow(1.0 - x, 2.5)) < 1e-13);
            assert!(rel(ln_incomplete_beta_complement(1.0, 2.5, x), 2.5 * libm::log1p(-x)) < 1e-14);
        }
        for &a in &[0.3, 1.0, 7.5, 120.0, 4000.0, 1e7] {
            assert!(rel(incomplete_beta(a, a, 0.5), 0.5) < 1e-12, "a = {a}");
        }
    }

    #[test]
    fn invalid_arguments_give_nan_and_x_is_clamped() {
        assert!(incomplete_beta(-1.0, 1.0, 0.5).is_nan());
        assert!(incomplete_beta(1.0, 0.0, 0.5).is_nan());
        assert!(incomplete_beta(1.0, f64::INFINITY, 0.5).is_nan());
        assert!(incomplete_beta(2.0, 3.0, f64::NAN).is_nan());
        assert_eq!(incomplete_beta(2.0, 3.0, -0.1), 0.0);
        assert_eq!(incomplete_beta(2.0, 3.0, 1.5), 1.0);
        assert_eq!(ln_incomplete_beta_complement(2.0, 3.0, 1.0), f64::NEG_INFINITY);
        assert_eq!(ln_incomplete_beta(2.0, 3.0, 0.0), f64::NEG_INFINITY);
    }
}
