//! The tuning policy: which kernel settings to try, in what order, and what to freeze.
//!
//! Settings live on the unit square (a [`Space`]); each trial runs every chain for one window
//! with one setting and is judged by a [`Score`]. After a few space-filling trials, a Gaussian
//! process fitted to the scores proposes the setting of largest expected improvement (Jones,
//! Schonlau & Welch 1998). When the budget is spent the kernel is frozen — at the best setting
//! by the surrogate mean, or as a fixed mixture of good settings — so that sampling afterwards is
//! plain MCMC with an invariant kernel.

use super::acquisition::log_expected_improvement;
use super::gp::{self, FitSettings, Gp, Hyperparameters, Kernel as Covariance};
use super::polish::{BoxSearch, compass_search, maximise_on_box};
use super::score::{Score, Window};
use crate::kernel::{Geometry, Kind, Settings};
use crate::rng::Stream;
use serde::{Deserialize, Serialize};

/// How far around its default the random-walk scale is searched: a factor this large each way.
const SCALE_RANGE: f64 = 10.0;
/// Slice widths searched, in pilot standard deviations.
const WIDTH_RANGE: (f64, f64) = (0.1, 30.0);
/// Largest step-out limit searched.
const MAX_SEARCHED_STEPOUT: f64 = 100.0;
/// Trials placed by a Latin hypercube before the surrogate takes over.
const INITIAL_DESIGN: usize = 6;
/// A full multi-start refit of the surrogate every this many trials; warm refits otherwise.
const FULL_REFIT_EVERY: usize = 10;
/// Points of the surrogate grid along each axis, for plots.
const GRID: usize = 25;

crate::named! {
    /// How the kernel is frozen after tuning.
    pub enum Freeze: "way of freezing" {
        /// The setting with the best surrogate mean.
        Best = "best",
        /// A fixed mixture of good settings, weighted by exp(surrogate mean / temperature).
        Mixture = "mixture",
    }
}

/// The Bayesian-optimisation budget and choices.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BoConfig {
    pub score: Score,
    pub trials: usize,
    /// Steps per chain in each trial.
    pub window: usize,
    pub freeze: Freeze,
}

impl Default for BoConfig {
    fn default() -> Self {
        BoConfig { score: Score::EssPerEval, trials: 100, window: 100, freeze: Freeze::Best }
    }
}

/// The square of settings one kernel is tuned over.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kernel", rename_all = "snake_case")]
pub enum Space {
    /// x₀: log scale, from base/10 to base·10; x₁: the blend between diagonal and full covariance.
    RandomWalk { base_scale: f64 },
    /// x₀: log width from 0.1 to 30 pilot sds; x₁: log step-out limit from 1 to 100.
    Slice,
}

/// One axis of a [`Space`], for reports and plots.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Axis {
    pub name: &'static str,
    pub low: f64,
    pub high: f64,
    pub log_scale: bool,
}

impl Space {
    /// The square a kernel of `kind` is tuned over, for a model with `dim` coordinates.
    pub fn for_kind(kind: Kind, dim: usize) -> Space {
        match kind {
            Kind::Slice => Space::Slice,
            Kind::RandomWalk => Space::RandomWalk { base_scale: 2.38 / (dim.max(1) as f64).sqrt() },
        }
    }

    pub fn settings(self, x: &[f64]) -> Settings {
        let log_between = |t: f64, lo: f64, hi: f64| libm::exp(libm::log(lo) + t * (libm::log(hi) - libm::log(lo)));
        match self {
            Space::RandomWalk { base_scale } => Settings::RandomWalk {
                scale: log_between(x[0], base_scale / SCALE_RANGE, base_scale * SCALE_RANGE),
                blend: x[1].clamp(0.0, 1.0),
            },
            Space::Slice => Settings::Slice {
                width: log_between(x[0], WIDTH_RANGE.0, WIDTH_RANGE.1),
                stepout: libm::round(log_between(x[1], 1.0, MAX_SEARCHED_STEPOUT)) as u32,
            },
        }
    }

    pub fn axes(self) -> [Axis; 2] {
        match self {
            Space::RandomWalk { base_scale } => [
                Axis { name: "scale", low: base_scale / SCALE_RANGE, high: base_scale * SCALE_RANGE, log_scale: true },
                Axis { name: "blend", low: 0.0, high: 1.0, log_scale: false },
            ],
            Space::Slice => [
                Axis { name: "width", low: WIDTH_RANGE.0, high: WIDTH_RANGE.1, log_scale: true },
                Axis { name: "stepout", low: 1.0, high: MAX_SEARCHED_STEPOUT, log_scale: true },
            ],
        }
    }
}

/// One tried setting and how it scored.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Trial {
    /// Position on the unit square.
    pub x: Vec<f64>,
    pub settings: Settings,
    pub score: f64,
    pub evaluations: u64,
}

/// The fitted surrogate, for the report: hyperparameters and its mean and sd on a grid.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Surrogate {
    pub kernel: &'static str,
    pub signal_variance: f64,
    pub length_scales: Vec<f64>,
    pub noise_variance: f64,
    /// Grid positions on each axis of the unit square (the same for both).
    pub grid: Vec<f64>,
    /// Mean and sd of the score, row-major: `mean[i * n + j]` at (grid[i], grid[j]).
    pub mean: Vec<f64>,
    pub sd: Vec<f64>,
}

/// The Bayesian-optimisation tuner: a step function the conductor calls once per trial.
#[derive(Clone, Debug)]
pub struct Tuner {
    config: BoConfig,
    space: Space,
    rng: Stream,
    design: Vec<Vec<f64>>,
    trials: Vec<Trial>,
    pending: Option<Vec<f64>>,
    surrogate: Option<Gp>,
}

impl Tuner {
    pub fn new(config: BoConfig, space: Space, seed: u64) -> Self {
        let mut rng = Stream::new(seed, u64::MAX);
        let design = latin_hypercube(INITIAL_DESIGN.min(config.trials), 2, &mut rng);
        Tuner { config, space, rng, design, trials: Vec::new(), pending: None, surrogate: None }
    }

    pub fn space(&self) -> Space {
        self.space
    }

    pub fn config(&self) -> &BoConfig {
        &self.config
    }

    /// Settings for the next trial, or `None` when the budget is spent.
    pub fn propose(&mut self) -> Option<Settings> {
        if self.trials.len() >= self.config.trials {
            return None;
        }
        let x = match self.design.get(self.trials.len()) {
            Some(x) => x.clone(),
            None => self.most_promising(),
        };
        let settings = self.space.settings(&x);
        self.pending = Some(x);
        Some(settings)
    }

    /// Record what the chains did in the trial last proposed (scored against the pilot's
    /// `geometry`) and refit the surrogate.
    pub fn observe(&mut self, window: &Window, geometry: &Geometry) {
        let Some(x) = self.pending.take() else { return };
        let score = self.config.score.of(window, geometry);
        self.trials.push(Trial { settings: self.space.settings(&x), x, score, evaluations: window.evaluations });
        if self.trials.len() >= self.design.len() {
            self.refit();
        }
    }

    fn refit(&mut self) {
        let x: Vec<f64> = self.trials.iter().flat_map(|t| t.x.iter().copied()).collect();
        let y: Vec<f64> = self.trials.iter().map(|t| t.score).collect();
        let full = self.surrogate.is_none() || self.trials.len().is_multiple_of(FULL_REFIT_EVERY);
        let settings = FitSettings {
            starts: if full { 5 } else { 1 },
            seed: self.trials.len() as u64,
            initial: self.surrogate.as_ref().map(|g| g.hyperparameters().clone()),
            ..FitSettings::default()
        };
        if let Ok(fitted) = gp::fit(Covariance::Matern52, 2, &x, &y, &settings) {
            self.surrogate = Some(fitted);
        }
    }

    /// The point of largest expected improvement over the best surrogate mean at a tried point
    /// (the incumbent under noise), or a random point if there is no surrogate.
    fn most_promising(&mut self) -> Vec<f64> {
        let Some(surrogate) = &self.surrogate else {
            return vec![self.rng.uniform(), self.rng.uniform()];
        };
        let incumbent = self.trials.iter().map(|t| surrogate.predict(&t.x).mean).fold(f64::NEG_INFINITY, f64::max);
        let search = BoxSearch { global_evaluations: 300, local_evaluations: 100, tolerance: 1e-4 };
        let acquisition = |x: &[f64]| {
            let p = surrogate.predict(x);
            log_expected_improvement(p.mean, p.latent_variance.max(0.0).sqrt(), incumbent, 0.0)
        };
        match maximise_on_box(acquisition, 2, &search) {
            Ok(best) if best.value > f64::NEG_INFINITY => best.x,
            _ => vec![self.rng.uniform(), self.rng.uniform()],
        }
    }

    /// The frozen kernel: the best setting by surrogate mean, or a fixed mixture of good ones.
    /// Without a surrogate (too few trials), the best trial.
    pub fn freeze(&mut self) -> Settings {
        let best_trial = || self.trials.iter().max_by(|a, b| a.score.total_cmp(&b.score)).map(|t| t.x.clone());
        let Some(surrogate) = self.surrogate.clone() else {
            return self.space.settings(&best_trial().unwrap_or_else(|| vec![0.5, 0.5]));
        };
        let mean = |x: &[f64]| surrogate.predict(x).mean;
        match self.config.freeze {
            Freeze::Best => {
                let search = BoxSearch { global_evaluations: 400, local_evaluations: 200, tolerance: 1e-6 };
                let x = maximise_on_box(mean, 2, &search).map(|b| b.x).unwrap_or_else(|_| vec![0.5, 0.5]);
                self.space.settings(&x)
            }
            Freeze::Mixture => self.mixture(&surrogate),
        }
    }

    /// Candidates from local maximisation of the surrogate mean from many starts, with a little
    /// local exploration around each, resampled with weights exp(mean / T) where T is the
    /// surrogate's noise sd (differences smaller than the noise are not real); the distinct
    /// survivors become the mixture, weighted by how often they were drawn.
    fn mixture(&mut self, surrogate: &Gp) -> Settings {
        let mean = |x: &[f64]| surrogate.predict(x).mean;
        let mut candidates: Vec<Vec<f64>> = Vec::new();
        let starts: Vec<Vec<f64>> = self
            .trials
            .iter()
            .map(|t| t.x.clone())
            .chain((0..8).map(|_| vec![self.rng.uniform(), self.rng.uniform()]))
            .collect();
        for start in starts {
            let local = compass_search(|x| -mean(x), &start, &[0.0; 2], &[1.0; 2], 0.1, 1e-4, 200);
            if candidates.iter().all(|c| distance(c, &local.x) > 0.02) {
                candidates.push(local.x);
            }
        }
        let explored: Vec<Vec<f64>> = candidates
            .iter()
            .flat_map(|c| {
                let mut around = vec![c.clone()];
                for _ in 0..3 {
                    around.push(c.iter().map(|v| (v + 0.05 * self.rng.normal()).clamp(0.0, 1.0)).collect());
                }
                around
            })
            .collect();
        let temperature = surrogate.hyperparameters().noise_variance.sqrt().max(1e-6);
        let scores: Vec<f64> = explored.iter().map(|x| mean(x) / temperature).collect();
        let top = scores.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let weights: Vec<f64> = scores.iter().map(|s| libm::exp(s - top)).collect();
        let total: f64 = weights.iter().sum();
        let mut counts = vec![0usize; explored.len()];
        for _ in 0..MIXTURE_DRAWS {
            let mut u = self.rng.uniform() * total;
            let pick = weights.iter().position(|w| {
                u -= w;
                u < 0.0
            });
            counts[pick.unwrap_or(weights.len() - 1)] += 1;
        }
        let components: Vec<(Settings, f64)> = explored
            .iter()
            .zip(&counts)
            .filter(|(_, c)| **c > 0)
            .map(|(x, c)| (self.space.settings(x), *c as f64))
            .collect();
        match components.as_slice() {
            [(only, _)] => only.clone(),
            _ => Settings::Mixture { components },
        }
    }

    pub fn trials(&self) -> &[Trial] {
        &self.trials
    }

    /// The surrogate for the report, if one was fitted.
    pub fn surrogate(&self) -> Option<Surrogate> {
        let gp = self.surrogate.as_ref()?;
        let grid: Vec<f64> = (0..GRID).map(|i| i as f64 / (GRID - 1) as f64).collect();
        let points: Vec<f64> = grid.iter().flat_map(|&a| grid.iter().flat_map(move |&b| [a, b])).collect();
        let predictions = gp.predict_points(&points);
        let Hyperparameters { signal_variance, length_scales, noise_variance } = gp.hyperparameters().clone();
        Some(Surrogate {
            kernel: "matern52",
            signal_variance,
            length_scales,
            noise_variance,
            mean: predictions.iter().map(|p| p.mean).collect(),
            sd: predictions.iter().map(|p| p.latent_variance.max(0.0).sqrt()).collect(),
            grid,
        })
    }
}

/// Draws from the weights when forming a mixture.
const MIXTURE_DRAWS: usize = 8;

fn distance(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt()
}

/// `n` points in [0, 1]^`dim`, one in each of n equal slices along every axis (McKay, Beckman &
/// Conover 1979), jittered within their cells.
fn latin_hypercube(n: usize, dim: usize, rng: &mut Stream) -> Vec<Vec<f64>> {
    let mut columns: Vec<Vec<usize>> = Vec::with_capacity(dim);
    for _ in 0..dim {
        let mut order: Vec<usize> = (0..n).collect();
        for i in (1..n).rev() {
            order.swap(i, rng.below(i as u64 + 1) as usize);
        }
        columns.push(order);
    }
    (0..n).map(|i| columns.iter().map(|c| (c[i] as f64 + rng.uniform()) / n as f64).collect()).collect()
}
