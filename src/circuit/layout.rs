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

/// Words a register or gate name may not be: the statements and functions of
/// OpenQASM 2 and the gates of `qelib1.inc` (Cross, Bishop, Smolin, Gambetta
/// 2017), and the words and standard gates of OpenQASM 3.
pub const QASM_WORDS: &[&str] = &[
    "OPENQASM",
    "include",
    "qreg",
    "creg",
    "gate",
    "opaque",
    "barrier",
    "measure",
    "reset",
    "if",
    "pi",
    "sin",
    "cos",
    "tan",
    "exp",
    "ln",
    "sqrt",
    "U",
    "CX",
    "u3",
    "u2",
    "u1",
    "u0",
    "u",
    "p",
    "cx",
    "id",
    "x",
    "y",
    "z",
    "h",
    "s",
    "sdg",
    "t",
    "tdg",
    "rx",
    "ry",
    "rz",
    "sx",
    "sxdg",
    "cz",
    "cy",
    "swap",
    "ch",
    "ccx",
    "cswap",
    "crx",
    "cry",
    "crz",
    "cu1",
    "cp",
    "cu3",
    "csx",
    "cu",
    "rxx",
    "rzz",
    "rccx",
    "rc3x",
    "c3x",
    "c3sqrtx",
    "c4x",
    "qubit",
    "bit",
    "def",
    "ctrl",
    "negctrl",
    "inv",
    "pow",
    "else",
    "for",
    "while",
    "return",
    "let",
    "const",
    "input",
    "output",
    "int",
    "uint",
    "float",
    "bool",
    "angle",
    "complex",
    "box",
    "delay",
    "stretch",
    "duration",
    "in",
    "end",
    "break",
    "continue",
    "gphase",
    "phase",
    "cphase",
    "true",
    "false",
    "array",
    "durationof",
    "extern",
    "defcal",
    "cal",
    "defcalgrammar",
    "euler",
    "tau",
    "im",
];

/// Whether `name` is an identifier OpenQASM 2 and 3 take for a register:
/// a lowercase letter, then letters, digits and '_', and not one of
/// [`QASM_WORDS`] (`x` and `y`, the library's own registers, are allowed).
pub fn usable_register_name(name: &str) -> bool {
    let mut chars = name.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_lowercase())
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
        && (!QASM_WORDS.contains(&name) || [INPUTS, OUTPUTS].contains(&name))
}

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
    /// The same circuit with registers renamed: every `(from, to)` of `map`
    /// at once (so two registers may swap names). Numbered labels (`a0`)
    /// follow their register; gates and the phase line stay.
    pub fn with_registers_renamed(&self, map: &[(String, String)]) -> Circuit {
        let lines = self
            .lines()
            .iter()
            .map(|l| match map.iter().find(|(from, _)| *from == l.register) {
                Some((from, to)) => LineInfo {
                    register: to.clone(),
                    index: l.index,
                    role: l.role,
                    label: if l.label == format!("{from}{}", l.index) {
                        format!("{to}{}", l.index)
                    } else {
                        l.label.clone()
                    },
                },
                None => l.clone(),
            })
            .collect();
        let mut c = Circuit::from_parts(lines, self.gates().to_vec())
            .expect("the same lines as a valid circuit");
        c.set_phase(self.phase());
        c
    }

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
