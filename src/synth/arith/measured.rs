//! The arithmetic generators of the fault-tolerant constructions, by op:
//! Gidney's adder ([`super::gidney`]) for `add` and `sub` without a control
//! in `measure` mode, and unary iteration ([`super::lookup`]) for `lookup` in
//! both modes; the register comparator, controlled register adders,
//! modular addition of registers and the register multiplier by the
//! structural generators with the
//! measured adder and comparator of [`super::chain`]. Every other op keeps
//! its structural circuit, whose provable uncomputes the pipeline measures.

use super::gidney::gidney_add;
use super::lookup::unary_lookup;
use super::{arith_lines, generate, Builder};
use crate::circuit::{Circuit, Gate};
use crate::spec::{ArithOp, ArithSpec};

/// The lookup of `spec` by unary iteration, with measured uncomputes when
/// `measure` (else every uncompute a Toffoli).
pub fn lookup_of(spec: &ArithSpec, measure: bool) -> Circuit {
    let (lines, r) = arith_lines(spec);
    let mut c = Circuit::new(lines);
    unary_lookup(&mut c, r.ctrl, &r.a, &r.y, &spec.data, measure);
    c
}

/// The circuit of `spec` built with temporary ANDs and measured uncomputes,
/// when a dedicated construction exists for its op; `None` otherwise.
pub fn arithmetic_measured(spec: &ArithSpec) -> Option<Circuit> {
    let (lines, r) = arith_lines(spec);
    let plain = spec.constant.is_none() && spec.modulus.is_none();
    match spec.op {
        ArithOp::Lookup => Some(lookup_of(spec, true)),
        // Register adders only: a constant or a modulus keeps the structural form.
        ArithOp::Add if r.ctrl.is_none() && plain => {
            let mut c = Circuit::new(lines);
            gidney_add(&mut c, &r.a, &r.b, r.cout, true);
            Some(c)
        }
        ArithOp::Subtract if r.ctrl.is_none() && plain => {
            // b - a = !(!b + a)
            let mut c = Circuit::new(lines);
            for &l in &r.b {
                c.push(Gate::not(l.0));
            }
            gidney_add(&mut c, &r.a, &r.b, None, true);
            for &l in &r.b {
                c.push(Gate::not(l.0));
            }
            Some(c)
        }
        // The register comparator, the controlled register adder and
        // subtractor, and modular addition of registers: the structural
        // generators with the builder in its measure form (chain.rs).
        ArithOp::Compare if spec.constant.is_none() => Some(in_measure_form(spec)),
        ArithOp::Add | ArithOp::Subtract if plain => Some(in_measure_form(spec)),
        ArithOp::Add | ArithOp::Subtract if spec.modulus.is_some() && spec.constant.is_none() => {
            Some(in_measure_form(spec))
        }
        ArithOp::Multiply if spec.constant.is_none() && spec.modulus.is_none() => {
            Some(in_measure_form(spec))
        }
        _ => None,
    }
}

/// The structural circuit of `spec` built with the measured forms of the
/// register adder and comparator.
fn in_measure_form(spec: &ArithSpec) -> Circuit {
    let (lines, r) = arith_lines(spec);
    let mut b = Builder::new(lines, None);
    b.set_measure(true);
    // Register products stay schoolbook here: the rows are the measured
    // controlled adders the tests prove; Karatsuba's measure form is not
    // built yet (its intermediate registers are undone by Toffolis).
    let choice = super::Choice {
        karatsuba_from: Some(usize::MAX),
        ..super::Choice::default()
    };
    generate(&mut b, spec, &r, &choice);
    b.finish()
}
