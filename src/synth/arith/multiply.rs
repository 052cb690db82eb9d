//! `multiply`: `p ^= a * b`, `p ^= a * c`, and in place `x -> c * x mod N`.
//!
//! - **Register by register** (schoolbook, the construction Gidney's
//!   "Asymptotically efficient quantum Karatsuba multiplication", 2019,
//!   takes as its baseline with `O(n^2)` Toffolis): the product is
//!   accumulated in a clean `2n`-bit register `t` by one controlled adder
//!   per bit of `a` (row 0 is `n` ANDs), copied into `p` by CNOTs, and `t`
//!   is uncomputed by running the accumulation backwards, so `p ^= a * b` for
//!   any `p`. Each controlled row is the carry chain of [`super::add_in_place`]
//!   with controlled effects, `3n + O(1)` Toffolis, so the whole is about
//!   `2 * 3n^2 = 6n^2` (measured; the `p ^=` form doubles the `p +=` cost).
//!   In the builder's measure form each row is Gidney's controlled adder
//!   with a carry-out ([`super::chain::add`]): `2n + 1` temporary ANDs.
//! - **Karatsuba**, from [`KARATSUBA_FROM`] bits on: three half-size
//!   products per level, every intermediate register kept until the whole
//!   product is copied out and the computation undone once, so `O(n^lg 3)`
//!   Toffolis (the recursion runs once forward and once back, not twice per
//!   level as a naive reversible Karatsuba would) and `O(n^lg 3)` ancillae.
//!   Gidney, "Asymptotically efficient quantum Karatsuba multiplication"
//!   (2019), keeps the same gate complexity in `O(n)` space by adding the
//!   recursive results straight into the output register; that is not done
//!   here. Measured: 5,486 Toffolis at 32 bits against schoolbook's 6,140,
//!   5.16e6 at 2048 against 25.2e6, with 287,484 qubits against 14,336.
//! - **By a constant**: one in-place adder of `a` per set bit of `c`
//!   beyond the lowest (which is a copy), each over the `n + 1` bits the
//!   partial product can reach; about `2n` Toffolis per added bit, `4n`
//!   with the uncompute (`4n(n - 1)` for a constant of `n` set bits, measured).
//! - **Modular by a constant** (Vedral, Barenco, Ekert 1996; Beauregard
//!   2003's in-place structure, memory): `t = sum x_i (c 2^i mod N)` by
//!   controlled constant modular adders, swap `x` and `t`, then
//!   `t -= sum x_i (c^-1 2^i mod N)`, which clears `t` because
//!   `c^-1 * (c x) = x`. `gcd(c, N) = 1` is required for `c^-1`. Two `n`-long
//!   chains of controlled modular adders: about `16n^2` Toffolis (measured:
//!   924 at n = 8, 16,116 at n = 32), against the `O(n^2)` of the published
//!   constructions.

use super::build::Mark;
use super::modular::add_const_mod;
use super::{add_in_place, Bit, Builder};
use crate::circuit::{Gate, Line};
use crate::spec::{inverse_mod, BigUint};
use num_traits::{One, Zero};

/// Below this width `multiply` of two registers is schoolbook, from it on
/// Karatsuba (the Toffoli counts cross between 16 and 32 bits; see
/// BENCHMARKS.md).
pub const KARATSUBA_FROM: usize = 32;

/// `p ^= a * b` (`p` has `2n` bits); Karatsuba from width `karatsuba_from` on.
pub(super) fn multiply(
    b: &mut Builder,
    a: &[Line],
    bb: &[Line],
    p: &[Line],
    ctrl: Option<Line>,
    karatsuba_from: usize,
) {
    b.set_ctrl(None);
    let start = b.mark();
    let mut held = Vec::new();
    let t = product(b, a, bb, karatsuba_from.max(4), &mut held);
    let end = b.mark();
    b.set_ctrl(ctrl);
    for (&s, &d) in t.iter().zip(p) {
        b.effect(Gate::cnot(s.0, d.0));
    }
    b.set_ctrl(None);
    b.undo(start, end);
    for &l in held.iter().rev() {
        b.release(l);
    }
}

/// A clean `2n`-bit register set to `a * b` (`a`, `b` of `n` bits each): the
/// rows of the schoolbook method, one controlled adder per bit of `a`.
fn schoolbook(b: &mut Builder, a: &[Line], bb: &[Line], held: &mut Vec<Line>) -> Vec<Line> {
    let w = a.len();
    let t: Vec<Line> = (0..2 * w).map(|_| b.ancilla()).collect();
    held.extend_from_slice(&t);
    for j in 0..w {
        b.and_into(t[j], Bit::of(a[0]), Bit::of(bb[j]), true);
    }
    let q: Vec<Bit> = bb.iter().map(|&l| Bit::of(l)).collect();
    for i in 1..w {
        if b.measure() {
            // Gidney's controlled adder (chain.rs): 2n + 1 temporary ANDs a row.
            super::chain::add(b, bb, &t[i..i + w], Some(t[i + w]), Some(a[i]));
            continue;
        }
        b.set_ctrl(Some(a[i]));
        add_in_place(b, &t[i..i + w], &q, Some(t[i + w]));
    }
    b.set_ctrl(None);
    t
}

/// A register holding `a * b`, computed by Karatsuba's recursion from width
/// `from` on (schoolbook below), every intermediate register kept in `held`
/// (the caller undoes the whole computation after copying the product out).
///
/// With `a = a1 2^h + a0`, `b = b1 2^h + b0` (`h = n / 2`): `z0 = a0 b0`
/// and `z2 = a1 b1` go straight into the low and high halves of a clean
/// `2n`-bit register `r`, `z1 = (a0 + a1)(b0 + b1)` into its own register,
/// and `r[h..] += z1 - z0 - z2` (a copy of `z0` and `z2` is kept for that).
/// Three half-size products and `O(n)` additions per level: `O(n^log2(3))`
/// Toffolis, and as many ancillae, as nothing is uncomputed until the end
/// (Gidney's "Asymptotically efficient quantum Karatsuba multiplication",
/// 2019, keeps the space linear by uncomputing within the recursion; this
/// is the plain Bennett form of the same recursion).
fn product(
    b: &mut Builder,
    a: &[Line],
    bb: &[Line],
    from: usize,
    held: &mut Vec<Line>,
) -> Vec<Line> {
    let n = a.len();
    if n < from {
        return schoolbook(b, a, bb, held);
    }
    let h = n / 2;
    let (a0, a1) = a.split_at(h);
    let (b0, b1) = bb.split_at(h);
    let z0 = product(b, a0, b0, from, held);
    let z2 = product(b, a1, b1, from, held);
    let sa = half_sum(b, a0, a1, held);
    let sb = half_sum(b, b0, b1, held);
    let z1 = product(b, &sa, &sb, from, held);
    let r: Vec<Line> = (0..2 * n).map(|_| b.ancilla()).collect();
    held.extend_from_slice(&r);
    for (&s, &d) in z0.iter().zip(&r[..2 * h]) {
        b.scaffold(Gate::cnot(s.0, d.0));
    }
    for (&s, &d) in z2.iter().zip(&r[2 * h..]) {
        b.scaffold(Gate::cnot(s.0, d.0));
    }
    add_into(b, &r[h..], &z1, false);
    add_into(b, &r[h..], &z0, true);
    add_into(b, &r[h..], &z2, true);
    r
}

/// A clean register of `len(hi) + 1` bits set to `lo + hi` (`lo` no longer
/// than `hi`).
fn half_sum(b: &mut Builder, lo: &[Line], hi: &[Line], held: &mut Vec<Line>) -> Vec<Line> {
    let s: Vec<Line> = (0..=hi.len()).map(|_| b.ancilla()).collect();
    held.extend_from_slice(&s);
    for (&x, &d) in hi.iter().zip(&s) {
        b.scaffold(Gate::cnot(x.0, d.0));
    }
    add_into(b, &s, lo, false);
    s
}

/// `target += src` (or `-=`, with `subtract`) mod `2^len(target)`; `src`
/// is padded with zeros or cut to the target's length.
fn add_into(b: &mut Builder, target: &[Line], src: &[Line], subtract: bool) {
    let q: Vec<Bit> = (0..target.len())
        .map(|i| src.get(i).map_or(Bit::Zero, |&l| Bit::of(l)))
        .collect();
    // t - s = !(!t + s).
    if subtract {
        for &l in target {
            b.scaffold(Gate::not(l.0));
        }
    }
    add_in_place(b, target, &q, None);
    if subtract {
        for &l in target {
            b.scaffold(Gate::not(l.0));
        }
    }
}

/// `p ^= a * c` (`p` has `n + bits(c)` bits).
pub(super) fn multiply_const(
    b: &mut Builder,
    a: &[Line],
    c: &BigUint,
    p: &[Line],
    ctrl: Option<Line>,
) {
    let w = a.len();
    let m = p.len();
    let t: Vec<Line> = (0..m).map(|_| b.ancilla()).collect();
    let start = b.mark();
    b.set_ctrl(None);
    let mut first = true;
    for j in 0..c.bits() as usize {
        if !c.bit(j as u64) {
            continue;
        }
        if first {
            for i in 0..w {
                b.scaffold(Gate::cnot(a[i].0, t[j + i].0));
            }
            first = false;
            continue;
        }
        // Before this row the sum is below 2^(n + j); after, below 2^(n + j + 1).
        let len = (w + 1).min(m - j);
        let q: Vec<Bit> = (0..len)
            .map(|i| if i < w { Bit::of(a[i]) } else { Bit::Zero })
            .collect();
        add_in_place(b, &t[j..j + len], &q, None);
    }
    copy_out(b, start, &t, p, ctrl);
}

/// `p ^= t` under `ctrl`, then undoes the gates since `start` (which built `t`)
/// and frees `t`.
fn copy_out(b: &mut Builder, start: Mark, t: &[Line], p: &[Line], ctrl: Option<Line>) {
    let end = b.mark();
    b.set_ctrl(ctrl);
    for (&s, &d) in t.iter().zip(p) {
        b.effect(Gate::cnot(s.0, d.0));
    }
    b.set_ctrl(None);
    b.undo(start, end);
    for &l in t.iter().rev() {
        b.release(l);
    }
}

/// `x -> c * x mod n` in place for `x < n`, `gcd(c, n) = 1`, under `ctrl`.
pub(super) fn multiply_mod_in_place(
    b: &mut Builder,
    x: &[Line],
    c: &BigUint,
    n: &BigUint,
    ctrl: Option<Line>,
) {
    let c = c % n;
    if c.is_one() {
        return;
    }
    let inv = inverse_mod(&c, n).expect("the spec reader requires gcd(c, N) = 1");
    let w = x.len();
    let t: Vec<Line> = (0..w).map(|_| b.ancilla()).collect();
    // t = c * x mod n.
    for (i, &xi) in x.iter().enumerate() {
        let k = (&c << i) % n;
        controlled_add(b, &t, &k, n, xi, ctrl);
    }
    // Swap x and t.
    for (&xi, &ti) in x.iter().zip(&t) {
        b.scaffold(Gate::cnot(ti.0, xi.0));
        match ctrl {
            None => b.scaffold(Gate::cnot(xi.0, ti.0)),
            Some(cl) => b.scaffold(Gate::toffoli(cl.0, xi.0, ti.0)),
        }
        b.scaffold(Gate::cnot(ti.0, xi.0));
    }
    // t -= c^-1 * (c x) = x, which leaves 0.
    for (i, &xi) in x.iter().enumerate() {
        let k = (n - (&inv << i) % n) % n;
        controlled_add(b, &t, &k, n, xi, ctrl);
    }
    for &l in t.iter().rev() {
        b.release(l);
    }
}

/// `t -> (t + k) mod n` where `xi` (and `ctrl`, if any) are 1.
fn controlled_add(
    b: &mut Builder,
    t: &[Line],
    k: &BigUint,
    n: &BigUint,
    xi: Line,
    ctrl: Option<Line>,
) {
    if k.is_zero() {
        return;
    }
    match ctrl {
        None => add_const_mod(b, t, k, n, Some(xi)),
        Some(cl) => {
            let z = b.ancilla();
            b.and_into(z, Bit::of(cl), Bit::of(xi), false);
            add_const_mod(b, t, k, n, Some(z));
            b.and_into(z, Bit::of(cl), Bit::of(xi), false);
            b.release(z);
        }
    }
}
