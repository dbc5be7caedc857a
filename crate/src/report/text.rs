//! The report as a plain-text table for a terminal.

use super::{DrawsReport, Layout, Quantity, Report};
use crate::plan::Method;
use std::fmt::Write as _;

/// `value` with `digits` decimals; "—" when it is not a finite number (an undefined diagnostic).
pub fn fixed(value: f64, decimals: usize) -> String {
    if value.is_finite() { format!("{value:.decimals$}") } else { "—".into() }
}

/// `value` with `digits` significant digits, without an exponent for magnitudes from 10⁻⁴ to below
/// 10⁹; "—" for NaN. The table of the command line and the page's tables both use this rule.
pub fn significant(value: f64, digits: usize) -> String {
    if !value.is_finite() {
        return if value.is_nan() { "—".into() } else { format!("{value}") };
    }
    if value == 0.0 {
        return "0".into();
    }
    let magnitude = libm::floor(libm::log10(value.abs())) as i32;
    if !(-4..=8).contains(&magnitude) {
        return format!("{value:.*e}", digits.saturating_sub(1));
    }
    let decimals = (digits as i32 - 1 - magnitude).max(0) as usize;
    format!("{value:.decimals$}")
}

/// The summary table, chain statistics, warnings and the standing caution.
pub fn table(report: &Report, title: &str) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "{title} — {}", report.sampler.describe());
    if let Some(t) = &report.tuning {
        let _ = writeln!(
            out,
            "kernel chosen by {} ({} trials, {} density evaluations spent tuning)",
            method_name(t.method),
            t.trials.len(),
            t.evaluations
        );
    }
    let _ = writeln!(
        out,
        "{} chains × {} draws after {} warm-up, seed {}; {} density evaluations while sampling\n",
        report.chains, report.draws, report.warmup, report.seed, report.evaluations.sampling
    );
    quantity_table(&mut out, &report.parameters, &report.derived);
    let _ = writeln!(out, "\nchain  acceptance  evaluations per draw");
    for c in &report.chain_stats {
        let _ = writeln!(out, "{:>5}  {:>10.3}  {:>20.2}", c.chain, c.acceptance, c.evals_per_draw);
    }
    if let Some(rows) = &report.comparison {
        let _ = writeln!(out, "\nmethod  acceptance  min bulk-ESS per eval  per second   max R-hat  settings");
        for c in rows {
            let _ = writeln!(
                out,
                "{:<6}  {:>10.3}  {:>21}  {:>10}  {:>10.3}  {}",
                c.method,
                c.acceptance,
                significant(c.bulk_ess_per_eval, 3),
                significant(c.min_bulk_ess_per_second, 3),
                c.rhat,
                c.settings.describe()
            );
        }
    }
    out.push('\n');
    if !report.complete {
        let _ = writeln!(out, "The run was stopped early: these figures use only the draws made so far.");
    }
    closing(&mut out, &report.warnings);
    out
}

/// The summary table of draws judged on their own: where they came from, the same rows as a
/// run's table, the chains, the warnings and the standing caution.
pub fn draws_table(report: &DrawsReport) -> String {
    let mut out = String::new();
    let files = match report.files.as_slice() {
        [] => String::new(),
        [one] => one.clone(),
        [first, .., last] if report.files.len() > 3 => format!("{first} … {last} ({} files)", report.files.len()),
        many => many.join(", "),
    };
    let _ = writeln!(
        out,
        "{files} — {} chain{} × {} draws, {}\n",
        report.chains,
        if report.chains == 1 { "" } else { "s" },
        report.draws,
        match report.layout {
            Layout::ChainColumn => "told apart by the chain column",
            Layout::FilePerChain => "one chain per file",
        }
    );
    quantity_table(&mut out, &report.quantities, &[]);
    let _ = writeln!(out, "\nchain     draws  from");
    for c in &report.chain_sources {
        let from = match &c.label {
            Some(label) => format!("{}, chain `{label}`", c.file),
            None => c.file.clone(),
        };
        let _ = writeln!(out, "{:>5}  {:>8}  {from}", c.chain, c.draws);
    }
    out.push('\n');
    closing(&mut out, &report.warnings);
    out
}

/// One row per quantity: its summary to four significant digits, ESS whole, R-hat to three
/// decimals; derived quantities, if any, under a heading of their own.
fn quantity_table(out: &mut String, parameters: &[Quantity], derived: &[Quantity]) {
    let all = parameters.iter().chain(derived);
    let name_width = all.map(|q| q.name.chars().count()).max().unwrap_or(4).max(8);
    let head = ["mean", "sd", "5%", "50%", "95%", "MCSE mean", "bulk-ESS", "tail-ESS", "R-hat"];
    let _ = write!(out, "{:name_width$}", "");
    for h in head {
        let _ = write!(out, " {h:>10}");
    }
    out.push('\n');
    let row = |out: &mut String, q: &Quantity| {
        let s = &q.summary;
        let _ = write!(out, "{:name_width$}", q.name);
        for v in [s.mean, s.sd, s.q5, s.q50, s.q95, s.mcse_mean] {
            let _ = write!(out, " {:>10}", significant(v, 4));
        }
        for v in [s.bulk_ess, s.tail_ess] {
            let _ = write!(out, " {:>10}", fixed(v, 0));
        }
        let _ = writeln!(out, " {:>10}", fixed(s.rhat, 3));
    };
    for q in parameters {
        row(out, q);
    }
    if !derived.is_empty() {
        let _ = writeln!(out, "derived");
        for q in derived {
            row(out, q);
        }
    }
}

/// The warnings, or that there are none, and the standing caution.
fn closing(out: &mut String, warnings: &[String]) {
    if warnings.is_empty() {
        let _ = writeln!(out, "No warnings.");
    } else {
        let _ = writeln!(out, "Warnings:");
        for w in warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    let _ = writeln!(out, "{}", super::CAUTION);
}

/// The tuning methods in words.
pub fn method_name(method: Method) -> &'static str {
    match method {
        Method::Bo => "Bayesian optimisation",
        Method::Rm => "Robbins–Monro acceptance targeting",
        Method::Am => "adaptive Metropolis",
        Method::None => "no tuning (the given setting)",
    }
}

#[cfg(test)]
mod tests {
    use super::{fixed, significant};

    #[test]
    fn fixed_decimals() {
        assert_eq!(fixed(1.00049, 3), "1.000");
        assert_eq!(fixed(412.5001, 0), "413");
        assert_eq!(fixed(f64::NAN, 3), "—");
        assert_eq!(fixed(f64::INFINITY, 0), "—");
    }

    #[test]
    fn significant_digits() {
        assert_eq!(significant(215.2345, 4), "215.2");
        assert_eq!(significant(0.0123456, 4), "0.01235");
        assert_eq!(significant(12345.6, 4), "12346");
        assert_eq!(significant(-3.0, 4), "-3.000");
        assert_eq!(significant(1.5e-7, 3), "1.50e-7");
        assert_eq!(significant(f64::NAN, 4), "—");
        assert_eq!(significant(0.0, 4), "0");
    }
}
