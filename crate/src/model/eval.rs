//! An interpreter of checked nodes: the checker's constant folder, and the probe that looks for
//! directions in which the density is flat.
//!
//! It walks the tree and runs [`super::compute`] on freshly allocated values, so it is slower
//! than the compiled evaluator in [`crate::tape`] but needs nothing compiled; being the same
//! arithmetic, it gives the same bits.

use super::compute;
use super::{Constant, Derived, Node, NodeKind, Parameter};
use crate::dist::{Col, MvNormal};
use std::borrow::Cow;

/// What nodes refer to: the model's tables so far, and parameter values when there are any.
pub(crate) struct Evaluator<'m> {
    pub constants: &'m [Constant],
    pub mvnormals: &'m [MvNormal],
    pub derived: &'m [Derived],
    pub parameters: &'m [Parameter],
    /// Constrained parameter values, laid out by [`Parameter::offset`]; empty when folding
    /// constants (a node that needs a parameter is never folded).
    pub values: &'m [f64],
    /// Values of derived quantities and intermediates computed so far.
    cache: Vec<Option<Vec<f64>>>,
}

impl<'m> Evaluator<'m> {
    /// An evaluator of nodes that do not depend on parameters.
    pub fn constants(constants: &'m [Constant], mvnormals: &'m [MvNormal]) -> Self {
        Evaluator::new(constants, mvnormals, &[], &[], &[])
    }

    pub fn new(
        constants: &'m [Constant],
        mvnormals: &'m [MvNormal],
        derived: &'m [Derived],
        parameters: &'m [Parameter],
        values: &'m [f64],
    ) -> Self {
        Evaluator { constants, mvnormals, derived, parameters, values, cache: vec![None; derived.len()] }
    }

    /// The values of `node`, row-major for a matrix.
    pub fn value(&mut self, node: &Node) -> Cow<'m, [f64]> {
        let len = node.shape.len();
        let mut out = vec![0.0; len];
        match &node.kind {
            NodeKind::Constant(i) => return Cow::Borrowed(&self.constants[*i].values),
            NodeKind::Parameter(i) => {
                let p = &self.parameters[*i];
                return Cow::Borrowed(&self.values[p.offset..p.offset + len]);
            }
            NodeKind::Derived(i) => {
                // A derived quantity names only earlier ones: computing those first, in order,
                // keeps the recursion one level deep however long a chain of names is.
                let derived: &'m [Derived] = self.derived;
                for (j, d) in derived.iter().enumerate().take(*i + 1) {
                    if self.cache[j].is_none() {
                        let value = self.value(&d.node).into_owned();
                        self.cache[j] = Some(value);
                    }
                }
                return Cow::Owned(self.cache[*i].clone().unwrap_or_default());
            }
            NodeKind::Map(f, x) => compute::map(*f, &self.value(x), &mut out),
            NodeKind::Zip(f, a, b) => {
                let (a_values, b_values) = (self.value(a), self.value(b));
                compute::zip(*f, column(&a_values, a), column(&b_values, b), &mut out);
            }
            NodeKind::Reduce(f, x) => out[0] = compute::reduce(*f, &self.value(x)),
            NodeKind::Dot(a, b) => out[0] = compute::dot(&self.value(a), &self.value(b)),
            NodeKind::MatVec(m, v) => compute::matvec(&self.value(m), &self.value(v), &mut out),
            NodeKind::Gather(x, positions) => compute::gather(&self.value(x), positions, &mut out),
            NodeKind::Stack(items) => {
                let mut at = 0;
                for item in items {
                    let values = self.value(item);
                    out[at..at + values.len()].copy_from_slice(&values);
                    at += values.len();
                }
            }
            NodeKind::LogDensity { family, x, params } | NodeKind::LogDensityEach { family, x, params } => {
                let x_values = self.value(x);
                let values: Vec<Cow<[f64]>> = params.iter().map(|p| self.value(p)).collect();
                let cols: Vec<Col> = values.iter().zip(params).map(|(v, p)| column(v, p)).collect();
                if let NodeKind::LogDensity { .. } = node.kind {
                    let n = super::elements(std::iter::once(&**x).chain(params).map(|p| p.shape));
                    out[0] = compute::log_density_sum(*family, n, column(&x_values, x), &cols);
                } else {
                    compute::log_density_each(*family, column(&x_values, x), &cols, &mut out);
                }
            }
            NodeKind::Fold(f, items) => {
                let values: Vec<Cow<[f64]>> = items.iter().map(|item| self.value(item)).collect();
                compute::fold(*f, values.iter().map(|v| &v[..]), &mut out);
            }
            NodeKind::CumSum(x) => compute::cumsum(&self.value(x), &mut out),
            NodeKind::MvNormal { index, x, mean } => {
                let (x_values, mean_values) = (self.value(x), self.value(mean));
                let dist = &self.mvnormals[*index];
                out[0] = compute::mvnormal(dist, Col::vector(&x_values), column(&mean_values, mean));
            }
        }
        Cow::Owned(out)
    }
}

/// A single number is broadcast (stride 0); anything else is walked.
fn column<'a>(values: &'a [f64], node: &Node) -> Col<'a> {
    if node.shape == super::Shape::Scalar { Col::scalar(values) } else { Col::vector(values) }
}
