//! `mixwell check`: what a model declares, or every problem in it.
//!
//! With `--json` the answer is JSON on standard output either way: the model's summary with its
//! `warnings`, or (exit status 2) `{ "ok": false, "errors": [...], "more": n }`, each diagnostic
//! with its message, expectation, hint, notes, `from`/`to` line and column and `start`/`end`
//! byte offsets. The rendered errors go to standard error as usual.

use super::{Failure, args::CheckArgs, read_model, warn};
use crate::lang::Diagnostic;
use std::fmt::Write as _;

pub fn run(args: &CheckArgs) -> Result<String, Failure> {
    let (name, text) = read_model(&args.model)?;
    let place = |d: &Diagnostic| d.place(&text, |at| at);
    let model = match crate::model::check(&text) {
        Ok(model) => model,
        Err(errors) => {
            if args.json {
                let placed: Vec<_> = errors.iter().map(place).collect();
                let json = serde_json::json!({ "ok": false, "errors": placed, "more": errors.more() });
                println!("{}", serde_json::to_string_pretty(&json)?);
            }
            return Err(Failure(errors.render(&name, &text)));
        }
    };
    warn(&name, &text, &model);
    let info = model.info();
    if args.json {
        let mut json = serde_json::to_value(&info)?;
        json["warnings"] = serde_json::to_value(model.warnings.iter().map(place).collect::<Vec<_>>())?;
        return Ok(serde_json::to_string_pretty(&json)? + "\n");
    }
    let plural = |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
    let mut out = format!(
        "{name}: the model is well formed: {}, {} in all; {}; {}.\n",
        plural(info.parameters.len(), "parameter", "parameters"),
        plural(model.dim, "coordinate", "coordinates"),
        plural(info.data.len(), "data value", "data values"),
        plural(info.derived.len(), "reported quantity", "reported quantities"),
    );
    let width = info
        .parameters
        .iter()
        .map(|p| p.name.len())
        .chain(info.data.iter().map(|d| d.name.len()))
        .chain(info.derived.iter().map(|d| d.name.len()))
        .max()
        .unwrap_or(0)
        .max(4);
    let shape = |dims: &[usize]| match dims {
        [] => "number".to_string(),
        [n] => format!("list of {n}"),
        [r, c] => format!("{r}×{c} matrix"),
        _ => format!("{dims:?}"),
    };
    let _ = writeln!(out, "\nparameters");
    for p in &info.parameters {
        let size = if p.size == 1 { "number".to_string() } else { format!("list of {}", p.size) };
        let _ = writeln!(out, "  {:width$}  {:16}  {size}", p.name, p.support);
    }
    if !info.data.is_empty() {
        let _ = writeln!(out, "\ndata");
        for d in &info.data {
            let _ = writeln!(out, "  {:width$}  {}", d.name, shape(&d.shape));
        }
    }
    if !info.derived.is_empty() {
        let _ = writeln!(out, "\nreported (computed and summarised for every draw)");
        for d in &info.derived {
            let _ = writeln!(out, "  {:width$}  {}", d.name, shape(&d.shape));
        }
    }
    Ok(out)
}
