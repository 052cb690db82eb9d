//! Binding a circuit's lines to a spec by register name: the free lines (inputs and targets) and the ancillae.

use super::VerifyError;
use crate::circuit::layout::ANCILLAE;
use crate::circuit::Circuit;
use crate::spec::Spec;

pub(super) struct Binding {
    /// Circuit line of each free state bit.
    pub(super) free: Vec<usize>,
    /// Lines that must end at 0.
    pub(super) ancillae: Vec<usize>,
    /// (register, lines in index order) for reports.
    pub(super) registers: Vec<(String, Vec<usize>)>,
}

pub(super) fn bind(circuit: &Circuit, expect: &[(&str, usize)]) -> Result<Binding, VerifyError> {
    let mut free = Vec::new();
    let mut registers = Vec::new();
    let known: Vec<&str> = expect.iter().map(|(n, _)| *n).collect();
    for (name, size) in expect {
        let lines: Vec<usize> = circuit.register(name).iter().map(|l| l.index()).collect();
        if lines.len() != *size {
            return Err(VerifyError::Binding(format!(
                "register '{name}' should have {size} lines, it has {}",
                lines.len()
            )));
        }
        free.extend(&lines);
        registers.push((name.to_string(), lines));
    }
    let mut ancillae = Vec::new();
    for (name, _) in circuit.registers() {
        if known.contains(&name.as_str()) {
            continue;
        }
        if name != ANCILLAE {
            return Err(VerifyError::Binding(format!(
                "register '{name}' is neither one of {} nor the ancilla register 'anc'",
                known.join(", ")
            )));
        }
        let lines: Vec<usize> = circuit.register(&name).iter().map(|l| l.index()).collect();
        ancillae.extend(&lines);
        registers.push((name, lines));
    }
    Ok(Binding {
        free,
        ancillae,
        registers,
    })
}

/// Number of free lines (inputs and targets) once the circuit is bound to the spec.
pub fn free_lines(circuit: &Circuit, spec: &Spec) -> Result<u32, VerifyError> {
    Ok(bind(circuit, &spec.layout().sizes())?.free.len() as u32)
}
