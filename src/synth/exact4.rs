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
//! The table is cached on disk (see [`cache_path`]) with a checksum; a
//! missing, corrupt or stale file is rebuilt.

use crate::circuit::{Control, Gate, Line};
use rayon::prelude::*;
use std::io::{BufReader, BufWriter, Read, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::time::{Duration, Instant};

/// Table depth built on first use: every class of at most 7 gates, so a
/// query of up to 14 gates finds its optimum.
pub const DEFAULT_DEPTH: u8 = 7;
/// Depth of the table the optimizer uses to rewrite runs of gates on four
/// lines (every function of at most 6 gates; 1.6 million classes, 13 MB).
pub const WINDOW_DEPTH: u8 = 6;
/// Deepest table [`Exact4::build`] accepts (6.7 GB at the peak of its build,
/// 2.4 GB once built).
pub const MAX_DEPTH: u8 = 8;

const MAGIC: &[u8; 24] = b"oraculum exact4 table v2";
const NIBBLES: u64 = 0x1111_1111_1111_1111;
const LOW60: u64 = (1 << 60) - 1;

/// A 4-bit reversible function: nibble `i` holds the image of `i`.
type Perm = u64;

/// Packs 16 images into nibbles.
pub fn pack(images: &[u64]) -> Perm {
    images
        .iter()
        .enumerate()
        .fold(0, |a, (i, &v)| a | (v & 15) << (4 * i))
}

/// Whether `images` is a reversible function of 4 bits.
fn is_permutation(images: &[u64]) -> bool {
    images.len() == 16
        && images.iter().fold(0u32, |seen, &v| seen | 1 << (v & 15)) == 0xffff
        && images.iter().all(|&v| v < 16)
}

fn image(p: Perm, i: u64) -> u64 {
    (p >> (4 * i)) & 15
}

fn inverse(p: Perm) -> Perm {
    (0..16).fold(0, |a, i| a | i << (4 * image(p, i)))
}

/// `f . x`: first `x`, then `f`.
fn compose(f: Perm, x: Perm) -> Perm {
    (0..16).fold(0, |a, i| a | image(f, image(x, i)) << (4 * i))
}

/// Exchanges the nibbles selected by `mask` with those `shift` bits above.
fn delta_swap(p: u64, mask: u64, shift: u32) -> u64 {
    let d = ((p >> shift) ^ p) & mask;
    p ^ d ^ (d << shift)
}

/// A gate of the library, with what it does to values and to positions.
#[derive(Clone, Copy)]
struct LibGate {
    controls: u64,
    target: u64,
    /// Nibbles at the positions where the gate fires and the target bit is 0.
    position_mask: u64,
}

impl LibGate {
    /// `g . p`: the gate applied after `p`.
    fn after(&self, p: Perm) -> Perm {
        let mut fire = NIBBLES;
        for b in 0..4 {
            if (self.controls >> b) & 1 == 1 {
                fire &= p >> b;
            }
        }
        p ^ ((fire & NIBBLES) << self.target)
    }

    /// `p . g`: the gate applied before `p`.
    fn before(&self, p: Perm) -> Perm {
        delta_swap(p, self.position_mask, 4 << self.target)
    }

    fn gate(&self) -> Gate {
        let controls = (0..4u32)
            .filter(|b| (self.controls >> b) & 1 == 1)
            .map(Control::pos)
            .collect();
        Gate::new(controls, Line(self.target as u32)).expect("target outside the controls")
    }
}

/// The 32 gates: every set of controls among the other three lines, 8 per target.
fn library() -> Vec<LibGate> {
    let mut v = Vec::with_capacity(32);
    for target in 0..4u64 {
        for controls in 0u64..16 {
            if controls & (1 << target) == 0 {
                let position_mask = (0..16u64)
                    .filter(|x| x & controls == controls && x & (1 << target) == 0)
                    .fold(0, |m, x| m | 15 << (4 * x));
                v.push(LibGate {
                    controls,
                    target,
                    position_mask,
                });
            }
        }
    }
    v
}

/// One step of the walk through all 24 line relabellings: exchanging lines
/// `i < j` in both the values (bits of every nibble) and the positions.
#[derive(Clone, Copy)]
struct Transposition {
    value_mask: u64,
    value_shift: u32,
    position_mask: u64,
    position_shift: u32,
}

const fn transposition(i: u32, j: u32) -> Transposition {
    let mut position_mask = 0u64;
    let mut x = 0;
    while x < 16 {
        if (x >> i) & 1 == 1 && (x >> j) & 1 == 0 {
            position_mask |= 15 << (4 * x);
        }
        x += 1;
    }
    Transposition {
        value_mask: NIBBLES << i,
        value_shift: j - i,
        position_mask,
        position_shift: 4 * ((1 << j) - (1 << i)),
    }
}

/// The 24 line relabellings, arranged as a tree: relabelling `k > 0` is
/// relabelling `parent[k]` followed by the exchange `step[k]` (a breadth-first
/// tree over the six exchanges, three deep, so the 24 forms of a function
/// come from short independent chains). `map[k][i]` is where relabelling `k`
/// sends line `i`.
struct Relabellings {
    parent: [usize; 24],
    step: [Transposition; 24],
    map: [[u8; 4]; 24],
}

const SYM: Relabellings = {
    const PAIRS: [(u32, u32); 6] = [(0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3)];
    let mut map = [[0u8; 4]; 24];
    map[0] = [0, 1, 2, 3];
    let mut parent = [0usize; 24];
    let mut step = [transposition(0, 1); 24];
    let mut n = 1;
    let mut at = 0;
    while at < n {
        let mut k = 0;
        while k < 6 {
            let (i, j) = PAIRS[k];
            // Exchange lines i and j after map[at].
            let mut q = map[at];
            let mut x = 0;
            while x < 4 {
                if q[x] as u32 == i {
                    q[x] = j as u8;
                } else if q[x] as u32 == j {
                    q[x] = i as u8;
                }
                x += 1;
            }
            let mut seen = false;
            let mut y = 0;
            while y < n {
                let p = map[y];
                if p[0] == q[0] && p[1] == q[1] && p[2] == q[2] && p[3] == q[3] {
                    seen = true;
                }
                y += 1;
            }
            if !seen {
                map[n] = q;
                parent[n] = at;
                step[n] = transposition(i, j);
                n += 1;
            }
            k += 1;
        }
        at += 1;
    }
    assert!(n == 24);
    Relabellings { parent, step, map }
};

/// `SEND[k][v]`: the value `v` with its bits moved by relabelling `k`.
const SEND: [[u8; 16]; 24] = {
    let mut out = [[0u8; 16]; 24];
    let mut k = 0;
    while k < 24 {
        let mut v = 0;
        while v < 16 {
            let mut b = 0;
            while b < 4 {
                if (v >> b) & 1 == 1 {
                    out[k][v] |= 1 << SYM.map[k][b];
                }
                b += 1;
            }
            v += 1;
        }
        k += 1;
    }
    out
};

/// `LEAST[v]`: the relabellings that send `v` to the smallest value of its
/// weight (`2^w - 1`), as (count, list). The image of 15 is the top nibble of
/// a packed form and relabelling sends it to `SEND[k][f(15)]`, so only these
/// relabellings can give the smallest form.
const LEAST: [(usize, [u8; 24]); 16] = {
    let mut out = [(0usize, [0u8; 24]); 16];
    let mut v = 0;
    while v < 16 {
        let least = (1u8 << (v as u32).count_ones()) - 1;
        let mut k = 0;
        while k < 24 {
            if SEND[k][v] == least {
                out[v].1[out[v].0] = k as u8;
                out[v].0 += 1;
            }
            k += 1;
        }
        v += 1;
    }
    out
};

/// The exchanges leading from the root of the tree to relabelling `k`.
const PATH: [(usize, [Transposition; 3]); 24] = {
    let mut out = [(0usize, [transposition(0, 1); 3]); 24];
    let mut k = 1;
    while k < 24 {
        let p = SYM.parent[k];
        out[k] = out[p];
        out[k].1[out[k].0] = SYM.step[k];
        out[k].0 += 1;
        k += 1;
    }
    out
};

fn conjugate(p: Perm, t: &Transposition) -> Perm {
    let v = delta_swap(p, t.value_mask, t.value_shift);
    delta_swap(v, t.position_mask, t.position_shift)
}

/// Relabelling `k` of `p`.
fn relabelled(p: Perm, k: usize) -> Perm {
    let (n, steps) = &PATH[k];
    steps[..*n].iter().fold(p, conjugate)
}

/// The 24 relabellings of `p`, in the order of [`SYM`].
fn relabellings(p: Perm) -> [Perm; 24] {
    // Written out so that every mask and shift is a constant.
    macro_rules! tree {
        ($out:ident; $($k:literal)*) => {
            $( $out[$k] = conjugate($out[SYM.parent[$k]], &SYM.step[$k]); )*
        };
    }
    let mut out = [p; 24];
    tree!(out; 1 2 3 4 5 6 7 8 9 10 11 12 13 14 15 16 17 18 19 20 21 22 23);
    out
}

/// The smallest form seen so far and how many times it was seen.
#[derive(Clone, Copy)]
struct Least(Perm, u32);

impl Least {
    const NONE: Least = Least(u64::MAX, 0);

    fn take(&mut self, v: Perm) {
        self.1 = if v < self.0 {
            1
        } else {
            self.1 + (v == self.0) as u32
        };
        self.0 = self.0.min(v);
    }
}

/// The smallest of the 48 forms of a function and how many forms equal it,
/// given the image of 15 under the function (`top`) and under its inverse
/// (`top_inverse`), the function's relabelling `k` (`form(k)`) and its
/// inverse's (`inverse_form(k)`). A form's top nibble is the relabelled image
/// of 15, `SEND[k][top]`, so only the relabellings in `LEAST` of the side of
/// smaller weight can give the smallest form (both sides on a tie).
fn least_form(
    top: u64,
    top_inverse: u64,
    form: impl Fn(usize) -> Perm,
    inverse_form: impl Fn(usize) -> Perm,
) -> (Perm, u32) {
    let (a, b) = (top.count_ones(), top_inverse.count_ones());
    let mut least = Least::NONE;
    if a <= b {
        let (n, ks) = &LEAST[top as usize];
        for &k in &ks[..*n] {
            least.take(form(k as usize));
        }
    }
    if b <= a {
        let (n, ks) = &LEAST[top_inverse as usize];
        for &k in &ks[..*n] {
            least.take(inverse_form(k as usize));
        }
    }
    (least.0, least.1)
}

/// The canonical member of the class of `p` (the smallest of the 48 forms
/// under line relabelling and inversion) and how many of the 48 forms equal
/// it (the size of the stabilizer, so the class has `48 / count` members).
fn canonical(p: Perm) -> (Perm, u32) {
    let q = inverse(p);
    least_form(
        image(p, 15),
        image(q, 15),
        |k| relabelled(p, k),
        |k| relabelled(q, k),
    )
}

fn canon(p: Perm) -> Perm {
    canonical(p).0
}

/// `p` with its lines renamed: line `i` becomes line `map[i]`.
fn relabel(p: Perm, map: [u32; 4]) -> Perm {
    let m = |x: u64| (0..4).fold(0, |a, b| a | ((x >> b) & 1) << map[b as usize]);
    (0..16).fold(0, |a, x| a | m(image(p, x)) << (4 * m(x)))
}

/// The 24 line maps.
fn line_maps() -> Vec<[u32; 4]> {
    let mut v = Vec::with_capacity(24);
    for a in 0..4 {
        for b in 0..4 {
            for c in 0..4 {
                for d in 0..4 {
                    let m = [a, b, c, d];
                    if (0..4).all(|i| (0..i).all(|j| m[i] != m[j])) {
                        v.push(m);
                    }
                }
            }
        }
    }
    v
}

fn mix(key: u64) -> u64 {
    let mut z = key.wrapping_add(0x9e37_79b9_7f4a_7c15);
    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
    z ^ (z >> 31)
}

/// Open addressing with linear probing. A slot holds the low 60 bits of a
/// canonical form (its top nibble, the image of 15, follows from the rest)
/// and the class's gate count in the top nibble; 0 means empty, which no
/// permutation packs to.
struct Slots {
    slots: Vec<AtomicU64>,
    bits: u32,
}

impl Slots {
    fn new(bits: u32) -> Self {
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

    fn home(&self, key: u64) -> usize {
        (mix(key) >> (64 - self.bits)) as usize
    }

    /// Inserts `key` (a canonical form) with gate count `depth` unless present.
    fn insert(&self, key: Perm, depth: u8) -> bool {
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
    fn touch(&self, keys: &[Perm]) -> u64 {
        keys.iter().fold(0, |a, &k| {
            a ^ self.slots[self.home(k & LOW60)].load(Ordering::Relaxed)
        })
    }

    /// Canonical forms (full 64 bits) of every class of `first`,
    /// `first + 1`, ... gates, with `counts` saying how many there are of
    /// each, in one pass.
    fn levels(&self, first: usize, counts: &[u64]) -> Vec<Vec<Perm>> {
        split_levels(&self.slots, |s| s.load(Ordering::Relaxed), first, counts)
    }
}

/// The finished table: every entry ordered by the top bits of its hash,
/// with the start of each bucket of hashes (about four entries per bucket).
/// Half the memory of the open-addressing table, and written to and read
/// from disk as it is.
struct Compact {
    entries: Vec<u64>,
    starts: Vec<u32>,
    bucket_bits: u32,
}

impl Compact {
    fn bucket_bits(count: usize) -> u32 {
        (count / 4)
            .max(1)
            .next_power_of_two()
            .trailing_zeros()
            .max(1)
    }

    fn bucket(&self, key: u64) -> usize {
        (mix(key & LOW60) >> (64 - self.bucket_bits)) as usize
    }

    /// Indexes `entries`, which must be ordered by bucket (`None` if not).
    fn new(entries: Vec<u64>) -> Option<Self> {
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
    fn from_slots(slots: &Slots) -> Self {
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

    fn get(&self, key: Perm) -> Option<u8> {
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
    fn touch(&self, keys: &[Perm; 48]) -> u64 {
        let starts = keys.map(|k| self.starts[self.bucket(k)] as usize);
        starts
            .iter()
            .fold(0, |a, &i| a ^ self.entries.get(i).copied().unwrap_or(0))
    }

    /// Canonical forms of every class of `0, 1, ..., counts.len() - 1`
    /// gates, `counts` saying how many there are of each, in one pass.
    fn levels(&self, counts: &[u64]) -> Vec<Vec<Perm>> {
        split_levels(&self.entries, |&e| e, 0, counts)
    }
}

/// The canonical forms of the entries (read by `load`, 0 for an empty slot)
/// of `first`, `first + 1`, ... gates, `counts` saying how many there are of
/// each, in one parallel pass.
fn split_levels<T: Sync>(
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
fn restore(entry: u64) -> Perm {
    let low = entry & LOW60;
    let last = (0..15).fold(0, |a, i| a ^ image(low, i));
    low | last << 60
}

/// Table size for `expected` entries at a load of at most 3/4.
fn bits_for(expected: u64) -> u32 {
    let want = (expected.max(1) * 4).div_ceil(3);
    want.next_power_of_two().trailing_zeros().max(14)
}

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

/// Where the table of `depth` is cached: `$ORACULUM_CACHE`, else
/// `$XDG_CACHE_HOME/oraculum`, else `$HOME/.cache/oraculum`, else the system's
/// temporary folder; the file is `exact4-depth<depth>-v2.bin` there.
pub fn cache_path(depth: u8) -> PathBuf {
    cache_dir().join(format!("exact4-depth{depth}-v2.bin"))
}

fn cache_dir() -> PathBuf {
    std::env::var_os("ORACULUM_CACHE")
        .map(PathBuf::from)
        .or_else(|| std::env::var_os("XDG_CACHE_HOME").map(|d| PathBuf::from(d).join("oraculum")))
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".cache/oraculum")))
        .unwrap_or_else(|| std::env::temp_dir().join("oraculum"))
}

/// A running checksum over 64-bit words.
struct Checksum(u64);

impl Checksum {
    fn add(&mut self, word: u64) {
        self.0 = (self.0 ^ word)
            .wrapping_mul(0x0000_0100_0000_01b3)
            .rotate_left(29);
    }
}

/// The canonical forms of the 64 functions one gate from a function: `g . r`
/// and `r . g` for each gate `g`, as [`canonical`] gives them.
///
/// Relabelling `g . r` gives `g' . r'` with `g'` the relabelled gate and `r'`
/// the relabelled `r`, and its inverse is `r^-1 . g`; so from the 24
/// relabellings of `r` and of `r^-1`, computed once, each form of each
/// neighbour is one cheap product with a gate.
struct Neighbours {
    gates: Vec<LibGate>,
    /// `relabelled[k][g]`: the gate `g` under relabelling `k`.
    relabelled: [[u8; 32]; 24],
}

/// `fire[c]`: the nibbles of `p` where every line of `c` is 1.
fn fire_table(p: Perm) -> [u64; 16] {
    let mut fire = [NIBBLES; 16];
    for c in 1..16usize {
        fire[c] = fire[c & (c - 1)] & (p >> c.trailing_zeros());
    }
    fire
}

impl Neighbours {
    fn new(gates: &[LibGate]) -> Self {
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
    fn of(&self, r: Perm) -> [(Perm, u32); 64] {
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

/// What one pass of the search found.
enum Pass {
    /// Target index, `a` as found, and the class's canonical form.
    Hit(usize, Perm, Perm),
    /// No target is `a . b` with `b` from the classes passed over.
    Miss,
    /// The budget ran out before the pass ended.
    OutOfTime,
}

/// Stores every class one gate away from the classes of `d` gates and not
/// stored yet, as classes of `d + 1` gates. Returns the classes and functions
/// added, or `None` when the table passed 15/16 full.
fn expand(
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

    /// Loads the table of `depth` from `path`, or builds it and writes it
    /// there when the file is missing, corrupt or stale. Returns the table and
    /// whether it was built.
    pub fn load_or_build(
        path: &Path,
        depth: u8,
        progress: &(dyn Fn(BuildProgress) + Sync),
    ) -> (Self, bool) {
        if let Some(t) = Self::load(path).filter(|t| t.depth == depth) {
            return (t, false);
        }
        let t = Self::build(depth, progress);
        let _ = t.save(path);
        (t, true)
    }

    /// Reads a cached table; `None` when the file is missing, of another
    /// version, truncated or fails its checksum.
    pub fn load(path: &Path) -> Option<Self> {
        let file = std::fs::File::open(path).ok()?;
        let mut r = BufReader::with_capacity(1 << 22, file);
        let mut magic = [0u8; 24];
        r.read_exact(&mut magic).ok()?;
        if &magic != MAGIC {
            return None;
        }
        let mut sum = Checksum(0);
        let mut word = || -> Option<u64> {
            let mut b = [0u8; 8];
            r.read_exact(&mut b).ok()?;
            Some(u64::from_le_bytes(b))
        };
        let depth = word()?;
        if depth == 0 || depth > MAX_DEPTH as u64 {
            return None;
        }
        sum.add(depth);
        let mut levels = Vec::new();
        for _ in 0..=depth {
            let classes = word()?;
            let functions = word()?;
            sum.add(classes);
            sum.add(functions);
            levels.push(Level { classes, functions });
        }
        let count = levels
            .iter()
            .try_fold(0u64, |a, l| a.checked_add(l.classes))?;
        // Magic, depth, levels, entries, checksum: a damaged count must not
        // ask for more memory than the file holds.
        let expected = count
            .checked_mul(8)?
            .checked_add(24 + 8 + 16 * (depth + 1) + 8)?;
        if count >= u32::MAX as u64 || std::fs::metadata(path).ok()?.len() != expected {
            return None;
        }
        let mut entries = Vec::with_capacity(count as usize);
        let mut seen = vec![0u64; depth as usize + 1];
        for _ in 0..count {
            let e = word()?;
            sum.add(e);
            let d = (e >> 60) as usize;
            if d > depth as usize || e & LOW60 == 0 {
                return None;
            }
            seen[d] += 1;
            entries.push(e);
        }
        if word()? != sum.0 || seen.iter().zip(&levels).any(|(s, l)| *s != l.classes) {
            return None;
        }
        let table = Compact::new(entries)?;
        let depth = depth as u8;
        let counts: Vec<u64> = levels[..depth as usize].iter().map(|l| l.classes).collect();
        let reps = table.levels(&counts);
        Some(Exact4 {
            depth,
            gates: library(),
            table,
            levels,
            reps,
        })
    }

    /// Writes the table to `path` (through a temporary file and a rename).
    pub fn save(&self, path: &Path) -> std::io::Result<()> {
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir)?;
        }
        let tmp = path.with_extension(format!("tmp-{}", std::process::id()));
        let write = || -> std::io::Result<()> {
            let mut w = BufWriter::with_capacity(1 << 22, std::fs::File::create(&tmp)?);
            let mut sum = Checksum(0);
            w.write_all(MAGIC)?;
            let mut put = |w: &mut BufWriter<std::fs::File>, x: u64| {
                sum.add(x);
                w.write_all(&x.to_le_bytes())
            };
            put(&mut w, self.depth as u64)?;
            for l in &self.levels {
                put(&mut w, l.classes)?;
                put(&mut w, l.functions)?;
            }
            for &e in &self.table.entries {
                put(&mut w, e)?;
            }
            let total = sum.0;
            w.write_all(&total.to_le_bytes())?;
            w.into_inner().map_err(|e| e.into_error())?.sync_all()
        };
        match write() {
            Ok(()) => std::fs::rename(&tmp, path),
            Err(e) => {
                let _ = std::fs::remove_file(&tmp);
                Err(e)
            }
        }
    }

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

    /// The table the optimizer's 4-line windows use (depth [`WINDOW_DEPTH`]),
    /// loaded from the cache folder or built (0.3 s) and cached on first use.
    pub fn for_windows() -> &'static Exact4 {
        static TABLE: std::sync::OnceLock<Exact4> = std::sync::OnceLock::new();
        TABLE.get_or_init(|| {
            Exact4::load_or_build(&cache_path(WINDOW_DEPTH), WINDOW_DEPTH, &|_| {}).0
        })
    }

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

    fn bound(lower_bound: usize) -> Exact4Result {
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
    fn pass(
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
    fn assemble(&self, f: Perm, a_form: Perm, r: Perm) -> Exact4Result {
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

#[cfg(test)]
mod tests {
    use super::*;

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
