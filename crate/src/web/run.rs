//! Runs in the browser: the same [`Chain`]s and [`Conductor`] as the command line, split across
//! Web Workers. Each chain lives in a [`ChainEngine`] in a worker; the run's plan lives in a
//! [`RunEngine`] in another; the page only carries their messages. Configurations, tasks and
//! reports are plain objects; recorded draws travel as `Float64Array`s.

use crate::chain::conductor::{Collected, Conductor, MAX_SEED, RunConfig, Tuning};
use crate::chain::{Chain, Outcome, Task};
use crate::kernel::Settings;
use crate::link::{self, Shared};
use crate::report::{self, Comparison, Report};
use crate::tape::Tape;
use serde::{Deserialize, Serialize};
use wasm_bindgen::prelude::*;

/// Draws a page may hold: above this many bytes a run is refused before it starts.
pub const MAX_PAGE_DRAW_BYTES: f64 = 1.0 * (1u64 << 30) as f64;

fn to_js<T: Serialize>(value: &T) -> Result<JsValue, JsError> {
    Ok(value.serialize(&serde_wasm_bindgen::Serializer::json_compatible())?)
}

fn compile(source: &str) -> Result<Tape, JsError> {
    let model = crate::model::check(source).map_err(|d| JsError::new(&d.render("model", source)))?;
    Ok(Tape::new(&model))
}

/// An [`Outcome`] with its rows as a `Float64Array`, for `postMessage`.
#[derive(Serialize, Deserialize)]
struct PageOutcome {
    chain: usize,
    #[serde(with = "serde_wasm_bindgen::preserve")]
    rows: js_sys::Float64Array,
    steps: usize,
    evaluations: u64,
    proposals: u64,
    moves: u64,
}

/// One chain of a run.
#[wasm_bindgen]
pub struct ChainEngine {
    tape: Tape,
    chain: Chain,
}

#[wasm_bindgen]
impl ChainEngine {
    /// Chain `index` of the run of `source` seeded by `seed`.
    #[wasm_bindgen(constructor)]
    pub fn new(source: &str, seed: f64, index: usize) -> Result<ChainEngine, JsError> {
        let tape = compile(source)?;
        let chain = Chain::new(&tape, seed_from(seed)?, index).map_err(|e| JsError::new(&e))?;
        Ok(ChainEngine { tape, chain })
    }

    /// Do a task from [`RunEngine::next_task`]; the answer goes to [`RunEngine::absorb`].
    pub fn perform(&mut self, task: JsValue) -> Result<JsValue, JsError> {
        let task: Task = serde_wasm_bindgen::from_value(task)?;
        let o = self.chain.perform(&self.tape, &task);
        let rows = js_sys::Float64Array::from(o.rows.as_slice());
        let page = PageOutcome {
            chain: o.chain,
            rows,
            steps: o.steps,
            evaluations: o.evaluations,
            proposals: o.proposals,
            moves: o.moves,
        };
        to_js(&page)
    }
}

/// Seeds cross into JavaScript as numbers, which hold whole numbers exactly below 2⁵³.
fn seed_from(seed: f64) -> Result<u64, JsError> {
    if seed.fract() == 0.0 && (0.0..=MAX_SEED as f64).contains(&seed) {
        Ok(seed as u64)
    } else {
        Err(JsError::new(&format!("the seed must be a whole number from 0 to 2^53 − 1, not {seed}")))
    }
}

/// The plan of one run: hands out tasks for the chains and builds the report.
#[wasm_bindgen]
pub struct RunEngine {
    tape: Tape,
    conductor: Option<Conductor>,
    method: &'static str,
    finished: Option<(Collected, Report)>,
    lags: usize,
}

#[wasm_bindgen]
impl RunEngine {
    /// A run of `source` as `config` (a run configuration object) says, reporting
    /// autocorrelation to lag `lags`; refused when the configuration is invalid or its draws
    /// would not fit in a page's memory.
    #[wasm_bindgen(constructor)]
    pub fn new(source: &str, config: JsValue, lags: usize) -> Result<RunEngine, JsError> {
        let tape = compile(source)?;
        let config: RunConfig = serde_wasm_bindgen::from_value(config)?;
        config.validate().map_err(|e| JsError::new(&e))?;
        let bytes = config.draw_bytes(tape.columns().len());
        if bytes > MAX_PAGE_DRAW_BYTES {
            return Err(JsError::new(&format!(
                "this run would hold about {:.1} GiB of draws; a page can hold at most {:.0} GiB — use fewer draws or chains, or the command line",
                bytes / (1u64 << 30) as f64,
                MAX_PAGE_DRAW_BYTES / (1u64 << 30) as f64
            )));
        }
        let method = config.tuning.name();
        let conductor = Conductor::new(config, tape.dim());
        Ok(RunEngine { tape, conductor: Some(conductor), method, finished: None, lags })
    }

    /// The next task for every chain, or `null` when the run is complete.
    pub fn next_task(&mut self) -> Result<JsValue, JsError> {
        match self.conductor.as_mut().and_then(Conductor::next_task) {
            Some(task) => to_js(&task),
            None => Ok(JsValue::NULL),
        }
    }

    /// The chains' answers to the last task, one per chain.
    pub fn absorb(&mut self, outcomes: JsValue) -> Result<(), JsError> {
        let page: Vec<PageOutcome> = serde_wasm_bindgen::from_value(outcomes)?;
        let outcomes = page
            .into_iter()
            .map(|o| Outcome {
                chain: o.chain,
                rows: o.rows.to_vec(),
                steps: o.steps,
                evaluations: o.evaluations,
                proposals: o.proposals,
                moves: o.moves,
            })
            .collect();
        if let Some(conductor) = self.conductor.as_mut() {
            conductor.absorb(outcomes);
        }
        Ok(())
    }

    /// `{ phase, done, total }`, or `null` once finished.
    pub fn progress(&self) -> Result<JsValue, JsError> {
        match &self.conductor {
            Some(c) => to_js(&c.progress()),
            None => Ok(JsValue::NULL),
        }
    }

    /// End the run — complete, or cut short by a cancel — and report it. `seconds` is how long
    /// sampling took (for the comparison line only). Returns `{ report, json, csv, columns,
    /// draws, comparison }`: the report object; `json` and `csv`, the exact texts the command
    /// line writes; `draws`, one `Float64Array` per chain (rows of `columns`); and this run's
    /// line for a comparison of methods.
    pub fn finish(&mut self, seconds: f64) -> Result<JsValue, JsError> {
        let conductor = self.conductor.take().ok_or_else(|| JsError::new("the run has already finished"))?;
        let collected = conductor.finish();
        let report = Report::new(&collected, self.tape.columns(), self.tape.dim(), self.lags);
        let comparison = Comparison::of(self.method, &report, seconds);
        let draws = collected.draws.iter().map(|d| JsValue::from(js_sys::Float64Array::from(d.as_slice()))).collect();
        let out = to_js(&Finished {
            json: serde_json::to_string_pretty(&report)? + "\n",
            csv: report::csv(&collected, self.tape.columns()),
            report: &report,
            columns: self.tape.columns(),
            draws,
            comparison: Some(&comparison),
        })?;
        self.finished = Some((collected, report));
        Ok(out)
    }

    /// Put the comparison of methods (the `comparison` lines of every run compared, in order)
    /// into this finished run's report; returns `{ report, json }` again.
    pub fn attach_comparison(&mut self, rows: JsValue) -> Result<JsValue, JsError> {
        let rows: Vec<Comparison> = serde_wasm_bindgen::from_value(rows)?;
        let (_, report) = self.finished.as_mut().ok_or_else(|| JsError::new("the run has not finished"))?;
        report.comparison = Some(rows);
        to_js(&Attached { json: serde_json::to_string_pretty(&*report)? + "\n", report })
    }
}

#[derive(Serialize)]
struct Finished<'a> {
    report: &'a Report,
    json: String,
    csv: String,
    columns: &'a [String],
    #[serde(with = "serde_wasm_bindgen::preserve")]
    draws: js_sys::Array,
    comparison: Option<&'a Comparison>,
}

#[derive(Serialize)]
struct Attached<'a> {
    report: &'a Report,
    json: String,
}

/// The run configuration the command line would use for `source` with no options but `kind`
/// (`"rwm"` or `"slice"`), `tune` (`"bo"`, `"rm"`, `"am"` or `"none"`) and `seed`.
#[wasm_bindgen]
pub fn default_config(source: &str, kind: &str, tune: &str, seed: f64) -> Result<JsValue, JsError> {
    let tape = compile(source)?;
    let config = RunConfig::default_for(kind, tune, tape.dim(), seed_from(seed)?).map_err(|e| JsError::new(&e))?;
    to_js(&config)
}

/// A kernel's settings in words, as the command line prints them ("random-walk Metropolis,
/// scale 0.8400, blend 1.000").
#[wasm_bindgen]
pub fn describe_settings(settings: JsValue) -> Result<String, JsError> {
    let settings: Settings = serde_wasm_bindgen::from_value(settings)?;
    Ok(settings.describe())
}

/// Every tuning method that applies to `config`'s kernel, with its budget: the runs a
/// comparison makes, as configurations.
#[wasm_bindgen]
pub fn comparison_configs(config: JsValue) -> Result<JsValue, JsError> {
    let config: RunConfig = serde_wasm_bindgen::from_value(config)?;
    let bo = match &config.tuning {
        Tuning::Bo(bo) => bo.clone(),
        _ => crate::tune::policy::BoConfig {
            score: crate::tune::score::Score::default_for(&config.settings),
            ..Default::default()
        },
    };
    let runs: Vec<RunConfig> = Tuning::alternatives(&config.settings, &bo)
        .into_iter()
        .map(|tuning| RunConfig { tuning, ..config.clone() })
        .collect();
    to_js(&runs)
}

/// The link to `page` that carries `source` and `config`.
#[wasm_bindgen]
pub fn make_link(source: &str, config: JsValue, page: &str) -> Result<String, JsError> {
    let run: RunConfig = serde_wasm_bindgen::from_value(config)?;
    run.validate().map_err(|e| JsError::new(&e))?;
    link::encode(&Shared { model: source.to_string(), run }, page).map_err(|e| JsError::new(&e.0))
}

/// What a link carries: `{ model, run }`, or an error saying what is wrong with it.
#[wasm_bindgen]
pub fn read_link(link: &str) -> Result<JsValue, JsError> {
    let shared = link::decode(link).map_err(|e| JsError::new(&e.0))?;
    to_js(&shared)
}
