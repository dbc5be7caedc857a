//! The compiled evaluator: a checked [`Model`] flattened into a list of instructions over one
//! array of slots, each instruction processing a whole column.
//!
//! Every instruction writes a fresh range of slots that lies after all the slots it reads, so the
//! list is in dependency order: one forward loop evaluates the log density, and the same list
//! walked backwards is where reverse-mode gradients would go. Values known before sampling are
//! computed while compiling (constant folding) and sit in the slot template, so an evaluation
//! does only the work that depends on the parameters, allocates nothing, and cannot fail —
//! impossible values come out as −∞ or NaN, which samplers treat as rejections.

mod compile;
mod exec;

use crate::dist::MvNormal;
use crate::model::Model;
use crate::model::builtins::{BinaryFn, ReduceFn, UnaryFn};
use crate::model::support::Transform;

/// Where an argument lives: `stride` 0 repeats `slots[offset]`, stride 1 walks from it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Arg {
    pub offset: usize,
    pub stride: usize,
}

/// One instruction. `dst` is the first slot it writes.
#[derive(Clone, Debug)]
pub(crate) enum Op {
    /// Unconstrained θ[theta..theta+len] to constrained values at `dst`; the summed
    /// log-Jacobian goes to slot `jacobian`.
    Constrain {
        transform: Transform,
        theta: usize,
        len: usize,
        dst: usize,
        jacobian: usize,
    },
    Map {
        f: UnaryFn,
        src: usize,
        len: usize,
        dst: usize,
    },
    Zip {
        f: BinaryFn,
        a: Arg,
        b: Arg,
        len: usize,
        dst: usize,
    },
    Reduce {
        f: ReduceFn,
        src: usize,
        len: usize,
        dst: usize,
    },
    Dot {
        a: usize,
        b: usize,
        len: usize,
        dst: usize,
    },
    MatVec {
        m: usize,
        v: usize,
        rows: usize,
        cols: usize,
        dst: usize,
    },
    /// `dst[k] = slots[src + positions[k]]` for the positions in `Tape::positions[from..to]`.
    Gather {
        src: usize,
        from: usize,
        to: usize,
        dst: usize,
    },
    /// Items of `item_len` slots each, starting at `Tape::items[from..to]`, laid end to end.
    Stack {
        from: usize,
        to: usize,
        item_len: usize,
        dst: usize,
    },
    LogDensity {
        family: crate::dist::Family,
        n: usize,
        x: Arg,
        params: [Arg; 3],
        arity: usize,
        dst: usize,
    },
    /// As `LogDensity`, one log density per element into `dst..dst + n`.
    LogDensityEach {
        family: crate::dist::Family,
        n: usize,
        x: Arg,
        params: [Arg; 3],
        arity: usize,
        dst: usize,
    },
    /// Items of `len` slots each, starting at `Tape::items[from..to]`, folded element by element.
    Fold {
        f: BinaryFn,
        from: usize,
        to: usize,
        len: usize,
        dst: usize,
    },
    CumSum {
        src: usize,
        len: usize,
        dst: usize,
    },
    MvNormal {
        index: usize,
        x: usize,
        mean: Arg,
        dst: usize,
    },
}

/// The read-only tables instructions look things up in, borrowed from a [`Tape`] or, while
/// compiling, from the tape being built and the model.
#[derive(Clone, Copy)]
pub(crate) struct Tables<'t> {
    pub positions: &'t [usize],
    pub items: &'t [usize],
    pub mvnormals: &'t [MvNormal],
}

/// A compiled model. Immutable and cheap to share between chains; each chain owns a [`Scratch`].
#[derive(Clone, Debug)]
pub struct Tape {
    ops: Vec<Op>,
    /// `ops[..density_ops]` compute the log density; the rest compute derived quantities only.
    density_ops: usize,
    /// Slot values before any evaluation: constants and everything folded from them.
    template: Vec<f64>,
    positions: Vec<usize>,
    items: Vec<usize>,
    mvnormals: Vec<MvNormal>,
    /// Slot of the log density on the constrained scale.
    density: usize,
    /// Slots of each parameter's log-Jacobian.
    jacobians: Vec<usize>,
    /// (first slot, length) of each parameter's constrained value, then each derived quantity's.
    outputs: Vec<(usize, usize)>,
    columns: Vec<String>,
    dim: usize,
    transforms: Vec<(Transform, usize, usize)>,
}

/// The slot array one evaluation works in. Make it once with [`Tape::scratch`] and reuse it.
#[derive(Clone, Debug)]
pub struct Scratch {
    slots: Vec<f64>,
}

impl Tape {
    /// Compile a checked model.
    pub fn new(model: &Model) -> Tape {
        compile::compile(model)
    }

    /// A fresh slot array for this tape.
    pub fn scratch(&self) -> Scratch {
        Scratch { slots: self.template.clone() }
    }

    fn tables(&self) -> Tables<'_> {
        Tables { positions: &self.positions, items: &self.items, mvnormals: &self.mvnormals }
    }

    /// Number of unconstrained coordinates.
    pub fn dim(&self) -> usize {
        self.dim
    }

    /// Log density at unconstrained `theta`, including the log-Jacobian of the transforms: the
    /// target that samplers work on. Leaves the evaluation's values in `scratch` for
    /// [`Tape::write_draw`].
    #[inline]
    pub fn log_density(&self, theta: &[f64], scratch: &mut Scratch) -> f64 {
        let (constrained, jacobian) = self.log_density_parts(theta, scratch);
        constrained + jacobian
    }

    /// (log density on the constrained scale, total log-Jacobian) at unconstrained `theta`.
    pub fn log_density_parts(&self, theta: &[f64], scratch: &mut Scratch) -> (f64, f64) {
        debug_assert_eq!(theta.len(), self.dim);
        let slots = &mut scratch.slots;
        let tables = self.tables();
        for op in &self.ops[..self.density_ops] {
            exec::run(tables, op, theta, slots);
        }
        let jacobian = self.jacobians.iter().map(|&j| slots[j]).sum();
        (slots[self.density], jacobian)
    }

    /// Names of the values a draw records: each parameter element, then each derived element,
    /// e.g. `mu`, `beta[1]`, `beta[2]`, `station[1]`.
    pub fn columns(&self) -> &[String] {
        &self.columns
    }

    /// Complete the evaluation last made in `scratch` (derived quantities) and copy the
    /// constrained parameters and derived quantities into `out` (length `columns().len()`).
    pub fn write_draw(&self, theta: &[f64], scratch: &mut Scratch, out: &mut [f64]) {
        let slots = &mut scratch.slots;
        let tables = self.tables();
        for op in &self.ops[self.density_ops..] {
            exec::run(tables, op, theta, slots);
        }
        let mut k = 0;
        for &(start, len) in &self.outputs {
            out[k..k + len].copy_from_slice(&slots[start..start + len]);
            k += len;
        }
    }

    /// The unconstrained θ of constrained parameter values given in declaration order, or the
    /// index of the first value outside its support.
    pub fn unconstrain(&self, values: &[f64]) -> Result<Vec<f64>, usize> {
        let mut theta = vec![0.0; self.dim];
        for &(transform, offset, len) in &self.transforms {
            for i in offset..offset + len {
                theta[i] = transform.unconstrain(values[i]).ok_or(i)?;
            }
        }
        Ok(theta)
    }

    /// Constrained parameter values (declaration order) of unconstrained `theta`.
    pub fn constrain(&self, theta: &[f64]) -> Vec<f64> {
        let mut values = vec![0.0; self.dim];
        for &(transform, offset, len) in &self.transforms {
            for i in offset..offset + len {
                values[i] = transform.constrain(theta[i]);
            }
        }
        values
    }
}

#[cfg(test)]
mod tests;
