//! The model language: text in, syntax tree or positioned [`Diagnostics`] out.
//!
//! This module knows the grammar only; what names mean, and whether shapes and supports fit, is
//! the business of [`crate::model`].

pub mod ast;
pub mod diagnostic;
pub mod lexer;
pub mod parser;
pub mod print;

pub use diagnostic::{Diagnostic, Diagnostics, Position, Severity, Span};
pub use parser::{Parsed, parse, parse_all};

#[cfg(test)]
mod tests;
