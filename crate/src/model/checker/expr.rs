//! Values: numbers, names, arithmetic, lists, ranges, indexing and function calls.
//!
//! Inside the body of a `for` whose terms are computed all at once, a node may hold one value
//! per term ([`Node::per_index`]); every operation here either knows how to combine such a node
//! with the others or asks for the body to be checked term by term ([`Fault::Unroll`]).

use super::*;
use crate::lang::ast::ExprKind;
use crate::lang::diagnostic::did_you_mean;
use crate::lang::print::number;
use crate::model::builtins::{self, Builtin};

impl Checker<'_> {
    /// The checked node of an expression, its elements counted against [`MAX_WORK`].
    pub(super) fn expr(&mut self, e: &Expr) -> Checked<Node> {
        let node = self.expr_node(e)?;
        self.charge(&node, e.span)?;
        Ok(node)
    }

    fn expr_node(&mut self, e: &Expr) -> Checked<Node> {
        match &e.kind {
            ExprKind::Number(v) => self.constant(Shape::Scalar, vec![*v], e.span),
            ExprKind::Name(name) => self.name(name, e.span),
            ExprKind::List(items) => self.list(items, e.span),
            ExprKind::Neg(inner) => Ok(map(UnaryFn::Neg, self.expr(inner)?)),
            ExprKind::Binary(op, a, b) => {
                let f = match op {
                    crate::lang::ast::BinOp::Add => BinaryFn::Add,
                    crate::lang::ast::BinOp::Sub => BinaryFn::Sub,
                    crate::lang::ast::BinOp::Mul => BinaryFn::Mul,
                    crate::lang::ast::BinOp::Div => BinaryFn::Div,
                    crate::lang::ast::BinOp::Pow => BinaryFn::Pow,
                };
                let (x, y) = (self.expr(a), self.expr(b));
                let (x, y) = self.both(x, y)?;
                elementwise(f, x, y, a.span, b.span)
            }
            ExprKind::Index(base, indices) => self.index(base, indices),
            ExprKind::Range(Some(lo), Some(hi)) => self.range(lo, hi, e.span),
            ExprKind::Range(..) => {
                Err(Diagnostic::new("a range with an open end only means something in `[…]`", e.span)
                    .expected("both ends, `a:b`")
                    .help("inside brackets `y[2:]` runs to the last element and `y[:k]` from the first")
                    .into())
            }
            ExprKind::Call { variate: Some(_), .. } => Ok(map(UnaryFn::Exp, self.log_density_call(e)?)),
            ExprKind::Call { func, variate: None, args } => self.call(func, args, e.span),
            ExprKind::For(terms) => self.list_terms(terms, e.span),
            ExprKind::Across { func, terms } => self.reduce_terms(func, terms, e.span),
        }
    }

    pub(super) fn name(&mut self, name: &str, span: Span) -> Checked<Node> {
        if let Some(index) = self.indices.iter().rev().find(|i| i.name == name) {
            return match &index.value {
                IndexValue::Term(node) => Ok(node.clone()),
                IndexValue::PerTerm { node, lane } if self.lane.map(|l| l.id) == Some(*lane) => Ok(node.clone()),
                // An enclosing `for`'s index inside a nested one: the nested one goes term by term.
                IndexValue::PerTerm { .. } => Err(Fault::Unroll),
            };
        }
        if let Some(binding) = self.bindings.get(name) {
            let (kind, shape, constant) = match *binding {
                Binding::Constant(i) => (NodeKind::Constant(i), self.constants[i].shape, true),
                Binding::Parameter(i) => (NodeKind::Parameter(i), self.parameters[i].shape, false),
                Binding::Derived(i) => (NodeKind::Derived(i), self.derived[i].node.shape, false),
            };
            return Ok(Node { kind, shape, constant, per_index: false });
        }
        if self.broken.contains(name) {
            return Err(Fault::Reported);
        }
        if let Some(defined) = self.defined_at.get(name) {
            return Err(Diagnostic::new(format!("`{name}` is used before it is defined"), span)
                .help(format!("`{name}` is defined on line {}; move that line above this one", self.line_of(*defined)))
                .into());
        }
        if name == "pi" {
            return self.constant(Shape::Scalar, vec![std::f64::consts::PI], span);
        }
        if builtins::lookup(name).is_some() || links::written(name).is_some() || name == MvNormal::NAME {
            return Err(Diagnostic::new(format!("`{name}` is a function or distribution, not a value"), span)
                .expected(format!("a call such as `{name}(…)`, or a value of the model"))
                .into());
        }
        let mut d =
            Diagnostic::new(format!("unknown name `{name}`"), span).expected("a data name, a parameter or a number");
        let names = self.bindings.keys().map(String::as_str).chain(self.indices.iter().map(|i| i.name.as_str()));
        if let Some(similar) = did_you_mean(name, names) {
            d = d.help(format!("did you mean `{similar}`?"));
        }
        Err(d.into())
    }

    fn list(&mut self, items: &[Expr], span: Span) -> Checked<Node> {
        if items.is_empty() {
            return Err(Diagnostic::new("an empty list", span).expected("at least one element").into());
        }
        // Lists of plain numbers (data) become one constant directly.
        let too_long = || Fault::from(Diagnostic::new(format!("the list has more than {MAX_LENGTH} elements"), span));
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
        let nodes = items.iter().map(|item| self.expr(item)).collect();
        let nodes = self.all(nodes)?;
        if nodes.iter().any(|n| n.per_index) {
            return Err(Fault::Unroll);
        }
        let shape = match nodes[0].shape {
            Shape::Scalar => Shape::Vector(nodes.len()),
            Shape::Vector(n) => Shape::Matrix(nodes.len(), n),
            Shape::Matrix(..) => {
                return Err(Diagnostic::new("lists nest at most two deep (a matrix)", items[0].span)
                    .expected("a number or a row of numbers")
                    .into());
            }
        };
        for (node, item) in nodes.iter().zip(items) {
            if node.shape != nodes[0].shape {
                return Err(Diagnostic::new(
                    format!("this element is {} but the first is {}", node.shape.describe(), nodes[0].shape.describe()),
                    item.span,
                )
                .expected("elements of one shape: all numbers, or rows of equal length")
                .into());
            }
        }
        // Rows × columns, checked before anything multiplies them (a 32-bit `usize` overflows).
        if nodes.len().checked_mul(nodes[0].shape.len()).is_none_or(|n| n > MAX_LENGTH) {
            return Err(too_long());
        }
        let constant = nodes.iter().all(|n| n.constant);
        Ok(Node { kind: NodeKind::Stack(nodes), shape, constant, per_index: false })
    }

    /// `lo:hi`, the whole numbers from lo to hi; empty when hi is lo − 1.
    fn range(&mut self, lo: &Expr, hi: &Expr, span: Span) -> Checked<Node> {
        let (a, b) = (self.range_end(lo), self.range_end(hi));
        let (a, b) = self.both(a, b)?;
        self.whole_range(a, b, lo.span.to(hi.span), span)
    }

    /// One end of a range: a whole number known before sampling (per term of a `for`, the
    /// range's length would differ between terms, so those are checked one by one).
    fn range_end(&mut self, e: &Expr) -> Checked<f64> {
        let node = self.expr(e)?;
        if node.per_index {
            return Err(Fault::Unroll);
        }
        self.known(&node, e, "the end of a range")?;
        match self.evaluate(&node).as_slice() {
            [v] if v.fract() == 0.0 && v.abs() <= 9.0e15 => Ok(*v),
            [v] => Err(Diagnostic::new(format!("the end of a range is {}", number(*v)), e.span)
                .expected("a whole number")
                .into()),
            _ => Err(Diagnostic::new(format!("the end of a range is {}", node.shape.describe()), e.span)
                .expected("a single whole number")
                .into()),
        }
    }

    fn whole_range(&mut self, lo: f64, hi: f64, ends: Span, span: Span) -> Checked<Node> {
        if hi < lo - 1.0 {
            return Err(Diagnostic::new(format!("the range {}:{} runs backwards", number(lo), number(hi)), ends)
                .expected("a:b with b ≥ a (or b = a − 1 for an empty range)")
                .into());
        }
        let len = hi - lo + 1.0;
        if len > MAX_LENGTH as f64 {
            return Err(Diagnostic::new(
                format!(
                    "the range {}:{} has {} elements, more than the limit of {MAX_LENGTH} for one value",
                    number(lo),
                    number(hi),
                    number(len)
                ),
                ends,
            )
            .into());
        }
        let values: Vec<f64> = (0..len as usize).map(|k| lo + k as f64).collect();
        self.constant(Shape::Vector(values.len()), values, span)
    }

    fn index(&mut self, base: &Expr, indices: &[Expr]) -> Checked<Node> {
        let node = self.expr(base)?;
        if node.per_index {
            return Err(Fault::Unroll);
        }
        let described = match &base.kind {
            ExprKind::Name(n) => format!("`{n}`"),
            _ => "this value".into(),
        };
        let dims = node.shape.dims();
        if dims.is_empty() {
            return Err(Diagnostic::new(
                format!("{described} is a single number and has no elements to pick"),
                base.span,
            )
            .into());
        }
        if indices.is_empty() || indices.len() > dims.len() {
            let span = indices.first().map_or(base.span, |first| first.span.to(indices[indices.len() - 1].span));
            return Err(Diagnostic::new(
                format!("{described} is {} but {} indices are given", node.shape.describe(), indices.len()),
                span,
            )
            .expected(if dims.len() == 1 { "one index" } else { "one index (a row) or two (row, column)" })
            .into());
        }
        // Each index: the 0-based positions it picks along its axis (one per term when it is
        // per term), and whether it keeps the axis.
        let mut axes = Vec::new();
        let mut faults = Vec::new();
        for (index, &extent) in indices.iter().zip(&dims) {
            match self.axis(index, extent, &described) {
                Ok(axis) => axes.push(axis),
                Err(fault) => faults.push(fault),
            }
        }
        if !faults.is_empty() {
            return Err(self.worst(faults.into_iter()));
        }
        // A single index into a matrix picks whole rows.
        if dims.len() == 2 && indices.len() == 1 {
            axes.push(Axis { picked: (0..dims[1]).collect(), keep: true, per_term: false });
        }
        let stride = if dims.len() == 2 { dims[1] } else { 1 };
        if axes.iter().any(|a| a.per_term) {
            // One element per term: every other axis must pick one element too.
            if axes.iter().any(|a| a.keep || (!a.per_term && a.picked.len() != 1)) {
                return Err(Fault::Unroll);
            }
            let terms = axes.iter().find(|a| a.per_term).map_or(0, |a| a.picked.len());
            let at = |a: &Axis, k: usize| if a.per_term { a.picked[k] } else { a.picked[0] };
            let positions: Vec<usize> = (0..terms)
                .map(|k| if axes.len() == 2 { at(&axes[0], k) * stride + at(&axes[1], k) } else { at(&axes[0], k) })
                .collect();
            let constant = node.constant;
            let kind = NodeKind::Gather(Box::new(node), positions);
            return Ok(Node { kind, shape: Shape::Vector(terms), constant, per_index: true });
        }
        // `M[i, j]` picks len(i)·len(j) elements: refuse too many before making the list of them.
        let picks = axes.iter().try_fold(1usize, |n, a| n.checked_mul(a.picked.len()));
        if picks.is_none_or(|n| n > MAX_LENGTH) {
            let span = indices[0].span.to(indices[indices.len() - 1].span);
            let count = picks.map_or_else(|| "too many".to_string(), |n| n.to_string());
            return Err(Diagnostic::new(
                format!("these indices pick {count} elements, more than the limit of {MAX_LENGTH} for one value"),
                span,
            )
            .into());
        }
        let mut positions = Vec::new();
        for &i in &axes[0].picked {
            match axes.get(1) {
                Some(columns) => positions.extend(columns.picked.iter().map(|&j| i * stride + j)),
                None => positions.push(i),
            }
        }
        let kept: Vec<usize> = axes.iter().filter(|a| a.keep).map(|a| a.picked.len()).collect();
        let shape = match kept.as_slice() {
            [] => Shape::Scalar,
            [n] => Shape::Vector(*n),
            [r, c] => Shape::Matrix(*r, *c),
            _ => unreachable!("at most two axes"),
        };
        // Picking every element in order is the value itself.
        if shape == node.shape && positions.iter().enumerate().all(|(k, &p)| k == p) {
            return Ok(node);
        }
        let constant = node.constant;
        Ok(Node { kind: NodeKind::Gather(Box::new(node), positions), shape, constant, per_index: false })
    }

    /// What one index picks along an axis of `extent` elements.
    fn axis(&mut self, index: &Expr, extent: usize, described: &str) -> Checked<Axis> {
        let open = |e: &Option<Box<Expr>>| e.is_none();
        if let ExprKind::Range(lo, hi) = &index.kind
            && (open(lo) || open(hi))
        {
            let lo = match lo {
                Some(e) => self.range_end(e),
                None => Ok(1.0),
            };
            let hi = match hi {
                Some(e) => self.range_end(e),
                None => Ok(extent as f64),
            };
            let (lo, hi) = self.both(lo, hi)?;
            let node = self.whole_range(lo, hi, index.span, index.span)?;
            let values = self.evaluate(&node);
            let picked = self.positions(&values, index, extent, described)?;
            return Ok(Axis { picked, keep: true, per_term: false });
        }
        let node = self.expr(index)?;
        self.known(&node, index, "an index")?;
        let values = self.evaluate(&node);
        let picked = self.positions(&values, index, extent, described)?;
        Ok(Axis { picked, keep: node.shape != Shape::Scalar && !node.per_index, per_term: node.per_index })
    }

    /// 0-based positions of 1-based indices, each checked to lie in `1..=extent`.
    fn positions(&self, values: &[f64], index: &Expr, extent: usize, described: &str) -> Checked<Vec<usize>> {
        values
            .iter()
            .map(|&v| {
                if v.fract() == 0.0 && v >= 1.0 && v <= extent as f64 {
                    Ok(v as usize - 1)
                } else {
                    Err(Diagnostic::new(format!("index {} is out of range", number(v)), index.span)
                        .expected(format!("a whole number from 1 to {extent}: {described} has {extent} there"))
                        .into())
                }
            })
            .collect()
    }

    fn call(&mut self, func: &Ident, args: &[Expr], span: Span) -> Checked<Node> {
        let name = func.name.as_str();
        let Some(builtin) = builtins::lookup(name) else {
            return Err(self.not_a_function(func, span).into());
        };
        // The log of a density is its log density, without the round trip through exp.
        if let (Builtin::Unary(UnaryFn::Log), [arg @ Expr { kind: ExprKind::Call { variate: Some(_), .. }, .. }]) =
            (builtin, args)
        {
            return self.log_density_call(arg);
        }
        let arity = |n: usize| -> Checked<()> {
            if args.len() == n {
                return Ok(());
            }
            let s = if n == 1 { "" } else { "s" };
            Err(Diagnostic::new(format!("`{name}` takes {n} argument{s}, not {}", args.len()), span).into())
        };
        let checked = args.iter().map(|a| self.expr(a)).collect();
        let mut nodes = self.all(checked)?;
        match builtin {
            Builtin::Unary(f) => {
                arity(1)?;
                Ok(map(f, nodes.remove(0)))
            }
            Builtin::Pow => {
                arity(2)?;
                let (a, b) = (nodes.remove(0), nodes.remove(0));
                elementwise(BinaryFn::Pow, a, b, args[0].span, args[1].span)
            }
            Builtin::MinMax(_, pairwise) if nodes.len() == 2 => {
                let (a, b) = (nodes.remove(0), nodes.remove(0));
                elementwise(pairwise, a, b, args[0].span, args[1].span)
            }
            Builtin::MinMax(f, _) | Builtin::Reduce(f) => {
                arity(1)?;
                let x = nodes.remove(0);
                if x.per_index {
                    // One number per term: its sum, mean, … is itself.
                    return Ok(x);
                }
                if x.shape.is_empty() && matches!(f, ReduceFn::Mean | ReduceFn::Min | ReduceFn::Max) {
                    return Err(Diagnostic::new(format!("`{name}` of an empty list"), args[0].span)
                        .expected("a list with at least one element")
                        .into());
                }
                Ok(reduce_node(f, x))
            }
            Builtin::Length => {
                arity(1)?;
                let x = &nodes[0];
                let n = match x.shape {
                    _ if x.per_index => 1,
                    Shape::Matrix(rows, _) => rows,
                    shape => shape.len(),
                };
                self.constant(Shape::Scalar, vec![n as f64], span)
            }
            Builtin::CumSum => {
                arity(1)?;
                let x = nodes.remove(0);
                self.list_argument(name, &x, &args[0])?;
                let (shape, constant) = (x.shape, x.constant);
                Ok(Node { kind: NodeKind::CumSum(Box::new(x)), shape, constant, per_index: false })
            }
            Builtin::Diff => {
                if !(1..=2).contains(&args.len()) {
                    return Err(Diagnostic::new(format!("`diff` takes 1 or 2 arguments, not {}", args.len()), span)
                        .expected("`diff(x)` or `diff(x, lag)`")
                        .into());
                }
                let x = nodes.remove(0);
                let n = self.list_argument(name, &x, &args[0])?;
                let lag = match (nodes.first(), args.get(1)) {
                    (Some(node), Some(e)) => self.lag(node, e)?,
                    _ => 1,
                };
                if lag > n {
                    return Err(Diagnostic::new(format!("a lag of {lag} is longer than the list of {n}"), span).into());
                }
                let later = gather(x.clone(), (lag..n).collect());
                let earlier = gather(x, (0..n - lag).collect());
                Ok(zip(BinaryFn::Sub, later, earlier))
            }
            Builtin::Dot => {
                arity(2)?;
                let (a, b) = (nodes.remove(0), nodes.remove(0));
                if a.per_index || b.per_index {
                    return Err(Fault::Unroll);
                }
                match (a.shape, b.shape) {
                    (Shape::Vector(n), Shape::Vector(m)) if n == m => {
                        let constant = a.constant && b.constant;
                        let kind = NodeKind::Dot(Box::new(a), Box::new(b));
                        Ok(Node { kind, shape: Shape::Scalar, constant, per_index: false })
                    }
                    (sa, sb) => Err(Diagnostic::new(
                        format!("`dot` needs two lists of one length, not {} and {}", sa.describe(), sb.describe()),
                        span,
                    )
                    .into()),
                }
            }
            Builtin::MatVec => {
                arity(2)?;
                let (m, v) = (nodes.remove(0), nodes.remove(0));
                if m.per_index || v.per_index {
                    return Err(Fault::Unroll);
                }
                match (m.shape, v.shape) {
                    (Shape::Matrix(r, c), Shape::Vector(n)) if c == n => {
                        let constant = m.constant && v.constant;
                        let kind = NodeKind::MatVec(Box::new(m), Box::new(v));
                        Ok(Node { kind, shape: Shape::Vector(r), constant, per_index: false })
                    }
                    (sm, sv) => Err(Diagnostic::new(
                        format!(
                            "`matvec` needs a matrix with as many columns as the list has elements, not {} and {}",
                            sm.describe(),
                            sv.describe()
                        ),
                        span,
                    )
                    .expected("`matvec(M, v)` with M an r×c matrix and v a list of c")
                    .into()),
                }
            }
        }
    }

    /// The lag of `diff(x, lag)`: a whole number of at least 1, known before sampling.
    fn lag(&self, node: &Node, e: &Expr) -> Checked<usize> {
        self.known(node, e, "the lag of `diff`")?;
        match self.evaluate(node).as_slice() {
            [v] if v.fract() == 0.0 && *v >= 1.0 && *v <= MAX_LENGTH as f64 && !node.per_index => Ok(*v as usize),
            _ => Err(Diagnostic::new("the lag of `diff` must be a whole number of at least 1", e.span).into()),
        }
    }

    /// The length of a list argument of `cumsum` or `diff`; per term, they go term by term.
    fn list_argument(&self, name: &str, x: &Node, arg: &Expr) -> Checked<usize> {
        match x.shape {
            _ if x.per_index => Err(Fault::Unroll),
            Shape::Vector(n) => Ok(n),
            shape => Err(Diagnostic::new(format!("`{name}` takes a list, not {}", shape.describe()), arg.span).into()),
        }
    }

    /// Why `func(…)` is not a function call: a distribution without its variable, one of the
    /// model's values, or an unknown name.
    pub(super) fn not_a_function(&self, func: &Ident, span: Span) -> Diagnostic {
        let name = func.name.as_str();
        if links::written(name).is_some() || name == MvNormal::NAME {
            return Diagnostic::new(format!("`{name}` is a distribution and needs its variable first"), span)
                .expected(format!("`{name}(x; …)`: the variable, then `;`, then the parameters"));
        }
        let value = match self.bindings.get(name) {
            Some(Binding::Constant(_)) => Some("data"),
            Some(Binding::Parameter(_)) => Some("a parameter"),
            Some(Binding::Derived(_)) => Some("a value computed from the parameters"),
            None if self.indices.iter().any(|i| i.name == name) => Some("an index"),
            None => None,
        };
        if let Some(what) = value {
            return Diagnostic::new(format!("`{name}` is {what}, not a function"), func.span)
                .help(format!("a product is written with `*`: `{name} * (…)`"));
        }
        let known = builtins::FUNCTIONS.iter().map(|f| f.0).chain(links::written_names()).chain([MvNormal::NAME]);
        let mut d = Diagnostic::new(format!("unknown function `{name}`"), func.span)
            .expected("a function such as `exp`, `log`, `sum` or a distribution such as `normal`");
        if let Some(similar) = did_you_mean(name, known) {
            d = d.help(format!("did you mean `{similar}`?"));
        }
        d
    }
}

/// What an index picks along one axis.
struct Axis {
    picked: Vec<usize>,
    keep: bool,
    /// One position per term of the `for` being computed all at once.
    per_term: bool,
}

/// `x` at 0-based `positions`, a list.
fn gather(x: Node, positions: Vec<usize>) -> Node {
    let constant = x.constant;
    let shape = Shape::Vector(positions.len());
    Node { kind: NodeKind::Gather(Box::new(x), positions), shape, constant, per_index: false }
}

/// `a ∘ b` element by element; a single number applies to every element of the other side.
/// A value per term combines with a single number or another value per term.
pub(super) fn elementwise(f: BinaryFn, a: Node, b: Node, sa: Span, sb: Span) -> Checked<Node> {
    if a.per_index || b.per_index {
        let fits = |n: &Node| n.per_index || n.shape == Shape::Scalar;
        return if fits(&a) && fits(&b) { Ok(zip(f, a, b)) } else { Err(Fault::Unroll) };
    }
    if a.shape == b.shape || a.shape == Shape::Scalar || b.shape == Shape::Scalar {
        return Ok(zip(f, a, b));
    }
    Err(Diagnostic::new(
        format!("the left side is {} and the right side is {}", a.shape.describe(), b.shape.describe()),
        sa.to(sb),
    )
    .expected("two values of one shape, or a single number with a list")
    .help("for a matrix–vector product write `matvec(M, v)`")
    .into())
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
