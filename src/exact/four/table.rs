//! The breadth-first build of the 4-line table: an open-addressing table of atomics filled in parallel, then a sorted array with a bucket index.

use super::perm::*;
use super::symmetry::*;
use super::{BuildProgress, Exact4, Level, MAX_DEPTH};
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};

pub(super) fn mix(key: u64) -> u64 {
    let mut z = key.wrapping_add(0x9e37_79b9_7f4a_7c15);
    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
    z ^ (z >> 31)
}

/// Open addressing with linear probing. A slot holds the low 60 bits of a
/// canonical form (its top nibble, the image of 15, follows from the rest)
/// and the class's gate count in the top nibble; 0 means empty, which no
/// permutation packs to.
pub(super) struct Slots {
    pub(super) slots: Vec<AtomicU64>,
    pub(super) bits: u32,
}

impl Slots {
    pub(super) fn new(bits: u32) -> Self {
        // Written in parallel: touching fresh memory page by page is most of
        // the cost of a large table.
        Slots {
            slots: (0..1usize << bits)
                .into_par_iter()
                .map(|_| AtomicU64::new(0))
                .collect(),
            bits,
        }
    }

    pub(super) fn home(&self, key: u64) -> usize {
        (mix(key) >> (64 - self.bits)) as usize
    }

    /// Inserts `key` (a canonical form) with gate count `depth` unless present.
    pub(super) fn insert(&self, key: Perm, depth: u8) -> bool {
        let key = key & LOW60;
        let entry = key | (depth as u64) << 60;
        let mask = self.slots.len() - 1;
        let mut i = self.home(key);
        loop {
            let cur = self.slots[i].load(Ordering::Relaxed);
            if cur == 0 {
                match self.slots[i].compare_exchange(0, entry, Ordering::Relaxed, Ordering::Relaxed)
                {
                    Ok(_) => return true,
                    Err(now) if now & LOW60 == key => return false,
                    Err(_) => {}
                }
            } else if cur & LOW60 == key {
                return false;
            }
            i = (i + 1) & mask;
        }
    }

    /// Touches the home slots of `keys` so that their cache lines load together.
    pub(super) fn touch(&self, keys: &[Perm]) -> u64 {
        keys.iter().fold(0, |a, &k| {
            a ^ self.slots[self.home(k & LOW60)].load(Ordering::Relaxed)
        })
    }

    /// Canonical forms (full 64 bits) of every class of `first`,
    /// `first + 1`, ... gates, with `counts` saying how many there are of
    /// each, in one pass.
    pub(super) fn levels(&self, first: usize, counts: &[u64]) -> Vec<Vec<Perm>> {
        split_levels(&self.slots, |s| s.load(Ordering::Relaxed), first, counts)
    }
}

/// The finished table: every entry ordered by the top bits of its hash,
/// with the start of each bucket of hashes (about four entries per bucket).
/// Half the memory of the open-addressing table, and written to and read
/// from disk as it is.
pub(super) struct Compact {
    pub(super) entries: Vec<u64>,
    pub(super) starts: Vec<u32>,
    pub(super) bucket_bits: u32,
}

impl Compact {
    pub(super) fn bucket_bits(count: usize) -> u32 {
        (count / 4)
            .max(1)
            .next_power_of_two()
            .trailing_zeros()
            .max(1)
    }

    pub(super) fn bucket(&self, key: u64) -> usize {
        (mix(key & LOW60) >> (64 - self.bucket_bits)) as usize
    }

    /// Indexes `entries`, which must be ordered by bucket (`None` if not).
    pub(super) fn new(entries: Vec<u64>) -> Option<Self> {
        if entries.len() >= u32::MAX as usize {
            return None;
        }
        let bucket_bits = Self::bucket_bits(entries.len());
        let mut c = Compact {
            entries,
            starts: vec![0; (1 << bucket_bits) + 1],
            bucket_bits,
        };
        let mut at = 0usize;
        for (i, &e) in c.entries.iter().enumerate() {
            let b = (mix(e & LOW60) >> (64 - bucket_bits)) as usize;
            if b + 1 < at {
                return None;
            }
            while at <= b {
                c.starts[at] = i as u32;
                at += 1;
            }
        }
        let n = c.entries.len() as u32;
        c.starts[at..].iter_mut().for_each(|s| *s = n);
        Some(c)
    }

    /// Every entry of `slots`, ordered by bucket. In linear probing an entry
    /// sits a few slots after its home, so slot order is nearly sorted:
    /// entries that wrapped around the end go back to the end, and an
    /// insertion sort by home slot does the rest.
    pub(super) fn from_slots(slots: &Slots) -> Self {
        let mut v: Vec<u64> = slots
            .slots
            .par_chunks(1 << 20)
            .flat_map_iter(|c| {
                c.iter()
                    .map(|s| s.load(Ordering::Relaxed))
                    .filter(|&e| e != 0)
            })
            .collect();
        let home = |e: u64| slots.home(e & LOW60);
        let half = slots.slots.len() / 2;
        let wrapped = v.iter().take_while(|&&e| home(e) >= half).count();
        v.rotate_left(wrapped);
        for i in 1..v.len() {
            let e = v[i];
            let h = home(e);
            let mut j = i;
            while j > 0 && home(v[j - 1]) > h {
                v[j] = v[j - 1];
                j -= 1;
            }
            v[j] = e;
        }
        Self::new(v).expect("entries sorted by home slot are sorted by bucket")
    }

    pub(super) fn get(&self, key: Perm) -> Option<u8> {
        let key = key & LOW60;
        let b = self.bucket(key);
        let range = self.starts[b] as usize..self.starts[b + 1] as usize;
        self.entries[range]
            .iter()
            .find(|&&e| e & LOW60 == key)
            .map(|&e| (e >> 60) as u8)
    }

    /// Touches the bucket starts of `keys`, then their first entries, so
    /// that the cache misses of many lookups overlap.
    pub(super) fn touch(&self, keys: &[Perm; 48]) -> u64 {
        let starts = keys.map(|k| self.starts[self.bucket(k)] as usize);
        starts
            .iter()
            .fold(0, |a, &i| a ^ self.entries.get(i).copied().unwrap_or(0))
    }

    /// Canonical forms of every class of `0, 1, ..., counts.len() - 1`
    /// gates, `counts` saying how many there are of each, in one pass.
    pub(super) fn levels(&self, counts: &[u64]) -> Vec<Vec<Perm>> {
        split_levels(&self.entries, |&e| e, 0, counts)
    }
}

/// The canonical forms of the entries (read by `load`, 0 for an empty slot)
/// of `first`, `first + 1`, ... gates, `counts` saying how many there are of
/// each, in one parallel pass.
pub(super) fn split_levels<T: Sync>(
    items: &[T],
    load: impl Fn(&T) -> u64 + Sync,
    first: usize,
    counts: &[u64],
) -> Vec<Vec<Perm>> {
    let wanted = counts.len();
    let parts: Vec<Vec<Vec<Perm>>> = items
        .par_chunks(1 << 20)
        .map(|chunk| {
            let mut out = vec![Vec::new(); wanted];
            for item in chunk {
                let e = load(item);
                let d = ((e >> 60) as usize).wrapping_sub(first);
                if e != 0 && d < wanted {
                    out[d].push(restore(e));
                }
            }
            out
        })
        .collect();
    let mut out: Vec<Vec<Perm>> = counts
        .iter()
        .map(|&n| Vec::with_capacity(n as usize))
        .collect();
    for mut part in parts {
        for (o, p) in out.iter_mut().zip(part.iter_mut()) {
            o.append(p);
        }
    }
    out
}

/// The full packed form of a stored entry: the image of 15 is the one value
/// missing from the other 15 (their XOR, as 0 ^ 1 ^ ... ^ 15 = 0).
pub(super) fn restore(entry: u64) -> Perm {
    let low = entry & LOW60;
    let last = (0..15).fold(0, |a, i| a ^ image(low, i));
    low | last << 60
}

/// Table size for `expected` entries at a load of at most 3/4.
pub(super) fn bits_for(expected: u64) -> u32 {
    let want = (expected.max(1) * 4).div_ceil(3);
    want.next_power_of_two().trailing_zeros().max(14)
}

/// The canonical forms of the 64 functions one gate from a function: `g . r`
/// and `r . g` for each gate `g`, as [`canonical`] gives them.
///
/// Relabelling `g . r` gives `g' . r'` with `g'` the relabelled gate and `r'`
/// the relabelled `r`, and its inverse is `r^-1 . g`; so from the 24
/// relabellings of `r` and of `r^-1`, computed once, each form of each
/// neighbour is one cheap product with a gate.
pub(super) struct Neighbours {
    pub(super) gates: Vec<LibGate>,
    /// `relabelled[k][g]`: the gate `g` under relabelling `k`.
    pub(super) relabelled: [[u8; 32]; 24],
}

/// `fire[c]`: the nibbles of `p` where every line of `c` is 1.
pub(super) fn fire_table(p: Perm) -> [u64; 16] {
    let mut fire = [NIBBLES; 16];
    for c in 1..16usize {
        fire[c] = fire[c & (c - 1)] & (p >> c.trailing_zeros());
    }
    fire
}

impl Neighbours {
    pub(super) fn new(gates: &[LibGate]) -> Self {
        let id = pack(&(0..16).collect::<Vec<_>>());
        let mut relabelled = [[0u8; 32]; 24];
        for (g, gate) in gates.iter().enumerate() {
            for (k, form) in relabellings(gate.after(id)).into_iter().enumerate() {
                relabelled[k][g] = gates
                    .iter()
                    .position(|h| h.after(id) == form)
                    .expect("a relabelled gate is a gate") as u8;
            }
        }
        Neighbours {
            gates: gates.to_vec(),
            relabelled,
        }
    }

    /// Entry `2g` is the canonical form (and stabilizer count) of `g . r`,
    /// entry `2g + 1` that of `r . g`.
    pub(super) fn of(&self, r: Perm) -> [(Perm, u32); 64] {
        let ri = inverse(r);
        let ra = relabellings(r);
        let rb = relabellings(ri);
        let fa: [[u64; 16]; 24] = std::array::from_fn(|k| fire_table(ra[k]));
        let fb: [[u64; 16]; 24] = std::array::from_fn(|k| fire_table(rb[k]));
        let (r15, ri15) = (image(r, 15), image(ri, 15));
        let gates = &self.gates;
        // g' . x with x a relabelling whose fire table is `fire`.
        let after = |x: Perm, fire: &[u64; 16], h: usize| {
            x ^ ((fire[gates[h].controls as usize] & NIBBLES) << gates[h].target)
        };
        // x . g'.
        let before =
            |x: Perm, h: usize| delta_swap(x, gates[h].position_mask, 4 << gates[h].target);
        let mut out = [(0u64, 0u32); 64];
        for (g, gate) in gates.iter().enumerate() {
            let fire = |x: u64| x ^ (((x & gate.controls == gate.controls) as u64) << gate.target);
            let h = |k: usize| self.relabelled[k][g] as usize;
            // g . r: forms g' . r' (top nibble from g(r(15))) and r'^-1 . g'
            // (top nibble from r^-1(g(15))).
            out[2 * g] = least_form(
                fire(r15),
                image(ri, fire(15)),
                |k| after(ra[k], &fa[k], h(k)),
                |k| before(rb[k], h(k)),
            );
            // r . g: forms r' . g' (top nibble from r(g(15))) and g' . r'^-1
            // (top nibble from g(r^-1(15))).
            out[2 * g + 1] = least_form(
                image(r, fire(15)),
                fire(ri15),
                |k| before(ra[k], h(k)),
                |k| after(rb[k], &fb[k], h(k)),
            );
        }
        out
    }
}

/// Stores every class one gate away from the classes of `d` gates and not
/// stored yet, as classes of `d + 1` gates. Returns the classes and functions
/// added, or `None` when the table passed 15/16 full.
pub(super) fn expand(
    slots: &Slots,
    gates: &[LibGate],
    frontier: &[Perm],
    d: u8,
    depth: u8,
    stored: u64,
    progress: &(dyn Fn(BuildProgress) + Sync),
) -> Option<(u64, u64)> {
    let classes = AtomicU64::new(0);
    let functions = AtomicU64::new(0);
    let done = AtomicU64::new(0);
    let limit =
        (slots.slots.len() as u64).saturating_sub(64 * (rayon::current_num_threads() as u64 + 1));
    let limit = limit.min(slots.slots.len() as u64 * 15 / 16);
    let full = AtomicBool::new(false);
    let near = Neighbours::new(gates);
    frontier.par_chunks(1024).for_each(|chunk| {
        let mut forms = [0u64; 64];
        for &r in chunk {
            // At most 64 entries go in per class expanded, and the limit leaves
            // room for one expansion per thread past it.
            if full.load(Ordering::Relaxed) {
                return;
            }
            // A class of d + 1 gates has a member g . m for a member m of a
            // class of d gates; m is a relabelling of r or of r^-1, so g . m
            // is in the class of g' . r or of r . g' for a gate g'.
            let keys = near.of(r);
            for (form, key) in forms.iter_mut().zip(&keys) {
                *form = key.0;
            }
            std::hint::black_box(slots.touch(&forms));
            let (mut c, mut f) = (0u64, 0u64);
            for &(key, stabilizer) in &keys {
                if slots.insert(key, d + 1) {
                    c += 1;
                    f += 48 / stabilizer as u64;
                }
            }
            let added = classes.fetch_add(c, Ordering::Relaxed) + c;
            functions.fetch_add(f, Ordering::Relaxed);
            if stored + added > limit {
                full.store(true, Ordering::Relaxed);
            }
        }
        let n = done.fetch_add(chunk.len() as u64, Ordering::Relaxed) + chunk.len() as u64;
        progress(BuildProgress {
            depth: d + 1,
            of: depth,
            done: n,
            total: frontier.len() as u64,
        });
    });
    (!full.into_inner()).then(|| (classes.into_inner(), functions.into_inner()))
}

impl Exact4 {
    /// Builds the table of every class of at most `depth` gates (at most
    /// [`MAX_DEPTH`]) by breadth-first search, in parallel. Depth 7 takes a
    /// few seconds and about 300 MB; depth 8 about a minute and 4.3 GB.
    pub fn build(depth: u8, progress: &(dyn Fn(BuildProgress) + Sync)) -> Self {
        let depth = depth.clamp(1, MAX_DEPTH);
        let gates = library();
        let identity = pack(&(0..16).collect::<Vec<_>>());
        let mut slots = Slots::new(bits_for(1));
        slots.insert(identity, 0);
        let mut levels = vec![Level {
            classes: 1,
            functions: 1,
        }];
        let mut reps = vec![vec![identity]];
        let mut stored = 1u64;
        for d in 0..depth {
            let frontier = reps.last().expect("level 0 is there");
            // Levels have grown by at most 17 times each (16.3 from 4 to 5 gates);
            // should one grow faster, the table doubles and the level starts again.
            let mut bits = bits_for(stored + 17 * frontier.len() as u64);
            let (classes, functions) = loop {
                if bits > slots.bits {
                    let bigger = Slots::new(bits);
                    slots.slots.par_iter().for_each(|s| {
                        let e = s.load(Ordering::Relaxed);
                        if e != 0 && (e >> 60) as u8 <= d {
                            bigger.insert(restore(e), (e >> 60) as u8);
                        }
                    });
                    slots = bigger;
                }
                match expand(&slots, &gates, frontier, d, depth, stored, progress) {
                    Some(counts) => break counts,
                    None => bits = slots.bits + 1,
                }
            };
            let level = Level { classes, functions };
            stored += level.classes;
            levels.push(level);
            if d + 1 < depth {
                let mut next = slots.levels(d as usize + 1, &[level.classes]);
                reps.push(next.pop().expect("one level"));
            }
        }
        let table = Compact::from_slots(&slots);
        drop(slots);
        Exact4 {
            depth,
            gates,
            table,
            levels,
            reps,
        }
    }
}
