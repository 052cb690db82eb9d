//! Transformation-based synthesis of permutations (Miller, Maslov, Dueck, DAC 2003),
//! basic and bidirectional.
//!
//! Walk the truth table in input order. At row `i` the rows before it already map
//! to themselves; gates appended at the output side turn `f(i)` into `i` without
//! disturbing earlier rows: first set the bits that `i` has and `f(i)` lacks
//! (controls: the 1-bits of the current `f(i)`), then clear the bits that `f(i)`
//! has and `i` lacks (controls: the 1-bits of `i`). The bidirectional variant
//! may instead fix the row from the input side, working on the inverse, when
//! `f^-1(i)` is closer to `i` in Hamming distance than `f(i)` is. Input-side
//! gates come first in the circuit, output-side gates follow in reverse.
//!
//! A gate touches only the values that contain its controls, which are found by
//! enumerating supersets, so one gate costs `O(2^(n - controls))`.
//! Functions go through their xor embedding `|x, y> -> |x, y XOR f(x)>`.
//!
//! Complexity: at most `n` gates per row, `O(n 2^n)` gates. No ancilla; the
//! widest gate has `n - 1` controls. Limit: [`TRANSFORM_MAX_LINES`] lines.

use super::SynthError;
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::logic::Permutation;
use crate::spec::permutation_layout;
use crate::spec::FunctionSpec;

/// Most lines the transformation-based methods take.
pub const TRANSFORM_MAX_LINES: usize = 16;

fn gate_on(bits: u64, n: usize, target: usize) -> Gate {
    let controls = (0..n as u32)
        .filter(|&b| (bits >> b) & 1 == 1 && b as usize != target)
        .map(Control::pos)
        .collect();
    Gate::new(controls, Line(target as u32)).expect("target left out of the controls")
}

/// `f := g . f` for a gate with positive controls `c` and target bit `t`,
/// keeping `inv` the inverse of `f`.
fn apply_output(f: &mut [u64], inv: &mut [u64], n: usize, c: u64, t: usize) {
    let tbit = 1u64 << t;
    let free = ((1u64 << n) - 1) & !c & !tbit;
    let mut s = free;
    loop {
        let v = c | s;
        let u = v | tbit;
        let (j1, j2) = (inv[v as usize], inv[u as usize]);
        f[j1 as usize] = u;
        f[j2 as usize] = v;
        inv[v as usize] = j2;
        inv[u as usize] = j1;
        if s == 0 {
            break;
        }
        s = (s - 1) & free;
    }
}

/// Fixes row `i` of `f` from its output side; returns the gates applied.
fn fix_row(f: &mut [u64], inv: &mut [u64], n: usize, i: usize) -> Vec<Gate> {
    let want = i as u64;
    let mut gates = Vec::new();
    for b in 0..n {
        let bit = 1u64 << b;
        if want & bit != 0 && f[i] & bit == 0 {
            let c = f[i];
            apply_output(f, inv, n, c, b);
            gates.push(gate_on(c, n, b));
        }
    }
    for b in 0..n {
        let bit = 1u64 << b;
        if want & bit == 0 && f[i] & bit != 0 {
            apply_output(f, inv, n, want & !bit, b);
            gates.push(gate_on(want, n, b));
        }
    }
    gates
}

/// Synthesizes the images `f` on `n` lines; `bidirectional` picks the cheaper
/// side for every row.
fn synthesize_images(mut f: Vec<u64>, n: usize, bidirectional: bool) -> Vec<Gate> {
    let mut inv = vec![0u64; f.len()];
    for (i, &v) in f.iter().enumerate() {
        inv[v as usize] = i as u64;
    }
    let mut input_side = Vec::new();
    let mut output_side = Vec::new();
    for i in 0..f.len() {
        if f[i] == i as u64 {
            continue;
        }
        let out_cost = (f[i] ^ i as u64).count_ones();
        let in_cost = (inv[i] ^ i as u64).count_ones();
        if bidirectional && in_cost < out_cost {
            input_side.extend(fix_row(&mut inv, &mut f, n, i));
        } else {
            output_side.extend(fix_row(&mut f, &mut inv, n, i));
        }
        debug_assert_eq!(f[i], i as u64);
    }
    output_side.reverse();
    input_side.extend(output_side);
    input_side
}

/// Synthesizes `p` on `p.width()` lines with MCT gates (basic form).
pub fn transform(p: &Permutation) -> Circuit {
    transform_with(p, false)
}

/// Synthesizes `p`, output side only (`bidirectional = false`) or choosing the
/// cheaper side per row.
pub fn transform_with(p: &Permutation, bidirectional: bool) -> Circuit {
    let n = p.width();
    let mut c = Circuit::new(permutation_layout(n).lines());
    for g in synthesize_images(p.images().to_vec(), n, bidirectional) {
        c.push(g);
    }
    c
}

/// The xor embedding `|x, y> -> |x, y XOR f(x)>` of a function as images on
/// its `x` and `y` lines (state bit `j < n` is `x[j]`, bit `n + k` is `y[k]`).
/// The caller keeps `n + m` small: there are `2^(n + m)` images.
pub fn xor_embedding(f: &FunctionSpec) -> Vec<u64> {
    let (n, m) = (f.inputs.len(), f.outputs.len());
    let tables: Vec<_> = (0..m)
        .map(|j| f.table(j).expect("a small function has tables"))
        .collect();
    (0..1u64 << (n + m))
        .map(|s| {
            let x = s & ((1 << n) - 1);
            let fx = tables
                .iter()
                .enumerate()
                .fold(0u64, |acc, (j, t)| acc | (t.get(x as usize) as u64) << j);
            s ^ (fx << n)
        })
        .collect()
}

/// A function through its xor embedding, a permutation of the `x` and `y` lines.
pub fn transform_function(f: &FunctionSpec, bidirectional: bool) -> Result<Circuit, SynthError> {
    let n = f.inputs.len();
    let m = f.outputs.len();
    if n + m > TRANSFORM_MAX_LINES {
        return Err(SynthError::NotApplicable {
            method: if bidirectional {
                "transform-bidir"
            } else {
                "transform"
            },
            kind: "function",
            hint: "it takes at most 16 inputs and outputs together; use esop or bennett",
        });
    }
    let mut c = Circuit::new(f.layout().lines());
    for g in synthesize_images(xor_embedding(f), n + m, bidirectional) {
        c.push(g);
    }
    Ok(c)
}

#[cfg(test)]
mod tests {
    use super::*;

    // The running example of Miller, Maslov, Dueck (DAC 2003), f = [1,0,3,2,5,7,4,6].
    #[test]
    fn realizes_the_permutation() {
        let p = Permutation::new(3, vec![1, 0, 3, 2, 5, 7, 4, 6]).unwrap();
        let c = transform(&p);
        for i in 0..8 {
            assert_eq!(c.simulate(i), p.apply(i));
        }
        // Row 0 needs one NOT; every later fix needs at most n gates.
        assert!(c.gates().len() <= 1 + 3 * 7, "{} gates", c.gates().len());
        let b = transform_with(&p, true);
        for i in 0..8 {
            assert_eq!(b.simulate(i), p.apply(i));
        }
    }

    #[test]
    fn both_directions_on_random_permutations() {
        let mut seed = 11u64;
        for w in 1..=8usize {
            let mut images: Vec<u64> = (0..1u64 << w).collect();
            for i in (1..images.len()).rev() {
                seed = seed
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                images.swap(i, (seed >> 33) as usize % (i + 1));
            }
            let p = Permutation::new(w, images).unwrap();
            for bidirectional in [false, true] {
                let c = transform_with(&p, bidirectional);
                for i in 0..1u64 << w {
                    assert_eq!(c.simulate(i), p.apply(i), "w={w} bidir={bidirectional}");
                }
            }
        }
    }
}
