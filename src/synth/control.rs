//! A control for any synthesized circuit: `controlled = true` on a function,
//! permutation or netlist spec.
//!
//! The control goes on the effect gates only, the gates that write a line
//! of the map (outputs, or a permutation's lines). The compute and
//! uncompute gates, which write only ancillae, stay as they are when they
//! read no line an effect gate writes: then, with the control at 0, the
//! map's lines never change, the ancilla gates see the same values as in
//! the uncontrolled circuit and return the ancillae to 0 as it does, and
//! nothing changes; with the control at 1 the circuit is the uncontrolled
//! one. When some ancilla gate reads a line an effect gate writes, every
//! gate takes the control instead. The verifier proves the result against
//! its own reference of the controlled map either way.

use crate::circuit::layout::{ANCILLAE, CONTROL};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo, Role};

/// A circuit with the control added, and what took it.
#[derive(Clone, Debug)]
pub struct Controlled {
    /// The circuit: `ctrl[0]` is line 0, the old lines follow in order.
    pub circuit: Circuit,
    /// Gates that took the control.
    pub controlled: usize,
    /// Compute and uncompute gates left without it.
    pub left: usize,
}

/// Adds a `ctrl[1]` register as line 0 of `c` and the control to its effect
/// gates (see the module's comment).
pub fn add_control(c: &Circuit) -> Controlled {
    let is_ancilla = |l: Line| c.lines()[l.index()].register == ANCILLAE;
    let mut written = vec![false; c.width()];
    for g in c.gates() {
        if !is_ancilla(g.target()) {
            written[g.target().index()] = true;
        }
    }
    let reads_written = c
        .gates()
        .iter()
        .any(|g| is_ancilla(g.target()) && g.controls().iter().any(|x| written[x.line.index()]));
    let mut lines = vec![LineInfo {
        register: CONTROL.into(),
        index: 0,
        role: Role::Input,
        label: format!("{CONTROL}0"),
    }];
    lines.extend(c.lines().iter().cloned());
    let shift = |l: Line| Line(l.0 + 1);
    let mut controlled = 0;
    let mut gates = Vec::with_capacity(c.gates().len());
    for g in c.gates() {
        let moved = g.renamed(shift).expect("a shift keeps lines distinct");
        if reads_written || !is_ancilla(g.target()) {
            let mut cs = moved.controls().to_vec();
            cs.push(Control::pos(0));
            controlled += 1;
            gates.push(Gate::new(cs, moved.target()).expect("line 0 is new"));
        } else {
            gates.push(moved);
        }
    }
    let mut circuit = Circuit::from_parts(lines, gates).expect("every line shifted by one");
    circuit.set_phase(c.phase().map(shift));
    Controlled {
        left: c.gates().len() - controlled,
        circuit,
        controlled,
    }
}

/// The circuit without its control: every gate's control on line 0
/// (`ctrl[0]`) dropped, the line kept. For the cost of the control.
pub fn without_control(c: &Circuit) -> Circuit {
    let mut out = c.without_gates();
    out.set_gates(
        c.gates()
            .iter()
            .map(|g| {
                if g.has_control(Line(0)) && g.is_flip() {
                    let cs = g
                        .controls()
                        .iter()
                        .copied()
                        .filter(|x| x.line != Line(0))
                        .collect();
                    Gate::new(cs, g.target()).expect("fewer controls")
                } else {
                    g.clone()
                }
            })
            .collect(),
    );
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lines(regs: &[(&str, usize)]) -> Vec<LineInfo> {
        regs.iter()
            .flat_map(|&(r, n)| {
                (0..n).map(move |i| LineInfo {
                    register: r.into(),
                    index: i as u32,
                    role: if r == ANCILLAE {
                        Role::Ancilla
                    } else {
                        Role::Data
                    },
                    label: String::new(),
                })
            })
            .collect()
    }

    // Compute x0 & x1 into the ancilla, copy to y, uncompute: only the copy
    // takes the control, and the circuit is the identity with the control at
    // 0 and the AND oracle with it at 1 (by hand).
    #[test]
    fn only_the_copy_takes_the_control() {
        let gates = vec![
            Gate::toffoli(0, 1, 3),
            Gate::cnot(3, 2),
            Gate::toffoli(0, 1, 3),
        ];
        let c = Circuit::from_parts(lines(&[("x", 2), ("y", 1), ("anc", 1)]), gates).unwrap();
        let k = add_control(&c);
        assert_eq!((k.controlled, k.left), (1, 2));
        assert_eq!(k.circuit.lines()[0].register, "ctrl");
        for s in 0..8u64 {
            let state = s << 1; // ctrl 0
            assert_eq!(k.circuit.simulate(state), state);
            let on = state | 1;
            let (x0, x1) = (s & 1, (s >> 1) & 1);
            assert_eq!(k.circuit.simulate(on), on ^ ((x0 & x1) << 3));
        }
        assert_eq!(without_control(&k.circuit).gates()[1], Gate::cnot(4, 3));
    }

    // An ancilla gate that reads an output line: every gate takes the control.
    #[test]
    fn reading_a_written_line_controls_everything() {
        let gates = vec![Gate::cnot(0, 1), Gate::cnot(1, 2), Gate::cnot(0, 1)];
        let c = Circuit::from_parts(lines(&[("x", 1), ("y", 1), ("anc", 1)]), gates).unwrap();
        let k = add_control(&c);
        assert_eq!((k.controlled, k.left), (3, 0));
    }
}
