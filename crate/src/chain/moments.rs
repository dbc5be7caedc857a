//! Running moments of a chain's draws — count, mean, and the scatter of deviations — kept one
//! row at a time, so a pilot of any length needs memory for one covariance, not for its rows.
//!
//! Rows are added by Welford's update (Welford 1962, "Note on a method for calculating corrected
//! sums of squares and products", Technometrics 4(3)), which stays accurate when the mean is far
//! from zero; chains are pooled by the pairwise combination of Chan, Golub & LeVeque (1979,
//! "Updating formulae and a pairwise algorithm for computing sample variances", Stanford
//! CS-79-773), always in chain order, so the pooled moments do not depend on which chain
//! finished first.

use crate::kernel::Geometry;

/// Count, mean and scatter of rows of `dim` coordinates: the full lower triangle of the scatter
/// matrix, or only its diagonal.
#[derive(Clone, Debug)]
pub struct Moments {
    count: u64,
    mean: Vec<f64>,
    /// Σ (x − x̄)(x − x̄)ᵀ: packed lower triangle, row by row ((i, j) with j ≤ i at i(i+1)/2 + j);
    /// or, for diagonal moments, the d sums of squares.
    scatter: Vec<f64>,
    full: bool,
    /// Work space for the deviations (not part of the moments).
    delta: Vec<f64>,
}

impl PartialEq for Moments {
    fn eq(&self, other: &Moments) -> bool {
        (self.count, &self.mean, &self.scatter, self.full) == (other.count, &other.mean, &other.scatter, other.full)
    }
}

impl Moments {
    /// Moments with the full covariance.
    pub fn full(dim: usize) -> Moments {
        Moments::new(dim, true)
    }

    /// Moments with variances only.
    pub fn diagonal(dim: usize) -> Moments {
        Moments::new(dim, false)
    }

    fn new(dim: usize, full: bool) -> Moments {
        let scatter = if full { dim * (dim + 1) / 2 } else { dim };
        Moments { count: 0, mean: vec![0.0; dim], scatter: vec![0.0; scatter], full, delta: vec![0.0; dim] }
    }

    pub fn dim(&self) -> usize {
        self.mean.len()
    }

    pub fn count(&self) -> u64 {
        self.count
    }

    /// Add one row (Welford): with δ = x − x̄ before the update, x̄ += δ/n and the scatter gains
    /// δ(x − x̄)ᵀ with the updated mean. Allocates nothing.
    pub fn add(&mut self, x: &[f64]) {
        self.count += 1;
        let n = self.count as f64;
        for ((m, d), xi) in self.mean.iter_mut().zip(&mut self.delta).zip(x) {
            *d = xi - *m;
            *m += *d / n;
        }
        if self.full {
            let mut k = 0;
            for (i, di) in self.delta.iter().enumerate() {
                for (xj, mj) in x[..=i].iter().zip(&self.mean) {
                    self.scatter[k] += di * (xj - mj);
                    k += 1;
                }
            }
        } else {
            for ((s, di), (xi, mi)) in self.scatter.iter_mut().zip(&self.delta).zip(x.iter().zip(&self.mean)) {
                *s += di * (xi - mi);
            }
        }
    }

    /// Combine with the moments of other rows (Chan, Golub & LeVeque): with δ = x̄_b − x̄_a,
    /// x̄ = x̄_a + δ·n_b/n and M = M_a + M_b + δδᵀ·n_a·n_b/n.
    pub fn merge(&mut self, other: &Moments) {
        if other.count == 0 {
            return;
        }
        if self.count == 0 {
            *self = other.clone();
            return;
        }
        let (na, nb) = (self.count as f64, other.count as f64);
        let n = na + nb;
        for ((d, a), b) in self.delta.iter_mut().zip(&self.mean).zip(&other.mean) {
            *d = b - a;
        }
        let weight = na * nb / n;
        if self.full {
            let mut k = 0;
            for i in 0..self.dim() {
                for j in 0..=i {
                    self.scatter[k] += other.scatter[k] + self.delta[i] * self.delta[j] * weight;
                    k += 1;
                }
            }
        } else {
            for (i, s) in self.scatter.iter_mut().enumerate() {
                *s += other.scatter[i] + self.delta[i] * self.delta[i] * weight;
            }
        }
        for (m, d) in self.mean.iter_mut().zip(&self.delta) {
            *m += d * nb / n;
        }
        self.count += other.count;
    }

    /// The moments as numbers, for a chain's answer: count, mean, scatter.
    pub fn to_rows(&self) -> Vec<f64> {
        let mut rows = Vec::with_capacity(1 + self.mean.len() + self.scatter.len());
        rows.push(self.count as f64);
        rows.extend_from_slice(&self.mean);
        rows.extend_from_slice(&self.scatter);
        rows
    }

    /// Full moments of `dim` coordinates read back from [`Moments::to_rows`], or `None` when the
    /// numbers do not have that layout.
    pub fn from_rows(rows: &[f64], dim: usize) -> Option<Moments> {
        let mut moments = Moments::full(dim);
        let (&count, rest) = rows.split_first()?;
        if rest.len() != dim + moments.scatter.len() || !(count >= 0.0 && count.fract() == 0.0) {
            return None;
        }
        moments.count = count as u64;
        moments.mean.copy_from_slice(&rest[..dim]);
        moments.scatter.copy_from_slice(&rest[dim..]);
        Some(moments)
    }

    /// All chains' moments pooled in chain order (the answers of the pilot, each from
    /// [`Moments::to_rows`]); answers that do not read count as no rows.
    pub fn pooled(chains: &[&[f64]], dim: usize) -> Moments {
        let mut pooled = Moments::full(dim);
        for rows in chains {
            if let Some(m) = Moments::from_rows(rows, dim) {
                pooled.merge(&m);
            }
        }
        pooled
    }

    /// The mean and covariance (divisor n − 1) as a geometry; off the diagonal zero for
    /// diagonal moments. Fewer than two rows give unit scales; a coordinate that never moved (or
    /// whose variance is not finite) gets unit variance and no covariance with the others.
    pub fn geometry(&self) -> Geometry {
        let d = self.dim();
        if self.count < 2 || d == 0 {
            return Geometry::unit(d);
        }
        let divisor = (self.count - 1) as f64;
        let mut g = Geometry { mean: self.mean.clone(), covariance: vec![0.0; d * d] };
        if self.full {
            let mut k = 0;
            for i in 0..d {
                for j in 0..=i {
                    let v = self.scatter[k] / divisor;
                    g.covariance[i * d + j] = v;
                    g.covariance[j * d + i] = v;
                    k += 1;
                }
            }
        } else {
            for i in 0..d {
                g.covariance[i * d + i] = self.scatter[i] / divisor;
            }
        }
        for i in 0..d {
            let v = g.covariance[i * d + i];
            if !(v.is_finite() && v > 0.0) {
                for j in 0..d {
                    g.covariance[i * d + j] = 0.0;
                    g.covariance[j * d + i] = 0.0;
                }
                g.covariance[i * d + i] = 1.0;
            }
        }
        g
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rng::Stream;

    /// The textbook two-pass mean and covariance (divisor n − 1) of rows of `d` numbers.
    fn two_pass(rows: &[f64], d: usize) -> (Vec<f64>, Vec<f64>) {
        let n = (rows.len() / d) as f64;
        let mean: Vec<f64> = (0..d).map(|i| rows.iter().skip(i).step_by(d).sum::<f64>() / n).collect();
        let mut cov = vec![0.0; d * d];
        for row in rows.chunks_exact(d) {
            for i in 0..d {
                for j in 0..d {
                    cov[i * d + j] += (row[i] - mean[i]) * (row[j] - mean[j]) / (n - 1.0);
                }
            }
        }
        (mean, cov)
    }

    /// Correlated rows far from the origin (where a naive Σx² − n·x̄² loses every digit).
    fn rows(n: usize, d: usize, seed: u64) -> Vec<f64> {
        let mut rng = Stream::new(seed, 0);
        (0..n)
            .flat_map(|_| {
                let z: Vec<f64> = (0..d).map(|_| rng.normal()).collect();
                (0..d).map(move |i| 1e6 + (i as f64 + 1.0) * z[i] + 0.5 * z[0]).collect::<Vec<_>>()
            })
            .collect()
    }

    fn close(a: &[f64], b: &[f64], tolerance: f64) -> bool {
        a.iter().zip(b).all(|(x, y)| (x - y).abs() <= tolerance * y.abs().max(1.0))
    }

    #[test]
    fn running_moments_match_the_two_pass_formulas() {
        let (d, data) = (4, rows(500, 4, 1));
        let mut m = Moments::full(d);
        data.chunks_exact(d).for_each(|r| m.add(r));
        let g = m.geometry();
        let (mean, cov) = two_pass(&data, d);
        assert!(close(&g.mean, &mean, 1e-14), "{:?} vs {mean:?}", g.mean);
        // Both are accurate here; they agree to about 1e-9 of the variances (values near 1e6).
        assert!(close(&g.covariance, &cov, 1e-9), "{:?} vs {cov:?}", g.covariance);
        let mut diagonal = Moments::diagonal(d);
        data.chunks_exact(d).for_each(|r| diagonal.add(r));
        let gd = diagonal.geometry();
        for i in 0..d {
            assert_eq!(gd.covariance[i * d + i], g.covariance[i * d + i], "the diagonal is the same sums");
            assert_eq!(gd.covariance[i * d + (i + 1) % d], 0.0);
        }
    }

    #[test]
    fn pooled_chains_equal_all_rows_at_once_and_follow_chain_order_only() {
        let d = 3;
        let chains: Vec<Vec<f64>> = (0..4).map(|c| rows(100 + 37 * c, d, 10 + c as u64)).collect();
        let answers: Vec<Vec<f64>> = chains
            .iter()
            .map(|c| {
                let mut m = Moments::full(d);
                c.chunks_exact(d).for_each(|r| m.add(r));
                m.to_rows()
            })
            .collect();
        let slices: Vec<&[f64]> = answers.iter().map(Vec::as_slice).collect();
        let pooled = Moments::pooled(&slices, d);
        assert_eq!(pooled.count(), chains.iter().map(|c| (c.len() / d) as u64).sum::<u64>());
        let all: Vec<f64> = chains.concat();
        let (mean, cov) = two_pass(&all, d);
        let g = pooled.geometry();
        assert!(close(&g.mean, &mean, 1e-14) && close(&g.covariance, &cov, 1e-9), "{g:?}");
        // Pooled again in the same order: the same bits.
        assert_eq!(Moments::pooled(&slices, d), pooled);
    }

    #[test]
    fn degenerate_moments_give_unit_scales() {
        let mut m = Moments::full(2);
        assert_eq!(m.geometry(), Geometry::unit(2), "no rows");
        m.add(&[1.0, 2.0]);
        assert_eq!(m.geometry(), Geometry::unit(2), "one row");
        m.add(&[1.0, 3.0]);
        let g = m.geometry();
        assert_eq!(g.covariance, vec![1.0, 0.0, 0.0, 0.5], "a coordinate that never moved: unit variance");
        assert!(Moments::from_rows(&[2.0, 1.0], 2).is_none(), "a wrong layout is refused");
        assert_eq!(Moments::pooled(&[&[1.0]], 2).count(), 0, "and pools as nothing");
    }
}
