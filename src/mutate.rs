//! Fault injection: every single-fault mutant of a circuit, for testing verifiers.

use crate::circuit::{Circuit, Control, Gate, Line};

/// The kinds of fault.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, strum::EnumIter, strum::EnumMessage)]
pub enum Fault {
    /// A gate removed.
    #[strum(message = "drop a gate")]
    DropGate,
    /// One control's polarity flipped.
    #[strum(message = "flip a control")]
    FlipControl,
    /// A gate's target moved to another line.
    #[strum(message = "move a target")]
    MoveTarget,
    /// A control added on a line the gate does not use.
    #[strum(message = "add a control")]
    AddControl,
    /// A NOT gate inserted.
    #[strum(message = "add a gate")]
    AddGate,
}

impl Fault {
    /// Every kind of fault.
    pub fn all() -> impl Iterator<Item = Fault> {
        <Fault as strum::IntoEnumIterator>::iter()
    }

    /// The fault in words.
    pub fn name(self) -> &'static str {
        strum::EnumMessage::get_message(&self).unwrap_or("")
    }
}

/// Every single-fault mutant of `c`: each gate dropped; each control flipped;
/// each target moved to each free line; each free line added as a positive
/// control; a NOT inserted on each line before each gate and at the end.
pub fn mutants(c: &Circuit) -> Vec<(Fault, Circuit)> {
    let mut out = Vec::new();
    let gates = c.gates();
    let with = |gs: Vec<Gate>| {
        let mut m = c.clone();
        m.set_gates(gs);
        m
    };
    for (k, g) in gates.iter().enumerate() {
        let mut gs = gates.to_vec();
        gs.remove(k);
        out.push((Fault::DropGate, with(gs)));
        for j in 0..g.controls().len() {
            let mut gs = gates.to_vec();
            gs[k] = g.with_flipped_control(j);
            out.push((Fault::FlipControl, with(gs)));
        }
        for l in 0..c.width() as u32 {
            let line = Line(l);
            if g.touches(line) {
                continue;
            }
            if let Some(moved) = Gate::new(g.controls().to_vec(), line) {
                let mut gs = gates.to_vec();
                gs[k] = moved;
                out.push((Fault::MoveTarget, with(gs)));
            }
            let mut controls = g.controls().to_vec();
            controls.push(Control::pos(l));
            if let Some(more) = Gate::new(controls, g.target()) {
                let mut gs = gates.to_vec();
                gs[k] = more;
                out.push((Fault::AddControl, with(gs)));
            }
        }
    }
    for at in 0..=gates.len() {
        for l in 0..c.width() as u32 {
            let mut gs = gates.to_vec();
            gs.insert(at, Gate::not(l));
            out.push((Fault::AddGate, with(gs)));
        }
    }
    out
}
