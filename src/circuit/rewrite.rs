//! Gate algebra that keeps a circuit's function: cancelling pairs of equal gates.

use super::Circuit;

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
    // In place: a flag per gate and the positions of the live ones, so the
    // pass needs 5 bytes per gate beside the gate list itself.
    let gates = circuit.take_gates();
    let mut keep = vec![true; gates.len()];
    let mut live: Vec<u32> = Vec::with_capacity(gates.len().min(1 << 20));
    for (i, g) in gates.iter().enumerate() {
        let mut partner = None;
        for (k, &idx) in live.iter().enumerate().rev().take(CANCEL_WINDOW) {
            let prev = &gates[idx as usize];
            // A measured uncompute or a temporary AND is not its own inverse.
            if prev == g && g.is_flip() {
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
                keep[idx as usize] = false;
                keep[i] = false;
            }
            None => live.push(i as u32),
        }
    }
    drop(live);
    let mut gates = gates;
    let mut flags = keep.into_iter();
    gates.retain(|_| flags.next().unwrap_or(true));
    circuit.set_gates(gates);
}
