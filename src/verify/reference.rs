//! What each line must hold after the circuit: the spec's tables, expressions, images and arithmetic, as the verifier reads them.

use super::kernel::Dispatch;
use super::program::WordProgram;
use super::ripple;
use super::BLOCK_WORDS as W;
use crate::spec::{ArithOp, ArithSpec, BigUint, Relation, Spec, SpecBody};
use num_traits::{One, ToPrimitive};

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

/// A constant of the spec as a machine word; the exhaustive route's
/// registers are at most 62 bits, so every constant that reaches it fits.
fn small(v: &Option<BigUint>, default: u128) -> u128 {
    v.as_ref()
        .map_or(default, |x| x.to_u128().unwrap_or(u128::MAX))
}

/// `base^e mod n` by square-and-multiply from the top bit of `e`.
fn pow_mod(base: u128, e: u64, n: u128) -> u128 {
    let mut r = 1 % n;
    for i in (0..64).rev() {
        r = r * r % n;
        if (e >> i) & 1 == 1 {
            r = r * (base % n) % n;
        }
    }
    r
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
    let k = small(&s.constant, 0);
    let n = small(&s.modulus, 1);
    let constant = s.constant.is_some();
    let modular = s.modulus.is_some();
    let a = v[base] as u128;
    // The domain promise: the registers of a modular op hold values below n.
    let inside = match (s.op, modular, constant) {
        (ArithOp::Add | ArithOp::Subtract, true, false) => a < n && (v[base + 1] as u128) < n,
        (ArithOp::Add | ArithOp::Subtract, true, true) => a < n,
        (ArithOp::Multiply, true, _) => a < n,
        (ArithOp::Power, _, _) => (v[base + 1] as u128) < n,
        _ => true,
    };
    if !inside {
        return false;
    }
    if !ctrl {
        return true;
    }
    let sub = s.op == ArithOp::Subtract;
    match s.op {
        ArithOp::Add | ArithOp::Subtract => match (modular, constant) {
            (false, false) => {
                let b = v[base + 1] as u128;
                if sub {
                    out[base + 1] = mask(b + (1u128 << w) - a);
                } else {
                    out[base + 1] = mask(a + b);
                    if s.carry_out {
                        out[base + 2] ^= ((a + b) >> w) as u64;
                    }
                }
            }
            (false, true) => {
                if sub {
                    out[base] = mask(a + (1u128 << w) - k);
                } else {
                    out[base] = mask(a + k);
                    if s.carry_out {
                        out[base + 1] ^= ((a + k) >> w) as u64;
                    }
                }
            }
            (true, false) => {
                let b = v[base + 1] as u128;
                out[base + 1] = if sub { (b + n - a) % n } else { (a + b) % n } as u64;
            }
            (true, true) => out[base] = if sub { (a + n - k) % n } else { (a + k) % n } as u64,
        },
        ArithOp::Compare => {
            let (rhs, y) = if constant {
                (k, base + 1)
            } else {
                (v[base + 1] as u128, base + 2)
            };
            let holds = match s.relation.expect("compare has a relation") {
                Relation::Less => a < rhs,
                Relation::LessEq => a <= rhs,
                Relation::Greater => a > rhs,
                Relation::GreaterEq => a >= rhs,
                Relation::Equal => a == rhs,
                Relation::NotEqual => a != rhs,
            };
            out[y] ^= holds as u64;
        }
        ArithOp::Multiply => match (modular, constant) {
            (true, _) => out[base] = (k * a % n) as u64,
            (false, true) => out[base + 1] ^= (a * k) as u64,
            (false, false) => out[base + 2] ^= (a * v[base + 1] as u128) as u64,
        },
        ArithOp::Power => {
            let x = v[base + 1] as u128;
            out[base + 1] = (x * pow_mod(k, v[base], n) % n) as u64;
        }
        ArithOp::Weight => out[base + 1] ^= v[base].count_ones() as u64,
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
    // The cases with a bit-sliced reference; the rest go state by state.
    let constant = s.constant.is_some();
    let modular = s.modulus.is_some();
    let one = s.constant.as_ref().is_some_and(|c| c.is_one());
    let case = match (s.op, modular, constant) {
        (ArithOp::Add, false, false) => Sliced::Add,
        (ArithOp::Subtract, false, false) => Sliced::Sub,
        (ArithOp::Add | ArithOp::Subtract, false, true) if !s.carry_out => Sliced::AddConst,
        (ArithOp::Add, true, true) if one => Sliced::IncrementMod,
        (ArithOp::Add, true, false) => Sliced::AddMod,
        (ArithOp::Compare, _, c) => match (s.relation, c) {
            (Some(Relation::Less), false) => Sliced::LessThan,
            (Some(Relation::Less), true) => Sliced::LessThanConst,
            (Some(Relation::Equal), true) => Sliced::EqualConst,
            _ => return false,
        },
        _ => return false,
    };
    let w = s.width;
    let c = s.controlled as usize;
    let a = &inputs[c..c + w];
    out.clear();
    out.extend_from_slice(inputs);
    temp.clear();
    temp.resize(w, [0; W]);
    let mut k = small(&s.constant, 0);
    if s.op == ArithOp::Subtract && case == Sliced::AddConst {
        // a - k = a + (2^w - k) mod 2^w.
        k = ((1u128 << w) - k) % (1u128 << w);
    }
    let n = small(&s.modulus, 1);
    let mut flag = [0u64; W];
    let ok = match case {
        Sliced::Add => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::add::<W>(d, a, b, temp, &mut flag).is_ok();
            out[c + w..c + 2 * w].copy_from_slice(temp);
            if s.carry_out {
                xor_into(&mut out[c + 2 * w], &flag);
            }
            ok
        }
        Sliced::Sub => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::subtract::<W>(d, b, a, temp, &mut flag).is_ok();
            out[c + w..c + 2 * w].copy_from_slice(temp);
            ok
        }
        Sliced::AddConst => {
            let ok = ripple::add_const::<W>(d, a, k, temp, &mut flag).is_ok();
            out[c..c + w].copy_from_slice(temp);
            ok
        }
        Sliced::LessThan => {
            let b = &inputs[c + w..c + 2 * w];
            let ok = ripple::less_than::<W>(d, a, b, &mut flag).is_ok();
            xor_into(&mut out[c + 2 * w], &flag);
            ok
        }
        Sliced::LessThanConst => {
            ripple::less_than_const::<W>(d, a, k, &mut flag);
            xor_into(&mut out[c + w], &flag);
            true
        }
        Sliced::EqualConst => {
            ripple::equal_const::<W>(d, a, k, &mut flag);
            xor_into(&mut out[c + w], &flag);
            true
        }
        Sliced::IncrementMod => {
            let ok = ripple::increment_mod::<W>(d, a, n, temp).is_ok();
            out[c..c + w].copy_from_slice(temp);
            // The promise of a modular op: a < n.
            let mut a_in = [0u64; W];
            ripple::less_than_const::<W>(d, a, n, &mut a_in);
            for i in 0..W {
                care[i] &= a_in[i];
            }
            ok
        }
        Sliced::AddMod => {
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

/// The ops with a bit-sliced reference.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Sliced {
    Add,
    Sub,
    AddConst,
    LessThan,
    LessThanConst,
    EqualConst,
    IncrementMod,
    AddMod,
}

fn xor_into(row: &mut [u64; W], with: &[u64; W]) {
    for (r, x) in row.iter_mut().zip(with) {
        *r ^= x;
    }
}

/// How many of the basis states `[first, end)` (numbered by the free lines,
/// `bits` of them) lie inside the spec's domain: every state, but for the
/// modular ops, whose promise is that their registers hold values below the
/// modulus.
pub(super) fn states_inside_domain(spec: &Spec, bits: u32, first: u64, end: u64) -> u64 {
    let SpecBody::Arithmetic(s) = &spec.body else {
        return end - first;
    };
    let promised = s.below_modulus();
    if promised.is_empty() {
        return end - first;
    }
    let n = small(&s.modulus, 2);
    // (width, limit) of each register, lowest state bits first.
    let regs: Vec<(u32, u128)> = s
        .layout()
        .sizes()
        .iter()
        .map(|&(name, size)| {
            let size = size as u32;
            let limit = if promised.contains(&name) {
                n.min(1u128 << size)
            } else {
                1u128 << size
            };
            (size, limit)
        })
        .collect();
    debug_assert_eq!(bits, regs.iter().map(|r| r.0).sum::<u32>());
    // States below x whose every register is below its limit: digit by
    // digit from the most significant register.
    let below = |x: u64| -> u128 {
        let x = x as u128;
        let mut shift: u32 = regs.iter().map(|r| r.0).sum();
        let mut count = 0u128;
        for (i, &(size, limit)) in regs.iter().enumerate().rev() {
            shift -= size;
            // The top register's digit may be 2^size at the end of the range.
            let digit = if i + 1 == regs.len() {
                x >> shift
            } else {
                (x >> shift) & ((1u128 << size) - 1)
            };
            let lower: u128 = regs[..i].iter().map(|r| r.1).product();
            count += digit.min(limit) * lower;
            if digit >= limit {
                return count;
            }
        }
        count
    };
    (below(end) - below(first)) as u64
}

/// The op on register values of any width (in layout order), by the
/// arithmetic of `num-bigint`; `None` outside the op's domain. The SAT route
/// checks its counterexamples with it.
pub(super) fn big_reference(s: &ArithSpec, v: &[BigUint]) -> Option<Vec<BigUint>> {
    let mut out = v.to_vec();
    let (ctrl, base) = if s.controlled {
        (v[0].is_one(), 1)
    } else {
        (true, 0)
    };
    let zero = BigUint::default();
    let one = BigUint::one();
    let w = s.width;
    let full = &one << w;
    let k = s.constant.as_ref().unwrap_or(&zero);
    let n = s.modulus.as_ref().unwrap_or(&one);
    let constant = s.constant.is_some();
    let modular = s.modulus.is_some();
    let a = &v[base];
    let inside = match (s.op, modular, constant) {
        (ArithOp::Add | ArithOp::Subtract, true, false) => a < n && &v[base + 1] < n,
        (ArithOp::Add | ArithOp::Subtract, true, true) | (ArithOp::Multiply, true, _) => a < n,
        (ArithOp::Power, _, _) => &v[base + 1] < n,
        _ => true,
    };
    if !inside {
        return None;
    }
    if !ctrl {
        return Some(out);
    }
    let sub = s.op == ArithOp::Subtract;
    let xor = |x: &BigUint, y: &BigUint| x ^ y;
    match s.op {
        ArithOp::Add | ArithOp::Subtract => {
            let (target, addend) = if constant {
                (base, k.clone())
            } else {
                (base + 1, a.clone())
            };
            let t = &v[target];
            if modular {
                out[target] = if sub {
                    (t + n - &addend) % n
                } else {
                    (t + &addend) % n
                };
            } else if sub {
                out[target] = (t + &full - &addend) % &full;
            } else {
                let sum = t + &addend;
                out[target] = &sum % &full;
                if s.carry_out {
                    let c = &sum >> w;
                    out[target + 1] = xor(&v[target + 1], &c);
                }
            }
        }
        ArithOp::Compare => {
            let (rhs, y) = if constant {
                (k.clone(), base + 1)
            } else {
                (v[base + 1].clone(), base + 2)
            };
            let holds = match s.relation? {
                Relation::Less => *a < rhs,
                Relation::LessEq => *a <= rhs,
                Relation::Greater => *a > rhs,
                Relation::GreaterEq => *a >= rhs,
                Relation::Equal => *a == rhs,
                Relation::NotEqual => *a != rhs,
            };
            out[y] = xor(&v[y], &BigUint::from(holds as u32));
        }
        ArithOp::Multiply => match (modular, constant) {
            (true, _) => out[base] = k * a % n,
            (false, true) => out[base + 1] = xor(&v[base + 1], &(a * k)),
            (false, false) => out[base + 2] = xor(&v[base + 2], &(a * &v[base + 1])),
        },
        ArithOp::Power => out[base + 1] = &v[base + 1] * k.modpow(&v[base], n) % n,
        ArithOp::Weight => out[base + 1] = xor(&v[base + 1], &BigUint::from(a.count_ones())),
        ArithOp::Lookup => {
            let addr = a.to_usize()?;
            out[base + 1] = xor(&v[base + 1], &BigUint::from(*s.data.get(addr)?));
        }
    }
    Some(out)
}
