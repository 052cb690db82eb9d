//! The register contract: the names of the registers every circuit of the
//! library uses, and register layouts turned into lines.
//!
//! A function oracle has `x` (inputs, in the spec's order) then `y` (outputs);
//! a permutation has `x`, changed in place; an arithmetic op has the registers
//! its spec names (`ctrl`, `a`, `b`, `y`, `cout`). Ancillae, which start and
//! end at 0, are the register `anc`, always last. [`crate::Spec::layout`] states
//! the layout of a spec; synthesis lays its circuits out by it and the
//! verifier binds a circuit's lines to the spec by the same names.

use super::{Circuit, Line, LineInfo, Role};

/// The inputs of a function oracle, and the lines of a permutation.
pub const INPUTS: &str = "x";
/// The outputs of a function oracle, and the one-bit result of a comparison.
pub const OUTPUTS: &str = "y";
/// The ancillae: they start at 0 and must end at 0.
pub const ANCILLAE: &str = "anc";
/// The control of a controlled op.
pub const CONTROL: &str = "ctrl";
/// The carry-out of an adder.
pub const CARRY: &str = "cout";

/// One register of a layout.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Register {
    /// Its name in OpenQASM.
    pub name: &'static str,
    /// What its lines are for.
    pub role: Role,
    /// One label per line (the spec's variable names, or `name` and index).
    pub labels: Vec<String>,
}

impl Register {
    /// A register whose lines are labelled by the given names.
    pub fn named(name: &'static str, role: Role, labels: Vec<String>) -> Self {
        Register { name, role, labels }
    }

    /// A register of `size` lines labelled `name0`, `name1`, ...
    pub fn numbered(name: &'static str, role: Role, size: usize) -> Self {
        let labels = (0..size).map(|i| format!("{name}{i}")).collect();
        Register { name, role, labels }
    }

    /// Its number of lines.
    pub fn size(&self) -> usize {
        self.labels.len()
    }
}

/// The registers of a circuit in OpenQASM order, ancillae excluded.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Layout(pub Vec<Register>);

impl Layout {
    /// The lines of the layout, register after register.
    pub fn lines(&self) -> Vec<LineInfo> {
        self.0
            .iter()
            .flat_map(|r| {
                r.labels.iter().enumerate().map(|(i, label)| LineInfo {
                    register: r.name.to_string(),
                    index: i as u32,
                    role: r.role,
                    label: label.clone(),
                })
            })
            .collect()
    }

    /// (name, size) of every register, in order.
    pub fn sizes(&self) -> Vec<(&'static str, usize)> {
        self.0.iter().map(|r| (r.name, r.size())).collect()
    }
}

impl Circuit {
    /// Adds one line to the ancilla register and returns it.
    pub fn add_ancilla(&mut self) -> Line {
        let index = self.ancillae;
        self.add_line(LineInfo {
            register: ANCILLAE.into(),
            index,
            role: Role::Ancilla,
            label: format!("{ANCILLAE}{index}"),
        })
    }
}
