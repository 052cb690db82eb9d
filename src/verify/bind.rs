//! Binding a circuit's lines to a spec by register name: the free lines (inputs and targets) and the ancillae.

use super::VerifyError;
use crate::circuit::layout::{ANCILLAE, OUTPUTS};
use crate::circuit::Circuit;
use crate::spec::{OracleForm, Spec, SpecBody};

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

/// Whether the spec is a controlled function or permutation, whose control
/// the verifier models itself (arithmetic references take theirs).
pub(super) fn outer_control(spec: &Spec) -> bool {
    spec.controlled && !matches!(spec.body, SpecBody::Arithmetic(_))
}

/// The registers the verifier binds, in state-bit order: the spec's layout,
/// but a controlled function's or permutation's `ctrl` last, so that the
/// map's own lines keep the low state bits and `ctrl` is the top one.
pub(super) fn expected_registers(spec: &Spec) -> Vec<(&'static str, usize)> {
    let mut regs = spec.layout().sizes();
    if outer_control(spec) {
        let ctrl = regs.remove(0);
        debug_assert_eq!(ctrl.0, crate::circuit::layout::CONTROL);
        regs.push(ctrl);
    }
    regs
}

/// Number of free lines (inputs and targets) once the circuit is bound to the spec.
pub fn free_lines(circuit: &Circuit, spec: &Spec) -> Result<u32, VerifyError> {
    Ok(bind(circuit, &expected_registers(spec))?.free.len() as u32)
}

/// What differs between the oracle form the spec asks for and the form of
/// the circuit: a phase oracle must be prepared and restored on the spec's
/// output line (`y[0]`), an xor oracle on no line. `None` when they agree.
pub(super) fn form_mismatch(circuit: &Circuit, spec: &Spec) -> Option<String> {
    let name = |l: crate::circuit::Line| {
        let info = &circuit.lines()[l.index()];
        format!("{}[{}]", info.register, info.index)
    };
    let want = match spec.form {
        OracleForm::Phase => circuit.register(OUTPUTS).first().copied(),
        OracleForm::Xor => None,
    };
    if circuit.phase() == want {
        return None;
    }
    match (spec.form, circuit.phase()) {
        (OracleForm::Xor, None) => None,
        (OracleForm::Xor, Some(got)) => Some(format!(
            "the spec asks for an xor oracle; the circuit is wrapped as a phase oracle on {}",
            name(got)
        )),
        (OracleForm::Phase, None) => Some(format!(
            "the spec asks for a phase oracle on {OUTPUTS}[0]; the circuit has no phase wrapper"
        )),
        (OracleForm::Phase, Some(got)) => Some(format!(
            "the spec asks for a phase oracle on {OUTPUTS}[0]; the circuit's phase wrapper is on {}",
            name(got)
        )),
    }
}
