//! The `for` forms: `[E for i in L]`, a reduction `f(E for i in L)`, and in the density a
//! product, sum or mean of factors over an index.
//!
//! The body is first checked once for all terms at once, the index standing for the whole list
//! and every value that depends on it holding one number per term: a few column instructions
//! compute every term together. When a term's value is itself a list (a slice whose ends depend
//! on the index), or a nested `for` uses an enclosing index, that check asks to go term by term
//! instead; the body is then checked once per element, with the index a known number each time,
//! and the terms are combined by one instruction. Both give the same values.

use super::*;
use crate::lang::ast::Terms;

/// At most this many terms in all are checked one by one; past it a model is refused rather
/// than making checking slow.
pub const MAX_TERMS: usize = 1 << 17;

/// What the terms of a `for` become.
#[derive(Clone, Copy)]
enum Mode {
    /// `[E for i in L]`: the list of the terms.
    List,
    /// `f(E for i in L)` in a value: the terms combined by f, element by element.
    Reduce(ReduceFn),
    /// A product (`Sum` of logs), sum (`LogSumExp`) or mean (`Mean`) of factors in the density.
    Factor(ReduceFn),
}

impl Checker<'_> {
    pub(super) fn list_terms(&mut self, terms: &Terms, span: Span) -> Checked<Node> {
        self.terms(terms, Mode::List, span)
    }

    pub(super) fn reduce_terms(&mut self, func: &Ident, terms: &Terms, span: Span) -> Checked<Node> {
        let f = match func.name.as_str() {
            "sum" => ReduceFn::Sum,
            "prod" => ReduceFn::Prod,
            "mean" => ReduceFn::Mean,
            "min" => ReduceFn::Min,
            "max" => ReduceFn::Max,
            "logsumexp" => ReduceFn::LogSumExp,
            name => {
                let d = if builtins::lookup(name).is_some() {
                    Diagnostic::new(format!("`{name}` does not take a `for` directly"), func.span)
                        .help(format!("build the list first: `{name}([… for {} in …])`", terms.index.name))
                } else {
                    self.not_a_function(func, span)
                };
                return Err(d.expected("`sum`, `prod`, `mean`, `min`, `max` or `logsumexp` across the terms").into());
            }
        };
        self.terms(terms, Mode::Reduce(f), span)
    }

    /// `prod`, `sum` or `mean` of factors: the log of the product, sum or mean.
    pub(super) fn factor_terms(&mut self, func: &Ident, terms: &Terms, span: Span) -> Checked<Node> {
        let f = match func.name.as_str() {
            "prod" => ReduceFn::Sum,
            "sum" => ReduceFn::LogSumExp,
            _ => ReduceFn::Mean,
        };
        let node = self.terms(terms, Mode::Factor(f), span)?;
        self.charge(&node, span)?;
        Ok(node)
    }

    fn terms(&mut self, terms: &Terms, mode: Mode, span: Span) -> Checked<Node> {
        self.fresh_index(&terms.index)?;
        let over = self.expr(&terms.over)?;
        if over.per_index {
            return Err(Fault::Unroll);
        }
        let count = match over.shape {
            Shape::Vector(n) => n,
            Shape::Matrix(rows, _) => rows,
            Shape::Scalar => {
                return Err(Diagnostic::new("a `for` runs over a list, and this is a single number", terms.over.span)
                    .expected("a list or a range, as in `for i in 1:n`")
                    .into());
            }
        };
        let over = self.shared(over, terms.over.span)?;
        if let Shape::Vector(_) = over.shape {
            let checkpoint = self.checkpoint();
            match self.all_at_once(terms, mode, &over, count, span) {
                Err(Fault::Unroll) => self.restore(checkpoint),
                other => return other,
            }
        }
        self.one_by_one(terms, mode, &over, count, span)
    }

    /// An index must not hide a name of the model or an enclosing index.
    fn fresh_index(&self, index: &Ident) -> Checked<()> {
        let name = index.name.as_str();
        let taken = if self.indices.iter().any(|i| i.name == name) {
            Some("the index of an enclosing `for`".to_string())
        } else {
            self.defined_at.get(name).map(|at| format!("defined on line {}", self.line_of(*at)))
        };
        match taken {
            Some(what) => Err(Diagnostic::new(format!("`{name}` is already {what}"), index.span)
                .help("choose another name for the index")
                .into()),
            None => Ok(()),
        }
    }

    /// The list an index runs over, as a node that costs nothing to name again: data as one
    /// constant, anything computed from parameters as a hidden intermediate computed once.
    fn shared(&mut self, over: Node, span: Span) -> Checked<Node> {
        if matches!(over.kind, NodeKind::Constant(_) | NodeKind::Parameter(_) | NodeKind::Derived(_)) {
            return Ok(over);
        }
        if over.constant {
            let values = self.evaluate(&over);
            return self.constant(over.shape, values, span);
        }
        let shape = over.shape;
        self.derived.push(Derived { name: String::new(), node: over, reported: false });
        self.derived_at.push(span);
        Ok(Node { kind: NodeKind::Derived(self.derived.len() - 1), shape, constant: false, per_index: false })
    }

    fn body(&mut self, terms: &Terms, mode: Mode) -> Checked<Node> {
        match mode {
            Mode::Factor(_) => Ok(self.log_factor(&terms.body)?.node),
            Mode::List | Mode::Reduce(_) => self.expr(&terms.body),
        }
    }

    /// Every term at once; [`Fault::Unroll`] when the terms are not single numbers.
    fn all_at_once(&mut self, terms: &Terms, mode: Mode, over: &Node, count: usize, span: Span) -> Checked<Node> {
        let lane = Lane { id: self.lanes };
        self.lanes += 1;
        let outer = self.lane.replace(lane);
        let index = Node { per_index: true, ..over.clone() };
        let value = IndexValue::PerTerm { node: index, lane: lane.id };
        self.indices.push(Index { name: terms.index.name.clone(), value });
        let body = self.body(terms, mode);
        self.indices.pop();
        self.lane = outer;
        let body = body?;
        let column = if body.per_index {
            Node { per_index: false, ..body }
        } else if body.shape == Shape::Scalar {
            // The same number in every term.
            let constant = body.constant;
            let kind = NodeKind::Gather(Box::new(body), vec![0; count]);
            Node { kind, shape: Shape::Vector(count), constant, per_index: false }
        } else {
            return Err(Fault::Unroll);
        };
        self.charge(&column, span)?;
        let reduce = |f: ReduceFn, column: Node| reduce_node(f, column);
        match mode {
            Mode::List => Ok(column),
            Mode::Reduce(f) => {
                self.nonempty(count, f, mode, span)?;
                Ok(reduce(f, column))
            }
            Mode::Factor(ReduceFn::Mean) => {
                self.nonempty(count, ReduceFn::Mean, mode, span)?;
                let log_count = self.constant(Shape::Scalar, vec![libm::log(count as f64)], span)?;
                Ok(zip(BinaryFn::Sub, reduce(ReduceFn::LogSumExp, column), log_count))
            }
            Mode::Factor(f) => {
                self.nonempty(count, f, mode, span)?;
                Ok(reduce(f, column))
            }
        }
    }

    /// Means, extremes and sums of factors need at least one term.
    fn nonempty(&self, count: usize, f: ReduceFn, mode: Mode, span: Span) -> Checked<()> {
        let needs_one = match mode {
            Mode::Factor(f) => f != ReduceFn::Sum,
            _ => matches!(f, ReduceFn::Mean | ReduceFn::Min | ReduceFn::Max),
        };
        if count == 0 && needs_one {
            return Err(Diagnostic::new("this `for` has no terms: its list is empty", span)
                .expected("a list with at least one element")
                .into());
        }
        Ok(())
    }

    /// The terms one at a time, the index a known value in each.
    fn one_by_one(&mut self, terms: &Terms, mode: Mode, over: &Node, count: usize, span: Span) -> Checked<Node> {
        self.unrolled = self.unrolled.saturating_add(count);
        if self.unrolled > MAX_TERMS {
            return Err(Diagnostic::new(
                format!("this model has more than {MAX_TERMS} terms of `for` forms that are checked one at a time"),
                span,
            )
            .help(
                "a term that is one number (not a list) is computed for all terms at once, without this limit; \
                 a `for` nested in another counts each inner term once for every outer one",
            )
            .into());
        }
        let values = over.constant.then(|| self.evaluate(over));
        let row = match over.shape {
            Shape::Matrix(_, columns) => Some(columns),
            _ => None,
        };
        let mut nodes = Vec::with_capacity(count);
        for k in 0..count {
            let value = match (&values, row) {
                (Some(v), None) => self.constant(Shape::Scalar, vec![v[k]], terms.over.span)?,
                (Some(v), Some(c)) => {
                    self.constant(Shape::Vector(c), v[k * c..(k + 1) * c].to_vec(), terms.over.span)?
                }
                (None, None) => pick(over.clone(), vec![k], Shape::Scalar),
                (None, Some(c)) => pick(over.clone(), (k * c..(k + 1) * c).collect(), Shape::Vector(c)),
            };
            self.indices.push(Index { name: terms.index.name.clone(), value: IndexValue::Term(value) });
            let reported = self.errors.len();
            let body = self.body(terms, mode);
            self.indices.pop();
            let which = || match (&values, row) {
                (Some(v), None) => format!("in the term where `{}` is {}", terms.index.name, v[k]),
                _ => format!("in term {} of the `for`", k + 1),
            };
            match body {
                Ok(node) => nodes.push(node),
                Err(Fault::Error(d)) => return Err(d.note(which()).into()),
                Err(other) => {
                    for d in &mut self.errors[reported..] {
                        d.notes.push(which());
                    }
                    return Err(other);
                }
            }
        }
        let Some(first) = nodes.first() else {
            return Err(Diagnostic::new("this `for` has no terms, so what each term is cannot be known", span)
                .expected("a list with at least one element")
                .into());
        };
        let (shape, per_index) = (first.shape, first.per_index);
        if let Some(k) = nodes.iter().position(|n| n.shape != shape || n.per_index != per_index) {
            if nodes[k].per_index != per_index {
                return Err(Fault::Unroll);
            }
            return Err(Diagnostic::new(
                format!(
                    "the terms differ in shape: the first is {}, term {} is {}",
                    shape.describe(),
                    k + 1,
                    nodes[k].shape.describe()
                ),
                terms.body.span,
            )
            .expected("terms of one shape")
            .into());
        }
        let constant = nodes.iter().all(|n| n.constant);
        let fold = |f: BinaryFn, nodes: Vec<Node>| Node { kind: NodeKind::Fold(f, nodes), shape, constant, per_index };
        let node = match mode {
            Mode::List => {
                if per_index {
                    return Err(Fault::Unroll);
                }
                let stacked = match shape {
                    Shape::Scalar => Shape::Vector(count),
                    Shape::Vector(n) => Shape::Matrix(count, n),
                    Shape::Matrix(..) => {
                        return Err(Diagnostic::new("lists nest at most two deep: each term here is a matrix", span)
                            .expected("terms that are numbers or lists")
                            .into());
                    }
                };
                if count.checked_mul(shape.len()).is_none_or(|n| n > MAX_LENGTH) {
                    return Err(Diagnostic::new(format!("the list has more than {MAX_LENGTH} elements"), span).into());
                }
                Node { kind: NodeKind::Stack(nodes), shape: stacked, constant, per_index: false }
            }
            Mode::Reduce(ReduceFn::Mean) => {
                let count = self.constant(Shape::Scalar, vec![count as f64], span)?;
                zip(BinaryFn::Div, fold(BinaryFn::Add, nodes), count)
            }
            Mode::Reduce(f) => fold(f.pairwise().expect("every reduction but the mean folds"), nodes),
            Mode::Factor(ReduceFn::Sum) => fold(BinaryFn::Add, nodes),
            Mode::Factor(ReduceFn::Mean) => {
                let log_count = self.constant(Shape::Scalar, vec![libm::log(count as f64)], span)?;
                zip(BinaryFn::Sub, fold(BinaryFn::LogAddExp, nodes), log_count)
            }
            Mode::Factor(_) => fold(BinaryFn::LogAddExp, nodes),
        };
        self.charge(&node, span)?;
        Ok(node)
    }
}

/// Elements of `over` at `positions`, as a value of `shape`.
fn pick(over: Node, positions: Vec<usize>, shape: Shape) -> Node {
    let constant = over.constant;
    Node { kind: NodeKind::Gather(Box::new(over), positions), shape, constant, per_index: false }
}
