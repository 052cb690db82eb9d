//! Exact synthesis on four lines by meet in the middle, over the 32-gate
//! library (NOT, CNOT, 2- and 3-control Toffoli).
//!
//! A breadth-first search stores every 4-bit reversible function whose
//! minimum circuit has at most [`HALF`] gates (about 5.1 million) with the last
//! gate of one minimum circuit. A function of size at most `2 * HALF` is `g . x`
//! with both halves in the table, so trying every stored `x` finds its
//! optimum; a function not found that way is proven to need at least
//! `2 * HALF + 1` gates. This is the approach of Golubitsky and Maslov (IEEE
//! Trans. Computers 61(9), 2012) without their symmetry reduction and deeper
//! tables, so functions of 11 to 15 gates get the best heuristic circuit with
//! that lower bound, never a silent non-optimal answer.
//!
//! The table is cached on disk (see [`cache_path`]) with a checksum; a missing,
//! corrupt or stale file is rebuilt.

use crate::circuit::{Control, Gate, Line};
use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Gates per half of the meet in the middle.
pub const HALF: u8 = 5;

const MAGIC: &[u8] = b"oraculum exact4 table v1\n";
const NIBBLES: u64 = 0x1111_1111_1111_1111;

/// The 32 gates as (control mask, target bit).
fn library() -> Vec<(u64, u64)> {
    let mut v = Vec::new();
    // NOT, CNOT, 2-control and 3-control Toffoli: every set of controls among
    // the other three lines, 8 per target.
    for t in 0..4u64 {
        for mask in 0u64..16 {
            if mask & (1 << t) == 0 {
                v.push((mask, t));
            }
        }
    }
    v
}

/// Applies a gate to the 16 images packed as nibbles.
fn apply(p: u64, (c, t): (u64, u64)) -> u64 {
    let mut fire = NIBBLES;
    for b in 0..4 {
        if (c >> b) & 1 == 1 {
            fire &= p >> b;
        }
    }
    p ^ ((fire & NIBBLES) << t)
}

/// Packs 16 images into nibbles.
pub fn pack(images: &[u64]) -> u64 {
    images
        .iter()
        .enumerate()
        .fold(0, |a, (i, &v)| a | (v & 15) << (4 * i))
}

fn image(p: u64, i: u64) -> u64 {
    (p >> (4 * i)) & 15
}

/// `f . x`: first `x`, then `f`.
fn compose(f: u64, x: u64) -> u64 {
    (0..16).fold(0, |a, i| a | image(f, image(x, i)) << (4 * i))
}

/// The table: function -> (size << 5) | index of its last gate.
pub struct Exact4 {
    gates: Vec<(u64, u64)>,
    entry: HashMap<u64, u8>,
}

/// What a query found.
pub struct Exact4Result {
    /// Gates in the order they apply.
    pub gates: Vec<Gate>,
    /// Whether the circuit is proven minimal.
    pub minimal: bool,
    /// A proven lower bound on the gate count.
    pub lower_bound: usize,
}

/// Where the table is cached: `$ORACULUM_CACHE`, else `$XDG_CACHE_HOME/oraculum`,
/// else `$HOME/.cache/oraculum`, else the system's temporary folder; the file is
/// `exact4-v1.bin` there.
pub fn cache_path() -> PathBuf {
    let dir = std::env::var_os("ORACULUM_CACHE")
        .map(PathBuf::from)
        .or_else(|| std::env::var_os("XDG_CACHE_HOME").map(|d| PathBuf::from(d).join("oraculum")))
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".cache/oraculum")))
        .unwrap_or_else(|| std::env::temp_dir().join("oraculum"));
    dir.join("exact4-v1.bin")
}

fn checksum(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

impl Exact4 {
    /// Builds the table by breadth-first search (several seconds).
    pub fn build() -> Self {
        let gates = library();
        let identity = pack(&(0..16).collect::<Vec<_>>());
        let mut entry: HashMap<u64, u8> = HashMap::with_capacity(5_200_000);
        entry.insert(identity, 0);
        let mut frontier = vec![identity];
        for d in 0..HALF {
            let mut next = Vec::with_capacity(frontier.len() * 20);
            for &p in &frontier {
                for (k, &g) in gates.iter().enumerate() {
                    let q = apply(p, g);
                    if let std::collections::hash_map::Entry::Vacant(e) = entry.entry(q) {
                        e.insert(((d + 1) << 5) | k as u8);
                        next.push(q);
                    }
                }
            }
            frontier = next;
        }
        Exact4 { gates, entry }
    }

    /// Loads the table from `path`, or builds it and writes it there when the
    /// file is missing, corrupt or stale. Returns the table and whether it was built.
    pub fn load_or_build(path: &Path) -> (Self, bool) {
        if let Some(t) = Self::load(path) {
            return (t, false);
        }
        let t = Self::build();
        let _ = t.save(path);
        (t, true)
    }

    fn load(path: &Path) -> Option<Self> {
        let bytes = std::fs::read(path).ok()?;
        if bytes.len() < MAGIC.len() + 16 || !bytes.starts_with(MAGIC) {
            return None;
        }
        let (body, tail) = bytes.split_at(bytes.len() - 8);
        if checksum(body) != u64::from_le_bytes(tail.try_into().ok()?) {
            return None;
        }
        let rest = &body[MAGIC.len()..];
        let count = u64::from_le_bytes(rest.get(..8)?.try_into().ok()?) as usize;
        let data = &rest[8..];
        if data.len() != count * 9 {
            return None;
        }
        let mut entry = HashMap::with_capacity(count);
        for rec in data.chunks_exact(9) {
            let key = u64::from_le_bytes(rec[..8].try_into().ok()?);
            entry.insert(key, rec[8]);
        }
        Some(Exact4 {
            gates: library(),
            entry,
        })
    }

    fn save(&self, path: &Path) -> std::io::Result<()> {
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir)?;
        }
        let mut bytes = Vec::with_capacity(MAGIC.len() + 16 + self.entry.len() * 9);
        bytes.extend_from_slice(MAGIC);
        bytes.extend_from_slice(&(self.entry.len() as u64).to_le_bytes());
        for (&k, &v) in &self.entry {
            bytes.extend_from_slice(&k.to_le_bytes());
            bytes.push(v);
        }
        let sum = checksum(&bytes);
        bytes.extend_from_slice(&sum.to_le_bytes());
        let tmp = path.with_extension(format!("tmp-{}", std::process::id()));
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(&bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    }

    /// Number of stored functions needing each gate count (0 to [`HALF`]).
    pub fn distribution(&self) -> Vec<usize> {
        let mut v = vec![0; HALF as usize + 1];
        for &e in self.entry.values() {
            v[(e >> 5) as usize] += 1;
        }
        v
    }

    fn gate(&self, k: u8) -> Gate {
        let (c, t) = self.gates[k as usize];
        let controls = (0..4u32)
            .filter(|b| (c >> b) & 1 == 1)
            .map(Control::pos)
            .collect();
        Gate::new(controls, Line(t as u32)).expect("target outside the controls")
    }

    /// A minimum circuit of a stored function, gates in the order they apply.
    fn stored(&self, mut p: u64) -> Vec<Gate> {
        let mut out = Vec::new();
        while let Some(&e) = self.entry.get(&p) {
            if e >> 5 == 0 {
                break;
            }
            let k = e & 31;
            out.push(self.gate(k));
            p = apply(p, self.gates[k as usize]);
        }
        out.reverse();
        out
    }

    /// The optimal circuit of `images` when it has at most `2 * HALF` gates.
    pub fn query(&self, images: &[u64]) -> Option<Vec<Gate>> {
        let f = pack(images);
        if self.entry.contains_key(&f) {
            return Some(self.stored(f));
        }
        let mut best: Option<(u8, u64, u64)> = None;
        for (&x, &ex) in &self.entry {
            let dx = ex >> 5;
            if best.is_some_and(|(b, _, _)| dx + 1 >= b) {
                continue;
            }
            let g = compose(f, x);
            if let Some(&eg) = self.entry.get(&g) {
                let total = dx + (eg >> 5);
                if best.is_none_or(|(b, _, _)| total < b) {
                    best = Some((total, x, g));
                }
            }
        }
        // f . x = g, so f = g . x^-1: undo x (its circuit backwards), then g.
        best.map(|(_, x, g)| {
            let mut gates: Vec<Gate> = self.stored(x).into_iter().rev().collect();
            gates.extend(self.stored(g));
            gates
        })
    }

    /// The minimum number of gates of `images` if at most `2 * HALF`, with the
    /// circuit; otherwise `None` (at least `2 * HALF + 1` gates).
    pub fn solve(&self, images: &[u64]) -> Exact4Result {
        match self.query(images) {
            Some(gates) => {
                let n = gates.len();
                Exact4Result {
                    gates,
                    minimal: true,
                    lower_bound: n,
                }
            }
            None => Exact4Result {
                gates: Vec::new(),
                minimal: false,
                lower_bound: 2 * HALF as usize + 1,
            },
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_library_has_32_gates() {
        assert_eq!(library().len(), 32);
        // NOT on line 0 flips bit 0 of every image.
        let id = pack(&(0..16).collect::<Vec<_>>());
        let p = apply(id, (0, 0));
        for i in 0..16 {
            assert_eq!(image(p, i), i ^ 1);
        }
        // A 3-control gate onto line 3 swaps 7 and 15 only.
        let q = apply(id, (0b0111, 3));
        assert_eq!((image(q, 7), image(q, 15), image(q, 6)), (15, 7, 6));
    }
}
