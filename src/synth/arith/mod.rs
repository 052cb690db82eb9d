//! Structural arithmetic generators: adders, subtractors, comparators, constant
//! arithmetic, modular increment and addition, table lookup, at any width.
//!
//! Two carry structures from the literature:
//!
//! - **MAJ/UMA ripple carry** (Cuccaro, Draper, Kutin, Moulton,
//!   quant-ph/0410184, 2004): in place, one clean ancilla. Here the top bit
//!   skips its MAJ/UMA pair (its carry is never needed), so an adder mod `2^n`
//!   costs `2n - 2` Toffolis; with a carry-out the top majority goes straight
//!   onto the carry line with one Toffoli, `2n - 1` in all. The comparator
//!   `a < b` is the carry-out of `!a + b` with the MAJ chain undone: `2n - 1`.
//! - **Carry chains into clean ancillae** (the logical-AND structure of Gidney,
//!   arXiv:1709.06648, 2018, with every AND uncomputed by a Toffoli): each carry
//!   `maj(x_i, q_i, c_i)` goes into its own ancilla with one Toffoli and comes
//!   back out with one. When the addend is a constant the majority folds to an
//!   AND, an OR or a plain copy, so constants cost no register and often no
//!   Toffoli. Controlled ops use this form: only the gates that change a
//!   register take the control.
//!
//! The generators of this file are linear in the width. Comparisons,
//! modular addition of a constant, multiplication, modular exponentiation and
//! Hamming weight live in their own files ([`compare`], [`modular`],
//! [`multiply`], [`power`], [`weight`]), each with its construction and the
//! published count it meets. The verifier checks them all.

mod build;
mod chain;
mod compare;
pub mod gidney;
pub mod lookup;
mod measured;
mod modular;
mod multiply;
mod power;
mod table;
mod weight;
mod window;

pub use multiply::KARATSUBA_FROM;
pub use power::{power_form, PowerForm};
pub use table::{arith_function, arith_images, TABLE_MAX_LINES};

pub use build::{Bit, Builder, Tally};
pub use measured::{arithmetic_measured, lookup_of};

use crate::circuit::layout::{CARRY, CONTROL, OUTPUTS};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo};
use crate::spec::{ArithOp, ArithSpec, BigUint};

/// The registers of an arithmetic circuit, as line numbers.
#[derive(Clone, Debug, Default)]
pub struct Registers {
    /// `ctrl[1]`, when the op is controlled.
    pub ctrl: Option<Line>,
    /// `a`: first operand, or the register changed in place by unary ops, or the address.
    pub a: Vec<Line>,
    /// `b`: second operand (the sum register of `add`, `sub`, `add_mod`).
    pub b: Vec<Line>,
    /// `y`: one-bit result of comparisons, or the data register of `lookup`.
    pub y: Vec<Line>,
    /// `cout[1]`: carry-out of `add`.
    pub cout: Option<Line>,
    /// `p`: the product register of `multiply`.
    pub p: Vec<Line>,
    /// `e`: the exponent of `power`.
    pub e: Vec<Line>,
    /// `x`: the register changed in place by the modular multiply and `power`.
    pub x: Vec<Line>,
}

/// The lines of `spec` in the order of its layout (`ctrl`, `a`, `b`, `y`/`cout`),
/// and where each register is.
pub fn arith_lines(spec: &ArithSpec) -> (Vec<LineInfo>, Registers) {
    let lines = spec.layout().lines();
    let find = |name: &str| -> Vec<Line> {
        (0..lines.len() as u32)
            .filter(|&i| lines[i as usize].register == name)
            .map(Line)
            .collect()
    };
    let regs = Registers {
        ctrl: find(CONTROL).first().copied(),
        a: find("a"),
        b: find("b"),
        y: find(OUTPUTS),
        cout: find(CARRY).first().copied(),
        p: find("p"),
        e: find("e"),
        x: find("x"),
    };
    (lines, regs)
}

/// Bit `i` of a constant of any width.
fn const_bit(k: &BigUint, i: usize) -> bool {
    k.bit(i as u64)
}

/// The construction of an op that has more than one, when the caller fixes
/// it (tests, benchmarks); `None` fields leave the choice to the generator.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Choice {
    /// How `power` is built (default: [`power_form`]).
    pub power: Option<PowerForm>,
    /// `multiply` of two registers: Karatsuba from this width on, schoolbook
    /// below (default [`KARATSUBA_FROM`]; values below 4 count as 4).
    pub karatsuba_from: Option<usize>,
}

/// The construction the generator uses for `spec` where an op has more
/// than one (`power`, `multiply` of two registers), in words; `None` for
/// the other ops.
pub fn construction(spec: &ArithSpec) -> Option<String> {
    match spec.op {
        ArithOp::Power => Some(match power_form(spec) {
            PowerForm::PerBit => "one controlled modular multiplication per exponent bit".into(),
            PowerForm::Windowed { exponent, factor } => format!(
                "windowed: lookups addressed by {exponent} exponent bits and {factor} factor bits"
            ),
        }),
        ArithOp::Multiply if spec.constant.is_none() => Some(if spec.width >= KARATSUBA_FROM {
            format!("Karatsuba, schoolbook below {KARATSUBA_FROM} bits")
        } else {
            "schoolbook".into()
        }),
        _ => None,
    }
}

/// Generates the circuit of MCT gates for an arithmetic spec.
pub fn arithmetic(spec: &ArithSpec) -> Circuit {
    arithmetic_with(spec, &Choice::default())
}

/// [`arithmetic`] with the constructions of `choice`.
pub fn arithmetic_with(spec: &ArithSpec, choice: &Choice) -> Circuit {
    if spec.op == ArithOp::Lookup {
        return lookup_of(spec, false);
    }
    let (lines, r) = arith_lines(spec);
    let mut b = Builder::new(lines, None);
    generate(&mut b, spec, &r, choice);
    b.finish()
}

/// Counts the gates of [`arithmetic`]'s circuit as they are generated,
/// keeping none: the tally and the lines (ancillae included, lowering's pool not).
pub fn arithmetic_tally(spec: &ArithSpec) -> (Tally, usize) {
    arithmetic_tally_with(spec, &Choice::default())
}

/// [`arithmetic_tally`] with the constructions of `choice`.
pub fn arithmetic_tally_with(spec: &ArithSpec, choice: &Choice) -> (Tally, usize) {
    if spec.op == ArithOp::Lookup {
        // At most 2^20 words (the reader's limit): built, then counted.
        let c = lookup_of(spec, false);
        let mut t = Tally::default();
        for g in c.gates() {
            t.add(g);
        }
        return (t, c.width());
    }
    let (lines, r) = arith_lines(spec);
    let mut b = Builder::counting(lines);
    generate(&mut b, spec, &r, choice);
    b.tally()
}

fn generate(b: &mut Builder, spec: &ArithSpec, r: &Registers, choice: &Choice) {
    let zero = BigUint::default();
    let k = spec.constant.as_ref().unwrap_or(&zero);
    match (spec.op, &spec.modulus) {
        (ArithOp::Add | ArithOp::Subtract, Some(n)) => {
            modular::add_or_subtract(b, spec.op, r, spec.constant.as_ref(), n)
        }
        (ArithOp::Add, None) if spec.constant.is_none() => add(b, &r.a, &r.b, r.cout, r.ctrl),
        (ArithOp::Subtract, None) if spec.constant.is_none() => {
            // b - a = !(!b + a)
            for &l in &r.b {
                b.scaffold(Gate::not(l.0));
            }
            add(b, &r.a, &r.b, None, r.ctrl);
            for &l in &r.b {
                b.scaffold(Gate::not(l.0));
            }
        }
        (ArithOp::Add | ArithOp::Subtract, None) => {
            // a - k = a + (2^w - k) mod 2^w.
            let w = spec.width;
            let k = if spec.op == ArithOp::Subtract {
                ((BigUint::from(1u32) << w) - k) % (BigUint::from(1u32) << w)
            } else {
                k.clone()
            };
            // A controlled constant is the register ctrl * k: literals of ctrl.
            let one = r.ctrl.map_or(Bit::One, Bit::of);
            let q: Vec<Bit> = (0..w)
                .map(|i| if const_bit(&k, i) { one } else { Bit::Zero })
                .collect();
            add_in_place(b, &r.a, &q, r.cout);
        }
        (ArithOp::Compare, _) => compare::compare(b, spec, r),
        (ArithOp::Multiply, Some(n)) => multiply::multiply_mod_in_place(b, &r.x, k, n, r.ctrl),
        (ArithOp::Multiply, None) => match &spec.constant {
            Some(c) => multiply::multiply_const(b, &r.a, c, &r.p, r.ctrl),
            None => multiply::multiply(
                b,
                &r.a,
                &r.b,
                &r.p,
                r.ctrl,
                choice.karatsuba_from.unwrap_or(KARATSUBA_FROM),
            ),
        },
        (ArithOp::Power, n) => power::power(
            b,
            &r.e,
            &r.x,
            k,
            n.as_ref().expect("power has a modulus"),
            r.ctrl,
            choice.power.unwrap_or_else(|| power_form(spec)),
        ),
        (ArithOp::Weight, _) => weight::weight(b, &r.a, &r.y, r.ctrl),
        (ArithOp::Lookup, _) => unreachable!("lookup is built by unary iteration"),
    }
}

/// `b += a` (mod `2^n`, carry to `cout`), Cuccaro form when uncontrolled,
/// carry chain with controlled effects otherwise; in the builder's measure
/// form, Gidney's chain of temporary ANDs ([`chain::add`]).
fn add(b: &mut Builder, a: &[Line], sum: &[Line], cout: Option<Line>, ctrl: Option<Line>) {
    if b.measure() {
        return chain::add(b, a, sum, cout, ctrl);
    }
    match ctrl {
        None => cuccaro(b, a, sum, cout),
        Some(c) => {
            b.set_ctrl(Some(c));
            let q: Vec<Bit> = a.iter().map(|&l| Bit::of(l)).collect();
            add_in_place(b, sum, &q, cout);
            b.set_ctrl(None);
        }
    }
}

fn maj(b: &mut Builder, c: Line, x: Line, a: Line) {
    b.scaffold(Gate::cnot(a.0, x.0));
    b.scaffold(Gate::cnot(a.0, c.0));
    b.scaffold(Gate::toffoli(c.0, x.0, a.0));
}

fn uma(b: &mut Builder, c: Line, x: Line, a: Line) {
    b.effect(Gate::toffoli(c.0, x.0, a.0));
    b.effect(Gate::cnot(a.0, c.0));
    b.effect(Gate::cnot(c.0, x.0));
}

/// In-place ripple-carry adder `s += a` with one clean ancilla (Cuccaro et al. 2004).
fn cuccaro(b: &mut Builder, a: &[Line], s: &[Line], cout: Option<Line>) {
    let w = a.len();
    if w == 1 {
        if let Some(co) = cout {
            b.and_into(co, Bit::of(a[0]), Bit::of(s[0]), true);
        }
        b.effect(Gate::cnot(a[0].0, s[0].0));
        return;
    }
    let c0 = b.ancilla();
    maj(b, c0, s[0], a[0]);
    for i in 1..w - 1 {
        maj(b, a[i - 1], s[i], a[i]);
    }
    // The carry into the top bit now sits on a[w - 2].
    let (p, q, r) = (a[w - 1].0, s[w - 1].0, a[w - 2].0);
    match cout {
        None => {
            b.effect(Gate::cnot(p, q));
            b.effect(Gate::cnot(r, q));
        }
        Some(co) => {
            // cout ^= maj(a, s, c) = (a ^ c)(s ^ c) ^ c; then s = a ^ s ^ c.
            b.effect(Gate::cnot(r, p));
            b.effect(Gate::cnot(r, q));
            b.effect(Gate::toffoli(p, q, co.0));
            b.effect(Gate::cnot(r, co.0));
            b.effect(Gate::cnot(p, q));
            b.effect(Gate::cnot(r, q));
            b.effect(Gate::cnot(r, p));
        }
    }
    for i in (1..w - 1).rev() {
        uma(b, a[i - 1], s[i], a[i]);
    }
    uma(b, c0, s[0], a[0]);
    b.release(c0);
}

/// `x += q` in place (mod `2^n`), `cout ^= carry`, carries in clean ancillae.
/// `q` may hold constants and literals of lines outside `x`.
fn add_in_place(b: &mut Builder, x: &[Line], q: &[Bit], cout: Option<Line>) {
    let w = x.len();
    let mut carries = vec![Bit::Zero];
    let mut temps = Vec::new();
    for i in 0..w - 1 {
        let t = b.maj_temp(Bit::of(x[i]), q[i], carries[i]);
        carries.push(t.bit);
        temps.push(t);
    }
    if let Some(co) = cout {
        b.maj_into(co, Bit::of(x[w - 1]), q[w - 1], carries[w - 1], true);
    }
    for i in (0..w).rev() {
        b.xor2_into(x[i], q[i], carries[i]);
        if i >= 1 {
            let t = temps.pop().expect("one temporary per carry");
            b.undo_temp(t);
        }
    }
}

/// `y ^= (a < b)`: the carry-out of `!a + b` on an in-place MAJ chain, undone
/// afterwards; one clean ancilla, `2n - 1` Toffolis. In the builder's measure
/// form, the chain of temporary ANDs ([`chain::less_than`]): `n`.
fn less_than(b: &mut Builder, a: &[Line], bb: &[Line], y: Line) {
    if b.measure() {
        return chain::less_than(b, a, bb, y);
    }
    let w = a.len();
    if w == 1 {
        b.and_into(y, Bit::of(a[0]).not(), Bit::of(bb[0]), true);
        return;
    }
    let start = b.mark();
    for &l in a {
        b.scaffold(Gate::not(l.0));
    }
    let c0 = b.ancilla();
    maj(b, c0, bb[0], a[0]);
    for i in 1..w - 1 {
        maj(b, a[i - 1], bb[i], a[i]);
    }
    let end = b.mark();
    b.maj_into(
        y,
        Bit::of(a[w - 1]),
        Bit::of(bb[w - 1]),
        Bit::of(a[w - 2]),
        true,
    );
    b.undo(start, end);
    b.release(c0);
}

/// `y ^= (a < k)`: the carry-out of `!a + k` by a carry chain in which the
/// constant folds every majority into an AND, an OR or a copy.
fn less_than_const(b: &mut Builder, a: &[Line], k: &BigUint, y: Line) {
    let w = a.len();
    let p: Vec<Bit> = a.iter().map(|&l| Bit::of(l).not()).collect();
    let q: Vec<Bit> = (0..w).map(|i| Bit::constant(const_bit(k, i))).collect();
    let mut carry = Bit::Zero;
    let mut temps = Vec::new();
    for i in 0..w - 1 {
        let t = b.maj_temp(p[i], q[i], carry);
        carry = t.bit;
        temps.push(t);
    }
    b.maj_into(y, p[w - 1], q[w - 1], carry, true);
    while let Some(t) = temps.pop() {
        b.undo_temp(t);
    }
}

/// One gate: `y ^= (a == k)`.
fn equal_gate(a: &[Line], k: &BigUint, y: Line) -> Gate {
    let controls = a
        .iter()
        .enumerate()
        .map(|(i, &l)| Control {
            line: l,
            positive: const_bit(k, i),
        })
        .collect();
    Gate::new(controls, y).expect("y is its own register")
}

/// `a -> (a + 1) mod n` for `a < n`, `a` unchanged otherwise.
///
/// For `n = 2^w` this is a plain increment. Otherwise: `g = [a < n]`; `a += g`;
/// `e = g & [a == n]` (the one value that wrapped); `a ^= n` under `e`, which
/// sends it to 0; `e ^= [a == 0]`; `g ^= [a < n]`, which is again the same
/// predicate because values below `n` stay below `n`.
fn increment_mod(b: &mut Builder, a: &[Line], n: &BigUint, ctrl: Option<Line>) {
    let w = a.len();
    let one = ctrl.map_or(Bit::One, Bit::of);
    if *n == BigUint::from(1u32) << w {
        let mut q = vec![Bit::Zero; w];
        q[0] = one;
        add_in_place(b, a, &q, None);
        return;
    }
    let g = b.ancilla();
    let e = b.ancilla();
    b.set_ctrl(ctrl);
    less_than_const(b, a, n, g);
    b.set_ctrl(None);
    let mut q = vec![Bit::Zero; w];
    q[0] = Bit::of(g);
    add_in_place(b, a, &q, None);
    let mut wrap = equal_gate(a, n, e).controls().to_vec();
    wrap.push(Control::pos(g.0));
    b.scaffold(Gate::new(wrap, e).expect("distinct lines"));
    for (i, &l) in a.iter().enumerate() {
        if const_bit(n, i) {
            b.scaffold(Gate::cnot(e.0, l.0));
        }
    }
    b.set_ctrl(ctrl);
    b.effect(equal_gate(a, &BigUint::default(), e));
    less_than_const(b, a, n, g);
    b.set_ctrl(None);
    b.release(e);
    b.release(g);
}

/// `b -> (a + b) mod n` for `a, b < n` (the promise; other inputs are outside
/// the op's domain).
///
/// `(h, b) += a` with the carry in a clean bit `h`; subtract `n` from the
/// `w + 1`-bit `(h, b)`; `t = h` records that the sum was below `n`; add `n`
/// back under `t` (now `h = 0`); clear `t`, which equals `[b >= a]` for the
/// result `b`.
fn add_mod(b: &mut Builder, a: &[Line], s: &[Line], n: &BigUint, ctrl: Option<Line>) {
    let w = a.len();
    let h = b.ancilla();
    let t = b.ancilla();
    add(b, a, s, Some(h), ctrl);
    let mut wide: Vec<Line> = s.to_vec();
    wide.push(h);
    // -n on the w + 1 bits of (h, b); the bits past the modulus are all 1.
    let minus_n = (BigUint::from(1u32) << (w + 1)) - n;
    let q: Vec<Bit> = (0..=w)
        .map(|i| Bit::constant(const_bit(&minus_n, i)))
        .collect();
    add_in_place(b, &wide, &q, None);
    b.scaffold(Gate::cnot(h.0, t.0));
    let q: Vec<Bit> = (0..=w)
        .map(|i| {
            if const_bit(n, i) {
                Bit::of(t)
            } else {
                Bit::Zero
            }
        })
        .collect();
    add_in_place(b, &wide, &q, None);
    b.set_ctrl(ctrl);
    less_than(b, s, a, t);
    b.set_ctrl(None);
    b.scaffold(Gate::not(t.0));
    b.release(t);
    b.release(h);
}

/// `y ^= data[a]`: one multi-controlled NOT per set data bit, addresses in
/// bit-reversed order so that neighbouring gates share the low address bits
/// and lowering shares their AND chains.
#[allow(dead_code)] // replaced by unary iteration (lookup.rs), kept for reference
fn lookup(b: &mut Builder, a: &[Line], y: &[Line], data: &[u64]) {
    let w = a.len();
    for r in 0..1u64 << w {
        let v = r.reverse_bits() >> (64 - w);
        let word = data[v as usize];
        if word == 0 {
            continue;
        }
        let controls: Vec<Control> = a
            .iter()
            .enumerate()
            .map(|(i, &l)| Control {
                line: l,
                positive: (v >> i) & 1 == 1,
            })
            .collect();
        for (j, &t) in y.iter().enumerate() {
            if (word >> j) & 1 == 1 {
                b.effect(Gate::new(controls.clone(), t).expect("y is its own register"));
            }
        }
    }
}
