//! mixwell: read a model written in a small density language, tune a random-walk or slice sampler
//! by Bayesian optimisation, sample, and report whether the draws can be trusted.
//!
//! The core modules do no I/O; the command line (`cli`) and the browser bindings (`web`) are thin
//! faces on top of them.
#![cfg_attr(not(target_arch = "wasm32"), forbid(unsafe_code))]

pub mod chain;
pub mod diag;
pub mod dist;
pub mod draws_csv;
pub mod kernel;
pub mod lang;
pub mod link;
pub mod model;
pub mod names;
pub mod plan;
pub mod report;
pub mod rng;
pub mod tape;
pub mod tune;

#[cfg(not(target_arch = "wasm32"))]
pub mod cli;
#[cfg(target_arch = "wasm32")]
pub mod web;
