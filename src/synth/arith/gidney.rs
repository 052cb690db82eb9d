//! Gidney's adder: `b = (a + b) mod 2^n` with `n - 1` Toffoli-equivalents,
//! or with a carry-out at `n` (Gidney, "Halving the cost of quantum
//! addition", Quantum 2, 74, 2018, Fig. 4).
//!
//! Each carry `c_{i+1} = maj(a_i, b_i, c_i)` goes into its own clean
//! ancilla as `c_i XOR (a_i XOR c_i)(b_i XOR c_i)`: two CNOTs from `c_i`, one
//! temporary AND of the two changed lines, one CNOT. On the way back the
//! ancilla is turned back into that AND (one CNOT) and uncomputed by
//! measurement (no Toffoli, no T), `a_i` is restored and `b_i` receives the
//! sum bit `a_i XOR b_i XOR c_i`. With a carry-out the top AND goes into one
//! more clean ancilla (a temporary AND), is copied onto `cout` and uncomputed
//! by measurement: `n` temporary ANDs, `4n` T. In `toffoli` form (`measure =
//! false`) every temporary AND and measured uncompute is a Toffoli instead
//! (`2n - 2` mod `2^n`) and the top carry one Toffoli onto `cout`.
//!
//! Qubits: `n - 1` ancillae (`n` with a carry-out). Gates: linear in `n`.

use crate::circuit::{Circuit, Control, Gate, Line};

fn positive(line: Line) -> Control {
    Control {
        line,
        positive: true,
    }
}

/// `t ^= a & b`: a temporary AND when `measure`, else a Toffoli.
fn and(a: Line, b: Line, t: Line, measure: bool) -> Gate {
    let (a, b) = (positive(a), positive(b));
    if measure {
        Gate::temporary_and(a, b, t)
    } else {
        Gate::new(vec![a, b], t)
    }
    .expect("distinct lines")
}

/// Undoes [`and`]: a measured uncompute when `measure`, else a Toffoli.
fn unand(a: Line, b: Line, t: Line, measure: bool) -> Gate {
    let (a, b) = (positive(a), positive(b));
    if measure {
        Gate::measured(a, b, t)
    } else {
        Gate::new(vec![a, b], t)
    }
    .expect("distinct lines")
}

/// Appends `b = (a + b) mod 2^n` (and `cout ^= carry` when given) to `c`,
/// with `a` and `b` of equal width `n >= 1`, adding `n - 1` ancillae (and one
/// for the carry-out in `measure` form).
pub fn gidney_add(c: &mut Circuit, a: &[Line], b: &[Line], cout: Option<Line>, measure: bool) {
    let n = a.len();
    assert_eq!(n, b.len(), "registers of one width");
    if n == 0 {
        return;
    }
    let cx = |c: &mut Circuit, s: Line, t: Line| c.push(Gate::cnot(s.0, t.0));
    // t[i] holds the carry into bit i + 1.
    let t: Vec<Line> = (0..n - 1).map(|_| c.add_ancilla()).collect();
    for i in 0..n - 1 {
        if i == 0 {
            c.push(and(a[0], b[0], t[0], measure));
        } else {
            let carry = t[i - 1];
            cx(c, carry, a[i]);
            cx(c, carry, b[i]);
            c.push(and(a[i], b[i], t[i], measure));
            cx(c, carry, t[i]);
        }
    }
    let top = n - 1;
    let carry = top.checked_sub(1).map(|k| t[k]);
    if let Some(co) = cout {
        if let Some(k) = carry {
            cx(c, k, a[top]);
            cx(c, k, b[top]);
        }
        if measure {
            // The top carry's AND into a clean ancilla (4 T), copied out and
            // uncomputed at once: n temporary ANDs in all, 4n T.
            let x = c.add_ancilla();
            c.push(and(a[top], b[top], x, true));
            cx(c, x, co);
            c.push(unand(a[top], b[top], x, true));
        } else {
            c.push(Gate::toffoli(a[top].0, b[top].0, co.0));
        }
        if let Some(k) = carry {
            cx(c, k, co);
            cx(c, k, a[top]);
        }
    } else if let Some(k) = carry {
        cx(c, k, b[top]);
    }
    cx(c, a[top], b[top]);
    for i in (0..n - 1).rev() {
        if i > 0 {
            cx(c, t[i - 1], t[i]);
        }
        c.push(unand(a[i], b[i], t[i], measure));
        if i > 0 {
            cx(c, t[i - 1], a[i]);
        }
        cx(c, a[i], b[i]);
    }
}
