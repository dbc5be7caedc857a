//! Runs in the browser: the same [`Chain`]s and [`Conductor`] as the command line, split across
//! Web Workers. Each chain lives in a [`ChainEngine`] in a worker; the run's plan lives in a
//! [`RunEngine`] in another; the page only carries their messages. Configurations, tasks and
//! reports are plain objects; recorded draws travel as `Float64Array`s.

use crate::chain::conductor::{Collected, Conductor};
use crate::chain::{Chain, Outcome, Task};
use crate::kernel::{Kind, Settings};
use crate::link::{self, Shared};
use crate::plan::memory::size;
use crate::plan::{Estimate, Face, MAX_SEED, Method, Opt, Options, Plan, PlanError, RunConfig, Shape};
use crate::report::{self, Comparison, Report};
use crate::tape::Tape;
use serde::{Deserialize, Serialize};
use wasm_bindgen::prelude::*;

/// Memory a page may use for one run (or one comparison of runs), at its peak: beyond it a run
/// is refused before it starts. A browser tab holds a few GiB, each engine worker at most 4 GiB,
/// and JavaScript's strings (the CSV of the draws) at most about 512 million characters.
pub const MAX_PAGE_BYTES: f64 = (1u64 << 30) as f64;

/// Why `plan` cannot run in a page, if it cannot, naming the option that makes it smaller.
fn page_memory(plan: &Plan, shape: Shape) -> Result<(), PlanError> {
    Estimate::of_plan(plan, shape, Face::Page).check(MAX_PAGE_BYTES).map_err(|too_large| {
        let option = too_large.part.lowered_by;
        let fewer = match option {
            Opt::Chains => "fewer chains",
            Opt::Draws => "fewer draws",
            Opt::Window => "fewer steps per trial",
            Opt::Trials => "fewer trials",
            _ => "a smaller run",
        };
        PlanError::of(
            option,
            format!(
                "{}; use {fewer}, or the command line",
                too_large.message(&format!("the {} a page can hold", size(MAX_PAGE_BYTES)))
            ),
        )
    })
}

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
    method: Method,
    finished: Option<(Collected, Report)>,
    lags: usize,
}

#[wasm_bindgen]
impl RunEngine {
    /// A run of `source` as `config` (a run configuration object) says, reporting
    /// autocorrelation to lag `lags`; refused, before anything is allocated for it, when the
    /// configuration is invalid or the run would not fit in a page's memory.
    #[wasm_bindgen(constructor)]
    pub fn new(source: &str, config: JsValue, lags: usize) -> Result<RunEngine, JsError> {
        let tape = compile(source)?;
        let config: RunConfig = serde_wasm_bindgen::from_value(config)?;
        let plan = Plan::of_config(config, tape.dim(), false).map_err(|e| JsError::new(&e.message))?;
        page_memory(&plan, Shape::of(&tape)).map_err(|e| JsError::new(&e.message))?;
        let config = plan.runs.into_iter().next().ok_or_else(|| JsError::new("no run to make"))?;
        let method = config.tuning.method();
        let conductor = Conductor::new(config, Shape::of(&tape));
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

/// What the page asks for: its form as run options, or a configuration from a link that the
/// form cannot hold; and whether to compare the tuning methods.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct Request {
    #[serde(default)]
    options: Option<Options>,
    #[serde(default)]
    config: Option<RunConfig>,
    #[serde(default)]
    compare: bool,
}

/// The answer of [`plan_run`].
#[derive(Serialize)]
#[serde(untagged)]
enum Planned {
    Ok { ok: bool, config: RunConfig, runs: Vec<RunConfig>, chosen: usize },
    Err { ok: bool, option: Option<Opt>, message: String },
}

/// The runs the page's request `{ options, compare }` (or `{ config, compare }`) makes for
/// `source` — built by the same function as the command line's (see `plan`): `{ ok: true,
/// config, runs, chosen }`, where `runs` are all the runs of a comparison (or just `config`)
/// and `runs[chosen]` is `config`; or `{ ok: false, option, message }`, where `option` names the
/// option at fault (`"chains"`, …, or null) and the message does not. Runs that would not fit in
/// a page's memory are refused here too. Throws when the model does not read.
#[wasm_bindgen]
pub fn plan_run(source: &str, request: JsValue) -> Result<JsValue, JsError> {
    let tape = compile(source)?;
    let request: Request = serde_wasm_bindgen::from_value(request)?;
    let plan = match (request.options, request.config) {
        (Some(options), None) => Plan::new(&options, tape.dim(), request.compare),
        (None, Some(config)) => Plan::of_config(config, tape.dim(), request.compare),
        _ => return Err(JsError::new("a run request needs either `options` or `config`")),
    };
    let planned = match plan.and_then(|plan| page_memory(&plan, Shape::of(&tape)).map(|()| plan)) {
        Ok(plan) => Planned::Ok { ok: true, config: plan.config().clone(), chosen: plan.chosen, runs: plan.runs },
        Err(PlanError { option, message }) => Planned::Err { ok: false, option, message },
    };
    to_js(&planned)
}

/// The run options a form shows before any change (see [`Options::standard`]).
#[wasm_bindgen]
pub fn standard_options() -> Result<JsValue, JsError> {
    to_js(&Options::standard())
}

/// The default settings of kernel `kind` (`"rwm"` or `"slice"`) for `source`.
#[wasm_bindgen]
pub fn default_settings(source: &str, kind: &str) -> Result<JsValue, JsError> {
    let kind: Kind = kind.parse().map_err(|e: String| JsError::new(&e))?;
    to_js(&Settings::default_for(kind, compile(source)?.dim()))
}

/// A kernel's settings in words, as the command line prints them ("random-walk Metropolis,
/// scale 0.8400, blend 1.000").
#[wasm_bindgen]
pub fn describe_settings(settings: JsValue) -> Result<String, JsError> {
    let settings: Settings = serde_wasm_bindgen::from_value(settings)?;
    Ok(settings.describe())
}

/// The link to `page` that carries `source` and `config`.
#[wasm_bindgen]
pub fn make_link(source: &str, config: JsValue, page: &str) -> Result<String, JsError> {
    let run: RunConfig = serde_wasm_bindgen::from_value(config)?;
    run.validate().map_err(|e| JsError::new(&e.message))?;
    link::encode(&Shared { model: source.to_string(), run }, page).map_err(|e| JsError::new(&e.0))
}

/// What a link carries: `{ model, run, options }`, where `options` are the run options that
/// give `run` (for the form; null for a run no options can ask for, such as a mixture of
/// kernels); or an error saying what is wrong with the link.
#[wasm_bindgen]
pub fn read_link(link: &str) -> Result<JsValue, JsError> {
    let Shared { model, run } = link::decode(link).map_err(|e| JsError::new(&e.0))?;
    let dim = compile(&model).ok().map(|tape| tape.dim());
    let options = Options::from_config(&run, dim);
    #[derive(Serialize)]
    struct Read {
        model: String,
        run: RunConfig,
        options: Option<Options>,
    }
    to_js(&Read { model, run, options })
}
