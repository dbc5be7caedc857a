//! Plain-language warnings about one quantity's draws, each naming the threshold it breaks and
//! where that threshold was published.

use super::Summary;

/// The limits beyond which a quantity's draws are flagged.
///
/// Defaults are the recommendations of Vehtari, Gelman, Simpson, Carpenter & Bürkner (2021),
/// *Bayesian Analysis* 16(2) (recalled, as recorded in REFERENCES.md §3.1 steps 5 and 10): use the
/// draws only if R-hat < 1.01, and have bulk- and tail-ESS of at least about 100 per chain.
///
/// ```
/// use mixwell::diag::Thresholds;
/// let t = Thresholds::default();
/// assert_eq!((t.rhat_max, t.ess_per_chain_min), (1.01, 100.0));
/// ```
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Thresholds {
    /// Warn when R-hat exceeds this.
    pub rhat_max: f64,
    /// Warn when bulk- or tail-ESS falls below this many effective draws per chain.
    pub ess_per_chain_min: f64,
}

impl Default for Thresholds {
    fn default() -> Self {
        Thresholds { rhat_max: 1.01, ess_per_chain_min: 100.0 }
    }
}

const SOURCE: &str = "Vehtari et al. 2021";

/// Warnings for the quantity `name`, from its [`Summary`] and the number of chains that produced it.
/// An empty vector means nothing to report.
///
/// Degenerate summaries get one warning that says why nothing could be checked: no finite draws
/// (mean is NaN or infinite), a quantity that never moved (sd = 0), or too few draws per chain for
/// R-hat and ESS.
///
/// ```
/// use mixwell::diag::{summarise, warnings, Thresholds};
/// let stuck = [1.5; 50];
/// let w = warnings("sigma", &summarise(&[&stuck, &stuck]), 2, &Thresholds::default());
/// assert!(w[0].contains("never moved"));
/// ```
pub fn warnings(name: &str, summary: &Summary, chains: usize, thresholds: &Thresholds) -> Vec<String> {
    if !summary.mean.is_finite() {
        return vec![format!(
            "{name}: no summary can be computed, because there are no draws or some draws are not finite \
             numbers (NaN or infinite); check the model for values outside its support"
        )];
    }
    if summary.sd == 0.0 {
        return vec![format!(
            "{name}: every draw equals {}; the quantity never moved, so R-hat and ESS are undefined. \
             The sampler may be rejecting every proposal; check the step size and the starting point",
            summary.mean
        )];
    }
    let mut out = Vec::new();
    if summary.rhat.is_nan() {
        out.push(format!(
            "{name}: R-hat and ESS could not be computed; each chain needs at least 4 draws, and all chains \
             the same number"
        ));
        return out;
    }
    if summary.rhat > thresholds.rhat_max {
        let shown = if summary.rhat.is_infinite() {
            "infinite (each chain is stuck at its own value)".to_string()
        } else {
            shown_beyond(summary.rhat, thresholds.rhat_max, 3)
        };
        out.push(format!(
            "{name}: R-hat is {shown}, above {} ({SOURCE}): the chains disagree with each other; run them \
             longer or tune the sampler again",
            thresholds.rhat_max
        ));
    }
    let ess_min = thresholds.ess_per_chain_min * chains as f64;
    let per_chain = format!("{} per chain for {chains} chain{}", thresholds.ess_per_chain_min, plural(chains));
    if summary.bulk_ess < ess_min {
        out.push(format!(
            "{name}: bulk-ESS is {}, below {ess_min} ({per_chain}; {SOURCE}): too few effective draws to \
             trust the mean and the median; run the chains longer",
            shown_beyond(summary.bulk_ess, ess_min, 0)
        ));
    }
    if summary.tail_ess.is_nan() {
        out.push(format!(
            "{name}: tail-ESS could not be computed: the draws take so few distinct values that the 5% or \
             95% quantile does not separate them"
        ));
    } else if summary.tail_ess < ess_min {
        out.push(format!(
            "{name}: tail-ESS is {}, below {ess_min} ({per_chain}; {SOURCE}): too few effective draws in the \
             tails to trust the 5% and 95% quantiles; run the chains longer",
            shown_beyond(summary.tail_ess, ess_min, 0)
        ));
    }
    out
}

fn plural(n: usize) -> &'static str {
    if n == 1 { "" } else { "s" }
}

/// `value` with at least `decimals` decimals, and more if needed so the printed number does not
/// look equal to the threshold it was compared with (1.0104 is shown as "1.0104", not "1.010").
fn shown_beyond(value: f64, threshold: f64, decimals: usize) -> String {
    for d in decimals..decimals + 6 {
        let text = format!("{value:.d$}");
        if text.parse::<f64>().is_ok_and(|shown| shown != threshold) {
            return text;
        }
    }
    format!("{value}")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn summary(rhat: f64, bulk: f64, tail: f64) -> Summary {
        Summary {
            mean: 0.0,
            sd: 1.0,
            q5: -1.6,
            q50: 0.0,
            q95: 1.6,
            mcse_mean: 0.05,
            mcse_q5: 0.1,
            mcse_q95: 0.1,
            bulk_ess: bulk,
            tail_ess: tail,
            rhat,
        }
    }

    /// Thresholds of Vehtari et al. (2021): R-hat 1.01, ESS 100 per chain.
    #[test]
    fn each_breach_is_named_with_its_threshold_and_source() {
        let t = Thresholds::default();
        assert!(warnings("mu", &summary(1.005, 2000.0, 1500.0), 4, &t).is_empty());
        let w = warnings("sigma", &summary(1.034, 350.0, 120.0), 4, &t);
        assert_eq!(w.len(), 3, "{w:?}");
        assert!(w[0].starts_with("sigma: R-hat is 1.034, above 1.01 (Vehtari et al. 2021)"), "{}", w[0]);
        assert!(w[1].starts_with("sigma: bulk-ESS is 350, below 400 (100 per chain for 4 chains; Vehtari"), "{}", w[1]);
        assert!(w[2].starts_with("sigma: tail-ESS is 120, below 400"), "{}", w[2]);
    }

    #[test]
    fn values_next_to_the_threshold_are_shown_with_enough_digits() {
        let w = warnings("x", &summary(1.01004, 1e4, 1e4), 4, &Thresholds::default());
        assert!(w[0].contains("R-hat is 1.01004,"), "{}", w[0]);
        let w = warnings("x", &summary(1.0, 399.7, 1e4), 4, &Thresholds::default());
        assert!(w[0].contains("bulk-ESS is 399.7,"), "{}", w[0]);
    }

    #[test]
    fn degenerate_summaries_say_why() {
        let t = Thresholds::default();
        let mut s = summary(f64::NAN, f64::NAN, f64::NAN);
        assert!(warnings("k", &s, 4, &t)[0].contains("at least 4 draws"));
        s.sd = 0.0;
        assert!(warnings("k", &s, 4, &t)[0].contains("never moved"));
        s.mean = f64::NAN;
        assert!(warnings("k", &s, 4, &t)[0].contains("not finite"));
        let w = warnings("k", &summary(f64::INFINITY, 2.0, 2.0), 4, &t);
        assert!(w[0].contains("infinite"), "{}", w[0]);
        let w = warnings("k", &summary(1.0, 1e4, f64::NAN), 4, &t);
        assert!(w[0].contains("tail-ESS could not be computed"), "{}", w[0]);
    }
}
