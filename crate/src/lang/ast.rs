//! The syntax tree of a model, with a source span on every node.

use super::diagnostic::Span;

#[derive(Clone, Debug, PartialEq)]
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
    /// `NAME = EXPR`: data, a derived quantity, or (when NAME is `density`) the model's density.
    Bind { name: Ident, value: Expr },
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
}
