//! The syntax tree of a model, with a source span on every node.

use super::diagnostic::Span;

#[derive(Clone, Debug, Default, PartialEq)]
pub struct Program {
    pub statements: Vec<Statement>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    pub name: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Statement {
    /// `NAME = EXPR`: data, a local intermediate, or (when NAME is `density`) the model's density;
    /// `report NAME = EXPR` (`reported`) a derived quantity recorded for every draw.
    Bind { name: Ident, value: Expr, reported: bool },
    /// `NAME : SUPPORT`: a parameter.
    Declare { name: Ident, support: Support },
}

impl Statement {
    pub fn name(&self) -> &Ident {
        match self {
            Statement::Bind { name, .. } | Statement::Declare { name, .. } => name,
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub struct Support {
    pub kind: SupportKind,
    /// `real[3]`: the length of a vector parameter.
    pub size: Option<Expr>,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum SupportKind {
    Real,
    Positive,
    Unit,
    Between(Expr, Expr),
    Above(Expr),
    Below(Expr),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
}

impl BinOp {
    pub fn symbol(self) -> &'static str {
        match self {
            BinOp::Add => "+",
            BinOp::Sub => "-",
            BinOp::Mul => "*",
            BinOp::Div => "/",
            BinOp::Pow => "^",
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    Number(f64),
    Name(String),
    /// `[a, b, c]`; a list of lists is a matrix.
    List(Vec<Expr>),
    Neg(Box<Expr>),
    Binary(BinOp, Box<Expr>, Box<Expr>),
    /// `v[i]` or `m[i, j]`, 1-based.
    Index(Box<Expr>, Vec<Expr>),
    /// `f(args)`, or `f(variate; args)` for a density factor.
    Call {
        func: Ident,
        variate: Option<Box<Expr>>,
        args: Vec<Expr>,
    },
    /// `a:b`, the whole numbers from a to b. Inside index brackets an end may be left open:
    /// `y[2:]`, `y[:n]`, `M[:, 1]`.
    Range(Option<Box<Expr>>, Option<Box<Expr>>),
    /// `[body for index in over]`: the list of `body` for each element of `over`.
    For(Box<Terms>),
    /// `f(body for index in over)`: `f` (a sum, product, mean, …) across the terms.
    Across {
        func: Ident,
        terms: Box<Terms>,
    },
}

/// `body for index in over`: one term for each element (or row) of `over`.
#[derive(Clone, Debug, PartialEq)]
pub struct Terms {
    pub body: Expr,
    pub index: Ident,
    pub over: Expr,
}
