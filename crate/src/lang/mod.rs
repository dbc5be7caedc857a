//! The model language: text in, syntax tree or a positioned [`Diagnostic`] out.
//!
//! This module knows the grammar only; what names mean, and whether shapes and supports fit, is
//! the business of [`crate::model`].

pub mod ast;
pub mod diagnostic;
pub mod lexer;
pub mod parser;
pub mod print;

pub use diagnostic::{Diagnostic, Position, Span};
pub use parser::parse;

#[cfg(test)]
mod tests;
