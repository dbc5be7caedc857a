//! Flattening a checked model into instructions, folding constants on the way.

use super::{Arg, Op, Tables, Tape, exec};
use crate::dist::MvNormal;
use crate::model::{Constant, Derived, Model, Node, NodeKind, Shape, elements};
use std::collections::HashMap;

pub(crate) fn compile(model: &Model) -> Tape {
    let mut c = Compiler::new(&model.constants, &model.derived, &model.mvnormals);
    let mut jacobians = Vec::new();
    for p in &model.parameters {
        let len = p.shape.len();
        let (dst, jacobian) = (c.alloc(len), c.alloc(1));
        c.tape.ops.push(Op::Constrain { transform: p.transform, theta: p.offset, len, dst, jacobian });
        c.parameter_slots.push(dst);
        jacobians.push(jacobian);
        c.tape.transforms.push((p.transform, p.offset, len));
    }
    let density = c.node(&model.log_density);
    c.tape.density_ops = c.tape.ops.len();
    let mut outputs: Vec<(usize, usize)> =
        model.parameters.iter().zip(&c.parameter_slots).map(|(p, &slot)| (slot, p.shape.len())).collect();
    // Local intermediates are computed only where something uses them, and never recorded.
    for (i, d) in model.derived.iter().enumerate().filter(|(_, d)| d.reported) {
        outputs.push((c.derived_slot(i), d.node.shape.len()));
    }
    let names = model.parameters.iter().map(|p| (&p.name, p.shape));
    let columns = names.chain(model.derived.iter().filter(|d| d.reported).map(|d| (&d.name, d.node.shape)));
    Tape {
        density,
        jacobians,
        outputs,
        columns: columns.flat_map(|(name, shape)| shape.element_names(name)).collect(),
        dim: model.dim,
        mvnormals: model.mvnormals.clone(),
        ..c.tape
    }
}

struct Compiler<'m> {
    constants: &'m [Constant],
    derived: &'m [Derived],
    /// Borrowed, not copied: the checker folds many small constants while the model's
    /// factorised covariances may be large.
    mvnormals: &'m [MvNormal],
    parameter_slots: Vec<usize>,
    /// Slots of the constants used so far; a map, because folding one small constant must not
    /// cost time in proportion to all the constants a model has.
    constant_slots: HashMap<usize, usize>,
    derived_slots: Vec<Option<usize>>,
    tape: Tape,
}

impl<'m> Compiler<'m> {
    fn new(constants: &'m [Constant], derived: &'m [Derived], mvnormals: &'m [MvNormal]) -> Self {
        let tape = Tape {
            ops: Vec::new(),
            density_ops: 0,
            template: Vec::new(),
            positions: Vec::new(),
            items: Vec::new(),
            mvnormals: Vec::new(),
            density: 0,
            jacobians: Vec::new(),
            outputs: Vec::new(),
            columns: Vec::new(),
            dim: 0,
            transforms: Vec::new(),
        };
        Compiler {
            constants,
            derived,
            mvnormals,
            parameter_slots: Vec::new(),
            constant_slots: HashMap::new(),
            derived_slots: vec![None; derived.len()],
            tape,
        }
    }

    fn alloc(&mut self, len: usize) -> usize {
        let at = self.tape.template.len();
        self.tape.template.resize(at + len, 0.0);
        at
    }

    /// Add `op` to the tape, or, when its inputs are all known, run it now into the template.
    fn emit(&mut self, op: Op, constant: bool) {
        if constant {
            let tables = Tables { positions: &self.tape.positions, items: &self.tape.items, mvnormals: self.mvnormals };
            exec::run(tables, &op, &[], &mut self.tape.template);
        } else {
            self.tape.ops.push(op);
        }
    }

    fn arg(&mut self, node: &Node) -> Arg {
        Arg { offset: self.node(node), stride: usize::from(node.shape != Shape::Scalar) }
    }

    fn derived_slot(&mut self, i: usize) -> usize {
        if let Some(slot) = self.derived_slots[i] {
            return slot;
        }
        // Compile the uncompiled quantities this one needs first, in definition order (each
        // names only earlier ones), so compiling never recurses along a long chain of names.
        let mut needed = vec![i];
        let mut seen = std::collections::HashSet::from([i]);
        let mut k = 0;
        while k < needed.len() {
            let mut refs = Vec::new();
            self.derived[needed[k]].node.derived_refs(&mut refs);
            for j in refs {
                if self.derived_slots[j].is_none() && seen.insert(j) {
                    needed.push(j);
                }
            }
            k += 1;
        }
        needed.sort_unstable();
        for j in needed {
            let slot = self.node(&self.derived[j].node);
            self.derived_slots[j] = Some(slot);
        }
        self.derived_slots[i].expect("compiled above")
    }

    /// Compile `node`; returns the first slot of its value.
    fn node(&mut self, node: &Node) -> usize {
        let len = node.shape.len();
        let op = match &node.kind {
            NodeKind::Constant(i) => {
                if let Some(&slot) = self.constant_slots.get(i) {
                    return slot;
                }
                let slot = self.alloc(len);
                self.tape.template[slot..slot + len].copy_from_slice(&self.constants[*i].values);
                self.constant_slots.insert(*i, slot);
                return slot;
            }
            NodeKind::Parameter(i) => return self.parameter_slots[*i],
            NodeKind::Derived(i) => return self.derived_slot(*i),
            NodeKind::Map(f, x) => {
                let src = self.node(x);
                Op::Map { f: *f, src, len, dst: self.alloc(len) }
            }
            NodeKind::Zip(f, a, b) => {
                let (a, b) = (self.arg(a), self.arg(b));
                Op::Zip { f: *f, a, b, len, dst: self.alloc(len) }
            }
            NodeKind::Reduce(f, x) => {
                let src = self.node(x);
                Op::Reduce { f: *f, src, len: x.shape.len(), dst: self.alloc(1) }
            }
            NodeKind::Dot(a, b) => {
                let (a_at, b_at) = (self.node(a), self.node(b));
                Op::Dot { a: a_at, b: b_at, len: a.shape.len(), dst: self.alloc(1) }
            }
            NodeKind::MatVec(m, v) => {
                let (m_at, v_at) = (self.node(m), self.node(v));
                let (rows, cols) = (len, v.shape.len());
                Op::MatVec { m: m_at, v: v_at, rows, cols, dst: self.alloc(rows) }
            }
            NodeKind::Gather(x, positions) => {
                let src = self.node(x);
                let from = self.tape.positions.len();
                self.tape.positions.extend_from_slice(positions);
                Op::Gather { src, from, to: self.tape.positions.len(), dst: self.alloc(len) }
            }
            NodeKind::Stack(items) => {
                let starts: Vec<usize> = items.iter().map(|item| self.node(item)).collect();
                let from = self.tape.items.len();
                self.tape.items.extend(starts);
                let item_len = items[0].shape.len();
                Op::Stack { from, to: self.tape.items.len(), item_len, dst: self.alloc(len) }
            }
            NodeKind::LogDensity { family, x, params } | NodeKind::LogDensityEach { family, x, params } => {
                let n = elements(std::iter::once(&**x).chain(params).map(|p| p.shape));
                let x = self.arg(x);
                let mut args = [Arg { offset: 0, stride: 0 }; 3];
                for (slot, p) in args.iter_mut().zip(params) {
                    *slot = self.arg(p);
                }
                let (family, arity) = (*family, params.len());
                if let NodeKind::LogDensity { .. } = node.kind {
                    Op::LogDensity { family, n, x, params: args, arity, dst: self.alloc(1) }
                } else {
                    Op::LogDensityEach { family, n, x, params: args, arity, dst: self.alloc(n) }
                }
            }
            NodeKind::Fold(f, items) => {
                let starts: Vec<usize> = items.iter().map(|item| self.node(item)).collect();
                let from = self.tape.items.len();
                self.tape.items.extend(starts);
                Op::Fold { f: *f, from, to: self.tape.items.len(), len, dst: self.alloc(len) }
            }
            NodeKind::CumSum(x) => {
                let src = self.node(x);
                Op::CumSum { src, len, dst: self.alloc(len) }
            }
            NodeKind::MvNormal { index, x, mean } => {
                let (x, mean) = (self.node(x), self.arg(mean));
                Op::MvNormal { index: *index, x, mean, dst: self.alloc(1) }
            }
        };
        let dst = op_dst(&op);
        self.emit(op, node.constant);
        dst
    }
}

fn op_dst(op: &Op) -> usize {
    match *op {
        Op::Constrain { dst, .. }
        | Op::Map { dst, .. }
        | Op::Zip { dst, .. }
        | Op::Reduce { dst, .. }
        | Op::Dot { dst, .. }
        | Op::MatVec { dst, .. }
        | Op::Gather { dst, .. }
        | Op::Stack { dst, .. }
        | Op::LogDensity { dst, .. }
        | Op::LogDensityEach { dst, .. }
        | Op::Fold { dst, .. }
        | Op::CumSum { dst, .. }
        | Op::MvNormal { dst, .. } => dst,
    }
}
