//! Tuning by Bayesian optimisation: the mathematics the tuning policy is built from.
//!
//! - [`gp`]: Gaussian-process regression, the surrogate of a mixing score over kernel settings
//!   normalised to [0, 1]^d, with hyperparameters fitted by marginal likelihood.
//! - [`acquisition`]: expected improvement, computed stably far into its tail.
//! - [`direct`]: the DIRECT global optimiser over a box.
//! - [`polish`]: DIRECT followed by a local compass search — how the next setting is chosen,
//!   by maximising expected improvement over the unit box.
//!
//! The policy (which settings, which score, when to stop) lives elsewhere and calls these.

pub mod acquisition;
pub mod direct;
pub mod gp;
pub mod policy;
pub mod polish;
pub mod score;
