//! The arithmetic of every node of a checked model, on slices of numbers.
//!
//! Two callers run these functions and nothing else: the interpreter in [`super::eval`], which
//! folds constants while checking and probes the density for flat directions, and the compiled
//! evaluator in [`crate::tape`], whose instructions call them on its slot array. Because both
//! run the same code in the same order, a value folded while checking and the same value
//! computed while sampling agree to the bit. Nothing here allocates or fails.
//!
//! The functions the evaluator runs for every model are `#[inline(always)]`: each is called
//! from both evaluators, and without the hint the compiler stops inlining them (and the
//! distributions' kernels they call) into the evaluator's instruction loop, which costs the
//! smallest models about a tenth of their time (measured with cachegrind on the benchmark models).

use super::builtins::{BinaryFn, ReduceFn, UnaryFn};
use crate::dist::{self, Col, Family, MvNormal};

/// `out[k] = f(src[k])`.
#[inline(always)]
pub fn map(f: UnaryFn, src: &[f64], out: &mut [f64]) {
    for (o, &x) in out.iter_mut().zip(src) {
        *o = f.apply(x);
    }
}

/// `out[k] = f(a[k], b[k])`, a column of stride 0 repeating its one value; the commonest
/// operations are written as plain loops the compiler can vectorise.
#[inline(always)]
pub fn zip(f: BinaryFn, a: Col, b: Col, out: &mut [f64]) {
    use BinaryFn::*;
    match f {
        Add => zip_with(a, b, out, |x, y| x + y),
        Sub => zip_with(a, b, out, |x, y| x - y),
        Mul => zip_with(a, b, out, |x, y| x * y),
        Div => zip_with(a, b, out, |x, y| x / y),
        _ => zip_with(a, b, out, |x, y| f.apply(x, y)),
    }
}

#[inline(always)]
fn zip_with(a: Col, b: Col, out: &mut [f64], g: impl Fn(f64, f64) -> f64) {
    match (a.stride, b.stride) {
        (1, 1) => out.iter_mut().zip(a.values.iter().zip(b.values)).for_each(|(o, (&x, &y))| *o = g(x, y)),
        (0, 1) => out.iter_mut().zip(b.values).for_each(|(o, &y)| *o = g(a.values[0], y)),
        (1, 0) => out.iter_mut().zip(a.values).for_each(|(o, &x)| *o = g(x, b.values[0])),
        _ => out.iter_mut().for_each(|o| *o = g(a.values[0], b.values[0])),
    }
}

/// One number from a whole slice.
#[inline(always)]
pub fn reduce(f: ReduceFn, xs: &[f64]) -> f64 {
    f.apply(xs)
}

/// Σ aᵢbᵢ.
#[inline(always)]
pub fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// out = M·v for a row-major `out.len()`×`v.len()` matrix.
#[inline(always)]
pub fn matvec(m: &[f64], v: &[f64], out: &mut [f64]) {
    let cols = v.len();
    if cols == 0 {
        // An empty slice of columns: every row sums nothing.
        out.fill(0.0);
        return;
    }
    for (row, o) in m.chunks_exact(cols).zip(out.iter_mut()) {
        *o = dot(row, v);
    }
}

/// `out[k] = src[positions[k]]`.
#[inline(always)]
pub fn gather(src: &[f64], positions: &[usize], out: &mut [f64]) {
    for (o, &p) in out.iter_mut().zip(positions) {
        *o = src[p];
    }
}

/// Running sums: `out[k] = src[0] + … + src[k]`, added left to right.
#[inline]
pub fn cumsum(src: &[f64], out: &mut [f64]) {
    let mut total = 0.0;
    for (o, &x) in out.iter_mut().zip(src) {
        total += x;
        *o = total;
    }
}

/// `out = f(…f(f(items[0], items[1]), items[2])…)` element by element, every item as long as
/// `out`: the n-ary sum, product, minimum, maximum or log-sum-exp across the terms of a `for`.
/// No items give the operation's identity (0 for a sum, 1 for a product, …).
#[inline]
pub fn fold<'a>(f: BinaryFn, mut items: impl Iterator<Item = &'a [f64]>, out: &mut [f64]) {
    match items.next() {
        Some(first) => out.copy_from_slice(first),
        None => out.fill(f.identity()),
    }
    for item in items {
        match f {
            BinaryFn::Add => out.iter_mut().zip(item).for_each(|(o, &x)| *o += x),
            BinaryFn::Mul => out.iter_mut().zip(item).for_each(|(o, &x)| *o *= x),
            _ => out.iter_mut().zip(item).for_each(|(o, &x)| *o = f.apply(*o, x)),
        }
    }
}

/// Σᵢ log f(xᵢ; θᵢ) over `n` elements.
#[inline(always)]
pub fn log_density_sum(family: Family, n: usize, x: Col, params: &[Col]) -> f64 {
    dist::sum_log_density(family, n, x, params)
}

/// log N(x; mean, Σ) with the covariance factorised in `dist`.
#[inline(always)]
pub fn mvnormal(dist: &MvNormal, x: Col, mean: Col) -> f64 {
    dist.log_density(x, mean)
}

/// `out[i] = log f(xᵢ; θᵢ)` for each of `out.len()` elements.
#[inline]
pub fn log_density_each(family: Family, x: Col, params: &[Col], out: &mut [f64]) {
    let mut values = [0.0; 3];
    for (i, o) in out.iter_mut().enumerate() {
        for (v, p) in values.iter_mut().zip(params) {
            *v = p.get(i);
        }
        *o = dist::log_density(family, x.get(i), &values[..params.len()]);
    }
}
