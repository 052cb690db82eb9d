//! Queries past the 4-line table: meet in the middle over the classes of fewer gates, then the neighbours of the query.

use super::perm::*;
use super::symmetry::*;
use super::{Exact4, Exact4Result};
use crate::circuit::Gate;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::time::{Duration, Instant};

/// What one pass of the search found.
pub(super) enum Pass {
    /// Target index, `a` as found, and the class's canonical form.
    Hit(usize, Perm, Perm),
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
        self.solve_with(images, budget, &|_, _| {})
    }

    /// [`Exact4::solve`] reporting `(gate count being tried, fraction done)`.
    pub fn solve_with(
        &self,
        images: &[u64],
        budget: Duration,
        progress: &(dyn Fn(usize, f64) + Sync),
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
                Pass::Hit(_, a_form, r) => return self.assemble(f, a_form, r),
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
            Pass::Hit(i, a_form, r) => {
                let (g, after, near) = neighbours[i];
                let inner = self.assemble(near, a_form, r).gates;
                // near = g . f gives f = g . near: near's circuit, then g;
                // near = f . g gives f = near . g: g, then near's circuit.
                let gates: Vec<Gate> = if after {
                    inner.into_iter().chain([g.gate()]).collect()
                } else {
                    [g.gate()].into_iter().chain(inner).collect()
                };
                let n = gates.len();
                Exact4Result {
                    gates,
                    minimal: true,
                    lower_bound: n,
                }
            }
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
        progress: &(dyn Fn(usize, f64) + Sync),
    ) -> Pass {
        let reps = &self.reps[k];
        let conjugates: Vec<[Perm; 24]> = targets.iter().map(|&t| relabellings(t)).collect();
        let hit: std::sync::Mutex<Option<(usize, Perm, Perm)>> = std::sync::Mutex::new(None);
        let stop = AtomicBool::new(false);
        let late = AtomicBool::new(false);
        let done = AtomicUsize::new(0);
        let chunk_len = (2048 / targets.len()).max(16);
        reps.par_chunks(chunk_len).for_each(|chunk| {
            if stop.load(Ordering::Relaxed) {
                return;
            }
            if Instant::now() > deadline {
                late.store(true, Ordering::Relaxed);
                stop.store(true, Ordering::Relaxed);
                return;
            }
            let mut forms = [0u64; 48];
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
                            stop.store(true, Ordering::Relaxed);
                            let mut h = hit.lock().unwrap_or_else(|e| e.into_inner());
                            if h.is_none() {
                                *h = Some((i, *form, r));
                            }
                            return;
                        }
                    }
                }
            }
            let n = done.fetch_add(chunk.len(), Ordering::Relaxed) + chunk.len();
            progress(gates, n as f64 / reps.len() as f64);
        });
        match hit.into_inner().unwrap_or_else(|e| e.into_inner()) {
            Some((i, a_form, r)) => Pass::Hit(i, a_form, r),
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
