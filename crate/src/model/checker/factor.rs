//! The density: factors in log space, and the distributions they name.

use super::expr::elementwise;
use super::*;
use crate::dist::{Family, Variate};
use crate::lang::ast::{BinOp, ExprKind};
use crate::lang::diagnostic::did_you_mean;

/// The log of a density factor.
pub(super) struct Factor {
    pub node: Node,
    /// Where the factor is a product over the elements of a list (a distribution of a list, the
    /// exponential of a list, …): how many elements, and which part of the text says so.
    pub over: Option<(usize, Span)>,
}

impl Factor {
    fn single(node: Node) -> Self {
        Factor { node, over: None }
    }
}

impl Checker<'_> {
    /// The log of a density factor, as a scalar node (one per term inside a `for`): products
    /// become sums, quotients differences, powers multiples, sums log-sum-exps; `exp(E)`
    /// contributes E itself.
    pub(super) fn log_factor(&mut self, e: &Expr) -> Checked<Factor> {
        match &e.kind {
            ExprKind::Binary(BinOp::Add | BinOp::Sub, ..) => self.sum_of_factors(e),
            ExprKind::Binary(op @ (BinOp::Mul | BinOp::Div), a, b) => {
                let (fa, fb) = (self.log_factor(a), self.log_factor(b));
                let (fa, fb) = self.both(fa, fb)?;
                let f = if *op == BinOp::Mul { BinaryFn::Add } else { BinaryFn::Sub };
                Ok(Factor { over: fa.over.or(fb.over), node: zip(f, fa.node, fb.node) })
            }
            ExprKind::Binary(BinOp::Pow, a, b) => {
                let (base, power) = (self.log_factor(a), self.expr(b));
                let (base, power) = self.both(base, power)?;
                if power.shape != Shape::Scalar && !power.per_index {
                    return Err(Diagnostic::new(
                        format!("the power of a density factor is {}", power.shape.describe()),
                        b.span,
                    )
                    .expected("a single number")
                    .into());
                }
                let node = elementwise(BinaryFn::Mul, power, base.node, b.span, a.span)?;
                Ok(Factor { node, over: base.over })
            }
            ExprKind::Call { func, variate: None, args } if func.name == "exp" && args.len() == 1 => {
                let inner = self.expr(&args[0])?;
                Ok(self.product_of(inner, e.span))
            }
            // `prod(F)`: the whole product F, stated explicitly, so a sum of such is unambiguous.
            ExprKind::Call { func, variate: None, args } if func.name == "prod" && args.len() == 1 => {
                Ok(Factor::single(self.log_factor(&args[0])?.node))
            }
            ExprKind::Call { variate: Some(_), .. } => {
                let node = self.log_density_call(e)?;
                let over = match &node.kind {
                    NodeKind::LogDensity { x, params, .. } => {
                        std::iter::once(&**x).chain(params).find_map(|p| vector_len(p.shape)).map(|n| (n, e.span))
                    }
                    _ => None,
                };
                Ok(Factor { node, over })
            }
            ExprKind::Across { func, terms } if matches!(func.name.as_str(), "prod" | "sum" | "mean") => {
                Ok(Factor::single(self.factor_terms(func, terms, e.span)?))
            }
            ExprKind::Number(c) if *c > 0.0 => {
                Ok(Factor::single(self.constant(Shape::Scalar, vec![libm::log(*c)], e.span)?))
            }
            ExprKind::Number(_) | ExprKind::Neg(_) => Err(Diagnostic::new("a density factor must be positive", e.span)
                .expected("a positive factor such as a distribution, `exp(…)` or a positive number")
                .into()),
            _ => {
                let logs = map(UnaryFn::Log, self.expr(e)?);
                self.charge(&logs, e.span)?;
                Ok(self.product_of(logs, e.span))
            }
        }
    }

    /// The log of a factor given as the logs of its elements: their sum for a list (a product
    /// over it), the value itself for one number or one number per term.
    fn product_of(&mut self, logs: Node, span: Span) -> Factor {
        let over = (logs.shape != Shape::Scalar && !logs.per_index).then(|| (logs.shape.len(), span));
        Factor { node: sum_if_many(logs), over }
    }

    /// How many elements the arguments of a distribution call are lists of, if any (not per term).
    fn list_length(&self, call: &Expr) -> Option<usize> {
        let ExprKind::Call { variate: Some(x), args, .. } = &call.kind else { return None };
        std::iter::once(&**x).chain(args).find_map(|a| self.static_length(a))
    }

    /// The length of the list an expression is, read from the names in it (enough to word an
    /// error; the checked node has the exact shape).
    fn static_length(&self, e: &Expr) -> Option<usize> {
        match &e.kind {
            ExprKind::Name(n) => match self.bindings.get(n)? {
                Binding::Constant(i) => vector_len(self.constants[*i].shape),
                Binding::Parameter(i) => vector_len(self.parameters[*i].shape),
                Binding::Derived(i) => vector_len(self.derived[*i].node.shape),
            },
            ExprKind::Binary(_, a, b) => self.static_length(a).or_else(|| self.static_length(b)),
            ExprKind::Neg(a) => self.static_length(a),
            ExprKind::Call { variate: None, args, .. } => args.iter().find_map(|a| self.static_length(a)),
            _ => None,
        }
    }

    /// `A + B − C …`: a mixture of factors, computed as a log-sum-exp. When a term is a product
    /// over a list, the sum has two readings; it is refused with both written out.
    fn sum_of_factors(&mut self, e: &Expr) -> Checked<Factor> {
        let mut terms = Vec::new();
        let mut rest = e;
        while let ExprKind::Binary(op @ (BinOp::Add | BinOp::Sub), a, b) = &rest.kind {
            terms.push((*op, &**b));
            rest = a;
        }
        terms.push((BinOp::Add, rest));
        terms.reverse();
        let checked = terms.iter().map(|(_, t)| self.log_factor(t)).collect();
        let factors = self.all(checked)?;
        // A product over one element is that element: both readings are the same.
        if let Some((n, at)) = factors.iter().find_map(|f| f.over).filter(|&(n, _)| n > 1) {
            return Err(self.ambiguous_sum(e, n, at).into());
        }
        let mut factors = factors.into_iter();
        let first = factors.next().expect("a sum has terms").node;
        let node = terms[1..].iter().zip(factors).fold(first, |sum, ((op, _), f)| {
            zip(if *op == BinOp::Add { BinaryFn::LogAddExp } else { BinaryFn::LogSubExp }, sum, f.node)
        });
        Ok(Factor::single(node))
    }

    /// The error for `A + B` where a term is a product over a list of `n`: both readings,
    /// rewritten.
    fn ambiguous_sum(&self, e: &Expr, n: usize, at: Span) -> Diagnostic {
        let index = ["i", "j", "k", "obs", "elem"]
            .into_iter()
            .find(|i| !self.bindings.contains_key(*i) && !self.indices.iter().any(|s| s.name == *i))
            .unwrap_or("idx");
        let per_element = self.rewrite(e, &|c, x| c.per_element(x, n, index));
        let whole = self.rewrite(e, &|c, x| c.whole_product(x, n));
        let shown = &self.source[at.start..at.end.min(self.source.len())];
        Diagnostic::new(
            format!("this sum of factors has two readings: `{shown}` is a product over the {n} elements of a list"),
            e.span,
        )
        .help("write the one you mean")
        .note(format!("a mixture for each element: `prod({per_element} for {index} in 1:{n})`"))
        .note(format!("a mixture of the whole products: `{whole}`"))
    }

    fn rewrite(&self, e: &Expr, f: &dyn Fn(&Self, &Expr) -> Option<Expr>) -> Expr {
        if let Some(replaced) = f(self, e) {
            return replaced;
        }
        let r = |x: &Expr| Box::new(self.rewrite(x, f));
        let kind = match &e.kind {
            ExprKind::Neg(a) => ExprKind::Neg(r(a)),
            ExprKind::Binary(op, a, b) => ExprKind::Binary(*op, r(a), r(b)),
            ExprKind::Call { func, variate, args } => ExprKind::Call {
                func: func.clone(),
                variate: variate.as_deref().map(r),
                args: args.iter().map(|a| self.rewrite(a, f)).collect(),
            },
            ExprKind::Index(base, indices) => {
                ExprKind::Index(r(base), indices.iter().map(|a| self.rewrite(a, f)).collect())
            }
            other => other.clone(),
        };
        Expr { kind, span: e.span }
    }

    /// A list of `n` named in the text, as its element `name[index]`.
    fn per_element(&self, e: &Expr, n: usize, index: &str) -> Option<Expr> {
        let ExprKind::Name(_) = &e.kind else { return None };
        (self.static_length(e) == Some(n)).then(|| Expr {
            kind: ExprKind::Index(Box::new(e.clone()), vec![Expr { kind: ExprKind::Name(index.into()), span: e.span }]),
            span: e.span,
        })
    }

    /// A factor that is a product over a list of `n`, marked as the whole product: `prod(F)`.
    fn whole_product(&self, e: &Expr, n: usize) -> Option<Expr> {
        let over_list = match &e.kind {
            ExprKind::Call { variate: Some(_), .. } => self.list_length(e) == Some(n),
            ExprKind::Call { func, variate: None, args } if func.name == "exp" => {
                args.iter().any(|a| self.static_length(a) == Some(n))
            }
            _ => false,
        };
        over_list.then(|| Expr {
            kind: ExprKind::Call {
                func: Ident { name: "prod".into(), span: e.span },
                variate: None,
                args: vec![e.clone()],
            },
            span: e.span,
        })
    }

    /// `f(x; θ…)` as the scalar Σ log f(xᵢ; θᵢ), or inside a `for` as log f(x; θ) per term.
    pub(super) fn log_density_call(&mut self, e: &Expr) -> Checked<Node> {
        let ExprKind::Call { func, variate: Some(variate), args } = &e.kind else {
            unreachable!("called on distribution calls only")
        };
        let name = func.name.as_str();
        if name == MvNormal::NAME {
            return self.mvnormal(variate, args, e.span);
        }
        let Some(family) = links::written(name) else {
            let mut d = Diagnostic::new(format!("unknown distribution `{name}`"), func.span)
                .expected("a distribution such as `normal`, `gamma` or `poisson`");
            if let Some(similar) = did_you_mean(name, links::written_names().chain([MvNormal::NAME])) {
                d = d.help(format!("did you mean `{similar}`?"));
            } else if builtins::lookup(name).is_some() {
                d = d.help(format!("`{name}` is a function: write `{name}(…)` without `;`"));
            }
            return Err(d.into());
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
            .expected(format!("`{name}(x; {})`", names.join(", ")))
            .into());
        }
        let checked = std::iter::once(&**variate).chain(args).map(|a| self.expr(a)).collect();
        let mut nodes = self.all(checked)?;
        let x = nodes.remove(0);
        let params = nodes;
        let per_index = x.per_index || params.iter().any(|p| p.per_index);
        // Every argument is a number or a list; lists must share one length. Per term, every
        // argument is one number.
        let mut length: Option<(usize, Span)> = None;
        for (node, arg) in std::iter::once((&x, variate.as_ref())).chain(params.iter().zip(args)) {
            match node.shape {
                _ if node.per_index => {}
                Shape::Scalar => {}
                Shape::Vector(_) if per_index => return Err(Fault::Unroll),
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
                        .expected("lists of one length, or single numbers that apply to every element")
                        .into());
                    }
                    _ => length = Some((n, arg.span)),
                },
                Shape::Matrix(..) => {
                    return Err(
                        Diagnostic::new(format!("`{name}` takes numbers or lists, not a matrix"), arg.span).into()
                    );
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
            .expected("whole numbers known before sampling")
            .into());
        }
        let (family, params) = links::apply(family, params, &self.derived);
        let constant = x.constant && params.iter().all(|p| p.constant);
        if per_index {
            let shape =
                if x.per_index { x.shape } else { params.iter().find(|p| p.per_index).map_or(x.shape, |p| p.shape) };
            let kind = NodeKind::LogDensityEach { family, x: Box::new(x), params };
            return Ok(Node { kind, shape, constant, per_index: true });
        }
        let kind = NodeKind::LogDensity { family, x: Box::new(x), params };
        Ok(Node { kind, shape: Shape::Scalar, constant, per_index: false })
    }

    /// Data given to a distribution must lie in its support, or the density is zero everywhere.
    fn check_variate(&mut self, family: Family, x: &Node, params: &[Node], span_of: &Expr) -> Checked<()> {
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
            .expected(variate_words(family.variate()))
            .into());
        }
        Ok(())
    }

    fn mvnormal(&mut self, variate: &Expr, args: &[Expr], span: Span) -> Checked<Node> {
        if args.len() != 2 {
            return Err(Diagnostic::new(format!("`mvnormal` takes 2 parameters after `;`, not {}", args.len()), span)
                .expected("`mvnormal(x; mean, covariance)`")
                .into());
        }
        let checked = [variate, &args[0], &args[1]].into_iter().map(|a| self.expr(a)).collect();
        let mut nodes = self.all(checked)?;
        let (x, mean, cov) = (nodes.remove(0), nodes.remove(0), nodes.remove(0));
        if x.per_index || mean.per_index || cov.per_index {
            return Err(Fault::Unroll);
        }
        let Shape::Vector(d) = x.shape else {
            return Err(Diagnostic::new(format!("the variable of `mvnormal` is {}", x.shape.describe()), variate.span)
                .expected("a list")
                .into());
        };
        if !matches!(mean.shape, Shape::Scalar) && mean.shape != Shape::Vector(d) {
            return Err(Diagnostic::new(
                format!("the mean is {} but the variable is a list of {d}", mean.shape.describe()),
                args[0].span,
            )
            .expected(format!("a number or a list of {d}"))
            .into());
        }
        if cov.shape != Shape::Matrix(d, d) {
            return Err(Diagnostic::new(format!("the covariance is {}", cov.shape.describe()), args[1].span)
                .expected(format!("a {d}×{d} matrix"))
                .into());
        }
        self.known(&cov, &args[1], "the covariance of `mvnormal`")?;
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
        Ok(Node { kind, shape: Shape::Scalar, constant, per_index: false })
    }
}

fn vector_len(shape: Shape) -> Option<usize> {
    match shape {
        Shape::Vector(n) => Some(n),
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
