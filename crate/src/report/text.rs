//! The report as a plain-text table for a terminal.

use super::{Quantity, Report};
use crate::plan::Method;
use std::fmt::Write as _;

/// `value` with `digits` significant digits, without exponent for everyday magnitudes.
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
    let all = report.parameters.iter().chain(&report.derived);
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
            let _ = write!(out, " {:>10}", if v.is_finite() { format!("{v:.0}") } else { "—".into() });
        }
        let _ = writeln!(out, " {:>10}", if s.rhat.is_finite() { format!("{:.3}", s.rhat) } else { "—".into() });
    };
    for q in &report.parameters {
        row(&mut out, q);
    }
    if !report.derived.is_empty() {
        let _ = writeln!(out, "derived");
        for q in &report.derived {
            row(&mut out, q);
        }
    }
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
    if report.warnings.is_empty() {
        let _ = writeln!(out, "No warnings.");
    } else {
        let _ = writeln!(out, "Warnings:");
        for w in &report.warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    let _ = writeln!(out, "{}", super::CAUTION);
    out
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
    use super::significant;

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
