//! The walk from syntax tree to [`Model`]: one pass over the statements in order.
//!
//! Each statement is checked on its own, so one pass reports every independent error: a
//! statement that fails leaves its name defined but unusable (uses of it add no further error),
//! and inside a statement each factor of a product, each operand and each call argument is
//! checked even when another one failed. The parts:
//! - this file: statements, names, limits, and the helpers every part uses;
//! - `expr`: values — arithmetic, lists, ranges, indexing, function calls;
//! - `factor`: the density — factors in log space, distributions and their links;
//! - `terms`: the `for` forms, computed for all terms at once where they can be;
//! - `proper`: parameters that nothing constrains (an improper posterior).

mod expr;
mod factor;
mod proper;
mod terms;

pub use terms::MAX_TERMS;

use super::builtins::{BinaryFn, ReduceFn, UnaryFn};
use super::support::Transform;
use super::*;
use crate::lang::ast::{Expr, Ident, Statement, Support, SupportKind};
use crate::lang::diagnostic::MAX_ERRORS;
use crate::lang::{Diagnostic, Diagnostics, Position, Span, parse_all};
use std::collections::{HashMap, HashSet};

/// The name of the statement that gives the model's density.
const DENSITY: &str = "density";

pub fn check(source: &str) -> Result<Model, Diagnostics> {
    let parsed = parse_all(source);
    let mut checker = Checker::new(source);
    checker.errors = parsed.errors;
    checker.broken = parsed.broken.into_iter().map(|i| i.name).collect();
    checker.program(&parsed.program)
}

/// Why a part of a model could not be checked.
enum Fault {
    /// A problem to report.
    Error(Diagnostic),
    /// Already reported, or caused by something that was: nothing more to say here.
    Reported,
    /// The body of a `for` cannot be computed for all its terms at once: check it once per term.
    Unroll,
}

impl From<Diagnostic> for Fault {
    fn from(d: Diagnostic) -> Self {
        Fault::Error(d)
    }
}

type Checked<T> = Result<T, Fault>;

#[derive(Clone, Copy)]
enum Binding {
    Constant(usize),
    Parameter(usize),
    Derived(usize),
}

/// A `for` index in scope.
struct Index {
    name: String,
    value: IndexValue,
}

enum IndexValue {
    /// Every term at once: the list the index runs over, one element per term, belonging to the
    /// `for` numbered `lane`.
    PerTerm { node: Node, lane: usize },
    /// One term: the index's value in it.
    Term(Node),
}

/// The `for` whose terms are being computed all at once, by its number.
#[derive(Clone, Copy, PartialEq, Eq)]
struct Lane {
    id: usize,
}

struct Checker<'s> {
    source: &'s str,
    bindings: HashMap<String, Binding>,
    /// Every statement's name and where it is defined, to explain uses before definitions.
    defined_at: HashMap<String, Span>,
    /// Names whose statement failed: defined, but every use is silently a failure.
    broken: HashSet<String>,
    parameters: Vec<Parameter>,
    /// Where each parameter is declared.
    declared_at: Vec<Span>,
    constants: Vec<Constant>,
    derived: Vec<Derived>,
    /// Where each derived quantity or intermediate is defined.
    derived_at: Vec<Span>,
    mvnormals: Vec<MvNormal>,
    /// The factorised covariance (index into `mvnormals`) of each constant used as one.
    factorised: HashMap<usize, usize>,
    dim: usize,
    /// Numbers held as data so far, against [`MAX_DATA`].
    data: usize,
    /// Elements computed so far, against [`MAX_WORK`].
    work: usize,
    /// Elements of the reported derived quantities so far; with `dim`, against [`MAX_RECORDED`].
    recorded: usize,
    indices: Vec<Index>,
    lane: Option<Lane>,
    /// How many `for` forms have been numbered.
    lanes: usize,
    /// Terms of `for` forms checked one at a time so far, against [`terms::MAX_TERMS`].
    unrolled: usize,
    errors: Vec<Diagnostic>,
    warnings: Vec<Diagnostic>,
}

/// What a `for` body's failed attempt at computing all terms at once must undo.
struct Checkpoint {
    constants: usize,
    mvnormals: usize,
    data: usize,
    work: usize,
    errors: usize,
    warnings: usize,
}

impl<'s> Checker<'s> {
    fn new(source: &'s str) -> Self {
        Checker {
            source,
            bindings: HashMap::new(),
            defined_at: HashMap::new(),
            broken: HashSet::new(),
            parameters: Vec::new(),
            declared_at: Vec::new(),
            constants: Vec::new(),
            derived: Vec::new(),
            derived_at: Vec::new(),
            mvnormals: Vec::new(),
            factorised: HashMap::new(),
            dim: 0,
            data: 0,
            work: 0,
            recorded: 0,
            indices: Vec::new(),
            lane: None,
            lanes: 0,
            unrolled: 0,
            errors: Vec::new(),
            warnings: Vec::new(),
        }
    }

    /// Keep an error for the report; what is left to say is that it was reported.
    fn report(&mut self, fault: Fault) -> Fault {
        match fault {
            Fault::Error(d) => {
                self.errors.push(d);
                Fault::Reported
            }
            other => other,
        }
    }

    /// Both results, or each problem reported: two parts checked independently.
    fn both<A, B>(&mut self, a: Checked<A>, b: Checked<B>) -> Checked<(A, B)> {
        match (a, b) {
            (Ok(a), Ok(b)) => Ok((a, b)),
            (a, b) => Err(self.worst([a.err(), b.err()].into_iter().flatten())),
        }
    }

    /// Every result, or each problem reported.
    fn all<T>(&mut self, results: Vec<Checked<T>>) -> Checked<Vec<T>> {
        if results.iter().all(Result::is_ok) {
            return Ok(results.into_iter().flatten().collect());
        }
        Err(self.worst(results.into_iter().filter_map(Result::err)))
    }

    /// Report the errors among `faults`; a need to unroll wins (it will recheck them anyway).
    fn worst(&mut self, faults: impl Iterator<Item = Fault>) -> Fault {
        let mut outcome = Fault::Reported;
        for fault in faults {
            if let Fault::Unroll = self.report(fault) {
                outcome = Fault::Unroll;
            }
        }
        outcome
    }

    fn checkpoint(&self) -> Checkpoint {
        Checkpoint {
            constants: self.constants.len(),
            mvnormals: self.mvnormals.len(),
            data: self.data,
            work: self.work,
            errors: self.errors.len(),
            warnings: self.warnings.len(),
        }
    }

    fn restore(&mut self, c: Checkpoint) {
        self.constants.truncate(c.constants);
        self.mvnormals.truncate(c.mvnormals);
        self.factorised.retain(|&constant, &mut index| constant < c.constants && index < c.mvnormals);
        self.data = c.data;
        self.work = c.work;
        self.errors.truncate(c.errors);
        self.warnings.truncate(c.warnings);
    }

    /// Count `n` more numbers of data, held until the model is dropped.
    fn hold_data(&mut self, n: usize, span: Span) -> Checked<()> {
        self.data = self.data.saturating_add(n);
        if self.data > MAX_DATA {
            return Err(Diagnostic::new(
                format!("the model's data would hold more than {MAX_DATA} numbers in all (the data limit)"),
                span,
            )
            .help("this counts every list and number, values computed from them, and each covariance")
            .into());
        }
        Ok(())
    }

    /// Check that `n` more recorded values for `name` stay within [`MAX_RECORDED`].
    fn record(&self, name: &Ident, n: usize, span: Span) -> Checked<()> {
        if self.dim + self.recorded + n > MAX_RECORDED {
            return Err(Diagnostic::new(
                format!(
                    "a draw would record more than {MAX_RECORDED} values (parameter and reported elements); `{}` has {n}",
                    name.name
                ),
                span,
            )
            .help("report a sum or a few elements of a long list instead of the whole list")
            .into());
        }
        Ok(())
    }

    /// Count the elements `node` computes, before anything bigger is built on it.
    fn charge(&mut self, node: &Node, span: Span) -> Checked<()> {
        // Parameters and derived quantities are computed once however often they are named; data
        // named in an expression is copied wherever the expression is folded. Every other node
        // costs at least one step, even an empty one.
        if matches!(node.kind, NodeKind::Parameter(_) | NodeKind::Derived(_)) {
            return Ok(());
        }
        self.work = self.work.saturating_add(node.shape.len().max(1));
        if self.work > MAX_WORK {
            return Err(Diagnostic::new(
                format!("this model computes more than {MAX_WORK} values in all (the work limit)"),
                span,
            )
            .help("large lists used many times, or long `for` forms over them, add up to this")
            .into());
        }
        Ok(())
    }

    fn line_of(&self, span: Span) -> usize {
        Position::of(self.source, span.start).line
    }

    fn program(mut self, program: &crate::lang::ast::Program) -> Result<Model, Diagnostics> {
        let mut density_at: Option<Span> = None;
        let mut skip = vec![false; program.statements.len()];
        for (k, statement) in program.statements.iter().enumerate() {
            let name = statement.name();
            if name.name == DENSITY {
                if let Some(first) = density_at {
                    let help = format!("the density is already given on line {}", self.line_of(first));
                    self.errors.push(Diagnostic::new("a model has exactly one density", name.span).help(help));
                    skip[k] = true;
                } else {
                    density_at = Some(name.span);
                }
            } else if let Some(first) = self.defined_at.get(&name.name) {
                let help = format!("it is first defined on line {}; rename one of them", self.line_of(*first));
                self.errors.push(Diagnostic::new(format!("`{}` is defined twice", name.name), name.span).help(help));
                skip[k] = true;
            } else {
                self.defined_at.insert(name.name.clone(), name.span);
            }
        }
        let mut log_density = None;
        for (statement, skip) in program.statements.iter().zip(skip) {
            if skip {
                continue;
            }
            let outcome = match statement {
                Statement::Declare { name, support } => self.declare(name, support),
                Statement::Bind { name, value, .. } if name.name == DENSITY => {
                    self.density(value).map(|node| log_density = Some(node))
                }
                Statement::Bind { name, value, reported } => self.bind(name, value, *reported),
            };
            if let Err(fault) = outcome {
                if let Fault::Unroll = self.report(fault) {
                    // Only a `for` asks to go term by term, and the `for` itself answers; a
                    // request that reaches a statement is a fault of the checker, said as one.
                    debug_assert!(false, "a request to unroll reached a statement");
                    self.errors.push(Diagnostic::new(
                        "this statement could not be checked (a fault of mixwell's checker)",
                        statement.name().span,
                    ));
                }
                self.broken.insert(statement.name().name.clone());
            }
        }
        let end = Span::new(self.source.len(), self.source.len());
        // Missing pieces are worth saying only when nothing else went wrong: a statement that
        // failed may be the density or the parameters.
        let complete = self.errors.is_empty() && self.broken.is_empty();
        if density_at.is_none() && complete {
            self.errors.push(
                Diagnostic::new("the model has no density", end)
                    .expected("a line `density = …`, e.g. `density = normal(y; mu, sigma) * normal(mu; 0, 10)`"),
            );
        }
        if self.parameters.is_empty() && complete {
            self.errors.push(
                Diagnostic::new("the model has no parameters", end)
                    .expected("a declaration such as `mu : real` or `sigma : positive`"),
            );
        }
        let (Some(log_density), true) = (log_density, self.errors.is_empty()) else {
            return Err(Diagnostics::new(self.errors));
        };
        self.unused(&log_density);
        self.propriety(&log_density);
        if !self.errors.is_empty() {
            return Err(Diagnostics::new(self.errors));
        }
        self.warnings.sort_by_key(|d| d.span.start);
        self.warnings.truncate(MAX_ERRORS);
        Ok(Model {
            parameters: self.parameters,
            constants: self.constants,
            derived: self.derived,
            mvnormals: self.mvnormals,
            log_density,
            dim: self.dim,
            warnings: self.warnings,
        })
    }

    /// Warn about local intermediates that neither the density nor any reported quantity uses.
    fn unused(&mut self, log_density: &Node) {
        let mut used = vec![false; self.derived.len()];
        let mut pending = Vec::new();
        log_density.derived_refs(&mut pending);
        for (i, d) in self.derived.iter().enumerate() {
            if d.reported {
                pending.push(i);
            }
        }
        while let Some(i) = pending.pop() {
            if !std::mem::replace(&mut used[i], true) {
                self.derived[i].node.derived_refs(&mut pending);
            }
        }
        for (i, d) in self.derived.iter().enumerate() {
            // Hidden intermediates (the list of a `for`) have no name and go with their `for`.
            if !used[i] && !d.name.is_empty() {
                self.warnings.push(
                    Diagnostic::warning(
                        format!("`{}` is computed but neither the density nor a reported quantity uses it", d.name),
                        self.derived_at[i],
                    )
                    .help(format!("write `report {} = …` to see it in the results, or remove it", d.name)),
                );
            }
        }
    }

    /// A statement's name may be anything but `density`: functions and distributions are names
    /// of another kind (always followed by `(`), so `beta`, `mean` or `normal` are free for data
    /// and parameters.
    fn claim_name(&self, name: &Ident) -> Checked<()> {
        if name.name == DENSITY {
            return Err(Diagnostic::new("`density` is the name of the model's density", name.span)
                .help("choose another name")
                .into());
        }
        Ok(())
    }

    fn declare(&mut self, name: &Ident, support: &Support) -> Checked<()> {
        self.claim_name(name)?;
        let shape = match &support.size {
            None => Shape::Scalar,
            Some(size) => Shape::Vector(self.whole_number(size, "the length of a vector parameter", 1, MAX_LENGTH)?),
        };
        let transform = match &support.kind {
            SupportKind::Real => Transform::Identity,
            SupportKind::Positive => Transform::Above(0.0),
            SupportKind::Unit => Transform::Between(0.0, 1.0),
            SupportKind::Above(a) => Transform::Above(self.bound(a)?),
            SupportKind::Below(b) => Transform::Below(self.bound(b)?),
            SupportKind::Between(a, b) => {
                let (lo, hi) = (self.bound(a), self.bound(b));
                let (lo, hi) = self.both(lo, hi)?;
                if lo >= hi {
                    return Err(Diagnostic::new(
                        format!("the lower bound {lo} is not below the upper bound {hi}"),
                        a.span.to(b.span),
                    )
                    .into());
                }
                if !(hi - lo).is_finite() {
                    return Err(Diagnostic::new(
                        format!("the bounds {lo} and {hi} are too far apart: their difference overflows"),
                        a.span.to(b.span),
                    )
                    .expected("bounds less than 1.8e308 apart")
                    .into());
                }
                Transform::Between(lo, hi)
            }
        };
        if self.dim + shape.len() > MAX_DIMENSION {
            return Err(Diagnostic::new(
                format!("the model would have more than {MAX_DIMENSION} parameter coordinates"),
                support.span,
            )
            .into());
        }
        self.record(name, shape.len(), support.span)?;
        let written = Support { size: None, ..support.clone() }.to_string();
        self.bindings.insert(name.name.clone(), Binding::Parameter(self.parameters.len()));
        self.parameters.push(Parameter {
            name: name.name.clone(),
            support: written,
            transform,
            shape,
            offset: self.dim,
        });
        self.declared_at.push(name.span);
        self.dim += shape.len();
        Ok(())
    }

    /// A support bound: a finite number known before sampling.
    fn bound(&mut self, e: &Expr) -> Checked<f64> {
        let (_, values) = self.constant_values(e, "a bound")?;
        match values.as_slice() {
            [v] if v.is_finite() => Ok(*v),
            [v] => Err(Diagnostic::new(format!("the bound is {v}"), e.span).expected("a finite number").into()),
            _ => Err(Diagnostic::new("a bound must be a single number", e.span).expected("a single number").into()),
        }
    }

    /// A whole number in `lo..=hi` known before sampling.
    fn whole_number(&mut self, e: &Expr, what: &str, lo: usize, hi: usize) -> Checked<usize> {
        let (_, values) = self.constant_values(e, what)?;
        match values.as_slice() {
            [v] if v.fract() == 0.0 && *v >= lo as f64 && *v <= hi as f64 => Ok(*v as usize),
            [v] => Err(Diagnostic::new(format!("{what} is {v}"), e.span)
                .expected(format!("a whole number from {lo} to {hi}"))
                .into()),
            _ => Err(Diagnostic::new(format!("{what} must be a single number"), e.span)
                .expected("a whole number")
                .into()),
        }
    }

    /// The shape and values of an expression that must not depend on parameters.
    fn constant_values(&mut self, e: &Expr, what: &str) -> Checked<(Shape, Vec<f64>)> {
        let node = self.expr(e)?;
        self.known(&node, e, what)?;
        Ok((node.shape, self.evaluate(&node)))
    }

    /// An error unless `node` is known before sampling.
    fn known(&self, node: &Node, e: &Expr, what: &str) -> Checked<()> {
        if !node.constant {
            return Err(Diagnostic::new(format!("{what} must be known before sampling"), e.span)
                .expected("numbers or data, not parameters")
                .into());
        }
        Ok(())
    }

    /// The values of a node known before sampling (all terms' values for a node per term).
    fn evaluate(&self, node: &Node) -> Vec<f64> {
        debug_assert!(node.constant);
        super::eval::Evaluator::constants(&self.constants, &self.mvnormals).value(node).into_owned()
    }

    fn bind(&mut self, name: &Ident, value: &Expr, reported: bool) -> Checked<()> {
        self.claim_name(name)?;
        let node = self.expr(value)?;
        let literal = match node.kind {
            NodeKind::Constant(i) if self.constants[i].name.is_none() => Some(i),
            _ => None,
        };
        if reported && node.constant {
            return Err(Diagnostic::new(
                format!("`{}` does not depend on any parameter: it is data, not a quantity to report", name.name),
                name.span,
            )
            .help("remove `report`; data are listed by `mixwell check`")
            .into());
        }
        let binding = if let Some(i) = literal {
            // A literal list just gets its name; no copy of possibly large data.
            self.constants[i].name = Some(name.name.clone());
            Binding::Constant(i)
        } else if node.constant {
            let values = self.evaluate(&node);
            if let Some(bad) = values.iter().position(|v| !v.is_finite()) {
                return Err(Diagnostic::new(
                    format!("`{}` has the value {} at element {}", name.name, values[bad], bad + 1),
                    value.span,
                )
                .expected("finite numbers")
                .into());
            }
            self.hold_data(values.len(), value.span)?;
            self.constants.push(Constant { name: Some(name.name.clone()), shape: node.shape, values });
            Binding::Constant(self.constants.len() - 1)
        } else {
            if reported {
                self.record(name, node.shape.len(), value.span)?;
                self.recorded += node.shape.len();
            }
            self.derived.push(Derived { name: name.name.clone(), node, reported });
            self.derived_at.push(name.span);
            Binding::Derived(self.derived.len() - 1)
        };
        self.bindings.insert(name.name.clone(), binding);
        Ok(())
    }

    fn density(&mut self, value: &Expr) -> Checked<Node> {
        let node = self.log_factor(value)?.node;
        if node.constant {
            return Err(Diagnostic::new("the density does not depend on any parameter", value.span)
                .expected("a product of factors involving the declared parameters")
                .into());
        }
        Ok(node)
    }

    fn constant(&mut self, shape: Shape, values: Vec<f64>, span: Span) -> Checked<Node> {
        self.hold_data(values.len(), span)?;
        self.constants.push(Constant { name: None, shape, values });
        Ok(Node { kind: NodeKind::Constant(self.constants.len() - 1), shape, constant: true, per_index: false })
    }
}

fn map(f: UnaryFn, x: Node) -> Node {
    let (shape, constant, per_index) = (x.shape, x.constant, x.per_index);
    Node { kind: NodeKind::Map(f, Box::new(x)), shape, constant, per_index }
}

/// `a ∘ b` element by element, the shapes already checked to fit.
fn zip(f: BinaryFn, a: Node, b: Node) -> Node {
    let shape = if a.shape == Shape::Scalar || (b.per_index && !a.per_index) { b.shape } else { a.shape };
    let (constant, per_index) = (a.constant && b.constant, a.per_index || b.per_index);
    Node { kind: NodeKind::Zip(f, Box::new(a), Box::new(b)), shape, constant, per_index }
}

fn reduce_node(f: ReduceFn, x: Node) -> Node {
    let constant = x.constant;
    Node { kind: NodeKind::Reduce(f, Box::new(x)), shape: Shape::Scalar, constant, per_index: false }
}

/// A vector factor contributes the product of its elements: the sum of their logs. Per term of
/// a `for`, a value is already one number per term.
fn sum_if_many(x: Node) -> Node {
    if x.shape == Shape::Scalar || x.per_index { x } else { reduce_node(ReduceFn::Sum, x) }
}
