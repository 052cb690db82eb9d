//! `weight`: `y ^= popcount(a)`, `y[bits(n)]`.
//!
//! Construction: an adder tree of full and half adders over the bits of `a`,
//! level by level (each level holds bits of weight `2^k`): three bits of one
//! level become their sum in place (two CNOTs) and their carry in a clean
//! ancilla (one Toffoli, the majority); two bits become their XOR and their
//! AND. When every level holds one bit they are the binary popcount, copied
//! into `y`, and the tree is undone. The tree takes exactly `n - popcount(n)`
//! Toffolis to compute, the count usually cited for Hamming weight with
//! measured uncompute (e.g. Gidney's and others' resource counts; memory);
//! with the Toffoli uncompute used here the total is `2(n - popcount(n))`.
//! Under a control only the copies into `y` take it (`bits(n)` Toffolis).

use super::{Bit, Builder};
use crate::circuit::{Gate, Line};
use std::collections::VecDeque;

/// `y ^= popcount(a)` under `ctrl`.
pub(super) fn weight(b: &mut Builder, a: &[Line], y: &[Line], ctrl: Option<Line>) {
    b.set_ctrl(None);
    let start = b.mark();
    let mut levels: Vec<VecDeque<Line>> = vec![a.iter().copied().collect()];
    let mut carries = Vec::new();
    let mut k = 0;
    while k < levels.len() {
        while levels[k].len() >= 2 {
            let x = levels[k].pop_front().expect("two bits");
            let z = levels[k].pop_front().expect("two bits");
            let c = b.ancilla();
            carries.push(c);
            if let Some(v) = levels[k].pop_front() {
                // Full adder: c = maj(x, z, v); v = x ^ z ^ v.
                b.maj_into(c, Bit::of(x), Bit::of(z), Bit::of(v), false);
                b.scaffold(Gate::cnot(x.0, v.0));
                b.scaffold(Gate::cnot(z.0, v.0));
                levels[k].push_back(v);
            } else {
                // Half adder: c = x & z; z = x ^ z.
                b.and_into(c, Bit::of(x), Bit::of(z), false);
                b.scaffold(Gate::cnot(x.0, z.0));
                levels[k].push_back(z);
            }
            if levels.len() == k + 1 {
                levels.push(VecDeque::new());
            }
            levels[k + 1].push_back(c);
        }
        k += 1;
    }
    let end = b.mark();
    b.set_ctrl(ctrl);
    for (level, &t) in levels.iter().zip(y) {
        if let Some(&l) = level.front() {
            b.effect(Gate::cnot(l.0, t.0));
        }
    }
    b.set_ctrl(None);
    b.undo(start, end);
    for &c in carries.iter().rev() {
        b.release(c);
    }
}
