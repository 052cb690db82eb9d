//! Queries past the 4-line table: meet in the middle over the classes of fewer gates, then the neighbours of the query.

use super::perm::*;
use super::symmetry::*;
use super::{Exact4, Exact4Result};
use crate::circuit::Gate;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::time::{Duration, Instant};

/// The hits of one chunk of classes: its index and (target, `a`, class).
type ChunkHits = (usize, Vec<(usize, Perm, Perm)>);

/// What one pass of the search found.
pub(super) enum Pass {
    /// Every hit of the first chunk of classes that has one, in a fixed
    /// order: (target index, `a` as found, the class's canonical form).
    Hits(Vec<(usize, Perm, Perm)>),
    /// No target is `a . b` with `b` from the classes passed over.
    Miss,
    /// The budget ran out before the pass ended.
    OutOfTime,
}

impl Exact4 {
    /// The minimum circuit of `images` (the 16 images of a 4-bit reversible
    /// function; anything else gets an empty, non-minimal result), searching
    /// for at most `budget`. When the budget runs out, or
    /// the function needs more than [`Exact4::reach`] gates, the result is
    /// not minimal and carries the lower bound proven so far.
    pub fn solve(&self, images: &[u64], budget: Duration) -> Exact4Result {
        self.solve_with(images, budget, &|_, _| true)
    }

    /// [`Exact4::solve`] reporting `(gate count being tried, fraction done)`;
    /// the search stops, as when the budget runs out, once `progress` answers false.
    pub fn solve_with(
        &self,
        images: &[u64],
        budget: Duration,
        progress: &(dyn Fn(usize, f64) -> bool + Sync),
    ) -> Exact4Result {
        let deadline = Instant::now() + budget;
        if !is_permutation(images) {
            // Not a reversible function of 4 bits: no circuit, nothing proven.
            return Exact4Result {
                gates: Vec::new(),
                minimal: false,
                lower_bound: 0,
            };
        }
        let f = pack(images);
        if self.size(f).is_some() {
            let gates = self.walk(f);
            let n = gates.len();
            return Exact4Result {
                gates,
                minimal: true,
                lower_bound: n,
            };
        }
        let depth = self.depth as usize;
        for k in 1..depth {
            match self.pass(&[f], k, deadline, depth + k, progress) {
                Pass::Hits(hits) => {
                    return cheapest(
                        hits.into_iter()
                            .map(|(_, a_form, r)| self.assemble(f, a_form, r).gates),
                    )
                }
                Pass::OutOfTime => return Self::bound(depth + k),
                Pass::Miss => {}
            }
        }
        // Now f needs at least 2D gates, so each neighbour g . f or f . g
        // needs at least 2D - 1; one that needs exactly 2D - 1 (found by the
        // pass over classes of D - 1 gates) gives f a circuit of 2D, which is
        // then minimal. If none does, f needs at least 2D + 1.
        let neighbours: Vec<(LibGate, bool, Perm)> = self
            .gates
            .iter()
            .flat_map(|g| [(*g, true, g.after(f)), (*g, false, g.before(f))])
            .collect();
        let targets: Vec<Perm> = neighbours.iter().map(|n| n.2).collect();
        match self.pass(&targets, depth - 1, deadline, 2 * depth, progress) {
            Pass::Hits(hits) => cheapest(hits.into_iter().map(|(i, a_form, r)| {
                let (g, after, near) = neighbours[i];
                let inner = self.assemble(near, a_form, r).gates;
                // near = g . f gives f = g . near: near's circuit, then g;
                // near = f . g gives f = near . g: g, then near's circuit.
                if after {
                    inner.into_iter().chain([g.gate()]).collect()
                } else {
                    [g.gate()].into_iter().chain(inner).collect()
                }
            })),
            Pass::OutOfTime => Self::bound(2 * depth),
            Pass::Miss => Self::bound(2 * depth + 1),
        }
    }

    pub(super) fn bound(lower_bound: usize) -> Exact4Result {
        Exact4Result {
            gates: Vec::new(),
            minimal: false,
            lower_bound,
        }
    }

    /// One pass over the classes of `k` gates: is some target `t` equal to
    /// `a . b` with `a` of exactly the table's depth and `b` a member of such
    /// a class? Returns the first hit as (target index, `a` in the form it
    /// was found, the class's canonical form).
    pub(super) fn pass(
        &self,
        targets: &[Perm],
        k: usize,
        deadline: Instant,
        gates: usize,
        progress: &(dyn Fn(usize, f64) -> bool + Sync),
    ) -> Pass {
        let reps = &self.reps[k];
        let conjugates: Vec<[Perm; 24]> = targets.iter().map(|&t| relabellings(t)).collect();
        // The chunks are searched in parallel, but only the first chunk (in
        // the order of the classes) that has a hit counts, and all its hits
        // are kept: the answer is the same on any number of threads.
        let found: std::sync::Mutex<Vec<ChunkHits>> = std::sync::Mutex::new(Vec::new());
        let first_hit = AtomicUsize::new(usize::MAX);
        let late = AtomicBool::new(false);
        let done = AtomicUsize::new(0);
        let chunk_len = (2048 / targets.len()).max(16);
        reps.par_chunks(chunk_len)
            .enumerate()
            .for_each(|(index, chunk)| {
                if index > first_hit.load(Ordering::Relaxed) || late.load(Ordering::Relaxed) {
                    return;
                }
                if Instant::now() > deadline {
                    late.store(true, Ordering::Relaxed);
                    return;
                }
                let mut forms = [0u64; 48];
                let mut hits = Vec::new();
                for &r in chunk {
                    // t = a . b with b = s r^-1 s^-1 or s r s^-1 for a relabelling
                    // s; conjugating by s^-1, a is in the class of T . r or T . r^-1
                    // with T = s^-1 t s.
                    let ri = inverse(r);
                    for (i, conj) in conjugates.iter().enumerate() {
                        for (j, &c) in conj.iter().enumerate() {
                            forms[2 * j] = compose(c, r);
                            forms[2 * j + 1] = compose(c, ri);
                        }
                        let keys = forms.map(canon);
                        std::hint::black_box(self.table.touch(&keys));
                        for (form, key) in forms.iter().zip(keys) {
                            if self.table.get(key) == Some(self.depth) {
                                hits.push((i, *form, r));
                            }
                        }
                    }
                }
                if !hits.is_empty() {
                    first_hit.fetch_min(index, Ordering::Relaxed);
                    found
                        .lock()
                        .unwrap_or_else(|e| e.into_inner())
                        .push((index, hits));
                    return;
                }
                let n = done.fetch_add(chunk.len(), Ordering::Relaxed) + chunk.len();
                if !progress(gates, n as f64 / reps.len() as f64) {
                    late.store(true, Ordering::Relaxed);
                }
            });
        let first = first_hit.into_inner();
        let found = found.into_inner().unwrap_or_else(|e| e.into_inner());
        // A hit proves the count; past the deadline the chunks before it
        // may not all have run, so which minimum circuit comes out may then
        // depend on the machine's speed (never whether it is minimal).
        match found.into_iter().find(|(index, _)| *index == first) {
            Some((_, hits)) => Pass::Hits(hits),
            None if late.into_inner() => Pass::OutOfTime,
            None => Pass::Miss,
        }
    }

    /// The circuit of `f` from a hit: `a_form = F . r^(+-1)` is in the table
    /// at full depth, where `F` is a relabelling of `f`.
    pub(super) fn assemble(&self, f: Perm, a_form: Perm, r: Perm) -> Exact4Result {
        // F = a_form . x^-1 for x = r or r^-1; find which and which relabelling.
        for x in [r, inverse(r)] {
            let big_f = compose(a_form, inverse(x));
            for map in line_maps() {
                if relabel(f, map) != big_f {
                    continue;
                }
                // relabel(f) = a_form . x^-1, so f = relabel^-1(a_form) . relabel^-1(x^-1).
                let mut back = [0u32; 4];
                for (i, &m) in map.iter().enumerate() {
                    back[m as usize] = i as u32;
                }
                let a = relabel(a_form, back);
                let b = relabel(inverse(x), back);
                debug_assert_eq!(compose(a, b), f);
                let mut gates = self.walk(b);
                gates.extend(self.walk(a));
                let n = gates.len();
                return Exact4Result {
                    gates,
                    minimal: true,
                    lower_bound: n,
                };
            }
        }
        unreachable!("a hit is a relabelling of the query")
    }
}

/// The cheapest of equally short circuits, by Toffolis once lowered, then
/// gates with three controls (each needs an ancilla), then a fixed order of
/// the gate lists; as a proven minimum.
fn cheapest(circuits: impl Iterator<Item = Vec<Gate>>) -> Exact4Result {
    let key = |gates: &Vec<Gate>| {
        let toffolis: usize = gates
            .iter()
            .map(|g| match g.controls().len() {
                2 => 1,
                3 => 3,
                _ => 0,
            })
            .sum();
        let wide = gates.iter().filter(|g| g.controls().len() == 3).count();
        let order: Vec<(u32, Vec<(u32, bool)>)> = gates
            .iter()
            .map(|g| {
                (
                    g.target().0,
                    g.controls()
                        .iter()
                        .map(|c| (c.line.0, c.positive))
                        .collect(),
                )
            })
            .collect();
        (toffolis, wide, gates.len(), order)
    };
    let gates = circuits
        .min_by_key(key)
        .expect("a pass with hits has at least one");
    let n = gates.len();
    Exact4Result {
        gates,
        minimal: true,
        lower_bound: n,
    }
}
