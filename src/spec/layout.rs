//! The register layout each kind of spec promises: which registers a circuit
//! for it has, in OpenQASM order, their sizes and roles.

use super::{bits_of, ArithOp, ArithSpec, FunctionSpec, Spec, SpecBody};
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
    /// `ctrl[1]` when controlled, then the op's registers:
    ///
    /// - `add`, `subtract`: `a`, `b` (changed), `cout` with `carry_out`; with
    ///   `constant`, `a` alone (changed in place), then `cout`;
    /// - `compare`: `a`, `b` (or `a` alone with `constant`), `y[1]`;
    /// - `multiply`: `a`, `b`, `p[2w]`; with `constant`, `a`, `p[w + bits(c)]`;
    ///   with `constant` and `modulus`, `x` (changed in place);
    /// - `power`: `e[exponent_bits]`, `x` (changed in place);
    /// - `weight`: `a`, `y[bits(w)]`;
    /// - `lookup`: `a` (the address), `y[data_width]`.
    pub fn layout(&self) -> Layout {
        use ArithOp::*;
        let w = self.width;
        let mut regs = Vec::new();
        if self.controlled {
            regs.push(Register::numbered(CONTROL, Role::Input, 1));
        }
        let constant = self.constant.is_some();
        match self.op {
            Add | Subtract => {
                if constant {
                    regs.push(Register::numbered("a", Role::Data, w));
                } else {
                    regs.push(Register::numbered("a", Role::Input, w));
                    regs.push(Register::numbered("b", Role::Data, w));
                }
                if self.carry_out {
                    regs.push(Register::numbered(CARRY, Role::Output, 1));
                }
            }
            Compare => {
                regs.push(Register::numbered("a", Role::Input, w));
                if !constant {
                    regs.push(Register::numbered("b", Role::Input, w));
                }
                regs.push(Register::numbered(OUTPUTS, Role::Output, 1));
            }
            Multiply => match (&self.constant, self.modulus.is_some()) {
                (Some(_), true) => regs.push(Register::numbered("x", Role::Data, w)),
                (Some(c), false) => {
                    regs.push(Register::numbered("a", Role::Input, w));
                    regs.push(Register::numbered("p", Role::Output, w + bits_of(c)));
                }
                (None, _) => {
                    regs.push(Register::numbered("a", Role::Input, w));
                    regs.push(Register::numbered("b", Role::Input, w));
                    regs.push(Register::numbered("p", Role::Output, 2 * w));
                }
            },
            Power => {
                regs.push(Register::numbered("e", Role::Input, self.exponent_bits));
                regs.push(Register::numbered("x", Role::Data, w));
            }
            Weight => {
                regs.push(Register::numbered("a", Role::Input, w));
                regs.push(Register::numbered(OUTPUTS, Role::Output, weight_bits(w)));
            }
            Lookup => {
                regs.push(Register::numbered("a", Role::Input, w));
                regs.push(Register::numbered(OUTPUTS, Role::Output, self.data_width));
            }
        }
        Layout(regs)
    }
}

/// The bits of a popcount of `w` bits: bits(w).
pub fn weight_bits(w: usize) -> usize {
    (usize::BITS - w.leading_zeros()) as usize
}
