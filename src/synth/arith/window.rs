//! Windowed modular exponentiation: `e, x -> e, x * c^e mod N` with table
//! lookups in place of controlled additions (Gidney, "Windowed quantum
//! arithmetic", arXiv:1905.07682, 2019; Gidney and Ekerå, "How to factor
//! 2048 bit RSA integers in 8 hours using 20 million noisy qubits",
//! Quantum 5, 433, 2021, Sec. 2).
//!
//! The exponent is cut into windows of `we` bits. For the window of bits
//! `i0 .. i0 + we` with value `v`, the multiplier is `K(v) = c^(v 2^i0) mod
//! N`, and the in-place multiplication `x -> K(v) x` is the usual pair of
//! multiply-adds into a clean register `t`, each cut into windows of `wm`
//! bits of its factor:
//!
//! 1. `t += K(v) x mod N`: for the factor window `x[j wm ..]` of value `u`,
//!    look up `T[v, u] = K(v) u 2^(j wm) mod N` into a clean register `y`
//!    (address: the `wm` factor bits and the `we` exponent bits, one table
//!    of `2^(we + wm)` words), add `y` into `t` mod N, and look `T` up again
//!    to clear `y`. The first window is looked up straight into `t`, which
//!    is still 0.
//! 2. `x -= K(v)^-1 t mod N`, the same with `t` as the factor and the words
//!    `-K(v)^-1 u 2^(j wm) mod N`: as `t = K(v) x`, this leaves `x = 0`.
//! 3. Swap `x` and `t` (under the op's control: one Toffoli per bit; the
//!    lookups take the control too, so that nothing happens without it).
//!
//! Per exponent window that is `2 ceil(n / wm) - 1` modular additions of
//! registers instead of the `2 n we` controlled constant modular additions of
//! one multiplication per exponent bit ([`super::power`]). Lookups are
//! unary iteration ([`super::lookup`], here with every uncompute a Toffoli:
//! `2(L - 2)` for `L` words without a control, `2(L - 1)` with one) and
//! unlookups repeat the lookup; the modular adder is the one of `op = "add",
//! modulus = N` (`8n + O(1)`, [`super::add_mod`]).
//!
//! Gidney and Ekerå count `2 n n_e / (we wm)` lookup additions (their
//! eq. 1, up to the runway term) of `2n + 2^(we + wm)` Toffolis each (their
//! adder in a coset representation with measured uncompute, and a measured
//! unlookup of negligible cost; recalled from memory). The differences here:
//! the modular adder costs about `8n` (a comparison-based modular adder with
//! Toffoli uncomputes, no coset representation), the lookup `2(L - 2)` (no
//! measured uncompute) and the unlookup as much again (no measurement-based
//! unlookup): `BENCHMARKS.md` has the figures at 2048 bits.

use super::{add_mod, Bit, Builder};
use crate::circuit::{Gate, Line};
use crate::spec::{inverse_mod, BigUint};
use num_traits::{One, Zero};

/// `y ^= data[addr]` (when `ctrl` is 1, if given) by unary iteration, every
/// uncompute a Toffoli; `data` has `2^addr.len()` words (bit `i` of the index
/// is `addr[i]`). All gates are scaffold gates.
pub(super) fn lookup(
    b: &mut Builder,
    ctrl: Option<Line>,
    addr: &[Line],
    y: &[Line],
    data: &[BigUint],
) {
    debug_assert_eq!(data.len(), 1 << addr.len());
    // prefix[i]: the number of nonzero words before i, for the zero-subtree test.
    let mut prefix = Vec::with_capacity(data.len() + 1);
    prefix.push(0u32);
    for w in data {
        let last = *prefix.last().expect("starts with 0");
        prefix.push(last + u32::from(!w.is_zero()));
    }
    let mut walk = Walk {
        addr,
        y,
        data,
        prefix,
        level: vec![None; addr.len()],
    };
    walk.node(b, ctrl.map(Bit::of), addr.len(), 0);
    for l in walk.level.into_iter().flatten().rev() {
        b.release(l);
    }
}

struct Walk<'a> {
    addr: &'a [Line],
    y: &'a [Line],
    data: &'a [BigUint],
    prefix: Vec<u32>,
    level: Vec<Option<Line>>,
}

impl Walk<'_> {
    fn any(&self, lo: usize, hi: usize) -> bool {
        self.prefix[hi] > self.prefix[lo]
    }

    /// The words `lo .. lo + 2^bits` with `p` holding "control and the
    /// address bits so far match" (`None`: always, the uncontrolled root).
    fn node(&mut self, b: &mut Builder, p: Option<Bit>, bits: usize, lo: usize) {
        if bits == 0 {
            b.xor_word(p.unwrap_or(Bit::One), self.y, &self.data[lo]);
            return;
        }
        let j = bits - 1;
        let mid = lo + (1 << j);
        let (left, right) = (self.any(lo, mid), self.any(mid, mid + (1 << j)));
        let a = self.addr[j];
        let Some(p) = p else {
            if left {
                self.node(b, Some(Bit::of(a).not()), j, lo);
            }
            if right {
                self.node(b, Some(Bit::of(a)), j, mid);
            }
            return;
        };
        if !left && !right {
            return;
        }
        let q = match self.level[j] {
            Some(q) => q,
            None => {
                let q = b.ancilla();
                self.level[j] = Some(q);
                q
            }
        };
        let here = Some(Bit::of(q));
        if left {
            b.and_into(q, p, Bit::of(a).not(), false);
            self.node(b, here, j, lo);
            if right {
                // p & !a ^ p = p & a.
                b.xor_into(q, p, false);
                self.node(b, here, j, mid);
                b.and_into(q, p, Bit::of(a), false);
            } else {
                b.and_into(q, p, Bit::of(a).not(), false);
            }
        } else {
            b.and_into(q, p, Bit::of(a), false);
            self.node(b, here, j, mid);
            b.and_into(q, p, Bit::of(a), false);
        }
    }
}

/// `(2 * v) mod n` for `v < n`.
fn double_mod(v: &mut BigUint, n: &BigUint) {
    *v <<= 1u32;
    if &*v >= n {
        *v -= n;
    }
}

/// The words `u * base mod n` for `u` in `0 .. 2^lm`, written at
/// `words[offset ..]`.
fn multiples(words: &mut [BigUint], base: &BigUint, n: &BigUint) {
    let mut acc = BigUint::zero();
    for w in words.iter_mut() {
        w.clone_from(&acc);
        acc += base;
        if &acc >= n {
            acc -= n;
        }
    }
}

/// `target = (target + sum_j T_j[v, factor window j]) mod n`, the words of
/// window `j` being `u * bases[v] * 2^(j wm) mod n`. With `direct`, the first
/// window is looked up straight into `target` (which must be 0).
#[allow(clippy::too_many_arguments)]
fn multiply_add(
    b: &mut Builder,
    ew: &[Line],
    factor: &[Line],
    target: &[Line],
    y: &[Line],
    bases: &[BigUint],
    n: &BigUint,
    wm: usize,
    ctrl: Option<Line>,
    direct: bool,
    adder: &mut Option<(super::build::Mark, super::build::Mark)>,
) {
    let w = factor.len();
    let mut scaled: Vec<BigUint> = bases.to_vec();
    let mut words: Vec<BigUint> = Vec::new();
    let mut start = 0;
    while start < w {
        let lm = wm.min(w - start);
        let mut addr: Vec<Line> = factor[start..start + lm].to_vec();
        addr.extend_from_slice(ew);
        words.resize(1 << addr.len(), BigUint::zero());
        for (v, base) in scaled.iter().enumerate() {
            multiples(&mut words[v << lm..(v + 1) << lm], base, n);
        }
        if direct && start == 0 {
            lookup(b, ctrl, &addr, target, &words);
        } else {
            let s = b.mark();
            lookup(b, ctrl, &addr, y, &words);
            let e = b.mark();
            match adder {
                // The modular adder's gates depend only on n and the width.
                Some((a0, a1)) if b.is_counting() => b.repeat_count(*a0, *a1),
                _ => {
                    let a0 = b.mark();
                    add_mod(b, y, target, n, None);
                    *adder = Some((a0, b.mark()));
                }
            }
            b.undo(s, e);
        }
        for base in scaled.iter_mut() {
            for _ in 0..lm {
                double_mod(base, n);
            }
        }
        start += lm;
    }
}

/// `x -> x * c^e mod n` under `ctrl`, windows of `we` exponent bits and `wm`
/// factor bits.
#[allow(clippy::too_many_arguments)]
pub(super) fn power_windowed(
    b: &mut Builder,
    e: &[Line],
    x: &[Line],
    c: &BigUint,
    n: &BigUint,
    ctrl: Option<Line>,
    we: usize,
    wm: usize,
) {
    // Bits from the first i with c^(2^i) = 1 mod n on multiply by 1: the
    // windows cover only the bits before it.
    let e = &e[..effective_bits(c, n, e.len())];
    let w = x.len();
    let t: Vec<Line> = (0..w).map(|_| b.ancilla()).collect();
    let y: Vec<Line> = (0..w).map(|_| b.ancilla()).collect();
    let mut adder = None;
    // c^(2^i0) mod n for the window starting at exponent bit i0.
    let mut step = c % n;
    let mut i0 = 0;
    while i0 < e.len() {
        let le = we.min(e.len() - i0);
        let ew = &e[i0..i0 + le];
        let mut ks = Vec::with_capacity(1 << le);
        ks.push(BigUint::one() % n);
        for v in 1..1usize << le {
            let k = &ks[v - 1] * &step % n;
            ks.push(k);
        }
        for _ in 0..le {
            step = &step * &step % n;
        }
        i0 += le;
        let inv: Vec<BigUint> = ks
            .iter()
            .map(|k| {
                let i = inverse_mod(k, n).expect("the spec reader requires gcd(c, N) = 1");
                (n - i) % n
            })
            .collect();
        multiply_add(b, ew, x, &t, &y, &ks, n, wm, ctrl, true, &mut adder);
        multiply_add(b, ew, &t, x, &y, &inv, n, wm, ctrl, false, &mut adder);
        for (&xi, &ti) in x.iter().zip(&t) {
            b.scaffold(Gate::cnot(ti.0, xi.0));
            match ctrl {
                None => b.scaffold(Gate::cnot(xi.0, ti.0)),
                Some(cl) => b.scaffold(Gate::toffoli(cl.0, xi.0, ti.0)),
            }
            b.scaffold(Gate::cnot(ti.0, xi.0));
        }
    }
    for &l in y.iter().rev().chain(t.iter().rev()) {
        b.release(l);
    }
}

/// The exponent bits before the first `i` with `c^(2^i) = 1 mod n` (at most
/// `bits`): every later bit multiplies by 1.
pub(super) fn effective_bits(c: &BigUint, n: &BigUint, bits: usize) -> usize {
    let mut k = c % n;
    for i in 0..bits {
        if k.is_one() {
            return i;
        }
        k = &k * &k % n;
    }
    bits
}

/// Toffolis of one unary-iteration lookup of `2^bits` words, every uncompute
/// a Toffoli (at most; subtrees of zero words are skipped).
fn lookup_toffolis(bits: usize, controlled: bool) -> u64 {
    let l = 1u64 << bits;
    if controlled {
        2 * (l - 1)
    } else {
        2 * l.saturating_sub(2)
    }
}

/// The cost model of the windowed construction: its Toffoli count for
/// windows `(we, wm)`, from the modular adder's count `adder` (exact for the
/// lookups at most, as subtrees of zero words are skipped).
pub(super) fn windowed_estimate(
    w: usize,
    exponent_bits: usize,
    controlled: bool,
    we: usize,
    wm: usize,
    adder: u64,
) -> u64 {
    let mut total = 0u64;
    let mut i0 = 0;
    while i0 < exponent_bits {
        let le = we.min(exponent_bits - i0);
        let mut start = 0;
        let mut first = true;
        while start < w {
            let lm = wm.min(w - start);
            let lk = lookup_toffolis(le + lm, controlled);
            // Multiply-add into t (the first window straight in), then out of t.
            total += if first { lk } else { 2 * lk + adder };
            total += 2 * lk + adder;
            first = false;
            start += lm;
        }
        if controlled {
            total += w as u64;
        }
        i0 += le;
    }
    total
}
