//! The walk from syntax tree to [`Model`]: one pass over the statements in order.

use super::builtins::{self, BinaryFn, Builtin, ReduceFn, UnaryFn};
use super::support::Transform;
use super::*;
use crate::dist::{Family, MvNormal, Variate};
use crate::lang::ast::{BinOp, Expr, ExprKind, Ident, Program, Statement, Support, SupportKind};
use crate::lang::diagnostic::did_you_mean;
use crate::lang::{Diagnostic, Position, Span, parse};
use std::collections::HashMap;

/// The name of the statement that gives the model's density.
const DENSITY: &str = "density";
/// The multivariate normal is not a [`Family`]: its covariance is factorised when checking.
const MVNORMAL: &str = "mvnormal";

pub fn check(source: &str) -> Result<Model, Diagnostic> {
    let program = parse(source)?;
    Checker::new(source).program(&program)
}

#[derive(Clone, Copy)]
enum Binding {
    Constant(usize),
    Parameter(usize),
    Derived(usize),
}

struct Checker<'s> {
    source: &'s str,
    bindings: HashMap<String, Binding>,
    /// Every statement's name and where it is defined, to explain uses before definitions.
    defined_at: HashMap<String, Span>,
    parameters: Vec<Parameter>,
    constants: Vec<Constant>,
    derived: Vec<Derived>,
    mvnormals: Vec<MvNormal>,
    /// The factorised covariance (index into `mvnormals`) of each constant used as one.
    factorised: HashMap<usize, usize>,
    dim: usize,
    /// Numbers held as data so far, against [`MAX_DATA`].
    data: usize,
    /// Elements computed so far, against [`MAX_WORK`].
    work: usize,
    /// Elements of the derived quantities so far; with `dim`, against [`MAX_RECORDED`].
    derived_len: usize,
}

fn is_reserved(name: &str) -> bool {
    name == DENSITY || name == MVNORMAL || Family::from_name(name).is_some() || builtins::lookup(name).is_some()
}

impl<'s> Checker<'s> {
    fn new(source: &'s str) -> Self {
        Checker {
            source,
            bindings: HashMap::new(),
            defined_at: HashMap::new(),
            parameters: Vec::new(),
            constants: Vec::new(),
            derived: Vec::new(),
            mvnormals: Vec::new(),
            factorised: HashMap::new(),
            dim: 0,
            data: 0,
            work: 0,
            derived_len: 0,
        }
    }

    /// Count `n` more numbers of data, held until the model is dropped.
    fn hold_data(&mut self, n: usize, span: Span) -> Result<(), Diagnostic> {
        self.data = self.data.saturating_add(n);
        if self.data > MAX_DATA {
            return Err(Diagnostic::new(
                format!("the model's data would hold more than {MAX_DATA} numbers in all (the data limit)"),
                span,
            )
            .help("this counts every list and number, values computed from them, and each covariance"));
        }
        Ok(())
    }

    /// Check that `n` more recorded values for `name` stay within [`MAX_RECORDED`].
    fn record(&self, name: &Ident, n: usize, span: Span) -> Result<(), Diagnostic> {
        if self.dim + self.derived_len + n > MAX_RECORDED {
            return Err(Diagnostic::new(
                format!(
                    "a draw would record more than {MAX_RECORDED} values (parameter and derived elements); `{}` has {n}",
                    name.name
                ),
                span,
            )
            .help("sum or index a long derived list down to the values worth recording"));
        }
        Ok(())
    }

    /// Count the elements `node` computes, before anything bigger is built on it.
    fn charge(&mut self, node: &Node, span: Span) -> Result<(), Diagnostic> {
        // Parameters and derived quantities are computed once however often they are named; data
        // named in an expression is copied wherever the expression is folded.
        if matches!(node.kind, NodeKind::Parameter(_) | NodeKind::Derived(_)) {
            return Ok(());
        }
        self.work = self.work.saturating_add(node.shape.len());
        if self.work > MAX_WORK {
            return Err(Diagnostic::new(
                format!("this model computes more than {MAX_WORK} values in all (the work limit)"),
                span,
            )
            .help("large lists used many times, or indices that repeat large lists, add up to this"));
        }
        Ok(())
    }

    fn line_of(&self, span: Span) -> usize {
        Position::of(self.source, span.start).line
    }

    fn program(mut self, program: &Program) -> Result<Model, Diagnostic> {
        let mut density_at: Option<Span> = None;
        for statement in &program.statements {
            let name = statement.name();
            if name.name == DENSITY {
                if let Some(first) = density_at {
                    return Err(Diagnostic::new("a model has exactly one density", name.span)
                        .help(format!("the density is already given on line {}", self.line_of(first))));
                }
                density_at = Some(name.span);
            } else if let Some(first) = self.defined_at.get(&name.name) {
                return Err(Diagnostic::new(format!("`{}` is defined twice", name.name), name.span)
                    .help(format!("it is first defined on line {}; rename one of them", self.line_of(*first))));
            } else {
                self.defined_at.insert(name.name.clone(), name.span);
            }
        }
        let mut log_density = None;
        for statement in &program.statements {
            match statement {
                Statement::Declare { name, support } => self.declare(name, support)?,
                Statement::Bind { name, value } if name.name == DENSITY => log_density = Some(self.density(value)?),
                Statement::Bind { name, value } => self.bind(name, value)?,
            }
        }
        let end = Span::new(self.source.len(), self.source.len());
        let Some(log_density) = log_density else {
            return Err(Diagnostic::new("the model has no density", end)
                .expected("a line `density = …`, e.g. `density = normal(y; mu, sigma) * normal(mu; 0, 10)`"));
        };
        if self.parameters.is_empty() {
            return Err(Diagnostic::new("the model has no parameters", end)
                .expected("a declaration such as `mu : real` or `sigma : positive`"));
        }
        Ok(Model {
            parameters: self.parameters,
            constants: self.constants,
            derived: self.derived,
            mvnormals: self.mvnormals,
            log_density,
            dim: self.dim,
        })
    }

    fn claim_name(&self, name: &Ident) -> Result<(), Diagnostic> {
        if is_reserved(&name.name) {
            let what = if name.name == DENSITY { "the model's density" } else { "a built-in function or distribution" };
            return Err(Diagnostic::new(format!("`{}` is the name of {what}", name.name), name.span)
                .help("choose another name"));
        }
        Ok(())
    }

    fn declare(&mut self, name: &Ident, support: &Support) -> Result<(), Diagnostic> {
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
                let (lo, hi) = (self.bound(a)?, self.bound(b)?);
                if lo >= hi {
                    return Err(Diagnostic::new(
                        format!("the lower bound {lo} is not below the upper bound {hi}"),
                        a.span.to(b.span),
                    ));
                }
                if !(hi - lo).is_finite() {
                    return Err(Diagnostic::new(
                        format!("the bounds {lo} and {hi} are too far apart: their difference overflows"),
                        a.span.to(b.span),
                    )
                    .expected("bounds less than 1.8e308 apart"));
                }
                Transform::Between(lo, hi)
            }
        };
        if self.dim + shape.len() > MAX_DIMENSION {
            return Err(Diagnostic::new(
                format!("the model would have more than {MAX_DIMENSION} parameter coordinates"),
                support.span,
            ));
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
        self.dim += shape.len();
        Ok(())
    }

    /// A support bound: a finite number known before sampling.
    fn bound(&mut self, e: &Expr) -> Result<f64, Diagnostic> {
        let (_, values) = self.constant_values(e, "a bound")?;
        match values.as_slice() {
            [v] if v.is_finite() => Ok(*v),
            [v] => Err(Diagnostic::new(format!("the bound is {v}"), e.span).expected("a finite number")),
            _ => Err(Diagnostic::new("a bound must be a single number", e.span).expected("a single number")),
        }
    }

    /// A whole number in `lo..=hi` known before sampling.
    fn whole_number(&mut self, e: &Expr, what: &str, lo: usize, hi: usize) -> Result<usize, Diagnostic> {
        let (_, values) = self.constant_values(e, what)?;
        match values.as_slice() {
            [v] if v.fract() == 0.0 && *v >= lo as f64 && *v <= hi as f64 => Ok(*v as usize),
            [v] => {
                Err(Diagnostic::new(format!("{what} is {v}"), e.span)
                    .expected(format!("a whole number from {lo} to {hi}")))
            }
            _ => Err(Diagnostic::new(format!("{what} must be a single number"), e.span).expected("a whole number")),
        }
    }

    /// The shape and values of an expression that must not depend on parameters.
    fn constant_values(&mut self, e: &Expr, what: &str) -> Result<(Shape, Vec<f64>), Diagnostic> {
        let node = self.expr(e)?;
        if !node.constant {
            return Err(Diagnostic::new(format!("{what} must be known before sampling"), e.span)
                .expected("numbers or data, not parameters"));
        }
        Ok((node.shape, self.evaluate(&node)))
    }

    fn evaluate(&self, node: &Node) -> Vec<f64> {
        debug_assert!(node.constant);
        super::eval::Evaluator::constants(&self.constants, &self.mvnormals).value(node).into_owned()
    }

    fn bind(&mut self, name: &Ident, value: &Expr) -> Result<(), Diagnostic> {
        self.claim_name(name)?;
        let node = self.expr(value)?;
        let literal = match node.kind {
            NodeKind::Constant(i) if self.constants[i].name.is_none() => Some(i),
            _ => None,
        };
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
                .expected("finite numbers"));
            }
            self.hold_data(values.len(), value.span)?;
            self.constants.push(Constant { name: Some(name.name.clone()), shape: node.shape, values });
            Binding::Constant(self.constants.len() - 1)
        } else {
            self.record(name, node.shape.len(), value.span)?;
            self.derived_len += node.shape.len();
            self.derived.push(Derived { name: name.name.clone(), node });
            Binding::Derived(self.derived.len() - 1)
        };
        self.bindings.insert(name.name.clone(), binding);
        Ok(())
    }

    fn density(&mut self, value: &Expr) -> Result<Node, Diagnostic> {
        let node = self.log_factor(value)?;
        if node.constant {
            return Err(Diagnostic::new("the density does not depend on any parameter", value.span)
                .expected("a product of factors involving the declared parameters"));
        }
        Ok(node)
    }

    fn constant(&mut self, shape: Shape, values: Vec<f64>, span: Span) -> Result<Node, Diagnostic> {
        self.hold_data(values.len(), span)?;
        self.constants.push(Constant { name: None, shape, values });
        Ok(Node { kind: NodeKind::Constant(self.constants.len() - 1), shape, constant: true })
    }

    /// The log of a density factor, as a scalar node: products become sums, quotients
    /// differences, powers multiples, sums log-sum-exps; `exp(E)` contributes E itself.
    fn log_factor(&mut self, e: &Expr) -> Result<Node, Diagnostic> {
        match &e.kind {
            ExprKind::Binary(op, a, b) => {
                let f = match op {
                    BinOp::Mul => BinaryFn::Add,
                    BinOp::Div => BinaryFn::Sub,
                    BinOp::Add => BinaryFn::LogAddExp,
                    BinOp::Sub => BinaryFn::LogSubExp,
                    BinOp::Pow => {
                        let power = self.expr(b)?;
                        if power.shape != Shape::Scalar {
                            return Err(Diagnostic::new(
                                format!("the power of a density factor is {}", power.shape.describe()),
                                b.span,
                            )
                            .expected("a single number"));
                        }
                        let base = self.log_factor(a)?;
                        return Ok(zip(BinaryFn::Mul, power, base));
                    }
                };
                let (a, b) = (self.log_factor(a)?, self.log_factor(b)?);
                Ok(zip(f, a, b))
            }
            ExprKind::Call { func, variate: None, args } if func.name == "exp" && args.len() == 1 => {
                let inner = self.expr(&args[0])?;
                Ok(sum_if_many(inner))
            }
            ExprKind::Call { variate: Some(_), .. } => self.expr_log_density(e),
            ExprKind::Number(c) if *c > 0.0 => self.constant(Shape::Scalar, vec![libm::log(*c)], e.span),
            ExprKind::Number(_) | ExprKind::Neg(_) => Err(Diagnostic::new("a density factor must be positive", e.span)
                .expected("a positive factor such as a distribution, `exp(…)` or a positive number")),
            _ => {
                let logs = map(UnaryFn::Log, self.expr(e)?);
                self.charge(&logs, e.span)?;
                Ok(sum_if_many(logs))
            }
        }
    }

    /// The checked node of an expression, its elements counted against [`MAX_WORK`].
    fn expr(&mut self, e: &Expr) -> Result<Node, Diagnostic> {
        let node = self.expr_node(e)?;
        self.charge(&node, e.span)?;
        Ok(node)
    }

    fn expr_node(&mut self, e: &Expr) -> Result<Node, Diagnostic> {
        match &e.kind {
            ExprKind::Number(v) => self.constant(Shape::Scalar, vec![*v], e.span),
            ExprKind::Name(name) => self.name(name, e.span),
            ExprKind::List(items) => self.list(items, e.span),
            ExprKind::Neg(inner) => Ok(map(UnaryFn::Neg, self.expr(inner)?)),
            ExprKind::Binary(op, a, b) => {
                let f = match op {
                    BinOp::Add => BinaryFn::Add,
                    BinOp::Sub => BinaryFn::Sub,
                    BinOp::Mul => BinaryFn::Mul,
                    BinOp::Div => BinaryFn::Div,
                    BinOp::Pow => BinaryFn::Pow,
                };
                let (x, y) = (self.expr(a)?, self.expr(b)?);
                elementwise(f, x, y, a.span, b.span)
            }
            ExprKind::Index(base, indices) => self.index(base, indices),
            ExprKind::Call { variate: Some(_), .. } => Ok(map(UnaryFn::Exp, self.expr_log_density(e)?)),
            ExprKind::Call { func, variate: None, args } => self.call(func, args, e.span),
        }
    }

    fn name(&self, name: &str, span: Span) -> Result<Node, Diagnostic> {
        if let Some(binding) = self.bindings.get(name) {
            return Ok(match *binding {
                Binding::Constant(i) => {
                    Node { kind: NodeKind::Constant(i), shape: self.constants[i].shape, constant: true }
                }
                Binding::Parameter(i) => {
                    Node { kind: NodeKind::Parameter(i), shape: self.parameters[i].shape, constant: false }
                }
                Binding::Derived(i) => {
                    Node { kind: NodeKind::Derived(i), shape: self.derived[i].node.shape, constant: false }
                }
            });
        }
        if let Some(defined) = self.defined_at.get(name) {
            return Err(Diagnostic::new(format!("`{name}` is used before it is defined"), span).help(format!(
                "`{name}` is defined on line {}; move that line above this one",
                self.line_of(*defined)
            )));
        }
        if is_reserved(name) {
            return Err(Diagnostic::new(format!("`{name}` is a function or distribution, not a value"), span)
                .expected(format!("a call such as `{name}(…)`")));
        }
        let mut d =
            Diagnostic::new(format!("unknown name `{name}`"), span).expected("a data name, a parameter or a number");
        if let Some(similar) = did_you_mean(name, self.bindings.keys().map(String::as_str)) {
            d = d.help(format!("did you mean `{similar}`?"));
        }
        Err(d)
    }

    fn list(&mut self, items: &[Expr], span: Span) -> Result<Node, Diagnostic> {
        if items.is_empty() {
            return Err(Diagnostic::new("an empty list", span).expected("at least one element"));
        }
        // Lists of plain numbers (data) become one constant directly.
        let too_long = || Diagnostic::new(format!("the list has more than {MAX_LENGTH} elements"), span);
        let literal: Option<Vec<f64>> = items.iter().map(literal_number).collect();
        if let Some(values) = literal {
            if values.len() > MAX_LENGTH {
                return Err(too_long());
            }
            return self.constant(Shape::Vector(values.len()), values, span);
        }
        // So do matrices of plain numbers: one constant, not one per row and then the matrix.
        if let Some((rows, columns, values)) = literal_matrix(items) {
            if rows.checked_mul(columns).is_none_or(|n| n > MAX_LENGTH) {
                return Err(too_long());
            }
            return self.constant(Shape::Matrix(rows, columns), values, span);
        }
        let nodes = items.iter().map(|item| self.expr(item)).collect::<Result<Vec<_>, _>>()?;
        let shape = match nodes[0].shape {
            Shape::Scalar => Shape::Vector(nodes.len()),
            Shape::Vector(n) => Shape::Matrix(nodes.len(), n),
            Shape::Matrix(..) => {
                return Err(Diagnostic::new("lists nest at most two deep (a matrix)", items[0].span)
                    .expected("a number or a row of numbers"));
            }
        };
        for (node, item) in nodes.iter().zip(items) {
            if node.shape != nodes[0].shape {
                return Err(Diagnostic::new(
                    format!("this element is {} but the first is {}", node.shape.describe(), nodes[0].shape.describe()),
                    item.span,
                )
                .expected("elements of one shape: all numbers, or rows of equal length"));
            }
        }
        // Rows × columns, checked before anything multiplies them (a 32-bit `usize` overflows).
        if nodes.len().checked_mul(nodes[0].shape.len()).is_none_or(|n| n > MAX_LENGTH) {
            return Err(too_long());
        }
        let constant = nodes.iter().all(|n| n.constant);
        Ok(Node { kind: NodeKind::Stack(nodes), shape, constant })
    }

    fn index(&mut self, base: &Expr, indices: &[Expr]) -> Result<Node, Diagnostic> {
        let node = self.expr(base)?;
        let described = match &base.kind {
            ExprKind::Name(n) => format!("`{n}`"),
            _ => "this value".into(),
        };
        let dims = node.shape.dims();
        if dims.is_empty() {
            return Err(Diagnostic::new(
                format!("{described} is a single number and has no elements to pick"),
                base.span,
            ));
        }
        if indices.is_empty() || indices.len() > dims.len() {
            let span = indices.first().map_or(base.span, |first| first.span.to(indices[indices.len() - 1].span));
            return Err(Diagnostic::new(
                format!("{described} is {} but {} indices are given", node.shape.describe(), indices.len()),
                span,
            )
            .expected(if dims.len() == 1 { "one index" } else { "one index (a row) or two (row, column)" }));
        }
        // Each index: the 0-based positions it picks along its axis, and whether it keeps the axis.
        let mut axes = Vec::new();
        for (index, &extent) in indices.iter().zip(&dims) {
            let (index_shape, values) = self.constant_values(index, "an index")?;
            let picked = values
                .iter()
                .map(|&v| {
                    if v.fract() == 0.0 && v >= 1.0 && v <= extent as f64 {
                        Ok(v as usize - 1)
                    } else {
                        Err(Diagnostic::new(format!("index {v} is out of range"), index.span)
                            .expected(format!("a whole number from 1 to {extent}: {described} has {extent} there")))
                    }
                })
                .collect::<Result<Vec<_>, _>>()?;
            axes.push((picked, index_shape != Shape::Scalar));
        }
        // A single index into a matrix picks whole rows.
        if dims.len() == 2 && indices.len() == 1 {
            axes.push(((0..dims[1]).collect(), true));
        }
        // `M[i, j]` picks len(i)·len(j) elements: refuse too many before making the list of them.
        let picks = axes.iter().try_fold(1usize, |n, (p, _)| n.checked_mul(p.len()));
        if picks.is_none_or(|n| n > MAX_LENGTH) {
            let span = indices[0].span.to(indices[indices.len() - 1].span);
            let count = picks.map_or_else(|| "too many".to_string(), |n| n.to_string());
            return Err(Diagnostic::new(
                format!("these indices pick {count} elements, more than the limit of {MAX_LENGTH} for one value"),
                span,
            ));
        }
        let stride = if dims.len() == 2 { dims[1] } else { 1 };
        let mut positions = Vec::new();
        for &i in &axes[0].0 {
            match axes.get(1) {
                Some((columns, _)) => positions.extend(columns.iter().map(|&j| i * stride + j)),
                None => positions.push(i),
            }
        }
        let kept: Vec<usize> = axes.iter().filter(|(_, keep)| *keep).map(|(p, _)| p.len()).collect();
        let shape = match kept.as_slice() {
            [] => Shape::Scalar,
            [n] => Shape::Vector(*n),
            [r, c] => Shape::Matrix(*r, *c),
            _ => unreachable!("at most two axes"),
        };
        let constant = node.constant;
        Ok(Node { kind: NodeKind::Gather(Box::new(node), positions), shape, constant })
    }

    fn call(&mut self, func: &Ident, args: &[Expr], span: Span) -> Result<Node, Diagnostic> {
        let name = func.name.as_str();
        if Family::from_name(name).is_some() || name == MVNORMAL {
            return Err(Diagnostic::new(format!("`{name}` is a distribution and needs its variable first"), span)
                .expected(format!("`{name}(x; …)`: the variable, then `;`, then the parameters")));
        }
        let Some(builtin) = builtins::lookup(name) else {
            let known = builtins::FUNCTIONS.iter().map(|f| f.0).chain(Family::ALL.iter().map(|f| f.name()));
            let mut d = Diagnostic::new(format!("unknown function `{name}`"), func.span)
                .expected("a function such as `exp`, `log`, `sum` or a distribution such as `normal`");
            if let Some(similar) = did_you_mean(name, known.chain([MVNORMAL])) {
                d = d.help(format!("did you mean `{similar}`?"));
            }
            return Err(d);
        };
        let arity = |n: usize| -> Result<(), Diagnostic> {
            if args.len() == n {
                return Ok(());
            }
            let s = if n == 1 { "" } else { "s" };
            Err(Diagnostic::new(format!("`{name}` takes {n} argument{s}, not {}", args.len()), span))
        };
        let arg = |this: &mut Self, i: usize| this.expr(&args[i]);
        match builtin {
            Builtin::Unary(f) => {
                arity(1)?;
                Ok(map(f, arg(self, 0)?))
            }
            Builtin::Pow => {
                arity(2)?;
                let (a, b) = (arg(self, 0)?, arg(self, 1)?);
                elementwise(BinaryFn::Pow, a, b, args[0].span, args[1].span)
            }
            Builtin::MinMax(reduce, pairwise) => match args.len() {
                1 => Ok(reduce_node(reduce, arg(self, 0)?)),
                _ => {
                    arity(2)?;
                    let (a, b) = (arg(self, 0)?, arg(self, 1)?);
                    elementwise(pairwise, a, b, args[0].span, args[1].span)
                }
            },
            Builtin::Reduce(f) => {
                arity(1)?;
                Ok(reduce_node(f, arg(self, 0)?))
            }
            Builtin::Dot => {
                arity(2)?;
                let (a, b) = (arg(self, 0)?, arg(self, 1)?);
                match (a.shape, b.shape) {
                    (Shape::Vector(n), Shape::Vector(m)) if n == m => {
                        let constant = a.constant && b.constant;
                        Ok(Node { kind: NodeKind::Dot(Box::new(a), Box::new(b)), shape: Shape::Scalar, constant })
                    }
                    (sa, sb) => Err(Diagnostic::new(
                        format!("`dot` needs two lists of one length, not {} and {}", sa.describe(), sb.describe()),
                        span,
                    )),
                }
            }
            Builtin::MatVec => {
                arity(2)?;
                let (m, v) = (arg(self, 0)?, arg(self, 1)?);
                match (m.shape, v.shape) {
                    (Shape::Matrix(r, c), Shape::Vector(n)) if c == n => {
                        let constant = m.constant && v.constant;
                        Ok(Node { kind: NodeKind::MatVec(Box::new(m), Box::new(v)), shape: Shape::Vector(r), constant })
                    }
                    (sm, sv) => Err(Diagnostic::new(
                        format!(
                            "`matvec` needs a matrix with as many columns as the list has elements, not {} and {}",
                            sm.describe(),
                            sv.describe()
                        ),
                        span,
                    )
                    .expected("`matvec(M, v)` with M an r×c matrix and v a list of c")),
                }
            }
        }
    }

    /// `f(x; θ…)` as the scalar Σ log f(xᵢ; θᵢ).
    fn expr_log_density(&mut self, e: &Expr) -> Result<Node, Diagnostic> {
        let ExprKind::Call { func, variate: Some(variate), args } = &e.kind else {
            unreachable!("called on distribution calls only")
        };
        let name = func.name.as_str();
        if name == MVNORMAL {
            return self.mvnormal(variate, args, e.span);
        }
        let Some(family) = Family::from_name(name) else {
            let mut d = Diagnostic::new(format!("unknown distribution `{name}`"), func.span)
                .expected("a distribution such as `normal`, `gamma` or `poisson`");
            let names = Family::ALL.iter().map(|f| f.name()).chain([MVNORMAL]);
            if let Some(similar) = did_you_mean(name, names) {
                d = d.help(format!("did you mean `{similar}`?"));
            } else if builtins::lookup(name).is_some() {
                d = d.help(format!("`{name}` is a function: write `{name}(…)` without `;`"));
            }
            return Err(d);
        };
        let names = family.params();
        if args.len() != names.len() {
            return Err(Diagnostic::new(
                format!(
                    "`{name}` takes {} parameter{} after `;`, not {}",
                    names.len(),
                    if names.len() == 1 { "" } else { "s" },
                    args.len()
                ),
                e.span,
            )
            .expected(format!("`{name}(x; {})`", names.join(", "))));
        }
        let x = self.expr(variate)?;
        let params = args.iter().map(|a| self.expr(a)).collect::<Result<Vec<_>, _>>()?;
        // Every argument is a number or a list; lists must share one length.
        let mut length: Option<(usize, Span)> = None;
        for (node, arg) in std::iter::once((&x, variate.as_ref())).chain(params.iter().zip(args)) {
            match node.shape {
                Shape::Scalar => {}
                Shape::Vector(n) => match length {
                    Some((m, first)) if m != n => {
                        return Err(Diagnostic::new(
                            format!("this list has {n} elements but an earlier one has {m}"),
                            arg.span,
                        )
                        .help(format!(
                            "the earlier list is at column {}",
                            Position::of(self.source, first.start).column
                        ))
                        .expected("lists of one length, or single numbers that apply to every element"));
                    }
                    _ => length = Some((n, arg.span)),
                },
                Shape::Matrix(..) => {
                    return Err(Diagnostic::new(format!("`{name}` takes numbers or lists, not a matrix"), arg.span));
                }
            }
        }
        if x.constant {
            self.check_variate(family, &x, &params, variate)?;
        } else if matches!(family.variate(), Variate::Count | Variate::Binary) {
            return Err(Diagnostic::new(
                format!("`{name}` is a distribution of counts and needs data as its variable"),
                variate.span,
            )
            .expected("whole numbers known before sampling"));
        }
        let constant = x.constant && params.iter().all(|p| p.constant);
        Ok(Node { kind: NodeKind::LogDensity { family, x: Box::new(x), params }, shape: Shape::Scalar, constant })
    }

    /// Data given to a distribution must lie in its support, or the density is zero everywhere.
    fn check_variate(&mut self, family: Family, x: &Node, params: &[Node], span_of: &Expr) -> Result<(), Diagnostic> {
        let values = self.evaluate(x);
        let inside: Box<dyn Fn(f64, usize) -> bool> = match family.variate() {
            Variate::BetweenParams if params[0].constant && params[1].constant => {
                let (lo, hi) = (self.evaluate(&params[0]), self.evaluate(&params[1]));
                let at = |v: &[f64], i: usize| if v.len() == 1 { v[0] } else { v[i] };
                Box::new(move |v, i| v >= at(&lo, i) && v <= at(&hi, i))
            }
            Variate::BetweenParams => Box::new(|_, _| true),
            variate => Box::new(move |v, _| variate.contains(v)),
        };
        if let Some(i) = values.iter().enumerate().position(|(i, &v)| !inside(v, i)) {
            let which = if values.len() == 1 { String::new() } else { format!(" (element {})", i + 1) };
            return Err(Diagnostic::new(
                format!("the value {}{which} is outside the support of `{}`", values[i], family.name()),
                span_of.span,
            )
            .expected(variate_words(family.variate())));
        }
        Ok(())
    }

    fn mvnormal(&mut self, variate: &Expr, args: &[Expr], span: Span) -> Result<Node, Diagnostic> {
        if args.len() != 2 {
            return Err(Diagnostic::new(format!("`mvnormal` takes 2 parameters after `;`, not {}", args.len()), span)
                .expected("`mvnormal(x; mean, covariance)`"));
        }
        let x = self.expr(variate)?;
        let Shape::Vector(d) = x.shape else {
            return Err(Diagnostic::new(format!("the variable of `mvnormal` is {}", x.shape.describe()), variate.span)
                .expected("a list"));
        };
        let mean = self.expr(&args[0])?;
        if !matches!(mean.shape, Shape::Scalar) && mean.shape != Shape::Vector(d) {
            return Err(Diagnostic::new(
                format!("the mean is {} but the variable is a list of {d}", mean.shape.describe()),
                args[0].span,
            )
            .expected(format!("a number or a list of {d}")));
        }
        let cov = self.expr(&args[1])?;
        if cov.shape != Shape::Matrix(d, d) {
            return Err(Diagnostic::new(format!("the covariance is {}", cov.shape.describe()), args[1].span)
                .expected(format!("a {d}×{d} matrix")));
        }
        if !cov.constant {
            return Err(Diagnostic::new("the covariance of `mvnormal` must be data", args[1].span)
                .expected("a matrix known before sampling"));
        }
        // Factorising takes time cubic in d: once per named covariance, however often it is used.
        let named = match cov.kind {
            NodeKind::Constant(i) => Some(i),
            _ => None,
        };
        let index = match named.and_then(|i| self.factorised.get(&i)) {
            Some(&index) => index,
            None => {
                // The factor is kept as data; count it before factorising.
                self.hold_data(d * d, args[1].span)?;
                let values = self.evaluate(&cov);
                let dist = MvNormal::new(&values, d)
                    .map_err(|why| Diagnostic::new(format!("this covariance {why}"), args[1].span))?;
                self.mvnormals.push(dist);
                let index = self.mvnormals.len() - 1;
                if let Some(i) = named {
                    self.factorised.insert(i, index);
                }
                index
            }
        };
        let constant = x.constant && mean.constant;
        let kind = NodeKind::MvNormal { index, x: Box::new(x), mean: Box::new(mean) };
        Ok(Node { kind, shape: Shape::Scalar, constant })
    }
}

/// Rows, columns and row-major values of `[[…], […], …]` when every row is a non-empty list of
/// literal numbers and all rows have one length; anything else is left to the general path,
/// which explains what is wrong.
fn literal_matrix(items: &[Expr]) -> Option<(usize, usize, Vec<f64>)> {
    let columns = match &items.first()?.kind {
        ExprKind::List(row) if !row.is_empty() => row.len(),
        _ => return None,
    };
    let mut values = Vec::new();
    for item in items {
        match &item.kind {
            ExprKind::List(row) if row.len() == columns => {
                for e in row {
                    values.push(literal_number(e)?);
                }
            }
            _ => return None,
        }
    }
    Some((items.len(), columns, values))
}

/// The number a literal such as `3` or `-2.5` stands for.
fn literal_number(e: &Expr) -> Option<f64> {
    match &e.kind {
        ExprKind::Number(v) => Some(*v),
        ExprKind::Neg(inner) => literal_number(inner).map(|v| -v),
        _ => None,
    }
}

fn variate_words(variate: Variate) -> &'static str {
    match variate {
        Variate::Real => "finite numbers",
        Variate::NonNegative => "numbers of at least 0",
        Variate::Positive => "numbers above 0",
        Variate::Unit => "numbers between 0 and 1",
        Variate::Count => "whole numbers of at least 0",
        Variate::Binary => "0 or 1",
        Variate::BetweenParams => "numbers between the lower and upper bound",
    }
}

fn map(f: UnaryFn, x: Node) -> Node {
    let (shape, constant) = (x.shape, x.constant);
    Node { kind: NodeKind::Map(f, Box::new(x)), shape, constant }
}

fn zip(f: BinaryFn, a: Node, b: Node) -> Node {
    let shape = if a.shape == Shape::Scalar { b.shape } else { a.shape };
    let constant = a.constant && b.constant;
    Node { kind: NodeKind::Zip(f, Box::new(a), Box::new(b)), shape, constant }
}

fn reduce_node(f: ReduceFn, x: Node) -> Node {
    let constant = x.constant;
    Node { kind: NodeKind::Reduce(f, Box::new(x)), shape: Shape::Scalar, constant }
}

/// A vector factor contributes the product of its elements: the sum of their logs.
fn sum_if_many(x: Node) -> Node {
    if x.shape == Shape::Scalar { x } else { reduce_node(ReduceFn::Sum, x) }
}

/// `a ∘ b` element by element; a single number applies to every element of the other side.
fn elementwise(f: BinaryFn, a: Node, b: Node, sa: Span, sb: Span) -> Result<Node, Diagnostic> {
    if a.shape == b.shape || a.shape == Shape::Scalar || b.shape == Shape::Scalar {
        return Ok(zip(f, a, b));
    }
    Err(Diagnostic::new(
        format!("the left side is {} and the right side is {}", a.shape.describe(), b.shape.describe()),
        sa.to(sb),
    )
    .expected("two values of one shape, or a single number with a list")
    .help("for a matrix–vector product write `matvec(M, v)`"))
}
