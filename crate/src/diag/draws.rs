//! Equal-length chains of one scalar quantity, and the transformations the diagnostics apply to
//! them before comparing chains: splitting, rank normalisation, folding and tail indicators.

use crate::dist::quantile::normal_quantile;

/// Why a set of chains cannot be diagnosed. Every public function turns this into NaN.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Unusable {
    /// No chains, or chains without draws.
    NoDraws,
    /// The chains have different lengths.
    UnequalLengths,
    /// A draw is NaN or infinite.
    NotFinite,
    /// Fewer draws per chain than the computation needs.
    TooShort,
}

/// Chains stored one after another: chain m is `values[m·len .. (m+1)·len]`.
#[derive(Clone, Debug)]
pub(crate) struct Draws {
    pub chains: usize,
    pub len: usize,
    pub values: Vec<f64>,
}

impl Draws {
    /// Copies the chains after checking they are usable and hold at least `min_len` draws each.
    pub(crate) fn checked(chains: &[&[f64]], min_len: usize) -> Result<Draws, Unusable> {
        let len = chains.first().map_or(0, |c| c.len());
        if len == 0 {
            return Err(Unusable::NoDraws);
        }
        if chains.iter().any(|c| c.len() != len) {
            return Err(Unusable::UnequalLengths);
        }
        if chains.iter().any(|c| c.iter().any(|x| !x.is_finite())) {
            return Err(Unusable::NotFinite);
        }
        if len < min_len {
            return Err(Unusable::TooShort);
        }
        Ok(Draws { chains: chains.len(), len, values: chains.concat() })
    }

    pub(crate) fn chain(&self, m: usize) -> &[f64] {
        &self.values[m * self.len..(m + 1) * self.len]
    }

    /// Every chain cut into a first and a second half (Vehtari et al. 2021, §3.1 step 1): 2M chains
    /// of ⌊N/2⌋ draws. For odd N the middle draw is dropped, so both halves have equal length and
    /// keep their distance from the cut.
    pub(crate) fn split(&self) -> Draws {
        let half = self.len / 2;
        let mut values = Vec::with_capacity(2 * self.chains * half);
        for m in 0..self.chains {
            let chain = self.chain(m);
            values.extend_from_slice(&chain[..half]);
            values.extend_from_slice(&chain[self.len - half..]);
        }
        Draws { chains: 2 * self.chains, len: half, values }
    }

    /// The same layout with every draw transformed.
    pub(crate) fn map(&self, f: impl Fn(f64) -> f64) -> Draws {
        Draws { chains: self.chains, len: self.len, values: self.values.iter().map(|&x| f(x)).collect() }
    }

    /// ζ = |θ − median| (Vehtari et al. 2021, folding): a chain that is wider or narrower than
    /// the others now differs in location, which the R-hat of the folded draws detects.
    pub(crate) fn folded(&self, median: f64) -> Draws {
        self.map(|x| (x - median).abs())
    }

    /// I(θ ≤ threshold) as 0/1 (Vehtari et al. 2021: the ESS of a quantile).
    pub(crate) fn indicator(&self, threshold: f64) -> Draws {
        self.map(|x| if x <= threshold { 1.0 } else { 0.0 })
    }

    /// Rank normalisation (Vehtari et al. 2021, §4.1): pool all S draws, rank them (ties get their
    /// average rank), and map rank r to Φ⁻¹((r − 3/8)/(S + 1/4)), Blom's (1958) plotting position.
    pub(crate) fn rank_normalised(&self) -> Draws {
        let s = self.values.len();
        // Sorting (value, position) pairs keeps the comparisons in cache.
        let mut order: Vec<(f64, usize)> = self.values.iter().copied().zip(0..).collect();
        order.sort_unstable_by(|a, b| a.0.total_cmp(&b.0));
        let mut z = vec![0.0; s];
        let denominator = s as f64 + 0.25;
        let mut first = 0;
        while first < s {
            let value = order[first].0;
            let mut last = first;
            while last + 1 < s && order[last + 1].0 == value {
                last += 1;
            }
            // Average of the 1-based ranks first+1 ..= last+1; a half-integer, so exact.
            let rank = (first + last + 2) as f64 / 2.0;
            let score = normal_quantile((rank - 0.375) / denominator);
            for &(_, i) in &order[first..=last] {
                z[i] = score;
            }
            first = last + 1;
        }
        Draws { chains: self.chains, len: self.len, values: z }
    }

    /// Chain means, within-chain variance W, between-chain variance B and the pooled estimate
    /// var⁺ = (N−1)/N·W + B/N (Gelman & Rubin 1992; Gelman et al. 2013, BDA3 §11.4).
    /// With one chain B is taken as 0. Needs N ≥ 2.
    pub(crate) fn moments(&self) -> Moments {
        let (m, n) = (self.chains as f64, self.len as f64);
        let means: Vec<f64> = (0..self.chains).map(|j| mean(self.chain(j))).collect();
        let within = (0..self.chains)
            .map(|j| self.chain(j).iter().map(|x| (x - means[j]) * (x - means[j])).sum::<f64>() / (n - 1.0))
            .sum::<f64>()
            / m;
        let between = if self.chains > 1 {
            let grand = mean(&means);
            n * means.iter().map(|x| (x - grand) * (x - grand)).sum::<f64>() / (m - 1.0)
        } else {
            0.0
        };
        let var_plus = (n - 1.0) / n * within + between / n;
        Moments { within, var_plus }
    }
}

/// The variance summaries shared by R-hat and the chain-combined autocorrelation.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Moments {
    /// W, the mean of the within-chain variances (ddof 1).
    pub within: f64,
    /// var⁺, the pooled variance estimate.
    pub var_plus: f64,
}

/// The p-quantile of sorted draws by linear interpolation between order statistics: numpy's default
/// "linear" rule, Hyndman & Fan's (1996) type 7. Position h = (S − 1)p; the interpolation is written
/// as numpy writes it (from the nearer end when the fraction is ≥ ½) so the results agree to the bit.
pub(crate) fn quantile_sorted(sorted: &[f64], p: f64) -> f64 {
    let s = sorted.len();
    if s == 0 || !(0.0..=1.0).contains(&p) {
        return f64::NAN;
    }
    let h = (s - 1) as f64 * p;
    let lo = libm::floor(h) as usize;
    let hi = (lo + 1).min(s - 1);
    let t = h - lo as f64;
    let (a, b) = (sorted[lo], sorted[hi]);
    let diff = b - a;
    if t >= 0.5 { b - diff * (1.0 - t) } else { a + diff * t }
}

/// The median of sorted draws: the middle one, or the mean of the two middle ones (as numpy's
/// `median`, which differs from the type-7 quantile at ½ in the last bit for even S).
pub(crate) fn median_sorted(sorted: &[f64]) -> f64 {
    let s = sorted.len();
    match s {
        0 => f64::NAN,
        _ if s % 2 == 1 => sorted[s / 2],
        _ => (sorted[s / 2 - 1] + sorted[s / 2]) / 2.0,
    }
}

/// The mean, summed as deviations from the first value: x₀ + Σ(x − x₀)/n. Equal values then give
/// exactly that value (a plain Σx/n of 0.1 repeated is not exactly 0.1), so a chain that never moved
/// has a variance of exactly 0 and is recognised as such.
pub(crate) fn mean(values: &[f64]) -> f64 {
    let Some(&first) = values.first() else {
        return f64::NAN;
    };
    first + values.iter().map(|x| x - first).sum::<f64>() / values.len() as f64
}

/// Mean and sample standard deviation (divisor S − 1, two passes) of all draws.
pub(crate) fn mean_and_sd(values: &[f64]) -> (f64, f64) {
    let s = values.len() as f64;
    let mean = mean(values);
    let sd = (values.iter().map(|x| (x - mean) * (x - mean)).sum::<f64>() / (s - 1.0)).sqrt();
    (mean, sd)
}

/// All draws of all chains, sorted ascending.
pub(crate) fn sorted_draws(values: &[f64]) -> Vec<f64> {
    let mut sorted = values.to_vec();
    sorted.sort_unstable_by(f64::total_cmp);
    sorted
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mean_of_equal_values_is_exact() {
        assert_eq!(mean(&[0.1; 7]), 0.1);
        assert_eq!(mean_and_sd(&[0.1; 7]), (0.1, 0.0));
        assert_eq!(mean(&[1.0, 2.0, 6.0]), 3.0);
        assert!(mean(&[]).is_nan());
    }

    #[test]
    fn split_drops_the_middle_of_odd_chains() {
        let a = [1.0, 2.0, 3.0, 4.0, 5.0];
        let b = [6.0, 7.0, 8.0, 9.0, 10.0];
        let d = Draws::checked(&[&a, &b], 1).unwrap().split();
        assert_eq!((d.chains, d.len), (4, 2));
        assert_eq!(d.values, vec![1.0, 2.0, 4.0, 5.0, 6.0, 7.0, 9.0, 10.0]);
    }

    /// Average ranks for ties, as `scipy.stats.rankdata(method="average")` defines them: the values
    /// [3, 1, 3, 2] have ranks [3.5, 1, 3.5, 2]; Blom's position (r − 3/8)/(S + 1/4).
    #[test]
    fn rank_normalisation_averages_tied_ranks() {
        let x = [3.0, 1.0, 3.0, 2.0];
        let z = Draws::checked(&[&x], 1).unwrap().rank_normalised().values;
        let expect = |r: f64| normal_quantile((r - 0.375) / 4.25);
        assert_eq!(z, vec![expect(3.5), expect(1.0), expect(3.5), expect(2.0)]);
    }

    /// numpy.quantile(x, p) values (numpy 2.4.6, default method; `np.median` for the median):
    /// x = [0, 1, 3, 7, 15]: p = 0.05 → 0.2, p = 0.5 → 3.0, p = 0.9 → 11.8, p = 1 → 15.
    #[test]
    fn quantile_is_type_seven() {
        let x = [0.0, 1.0, 3.0, 7.0, 15.0];
        assert!((quantile_sorted(&x, 0.05) - 0.2).abs() < 1e-15);
        assert_eq!(quantile_sorted(&x, 0.5), 3.0);
        assert!((quantile_sorted(&x, 0.9) - 11.8).abs() < 1e-14);
        assert_eq!(quantile_sorted(&x, 1.0), 15.0);
        assert_eq!(quantile_sorted(&x, 0.0), 0.0);
        assert!(quantile_sorted(&x, 1.5).is_nan());
        assert!(quantile_sorted(&[], 0.5).is_nan());
        assert_eq!(median_sorted(&[1.0, 2.0, 4.0, 8.0]), 3.0);
    }

    #[test]
    fn unusable_inputs_are_named() {
        let a = [1.0, 2.0, 3.0, 4.0];
        let short = [1.0, 2.0, 3.0];
        let bad = [1.0, f64::NAN, 3.0, 4.0];
        assert_eq!(Draws::checked(&[], 4).unwrap_err(), Unusable::NoDraws);
        assert_eq!(Draws::checked(&[&[]], 4).unwrap_err(), Unusable::NoDraws);
        assert_eq!(Draws::checked(&[&a, &short], 4).unwrap_err(), Unusable::UnequalLengths);
        assert_eq!(Draws::checked(&[&a, &bad], 4).unwrap_err(), Unusable::NotFinite);
        assert_eq!(Draws::checked(&[&short], 4).unwrap_err(), Unusable::TooShort);
    }
}
