//! Gives a parsed model its meaning: names resolved, shapes and supports checked, the density
//! rewritten as a sum of log terms, improper posteriors refused. The result, a [`Model`], is what
//! [`crate::tape`] compiles.

pub mod builtins;
mod checker;
pub mod compute;
pub(crate) mod eval;
pub mod links;
pub mod support;
#[cfg(test)]
mod tests;

use crate::dist::{Family, MvNormal};
use crate::lang::{Diagnostic, Diagnostics};
use builtins::{BinaryFn, ReduceFn, UnaryFn};
use serde::Serialize;
use support::Transform;

/// Largest number of elements in one value: a parameter, a data value, or any intermediate
/// result such as a list picked by an index.
pub const MAX_LENGTH: usize = 1 << 20;
/// Largest total number of unconstrained parameter coordinates.
pub const MAX_DIMENSION: usize = 10_000;
/// Largest total number of values a model's data holds: named data, literal numbers and lists,
/// values computed from them, and the factorised covariance of each `mvnormal` (d² each).
pub const MAX_DATA: usize = 8 << 20;
/// Largest total number of elements of all the values that checking and compiling a model
/// compute: every intermediate result, and each use of data in an expression. However a short
/// text combines large values, the time and memory of checking it and the size of its compiled
/// evaluator stay proportionate to this.
pub const MAX_WORK: usize = 32 << 20;
/// Largest number of terms of `for` forms checked one term at a time (those whose terms are
/// lists); nested ones count each inner term once per outer term.
pub use checker::MAX_TERMS;
/// Largest number of values one draw records: the parameters' elements and the derived
/// quantities' elements.
pub const MAX_RECORDED: usize = 100_000;

/// The shape of a value: a number, a list, or a row-major matrix.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Shape {
    Scalar,
    Vector(usize),
    Matrix(usize, usize),
}

impl Shape {
    /// Number of elements.
    pub fn len(self) -> usize {
        match self {
            Shape::Scalar => 1,
            Shape::Vector(n) => n,
            Shape::Matrix(r, c) => r * c,
        }
    }

    /// True for an empty range or slice, such as `y[n+1:n]`.
    pub fn is_empty(self) -> bool {
        self.len() == 0
    }

    /// `[]`, `[n]` or `[rows, columns]`.
    pub fn dims(self) -> Vec<usize> {
        match self {
            Shape::Scalar => vec![],
            Shape::Vector(n) => vec![n],
            Shape::Matrix(r, c) => vec![r, c],
        }
    }

    /// The shape in words, for messages.
    pub fn describe(self) -> String {
        match self {
            Shape::Scalar => "a single number".into(),
            Shape::Vector(n) => format!("a list of {n}"),
            Shape::Matrix(r, c) => format!("a {r}×{c} matrix"),
        }
    }

    /// Names of the elements of `name`: `x`, or `x[1]`, `x[2]`, …, or `m[1,1]`, `m[1,2]`, ….
    pub fn element_names(self, name: &str) -> Vec<String> {
        match self {
            Shape::Scalar => vec![name.to_string()],
            Shape::Vector(n) => (1..=n).map(|i| format!("{name}[{i}]")).collect(),
            Shape::Matrix(r, c) => (1..=r).flat_map(|i| (1..=c).map(move |j| format!("{name}[{i},{j}]"))).collect(),
        }
    }
}

/// A declared parameter.
#[derive(Clone, Debug)]
pub struct Parameter {
    pub name: String,
    /// The support as written, e.g. `between(0, 1)`.
    pub support: String,
    pub transform: Transform,
    pub shape: Shape,
    /// Where its coordinates start in the unconstrained vector θ.
    pub offset: usize,
}

/// A value known before sampling: named data, or a literal inside an expression.
#[derive(Clone, Debug)]
pub struct Constant {
    pub name: Option<String>,
    pub shape: Shape,
    pub values: Vec<f64>,
}

/// A quantity computed from the parameters: a local intermediate, or (`reported`) a derived
/// quantity recorded and summarised for every draw.
#[derive(Clone, Debug)]
pub struct Derived {
    pub name: String,
    pub node: Node,
    pub reported: bool,
}

/// A checked expression: every node knows its shape and whether it depends on parameters.
#[derive(Clone, Debug)]
pub struct Node {
    pub kind: NodeKind,
    pub shape: Shape,
    /// True when the value is known before sampling (no parameter below this node).
    pub constant: bool,
    /// Inside the body of a `for`: the node holds one value for each term (a list as long as the
    /// list the index runs over), not one value for all of them. Only the checker reads it.
    pub per_index: bool,
}

#[derive(Clone, Debug)]
pub enum NodeKind {
    Constant(usize),
    Parameter(usize),
    Derived(usize),
    Map(UnaryFn, Box<Node>),
    Zip(BinaryFn, Box<Node>, Box<Node>),
    Reduce(ReduceFn, Box<Node>),
    Dot(Box<Node>, Box<Node>),
    MatVec(Box<Node>, Box<Node>),
    /// Elements picked by 0-based flat positions.
    Gather(Box<Node>, Vec<usize>),
    /// Scalars (or equal-length rows) laid end to end.
    Stack(Vec<Node>),
    /// Σᵢ log f(xᵢ; θᵢ), a scalar.
    LogDensity {
        family: Family,
        x: Box<Node>,
        params: Vec<Node>,
    },
    /// log f(xᵢ; θᵢ) for each element: a list as long as the arguments' lists.
    LogDensityEach {
        family: Family,
        x: Box<Node>,
        params: Vec<Node>,
    },
    /// log N(x; mean, Σ) with Σ the covariance of `Model::mvnormals[index]`.
    MvNormal {
        index: usize,
        x: Box<Node>,
        mean: Box<Node>,
    },
    /// Items of one shape combined element by element, left to right: the terms of a `for`.
    Fold(BinaryFn, Vec<Node>),
    /// Running sums of a list.
    CumSum(Box<Node>),
}

impl Node {
    /// The nodes this one is computed from, in order.
    pub fn children(&self) -> Vec<&Node> {
        match &self.kind {
            NodeKind::Constant(_) | NodeKind::Parameter(_) | NodeKind::Derived(_) => Vec::new(),
            NodeKind::Map(_, x) | NodeKind::Reduce(_, x) | NodeKind::Gather(x, _) | NodeKind::CumSum(x) => vec![x],
            NodeKind::Zip(_, a, b) | NodeKind::Dot(a, b) | NodeKind::MatVec(a, b) => vec![a, b],
            NodeKind::Stack(items) | NodeKind::Fold(_, items) => items.iter().collect(),
            NodeKind::LogDensity { x, params, .. } | NodeKind::LogDensityEach { x, params, .. } => {
                std::iter::once(&**x).chain(params).collect()
            }
            NodeKind::MvNormal { x, mean, .. } => vec![x, mean],
        }
    }

    /// Indices of the derived quantities and intermediates this node names directly (not those
    /// they name in turn).
    pub fn derived_refs(&self, out: &mut Vec<usize>) {
        let mut stack = vec![self];
        while let Some(node) = stack.pop() {
            match node.kind {
                NodeKind::Derived(i) => out.push(i),
                _ => stack.extend(node.children()),
            }
        }
    }
}

/// The number of elements a distribution's arguments describe: the length of the lists among
/// them (which the checker made equal), or 1 when every argument is a single number.
pub fn elements(args: impl IntoIterator<Item = Shape>) -> usize {
    args.into_iter().find(|s| *s != Shape::Scalar).map_or(1, Shape::len)
}

/// A model ready to compile.
#[derive(Clone, Debug)]
pub struct Model {
    pub parameters: Vec<Parameter>,
    pub constants: Vec<Constant>,
    /// Local intermediates and reported derived quantities, in the order they are defined.
    pub derived: Vec<Derived>,
    pub mvnormals: Vec<MvNormal>,
    /// The log of the density, a scalar node.
    pub log_density: Node,
    /// Number of unconstrained coordinates.
    pub dim: usize,
    /// Problems that do not stop the model from being used, in the order of their positions.
    pub warnings: Vec<Diagnostic>,
}

impl Model {
    /// The summary that `mixwell check` prints and the page lists.
    pub fn info(&self) -> ModelInfo {
        ModelInfo {
            parameters: self
                .parameters
                .iter()
                .map(|p| ParameterInfo { name: p.name.clone(), support: p.support.clone(), size: p.shape.len() })
                .collect(),
            data: self
                .constants
                .iter()
                .filter_map(|c| Some(DataInfo { name: c.name.clone()?, shape: c.shape.dims() }))
                .collect(),
            derived: self
                .derived
                .iter()
                .filter(|d| d.reported)
                .map(|d| DerivedInfo { name: d.name.clone(), shape: d.node.shape.dims() })
                .collect(),
        }
    }
}

/// What `mixwell check` reports and the page lists.
#[derive(Clone, Debug, Serialize)]
pub struct ModelInfo {
    pub parameters: Vec<ParameterInfo>,
    pub data: Vec<DataInfo>,
    /// The reported derived quantities (local intermediates are not listed).
    pub derived: Vec<DerivedInfo>,
}

#[derive(Clone, Debug, Serialize)]
pub struct ParameterInfo {
    pub name: String,
    /// The support as written, e.g. `between(0, 1)`.
    pub support: String,
    /// Number of elements; 1 for a scalar.
    pub size: usize,
}

#[derive(Clone, Debug, Serialize)]
pub struct DataInfo {
    pub name: String,
    /// `[]` for a scalar, `[n]` for a list, `[rows, columns]` for a matrix.
    pub shape: Vec<usize>,
}

#[derive(Clone, Debug, Serialize)]
pub struct DerivedInfo {
    pub name: String,
    pub shape: Vec<usize>,
}

/// Parse and check a model text: the model, or every error found (up to
/// [`crate::lang::diagnostic::MAX_ERRORS`]).
pub fn check(source: &str) -> Result<Model, Diagnostics> {
    checker::check(source)
}
