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
        let local = |l: Line| Line(set.iter().position(|&x| x == l).expect("in the window") as u32);
        let local_gates: Vec<Gate> = window
            .iter()
            .map(|g| g.renamed(local).expect("distinct lines"))
            .collect();
        let images: Vec<u64> = (0..1u64 << k)
            .map(|s| local_gates.iter().fold(s, |st, g| g.apply(st)))
            .collect();
        let best = crate::synth::Exact3::for_width(k).circuit(&images);
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

/// Longest run of gates [`resynthesize_windows4`] replaces.
pub const WINDOW4_GATES: usize = 20;

/// Replaces runs of consecutive gates acting within four lines by a minimum
/// circuit of the same function, when the 4-line table of small depth
/// ([`crate::synth::WINDOW_DEPTH`] gates) knows one with lower lowered cost
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
            let Some(found) = crate::synth::Exact4::for_windows().lookup(&images) else {
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
