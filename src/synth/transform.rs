//! Transformation-based synthesis of permutations (Miller, Maslov, Dueck, DAC 2003), basic form.
//!
//! Walk the truth table in input order. At row `i` the rows before it already map
//! to themselves; gates appended at the output side turn `f(i)` into `i` without
//! disturbing earlier rows: first set the bits that `i` has and `f(i)` lacks
//! (controls: the 1-bits of the current `f(i)`), then clear the bits that `f(i)`
//! has and `i` lacks (controls: the 1-bits of `i`). The gates, read in reverse,
//! realize `f`.
//!
//! Complexity: `O(n 2^n)` gates at most, `O(n 4^n)` time in the worst case
//! (every gate is applied to the remaining rows). No ancilla; the widest gate
//! has `n - 1` controls.

use super::permutation_lines;
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::logic::Permutation;

fn gate_on(bits: u64, n: usize, target: usize) -> Gate {
    let controls = (0..n as u32)
        .filter(|&b| (bits >> b) & 1 == 1 && b as usize != target)
        .map(Control::pos)
        .collect();
    Gate::new(controls, Line(target as u32)).expect("target left out of the controls")
}

/// Synthesizes `p` on `p.width()` lines with MCT gates.
pub fn transform(p: &Permutation) -> Circuit {
    let n = p.width();
    let mut f: Vec<u64> = p.images().to_vec();
    let mut gates = Vec::new();
    let mut apply = |g: Gate, f: &mut [u64], from: usize| {
        for v in f[from..].iter_mut() {
            *v = g.apply(*v);
        }
        gates.push(g);
    };
    for i in 0..f.len() {
        let want = i as u64;
        if f[i] == want {
            continue;
        }
        for b in 0..n {
            let bit = 1u64 << b;
            if want & bit != 0 && f[i] & bit == 0 {
                let g = gate_on(f[i], n, b);
                apply(g, &mut f, i);
            }
        }
        for b in 0..n {
            let bit = 1u64 << b;
            if want & bit == 0 && f[i] & bit != 0 {
                let g = gate_on(want, n, b);
                apply(g, &mut f, i);
            }
        }
        debug_assert_eq!(f[i], want);
    }
    gates.reverse();
    let mut c = Circuit::new(permutation_lines(n));
    for g in gates {
        c.push(g);
    }
    c
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
    }
}
