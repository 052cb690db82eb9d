//! A permutation through two xor oracles: compute the image out of place,
//! uncompute the input with the inverse, and swap the registers.
//!
//! For `P` on `n` lines, with `n` clean lines `y`: `y ^= P(x)` by the xor
//! oracle of `P` (method `xag`), then `x ^= P^-1(y)`, which clears `x` since
//! `P^-1(P(x)) = x`, by the xor oracle of the inverse, then `x` and `y`
//! exchange values by three CNOTs per line (free in Toffolis), so `P(x)` ends
//! on `x` and `y` is clean again. This is the usual route for S-boxes
//! (common practice: an in-place S-box is its forward and inverse circuits).
//! It pays off when the permutation and its inverse have small multi-level
//! networks; transformation-based synthesis stays the other candidate.
//!
//! Complexity: two runs of method `xag` on `n`-input tables, `n` at most
//! [`OUT_OF_PLACE_MAX_LINES`] (checked before the work).

use super::bennett::bennett_xag;
use super::{SynthError, SynthLimits, Synthesis};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo, Role};
use crate::logic::{Dag, Permutation, TruthTable};
use crate::progress::Progress;
use crate::spec::permutation_layout;
use crate::spec::{FunctionSpec, Output, OutputDef};

/// Most lines of a permutation built out of place (each half's tables are
/// `2^n` bits per output).
pub const OUT_OF_PLACE_MAX_LINES: usize = 16;

/// The xor oracle spec of `images` (a map of `n`-bit words): inputs `x0..`,
/// outputs `y0..`, each a table.
fn oracle_spec(n: usize, images: &[u64]) -> FunctionSpec {
    FunctionSpec {
        inputs: (0..n).map(|i| format!("x{i}")).collect(),
        outputs: (0..n)
            .map(|j| Output {
                name: format!("y{j}"),
                def: OutputDef::Table(TruthTable::from_fn(n, |x| {
                    (images[x as usize] >> j) & 1 == 1
                })),
            })
            .collect(),
        dag: Dag::new(),
    }
}

/// `gate` with every line renamed by `map`.
fn renamed(gate: &Gate, map: &dyn Fn(Line) -> Line) -> Gate {
    let controls = gate
        .controls()
        .iter()
        .map(|c| Control {
            line: map(c.line),
            positive: c.positive,
        })
        .collect();
    Gate::new(controls, map(gate.target())).expect("a renaming keeps lines distinct")
}

/// The permutation `p` in place by compute out of place, uncompute the
/// input with the inverse's oracle, swap.
pub fn out_of_place(
    p: &Permutation,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    let n = p.width();
    if n > OUT_OF_PLACE_MAX_LINES {
        return Err(SynthError::NotApplicable {
            method: "xag",
            kind: "permutation",
            hint: "it takes at most 16 lines",
        });
    }
    let forward = p.images().to_vec();
    let mut inverse = vec![0u64; forward.len()];
    for (x, &y) in forward.iter().enumerate() {
        inverse[y as usize] = x as u64;
    }
    let a = bennett_xag(&oracle_spec(n, &forward), limits, progress)?;
    let b = bennett_xag(&oracle_spec(n, &inverse), limits, progress)?;
    // Lines: x (the permutation's), then the n lines of y and the shared
    // ancillae of the two oracles, all in the ancilla register.
    let mut c = Circuit::new(permutation_layout(n).lines());
    let extra = |s: &Synthesis| s.circuit.width() - 2 * n;
    for _ in 0..n + extra(&a).max(extra(&b)) {
        c.add_ancilla();
    }
    for s in [&a, &b] {
        let roles: Vec<Role> = s
            .circuit
            .lines()
            .iter()
            .map(|l: &LineInfo| l.role)
            .collect();
        assert!(
            roles[..n].iter().all(|&r| r == Role::Input)
                && roles[n..2 * n].iter().all(|&r| r == Role::Output)
                && roles[2 * n..].iter().all(|&r| r == Role::Ancilla),
            "an oracle's lines are x, y, then ancillae"
        );
    }
    // The oracles' lines are x, y, then their ancillae: the forward one
    // reads x and writes y as they are, the inverse reads y and writes x.
    for g in a.circuit.gates() {
        c.push(g.clone());
    }
    let swap = |l: Line| match l.index() {
        i if i < n => Line((i + n) as u32),
        i if i < 2 * n => Line((i - n) as u32),
        _ => l,
    };
    for g in b.circuit.gates() {
        c.push(renamed(g, &swap));
    }
    for i in 0..n as u32 {
        let y = i + n as u32;
        c.push(Gate::cnot(i, y));
        c.push(Gate::cnot(y, i));
        c.push(Gate::cnot(i, y));
    }
    let mut notes = vec![format!(
        "out of place: y ^= P(x) in {} gates, x ^= P^-1(y) in {} gates, then x and y swapped by {} CNOTs",
        a.circuit.gates().len(),
        b.circuit.gates().len(),
        3 * n
    )];
    notes.extend(a.notes.into_iter().map(|s| format!("forward {s}")));
    notes.extend(b.notes.into_iter().map(|s| format!("inverse {s}")));
    Ok(Synthesis {
        circuit: c,
        notes,
        stop: None,
    })
}
