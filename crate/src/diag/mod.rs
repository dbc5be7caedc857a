//! Convergence diagnostics (in progress).
