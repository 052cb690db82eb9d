//! The 24 relabellings of four lines, walked by bit exchanges, and the canonical form of a class under relabelling and inversion.

use super::perm::*;

/// One step of the walk through all 24 line relabellings: exchanging lines
/// `i < j` in both the values (bits of every nibble) and the positions.
#[derive(Clone, Copy)]
pub(super) struct Transposition {
    pub(super) value_mask: u64,
    pub(super) value_shift: u32,
    pub(super) position_mask: u64,
    pub(super) position_shift: u32,
}

pub(super) const fn transposition(i: u32, j: u32) -> Transposition {
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
pub(super) struct Relabellings {
    pub(super) parent: [usize; 24],
    pub(super) step: [Transposition; 24],
    pub(super) map: [[u8; 4]; 24],
}

pub(super) const SYM: Relabellings = {
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
pub(super) const SEND: [[u8; 16]; 24] = {
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
pub(super) const LEAST: [(usize, [u8; 24]); 16] = {
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
pub(super) const PATH: [(usize, [Transposition; 3]); 24] = {
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

pub(super) fn conjugate(p: Perm, t: &Transposition) -> Perm {
    let v = delta_swap(p, t.value_mask, t.value_shift);
    delta_swap(v, t.position_mask, t.position_shift)
}

/// Relabelling `k` of `p`.
pub(super) fn relabelled(p: Perm, k: usize) -> Perm {
    let (n, steps) = &PATH[k];
    steps[..*n].iter().fold(p, conjugate)
}

/// The 24 relabellings of `p`, in the order of [`SYM`].
pub(super) fn relabellings(p: Perm) -> [Perm; 24] {
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
pub(super) struct Least(Perm, u32);

impl Least {
    const NONE: Least = Least(u64::MAX, 0);

    pub(super) fn take(&mut self, v: Perm) {
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
pub(super) fn least_form(
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
pub(super) fn canonical(p: Perm) -> (Perm, u32) {
    let q = inverse(p);
    least_form(
        image(p, 15),
        image(q, 15),
        |k| relabelled(p, k),
        |k| relabelled(q, k),
    )
}

pub(super) fn canon(p: Perm) -> Perm {
    canonical(p).0
}

/// `p` with its lines renamed: line `i` becomes line `map[i]`.
pub(super) fn relabel(p: Perm, map: [u32; 4]) -> Perm {
    let m = |x: u64| (0..4).fold(0, |a, b| a | ((x >> b) & 1) << map[b as usize]);
    (0..16).fold(0, |a, x| a | m(image(p, x)) << (4 * m(x)))
}

/// The 24 line maps.
pub(super) fn line_maps() -> Vec<[u32; 4]> {
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
