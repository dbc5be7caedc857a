//! The compiled evaluator (in progress).
