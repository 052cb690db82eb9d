//! Optimization passes that keep the function and never add a gate.

use crate::circuit::{Circuit, Gate};

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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::{LineInfo, Role};

    fn lines(n: usize) -> Vec<LineInfo> {
        (0..n)
            .map(|i| LineInfo {
                register: "q".into(),
                index: i as u32,
                role: Role::Data,
                label: String::new(),
            })
            .collect()
    }

    #[test]
    fn cancels_through_commuting_gates_only() {
        // cx 0->1, x 2, cx 0->1: the NOT on line 2 commutes, the pair cancels.
        let mut c = Circuit::from_parts(
            lines(3),
            vec![Gate::cnot(0, 1), Gate::not(2), Gate::cnot(0, 1)],
        )
        .unwrap();
        cancel_pairs(&mut c);
        assert_eq!(c.gates(), &[Gate::not(2)]);
        // cx 0->1, x 0, cx 0->1: the NOT hits the control, nothing cancels.
        let mut d = Circuit::from_parts(
            lines(3),
            vec![Gate::cnot(0, 1), Gate::not(0), Gate::cnot(0, 1)],
        )
        .unwrap();
        cancel_pairs(&mut d);
        assert_eq!(d.gates().len(), 3);
    }

    #[test]
    fn nested_pairs_collapse() {
        let a = Gate::toffoli(0, 1, 3);
        let b = Gate::toffoli(3, 2, 4);
        let mut c = Circuit::from_parts(lines(5), vec![a.clone(), b.clone(), b, a]).unwrap();
        cancel_pairs(&mut c);
        assert!(c.gates().is_empty());
    }
}
