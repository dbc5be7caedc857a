//! Running one instruction. This is the evaluator's inner loop: no allocation, no failure.

use super::{Arg, Op, Tables};
use crate::dist::{self, Col};
use crate::model::builtins;

/// Execute `op`, reading slots before its `dst` and writing from `dst` on.
#[inline]
pub(crate) fn run(tables: Tables, op: &Op, theta: &[f64], slots: &mut [f64]) {
    match *op {
        Op::Constrain { transform, theta: at, len, dst, jacobian } => {
            let mut log_jacobian = 0.0;
            for (k, &u) in theta[at..at + len].iter().enumerate() {
                slots[dst + k] = transform.constrain(u);
                log_jacobian += transform.log_jacobian(u);
            }
            slots[jacobian] = log_jacobian;
        }
        Op::Map { f, src, len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            for (o, &x) in output[..len].iter_mut().zip(&input[src..src + len]) {
                *o = f.apply(x);
            }
        }
        Op::Zip { f, a, b, len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            zip(f, column(input, a, len), column(input, b, len), &mut output[..len]);
        }
        Op::Reduce { f, src, len, dst } => slots[dst] = f.apply(&slots[src..src + len]),
        Op::Dot { a, b, len, dst } => {
            slots[dst] = slots[a..a + len].iter().zip(&slots[b..b + len]).map(|(x, y)| x * y).sum();
        }
        Op::MatVec { m, v, rows, cols, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            builtins::matvec(&input[m..m + rows * cols], &input[v..v + cols], &mut output[..rows]);
        }
        Op::Gather { src, from, to, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            for (o, &p) in output.iter_mut().zip(&tables.positions[from..to]) {
                *o = input[src + p];
            }
        }
        Op::Stack { from, to, item_len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            for (chunk, &item) in output.chunks_exact_mut(item_len).zip(&tables.items[from..to]) {
                chunk.copy_from_slice(&input[item..item + item_len]);
            }
        }
        Op::LogDensity { family, n, x, params, arity, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let cols = params.map(|p| column(input, p, n));
            output[0] = dist::sum_log_density(family, n, column(input, x, n), &cols[..arity]);
        }
        Op::MvNormal { index, x, mean, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let d = tables.mvnormals[index].dim();
            output[0] = tables.mvnormals[index].log_density(Col::vector(&input[x..x + d]), column(input, mean, d));
        }
    }
}

#[inline]
fn column(slots: &[f64], arg: Arg, len: usize) -> Col<'_> {
    if arg.stride == 0 {
        Col::scalar(&slots[arg.offset..arg.offset + 1])
    } else {
        Col::vector(&slots[arg.offset..arg.offset + len])
    }
}

/// Element-wise `f`, with the common cases written as plain loops the compiler can vectorise.
#[inline]
fn zip(f: builtins::BinaryFn, a: Col, b: Col, out: &mut [f64]) {
    use builtins::BinaryFn::*;
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
