//! Exact synthesis on four lines over the 32-gate library (NOT, CNOT, 2- and
//! 3-control Toffoli), by meet in the middle over a table reduced by
//! symmetry, after Golubitsky and Maslov (IEEE Trans. Computers 61(9), 2012).
//!
//! Relabelling the lines (24 ways) and inverting the function (a circuit read
//! backwards) keep the minimum gate count, so the table stores one canonical
//! function per class of up to 48: the smallest packed form among them. A
//! breadth-first search fills the table with every class of at most `depth`
//! gates (depth 7: 21 million classes standing for about a billion functions;
//! depth 8: about 250 million classes, eleven billion functions).
//!
//! A function in the table gets a minimum circuit by walking down: some gate
//! `g` makes `g . f` one gate cheaper. A function outside the table is
//! `a . b` with `a` of exactly `depth` gates and `b` of `k` gates for the
//! smallest such `k`; trying every `b` of `k` gates (every member of every
//! class of `k` gates, for `k = 1, 2, ..., depth - 1`) finds the optimum and
//! proves every smaller count impossible on the way. Past that, every
//! neighbour `g . f` and `f . g` needs at least `2 depth - 1` gates, and one
//! found with exactly that many gives `f` its optimum of `2 depth`. A time
//! budget that runs out returns the lower bound proven so far, never a
//! silent non-optimal answer.
//!
//! The table can be written to disk and read back ([`Exact4::save`],
//! [`Exact4::load`]) with a checksum; a missing, corrupt or stale file is
//! rebuilt.

mod perm;
mod search;
mod store;
mod symmetry;
mod table;

use crate::circuit::Gate;
use perm::*;
use symmetry::canon;
use table::Compact;

/// Table depth built on first use: every class of at most 7 gates, so a
/// query of up to 14 gates finds its optimum.
pub const DEFAULT_DEPTH: u8 = 7;

/// Depth of the table the optimizer uses to rewrite runs of gates on four
/// lines (every function of at most 6 gates; 1.6 million classes, 13 MB).
pub const WINDOW_DEPTH: u8 = 6;

/// Deepest table [`Exact4::build`] accepts (6.7 GB at the peak of its build,
/// 2.4 GB once built).
pub const MAX_DEPTH: u8 = 8;

/// Figures of one gate count in the table.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Level {
    /// Classes (under relabelling and inversion) of minimum size `depth`.
    pub classes: u64,
    /// Functions of minimum size `depth` (the classes' members).
    pub functions: u64,
}

/// What the build reports while it works.
#[derive(Clone, Copy, Debug)]
pub struct BuildProgress {
    /// The gate count being filled in.
    pub depth: u8,
    /// The table's depth.
    pub of: u8,
    /// Classes of `depth - 1` gates expanded so far, and in all.
    pub done: u64,
    /// Classes of `depth - 1` gates in all.
    pub total: u64,
}

/// The 4-line table: every class of at most `depth` gates.
pub struct Exact4 {
    depth: u8,
    gates: Vec<LibGate>,
    table: Compact,
    levels: Vec<Level>,
    /// Canonical forms of the classes of `k` gates, for `k < depth`.
    reps: Vec<Vec<Perm>>,
}

/// What a query found.
pub struct Exact4Result {
    /// Gates in the order they apply (empty when not `minimal`).
    pub gates: Vec<Gate>,
    /// Whether the circuit is proven minimal.
    pub minimal: bool,
    /// A proven lower bound on the gate count.
    pub lower_bound: usize,
}

impl Exact4 {
    /// The table's depth: every class of at most this many gates is stored.
    pub fn depth(&self) -> u8 {
        self.depth
    }

    /// Classes and functions of each minimum size from 0 to the depth.
    pub fn levels(&self) -> &[Level] {
        &self.levels
    }

    /// Number of functions needing each gate count, 0 to the depth.
    pub fn distribution(&self) -> Vec<u64> {
        self.levels.iter().map(|l| l.functions).collect()
    }

    /// The largest gate count a query can prove: a function is `a . b` with
    /// `a` in the table and `b` from a class of fewer gates than the depth,
    /// or one gate away from such a function when every smaller count has
    /// been ruled out.
    pub fn reach(&self) -> usize {
        2 * self.depth as usize
    }

    /// Gate count of a function of at most the table's depth.
    fn size(&self, p: Perm) -> Option<u8> {
        self.table.get(canon(p))
    }

    /// A minimum circuit of a function in the table, gates in the order they apply.
    fn walk(&self, mut p: Perm) -> Vec<Gate> {
        let mut d = self.size(p).expect("a stored function");
        let mut out = Vec::with_capacity(d as usize);
        while d > 0 {
            // f = g . (g . f): apply the cheaper `g . f` first, then `g`.
            let g = self
                .gates
                .iter()
                .find(|g| self.size(g.after(p)) == Some(d - 1))
                .expect("a function of d gates has a neighbour of d - 1");
            out.push(g.gate());
            p = g.after(p);
            d -= 1;
        }
        out.reverse();
        out
    }

    /// A minimum circuit of `images` when its minimum is at most the table's
    /// depth (a lookup, no search), else `None`.
    pub fn lookup(&self, images: &[u64]) -> Option<Vec<Gate>> {
        if !is_permutation(images) {
            return None;
        }
        let f = pack(images);
        self.size(f).map(|_| self.walk(f))
    }
}

#[cfg(test)]
mod tests {
    use super::symmetry::*;
    use super::table::*;
    use super::*;
    use std::time::Duration;

    fn id() -> Perm {
        pack(&(0..16).collect::<Vec<_>>())
    }

    fn random_perm(seed: &mut u64) -> Perm {
        let mut v: Vec<u64> = (0..16).collect();
        for i in (1..16).rev() {
            *seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            v.swap(i, ((*seed >> 33) % (i as u64 + 1)) as usize);
        }
        pack(&v)
    }

    #[test]
    fn the_library_has_32_gates_acting_on_both_sides() {
        let lib = library();
        assert_eq!(lib.len(), 32);
        // NOT on line 0 flips bit 0 of every image.
        let p = lib[0].after(id());
        for i in 0..16 {
            assert_eq!(image(p, i), i ^ 1);
        }
        // The 3-control gate onto line 3 swaps 7 and 15 only.
        let t = lib.iter().find(|g| g.controls == 0b0111).unwrap();
        let q = t.after(id());
        assert_eq!((image(q, 7), image(q, 15), image(q, 6)), (15, 7, 6));
        // Before and after agree with composition on random functions.
        let mut seed = 5;
        for _ in 0..50 {
            let f = random_perm(&mut seed);
            for g in &lib {
                let gp = g.after(id());
                assert_eq!(g.after(f), compose(gp, f));
                assert_eq!(g.before(f), compose(f, gp));
            }
        }
    }

    #[test]
    fn the_walk_visits_every_relabelling_once() {
        let mut seed = 11;
        let f = random_perm(&mut seed);
        let mut walked = relabellings(f).to_vec();
        let mut direct: Vec<Perm> = line_maps().into_iter().map(|m| relabel(f, m)).collect();
        walked.sort_unstable();
        direct.sort_unstable();
        assert_eq!(walked, direct);
        walked.dedup();
        assert_eq!(walked.len(), 24, "a random function has no symmetry");
    }

    #[test]
    fn canonical_forms_are_shared_by_the_class_and_count_its_members() {
        let mut seed = 3;
        for trial in 0..200 {
            // Mix random functions with ones that have symmetries.
            let f = match trial % 4 {
                0 => id(),
                1 => library()[trial % 32].after(id()),
                _ => random_perm(&mut seed),
            };
            let (c, stab) = canonical(f);
            let mut members: Vec<Perm> = line_maps()
                .into_iter()
                .flat_map(|m| [relabel(f, m), relabel(inverse(f), m)])
                .collect();
            members.sort_unstable();
            members.dedup();
            assert_eq!(c, members[0]);
            assert_eq!(48 / stab as usize, members.len());
            for &m in &members {
                assert_eq!(canon(m), c);
            }
        }
    }

    #[test]
    fn neighbours_agree_with_canonicalizing_each_product() {
        let lib = library();
        let near = Neighbours::new(&lib);
        let mut seed = 21;
        for trial in 0..60 {
            let r = if trial == 0 {
                id()
            } else {
                random_perm(&mut seed)
            };
            let got = near.of(r);
            for (g, gate) in lib.iter().enumerate() {
                assert_eq!(got[2 * g], canonical(gate.after(r)));
                assert_eq!(got[2 * g + 1], canonical(gate.before(r)));
            }
        }
    }

    #[test]
    fn relabellings_follow_their_line_maps() {
        let mut seed = 17;
        let f = random_perm(&mut seed);
        let forms = relabellings(f);
        for k in 0..24 {
            let map = SYM.map[k].map(|x| x as u32);
            assert_eq!(forms[k], relabel(f, map), "relabelling {k}");
            assert_eq!(relabelled(f, k), forms[k]);
            for v in 0..16u64 {
                // x -> x ^ v relabelled is x -> x ^ SEND[k][v].
                let xor_v = pack(&(0..16).map(|x| x ^ v).collect::<Vec<_>>());
                assert_eq!(SEND[k][v as usize] as u64, image(relabel(xor_v, map), 0));
            }
        }
    }

    #[test]
    fn anything_but_a_4_bit_permutation_gets_no_circuit() {
        let t = Exact4::build(2, &|_| {});
        let mut twice: Vec<u64> = (0..16).collect();
        twice[3] = 4;
        let mut wide: Vec<u64> = (0..16).collect();
        wide[15] = 31;
        for bad in [twice, wide, (0..8).collect(), Vec::new()] {
            let r = t.solve(&bad, Duration::from_secs(1));
            assert!(!r.minimal && r.gates.is_empty() && r.lower_bound == 0);
            assert!(t.lookup(&bad).is_none());
        }
        // A 2-gate function is in the depth-2 table.
        let two: Vec<u64> = (0..16).map(|x| x ^ 1 ^ ((x & 1) << 1)).collect();
        assert_eq!(t.lookup(&two).map(|c| c.len()), Some(2));
    }

    #[test]
    fn stored_entries_restore_their_last_image() {
        let mut seed = 8;
        for _ in 0..100 {
            let f = random_perm(&mut seed);
            assert_eq!(restore((f & LOW60) | 7 << 60), f);
        }
    }
}
