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

/// `p ^= a * b` (`p` has `2n` bits).
pub(super) fn multiply(b: &mut Builder, a: &[Line], bb: &[Line], p: &[Line], ctrl: Option<Line>) {
    let w = a.len();
    let t: Vec<Line> = (0..2 * w).map(|_| b.ancilla()).collect();
    let start = b.mark();
    b.set_ctrl(None);
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
    copy_out(b, start, &t, p, ctrl);
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
