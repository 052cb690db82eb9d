//! Optimization passes that keep the function and never add a gate.

use crate::circuit::{Circuit, Gate, Line};

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
    c.push(crate::circuit::Control {
        line: extra.line,
        positive: !extra.positive,
    });
    Gate::new(c, a.target())
}

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
        let local = |l: Line| set.iter().position(|&x| x == l).expect("in the window") as u32;
        let images: Vec<u64> = (0..1u64 << k)
            .map(|s| {
                window.iter().fold(s, |st, g| {
                    let controls = g
                        .controls()
                        .iter()
                        .map(|c| crate::circuit::Control {
                            line: Line(local(c.line)),
                            positive: c.positive,
                        })
                        .collect();
                    Gate::new(controls, Line(local(g.target())))
                        .expect("distinct lines")
                        .apply(st)
                })
            })
            .collect();
        let best = crate::synth::Exact3::for_width(k).circuit(&images);
        if total_cost(&best) < total_cost(window) {
            for g in best {
                let controls = g
                    .controls()
                    .iter()
                    .map(|c| crate::circuit::Control {
                        line: set[c.line.index()],
                        positive: c.positive,
                    })
                    .collect();
                out.push(Gate::new(controls, set[g.target().index()]).expect("distinct lines"));
            }
            changed = true;
        } else {
            out.extend(window.iter().cloned());
        }
        i = j;
    }
    circuit.set_gates(out);
    changed
}

/// All passes until none changes the circuit (at most 20 rounds), keeping the
/// latest round that is no worse than the best so far in lowered Toffolis,
/// lowered gates and gates before lowering, so the result is never longer and
/// never has more Toffolis than what came in. The passes estimate
/// costs gate by gate; this check also covers what lowering shares between
/// neighbouring gates.
pub fn optimize(circuit: &mut Circuit) {
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
        let k = key(&current);
        if k.0 <= best_key.0 && k.1 <= best_key.1 && k.2 <= best_key.2 && k != best_key {
            best_key = k;
            best = current.clone();
        }
        if !merged && !rewritten && current.gates().len() == before {
            break;
        }
    }
    *circuit = best;
}

#[cfg(test)]
mod tests {
    use super::*;

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
}
