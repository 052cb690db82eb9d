//! Minimum ESOPs of every single-output function of at most 4 inputs, by
//! breadth-first search over XORs of cubes from the constant 0 (for 4 inputs:
//! 65,536 functions, 81 cubes; about 5 million steps).

use crate::logic::Cube;

/// Breadth-first tables of minimum ESOP sizes, for 1 to 4 inputs.
pub struct EsopTable {
    vars: usize,
    cubes: Vec<Cube>,
    /// Minimum cube count per function.
    dist: Vec<u8>,
    /// A cube whose removal leaves a function one cube smaller.
    via: Vec<u8>,
}

impl EsopTable {
    /// Builds the table for `vars` inputs (1 to 4) by breadth-first search.
    pub(super) fn build(vars: usize) -> Self {
        let size = 1usize << (1 << vars);
        let mut cubes = Vec::new();
        for code in 0..3u32.pow(vars as u32) {
            let (mut care, mut pol, mut c) = (0u32, 0u32, code);
            for i in 0..vars {
                match c % 3 {
                    1 => {
                        care |= 1 << i;
                        pol |= 1 << i;
                    }
                    2 => care |= 1 << i,
                    _ => {}
                }
                c /= 3;
            }
            cubes.push(Cube::new(care, pol));
        }
        let masks: Vec<usize> = cubes
            .iter()
            .map(|c| (0..1u64 << vars).fold(0usize, |m, x| m | (c.contains(x) as usize) << x))
            .collect();
        let mut dist = vec![u8::MAX; size];
        let mut via = vec![0u8; size];
        dist[0] = 0;
        let mut frontier = vec![0usize];
        let mut d = 0u8;
        while !frontier.is_empty() {
            let mut next = Vec::new();
            for &f in &frontier {
                for (k, &m) in masks.iter().enumerate() {
                    let g = f ^ m;
                    if dist[g] == u8::MAX {
                        dist[g] = d + 1;
                        via[g] = k as u8;
                        next.push(g);
                    }
                }
            }
            frontier = next;
            d += 1;
        }
        EsopTable {
            vars,
            cubes,
            dist,
            via,
        }
    }

    /// Minimum cube count of the function whose truth table is `f`.
    pub fn size(&self, f: usize) -> usize {
        self.dist[f] as usize
    }

    /// The number of functions needing each cube count.
    pub fn distribution(&self) -> Vec<usize> {
        let max = *self.dist.iter().max().unwrap_or(&0) as usize;
        let mut v = vec![0; max + 1];
        for &d in &self.dist {
            v[d as usize] += 1;
        }
        v
    }

    /// One minimum ESOP of `f`.
    pub fn esop(&self, mut f: usize) -> Vec<Cube> {
        let mut out = Vec::new();
        while f != 0 {
            let c = self.cubes[self.via[f] as usize];
            out.push(c);
            f ^= (0..1u64 << self.vars).fold(0usize, |m, x| m | (c.contains(x) as usize) << x);
        }
        out
    }
}
