//! Runs of gates on four lines replaced by a cheaper optimum from the small 4-line table.

use super::total_cost;
use crate::circuit::{Circuit, Gate, Line};
use crate::exact::Tables;

/// Longest run of gates [`resynthesize_windows4`] replaces.
pub const WINDOW4_GATES: usize = 20;

/// Replaces runs of consecutive gates acting within four lines by a minimum
/// circuit of the same function, when the 4-line table of small depth
/// ([`crate::exact::WINDOW_DEPTH`] gates) knows one with lower lowered cost
/// (Toffolis first, then gates) and no more controls per gate than the run
/// had (so lowering needs no extra ancilla). Every run starting at each gate,
/// up to [`WINDOW4_GATES`] long, is tried; the run saving most (the longest
/// of equal ones) is replaced and the scan resumes after it. This makes every rewrite a template on four
/// lines could make whose shorter side has at most that many gates.
///
/// Complexity: `O(G * WINDOW4_GATES)` table lookups of a few hundred
/// nanoseconds each.
pub fn resynthesize_windows4(circuit: &mut Circuit) -> bool {
    if circuit.width() < 4 {
        return false;
    }
    let gates = circuit.gates().to_vec();
    let mut out: Vec<Gate> = Vec::with_capacity(gates.len());
    let mut changed = false;
    let mut i = 0;
    while i < gates.len() {
        // The four lines of the run starting at i: the first four met.
        let mut set: Vec<Line> = Vec::with_capacity(5);
        let mut end = i;
        while end < gates.len() && end - i < WINDOW4_GATES {
            let g = &gates[end];
            let mut u = set.clone();
            for l in g.controls().iter().map(|c| c.line).chain([g.target()]) {
                if !u.contains(&l) {
                    u.push(l);
                }
            }
            if u.len() > 4 {
                break;
            }
            set = u;
            end += 1;
        }
        if set.len() < 4 || end - i < 3 {
            out.push(gates[i].clone());
            i += 1;
            continue;
        }
        set.sort();
        let local = |l: Line| Line(set.iter().position(|&x| x == l).expect("in the run") as u32);
        let mut images: Vec<u64> = (0..16).collect();
        let mut best: Option<((i64, i64), usize, Vec<Gate>)> = None;
        let mut most_controls = 0;
        for j in i..end {
            let g = &gates[j];
            most_controls = most_controls.max(g.controls().len());
            let lg = g.renamed(local).expect("distinct lines");
            images.iter_mut().for_each(|v| *v = lg.apply(*v));
            if j - i < 2 {
                continue;
            }
            let Some(found) = Tables::get().window().lookup(&images) else {
                continue;
            };
            let (run, new) = (total_cost(&gates[i..=j]), total_cost(&found));
            let saving = (run.0 as i64 - new.0 as i64, run.1 as i64 - new.1 as i64);
            if new < run
                && found.iter().all(|h| h.controls().len() <= most_controls)
                && best.as_ref().is_none_or(|b| saving >= b.0)
            {
                best = Some((saving, j + 1, found));
            }
        }
        match best {
            Some((_, stop, found)) => {
                out.extend(
                    found
                        .iter()
                        .map(|g| g.renamed(|l| set[l.index()]).expect("distinct lines")),
                );
                changed = true;
                i = stop;
            }
            None => {
                out.push(gates[i].clone());
                i += 1;
            }
        }
    }
    circuit.set_gates(out);
    changed
}
