//! The multivariate normal density: with a covariance given as data (factorised once, [`MvNormal`]),
//! and with a covariance that is a parameter, given as its Cholesky factor
//! ([`mvnormal_cholesky_log_density`]) or as the matrix itself, factorised per evaluation into
//! caller-owned scratch ([`mvnormal_covariance_log_density`]).
//!
//! log N(x; μ, Σ) = −(d/2) log 2π − Σᵢ log Lᵢᵢ − ½‖L⁻¹(x − μ)‖² with Σ = L Lᵀ (BDA3 Appendix A,
//! Gelman et al. 2013). The data form keeps L⁻¹, so each evaluation is a triangular matrix–vector
//! product; the parameter forms solve L z = x − μ by forward substitution. None allocates.
//!
//! The parameter forms take several vectors at once, the rows of a matrix: `x` holds k·d values
//! (k ≥ 1 rows of length d) and `mean` either d values (shared by every row) or k·d (one per row);
//! the result is the sum of the rows' log densities.

use super::Col;
use super::special::HALF_LN_2PI;
use nalgebra::DMatrix;
use nalgebra::linalg::Cholesky;

/// Relative asymmetry |Σᵢⱼ − Σⱼᵢ| / √(Σᵢᵢ Σⱼⱼ) accepted as rounding in typed-in data.
const SYMMETRY_TOLERANCE: f64 = 1e-12;

/// A multivariate normal with a fixed covariance: the inverse Cholesky factor is computed once.
///
/// ```
/// use mixwell::dist::{Col, MvNormal};
/// let mvn = MvNormal::new(&[2.0, 0.6, 0.6, 1.0], 2).unwrap();
/// let lp = mvn.log_density(Col::vector(&[1.0, -1.0]), Col::vector(&[1.0, -1.0]));
/// assert!((lp - -2.085225187327399).abs() < 1e-12); // REFERENCES.md §1, mvn_2d row
/// ```
#[derive(Clone, Debug)]
pub struct MvNormal {
    dim: usize,
    /// L⁻¹, row-major d×d (only the lower triangle is read), where Σ = L Lᵀ.
    inv_chol: Vec<f64>,
    /// −(d/2) log 2π − Σ log Lᵢᵢ.
    log_norm: f64,
}

impl MvNormal {
    /// The name a model writes.
    pub const NAME: &'static str = "mvnormal";
    /// Parameter names, in the order they are written.
    pub const PARAMS: &'static [&'static str] = &["mean", "covariance"];

    /// Factorise a `dim`×`dim` row-major covariance; an error names why it is not valid.
    pub fn new(cov: &[f64], dim: usize) -> Result<Self, String> {
        if dim == 0 {
            return Err("the covariance matrix is empty".into());
        }
        if dim.checked_mul(dim) != Some(cov.len()) {
            return Err(format!("a {dim}×{dim} covariance matrix needs {} entries, got {}", dim * dim, cov.len()));
        }
        let entry = |i: usize, j: usize| cov[i * dim + j];
        for i in 0..dim {
            for j in 0..dim {
                if !entry(i, j).is_finite() {
                    return Err(format!(
                        "covariance entry [{}, {}] is {}, not a finite number",
                        i + 1,
                        j + 1,
                        entry(i, j)
                    ));
                }
            }
        }
        for i in 0..dim {
            if entry(i, i) <= 0.0 {
                return Err(format!(
                    "covariance entry [{0}, {0}] is {1}: a variance must be positive",
                    i + 1,
                    entry(i, i)
                ));
            }
        }
        for i in 0..dim {
            for j in 0..i {
                let scale = (entry(i, i) * entry(j, j)).sqrt();
                if (entry(i, j) - entry(j, i)).abs() > SYMMETRY_TOLERANCE * scale {
                    return Err(format!(
                        "the covariance matrix is not symmetric: entry [{}, {}] is {} but [{}, {}] is {}",
                        i + 1,
                        j + 1,
                        entry(i, j),
                        j + 1,
                        i + 1,
                        entry(j, i)
                    ));
                }
            }
        }
        let sigma = DMatrix::from_row_slice(dim, dim, cov);
        let chol = Cholesky::new(sigma).ok_or_else(|| {
            "the covariance matrix is not positive definite (some combination of the variables would have \
             zero or negative variance)"
                .to_string()
        })?;
        let l = chol.l();
        let inv = l
            .solve_lower_triangular(&DMatrix::identity(dim, dim))
            .filter(|m| m.iter().all(|v| v.is_finite()))
            .ok_or_else(|| "the covariance matrix is too close to singular to invert".to_string())?;
        let log_det_half: f64 = (0..dim).map(|i| libm::log(l[(i, i)])).sum();
        let inv_chol = (0..dim * dim).map(|k| inv[(k / dim, k % dim)]).collect();
        Ok(MvNormal { dim, inv_chol, log_norm: -(dim as f64) * HALF_LN_2PI - log_det_half })
    }

    pub fn dim(&self) -> usize {
        self.dim
    }

    /// Σ over the rows of `x` of log N(xᵣ; μᵣ, Σ), with the row convention of the module notes;
    /// shapes that do not fit give −∞.
    pub fn log_density_rows(&self, x: &[f64], mean: &[f64]) -> f64 {
        let d = self.dim;
        let Some(rows) = row_count(x, mean, d) else {
            return f64::NEG_INFINITY;
        };
        let shared = mean.len() == d;
        (0..rows)
            .map(|r| {
                let mu = if shared { mean } else { &mean[r * d..(r + 1) * d] };
                self.log_density(Col::vector(&x[r * d..(r + 1) * d]), Col::vector(mu))
            })
            .sum()
    }

    /// log N(x; μ, Σ); `x` and `mu` are columns of length `dim` (or broadcast scalars). Columns
    /// too short and NaN give −∞.
    // Inlined into the evaluator's instruction loop: out of line it costs the 10-dimensional
    // benchmark model 8% more instructions per evaluation (cachegrind).
    #[inline(always)]
    pub fn log_density(&self, x: Col, mu: Col) -> f64 {
        let d = self.dim;
        if !(x.covers(d) && mu.covers(d)) {
            return f64::NEG_INFINITY;
        }
        let mut quad = 0.0;
        for (i, row) in self.inv_chol.chunks_exact(d).enumerate() {
            let z: f64 = row[..=i].iter().enumerate().map(|(j, l)| l * (x.get(j) - mu.get(j))).sum();
            quad += z * z;
        }
        let lp = self.log_norm - 0.5 * quad;
        if lp.is_nan() { f64::NEG_INFINITY } else { lp }
    }
}

/// The number of rows of `x` under the row convention (mean shared or one per row), or `None`.
fn row_count(x: &[f64], mean: &[f64], d: usize) -> Option<usize> {
    (d > 0 && !x.is_empty() && x.len().is_multiple_of(d) && (mean.len() == d || mean.len() == x.len()))
        .then(|| x.len() / d)
}

/// Σ = L Lᵀ in place: the lower triangle of the row-major d×d `a` (symmetric, only the lower
/// triangle read) becomes L (the Cholesky–Banachiewicz order, row by row); the upper triangle is
/// left as it was. `false` when a pivot is not positive and finite (the matrix is not positive
/// definite, or NaN).
pub(crate) fn cholesky_in_place(a: &mut [f64], d: usize) -> bool {
    for i in 0..d {
        for j in 0..=i {
            let mut sum = a[i * d + j];
            for k in 0..j {
                sum -= a[i * d + k] * a[j * d + k];
            }
            if i == j {
                if !(sum > 0.0 && sum < f64::INFINITY) {
                    return false;
                }
                a[i * d + i] = libm::sqrt(sum);
            } else {
                a[i * d + j] = sum / a[j * d + j];
            }
        }
    }
    true
}

/// Σ over rows of log N(xᵣ; μᵣ, L Lᵀ) for a factor L whose diagonal is already known positive:
/// forward substitution L z = x − μ into `z` (length d) per row.
fn sum_rows_with_factor(x: &[f64], mean: &[f64], l: &[f64], d: usize, z: &mut [f64]) -> f64 {
    let rows = x.len() / d;
    let shared = mean.len() == d;
    let log_det_half: f64 = (0..d).map(|i| libm::log(l[i * d + i])).sum();
    let mut quad = 0.0;
    for r in 0..rows {
        let mu = if shared { mean } else { &mean[r * d..(r + 1) * d] };
        let xr = &x[r * d..(r + 1) * d];
        for i in 0..d {
            let row = &l[i * d..i * d + i];
            let dot: f64 = row.iter().zip(&z[..i]).map(|(a, b)| a * b).sum();
            z[i] = (xr[i] - mu[i] - dot) / l[i * d + i];
            quad += z[i] * z[i];
        }
    }
    let lp = -(rows as f64) * ((d as f64) * HALF_LN_2PI + log_det_half) - 0.5 * quad;
    if lp.is_nan() { f64::NEG_INFINITY } else { lp }
}

/// Σ over the rows of `x` of log N(xᵣ; μᵣ, L Lᵀ), the covariance given by its Cholesky factor
/// `chol` (row-major dim×dim, lower triangle read, diagonal > 0). `scratch` needs `dim` entries.
/// −∞ for a diagonal entry that is not positive and finite, shapes that do not fit, or NaN.
///
/// ```
/// use mixwell::dist::mvnormal_cholesky_log_density;
/// // REFERENCES.md §1 mvn_2d: Σ = [[2, 0.6], [0.6, 1]] has L = [[√2, 0], [0.6/√2, √(1 − 0.18)]].
/// let l = [2f64.sqrt(), 0.0, 0.6 / 2f64.sqrt(), 0.82f64.sqrt()];
/// let lp = mvnormal_cholesky_log_density(&[1.0, -1.0], &[1.0, -1.0], &l, 2, &mut [0.0; 2]);
/// assert!((lp - -2.085225187327399).abs() < 1e-14);
/// ```
pub fn mvnormal_cholesky_log_density(x: &[f64], mean: &[f64], chol: &[f64], dim: usize, scratch: &mut [f64]) -> f64 {
    if row_count(x, mean, dim).is_none() || chol.len() != dim * dim || scratch.len() < dim {
        return f64::NEG_INFINITY;
    }
    if !(0..dim).all(|i| chol[i * dim + i] > 0.0 && chol[i * dim + i] < f64::INFINITY) {
        return f64::NEG_INFINITY;
    }
    sum_rows_with_factor(x, mean, chol, dim, &mut scratch[..dim])
}

/// Σ over the rows of `x` of log N(xᵣ; μᵣ, Σ) for a covariance Σ that is a parameter: factorised
/// into `scratch` (at least dim² + dim entries) on every call. −∞ when Σ is not symmetric (within
/// 1e-12 relative, as for [`MvNormal`]), not positive definite, or the shapes do not fit.
pub fn mvnormal_covariance_log_density(x: &[f64], mean: &[f64], cov: &[f64], dim: usize, scratch: &mut [f64]) -> f64 {
    let d = dim;
    if row_count(x, mean, d).is_none() || cov.len() != d * d || scratch.len() < d * d + d {
        return f64::NEG_INFINITY;
    }
    for i in 0..d {
        for j in 0..i {
            let scale = libm::sqrt(cov[i * d + i] * cov[j * d + j]);
            let asymmetry = (cov[i * d + j] - cov[j * d + i]).abs();
            if asymmetry.is_nan() || asymmetry > SYMMETRY_TOLERANCE * scale {
                return f64::NEG_INFINITY;
            }
        }
    }
    let (factor, z) = scratch.split_at_mut(d * d);
    factor.copy_from_slice(cov);
    if !cholesky_in_place(factor, d) {
        return f64::NEG_INFINITY;
    }
    sum_rows_with_factor(x, mean, factor, d, &mut z[..d])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_invalid_covariances_with_a_reason() {
        let cases: [(&[f64], usize, &str); 7] = [
            (&[], 0, "empty"),
            (&[1.0, 0.0, 0.0], 2, "needs 4 entries"),
            (&[1.0, f64::NAN, 0.0, 1.0], 2, "not a finite number"),
            (&[1.0, 0.0, 0.0, f64::INFINITY], 2, "not a finite number"),
            (&[1.0, 0.0, 0.0, -1.0], 2, "must be positive"),
            (&[1.0, 0.5, 0.4, 1.0], 2, "not symmetric"),
            // Correlation 2 is impossible: eigenvalues 3 and −1.
            (&[1.0, 2.0, 2.0, 1.0], 2, "not positive definite"),
        ];
        for (cov, dim, reason) in cases {
            match MvNormal::new(cov, dim) {
                Ok(_) => panic!("{cov:?} accepted"),
                Err(message) => assert!(message.contains(reason), "{cov:?}: {message}"),
            }
        }
    }

    #[test]
    fn identity_covariance_is_a_product_of_standard_normals() {
        // With Σ = I the density factorises (definition of the MVN): Σᵢ [−½log 2π − zᵢ²/2].
        let mvn = MvNormal::new(&[1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0], 3).unwrap();
        let (x, mu) = ([0.5, -1.0, 2.0], [0.0, 0.0, 1.0]);
        let want: f64 = x.iter().zip(&mu).map(|(a, b)| -HALF_LN_2PI - 0.5 * (a - b) * (a - b)).sum();
        let got = mvn.log_density(Col::vector(&x), Col::vector(&mu));
        assert!((got - want).abs() < 1e-14, "{got} vs {want}");
        assert_eq!(mvn.log_density(Col::vector(&x[..2]), Col::vector(&mu)), f64::NEG_INFINITY);
        assert_eq!(mvn.log_density(Col::vector(&[f64::NAN, 0.0, 0.0]), Col::vector(&mu)), f64::NEG_INFINITY);
    }

    /// The in-place factor reproduces the matrix, L Lᵀ = Σ, and refuses what is not positive
    /// definite (eigenvalues 3 and −1 for correlation 2).
    #[test]
    fn cholesky_in_place_reproduces_the_matrix() {
        let cov = [4.0, 1.2, -0.6, 1.2, 2.0, 0.3, -0.6, 0.3, 0.5];
        let mut l = cov;
        assert!(cholesky_in_place(&mut l, 3));
        for i in 0..3 {
            for j in 0..=i {
                let back: f64 = (0..=j).map(|k| l[i * 3 + k] * l[j * 3 + k]).sum();
                assert!((back - cov[i * 3 + j]).abs() < 1e-15, "[{i}, {j}]");
            }
        }
        assert!(!cholesky_in_place(&mut [1.0, 2.0, 2.0, 1.0], 2));
        assert!(!cholesky_in_place(&mut [f64::NAN, 0.0, 0.0, 1.0], 2));
    }

    #[test]
    fn parameter_forms_refuse_what_does_not_fit() {
        let ninf = f64::NEG_INFINITY;
        let mut scratch = [0.0; 6];
        let l = [1.0, 0.0, 0.5, 1.0];
        assert_eq!(
            mvnormal_cholesky_log_density(&[0.0, 0.0], &[0.0, 0.0], &[1.0, 0.0, 0.5, 0.0], 2, &mut scratch),
            ninf
        );
        assert_eq!(mvnormal_cholesky_log_density(&[0.0, 0.0, 1.0], &[0.0, 0.0], &l, 2, &mut scratch), ninf);
        assert_eq!(mvnormal_cholesky_log_density(&[0.0, 0.0], &[0.0, 0.0, 0.0], &l, 2, &mut scratch), ninf);
        assert_eq!(mvnormal_cholesky_log_density(&[0.0, 0.0], &[0.0, 0.0], &l, 2, &mut scratch[..1]), ninf);
        assert_eq!(
            mvnormal_covariance_log_density(&[0.0, 0.0], &[0.0, 0.0], &[1.0, 2.0, 2.0, 1.0], 2, &mut scratch),
            ninf
        );
        assert_eq!(
            mvnormal_covariance_log_density(&[0.0, 0.0], &[0.0, 0.0], &[1.0, 0.5, 0.4, 1.0], 2, &mut scratch),
            ninf
        );
        assert_eq!(
            mvnormal_covariance_log_density(&[0.0, 0.0], &[0.0, 0.0], &[1.0, 0.0, 0.0, 1.0], 2, &mut scratch[..5]),
            ninf
        );
        assert_eq!(
            mvnormal_covariance_log_density(&[f64::NAN, 0.0], &[0.0, 0.0], &[1.0, 0.0, 0.0, 1.0], 2, &mut scratch),
            ninf
        );
    }
}
