//! The register layout each kind of spec promises: which registers a circuit
//! for it has, in OpenQASM order, their sizes and roles.

use super::{ArithOp, ArithSpec, FunctionSpec, Spec, SpecBody};
use crate::circuit::layout::{Layout, Register, CARRY, CONTROL, INPUTS, OUTPUTS};
use crate::circuit::Role;

impl Spec {
    /// The registers of a circuit for this spec (ancillae excluded); a
    /// controlled spec's `ctrl[1]` first.
    pub fn layout(&self) -> Layout {
        let mut layout = match &self.body {
            SpecBody::Function(f) => f.layout(),
            SpecBody::Permutation(p) => permutation_layout(p.width()),
            SpecBody::Arithmetic(a) => return a.layout(),
        };
        if self.controlled {
            layout
                .0
                .insert(0, Register::numbered(CONTROL, Role::Input, 1));
        }
        layout
    }
}

impl FunctionSpec {
    /// `x` (the inputs, labelled by their names), then `y` (the outputs).
    pub fn layout(&self) -> Layout {
        Layout(vec![
            Register::named(INPUTS, Role::Input, self.inputs.clone()),
            Register::named(
                OUTPUTS,
                Role::Output,
                self.outputs.iter().map(|o| o.name.clone()).collect(),
            ),
        ])
    }
}

/// The lines of an in-place permutation on `width` lines: `x`, labelled `x0`, `x1`, ...
pub fn permutation_layout(width: usize) -> Layout {
    Layout(vec![Register::numbered(INPUTS, Role::Data, width)])
}

impl ArithSpec {
    /// `ctrl[1]` when controlled, `a`, then `b`, `y` or `cout` as the op has them.
    pub fn layout(&self) -> Layout {
        use ArithOp::*;
        let w = self.width;
        let mut regs = Vec::new();
        if self.controlled {
            regs.push(Register::numbered(CONTROL, Role::Input, 1));
        }
        let a_role = match self.op {
            AddConst | IncrementMod => Role::Data,
            _ => Role::Input,
        };
        regs.push(Register::numbered("a", a_role, w));
        match self.op {
            Add | Sub | AddMod => regs.push(Register::numbered("b", Role::Data, w)),
            LessThan => regs.push(Register::numbered("b", Role::Input, w)),
            _ => {}
        }
        match self.op {
            LessThan | LessThanConst | EqualConst => {
                regs.push(Register::numbered(OUTPUTS, Role::Output, 1))
            }
            Lookup => regs.push(Register::numbered(OUTPUTS, Role::Output, self.data_width)),
            _ => {}
        }
        if self.op == Add && self.carry_out {
            regs.push(Register::numbered(CARRY, Role::Output, 1));
        }
        Layout(regs)
    }
}
