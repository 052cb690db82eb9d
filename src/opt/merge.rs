//! Merging pairs of gates on one target that differ in one control.

use super::{lowered_cost, total_cost};
use crate::circuit::rewrite::CANCEL_WINDOW;
use crate::circuit::{Circuit, Control, Gate};

/// Merges pairs of gates on the same target that can be brought together
/// through commuting gates: controls equal but for one polarity (`C x` and
/// `C !x` make `C`), or one control more (`C` and `C x` make `C !x`). A merge
/// is made only when it lowers the lowered cost (Toffolis first, then gates).
pub fn merge_pairs(circuit: &mut Circuit) -> bool {
    let mut out: Vec<Option<Gate>> = Vec::with_capacity(circuit.gates().len());
    let mut live: Vec<usize> = Vec::new();
    let mut changed = false;
    for g in circuit.gates() {
        let mut merged = None;
        for &idx in live.iter().rev().take(CANCEL_WINDOW) {
            let prev = out[idx].as_ref().expect("live entries hold gates");
            if prev.target() == g.target() {
                if let Some(m) = merge(prev, g) {
                    if lowered_cost(&m) < total_cost([prev, g]) {
                        merged = Some((idx, m));
                        break;
                    }
                }
            }
            if !prev.commutes_with(g) {
                break;
            }
        }
        match merged {
            Some((idx, m)) => {
                out[idx] = Some(m);
                changed = true;
            }
            None => {
                live.push(out.len());
                out.push(Some(g.clone()));
            }
        }
    }
    circuit.set_gates(out.into_iter().flatten().collect());
    changed
}

fn merge(a: &Gate, b: &Gate) -> Option<Gate> {
    let (ca, cb) = (a.controls(), b.controls());
    let (long, short) = if ca.len() >= cb.len() {
        (ca, cb)
    } else {
        (cb, ca)
    };
    if long.len() == short.len() {
        let differ: Vec<usize> = (0..long.len()).filter(|&i| long[i] != short[i]).collect();
        if let [i] = differ.as_slice() {
            if long[*i].line == short[*i].line {
                let mut c = long.to_vec();
                c.remove(*i);
                return Gate::new(c, a.target());
            }
        }
        return None;
    }
    if long.len() != short.len() + 1 || !short.iter().all(|c| long.contains(c)) {
        return None;
    }
    let extra = long
        .iter()
        .find(|c| !short.contains(c))
        .expect("one control more");
    let mut c = short.to_vec();
    c.push(Control {
        line: extra.line,
        positive: !extra.positive,
    });
    Gate::new(c, a.target())
}
