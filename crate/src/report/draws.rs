//! The report of draws judged on their own — read from files, made by any sampler — rather than
//! made by a run: which chains there were and where each came from, then the same per-quantity
//! summaries, diagnostics and warnings as a run's report. There is no sampler section (no kernel,
//! tuning, acceptance or evaluations): nothing is known of how the draws were made.
//!
//! The report is built one quantity at a time ([`DrawsReport::add`]), so that whoever reads the
//! draws needs to hold only one quantity's draws at once.

use super::{CAUTION, Quantity};
use serde::{Deserialize, Serialize};

/// How the chains of a set of files were told apart.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Layout {
    /// A `chain` column labels the chain of every row (one file or several).
    ChainColumn,
    /// Every file holds one chain.
    FilePerChain,
}

/// One chain and where its draws came from.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ChainSource {
    /// 1-based, as printed.
    pub chain: usize,
    /// The file, as named.
    pub file: String,
    /// The chain's label in the chain column; none when the file is the chain.
    pub label: Option<String>,
    /// Draws of the chain in the file (more than the report's `draws` when chains were cut to
    /// the shortest).
    pub draws: usize,
}

/// The JSON report of `mixwell diagnose`. Its field names are a contract, like a run's report.
#[derive(Clone, Debug, Serialize)]
pub struct DrawsReport {
    pub mixwell: &'static str,
    /// The files the draws were read from, as named.
    pub files: Vec<String>,
    pub layout: Layout,
    pub chains: usize,
    /// Draws per chain, as summarised.
    pub draws: usize,
    pub chain_sources: Vec<ChainSource>,
    /// Every column of draws, in the order of the first file's header.
    pub quantities: Vec<Quantity>,
    pub warnings: Vec<String>,
    pub caution: &'static str,
}

impl DrawsReport {
    /// A report of `chains` (each summarised over its first `draws` draws) with no quantities
    /// yet. `notes` are warnings about the reading itself (such as chains cut to the shortest);
    /// a single chain gets a warning of its own.
    pub fn new(files: Vec<String>, layout: Layout, chains: Vec<ChainSource>, draws: usize, notes: Vec<String>) -> Self {
        let mut warnings = notes;
        if let [only] = chains.as_slice() {
            let which = match &only.label {
                Some(label) => format!("chain `{label}` of {}", only.file),
                None => only.file.clone(),
            };
            warnings.push(format!(
                "there is only one chain ({which}): split R-hat then compares its first half with its second, which \
                 cannot show chains that settle in different places; run several chains from dispersed starting \
                 points (Vehtari et al. 2021)"
            ));
        }
        DrawsReport {
            mixwell: env!("CARGO_PKG_VERSION"),
            files,
            layout,
            chains: chains.len(),
            draws,
            chain_sources: chains,
            quantities: Vec::new(),
            warnings,
            caution: CAUTION,
        }
    }

    /// Summarise the quantity `name` from its draws, one slice per chain in the order of
    /// `chain_sources`, with autocorrelation to lag `lags` — exactly as a run's report does.
    pub fn add(&mut self, name: &str, chains: &[&[f64]], lags: usize) {
        let (quantity, warnings) = Quantity::of(name, chains, lags);
        self.quantities.push(quantity);
        self.warnings.extend(warnings);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn source(chain: usize) -> ChainSource {
        ChainSource { chain, file: "draws.csv".into(), label: Some(chain.to_string()), draws: 8 }
    }

    #[test]
    fn one_chain_is_said_and_quantities_follow_the_run_rules() {
        let mut report = DrawsReport::new(vec!["draws.csv".into()], Layout::ChainColumn, vec![source(1)], 8, vec![]);
        assert_eq!(report.warnings.len(), 1);
        assert!(
            report.warnings[0].starts_with("there is only one chain (chain `1` of draws.csv)"),
            "{:?}",
            report.warnings
        );
        let x = [0.3, 1.2, -0.4, 0.8, 2.0, -1.1, 0.5, 0.1];
        report.add("x", &[&x], 5);
        let (expected, _) = Quantity::of("x", &[&x], 5);
        assert_eq!(report.quantities[0].summary, expected.summary);
        assert_eq!(report.quantities[0].autocorrelation, expected.autocorrelation);
        let two = DrawsReport::new(vec![], Layout::ChainColumn, vec![source(1), source(2)], 8, vec!["cut".into()]);
        assert_eq!(two.warnings, vec!["cut".to_string()]);
    }
}
