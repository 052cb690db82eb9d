//! Gate algebra that keeps a circuit's function: cancelling pairs of equal gates.

use super::{Circuit, Gate};

/// How far back (in live gates) [`cancel_pairs`] looks for a partner.
pub const CANCEL_WINDOW: usize = 256;

/// Removes pairs of identical gates that can be moved next to each other through
/// gates they commute with (two MCT gates commute when neither target is a
/// control of the other). Each gate looks back at most [`CANCEL_WINDOW`] live
/// gates. Removing a pair of equal self-inverse gates that are adjacent up to
/// commutation keeps the function; the count only falls.
///
/// Complexity: `O(G * CANCEL_WINDOW * c)` for `G` gates with up to `c` controls.
pub fn cancel_pairs(circuit: &mut Circuit) {
    let mut out: Vec<Option<Gate>> = Vec::with_capacity(circuit.gates().len());
    // Indices of live entries of `out`, so tombstones cost nothing to skip.
    let mut live: Vec<usize> = Vec::with_capacity(circuit.gates().len());
    for g in circuit.gates() {
        let mut partner = None;
        for (k, &idx) in live.iter().enumerate().rev().take(CANCEL_WINDOW) {
            let prev = out[idx].as_ref().expect("live entries hold gates");
            if prev == g {
                partner = Some(k);
                break;
            }
            if !prev.commutes_with(g) {
                break;
            }
        }
        match partner {
            Some(k) => {
                let idx = live.remove(k);
                out[idx] = None;
            }
            None => {
                live.push(out.len());
                out.push(Some(g.clone()));
            }
        }
    }
    circuit.set_gates(out.into_iter().flatten().collect());
}
