//! Prints a syntax tree back as model text with the fewest parentheses that keep its meaning, so
//! that parsing the printout gives the same tree (the parser's round-trip property).

use super::ast::*;
use std::fmt::{self, Display, Formatter};

impl Display for Program {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        for statement in &self.statements {
            writeln!(f, "{statement}")?;
        }
        Ok(())
    }
}

impl Display for Statement {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        match self {
            Statement::Bind { name, value, reported } => {
                let report = if *reported { "report " } else { "" };
                write!(f, "{report}{} = {value}", name.name)
            }
            Statement::Declare { name, support } => write!(f, "{} : {support}", name.name),
        }
    }
}

impl Display for Support {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        match &self.kind {
            SupportKind::Real => write!(f, "real")?,
            SupportKind::Positive => write!(f, "positive")?,
            SupportKind::Unit => write!(f, "unit")?,
            SupportKind::Between(lo, hi) => write!(f, "between({lo}, {hi})")?,
            SupportKind::Above(a) => write!(f, "above({a})")?,
            SupportKind::Below(b) => write!(f, "below({b})")?,
        }
        match &self.size {
            Some(size) => write!(f, "[{size}]"),
            None => Ok(()),
        }
    }
}

/// How tightly an expression holds together when printed; mirrors the parser's binding powers.
fn precedence(e: &Expr) -> u8 {
    match &e.kind {
        ExprKind::Range(..) => 5,
        ExprKind::Binary(BinOp::Add | BinOp::Sub, ..) => 10,
        ExprKind::Binary(BinOp::Mul | BinOp::Div, ..) => 20,
        ExprKind::Neg(_) => 30,
        ExprKind::Binary(BinOp::Pow, ..) => 40,
        _ => 100,
    }
}

struct Wrapped<'a>(&'a Expr, bool);

impl Display for Wrapped<'_> {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        if self.1 { write!(f, "({})", self.0) } else { write!(f, "{}", self.0) }
    }
}

fn comma_separated(f: &mut Formatter, items: &[Expr]) -> fmt::Result {
    for (i, item) in items.iter().enumerate() {
        if i > 0 {
            write!(f, ", ")?;
        }
        write!(f, "{item}")?;
    }
    Ok(())
}

impl Display for Expr {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        match &self.kind {
            ExprKind::Number(v) => write_number(f, *v),
            ExprKind::Name(name) => write!(f, "{name}"),
            ExprKind::List(items) => {
                write!(f, "[")?;
                comma_separated(f, items)?;
                write!(f, "]")
            }
            ExprKind::Neg(inner) => write!(f, "-{}", Wrapped(inner, precedence(inner) < 30)),
            ExprKind::Binary(op, lhs, rhs) => {
                let p = precedence(self);
                // `^` groups to the right, the others to the left.
                let (wrap_lhs, wrap_rhs) = if *op == BinOp::Pow {
                    (precedence(lhs) <= p, precedence(rhs) < 30)
                } else {
                    (precedence(lhs) < p, precedence(rhs) <= p)
                };
                let spaced = *op != BinOp::Pow;
                let sep = if spaced { " " } else { "" };
                write!(f, "{}{sep}{}{sep}{}", Wrapped(lhs, wrap_lhs), op.symbol(), Wrapped(rhs, wrap_rhs))
            }
            ExprKind::Index(base, indices) => {
                write!(f, "{}[", Wrapped(base, precedence(base) < 100))?;
                comma_separated(f, indices)?;
                write!(f, "]")
            }
            ExprKind::Call { func, variate, args } => {
                write!(f, "{}(", func.name)?;
                if let Some(variate) = variate {
                    write!(f, "{variate}; ")?;
                }
                comma_separated(f, args)?;
                write!(f, ")")
            }
            ExprKind::Range(lo, hi) => {
                // `:` does not chain, so a range at either end is parenthesised.
                if let Some(lo) = lo {
                    write!(f, "{}", Wrapped(lo, precedence(lo) <= 5))?;
                }
                write!(f, ":")?;
                match hi {
                    Some(hi) => write!(f, "{}", Wrapped(hi, precedence(hi) <= 5)),
                    None => Ok(()),
                }
            }
            ExprKind::For(terms) => write!(f, "[{terms}]"),
            ExprKind::Across { func, terms } => write!(f, "{}({terms})", func.name),
        }
    }
}

impl Display for Terms {
    fn fmt(&self, f: &mut Formatter) -> fmt::Result {
        write!(f, "{} for {} in {}", self.body, self.index.name, self.over)
    }
}

/// Integers print without a fraction; anything else in Rust's shortest round-trip form.
fn write_number(f: &mut Formatter, v: f64) -> fmt::Result {
    write!(f, "{}", number(v))
}

/// A number as the language writes it, for messages too: `3`, `2.5`, `1e300`, never 300 digits.
pub fn number(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 { format!("{}", v as i64) } else { format!("{v:?}") }
}

/// A fully parenthesised prefix form, `(+ 1 (* 2 3))`, for short and exact parser tests.
pub fn sexpr(e: &Expr) -> String {
    let join = |items: &[Expr]| items.iter().map(sexpr).collect::<Vec<_>>().join(" ");
    match &e.kind {
        ExprKind::Number(_) | ExprKind::Name(_) => e.to_string(),
        ExprKind::List(items) => format!("[{}]", join(items)),
        ExprKind::Neg(inner) => format!("(- {})", sexpr(inner)),
        ExprKind::Binary(op, l, r) => format!("({} {} {})", op.symbol(), sexpr(l), sexpr(r)),
        ExprKind::Index(base, idx) => format!("(index {} {})", sexpr(base), join(idx)),
        ExprKind::Call { func, variate, args } => match variate {
            Some(v) => format!("({} {}; {})", func.name, sexpr(v), join(args)),
            None => format!("({} {})", func.name, join(args)),
        },
        ExprKind::Range(lo, hi) => {
            let end = |e: &Option<Box<Expr>>| e.as_deref().map_or("_".to_string(), sexpr);
            format!("(: {} {})", end(lo), end(hi))
        }
        ExprKind::For(t) => format!("(list {} for {} in {})", sexpr(&t.body), t.index.name, sexpr(&t.over)),
        ExprKind::Across { func, terms: t } => {
            format!("({} {} for {} in {})", func.name, sexpr(&t.body), t.index.name, sexpr(&t.over))
        }
    }
}
