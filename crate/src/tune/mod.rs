//! Tuning by Bayesian optimisation (in progress).
