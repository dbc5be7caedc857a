//! `mixwell density`: the log density at one point.

use super::{Failure, args::DensityArgs, load};
use crate::lang::diagnostic::did_you_mean;
use crate::tape::Tape;

pub fn run(args: &DensityArgs) -> Result<String, Failure> {
    let (_, _, model) = load(&args.model)?;
    let tape = Tape::new(&model);
    let mut values: Vec<Option<f64>> = vec![None; model.dim];
    for assignment in &args.at {
        let (name, list) =
            assignment.split_once('=').ok_or_else(|| format!("--at `{assignment}`: expected NAME=VALUE[,VALUE…]"))?;
        let name = name.trim();
        let Some(p) = model.parameters.iter().find(|p| p.name == name) else {
            let names = model.parameters.iter().map(|p| p.name.as_str());
            let hint = did_you_mean(name, names).map(|s| format!("; did you mean `{s}`?")).unwrap_or_default();
            return Err(format!("--at: the model has no parameter `{name}`{hint}").into());
        };
        let numbers = list
            .split(',')
            .map(|v| v.trim().parse::<f64>().map_err(|_| format!("--at {name}: `{}` is not a number", v.trim())))
            .collect::<Result<Vec<_>, _>>()?;
        if numbers.len() != p.shape.len() {
            return Err(
                format!("--at {name}: {} value(s) given, but `{name}` has {}", numbers.len(), p.shape.len()).into()
            );
        }
        for (k, v) in numbers.into_iter().enumerate() {
            if values[p.offset + k].replace(v).is_some() {
                return Err(format!("--at: `{name}` is given more than once").into());
            }
        }
    }
    let missing: Vec<&str> = model
        .parameters
        .iter()
        .filter(|p| values[p.offset..p.offset + p.shape.len()].iter().any(Option::is_none))
        .map(|p| p.name.as_str())
        .collect();
    if !missing.is_empty() {
        return Err(format!("--at: no value given for {}", missing.join(", ")).into());
    }
    let values: Vec<f64> = values.into_iter().flatten().collect();
    let theta = tape.unconstrain(&values).map_err(|i| {
        let p = model.parameters.iter().rfind(|p| p.offset <= i).expect("every coordinate belongs to a parameter");
        format!(
            "--at {}: the value {} is outside its support ({})",
            tape.columns()[i],
            values[i],
            p.transform.describe()
        )
    })?;
    let (constrained, jacobian) = tape.log_density_parts(&theta, &mut tape.scratch());
    let unconstrained = constrained + jacobian;
    Ok(if args.json {
        serde_json::json!({ "log_density": finite_or_null(constrained), "log_density_unconstrained": finite_or_null(unconstrained) })
            .to_string()
            + "\n"
    } else {
        format!(
            "log density, constrained scale (no Jacobian):      {constrained}\n\
             log density, unconstrained scale (with Jacobian):  {unconstrained}\n"
        )
    })
}

/// JSON has no infinities: a density of zero (log −∞) is written as null.
fn finite_or_null(v: f64) -> serde_json::Value {
    if v.is_finite() { serde_json::json!(v) } else { serde_json::Value::Null }
}
