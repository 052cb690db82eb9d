//! Runs of gates on at most three lines replaced by their optimum from the exact 3-line table.

use super::total_cost;
use crate::circuit::{Circuit, Gate, Line};
use crate::exact::Tables;

/// Replaces every run of consecutive gates acting within at most three lines by
/// an optimal circuit of the same function from the exact 3-line table, when
/// that lowers the lowered cost (Toffolis first, then gates). This covers
/// every rewrite a template on three lines could make.
pub fn resynthesize_windows(circuit: &mut Circuit) -> bool {
    let gates = circuit.gates().to_vec();
    let mut out: Vec<Gate> = Vec::with_capacity(gates.len());
    let mut changed = false;
    let lines_of = |g: &Gate| -> Vec<Line> {
        let mut v: Vec<Line> = g.controls().iter().map(|c| c.line).collect();
        v.push(g.target());
        v
    };
    let mut i = 0;
    while i < gates.len() {
        let mut set: Vec<Line> = lines_of(&gates[i]);
        set.sort();
        set.dedup();
        if set.len() > 3 {
            out.push(gates[i].clone());
            i += 1;
            continue;
        }
        let mut j = i + 1;
        while j < gates.len() {
            let mut u = set.clone();
            u.extend(lines_of(&gates[j]));
            u.sort();
            u.dedup();
            if u.len() > 3 {
                break;
            }
            set = u;
            j += 1;
        }
        let window = &gates[i..j];
        let k = set.len();
        let local = |l: Line| Line(set.iter().position(|&x| x == l).expect("in the window") as u32);
        let local_gates: Vec<Gate> = window
            .iter()
            .map(|g| g.renamed(local).expect("distinct lines"))
            .collect();
        let images: Vec<u64> = (0..1u64 << k)
            .map(|s| local_gates.iter().fold(s, |st, g| g.apply(st)))
            .collect();
        let best = Tables::get().exact3(k).circuit(&images);
        if total_cost(&best) < total_cost(window) {
            out.extend(
                best.iter()
                    .map(|g| g.renamed(|l| set[l.index()]).expect("distinct lines")),
            );
            changed = true;
        } else {
            out.extend(window.iter().cloned());
        }
        i = j;
    }
    circuit.set_gates(out);
    changed
}
