//! What each line must hold after the circuit: the spec's tables, expressions, images and arithmetic, as the verifier reads them.

use super::kernel::Dispatch;
use super::program::WordProgram;
use super::ripple;
use super::BLOCK_WORDS as W;
use crate::spec::{ArithOp, ArithSpec, Spec, SpecBody};

/// One output's reference.
pub(super) enum Reference<'a> {
    /// A truth table's words and its length in bits.
    Words(&'a [u64], usize),
    /// Output `k` of the compiled expressions.
    Expr(usize),
}

/// What to compare each line against.
pub(super) enum Model<'a> {
    Function {
        inputs: usize,
        outputs: Vec<Reference<'a>>,
        /// The expression outputs, compiled.
        program: WordProgram,
    },
    Permutation {
        images: &'a [u64],
    },
    Arithmetic {
        spec: &'a ArithSpec,
        /// (register, width) in state-bit order.
        layout: Vec<(&'static str, usize)>,
    },
}

/// The op on register values `v` (in layout order), into `out`; false when
/// the input is outside the op's domain. Registers are at most 62 bits wide
/// here (the exhaustive route's limit).
pub(super) fn arithmetic_reference(s: &ArithSpec, v: &[u64], out: &mut [u64]) -> bool {
    out.copy_from_slice(v);
    let (ctrl, base) = if s.controlled {
        (v[0] == 1, 1)
    } else {
        (true, 0)
    };
    let w = s.width as u32;
    let mask = |x: u128| (x & ((1u128 << w) - 1)) as u64;
    let k = s.constant.unwrap_or(0) as u128;
    let n = s.modulus.unwrap_or(1) as u128;
    let a = v[base] as u128;
    if s.op == ArithOp::AddMod && (a >= n || v[base + 1] as u128 >= n) {
        return false;
    }
    if !ctrl {
        return true;
    }
    match s.op {
        ArithOp::Add => {
            let b = v[base + 1] as u128;
            out[base + 1] = mask(a + b);
            if s.carry_out {
                out[base + 2] ^= ((a + b) >> w) as u64;
            }
        }
        ArithOp::Sub => {
            let b = v[base + 1] as u128;
            out[base + 1] = mask(b + (1u128 << w) - a);
        }
        ArithOp::AddConst => out[base] = mask(a + k),
        ArithOp::LessThan => out[base + 2] ^= (a < v[base + 1] as u128) as u64,
        ArithOp::LessThanConst => out[base + 1] ^= (a < k) as u64,
        ArithOp::EqualConst => out[base + 1] ^= (a == k) as u64,
        ArithOp::IncrementMod => {
            if a < n {
                out[base] = ((a + 1) % n) as u64;
            }
        }
        ArithOp::AddMod => out[base + 1] = ((a + v[base + 1] as u128) % n) as u64,
        ArithOp::Lookup => out[base + 1] ^= s.data[a as usize],
    }
    true
}

/// The op on a block of states, bit-sliced: `inputs` holds the pattern row
/// of every free line in layout order; the expected rows go into `out` in
/// the same order (`temp` is working room), and `care` is cleared outside
/// the op's domain. False for the ops done state by state (`lookup`).
pub(super) fn sliced(
    d: Dispatch,
    s: &ArithSpec,
    inputs: &[[u64; W]],
    out: &mut Vec<[u64; W]>,
    temp: &mut Vec<[u64; W]>,
    care: &mut [u64; W],
) -> bool {
    if s.op == ArithOp::Lookup {
        return false;
    }
    let w = s.width;
    let c = s.controlled as usize;
    let a = &inputs[c..c + w];
    out.clear();
    out.extend_from_slice(inputs);
    temp.clear();
    temp.resize(w, [0; W]);
    let k = s.constant.unwrap_or(0) as u128;
    let n = s.modulus.unwrap_or(1) as u128;
    let mut flag = [0u64; W];
    let ok = match s.op {
        ArithOp::Add => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::add::<W>(d, a, b, temp, &mut flag).is_ok();
            out[c + w..c + 2 * w].copy_from_slice(temp);
            if s.carry_out {
                xor_into(&mut out[c + 2 * w], &flag);
            }
            ok
        }
        ArithOp::Sub => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::subtract::<W>(d, b, a, temp, &mut flag).is_ok();
            out[c + w..c + 2 * w].copy_from_slice(temp);
            ok
        }
        ArithOp::AddConst => {
            let ok = ripple::add_const::<W>(d, a, k, temp, &mut flag).is_ok();
            out[c..c + w].copy_from_slice(temp);
            ok
        }
        ArithOp::LessThan => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::less_than::<W>(d, a, b, &mut flag).is_ok();
            xor_into(&mut out[c + 2 * w], &flag);
            ok
        }
        ArithOp::LessThanConst => {
            ripple::less_than_const::<W>(d, a, k, &mut flag);
            xor_into(&mut out[c + w], &flag);
            true
        }
        ArithOp::EqualConst => {
            ripple::equal_const::<W>(d, a, k, &mut flag);
            xor_into(&mut out[c + w], &flag);
            true
        }
        ArithOp::IncrementMod => {
            let ok = ripple::increment_mod::<W>(d, a, n, temp).is_ok();
            out[c..c + w].copy_from_slice(temp);
            ok
        }
        ArithOp::AddMod => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::add_mod::<W>(d, a, b, n, temp).is_ok();
            out[c + w..c + 2 * w].copy_from_slice(temp);
            let (mut a_in, mut b_in) = ([0u64; W], [0u64; W]);
            ripple::less_than_const::<W>(d, a, n, &mut a_in);
            ripple::less_than_const::<W>(d, b, n, &mut b_in);
            for i in 0..W {
                care[i] &= a_in[i] & b_in[i];
            }
            ok
        }
        ArithOp::Lookup => false,
    };
    if s.controlled {
        // The op where the control is 1, the identity where it is 0.
        let ctrl = inputs[0];
        for (o, x) in out.iter_mut().zip(inputs) {
            for i in 0..W {
                o[i] = (o[i] & ctrl[i]) | (x[i] & !ctrl[i]);
            }
        }
    }
    ok
}

fn xor_into(row: &mut [u64; W], with: &[u64; W]) {
    for (r, x) in row.iter_mut().zip(with) {
        *r ^= x;
    }
}

/// How many of the basis states `[first, end)` (numbered by the free lines,
/// `bits` of them) lie inside the spec's domain: every state, but for
/// `add_mod`, whose promise is `a, b < modulus`.
pub(super) fn states_inside_domain(spec: &Spec, bits: u32, first: u64, end: u64) -> u64 {
    let SpecBody::Arithmetic(s) = &spec.body else {
        return end - first;
    };
    if s.op != ArithOp::AddMod {
        return end - first;
    }
    let c = s.controlled as u32;
    let w = s.width as u32;
    debug_assert_eq!(bits, c + 2 * w);
    let n = s.modulus.unwrap_or(2) as u128;
    // States below x with a < n and b < n, for the layout ctrl, a, b.
    let below = |x: u64| -> u128 {
        let x = x as u128;
        let low = 1u128 << c;
        let (xl, t) = (x % low, x / low);
        let (xa, xb) = (t % (1u128 << w), t >> w);
        let mut count = xb.min(n) * n * low;
        if xb < n {
            count += xa.min(n) * low;
            if xa < n {
                count += xl;
            }
        }
        count
    };
    (below(end) - below(first)) as u64
}
