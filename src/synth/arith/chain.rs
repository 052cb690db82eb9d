//! The measured forms of the register adder and comparator inside the
//! [`Builder`] (`--uncompute measure`), so that every generator that adds or
//! compares registers (controlled adders, comparators, modular addition)
//! pays temporary ANDs of 4 T and uncomputes them by measurement.
//!
//! - **Adder** `s += a` (mod `2^n`, `cout ^= carry` when given): Gidney's
//!   carry chain ("Halving the cost of quantum addition", Quantum 2, 74,
//!   2018, Fig. 4; the same chain as [`super::gidney`]): each carry
//!   `c_{i+1} = c_i XOR (a_i XOR c_i)(s_i XOR c_i)` into its own clean
//!   ancilla by one temporary AND, uncomputed by measurement: `n - 1`
//!   Toffoli-equivalents, `n` with a carry-out.
//! - **Controlled adder** `s += ctrl * a`: the carries of `a + s` are
//!   computed as above whatever `ctrl` holds, and on the way back each sum
//!   bit takes `s_i ^= ctrl AND (a_i XOR c_i)` by one more temporary AND into
//!   a clean ancilla, copied onto `s_i` and measured away: `2n - 1`
//!   Toffoli-equivalents, T-count `8n - 4` (Gidney 2018 gives a controlled
//!   adder of T-count `8n + O(1)`), `n` ancillae; a carry-out adds two ANDs.
//! - **Comparator** `y ^= (a < b)`: the carry-out of `!a + b` by the same
//!   chain, every carry a temporary AND, copied onto `y` and the chain
//!   measured away: `n` Toffoli-equivalents (the adder's count with a
//!   carry-out), T-count `4n`, against `2n - 1` Toffolis of the in-place
//!   MAJ chain; a control on the op adds one AND.

use super::Builder;
use crate::circuit::{Control, Gate, Line};

fn and(b: &mut Builder, x: Line, y: Line, t: Line) {
    b.scaffold(
        Gate::temporary_and(Control::pos(x.0), Control::pos(y.0), t).expect("distinct lines"),
    );
}

fn unand(b: &mut Builder, x: Line, y: Line, t: Line) {
    b.scaffold(Gate::measured(Control::pos(x.0), Control::pos(y.0), t).expect("distinct lines"));
}

fn cx(b: &mut Builder, s: Line, t: Line) {
    b.scaffold(Gate::cnot(s.0, t.0));
}

/// `target ^= x AND y` by a temporary AND into a clean ancilla, a CNOT and
/// its measured uncompute (4 T, one Toffoli-equivalent).
fn and_onto(b: &mut Builder, x: Line, y: Line, target: Line) {
    let u = b.ancilla();
    and(b, x, y, u);
    cx(b, u, target);
    unand(b, x, y, u);
    b.release(u);
}

/// `target ^= bit`, under `ctrl` when given.
fn copy_onto(b: &mut Builder, bit: Line, target: Line, ctrl: Option<Line>) {
    match ctrl {
        Some(c) => and_onto(b, c, bit, target),
        None => cx(b, bit, target),
    }
}

/// The carries of `a + s` (equal widths `n >= 1`) into `n - 1` clean
/// ancillae: `t[i]` holds the carry into bit `i + 1`, and `a_i`, `s_i` hold
/// `a_i XOR c_i`, `s_i XOR c_i` for `0 < i < n - 1`.
fn carries(b: &mut Builder, a: &[Line], s: &[Line]) -> Vec<Line> {
    let n = a.len();
    let t: Vec<Line> = (0..n - 1).map(|_| b.ancilla()).collect();
    for i in 0..n - 1 {
        if i > 0 {
            cx(b, t[i - 1], a[i]);
            cx(b, t[i - 1], s[i]);
        }
        and(b, a[i], s[i], t[i]);
        if i > 0 {
            cx(b, t[i - 1], t[i]);
        }
    }
    t
}

/// `s += a` (mod `2^n`), `cout ^= carry-out` when given, the whole under
/// `ctrl` when given.
pub(super) fn add(b: &mut Builder, a: &[Line], s: &[Line], cout: Option<Line>, ctrl: Option<Line>) {
    let n = a.len();
    assert_eq!(n, s.len(), "registers of one width");
    if n == 0 {
        return;
    }
    let t = carries(b, a, s);
    let top = n - 1;
    let carry = top.checked_sub(1).map(|k| t[k]);
    if let Some(co) = cout {
        // c_n = c XOR (a_top XOR c)(s_top XOR c), into a clean ancilla.
        if let Some(k) = carry {
            cx(b, k, a[top]);
            cx(b, k, s[top]);
        }
        let x = b.ancilla();
        and(b, a[top], s[top], x);
        if let Some(k) = carry {
            cx(b, k, x);
        }
        copy_onto(b, x, co, ctrl);
        if let Some(k) = carry {
            cx(b, k, x);
        }
        unand(b, a[top], s[top], x);
        b.release(x);
        if let Some(k) = carry {
            cx(b, k, s[top]);
            cx(b, k, a[top]);
        }
    }
    // The top sum bit: s_top ^= a_top XOR c (under ctrl).
    match ctrl {
        None => {
            if let Some(k) = carry {
                cx(b, k, s[top]);
            }
            cx(b, a[top], s[top]);
        }
        Some(c) => {
            if let Some(k) = carry {
                cx(b, k, a[top]);
            }
            and_onto(b, c, a[top], s[top]);
            if let Some(k) = carry {
                cx(b, k, a[top]);
            }
        }
    }
    for i in (0..top).rev() {
        if i > 0 {
            cx(b, t[i - 1], t[i]);
        }
        unand(b, a[i], s[i], t[i]);
        b.release(t[i]);
        match ctrl {
            None => {
                if i > 0 {
                    cx(b, t[i - 1], a[i]);
                }
                cx(b, a[i], s[i]);
            }
            Some(c) => {
                // s_i back, then s_i ^= ctrl AND (a_i XOR c_i), then a_i back.
                if i > 0 {
                    cx(b, t[i - 1], s[i]);
                }
                and_onto(b, c, a[i], s[i]);
                if i > 0 {
                    cx(b, t[i - 1], a[i]);
                }
            }
        }
    }
}

/// `y ^= (a < bb)`, under the builder's control when it has one: the
/// carry-out of `!a + bb`.
pub(super) fn less_than(b: &mut Builder, a: &[Line], bb: &[Line], y: Line) {
    let n = a.len();
    let ctrl = b.ctrl();
    for &l in a {
        b.scaffold(Gate::not(l.0));
    }
    let t = carries(b, a, bb);
    let top = n - 1;
    let carry = top.checked_sub(1).map(|k| t[k]);
    if let Some(k) = carry {
        cx(b, k, a[top]);
        cx(b, k, bb[top]);
    }
    let x = b.ancilla();
    and(b, a[top], bb[top], x);
    if let Some(k) = carry {
        cx(b, k, x);
    }
    copy_onto(b, x, y, ctrl);
    if let Some(k) = carry {
        cx(b, k, x);
    }
    unand(b, a[top], bb[top], x);
    b.release(x);
    if let Some(k) = carry {
        cx(b, k, bb[top]);
        cx(b, k, a[top]);
    }
    for i in (0..top).rev() {
        if i > 0 {
            cx(b, t[i - 1], t[i]);
        }
        unand(b, a[i], bb[i], t[i]);
        b.release(t[i]);
        if i > 0 {
            cx(b, t[i - 1], bb[i]);
            cx(b, t[i - 1], a[i]);
        }
    }
    for &l in a {
        b.scaffold(Gate::not(l.0));
    }
}
