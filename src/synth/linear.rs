//! Affine permutations (`x -> A x XOR b` over GF(2)) as CNOT and NOT
//! circuits, by Gaussian elimination.
//!
//! The matrix is read off the images of 0 and of the unit vectors, and the
//! permutation is affine exactly when every image agrees with it. Row
//! operations that bring `A` to the identity are CNOTs (`row t ^= row c` on
//! the matrix is `x_t ^= x_c` on the state); applied in reverse order they
//! compute `A`, and NOTs on the set bits of `b` follow. Elimination runs
//! forward below each pivot, then back substitution from the last column, so
//! a triangular matrix costs only its off-diagonal ones: the Gray code
//! `x -> x XOR (x >> 1)` on n lines takes n - 1 CNOTs. The elimination is
//! tried on `A` and on its transpose (a circuit for the transpose, reversed
//! with each CNOT's control and target swapped, computes `A`) and the
//! shorter kept. Patel, Markov and Hayes ("Optimal synthesis of linear
//! reversible circuits", QIC 8, 2008) reach O(n^2 / log n) CNOTs with
//! sections of log n columns; that refinement is not done here, so a dense
//! random matrix costs up to about n^2 CNOTs.

use crate::circuit::{Circuit, Gate};
use crate::logic::Permutation;
use crate::spec::permutation_layout;

/// The circuit of `p` when it is affine, else `None`.
pub fn linear(p: &Permutation) -> Option<Circuit> {
    let n = p.width();
    let (rows, b) = affine_form(p)?;
    let direct = eliminate(rows.clone(), n);
    let transposed = eliminate(transpose(&rows, n), n);
    // From the transpose: reversed, control and target swapped.
    let from_transpose: Vec<(usize, usize)> =
        transposed.iter().rev().map(|&(c, t)| (t, c)).collect();
    let ops = if from_transpose.len() < direct.len() {
        // The transpose's ops reduce A^T to I in order; reversed and swapped,
        // they are the ops that reduce A to I, in order.
        from_transpose
    } else {
        direct
    };
    let mut c = Circuit::new(permutation_layout(n).lines());
    // E_k ... E_1 A = I, so A = E_1 ... E_k: apply E_k first.
    for &(control, target) in ops.iter().rev() {
        c.push(Gate::cnot(control as u32, target as u32));
    }
    for j in 0..n {
        if b >> j & 1 == 1 {
            c.push(Gate::not(j as u32));
        }
    }
    Some(c)
}

/// `(rows, b)` with `rows[i]` the bits of row `i` of `A` (bit `j` set when
/// output `i` reads input `j`), or `None` when some image disagrees.
fn affine_form(p: &Permutation) -> Option<(Vec<u64>, u64)> {
    let n = p.width();
    let b = p.apply(0);
    let columns: Vec<u64> = (0..n).map(|j| p.apply(1 << j) ^ b).collect();
    // Gray-code order: each image differs from the previous by one column.
    let mut value = b;
    for x in 1..1u64 << n {
        let flip = x.trailing_zeros() as usize;
        value ^= columns[flip];
        let gray = x ^ (x >> 1);
        if p.apply(gray) != value {
            return None;
        }
    }
    let rows = (0..n)
        .map(|i| (0..n).fold(0u64, |acc, j| acc | ((columns[j] >> i) & 1) << j))
        .collect();
    Some((rows, b))
}

fn transpose(rows: &[u64], n: usize) -> Vec<u64> {
    (0..n)
        .map(|j| (0..n).fold(0u64, |acc, i| acc | ((rows[i] >> j) & 1) << i))
        .collect()
}

/// Row operations `(control, target)`, meaning `row target ^= row control`,
/// that bring the invertible matrix `rows` to the identity, in order.
fn eliminate(mut rows: Vec<u64>, n: usize) -> Vec<(usize, usize)> {
    let mut ops = Vec::new();
    // Forward: a one on the diagonal, zeros below it.
    for col in 0..n {
        if rows[col] >> col & 1 == 0 {
            let pivot = (col + 1..n)
                .find(|&r| rows[r] >> col & 1 == 1)
                .expect("an affine permutation's matrix is invertible");
            rows[col] ^= rows[pivot];
            ops.push((pivot, col));
        }
        for r in col + 1..n {
            if rows[r] >> col & 1 == 1 {
                rows[r] ^= rows[col];
                ops.push((col, r));
            }
        }
    }
    // Back substitution: zeros above the diagonal, last column first.
    for col in (0..n).rev() {
        for r in 0..col {
            if rows[r] >> col & 1 == 1 {
                rows[r] ^= rows[col];
                ops.push((col, r));
            }
        }
    }
    debug_assert!(rows.iter().enumerate().all(|(i, &r)| r == 1 << i));
    ops
}

#[cfg(test)]
mod tests {
    use super::*;

    fn perm(n: usize, f: impl Fn(u64) -> u64) -> Permutation {
        Permutation::new(n, (0..1u64 << n).map(f).collect()).unwrap()
    }

    fn run(c: &Circuit, x: u64) -> u64 {
        c.simulate(x)
    }

    #[test]
    fn the_gray_code_takes_n_minus_1_cnots() {
        // Gray code x -> x ^ (x >> 1): n - 1 CNOTs (issue figure; common practice).
        for n in 2..=10 {
            let p = perm(n, |x| x ^ (x >> 1));
            let c = linear(&p).expect("the Gray code is linear");
            assert_eq!(c.gates().len(), n - 1, "n = {n}");
            for x in 0..1u64 << n {
                assert_eq!(run(&c, x), p.apply(x));
            }
        }
    }

    #[test]
    fn random_affine_maps_are_computed_and_others_refused() {
        let mut s = 0x9e37_79b9_7f4a_7c15u64;
        let mut next = move || {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            s
        };
        for n in 1..=8 {
            for _ in 0..20 {
                // A random invertible matrix: a product of random row ops.
                let mut cols: Vec<u64> = (0..n).map(|j| 1u64 << j).collect();
                for _ in 0..3 * n {
                    let (a, b) = (next() as usize % n, next() as usize % n);
                    if a != b {
                        cols[a] ^= cols[b];
                    }
                }
                let b = next() & ((1 << n) - 1);
                let f = |x: u64| {
                    (0..n).fold(
                        b,
                        |acc, j| if x >> j & 1 == 1 { acc ^ cols[j] } else { acc },
                    )
                };
                let p = perm(n, f);
                let c = linear(&p).expect("affine");
                assert!(c.gates().len() <= n * n + n);
                for x in 0..1u64 << n {
                    assert_eq!(run(&c, x), p.apply(x), "n = {n}, x = {x}");
                }
            }
        }
        // Swapping two states is not affine (it fixes 0 and moves only two points).
        let p = perm(3, |x| match x {
            5 => 6,
            6 => 5,
            x => x,
        });
        assert!(linear(&p).is_none());
    }
}
