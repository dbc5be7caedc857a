//! `mixwell check`: what a model declares.

use super::{Failure, args::CheckArgs, load};
use std::fmt::Write as _;

pub fn run(args: &CheckArgs) -> Result<String, Failure> {
    let (name, _, model) = load(&args.model)?;
    let info = model.info();
    if args.json {
        return Ok(serde_json::to_string_pretty(&info)? + "\n");
    }
    let plural = |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
    let mut out = format!(
        "{name}: the model is well formed: {}, {} in all; {}; {}.\n",
        plural(info.parameters.len(), "parameter", "parameters"),
        plural(model.dim, "coordinate", "coordinates"),
        plural(info.data.len(), "data value", "data values"),
        plural(info.derived.len(), "derived quantity", "derived quantities"),
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
        let _ = writeln!(out, "\nderived (computed for every draw)");
        for d in &info.derived {
            let _ = writeln!(out, "  {:width$}  {}", d.name, shape(&d.shape));
        }
    }
    Ok(out)
}
