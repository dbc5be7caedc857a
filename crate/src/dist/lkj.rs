//! The LKJ distribution of a correlation matrix (Lewandowski, Kurowicka & Joe 2009, "Generating
//! random correlation matrices based on vines and extended onion method", *J. Multivariate
//! Analysis* 100, 1989–2001): density ∝ det(R)^(η−1) over d×d correlation matrices, η > 0.
//!
//! Normalising constant. In the C-vine parametrisation the d(d−1)/2 partial correlations are
//! independent, the k-th level (d − k of them, k = 1 … d − 1) with density ∝ (1 − ρ²)^(βₖ−1) on
//! (−1, 1), βₖ = η + (d − 1 − k)/2, and det R = Π(1 − ρ²) (LKJ 2009, §2–3). Each such density
//! integrates to 2^(2βₖ−1) B(βₖ, βₖ), so ∫ det(R)^(η−1) dR = Πₖ [2^(2βₖ−1) B(βₖ, βₖ)]^(d−k) — the
//! constant of their eq. (16) (number from memory), rederived here and checked by quadrature for
//! d = 2 and 3 in crate/tests/multivariate.rs.
//!
//! On the Cholesky factor. R = L Lᵀ with L lower triangular, positive diagonal and rows of unit
//! length; the free coordinates are the d(d−1)/2 entries below the diagonal (each row's diagonal
//! is then √(1 − Σ of its squares)). R_ij for j < i involves L_ik for k ≤ j only, with ∂R_ij/∂L_ij
//! = L_jj, so the Jacobian of L ↦ R is Π_j L_jj^(d−j) and det R = Π L_ii²: the density of the free
//! entries of L is c⁻¹ Πᵢ₌₂ᵈ L_ii^(d − i + 2η − 2) (1-based i).

use super::mvnormal::cholesky_in_place;
use super::special::{LN_2, lbeta};
use libm::log;

/// How far a row of a correlation Cholesky factor may be from unit length (|Σⱼ L_ij² − 1|), and a
/// correlation matrix's diagonal from 1: rounding of a transform, not a different matrix.
pub const UNIT_TOLERANCE: f64 = 1e-10;

/// log of the LKJ normalising constant's inverse, −Σₖ (d − k)[(2βₖ − 1) log 2 + log B(βₖ, βₖ)]
/// with βₖ = η + (d − 1 − k)/2 (see the module notes); 0 for d = 1. NaN unless η > 0 is finite.
pub fn lkj_log_normaliser(dim: usize, eta: f64) -> f64 {
    if !(eta > 0.0 && eta < f64::INFINITY) {
        return f64::NAN;
    }
    let d = dim as f64;
    (1..dim)
        .map(|k| {
            let k = k as f64;
            let beta = eta + 0.5 * (d - 1.0 - k);
            -(d - k) * ((2.0 * beta - 1.0) * LN_2 + lbeta(beta, beta))
        })
        .sum()
}

/// lkj(L; η): the log density of a correlation matrix's Cholesky factor L (row-major dim×dim, lower
/// triangle read), log c⁻¹ + Σᵢ₌₂ᵈ (d − i + 2η − 2) log L_ii, with respect to Lebesgue measure on
/// the entries below the diagonal. −∞ unless η > 0 is finite, the diagonal is positive and every
/// row has unit length within [`UNIT_TOLERANCE`].
///
/// ```
/// use mixwell::dist::lkj_cholesky_log_density;
/// // d = 2, η = 1: R is uniform on its one correlation r ∈ (−1, 1), density ½ whatever r is.
/// let r: f64 = 0.6;
/// let l = [1.0, 0.0, r, (1.0 - r * r).sqrt()];
/// assert!((lkj_cholesky_log_density(&l, 2, 1.0) - 0.5f64.ln()).abs() < 1e-15);
/// ```
pub fn lkj_cholesky_log_density(l: &[f64], dim: usize, eta: f64) -> f64 {
    if dim == 0 || l.len() != dim * dim {
        return f64::NEG_INFINITY;
    }
    let norm = lkj_log_normaliser(dim, eta);
    if norm.is_nan() {
        return f64::NEG_INFINITY;
    }
    let d = dim as f64;
    let mut lp = norm;
    for (i, row) in l.chunks_exact(dim).enumerate() {
        let row = &row[..=i];
        let length: f64 = row.iter().map(|v| v * v).sum();
        let diagonal = row[i];
        if !((length - 1.0).abs() <= UNIT_TOLERANCE && diagonal > 0.0) {
            return f64::NEG_INFINITY;
        }
        if i > 0 {
            // 1-based index i + 1: exponent d − (i + 1) + 2η − 2.
            lp += (d - i as f64 + 2.0 * eta - 3.0) * log(diagonal);
        }
    }
    lp
}

/// lkj(R; η) on the correlation matrix itself (row-major dim×dim): log c⁻¹ + (η − 1) log det R,
/// det R from a Cholesky factorisation into `scratch` (at least dim² entries). −∞ unless R is
/// symmetric (within 1e-12), has a unit diagonal (within [`UNIT_TOLERANCE`]) and is positive
/// definite.
pub fn lkj_correlation_log_density(r: &[f64], dim: usize, eta: f64, scratch: &mut [f64]) -> f64 {
    if dim == 0 || r.len() != dim * dim || scratch.len() < dim * dim {
        return f64::NEG_INFINITY;
    }
    let norm = lkj_log_normaliser(dim, eta);
    if norm.is_nan() {
        return f64::NEG_INFINITY;
    }
    for i in 0..dim {
        let diagonal = r[i * dim + i];
        if diagonal.is_nan() || (diagonal - 1.0).abs() > UNIT_TOLERANCE {
            return f64::NEG_INFINITY;
        }
        for j in 0..i {
            let asymmetry = (r[i * dim + j] - r[j * dim + i]).abs();
            if asymmetry.is_nan() || asymmetry > 1e-12 {
                return f64::NEG_INFINITY;
            }
        }
    }
    let chol = &mut scratch[..dim * dim];
    chol.copy_from_slice(r);
    if !cholesky_in_place(chol, dim) {
        return f64::NEG_INFINITY;
    }
    let half_log_det: f64 = (0..dim).map(|i| log(chol[i * dim + i])).sum();
    norm + (eta - 1.0) * 2.0 * half_log_det
}

#[cfg(test)]
mod tests {
    use super::*;

    /// d = 2: ∫₋₁¹ (1 − r²)^(η−1) dr = 2^(2η−1) B(η, η) (substitute r = 2u − 1).
    #[test]
    fn the_normaliser_for_two_dimensions_is_the_beta_integral() {
        for eta in [0.5, 1.0, 2.0, 7.5] {
            let want = -((2.0 * eta - 1.0) * LN_2 + lbeta(eta, eta));
            assert!((lkj_log_normaliser(2, eta) - want).abs() < 1e-15, "η = {eta}");
        }
        assert_eq!(lkj_log_normaliser(1, 2.0), 0.0);
        assert!(lkj_log_normaliser(3, 0.0).is_nan());
    }

    /// The Cholesky and the correlation-matrix forms differ exactly by the Jacobian Π_j L_jj^(d−j).
    #[test]
    fn the_two_forms_differ_by_the_jacobian() {
        let l = [1.0, 0.0, 0.0, 0.6, 0.8, 0.0, -0.3, 0.4, libm::sqrt(1.0 - 0.09 - 0.16)];
        let mut r = [0.0; 9];
        for i in 0..3 {
            for j in 0..3 {
                r[i * 3 + j] = (0..3).map(|k| l[i * 3 + k] * l[j * 3 + k]).sum();
            }
        }
        let mut scratch = [0.0; 9];
        for eta in [0.7, 1.0, 3.0] {
            let on_l = lkj_cholesky_log_density(&l, 3, eta);
            let on_r = lkj_correlation_log_density(&r, 3, eta, &mut scratch);
            // Jacobian (1-based j): L₁₁^2 · L₂₂^1 · L₃₃^0 = L₂₂.
            let jacobian = log(l[4]);
            assert!((on_l - (on_r + jacobian)).abs() < 1e-14, "η = {eta}: {on_l} vs {on_r} + {jacobian}");
        }
    }

    #[test]
    fn invalid_factors_give_minus_infinity() {
        let ninf = f64::NEG_INFINITY;
        assert_eq!(lkj_cholesky_log_density(&[1.0, 0.0, 0.5, 0.5], 2, 1.0), ninf); // row not unit
        assert_eq!(lkj_cholesky_log_density(&[1.0, 0.0, 0.6, -0.8], 2, 1.0), ninf); // negative diagonal
        assert_eq!(lkj_cholesky_log_density(&[1.0, 0.0, 0.6, 0.8], 2, 0.0), ninf); // η = 0
        assert_eq!(lkj_cholesky_log_density(&[1.0, 0.0, 0.6], 2, 1.0), ninf); // wrong length
        assert_eq!(lkj_cholesky_log_density(&[1.0, 0.0, f64::NAN, 0.8], 2, 1.0), ninf);
        let mut scratch = [0.0; 4];
        assert_eq!(lkj_correlation_log_density(&[1.0, 1.5, 1.5, 1.0], 2, 1.0, &mut scratch), ninf);
        assert_eq!(lkj_correlation_log_density(&[1.0, 0.5, 0.4, 1.0], 2, 1.0, &mut scratch), ninf);
        assert_eq!(lkj_correlation_log_density(&[2.0, 0.5, 0.5, 1.0], 2, 1.0, &mut scratch), ninf);
    }
}
