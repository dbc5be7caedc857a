//! Parameters that nothing constrains. A posterior that is flat out to infinity in some
//! direction is improper: no sampler can draw from it, and a chain only drifts away. Before any
//! sampling, for every parameter whose support reaches infinity (`real`, `positive`, `above`,
//! `below`):
//!
//! 1. An element that reaches no factor of the density — declared and unused, used only by a
//!    reported quantity, or an element of a list that no index picks — is an error. (A bounded
//!    one is a warning: its posterior is uniform on its support, proper but probably a slip.)
//! 2. An element that is not itself the variable of some distribution factor (a prior makes
//!    its own direction proper) is probed: it is moved, with the other such elements of its
//!    parameter and every other parameter at the unconstrained origin, to three far points
//!    towards each infinite end of its support — ±10², ±10⁴, ±10⁶ for `real`, and for a bounded
//!    end x = a ± e^30, e^45, e^60 (never towards a finite bound, where a flat density is still
//!    proper). If the density there is finite and the same at all three points, to a relative
//!    1e-9, it is flat out to that end (or settles to a constant, which is as improper), and
//!    that is an error.
//!
//! Limits: a ridge along a combination of parameters (a + b, both flat) is not found, nor a
//! density that keeps rising slowly towards infinity (separation in a logistic regression with
//! flat priors), nor anything in a model too large for the probe's budget; for those the
//! report's after-sampling warning about drifting chains remains.

use super::*;
use crate::model::eval::Evaluator;

/// Elements the probe may compute in all, so that checking a large model stays quick.
const PROBE_BUDGET: usize = 1 << 23;

/// Relative difference under which three far values of the density count as the same.
const FLAT: f64 = 1e-9;

impl Checker<'_> {
    pub(super) fn propriety(&mut self, log_density: &Node) {
        let mut reached = vec![false; self.dim];
        let mut covered = vec![false; self.dim];
        let mut cost = 0usize;
        self.each_node(log_density, |node| {
            cost = cost.saturating_add(node.shape.len().max(1));
            if let NodeKind::LogDensity { x, .. } | NodeKind::LogDensityEach { x, .. } | NodeKind::MvNormal { x, .. } =
                &node.kind
            {
                for c in self.coordinates(x).into_iter().flatten() {
                    covered[c] = true;
                }
            }
            match self.coordinates(node) {
                Some(coordinates) => {
                    for c in coordinates {
                        reached[c] = true;
                    }
                    false
                }
                None => true,
            }
        });
        let mut budget = PROBE_BUDGET;
        for p in 0..self.parameters.len() {
            let parameter = &self.parameters[p];
            let all: Vec<usize> = (parameter.offset..parameter.offset + parameter.shape.len()).collect();
            let unbounded = !matches!(parameter.transform, Transform::Between(..));
            let missing: Vec<usize> = all.iter().copied().filter(|&c| !reached[c]).collect();
            if !missing.is_empty() {
                self.unconstrained(p, &missing, unbounded);
                continue;
            }
            let free: Vec<usize> = all.into_iter().filter(|&c| !covered[c]).collect();
            if unbounded && !free.is_empty() {
                if budget < 6 * cost {
                    break;
                }
                budget -= 6 * cost;
                self.probe(p, &free, log_density);
            }
        }
    }

    /// Visit `root` and the nodes below it, entering each named intermediate once; `f` says
    /// whether to go below the node it is given.
    fn each_node<'n>(&'n self, root: &'n Node, mut f: impl FnMut(&'n Node) -> bool) {
        let mut seen = vec![false; self.derived.len()];
        let mut stack = vec![root];
        while let Some(node) = stack.pop() {
            if !f(node) {
                continue;
            }
            match node.kind {
                NodeKind::Derived(i) if !std::mem::replace(&mut seen[i], true) => stack.push(&self.derived[i].node),
                _ => stack.extend(node.children()),
            }
        }
    }

    /// The unconstrained coordinates `node` is, when it is a parameter or elements of one.
    fn coordinates(&self, node: &Node) -> Option<Vec<usize>> {
        match &node.kind {
            NodeKind::Parameter(i) => {
                let p = &self.parameters[*i];
                Some((p.offset..p.offset + p.shape.len()).collect())
            }
            NodeKind::Gather(x, positions) => match x.kind {
                NodeKind::Parameter(i) => Some(positions.iter().map(|k| self.parameters[i].offset + k).collect()),
                _ => None,
            },
            _ => None,
        }
    }

    /// `name` or, when only some elements are meant, `name[2]`, `name[5]`, ….
    fn elements_named(&self, p: usize, coordinates: &[usize]) -> String {
        let parameter = &self.parameters[p];
        if coordinates.len() == parameter.shape.len() {
            return format!("`{}`", parameter.name);
        }
        let names = parameter.shape.element_names(&parameter.name);
        let mut listed: Vec<String> =
            coordinates.iter().take(4).map(|&c| format!("`{}`", names[c - parameter.offset])).collect();
        if coordinates.len() > 4 {
            listed.push(format!("{} more", coordinates.len() - 4));
        }
        listed.join(", ")
    }

    /// Elements of parameter `p` that no factor reaches.
    fn unconstrained(&mut self, p: usize, missing: &[usize], unbounded: bool) {
        let parameter = &self.parameters[p];
        let named = self.elements_named(p, missing);
        let verb = if missing.len() == 1 { "appears" } else { "appear" };
        let span = self.declared_at[p];
        let d = if unbounded {
            Diagnostic::new(
                format!(
                    "{named} {verb} in no factor of the density, so nothing constrains {}: the posterior is flat \
                     over {} (improper)",
                    if missing.len() == 1 { "it" } else { "them" },
                    parameter.transform.describe()
                ),
                span,
            )
            .help(format!("give it a prior, e.g. `normal({}; 0, 10)`, or remove it", parameter.name))
        } else {
            Diagnostic::warning(
                format!(
                    "{named} {verb} in no factor of the density: the posterior is uniform {}",
                    parameter.transform.describe()
                ),
                span,
            )
            .help("give it a prior, or remove it if it is not needed")
        };
        match d.severity {
            crate::lang::Severity::Error => self.errors.push(d),
            crate::lang::Severity::Warning => self.warnings.push(d),
        }
    }

    /// Move the `free` elements of parameter `p` towards each infinite end of its support.
    fn probe(&mut self, p: usize, free: &[usize], log_density: &Node) {
        let transform = self.parameters[p].transform;
        let mut values = vec![0.0; self.dim];
        for q in &self.parameters {
            for v in &mut values[q.offset..q.offset + q.shape.len()] {
                *v = q.transform.constrain(0.0);
            }
        }
        let ends: Vec<(&str, [f64; 3], [&str; 3])> = match transform {
            Transform::Identity => vec![
                ("grows", [1e2, 1e4, 1e6], ["100", "10000", "1000000"]),
                ("falls", [-1e2, -1e4, -1e6], ["-100", "-10000", "-1000000"]),
            ],
            Transform::Above(_) | Transform::Below(_) => {
                let far = [30.0, 45.0, 60.0].map(|u| transform.constrain(u));
                let verb = if matches!(transform, Transform::Above(_)) { "grows" } else { "falls" };
                vec![(verb, far, ["e^30", "e^45", "e^60"])]
            }
            Transform::Between(..) => vec![],
        };
        let name = self.parameters[p].name.clone();
        for (verb, far, shown) in ends {
            let mut density = [0.0; 3];
            for (d, &v) in density.iter_mut().zip(&far) {
                for &c in free {
                    values[c] = v;
                }
                let mut evaluator =
                    Evaluator::new(&self.constants, &self.mvnormals, &self.derived, &self.parameters, &values);
                *d = evaluator.value(log_density)[0];
            }
            let scale = density[0].abs().max(1.0);
            let flat =
                density.iter().all(|d| d.is_finite()) && density.iter().all(|d| (d - density[0]).abs() <= FLAT * scale);
            if flat {
                let named = self.elements_named(p, free);
                let offset = self.parameters[p].offset;
                let shown = if matches!(transform, Transform::Identity) {
                    shown.join(", ")
                } else {
                    let bound = transform.constrain(f64::NEG_INFINITY);
                    let sign = if verb == "grows" { "+" } else { "−" };
                    shown.map(|s| format!("{bound} {sign} {s}")).join(", ")
                };
                let element = self.parameters[p].shape.element_names(&name)[free[0] - offset].clone();
                self.errors.push(
                    Diagnostic::new(
                        format!(
                            "nothing constrains {named} as it {verb}: the density is the same ({}) at {element} = {shown}, \
                             so the posterior is flat out to infinity (improper)",
                            density[0]
                        ),
                        self.declared_at[p],
                    )
                    .help(format!("give it a prior, e.g. `normal({name}; 0, 10)`, or check the factors it appears in"))
                    .note("checked with every other parameter at its starting point; see the README on improper posteriors"),
                );
                return;
            }
        }
    }
}
