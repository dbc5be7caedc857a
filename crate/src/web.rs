//! Browser bindings (in progress).
