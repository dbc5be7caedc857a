//! Running one instruction. This is the evaluator's inner loop: no allocation, no failure. The
//! arithmetic itself is [`crate::model::compute`], the same code the checker folds constants with.

use super::{Arg, Op, Tables};
use crate::dist::Col;
use crate::model::compute;

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
            compute::map(f, &input[src..src + len], &mut output[..len]);
        }
        Op::Zip { f, a, b, len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            compute::zip(f, column(input, a, len), column(input, b, len), &mut output[..len]);
        }
        Op::Reduce { f, src, len, dst } => slots[dst] = compute::reduce(f, &slots[src..src + len]),
        Op::Dot { a, b, len, dst } => slots[dst] = compute::dot(&slots[a..a + len], &slots[b..b + len]),
        Op::MatVec { m, v, rows, cols, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            compute::matvec(&input[m..m + rows * cols], &input[v..v + cols], &mut output[..rows]);
        }
        Op::Gather { src, from, to, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            compute::gather(&input[src..], &tables.positions[from..to], &mut output[..to - from]);
        }
        Op::Stack { from, to, item_len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            for (k, &item) in tables.items[from..to].iter().enumerate() {
                output[k * item_len..(k + 1) * item_len].copy_from_slice(&input[item..item + item_len]);
            }
        }
        Op::LogDensity { family, n, x, params, arity, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let cols = params.map(|p| column(input, p, n));
            output[0] = compute::log_density_sum(family, n, column(input, x, n), &cols[..arity]);
        }
        Op::LogDensityEach { .. } | Op::Fold { .. } | Op::CumSum { .. } => run_column_op(tables, op, slots),
        Op::MvNormal { index, x, mean, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let d = tables.mvnormals[index].dim();
            output[0] =
                compute::mvnormal(&tables.mvnormals[index], Col::vector(&input[x..x + d]), column(input, mean, d));
        }
    }
}

/// The instructions of `for` forms and sequences, kept out of [`run`] so that the loop over the
/// instructions stays as small, and as well inlined, for the models that never use them.
#[inline(never)]
fn run_column_op(tables: Tables, op: &Op, slots: &mut [f64]) {
    match *op {
        Op::LogDensityEach { family, n, x, params, arity, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let cols = params.map(|p| column(input, p, n));
            compute::log_density_each(family, column(input, x, n), &cols[..arity], &mut output[..n]);
        }
        Op::Fold { f, from, to, len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            let items = tables.items[from..to].iter().map(|&item| &input[item..item + len]);
            compute::fold(f, items, &mut output[..len]);
        }
        Op::CumSum { src, len, dst } => {
            let (input, output) = slots.split_at_mut(dst);
            compute::cumsum(&input[src..src + len], &mut output[..len]);
        }
        _ => unreachable!("only the column instructions come here"),
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
