//! `compare`: `y ^= (a relation b)` or `y ^= (a relation c)`, every relation.
//!
//! Construction. `a < b` is the carry-out of `!a + b` on an in-place MAJ
//! chain (Cuccaro, Draper, Kutin, Moulton, quant-ph/0410184, 2004), undone
//! after: `2n - 1` Toffolis, one clean ancilla. The other orders turn it
//! around: `a > b` is `b < a`, `a >= b` is `!(a < b)`, `a <= b` is `!(b < a)`
//! (one NOT on `y`). Against a constant the carry chain folds every majority
//! into an AND, an OR or a copy (the constant-comparator form of Gidney's
//! carry chain, arXiv:1709.06648, 2018, uncomputed by Toffolis): at most
//! `2(n - 1) + 1` Toffolis, fewer below the lowest set bit of the constant;
//! `a <= c` is `a < c + 1`. Equality is one multi-controlled NOT (against a
//! register, after `b ^= a`, undone), which lowering turns into `2n - 3`
//! Toffolis with `n - 2` clean ancillae (the standard AND ladder, common
//! practice). With `[oracle] form = "phase"` the pipeline wraps `y` in the
//! minus state; the circuit is the same.

use super::{equal_gate, less_than, less_than_const, Builder, Registers};
use crate::circuit::{Control, Gate, Line};
use crate::spec::{ArithSpec, BigUint, Relation};

/// The comparison of `spec` on the registers `r`.
pub(super) fn compare(b: &mut Builder, spec: &ArithSpec, r: &Registers) {
    let rel = spec.relation.expect("compare has a relation");
    let y = r.y[0];
    let w = r.a.len();
    b.set_ctrl(r.ctrl);
    let flip = |b: &mut Builder| b.effect(Gate::not(y.0));
    match &spec.constant {
        None => {
            let (a, bb) = (&r.a, &r.b);
            match rel {
                Relation::Less => less_than(b, a, bb, y),
                Relation::Greater => less_than(b, bb, a, y),
                Relation::GreaterEq => {
                    less_than(b, a, bb, y);
                    flip(b);
                }
                Relation::LessEq => {
                    less_than(b, bb, a, y);
                    flip(b);
                }
                Relation::Equal => equal_registers(b, a, bb, y),
                Relation::NotEqual => {
                    equal_registers(b, a, bb, y);
                    flip(b);
                }
            }
        }
        Some(k) => {
            let next = k + 1u32;
            // c + 1 = 2^n: every value is at most c.
            let all = next == BigUint::from(1u32) << w;
            match rel {
                Relation::Less => less_than_const(b, &r.a, k, y),
                Relation::GreaterEq => {
                    less_than_const(b, &r.a, k, y);
                    flip(b);
                }
                Relation::LessEq if all => flip(b),
                Relation::LessEq => less_than_const(b, &r.a, &next, y),
                Relation::Greater if all => {}
                Relation::Greater => {
                    less_than_const(b, &r.a, &next, y);
                    flip(b);
                }
                Relation::Equal => b.effect(equal_gate(&r.a, k, y)),
                Relation::NotEqual => {
                    b.effect(equal_gate(&r.a, k, y));
                    flip(b);
                }
            }
        }
    }
    b.set_ctrl(None);
}

/// `y ^= (a == b)`: `b ^= a`, one NOT controlled on every `b` bit being 0, undo.
fn equal_registers(b: &mut Builder, a: &[Line], bb: &[Line], y: Line) {
    for (&x, &z) in a.iter().zip(bb) {
        b.scaffold(Gate::cnot(x.0, z.0));
    }
    let controls = bb
        .iter()
        .map(|&l| Control {
            line: l,
            positive: false,
        })
        .collect();
    b.effect(Gate::new(controls, y).expect("y is its own register"));
    for (&x, &z) in a.iter().zip(bb) {
        b.scaffold(Gate::cnot(x.0, z.0));
    }
}
