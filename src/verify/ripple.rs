//! Bit-sliced ripple-carry arithmetic over registers of rows, for the verifier's arithmetic references.
//!
//! A register of `n` bits is `n` rows of `W` words: row `j` is bit `j` (least
//! significant first) of the register's value on each of `64 W` basis states.
//! Sums, differences and comparisons are the schoolbook ripple-carry chains
//! (full adder `s = a ^ b ^ c`, `c' = ab | c(a ^ b)`; borrow `b' = !a b |
//! !(a ^ b) b`), each step one pass of word operations over the block, so a
//! reference costs O(n W) word operations per block and nothing per state.
//! The chains are the textbook ones (Knuth, TAOCP vol. 2, 4.3.1; any logic
//! design text): common practice, kept apart from every circuit generator.
//!
//! Every function checks the register shapes first and returns
//! [`RippleError`] on a mismatch; constants are `u128`, so registers of up to
//! 128 bits get exact constants (wider registers read them zero-extended).
#![allow(dead_code)] // Remove once the verifier's block loop calls this module.

use super::kernel::{dispatched, Dispatch, Level};

/// Registers of the wrong sizes.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("register {register} has {rows} rows, {expected} expected")]
pub struct RippleError {
    /// Which argument.
    pub register: &'static str,
    /// Rows it has.
    pub rows: usize,
    /// Rows it should have.
    pub expected: usize,
}

fn same(register: &'static str, rows: usize, expected: usize) -> Result<(), RippleError> {
    if rows == expected {
        Ok(())
    } else {
        Err(RippleError {
            register,
            rows,
            expected,
        })
    }
}

/// Bit `j` of `k` as an all-0 or all-1 word (0 past bit 127).
#[inline(always)]
fn bit(k: u128, j: usize) -> u64 {
    if j < 128 {
        0u64.wrapping_sub(((k >> j) & 1) as u64)
    } else {
        0
    }
}

/// True when `k` needs more than `n` bits.
#[inline(always)]
fn exceeds(k: u128, n: usize) -> bool {
    n < 128 && k >> n != 0
}

/// `sum = a + b mod 2^n` and `carry` = the carry out of bit `n - 1`.
pub fn add<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    b: &[[u64; W]],
    sum: &mut [[u64; W]],
    carry: &mut [u64; W],
) -> Result<(), RippleError> {
    same("b", b.len(), a.len())?;
    same("sum", sum.len(), a.len())?;
    add_rows::<W>(dispatch, a, b, sum, carry);
    Ok(())
}

/// `sum = a + (k mod 2^n) mod 2^n` and `carry` = the carry out.
pub fn add_const<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    k: u128,
    sum: &mut [[u64; W]],
    carry: &mut [u64; W],
) -> Result<(), RippleError> {
    same("sum", sum.len(), a.len())?;
    add_const_rows::<W>(dispatch, a, k, sum, carry);
    Ok(())
}

/// `diff = a - b mod 2^n` and `borrow` = `a < b`.
pub fn subtract<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    b: &[[u64; W]],
    diff: &mut [[u64; W]],
    borrow: &mut [u64; W],
) -> Result<(), RippleError> {
    same("b", b.len(), a.len())?;
    same("diff", diff.len(), a.len())?;
    subtract_rows::<W>(dispatch, a, b, diff, borrow);
    Ok(())
}

/// `out = a < b` (unsigned): the borrow chain alone.
pub fn less_than<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    b: &[[u64; W]],
    out: &mut [u64; W],
) -> Result<(), RippleError> {
    same("b", b.len(), a.len())?;
    less_than_rows::<W>(dispatch, a, b, out);
    Ok(())
}

/// `out = a < k` (unsigned; all 1 when `k >= 2^n`).
pub fn less_than_const<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    k: u128,
    out: &mut [u64; W],
) {
    if exceeds(k, a.len()) {
        *out = [!0; W];
    } else {
        less_than_const_rows::<W>(dispatch, a, k, out);
    }
}

/// `out = a == k` (all 0 when `k >= 2^n`).
pub fn equal_const<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    k: u128,
    out: &mut [u64; W],
) {
    if exceeds(k, a.len()) {
        *out = [0; W];
    } else {
        equal_const_rows::<W>(dispatch, a, k, out);
    }
}

/// `sum = a + b - N` when `a + b >= N`, else `a + b` (as `n + 1`-bit
/// numbers, then mod `2^n`): `(a + b) mod N` whenever `a, b < N <= 2^n`. Two
/// chains: the comparison of `a + b` with `N`, then the subtraction.
pub fn add_mod<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    b: &[[u64; W]],
    modulus: u128,
    sum: &mut [[u64; W]],
) -> Result<(), RippleError> {
    same("b", b.len(), a.len())?;
    same("sum", sum.len(), a.len())?;
    add_mod_rows::<W>(dispatch, a, b, modulus, sum);
    Ok(())
}

/// `out = ((a + 1) mod N) mod 2^n` where `a < N`, and `out = a` where `a >= N`
/// (the map leaves states outside its cycle alone). `N` of 0 leaves every
/// state alone.
pub fn increment_mod<const W: usize>(
    dispatch: Dispatch,
    a: &[[u64; W]],
    modulus: u128,
    out: &mut [[u64; W]],
) -> Result<(), RippleError> {
    same("out", out.len(), a.len())?;
    let mut below = [0u64; W];
    less_than_const(dispatch, a, modulus, &mut below);
    increment_mod_rows::<W>(dispatch, a, modulus, &below, out);
    Ok(())
}

/// `out = if_one` where `mask` is 1 and `if_zero` where it is 0, bit by bit
/// (a controlled op's reference: the op where the control is 1, the identity elsewhere).
pub fn select<const W: usize>(
    dispatch: Dispatch,
    mask: &[u64; W],
    if_one: &[[u64; W]],
    if_zero: &[[u64; W]],
    out: &mut [[u64; W]],
) -> Result<(), RippleError> {
    same("if_zero", if_zero.len(), if_one.len())?;
    same("out", out.len(), if_one.len())?;
    select_rows::<W>(dispatch, mask, if_one, if_zero, out);
    Ok(())
}

dispatched! {
    fn select_rows<const W: usize>(mask: &[u64; W], if_one: &[[u64; W]], if_zero: &[[u64; W]], out: &mut [[u64; W]]) {
        for ((x, y), o) in if_one.iter().zip(if_zero).zip(out.iter_mut()) {
            for k in 0..W {
                o[k] = (x[k] & mask[k]) | (y[k] & !mask[k]);
            }
        }
    }
}

dispatched! {
    fn add_rows<const W: usize>(a: &[[u64; W]], b: &[[u64; W]], sum: &mut [[u64; W]], carry: &mut [u64; W]) {
        let mut c = [0u64; W];
        for ((x, y), s) in a.iter().zip(b).zip(sum.iter_mut()) {
            for k in 0..W {
                let p = x[k] ^ y[k];
                s[k] = p ^ c[k];
                c[k] = (x[k] & y[k]) | (c[k] & p);
            }
        }
        *carry = c;
    }
}

dispatched! {
    fn add_const_rows<const W: usize>(a: &[[u64; W]], k: u128, sum: &mut [[u64; W]], carry: &mut [u64; W]) {
        let mut c = [0u64; W];
        for (j, (x, s)) in a.iter().zip(sum.iter_mut()).enumerate() {
            let kj = bit(k, j);
            for w in 0..W {
                s[w] = x[w] ^ c[w] ^ kj;
                c[w] = (x[w] & c[w]) | (kj & (x[w] | c[w]));
            }
        }
        *carry = c;
    }
}

dispatched! {
    fn subtract_rows<const W: usize>(a: &[[u64; W]], b: &[[u64; W]], diff: &mut [[u64; W]], borrow: &mut [u64; W]) {
        let mut br = [0u64; W];
        for ((x, y), d) in a.iter().zip(b).zip(diff.iter_mut()) {
            for k in 0..W {
                let p = x[k] ^ y[k];
                d[k] = p ^ br[k];
                br[k] = (!x[k] & y[k]) | (!p & br[k]);
            }
        }
        *borrow = br;
    }
}

dispatched! {
    fn less_than_rows<const W: usize>(a: &[[u64; W]], b: &[[u64; W]], out: &mut [u64; W]) {
        let mut br = [0u64; W];
        for (x, y) in a.iter().zip(b) {
            for k in 0..W {
                br[k] = (!x[k] & y[k]) | (!(x[k] ^ y[k]) & br[k]);
            }
        }
        *out = br;
    }
}

dispatched! {
    fn less_than_const_rows<const W: usize>(a: &[[u64; W]], k: u128, out: &mut [u64; W]) {
        let mut br = [0u64; W];
        for (j, x) in a.iter().enumerate() {
            // Against a 1 the borrow is !a | br, against a 0 it is !a & br.
            if bit(k, j) != 0 {
                for w in 0..W {
                    br[w] |= !x[w];
                }
            } else {
                for w in 0..W {
                    br[w] &= !x[w];
                }
            }
        }
        *out = br;
    }
}

dispatched! {
    fn equal_const_rows<const W: usize>(a: &[[u64; W]], k: u128, out: &mut [u64; W]) {
        let mut eq = [!0u64; W];
        for (j, x) in a.iter().enumerate() {
            let m = !bit(k, j);
            for w in 0..W {
                eq[w] &= x[w] ^ m;
            }
        }
        *out = eq;
    }
}

dispatched! {
    fn add_mod_rows<const W: usize>(a: &[[u64; W]], b: &[[u64; W]], modulus: u128, sum: &mut [[u64; W]]) {
        let n = a.len();
        // sum, carry = a + b; then at_least = (carry, sum) >= N.
        let mut c = [0u64; W];
        let mut br = [0u64; W];
        for (j, ((x, y), s)) in a.iter().zip(b).zip(sum.iter_mut()).enumerate() {
            let nj = bit(modulus, j);
            for k in 0..W {
                let p = x[k] ^ y[k];
                s[k] = p ^ c[k];
                c[k] = (x[k] & y[k]) | (c[k] & p);
                br[k] = (!s[k] & nj) | (!(s[k] ^ nj) & br[k]);
            }
        }
        let top = bit(modulus, n);
        // N past bit n makes every sum smaller.
        let keep = if exceeds(modulus, n + 1) { 0 } else { !0u64 };
        let mut at_least = [0u64; W];
        for k in 0..W {
            // Bit n of N against the carry.
            let borrow = (!c[k] & top) | (!(c[k] ^ top) & br[k]);
            at_least[k] = !borrow & keep;
        }
        let mut br = [0u64; W];
        for (j, s) in sum.iter_mut().enumerate() {
            let nj = bit(modulus, j);
            for k in 0..W {
                let d = s[k] ^ nj ^ br[k];
                br[k] = (!s[k] & nj) | (!(s[k] ^ nj) & br[k]);
                s[k] = (d & at_least[k]) | (s[k] & !at_least[k]);
            }
        }
    }
}

dispatched! {
    fn increment_mod_rows<const W: usize>(a: &[[u64; W]], modulus: u128, below: &[u64; W], out: &mut [[u64; W]]) {
        let n = a.len();
        // out = a + 1 (carry c); wraps = (c, out) == N; then select.
        let mut c = [!0u64; W];
        let mut eq = [!0u64; W];
        for (j, (x, o)) in a.iter().zip(out.iter_mut()).enumerate() {
            let m = !bit(modulus, j);
            for k in 0..W {
                o[k] = x[k] ^ c[k];
                c[k] &= x[k];
                eq[k] &= o[k] ^ m;
            }
        }
        let top = !bit(modulus, n);
        let keep = if exceeds(modulus, n + 1) { 0 } else { !0u64 };
        for k in 0..W {
            eq[k] &= (c[k] ^ top) & keep;
        }
        for (x, o) in a.iter().zip(out.iter_mut()) {
            for k in 0..W {
                // Below N: a + 1, or 0 where that is N. Elsewhere: a.
                o[k] = (o[k] & below[k] & !eq[k]) | (x[k] & !below[k]);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SplitMix64 (Steele, Lea, Flood, OOPSLA 2014): test inputs only.
    struct Mix(u64);
    impl Mix {
        fn next(&mut self) -> u64 {
            self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            z ^ (z >> 31)
        }
        fn wide(&mut self) -> u128 {
            (self.next() as u128) << 64 | self.next() as u128
        }
    }

    /// Words per row in these tests: 128 states.
    const W: usize = 2;
    const STATES: usize = 64 * W;

    fn mask(n: usize) -> u128 {
        if n == 128 {
            !0
        } else {
            (1u128 << n) - 1
        }
    }

    /// Random `n`-bit values, with the edge values 0, 1, the top and its neighbours mixed in.
    fn values(rng: &mut Mix, n: usize) -> Vec<u128> {
        (0..STATES)
            .map(|s| match s % 8 {
                0 => 0,
                1 => mask(n),
                2 => 1 & mask(n),
                3 => (mask(n) - 1) & mask(n),
                4 => mask(n) >> 1,
                _ => rng.wide() & mask(n),
            })
            .collect()
    }

    fn slice(v: &[u128], n: usize) -> Vec<[u64; W]> {
        (0..n)
            .map(|j| {
                let mut row = [0u64; W];
                for (s, x) in v.iter().enumerate() {
                    row[s / 64] |= (((x >> j) & 1) as u64) << (s % 64);
                }
                row
            })
            .collect()
    }

    fn unslice(rows: &[[u64; W]]) -> Vec<u128> {
        (0..STATES)
            .map(|s| {
                rows.iter().enumerate().fold(0u128, |acc, (j, r)| {
                    acc | (((r[s / 64] >> (s % 64)) & 1) as u128) << j
                })
            })
            .collect()
    }

    fn flags(row: &[u64; W]) -> Vec<bool> {
        (0..STATES)
            .map(|s| (row[s / 64] >> (s % 64)) & 1 == 1)
            .collect()
    }

    #[test]
    fn chains_match_u128_arithmetic_at_widths_1_to_128() {
        // The reference is Rust's own u128 arithmetic (overflowing_add,
        // wrapping_sub, <, ==, %), independent of the chains under test.
        let mut rng = Mix(11);
        for d in Dispatch::available() {
            for n in 1..=128usize {
                let (a, b) = (values(&mut rng, n), values(&mut rng, n));
                let (ra, rb) = (slice(&a, n), slice(&b, n));
                let mut rows = vec![[0u64; W]; n];
                let mut flag = [0u64; W];

                add(d, &ra, &rb, &mut rows, &mut flag).unwrap();
                let (got, carry) = (unslice(&rows), flags(&flag));
                for s in 0..STATES {
                    let (sum, over) = a[s].overflowing_add(b[s]);
                    let want_carry = if n == 128 { over } else { sum >> n != 0 };
                    assert_eq!(got[s], sum & mask(n), "add n={n}");
                    assert_eq!(carry[s], want_carry, "carry n={n}");
                }

                let k = match rng.next() % 3 {
                    0 => rng.wide() & mask(n),
                    1 => a[5],
                    _ => rng.wide(),
                };
                add_const(d, &ra, k, &mut rows, &mut flag).unwrap();
                let (got, carry) = (unslice(&rows), flags(&flag));
                let km = k & mask(n);
                for s in 0..STATES {
                    let (sum, over) = a[s].overflowing_add(km);
                    let want_carry = if n == 128 { over } else { sum >> n != 0 };
                    assert_eq!(got[s], sum & mask(n), "add_const n={n}");
                    assert_eq!(carry[s], want_carry, "add_const carry n={n}");
                }

                subtract(d, &ra, &rb, &mut rows, &mut flag).unwrap();
                let (got, borrow) = (unslice(&rows), flags(&flag));
                less_than(d, &ra, &rb, &mut flag).unwrap();
                let lt = flags(&flag);
                for s in 0..STATES {
                    assert_eq!(got[s], a[s].wrapping_sub(b[s]) & mask(n), "sub n={n}");
                    assert_eq!(borrow[s], a[s] < b[s], "borrow n={n}");
                    assert_eq!(lt[s], a[s] < b[s], "less_than n={n}");
                }

                less_than_const(d, &ra, k, &mut flag);
                let lt = flags(&flag);
                equal_const(d, &ra, k, &mut flag);
                let eq = flags(&flag);
                for s in 0..STATES {
                    assert_eq!(lt[s], a[s] < k, "less_than_const n={n} k={k}");
                    assert_eq!(eq[s], a[s] == k, "equal_const n={n} k={k}");
                }

                // Moduli from 1 to 2^n (the top of the range only where it fits u128).
                let top = if n == 128 { mask(128) } else { 1u128 << n };
                let modulus = match rng.next() % 4 {
                    0 => top,
                    1 => 1,
                    _ => 1 + rng.wide() % top,
                };
                let am: Vec<u128> = a.iter().map(|x| x % modulus).collect();
                let bm: Vec<u128> = b.iter().map(|x| x % modulus).collect();
                let (ram, rbm) = (slice(&am, n), slice(&bm, n));
                add_mod(d, &ram, &rbm, modulus, &mut rows).unwrap();
                let got = unslice(&rows);
                for s in 0..STATES {
                    // (a + b) mod N without overflow: a + b - N when b >= N - a.
                    let want = if bm[s] >= modulus - am[s] {
                        bm[s] - (modulus - am[s])
                    } else {
                        am[s] + bm[s]
                    };
                    assert_eq!(got[s], want, "add_mod n={n} N={modulus}");
                }

                // Off the domain the documented formula still holds, for any N.
                let any = match rng.next() % 3 {
                    0 => rng.wide(),
                    1 => rng.wide() >> (127 - n.min(127)),
                    _ => modulus,
                };
                add_mod(d, &ra, &rb, any, &mut rows).unwrap();
                let got = unslice(&rows);
                for s in 0..STATES {
                    let (sum, over) = a[s].overflowing_add(b[s]);
                    let want = if over || sum >= any {
                        sum.wrapping_sub(any)
                    } else {
                        sum
                    };
                    assert_eq!(got[s], want & mask(n), "add_mod formula n={n} N={any}");
                }

                let control = slice(&values(&mut rng, 1), 1);
                select(d, &control[0], &ra, &rb, &mut rows).unwrap();
                let (got, on) = (unslice(&rows), flags(&control[0]));
                for s in 0..STATES {
                    assert_eq!(got[s], if on[s] { a[s] } else { b[s] }, "select n={n}");
                }

                for m in [modulus, any, 0] {
                    increment_mod(d, &ra, m, &mut rows).unwrap();
                    let got = unslice(&rows);
                    for s in 0..STATES {
                        let want = if a[s] < m {
                            ((a[s] + 1) % m) & mask(n)
                        } else {
                            a[s]
                        };
                        assert_eq!(got[s], want, "increment_mod n={n} N={m} a={}", a[s]);
                    }
                }
            }
        }
    }

    #[test]
    fn small_sums_match_worked_examples() {
        // Worked by hand, common practice: 3 + 6 = 9 = 1001b, so a 3-bit adder gives
        // 001 with carry 1; 6 - 3 = 3 without borrow; 3 - 6 = -3 = 101b with borrow.
        let d = Dispatch::best();
        let a = [[0b1u64], [0b1], [0b0]]; // state 0: a = 3
        let b = [[0b0u64], [0b1], [0b1]]; // state 0: b = 6
        let mut s = [[0u64]; 3];
        let mut c = [0u64];
        add(d, &a, &b, &mut s, &mut c).unwrap();
        assert_eq!((s.map(|r| r[0] & 1), c[0] & 1), ([1, 0, 0], 1));
        subtract(d, &b, &a, &mut s, &mut c).unwrap();
        assert_eq!((s.map(|r| r[0] & 1), c[0] & 1), ([1, 1, 0], 0));
        subtract(d, &a, &b, &mut s, &mut c).unwrap();
        assert_eq!((s.map(|r| r[0] & 1), c[0] & 1), ([1, 0, 1], 1));
    }

    #[test]
    fn mismatched_registers_are_refused() {
        let d = Dispatch::best();
        let a = [[0u64; 4]; 3];
        let b = [[0u64; 4]; 2];
        let mut s = [[0u64; 4]; 3];
        let mut c = [0u64; 4];
        assert_eq!(
            add(d, &a, &b, &mut s, &mut c),
            Err(RippleError {
                register: "b",
                rows: 2,
                expected: 3
            })
        );
        let mut short = [[0u64; 4]; 1];
        assert_eq!(
            increment_mod(d, &a, 5, &mut short),
            Err(RippleError {
                register: "out",
                rows: 1,
                expected: 3
            })
        );
    }
}
