//! The regularised incomplete gamma functions P(a, x) = γ(a, x)/Γ(a) and Q(a, x) = Γ(a, x)/Γ(a)
//! = 1 − P(a, x), computed in logarithms so that neither tail underflows.
//!
//! Each region computes one side directly and by a method that converges there, and the other side
//! as its complement only where the direct side is at most about 0.9 (so the complement keeps its
//! digits). The methods (a > 0, x > 0), in the order they are tried:
//! - a ≥ 50 and |x/a − 1| ≤ 0.4: Temme's (1979) uniform asymptotic expansion (`temme`), where the
//!   series and the continued fraction below would need O(√a) terms;
//! - a < 1 and x < 1.5: P by the power series; if P > 0.9, Q by the series of γ(a, x) rearranged
//!   so that 1 − xᵃ/Γ(1 + a) is an `expm1` (the device of DiDonato & Morris 1986, ACM TOMS 12,
//!   377–393, for small shapes; from memory);
//! - x < a + 1: P by the power series P = xᵃe⁻ˣ/Γ(a+1) · Σₙ xⁿ/((a+1)…(a+n)) (Abramowitz & Stegun
//!   1964, eq. 6.5.29; number from memory);
//! - otherwise Q by Legendre's continued fraction (A&S eq. 6.5.31), evaluated by the modified Lentz
//!   method (Lentz 1976; Thompson & Barnett 1986), as in Press et al. 2007, *Numerical Recipes* §6.2.
//!
//! The common factor xᵃe⁻ˣ/Γ(a+1) is e^{−δ(a) − D(a, x)}/√(2πa) for a ≥ 15, with Loader's (2000)
//! Stirling error δ and deviance term D, so that no two large logarithms are subtracted.

use super::temme::TEMME;
use super::{HALF_LN_2PI, MAX_TERMS, Tail, deviance_term, lentz_step, ln_gamma_1p, stirling_error};

/// Shapes from here on use Loader's form of the factor xᵃe⁻ˣ/Γ(a+1).
const LOADER_FROM: f64 = 15.0;
/// Temme's expansion is used for a ≥ 50 and |x/a − 1| ≤ 0.4: there its eight terms leave a
/// truncation error below 2e-17 (crate/tests/reference/temme_coefficients.py).
const TEMME_FROM: f64 = 50.0;
const TEMME_WIDTH: f64 = 0.4;

/// The incomplete gamma functions of one shape a, with what depends on a alone computed once.
#[derive(Clone, Copy, Debug)]
pub(crate) struct IncompleteGamma {
    a: f64,
    ln_a: f64,
    /// −log Γ(a + 1) below [`LOADER_FROM`], −δ(a) − ½log(2πa) from there on.
    front: f64,
}

impl IncompleteGamma {
    /// `None` unless a is finite and positive.
    pub(crate) fn new(a: f64) -> Option<Self> {
        if !(a > 0.0 && a < f64::INFINITY) {
            return None;
        }
        let ln_a = libm::log(a);
        let front = if a < LOADER_FROM { -ln_gamma_1p(a) } else { -stirling_error(a) - HALF_LN_2PI - 0.5 * ln_a };
        Some(IncompleteGamma { a, ln_a, front })
    }

    /// log[xᵃ e⁻ˣ / Γ(a + 1)] for x > 0 (the Poisson probability of a at mean x, for integer a).
    pub(crate) fn ln_front(&self, x: f64) -> f64 {
        if self.a < LOADER_FROM {
            self.a * libm::log(x) - x + self.front
        } else {
            self.front - deviance_term(self.a, x)
        }
    }

    /// log P(a, x) or log Q(a, x), whichever is computed directly at x. NaN for NaN or x < 0.
    pub(crate) fn tail(&self, x: f64) -> Tail {
        let a = self.a;
        if x.is_nan() || x < 0.0 {
            return Tail::lower(f64::NAN);
        }
        if x == 0.0 {
            return Tail::lower(f64::NEG_INFINITY);
        }
        if x == f64::INFINITY {
            return Tail::upper(f64::NEG_INFINITY);
        }
        if a >= TEMME_FROM && (x - a).abs() <= TEMME_WIDTH * a {
            return self.temme(x);
        }
        if a < 1.0 && x < 1.5 {
            let ln_p = self.ln_front(x) + libm::log(self.series(x));
            return if ln_p <= libm::log(0.9) { Tail::lower(ln_p) } else { Tail::upper(self.ln_q_small_shape(x)) };
        }
        if x < a + 1.0 {
            Tail::lower(self.ln_front(x) + libm::log(self.series(x)))
        } else {
            Tail::upper(self.ln_front(x) + self.ln_a + libm::log(self.continued_fraction(x)))
        }
    }

    /// Σₙ xⁿ/((a+1)…(a+n)), n ≥ 0: the terms fall at least geometrically once a + n > x.
    fn series(&self, x: f64) -> f64 {
        let (mut term, mut sum, mut ap) = (1.0, 1.0, self.a);
        for _ in 0..MAX_TERMS {
            ap += 1.0;
            term *= x / ap;
            sum += term;
            if term <= 0.5 * f64::EPSILON * sum {
                break;
            }
        }
        sum
    }

    /// The continued fraction Q(a, x)·Γ(a)·eˣ/xᵃ = 1/(x + 1 − a − 1(1 − a)/(x + 3 − a − …)).
    fn continued_fraction(&self, x: f64) -> f64 {
        let a = self.a;
        let mut b = x + 1.0 - a;
        let (mut c, mut d) = (1.0 / super::TINY, 1.0 / b);
        let mut h = d;
        for i in 1..MAX_TERMS {
            let i = i as f64;
            b += 2.0;
            let factor = lentz_step(-i * (i - a), b, &mut c, &mut d);
            h *= factor;
            if (factor - 1.0).abs() <= f64::EPSILON {
                break;
            }
        }
        h
    }

    /// log Q(a, x) for a < 1, x < 1.5, where P is close to 1. With γ(a, x) = Σₙ (−1)ⁿ x^{a+n}/(n!(a+n)),
    /// Q = [1 − xᵃ/Γ(1+a)] − xᵃ/Γ(1+a) · a · Σₙ≥₁ (−x)ⁿ/(n!(a+n)), and the bracket is −expm1(·).
    fn ln_q_small_shape(&self, x: f64) -> f64 {
        let a = self.a;
        let ln_power = a * libm::log(x) + self.front; // log[xᵃ/Γ(1 + a)]
        let (mut term, mut sum) = (1.0, 0.0);
        for n in 1..MAX_TERMS {
            let n = n as f64;
            term *= -x / n;
            let next = sum + term / (a + n);
            if next == sum {
                break;
            }
            sum = next;
        }
        libm::log(-libm::expm1(ln_power) - libm::exp(ln_power) * a * sum)
    }

    /// Temme (1979): Q(a, x) = ½erfc(η√(a/2)) + e^{−aη²/2}/√(2πa) · Σₖ cₖ(η) a⁻ᵏ, with
    /// ½aη² = a(λ − 1 − log λ) = D(a, x), λ = x/a. The side beyond the mean (Q for x ≥ a, P below)
    /// is the small one; factoring out e^{−D} keeps it finite in logs however large a is.
    fn temme(&self, x: f64) -> Tail {
        let a = self.a;
        let d = deviance_term(a, x);
        let root = libm::sqrt(d);
        let eta = if x >= a { 1.0 } else { -1.0 } * libm::sqrt(2.0 * d / a);
        let inv_a = 1.0 / a;
        let mut sum = 0.0;
        for row in TEMME.iter().rev() {
            sum = sum * inv_a + row.iter().rev().fold(0.0, |acc, &c| acc * eta + c);
        }
        let correction = sum / libm::sqrt(2.0 * core::f64::consts::PI * a);
        let scaled_erfc = 0.5 * super::erfcx(root);
        if x >= a {
            Tail::upper(-d + libm::log(scaled_erfc + correction))
        } else {
            Tail::lower(-d + libm::log(scaled_erfc - correction))
        }
    }
}

/// The tail at x of the shape a, or `None` (meaning NaN) for invalid arguments.
fn tail(a: f64, x: f64) -> Option<Tail> {
    let tail = IncompleteGamma::new(a)?.tail(x);
    (!tail.ln.is_nan()).then_some(tail)
}

/// P(a, x) = γ(a, x)/Γ(a), the regularised lower incomplete gamma function: the Gamma(a, 1)
/// distribution function at x. NaN unless a > 0 is finite and x ≥ 0.
///
/// ```
/// use mixwell::dist::special::gamma_p;
/// // P(1, x) = 1 − e⁻ˣ (the exponential distribution function).
/// assert!((gamma_p(1.0, 2.0) - (1.0 - (-2.0f64).exp())).abs() < 1e-15);
/// ```
pub fn gamma_p(a: f64, x: f64) -> f64 {
    tail(a, x).map_or(f64::NAN, Tail::lower_value)
}

/// Q(a, x) = 1 − P(a, x), computed without cancellation. NaN unless a > 0 is finite and x ≥ 0.
pub fn gamma_q(a: f64, x: f64) -> f64 {
    tail(a, x).map_or(f64::NAN, Tail::upper_value)
}

/// log P(a, x), finite however small P is (until log P itself overflows).
pub fn ln_gamma_p(a: f64, x: f64) -> f64 {
    tail(a, x).map_or(f64::NAN, Tail::ln_lower)
}

/// log Q(a, x), finite however small Q is (until log Q itself overflows).
pub fn ln_gamma_q(a: f64, x: f64) -> f64 {
    tail(a, x).map_or(f64::NAN, Tail::ln_upper)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(got: f64, want: f64) -> f64 {
        if got == want { 0.0 } else { ((got - want) / want).abs() }
    }

    /// Closed forms (A&S 6.5.12–6.5.17, from memory): P(1, x) = 1 − e⁻ˣ; P(½, x) = erf(√x);
    /// Q(n, x) = e⁻ˣ Σₖ<ₙ xᵏ/k! for integer n. Values are exponentials of accurate logarithms, so
    /// their relative error is up to |log P|·ε (4e-15 at P = 1e-8); so is that of log Q = log1p(−P).
    #[test]
    fn matches_closed_forms() {
        for &x in &[1e-8, 0.01, 0.5, 1.0, 3.0, 20.0, 200.0] {
            assert!(rel(gamma_p(1.0, x), -libm::expm1(-x)) < 1e-14, "P(1, {x})");
            assert!(rel(ln_gamma_q(1.0, x), -x) < 1e-14, "Q(1, {x})");
            assert!(rel(gamma_p(0.5, x), super::super::erf(libm::sqrt(x))) < 1e-14, "P(½, {x})");
        }
        for n in [2u32, 5, 30, 80] {
            for &x in &[0.5, 7.0, 31.0, 95.0, 300.0] {
                let (mut term, mut sum) = (1.0, 1.0);
                for k in 1..n {
                    term *= x / f64::from(k);
                    sum += term;
                }
                // (Compared as values: −x + log(sum) would itself cancel where Q is close to 1.)
                let want = libm::exp(-x) * sum;
                assert!(rel(gamma_q(f64::from(n), x), want) < 1e-13, "Q({n}, {x})");
            }
        }
    }

    /// The methods agree where their regions meet (each is accurate on both sides of the line).
    #[test]
    fn methods_agree_at_their_boundaries() {
        for &a in &[50.0, 120.0, 5e3] {
            for &x in &[a * (1.0 - TEMME_WIDTH), a * (1.0 + TEMME_WIDTH)] {
                let g = IncompleteGamma::new(a).unwrap();
                let temme = g.temme(x);
                let other = if x < a + 1.0 {
                    Tail::lower(g.ln_front(x) + libm::log(g.series(x)))
                } else {
                    Tail::upper(g.ln_front(x) + g.ln_a + libm::log(g.continued_fraction(x)))
                };
                assert!(rel(temme.ln_lower(), other.ln_lower()) < 1e-13, "a {a} x {x}");
                assert!(rel(temme.ln_upper(), other.ln_upper()) < 1e-13, "a {a} x {x}");
            }
        }
    }

    #[test]
    fn invalid_arguments_give_nan_and_the_ends_are_exact() {
        assert!(gamma_p(0.0, 1.0).is_nan());
        assert!(gamma_p(-1.0, 1.0).is_nan());
        assert!(gamma_p(1.0, -1.0).is_nan());
        assert!(gamma_q(f64::NAN, 1.0).is_nan());
        assert!(ln_gamma_p(2.0, f64::NAN).is_nan());
        assert!(gamma_p(f64::INFINITY, 1.0).is_nan());
        assert_eq!(gamma_p(2.0, 0.0), 0.0);
        assert_eq!(gamma_q(2.0, 0.0), 1.0);
        assert_eq!(gamma_p(2.0, f64::INFINITY), 1.0);
        assert_eq!(ln_gamma_q(2.0, f64::INFINITY), f64::NEG_INFINITY);
    }
}
