//! DIRECT: global minimisation over a box without derivatives or a Lipschitz constant
//! (Jones, Perttunen & Stuckman 1993, "Lipschitzian optimization without the Lipschitz constant",
//! *J. Optimization Theory and Applications* 79, 157–181).
//!
//! What it is: the original algorithm — the box is scaled to the unit cube; each iteration divides
//! every *potentially optimal* hyperrectangle, i.e. those on the lower-right convex hull of
//! (centre-to-vertex distance, centre value) that pass the ε test, trisecting along all longest
//! sides in increasing order of w_i = min(f(c + δe_i), f(c − δe_i)). Sampling is everywhere dense,
//! so the global basin is found given enough evaluations. What it is not: a local optimiser (the
//! tuner follows it with [`super::polish`]), nor the locally biased variant (DIRECT-L).
//!
//! Shape: [`Direct`] holds the state; [`Direct::iterate`] performs one iteration; [`minimise`]
//! is the driver with an evaluation budget. Non-finite values are allowed (NaN counts as +∞):
//! such points never become the best, and for the hull they count as worse than any finite value.

/// Finest trisection level: 3⁻³⁴ ≈ 6e-17 is below the spacing of doubles on [0, 1], so
/// rectangles this small are never divided again.
const MAX_LEVEL: u8 = 34;

/// Why DIRECT could not start.
#[derive(Clone, Debug, PartialEq)]
pub enum DirectError {
    /// The bounds are empty, of different lengths, not finite, or not lower < upper.
    BadBounds,
    /// The evaluation budget is zero.
    NoBudget,
}

impl core::fmt::Display for DirectError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match self {
            DirectError::BadBounds => {
                write!(f, "the search box needs finite lower < upper bounds in at least one dimension")
            }
            DirectError::NoBudget => write!(f, "the evaluation budget must be at least one"),
        }
    }
}

impl std::error::Error for DirectError {}

/// The state of a DIRECT search: the hyperrectangles of the partition of the unit cube.
#[derive(Clone, Debug)]
pub struct Direct {
    dim: usize,
    lower: Vec<f64>,
    width: Vec<f64>,
    epsilon: f64,
    /// Centre of each rectangle in unit-cube coordinates, row-major.
    centres: Vec<f64>,
    /// Trisection count per side: side j of a rectangle is 3^(−level_j). Within a rectangle the
    /// levels differ by at most one (all longest sides are always trisected together).
    levels: Vec<u8>,
    values: Vec<f64>,
    best: usize,
    evaluations: usize,
    iterations: usize,
    /// Reused buffer for the point handed to the objective, in the caller's coordinates.
    point: Vec<f64>,
}

impl Direct {
    /// Start a search over the box [lower, upper] by evaluating `f` at its centre. `epsilon` is
    /// the ε of the potential-optimality test; Jones et al. (1993) use 1e-4 and report results
    /// insensitive over 1e-7 … 1e-3.
    pub fn new(
        lower: &[f64],
        upper: &[f64],
        epsilon: f64,
        f: &mut impl FnMut(&[f64]) -> f64,
    ) -> Result<Self, DirectError> {
        let good = !lower.is_empty()
            && lower.len() == upper.len()
            && lower.iter().zip(upper).all(|(a, b)| a.is_finite() && b.is_finite() && a < b)
            && upper.iter().zip(lower).all(|(b, a)| (b - a).is_finite());
        if !good {
            return Err(DirectError::BadBounds);
        }
        let dim = lower.len();
        let mut direct = Direct {
            dim,
            lower: lower.to_vec(),
            width: upper.iter().zip(lower).map(|(b, a)| b - a).collect(),
            epsilon: if epsilon.is_finite() { epsilon.max(0.0) } else { 0.0 },
            centres: vec![0.5; dim],
            levels: vec![0; dim],
            values: Vec::new(),
            best: 0,
            evaluations: 0,
            iterations: 0,
            point: vec![0.0; dim],
        };
        let centre = vec![0.5; dim];
        let value = direct.evaluate(&centre, f);
        direct.values.push(value);
        Ok(direct)
    }

    /// One DIRECT iteration: find the potentially optimal rectangles, then divide them (largest
    /// first) while the remaining `budget` of evaluations allows; a rectangle is never divided
    /// partly. Returns the number of evaluations made — 0 means nothing more can be done
    /// within the budget.
    pub fn iterate(&mut self, f: &mut impl FnMut(&[f64]) -> f64, budget: usize) -> usize {
        let before = self.evaluations;
        for rect in self.potentially_optimal() {
            let longest = self.levels[rect * self.dim..(rect + 1) * self.dim].iter().copied().min().unwrap_or(0);
            if longest >= MAX_LEVEL {
                continue;
            }
            let sides = self.levels[rect * self.dim..(rect + 1) * self.dim].iter().filter(|&&l| l == longest).count();
            if self.evaluations - before + 2 * sides > budget {
                break;
            }
            self.divide(rect, f);
        }
        self.iterations += 1;
        self.evaluations - before
    }

    /// The best point found (in the caller's coordinates) and its value.
    pub fn best(&self) -> (Vec<f64>, f64) {
        (self.to_box(self.best), self.values[self.best])
    }

    /// Half the side lengths of the rectangle around the best point, in the caller's units: the
    /// scale on which a local search from the best point should start.
    pub fn best_half_widths(&self) -> Vec<f64> {
        let levels = &self.levels[self.best * self.dim..(self.best + 1) * self.dim];
        levels.iter().zip(&self.width).map(|(&l, w)| 0.5 * w * libm::pow(3.0, -f64::from(l))).collect()
    }

    /// Evaluations so far.
    pub fn evaluations(&self) -> usize {
        self.evaluations
    }

    /// Iterations so far.
    pub fn iterations(&self) -> usize {
        self.iterations
    }

    fn to_box(&self, rect: usize) -> Vec<f64> {
        let c = &self.centres[rect * self.dim..(rect + 1) * self.dim];
        c.iter().zip(&self.lower).zip(&self.width).map(|((c, a), w)| a + c * w).collect()
    }

    /// Evaluate at unit-cube point `unit`; NaN becomes +∞.
    fn evaluate(&mut self, unit: &[f64], f: &mut impl FnMut(&[f64]) -> f64) -> f64 {
        for ((p, u), (a, w)) in self.point.iter_mut().zip(unit).zip(self.lower.iter().zip(&self.width)) {
            *p = a + u * w;
        }
        let value = f(&self.point);
        self.evaluations += 1;
        if value.is_nan() { f64::INFINITY } else { value }
    }

    /// Size class of a rectangle: with k its smallest level and m the number of sides at level
    /// k + 1, the class k·d + m grows as the rectangle shrinks, and rectangles of one class have
    /// equal centre-to-vertex distance.
    fn size_class(&self, rect: usize) -> usize {
        let levels = &self.levels[rect * self.dim..(rect + 1) * self.dim];
        let k = levels.iter().copied().min().unwrap_or(0);
        usize::from(k) * self.dim + levels.iter().filter(|&&l| l > k).count()
    }

    /// Centre-to-vertex distance of a size class, in unit-cube coordinates.
    fn class_distance(&self, class: usize) -> f64 {
        let (k, m) = (class / self.dim, class % self.dim);
        let side2 = libm::pow(9.0, -(k as f64));
        0.5 * ((self.dim - m) as f64 * side2 + m as f64 * side2 / 9.0).sqrt()
    }

    /// Indices of the potentially optimal rectangles, largest first (Jones et al. 1993, Lemma 2
    /// / Definition 2 as the lower-right convex hull, from memory).
    fn potentially_optimal(&self) -> Vec<usize> {
        // Non-finite values rank behind every finite one.
        let finite_max = self.values.iter().copied().filter(|v| v.is_finite()).fold(f64::NEG_INFINITY, f64::max);
        let finite_min = self.values.iter().copied().filter(|v| v.is_finite()).fold(f64::INFINITY, f64::min);
        let worse = if finite_max.is_finite() { finite_max + (finite_max - finite_min) + 1.0 } else { 0.0 };
        let value = |i: usize| if self.values[i].is_finite() { self.values[i] } else { worse };

        // Best value per size class, smallest rectangles first.
        let mut classes: Vec<(usize, f64)> = Vec::new();
        let mut class_of = Vec::with_capacity(self.values.len());
        for i in 0..self.values.len() {
            let class = self.size_class(i);
            class_of.push(class);
            match classes.iter_mut().find(|(c, _)| *c == class) {
                Some((_, best)) => *best = best.min(value(i)),
                None => classes.push((class, value(i))),
            }
        }
        classes.sort_by_key(|c| core::cmp::Reverse(c.0));
        let points: Vec<(f64, f64)> = classes.iter().map(|&(c, v)| (self.class_distance(c), v)).collect();

        // The hull starts at the largest rectangle holding the lowest value: a smaller one with
        // an equal or larger value cannot be potentially optimal for any K̃ > 0.
        let f_min = points.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
        let start = points.iter().rposition(|p| p.1 == f_min).unwrap_or(0);
        let mut hull: Vec<usize> = Vec::new();
        for j in start..points.len() {
            while hull.len() >= 2 {
                let (a, b) = (points[hull[hull.len() - 2]], points[hull[hull.len() - 1]]);
                let p = points[j];
                // Drop b when it lies strictly above the segment a–p; points on it stay.
                if (b.0 - a.0) * (p.1 - a.1) - (b.1 - a.1) * (p.0 - a.0) < 0.0 {
                    hull.pop();
                } else {
                    break;
                }
            }
            hull.push(j);
        }

        // ε test with the largest admissible rate of change K̃ (the slope to the next larger
        // hull point): f_j − K̃ d_j ≤ f_min − ε|f_min|. The largest rectangle always passes.
        let threshold = f_min - self.epsilon * f_min.abs();
        let mut chosen = Vec::new();
        for (h, &j) in hull.iter().enumerate().rev() {
            let (d, v) = points[j];
            let passes = match hull.get(h + 1) {
                None => true,
                Some(&next) => {
                    let (d2, v2) = points[next];
                    let rate = (v2 - v) / (d2 - d);
                    v - rate * d <= threshold
                }
            };
            if passes {
                let class = classes[j].0;
                chosen.extend((0..self.values.len()).filter(|&i| class_of[i] == class && value(i) == v));
            }
        }
        chosen
    }

    /// Trisect rectangle `rect` along all its longest sides, best direction first
    /// (Jones et al. 1993, "Procedure for dividing a hypercube", from memory).
    fn divide(&mut self, rect: usize, f: &mut impl FnMut(&[f64]) -> f64) {
        let d = self.dim;
        let longest = self.levels[rect * d..(rect + 1) * d].iter().copied().min().unwrap_or(0);
        let delta = libm::pow(3.0, -f64::from(longest + 1));
        let centre = self.centres[rect * d..(rect + 1) * d].to_vec();
        let mut trials: Vec<(usize, f64, f64)> = Vec::new();
        let mut probe = centre.clone();
        for i in 0..d {
            if self.levels[rect * d + i] != longest {
                continue;
            }
            probe[i] = centre[i] + delta;
            let up = self.evaluate(&probe, f);
            probe[i] = centre[i] - delta;
            let down = self.evaluate(&probe, f);
            probe[i] = centre[i];
            trials.push((i, up, down));
        }
        // Stable sort: ties keep the coordinate order.
        trials.sort_by(|a, b| a.1.min(a.2).total_cmp(&b.1.min(b.2)));
        for (i, up, down) in trials {
            self.levels[rect * d + i] += 1;
            for (offset, value) in [(delta, up), (-delta, down)] {
                let child = self.values.len();
                self.centres.extend_from_slice(&centre);
                self.centres[child * d + i] += offset;
                self.levels.extend_from_within(rect * d..(rect + 1) * d);
                self.values.push(value);
                if value < self.values[self.best] {
                    self.best = child;
                }
            }
        }
    }
}

/// Budget and ε for [`minimise`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DirectSettings {
    /// Evaluations of f, never exceeded.
    pub max_evaluations: usize,
    /// Iterations (each divides all potentially optimal rectangles).
    pub max_iterations: usize,
    /// ε of the potential-optimality test.
    pub epsilon: f64,
}

impl Default for DirectSettings {
    /// 1000 evaluations, no iteration limit, ε = 1e-4 as in Jones et al. (1993).
    fn default() -> Self {
        DirectSettings { max_evaluations: 1000, max_iterations: usize::MAX, epsilon: 1e-4 }
    }
}

/// Where [`minimise`] ended.
#[derive(Clone, Debug, PartialEq)]
pub struct DirectResult {
    pub x: Vec<f64>,
    pub value: f64,
    /// Half the sides of the rectangle around `x`: an uncertainty box for the minimiser.
    pub half_widths: Vec<f64>,
    pub evaluations: usize,
    pub iterations: usize,
}

/// Minimise `f` over [lower, upper] by DIRECT (Jones, Perttunen & Stuckman 1993) within the
/// settings' budget.
///
/// ```
/// use mixwell::tune::direct::{minimise, DirectSettings};
/// let settings = DirectSettings { max_evaluations: 300, ..DirectSettings::default() };
/// let r = minimise(|x| (x[0] - 0.3).powi(2) + (x[1] + 1.2).powi(2), &[-2.0, -2.0], &[2.0, 2.0], &settings).unwrap();
/// assert!(r.value < 1e-4 && r.evaluations <= 300);
/// ```
pub fn minimise(
    mut f: impl FnMut(&[f64]) -> f64,
    lower: &[f64],
    upper: &[f64],
    settings: &DirectSettings,
) -> Result<DirectResult, DirectError> {
    if settings.max_evaluations == 0 {
        return Err(DirectError::NoBudget);
    }
    let mut direct = Direct::new(lower, upper, settings.epsilon, &mut f)?;
    while direct.iterations() < settings.max_iterations && direct.evaluations() < settings.max_evaluations {
        if direct.iterate(&mut f, settings.max_evaluations - direct.evaluations()) == 0 {
            break;
        }
    }
    let (x, value) = direct.best();
    Ok(DirectResult {
        x,
        value,
        half_widths: direct.best_half_widths(),
        evaluations: direct.evaluations(),
        iterations: direct.iterations(),
    })
}
