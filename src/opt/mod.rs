//! Optimization passes that keep the function and never add a gate, and the
//! driver that runs them: pair cancellation ([`crate::circuit::rewrite`]),
//! merging, and exact rewriting of windows of three and four lines.

mod merge;
mod window3;
mod window4;

pub use merge::merge_pairs;
pub use window3::resynthesize_windows;
pub use window4::{resynthesize_windows4, WINDOW4_GATES};

use crate::circuit::rewrite::cancel_pairs;
use crate::circuit::{Circuit, Gate};

/// The cost of a gate once lowered, as (Toffolis, NOT + CNOT + Toffoli gates):
/// `k >= 3` controls take `2k - 3` Toffolis, each negative control two NOTs.
pub fn lowered_cost(g: &Gate) -> (usize, usize) {
    let k = g.controls().len();
    let neg = g.controls().iter().filter(|c| !c.positive).count();
    let toffolis = match k {
        0 | 1 => 0,
        2 => 1,
        k => 2 * k - 3,
    };
    (toffolis, toffolis.max(1) + 2 * neg)
}

fn total_cost<'a>(gates: impl IntoIterator<Item = &'a Gate>) -> (usize, usize) {
    gates
        .into_iter()
        .map(lowered_cost)
        .fold((0, 0), |a, c| (a.0 + c.0, a.1 + c.1))
}

/// All passes until none changes the circuit (at most 20 rounds), keeping the
/// latest round that is no worse than the best so far in lowered Toffolis,
/// lowered gates and gates before lowering, so the result is never longer and
/// never has more Toffolis than what came in. The passes estimate
/// costs gate by gate; this check also covers what lowering shares between
/// neighbouring gates. A circuit with measured uncomputes is left as it is:
/// the window passes read gates as flips.
pub fn optimize(circuit: &mut Circuit) {
    if circuit.special_count() > 0 {
        return;
    }
    let key = |c: &Circuit| {
        let l = crate::lower::lower(c);
        let toffolis = l.gates().iter().filter(|g| g.controls().len() == 2).count();
        (toffolis, l.gates().len(), c.gates().len())
    };
    let mut best_key = key(circuit);
    let mut best = circuit.clone();
    let mut current = circuit.clone();
    for _ in 0..20 {
        let before = current.gates().len();
        cancel_pairs(&mut current);
        let merged = merge_pairs(&mut current);
        let rewritten = resynthesize_windows(&mut current);
        let rewritten4 = resynthesize_windows4(&mut current);
        let k = key(&current);
        if k.0 <= best_key.0 && k.1 <= best_key.1 && k.2 <= best_key.2 && k != best_key {
            best_key = k;
            best = current.clone();
        }
        if !merged && !rewritten && !rewritten4 && current.gates().len() == before {
            break;
        }
    }
    *circuit = best;
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::Line;

    use crate::circuit::test_lines as lines;

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

    /// A random gate on lines `first..first + 4` (controls of either polarity).
    fn random_gate(seed: &mut u64, first: u32, mixed: bool) -> Gate {
        let mut next = || {
            *seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            *seed >> 33
        };
        let t = (next() % 4) as u32;
        let mut controls = Vec::new();
        for l in (0..4u32).filter(|&l| l != t) {
            if next() % 2 == 0 {
                controls.push(crate::circuit::Control {
                    line: Line(first + l),
                    positive: !mixed || next() % 4 != 0,
                });
            }
        }
        Gate::new(controls, Line(first + t)).unwrap()
    }

    #[test]
    fn four_line_runs_shrink_to_their_minimum() {
        // Five random gates with positive controls on lines 1..5 of a 6-line
        // circuit, then z1 z2 z2 z1 (mixed polarities), which is the
        // identity: a run of 9 gates whose function needs at most 5 gates of
        // the table's library. The window pass alone (no pair cancellation) must find a
        // shorter circuit and keep the function.
        let mut seed = 7u64;
        let mut shrunk = 0;
        for _ in 0..40 {
            let mut gates: Vec<Gate> = (0..5).map(|_| random_gate(&mut seed, 1, false)).collect();
            let z1 = random_gate(&mut seed, 1, true);
            let z2 = random_gate(&mut seed, 1, true);
            gates.extend([z1.clone(), z2.clone(), z2, z1]);
            let mut c = Circuit::from_parts(lines(6), gates).unwrap();
            let before = c.clone();
            resynthesize_windows4(&mut c);
            assert!((0..64).all(|s| c.simulate(s) == before.simulate(s)));
            assert!(total_cost(c.gates()) <= total_cost(before.gates()));
            if c.gates().len() <= 5 {
                shrunk += 1;
            }
        }
        // A run keeps its gates only when every minimum circuit the table
        // gives needs more Toffolis once lowered, or a gate with more controls
        // than the run has (one case in 40 here).
        assert!(shrunk >= 38, "{shrunk} of 40");
    }
}
