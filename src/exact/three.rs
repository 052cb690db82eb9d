//! Exact synthesis on three lines: the optimal circuit of NOT, CNOT and Toffoli
//! gates for every one of the 40,320 reversible functions of 3 bits.
//!
//! A breadth-first search from the identity over the 12 gates of the library
//! (3 NOT, 6 CNOT, 3 Toffoli) visits every function at its minimum gate count
//! and records the last gate of one minimum circuit (the approach of Shende,
//! Prasad, Markov, Hayes, IEEE TCAD 22(6), 2003). The table is built once on
//! request by the table handle (about 0.5 million steps) and a query walks back at most 8 gates.

use crate::circuit::{Control, Gate, Line};
use std::collections::HashMap;

/// The NOT, CNOT and Toffoli gates on `w` lines (12 for `w = 3`).
pub fn library(w: u32) -> Vec<Gate> {
    let mut v = Vec::new();
    for t in 0..w {
        v.push(Gate::not(t));
    }
    for t in 0..w {
        for c in 0..w {
            if c != t {
                v.push(Gate::cnot(c, t));
            }
        }
    }
    if w == 3 {
        for t in 0..3u32 {
            let cs: Vec<Control> = (0..3u32).filter(|&c| c != t).map(Control::pos).collect();
            v.push(Gate::new(cs, Line(t)).expect("two controls and a target"));
        }
    }
    v
}

/// A 3-bit permutation packed as eight 3-bit images.
fn pack(images: &[u64]) -> u32 {
    images
        .iter()
        .enumerate()
        .fold(0u32, |a, (i, &v)| a | (v as u32) << (3 * i))
}

fn image(p: u32, i: u64) -> u64 {
    ((p >> (3 * i)) & 7) as u64
}

/// The table: minimum size and last gate of every function of `width` bits.
pub struct Exact3 {
    width: u32,
    gates: Vec<Gate>,
    entry: HashMap<u32, (u8, u8)>,
}

impl Exact3 {
    /// Builds the table for `width` lines (1 to 3) by breadth-first search.
    pub(super) fn build(width: u32) -> Self {
        let gates = library(width);
        let size = 1u64 << width;
        let identity = pack(&(0..size).collect::<Vec<_>>());
        let mut entry = HashMap::with_capacity(40320);
        entry.insert(identity, (0u8, u8::MAX));
        let mut frontier = vec![identity];
        let mut d = 0u8;
        while !frontier.is_empty() {
            let mut next = Vec::new();
            for &p in &frontier {
                for (k, g) in gates.iter().enumerate() {
                    let images: Vec<u64> = (0..size).map(|i| g.apply(image(p, i))).collect();
                    let q = pack(&images);
                    if let std::collections::hash_map::Entry::Vacant(e) = entry.entry(q) {
                        e.insert((d + 1, k as u8));
                        next.push(q);
                    }
                }
            }
            frontier = next;
            d += 1;
        }
        Exact3 {
            width,
            gates,
            entry,
        }
    }

    /// Number of functions needing each gate count.
    pub fn distribution(&self) -> Vec<usize> {
        let max = self.entry.values().map(|e| e.0).max().unwrap_or(0) as usize;
        let mut v = vec![0; max + 1];
        for e in self.entry.values() {
            v[e.0 as usize] += 1;
        }
        v
    }

    /// An optimal circuit for `images` (`2^width` entries), gates in the order they apply.
    pub fn circuit(&self, images: &[u64]) -> Vec<Gate> {
        let size = 1u64 << self.width;
        let mut p = pack(images);
        let mut out = Vec::new();
        while let Some(&(d, k)) = self.entry.get(&p) {
            if d == 0 {
                break;
            }
            let g = &self.gates[k as usize];
            out.push(g.clone());
            // Undo the last gate: apply it again to the images.
            let prev: Vec<u64> = (0..size).map(|i| g.apply(image(p, i))).collect();
            p = pack(&prev);
        }
        out.reverse();
        out
    }

    /// The minimum gate count of `images`.
    pub fn size(&self, images: &[u64]) -> usize {
        self.entry.get(&pack(images)).map_or(0, |e| e.0 as usize)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Shende, Prasad, Markov, Hayes, IEEE TCAD 22(6), 2003 (checks.md): the
    // number of 3-bit functions with minimum size k, average 5.8655, maximum 8.
    #[test]
    fn distribution_of_all_40320_functions() {
        let t = Exact3::build(3);
        let d = t.distribution();
        assert_eq!(d, vec![1, 12, 102, 625, 2780, 8921, 17049, 10253, 577]);
        let total: usize = d.iter().enumerate().map(|(k, n)| k * n).sum();
        assert_eq!(total, 236_497);
    }

    // hwb3 needs 7 gates, the Miller-Maslov-Dueck example 6 (checks.md, computed).
    #[test]
    fn named_functions() {
        let t = Exact3::build(3);
        assert_eq!(t.size(&[0, 2, 4, 5, 1, 6, 3, 7]), 7);
        assert_eq!(t.size(&[7, 0, 1, 3, 4, 2, 6, 5]), 6);
        for images in [[0u64, 2, 4, 5, 1, 6, 3, 7], [7, 0, 1, 3, 4, 2, 6, 5]] {
            let c = t.circuit(&images);
            for (i, &want) in images.iter().enumerate() {
                let got = c.iter().fold(i as u64, |s, g| g.apply(s));
                assert_eq!(got, want);
            }
        }
    }
}
