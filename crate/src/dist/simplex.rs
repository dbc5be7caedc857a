//! Densities over categories: the Dirichlet on the simplex, the multinomial and the categorical,
//! with probabilities given directly or as scores (unnormalised log-probabilities, softmax).
//!
//! Vectors are slices (or a broadcast [`Col`] for a symmetric Dirichlet); nothing is allocated.
//! Invalid input — lengths that differ, a probability vector off the simplex, counts that are not
//! non-negative integers, NaN anywhere — gives −∞, never a panic. Formulas: BDA3 Appendix A
//! (Gelman et al. 2013), with the stable rewrites noted beside each function.

use super::Col;
use super::families::is_count;
use super::special::{self, HALF_LN_2PI};
use libm::log;

/// How far Σ pᵢ may be from 1 (absolute): more than the rounding of any transform or of
/// probabilities typed with a dozen digits, far less than a real mistake.
pub const SIMPLEX_TOLERANCE: f64 = 1e-9;

/// Σ values − 1, or `None` unless every value is finite and ≥ 0 (> 0 when `open`) and they sum to 1
/// within [`SIMPLEX_TOLERANCE`]. The sum is compensated (Neumaier 1974, "Rundungsfehleranalyse
/// einiger Verfahren zur Summation endlicher Summen") and the excess over 1 is taken before the
/// correction is added, so it keeps the digits below the last bit of 1: the multinomial's
/// saddle-point form multiplies it by the total count.
fn simplex_excess(values: &[f64], open: bool) -> Option<f64> {
    let (mut sum, mut compensation) = (0.0_f64, 0.0_f64);
    for &v in values {
        if !(v.is_finite() && if open { v > 0.0 } else { v >= 0.0 }) {
            return None;
        }
        let next = sum + v;
        compensation += if sum.abs() >= v.abs() { (sum - next) + v } else { (v - next) + sum };
        sum = next;
    }
    let excess = (sum - 1.0) + compensation;
    (excess.abs() <= SIMPLEX_TOLERANCE).then_some(excess)
}

/// dirichlet(x; α): log Γ(Σα) − Σ log Γ(αᵢ) + Σ (αᵢ − 1) log xᵢ, for x on the open simplex
/// (K ≥ 2 components, all > 0, summing to 1) and αᵢ > 0; `alpha` of length K or a broadcast
/// scalar (the symmetric Dirichlet). The density is with respect to Lebesgue measure on the first
/// K − 1 components (the last is 1 minus their sum).
///
/// log B(α) = Σ log Γ(αᵢ) − log Γ(Σα) is summed as Σᵢ log B(αᵢ, αᵢ₊₁ + … + α_K), a product of beta
/// functions that telescopes, so each term uses the stable [`special::lbeta`] instead of
/// subtracting log Γ of the total.
///
/// ```
/// use mixwell::dist::{Col, dirichlet_log_density};
/// // REFERENCES.md §1: Dirichlet(1, 1, 1) is log Γ(3) = log 2 everywhere on the simplex.
/// let lp = dirichlet_log_density(&[0.2, 0.3, 0.5], Col::scalar(&[1.0]));
/// assert!((lp - 2f64.ln()).abs() < 1e-15);
/// ```
pub fn dirichlet_log_density(x: &[f64], alpha: Col) -> f64 {
    let k = x.len();
    if k < 2 || !alpha.covers(k) || simplex_excess(x, true).is_none() {
        return f64::NEG_INFINITY;
    }
    if !(0..k).all(|i| alpha.get(i) > 0.0 && alpha.get(i) < f64::INFINITY) {
        return f64::NEG_INFINITY;
    }
    let mut lp = 0.0;
    for (i, &xi) in x.iter().enumerate() {
        let a = alpha.get(i);
        if a != 1.0 {
            lp += (a - 1.0) * log(xi);
        }
    }
    // log B(α) from the back, with the suffix sums αᵢ₊₁ + … + α_K accumulated exactly in order.
    let mut suffix = alpha.get(k - 1);
    for i in (0..k - 1).rev() {
        lp -= special::lbeta(alpha.get(i), suffix);
        suffix += alpha.get(i);
    }
    if lp.is_nan() { f64::NEG_INFINITY } else { lp }
}

/// Counts from here on use the saddle-point form of the multinomial coefficient.
const LARGE_TOTAL: f64 = special::FACTORIAL_TABLE_LEN as f64;

/// log of the multinomial probability of counts `k` given log-probabilities `ln_p(i)`, with
/// Σᵢ pᵢ − 1 = `excess` (0 up to rounding).
///
/// For a total n < 256 it is log n! − Σ log kᵢ! + Σ kᵢ log pᵢ (0·log 0 = 0). From 256 on those
/// terms are of order n log n and nearly cancel, so it is Loader's (2000) saddle-point form extended
/// to K categories: δ(n) − Σ δ(kᵢ) − Σ D(kᵢ, n pᵢ) + ½ log n − ½ Σ log kᵢ − ½(m − 1) log 2π over
/// the m categories with kᵢ > 0 (δ = Stirling's error, D = the deviance term), plus n·`excess`, which
/// makes it equal to the textbook form exactly also when the pᵢ sum to 1 only up to rounding.
fn multinomial_core(k: &[f64], ln_p: impl Fn(usize) -> f64, excess: f64) -> f64 {
    let mut n = 0.0;
    for &ki in k {
        if !is_count(ki) {
            return f64::NEG_INFINITY;
        }
        n += ki;
    }
    if !n.is_finite() {
        return f64::NEG_INFINITY;
    }
    if n < LARGE_TOTAL {
        let mut lp = special::ln_factorial(n);
        for (i, &ki) in k.iter().enumerate() {
            if ki > 0.0 {
                lp += ki * ln_p(i) - special::ln_factorial(ki);
            }
        }
        return lp;
    }
    let mut lp = special::stirling_error(n) + 0.5 * log(n) + HALF_LN_2PI + n * excess;
    for (i, &ki) in k.iter().enumerate() {
        let np = n * libm::exp(ln_p(i));
        if ki > 0.0 {
            if np == 0.0 {
                return f64::NEG_INFINITY;
            }
            lp -= special::stirling_error(ki) + special::deviance_term(ki, np) + 0.5 * log(ki) + HALF_LN_2PI;
        } else {
            lp -= np;
        }
    }
    lp
}

/// multinomial(k; p): log n! − Σ log kᵢ! + Σ kᵢ log pᵢ with n = Σ kᵢ, for counts kᵢ (non-negative
/// integers) and p on the simplex (pᵢ ≥ 0; a category with pᵢ = 0 must have kᵢ = 0). Accurate for
/// totals in the millions (saddle-point form, see the module source).
///
/// ```
/// use mixwell::dist::multinomial_log_density;
/// // Two categories: the binomial probability C(5, 2)·0.3²·0.7³ = 0.3087.
/// let lp = multinomial_log_density(&[2.0, 3.0], &[0.3, 0.7]);
/// assert!((lp - 0.3087f64.ln()).abs() < 1e-14);
/// ```
pub fn multinomial_log_density(k: &[f64], p: &[f64]) -> f64 {
    if k.len() != p.len() || k.is_empty() {
        return f64::NEG_INFINITY;
    }
    let Some(excess) = simplex_excess(p, false) else {
        return f64::NEG_INFINITY;
    };
    multinomial_core(k, |i| log(p[i]), excess)
}

/// The scores' normaliser log Σ e^{sⱼ} as (m, log Σ e^{sⱼ − m}) with m the largest score, so that
/// log pᵢ = (sᵢ − m) − the second part keeps its digits; `None` when a score is NaN or +∞, or all
/// are −∞ (no category possible).
fn log_normaliser(scores: &[f64]) -> Option<(f64, f64)> {
    let (max, rest) = special::log_sum_exp_parts(scores);
    max.is_finite().then_some((max, rest))
}

/// multinomial(k; softmax(s)): the multinomial with probabilities pᵢ = e^{sᵢ}/Σⱼ e^{sⱼ}, computed
/// from the scores without forming the pᵢ (scores may be −∞: that category has probability 0).
pub fn multinomial_scores_log_density(k: &[f64], scores: &[f64]) -> f64 {
    if k.len() != scores.len() {
        return f64::NEG_INFINITY;
    }
    let Some((max, rest)) = log_normaliser(scores) else {
        return f64::NEG_INFINITY;
    };
    multinomial_core(k, |i| (scores[i] - max) - rest, 0.0)
}

/// The index of a category 1..=K, or `None`.
#[inline]
fn category(k: f64, len: usize) -> Option<usize> {
    (k >= 1.0 && k <= len as f64 && k == k.trunc()).then(|| k as usize - 1)
}

/// categorical(k; p) = log p_k for a category k in 1..=K and p on the simplex.
///
/// ```
/// use mixwell::dist::categorical_log_density;
/// // REFERENCES.md §1 (0-based there): θ = (0.2, 0.5, 0.3), category 2 → log 0.5.
/// assert!((categorical_log_density(2.0, &[0.2, 0.5, 0.3]) - -0.69314718055994531).abs() < 1e-16);
/// ```
pub fn categorical_log_density(k: f64, p: &[f64]) -> f64 {
    sum_categorical_log_density(core::slice::from_ref(&k), p)
}

/// Σᵢ log p_{kᵢ} over a column of categories, the simplex checked once.
pub fn sum_categorical_log_density(ks: &[f64], p: &[f64]) -> f64 {
    if simplex_excess(p, false).is_none() {
        return f64::NEG_INFINITY;
    }
    ks.iter().map(|&k| category(k, p.len()).map_or(f64::NEG_INFINITY, |i| log(p[i]))).sum()
}

/// categorical(k; softmax(s)) = s_k − log Σⱼ e^{sⱼ}, never forming e^{sⱼ} (REFERENCES.md §1,
/// categorical-logit rows).
///
/// ```
/// use mixwell::dist::categorical_scores_log_density;
/// // REFERENCES.md §1: β = (1, −0.5, 2), category 1 (0-based 0) → −1.3715390318526829.
/// let lp = categorical_scores_log_density(1.0, &[1.0, -0.5, 2.0]);
/// assert!((lp - -1.3715390318526829).abs() < 1e-15);
/// ```
pub fn categorical_scores_log_density(k: f64, scores: &[f64]) -> f64 {
    sum_categorical_scores_log_density(core::slice::from_ref(&k), scores)
}

/// Σᵢ (s_{kᵢ} − log Σⱼ e^{sⱼ}) over a column of categories, the normaliser computed once.
pub fn sum_categorical_scores_log_density(ks: &[f64], scores: &[f64]) -> f64 {
    let Some((max, rest)) = log_normaliser(scores) else {
        return f64::NEG_INFINITY;
    };
    ks.iter().map(|&k| category(k, scores.len()).map_or(f64::NEG_INFINITY, |i| (scores[i] - max) - rest)).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn invalid_input_gives_minus_infinity() {
        let ninf = f64::NEG_INFINITY;
        assert_eq!(dirichlet_log_density(&[0.5, 0.5], Col::vector(&[1.0])), ninf); // α too short
        assert_eq!(dirichlet_log_density(&[0.5, 0.6], Col::scalar(&[1.0])), ninf); // Σ ≠ 1
        assert_eq!(dirichlet_log_density(&[0.0, 1.0], Col::scalar(&[1.0])), ninf); // open simplex
        assert_eq!(dirichlet_log_density(&[1.0], Col::scalar(&[1.0])), ninf); // K < 2
        assert_eq!(dirichlet_log_density(&[0.5, 0.5], Col::vector(&[1.0, 0.0])), ninf);
        assert_eq!(dirichlet_log_density(&[0.5, f64::NAN], Col::scalar(&[1.0])), ninf);
        assert_eq!(multinomial_log_density(&[1.0, 2.0], &[0.5, 0.5, 0.0]), ninf);
        assert_eq!(multinomial_log_density(&[1.5, 2.0], &[0.5, 0.5]), ninf);
        assert_eq!(multinomial_log_density(&[1.0, 2.0], &[0.0, 1.0]), ninf);
        assert_eq!(multinomial_log_density(&[300.0, 2.0], &[0.0, 1.0]), ninf);
        assert_eq!(multinomial_log_density(&[-1.0, 2.0], &[0.5, 0.5]), ninf);
        assert_eq!(categorical_log_density(0.0, &[0.5, 0.5]), ninf);
        assert_eq!(categorical_log_density(3.0, &[0.5, 0.5]), ninf);
        assert_eq!(categorical_log_density(1.5, &[0.5, 0.5]), ninf);
        assert_eq!(categorical_log_density(f64::NAN, &[0.5, 0.5]), ninf);
        assert_eq!(categorical_scores_log_density(1.0, &[f64::NAN, 0.0]), ninf);
        assert_eq!(categorical_scores_log_density(1.0, &[f64::INFINITY, 0.0]), ninf);
        assert_eq!(categorical_scores_log_density(1.0, &[ninf, ninf]), ninf);
        assert_eq!(categorical_scores_log_density(1.0, &[]), ninf);
    }

    /// The saddle-point form and the textbook form agree where both are accurate (totals just
    /// above the switch), and a category with zero probability and zero count is allowed.
    #[test]
    fn both_forms_of_the_multinomial_agree_at_the_switch() {
        let p = [0.2, 0.5, 0.3, 0.0];
        let k = [60.0, 120.0, 76.0, 0.0];
        let mut textbook = special::ln_factorial(256.0);
        for (&ki, &pi) in k.iter().zip(&p) {
            if ki > 0.0 {
                textbook += ki * log(pi) - special::ln_factorial(ki);
            }
        }
        let got = multinomial_log_density(&k, &p);
        assert!((got - textbook).abs() < 1e-11 * textbook.abs(), "{got} vs {textbook}");
    }
}
