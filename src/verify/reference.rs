//! What each line must hold after the circuit: the spec's tables, expressions, images and arithmetic, as the verifier reads them.

use super::eval::Compiled;
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
        program: Compiled,
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

/// The op on register values: `None` when the input is outside the op's domain.
/// Values are in layout order; registers are at most 62 bits wide here.
pub(super) fn arithmetic_reference(s: &ArithSpec, v: &[u64]) -> Option<Vec<u64>> {
    let mut out = v.to_vec();
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
        return None;
    }
    if !ctrl {
        return Some(out);
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
    Some(out)
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
