//! What a user asks for — every option optional, as the command line's flags are — and the one
//! function that turns it into a run: [`Options::resolve`]. The command line maps its flags onto
//! [`Options`]; the page sends its form as the same object; a share link's run maps back onto it
//! ([`Options::from_config`]), so all three build runs, and comparisons of methods, the same way.

use super::{
    DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_PILOT, DEFAULT_WARMUP, MAX_ADAPT_STEPS, MAX_CHAINS, MAX_DRAWS, MAX_PILOT,
    MAX_TRIALS, MAX_WARMUP, MIN_DRAWS, Method, RunConfig, Tuning, WINDOW_RANGE, within,
};
use crate::kernel::{Kind, MAX_STEPOUT, Settings};
use crate::names::Named;
use crate::rng::Stream;
use crate::tune::policy::{BoConfig, Freeze};
use crate::tune::score::Score;
use serde::{Deserialize, Serialize};

crate::named! {
    /// The options of a run, by the name the command line's flag (`--NAME`) and the page's
    /// options object share.
    pub enum Opt: "option" {
        Sampler = "sampler",
        Scale = "scale",
        Blend = "blend",
        Width = "width",
        Stepout = "stepout",
        Tune = "tune",
        Score = "score",
        Trials = "trials",
        Window = "window",
        Freeze = "freeze",
        Chains = "chains",
        Warmup = "warmup",
        Draws = "draws",
        Pilot = "pilot",
        Seed = "seed",
        Compare = "compare",
    }
}

/// Why options or a configuration cannot make a run: the option at fault, when one is, and a
/// message that does not name it (each face names it its own way: `--chains`, "Chains").
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PlanError {
    pub option: Option<Opt>,
    pub message: String,
}

impl PlanError {
    pub fn of(option: Opt, message: String) -> PlanError {
        PlanError { option: Some(option), message }
    }
}

/// A run as a user asks for it. Every field may be left out; [`Options::resolve`] says what an
/// omitted one means. Counts are `u64` so that any whole number a face can hold arrives here and
/// is judged by the same rule.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Options {
    /// The kind of kernel [default: rwm].
    pub sampler: Option<Kind>,
    /// Random-walk scale [default: 2.38/√d].
    pub scale: Option<f64>,
    /// Random-walk blend of diagonal and full pilot covariance [default: 1].
    pub blend: Option<f64>,
    /// Slice width in pilot standard deviations [default: 3].
    pub width: Option<f64>,
    /// Slice step-out limit [default: 20].
    pub stepout: Option<u64>,
    /// [default: bo, or none when a kernel setting is given].
    pub tune: Option<Method>,
    /// [default: the kernel's, see [`Score::default_for`]].
    pub score: Option<Score>,
    /// Bayesian optimisation's trials [default: 100]; Robbins–Monro and adaptive Metropolis adapt
    /// for trials × window steps, the same budget.
    pub trials: Option<u64>,
    /// Steps per chain in each trial [default: 100].
    pub window: Option<u64>,
    /// [default: best].
    pub freeze: Option<Freeze>,
    pub chains: Option<u64>,
    pub warmup: Option<u64>,
    pub draws: Option<u64>,
    pub pilot: Option<u64>,
    /// [default: a fresh one].
    pub seed: Option<u64>,
}

impl Options {
    /// The validated run these options ask for, for a model with `dim` coordinates; an error
    /// names the option at fault.
    pub fn resolve(&self, dim: usize) -> Result<RunConfig, PlanError> {
        let kind = self.sampler.unwrap_or(Kind::RandomWalk);
        let foreign = match kind {
            Kind::RandomWalk => [(Opt::Width, self.width.is_some()), (Opt::Stepout, self.stepout.is_some())],
            Kind::Slice => [(Opt::Scale, self.scale.is_some()), (Opt::Blend, self.blend.is_some())],
        };
        if let Some((option, _)) = foreign.iter().find(|(_, given)| *given) {
            let (of, not_of) = match kind {
                Kind::RandomWalk => ("the slice sampler", "random-walk Metropolis"),
                Kind::Slice => ("random-walk Metropolis", "the slice sampler"),
            };
            return Err(PlanError::of(*option, format!("a setting of {of}, not of {not_of}")));
        }
        let own = self.scale.is_some() || self.blend.is_some() || self.width.is_some() || self.stepout.is_some();
        let method = self.tune.unwrap_or(if own { Method::None } else { Method::Bo });
        let mut settings = Settings::default_for(kind, dim);
        match &mut settings {
            Settings::RandomWalk { scale, blend } => {
                *scale = self.scale.unwrap_or(*scale);
                *blend = self.blend.unwrap_or(*blend);
            }
            Settings::Slice { width, stepout } => {
                *width = self.width.unwrap_or(*width);
                if let Some(limit) = self.stepout {
                    *stepout = u32::try_from(limit).ok().filter(|s| *s <= MAX_STEPOUT).ok_or_else(|| {
                        PlanError::of(
                            Opt::Stepout,
                            format!("the step-out limit must be a whole number from 1 to {MAX_STEPOUT}, not {limit}"),
                        )
                    })?;
                }
            }
            Settings::Mixture { .. } => {}
        }
        let defaults = BoConfig::default();
        let trials = self.trials.unwrap_or(defaults.trials as u64);
        let window = self.window.unwrap_or(defaults.window as u64);
        let tuning = match method {
            Method::None => Tuning::None,
            Method::Bo => Tuning::Bo(BoConfig {
                score: self.score.unwrap_or(Score::default_for(kind)),
                trials: within(Opt::Trials, "the number of tuning trials", trials, (1, MAX_TRIALS))?,
                window: within(Opt::Window, "the steps per tuning trial", window, WINDOW_RANGE)?,
                freeze: self.freeze.unwrap_or(defaults.freeze),
            }),
            Method::Rm | Method::Am => {
                within(Opt::Trials, "the number of trials", trials, (1, MAX_ADAPT_STEPS))?;
                within(Opt::Window, "the steps per trial", window, (1, MAX_ADAPT_STEPS))?;
                let steps = within(
                    Opt::Trials,
                    "the number of adaptation steps (trials × steps per trial)",
                    trials.saturating_mul(window),
                    (1, MAX_ADAPT_STEPS),
                )?;
                if method == Method::Rm { Tuning::Rm { steps } } else { Tuning::Am { steps } }
            }
        };
        let count = |option: Opt, value: Option<u64>, default: usize, what: &str, range: (usize, usize)| {
            within(option, what, value.unwrap_or(default as u64), range)
        };
        let config = RunConfig {
            chains: count(Opt::Chains, self.chains, DEFAULT_CHAINS, "the number of chains", (1, MAX_CHAINS))?,
            warmup: count(Opt::Warmup, self.warmup, DEFAULT_WARMUP, "the number of warm-up steps", (0, MAX_WARMUP))?,
            draws: count(
                Opt::Draws,
                self.draws,
                DEFAULT_DRAWS,
                "the number of draws per chain",
                (MIN_DRAWS, MAX_DRAWS),
            )?,
            pilot: count(Opt::Pilot, self.pilot, DEFAULT_PILOT, "the number of pilot sweeps", (0, MAX_PILOT))?,
            seed: self.seed.unwrap_or_else(Stream::entropy_seed),
            settings,
            tuning,
        };
        config.validate()?;
        Ok(config)
    }

    /// Options that resolve to exactly `config` for a model with `dim` coordinates, or `None`
    /// for a mixture of kernels, which no option can ask for. Settings equal to the kernel's
    /// defaults and a score equal to the kernel's default are left out, as a user would leave
    /// them; without a dimension (a model that does not read) the settings are always given.
    /// An adaptation budget of S steps becomes trials × window with the largest window up to the
    /// default that divides S (the trials × window of the options that made it are not in the
    /// configuration), so a comparison made from a link spends the same budget.
    pub fn from_config(config: &RunConfig, dim: Option<usize>) -> Option<Options> {
        let kind = config.kind()?;
        let mut options = Options {
            sampler: Some(kind),
            tune: Some(config.tuning.method()),
            chains: Some(config.chains as u64),
            warmup: Some(config.warmup as u64),
            draws: Some(config.draws as u64),
            pilot: Some(config.pilot as u64),
            seed: Some(config.seed),
            ..Options::default()
        };
        if dim.is_none_or(|dim| config.settings != Settings::default_for(kind, dim)) {
            match config.settings {
                Settings::RandomWalk { scale, blend } => (options.scale, options.blend) = (Some(scale), Some(blend)),
                Settings::Slice { width, stepout } => {
                    (options.width, options.stepout) = (Some(width), Some(u64::from(stepout)));
                }
                Settings::Mixture { .. } => return None,
            }
        }
        match &config.tuning {
            Tuning::None => {}
            Tuning::Bo(bo) => {
                options.trials = Some(bo.trials as u64);
                options.window = Some(bo.window as u64);
                options.score = (bo.score != Score::default_for(kind)).then_some(bo.score);
                options.freeze = Some(bo.freeze);
            }
            Tuning::Rm { steps } | Tuning::Am { steps } => {
                let default = BoConfig::default().window;
                let window = (WINDOW_RANGE.0..=default.min(*steps)).rev().find(|w| steps % w == 0).unwrap_or(1);
                options.trials = Some((steps / window) as u64);
                options.window = Some(window as u64);
            }
        }
        Some(options)
    }

    /// The defaults written out where they do not depend on the model, as a form shows them
    /// before any change: a random walk tuned by Bayesian optimisation, its budget, the run's
    /// size. (The kernel's settings and the score depend on the model or the kernel.)
    pub fn standard() -> Options {
        let bo = BoConfig::default();
        Options {
            sampler: Some(Kind::RandomWalk),
            tune: Some(Method::Bo),
            trials: Some(bo.trials as u64),
            window: Some(bo.window as u64),
            freeze: Some(bo.freeze),
            chains: Some(DEFAULT_CHAINS as u64),
            warmup: Some(DEFAULT_WARMUP as u64),
            draws: Some(DEFAULT_DRAWS as u64),
            pilot: Some(DEFAULT_PILOT as u64),
            ..Options::default()
        }
    }

    /// Whether any option was given.
    pub fn any(&self) -> bool {
        *self != Options::default()
    }
}

/// The runs a request makes: one, or with a comparison one per tuning method that applies to
/// the kernel, each with the same budget, seed and everything else; `chosen` is the run whose
/// report carries the comparison.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Plan {
    pub runs: Vec<RunConfig>,
    pub chosen: usize,
}

impl Plan {
    /// The runs `options` ask for, for a model with `dim` coordinates.
    pub fn new(options: &Options, dim: usize, compare: bool) -> Result<Plan, PlanError> {
        let config = options.resolve(dim)?;
        if !compare {
            return Ok(Plan { runs: vec![config], chosen: 0 });
        }
        let kind = config.kind().unwrap_or(Kind::RandomWalk);
        let fixed = Options { seed: Some(config.seed), ..options.clone() };
        let mut plan = Plan { runs: Vec::new(), chosen: 0 };
        for &method in Method::ALL.iter().filter(|m| m.applies_to(kind)) {
            if method == config.tuning.method() {
                plan.chosen = plan.runs.len();
                plan.runs.push(config.clone());
            } else {
                plan.runs.push(Options { tune: Some(method), ..fixed.clone() }.resolve(dim)?);
            }
        }
        Ok(plan)
    }

    /// The runs for a configuration made elsewhere (a share link), with a comparison made as
    /// for the options that give that configuration.
    pub fn of_config(config: RunConfig, dim: usize, compare: bool) -> Result<Plan, PlanError> {
        config.validate()?;
        if !compare {
            return Ok(Plan { runs: vec![config], chosen: 0 });
        }
        let options = Options::from_config(&config, Some(dim)).ok_or_else(|| {
            PlanError::of(
                Opt::Compare,
                "a given mixture of kernels cannot be compared with the tuning methods, which tune one kernel".into(),
            )
        })?;
        Plan::new(&options, dim, true)
    }

    /// The run whose report carries the comparison.
    pub fn config(&self) -> &RunConfig {
        &self.runs[self.chosen]
    }
}
