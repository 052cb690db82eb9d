//! The map of a small arithmetic spec as a table of images over all its
//! lines, for the table-based methods (`transform`) that `auto` also runs
//! when the registers are small. Outside the domain of a modular op the map
//! is the identity, which keeps it a bijection (the domain maps onto itself).

use crate::circuit::Line;
use crate::logic::{Dag, TruthTable};
use crate::spec::{ArithOp, ArithSpec, FunctionSpec, Output, OutputDef, Relation};
use num_traits::ToPrimitive;

/// The map of an op that writes an output register (`y ^= f(inputs)`:
/// `compare`, `weight`, `multiply` without a modulus, `lookup`) as a function
/// spec over its other lines, for the function methods (`reed-muller`,
/// `esop`, `bennett`) that `auto` also runs on small registers; with the
/// arithmetic lines of the function's inputs and outputs, in order. `None`
/// for the in-place ops and past [`TABLE_MAX_LINES`] lines.
pub fn arith_function(spec: &ArithSpec) -> Option<(FunctionSpec, Vec<Line>, Vec<Line>)> {
    let out_reg = match spec.op {
        ArithOp::Compare | ArithOp::Weight | ArithOp::Lookup => "y",
        ArithOp::Multiply if spec.modulus.is_none() => "p",
        _ => return None,
    };
    let images = arith_images(spec)?;
    let lines = spec.layout().lines();
    let (outs, ins): (Vec<usize>, Vec<usize>) =
        (0..lines.len()).partition(|&i| lines[i].register == out_reg);
    let name = |i: usize| format!("{}{}", lines[i].register, lines[i].index);
    let state = |x: u64| -> u64 {
        ins.iter()
            .enumerate()
            .map(|(j, &l)| ((x >> j) & 1) << l)
            .sum()
    };
    let outputs = outs
        .iter()
        .map(|&o| Output {
            name: name(o),
            def: OutputDef::Table(TruthTable::from_fn(ins.len(), |x| {
                (images[state(x) as usize] >> o) & 1 == 1
            })),
        })
        .collect();
    let f = FunctionSpec {
        inputs: ins.iter().map(|&i| name(i)).collect(),
        outputs,
        dag: Dag::default(),
    };
    let line = |v: Vec<usize>| v.into_iter().map(|i| Line(i as u32)).collect();
    Some((f, line(ins), line(outs)))
}

/// Most lines of a map written as a table.
pub const TABLE_MAX_LINES: usize = 16;

/// `images[s]` for every state `s` of the spec's registers (in layout order,
/// lowest bits first); `None` past [`TABLE_MAX_LINES`] lines.
pub fn arith_images(spec: &ArithSpec) -> Option<Vec<u64>> {
    let sizes = spec.layout().sizes();
    let bits: usize = sizes.iter().map(|s| s.1).sum();
    if bits > TABLE_MAX_LINES {
        return None;
    }
    let k = spec.constant.as_ref().map_or(Some(0), |c| c.to_u64())?;
    let n = spec.modulus.as_ref().map_or(Some(1), |c| c.to_u64())?;
    let mut images = Vec::with_capacity(1 << bits);
    let mut v = vec![0u64; sizes.len()];
    for s in 0..1u64 << bits {
        let mut at = 0;
        for (x, &(_, size)) in v.iter_mut().zip(&sizes) {
            *x = (s >> at) & ((1 << size) - 1);
            at += size;
        }
        let out = apply(spec, &v, k, n);
        let mut img = 0u64;
        let mut at = 0;
        for (x, &(_, size)) in out.iter().zip(&sizes) {
            img |= x << at;
            at += size;
        }
        images.push(img);
    }
    Some(images)
}

fn apply(spec: &ArithSpec, v: &[u64], k: u64, n: u64) -> Vec<u64> {
    let mut out = v.to_vec();
    let c = spec.controlled as usize;
    if spec.controlled && v[0] == 0 {
        return out;
    }
    let w = spec.width as u32;
    let m = (1u64 << w) - 1;
    let modular = spec.modulus.is_some();
    let a = v[c];
    let modpow = |mut base: u64, mut e: u64| {
        let mut r = 1 % n;
        base %= n;
        while e > 0 {
            if e & 1 == 1 {
                r = r * base % n;
            }
            base = base * base % n;
            e >>= 1;
        }
        r
    };
    match (spec.op, spec.constant.is_some()) {
        (ArithOp::Add | ArithOp::Subtract, true) => {
            let sub = spec.op == ArithOp::Subtract;
            if modular {
                if a < n {
                    out[c] = if sub { (a + n - k) % n } else { (a + k) % n };
                }
            } else if sub {
                out[c] = a.wrapping_sub(k) & m;
            } else {
                out[c] = (a + k) & m;
                if spec.carry_out {
                    out[c + 1] ^= (a + k) >> w;
                }
            }
        }
        (ArithOp::Add | ArithOp::Subtract, false) => {
            let sub = spec.op == ArithOp::Subtract;
            let b = v[c + 1];
            if modular {
                if a < n && b < n {
                    out[c + 1] = if sub { (b + n - a) % n } else { (a + b) % n };
                }
            } else if sub {
                out[c + 1] = b.wrapping_sub(a) & m;
            } else {
                out[c + 1] = (a + b) & m;
                if spec.carry_out {
                    out[c + 2] ^= (a + b) >> w;
                }
            }
        }
        (ArithOp::Compare, konst) => {
            let (r, y) = if konst { (k, c + 1) } else { (v[c + 1], c + 2) };
            let holds = match spec.relation.unwrap_or(Relation::Less) {
                Relation::Less => a < r,
                Relation::LessEq => a <= r,
                Relation::Greater => a > r,
                Relation::GreaterEq => a >= r,
                Relation::Equal => a == r,
                Relation::NotEqual => a != r,
            };
            out[y] ^= holds as u64;
        }
        (ArithOp::Multiply, _) if modular => {
            if a < n {
                out[c] = a * k % n;
            }
        }
        (ArithOp::Multiply, true) => out[c + 1] ^= a * k,
        (ArithOp::Multiply, false) => out[c + 2] ^= a * v[c + 1],
        (ArithOp::Power, _) => {
            let x = v[c + 1];
            if x < n {
                out[c + 1] = x * modpow(k, a) % n;
            }
        }
        (ArithOp::Weight, _) => out[c + 1] ^= a.count_ones() as u64,
        (ArithOp::Lookup, _) => out[c + 1] ^= spec.data[a as usize],
    }
    out
}
