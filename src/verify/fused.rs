//! The check of a block against an adder, subtractor or comparator in one pass:
//! the reference's ripple chain and the comparison with the circuit's rows
//! fused, a chunk of [`C`] words at a time in vector registers; and the same
//! one-pass comparison for a function spec against its compiled outputs
//! ([`check_function`]).
//!
//! The materialized route ([`super::reference::sliced`]) writes the input
//! patterns, the expected rows and the chain's rows to memory and compares
//! row by row: about 130 row passes per block for a 10-bit adder beside its
//! 60 gates. Here the state patterns are read from rows built once (the low
//! state bits, [`low_bits`], are the same on every block) or are all-0 or all-1
//! rows (the higher bits are constant on a block), the chain's carry and the
//! OR of every difference stay in registers, and each circuit row is read
//! once: per bit of the register one load of each operand's pattern, one of
//! each circuit row and a handful of word operations.
//!
//! The chains are the schoolbook ones of [`super::ripple`] (full adder
//! `s = a ^ b ^ c`, `c' = ab | c(a ^ b)`; borrow of `x - y`:
//! `b' = !x y | !(x ^ y) b`; Knuth, TAOCP vol. 2, 4.3.1): common practice,
//! written here again so that nothing of the circuit's side is called.

// Lane loops are index loops over fixed arrays: the form the vectorizer takes.
#![allow(clippy::needless_range_loop)]

use super::kernel::{dispatched, Dispatch, Level};
use super::program::pattern;
use crate::spec::{ArithOp, ArithSpec, Relation};

/// Words a chunk: one AVX-512 vector, two AVX2 ones.
pub(super) const C: usize = 8;

/// State bits whose pattern differs word by word inside a block of `W`
/// words (bits 0-5 inside a word, then `log2 W` bits of the word number);
/// from this bit up a pattern is constant on a block.
pub(super) const fn low_bits(w: usize) -> u32 {
    6 + w.trailing_zeros()
}

/// The fused op.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Op {
    /// `b <- a + b mod 2^n`, and with `carry` the carry out XORed into `cout`.
    Add { carry: bool },
    /// `b <- b - a mod 2^n`.
    Sub,
    /// `y <- y ^ (a REL b)`.
    Compare(Relation),
}

/// The plan of the fused check for one spec: the op, the register width,
/// and whether state bit 0 is a control.
#[derive(Clone, Debug)]
pub(super) struct Fused {
    op: Op,
    width: usize,
    controlled: bool,
}

impl Fused {
    /// The plan for `s`, or `None` for the ops the materialized route keeps
    /// (constants, moduli, products, lookups).
    pub(super) fn plan(s: &ArithSpec) -> Option<Fused> {
        if s.constant.is_some() || s.modulus.is_some() || s.width == 0 {
            return None;
        }
        let op = match s.op {
            ArithOp::Add => Op::Add { carry: s.carry_out },
            ArithOp::Subtract if !s.carry_out => Op::Sub,
            ArithOp::Compare => Op::Compare(s.relation?),
            _ => return None,
        };
        Some(Fused {
            op,
            width: s.width,
            controlled: s.controlled,
        })
    }

    /// State bits the plan reads: the control, `a`, `b`, and `cout` or `y`.
    pub(super) fn bits(&self) -> usize {
        let extra = match self.op {
            Op::Add { carry } => carry as usize,
            Op::Sub => 0,
            Op::Compare(_) => 1,
        };
        self.controlled as usize + 2 * self.width + extra
    }
}

/// The rows of a constant state bit (constants, not state: promoted to
/// read-only data where they are borrowed).
const ZERO: [u64; 128] = [0; 128];
const ONES: [u64; 128] = [!0; 128];

/// The pattern rows of the low state bits, the same on every block.
pub(super) fn low_patterns<const W: usize>(bits: usize) -> Vec<[u64; W]> {
    let n = bits.min(low_bits(W) as usize);
    (0..n)
        .map(|j| {
            let mut r = [0u64; W];
            pattern::<W>(&mut r, j as u32, 0);
            r
        })
        .collect()
}

/// The row of state bit `bit` on the block whose first word is `base`
/// (a multiple of `W`): a row of `low`, or an all-0 or all-1 row.
#[inline(always)]
pub(super) fn source<const W: usize>(low: &[[u64; W]], bit: usize, base: u64) -> &[u64; W] {
    if bit < low.len() {
        &low[bit]
    } else {
        let on = (base >> (bit - 6)) & 1 == 1;
        let row: &'static [u64; 128] = if on { &ONES } else { &ZERO };
        let row = &row[..W];
        row.try_into().expect("a block of at most 128 words")
    }
}

/// A chunk of [`C`] words, operated on lane by lane (one vector operation
/// each at AVX-512, two at AVX2).
#[derive(Clone, Copy)]
struct V([u64; C]);

impl V {
    const ZERO: V = V([0; C]);
    const ONES: V = V([!0; C]);

    /// Chunk `ch` of a row: one vector load.
    #[inline(always)]
    fn load<const W: usize>(r: &[u64; W], ch: usize) -> V {
        V(r.as_chunks::<C>().0[ch])
    }
}

macro_rules! lanes {
    ($tr:ident, $f:ident, $op:tt) => {
        impl std::ops::$tr for V {
            type Output = V;
            #[inline(always)]
            fn $f(self, o: V) -> V {
                let mut r = [0u64; C];
                for i in 0..C {
                    r[i] = self.0[i] $op o.0[i];
                }
                V(r)
            }
        }
    };
}
lanes!(BitAnd, bitand, &);
lanes!(BitOr, bitor, |);
lanes!(BitXor, bitxor, ^);

impl std::ops::Not for V {
    type Output = V;
    #[inline(always)]
    fn not(self) -> V {
        let mut r = [0u64; C];
        for i in 0..C {
            r[i] = !self.0[i];
        }
        V(r)
    }
}

/// What a block's check needs besides the rows: the circuit's line of
/// every state bit, the ancillae, and each state bit's pattern.
pub(super) struct Block<'a, const W: usize> {
    /// Circuit line of each state bit (the binding's free lines).
    pub(super) lines: &'a [usize],
    /// Lines that must end at 0.
    pub(super) ancillae: &'a [usize],
    /// The state pattern of each state bit on this block.
    pub(super) sources: &'a [&'a [u64; W]],
}

/// The chain over the register bits of one chunk: `step(x, y, carry)` gives
/// the bit the op leaves on `b` and the next carry. Returns the OR of the
/// differences (inputs changed on `a`, results wrong on `b`) and the last carry.
#[inline(always)]
#[allow(clippy::too_many_arguments)]
fn chain<const W: usize>(
    b: &Block<'_, W>,
    f: &Fused,
    rows: &[[u64; W]],
    ch: usize,
    on: V,
    mut acc: V,
    mut carry: V,
    step: impl Fn(V, V, V) -> (V, V),
) -> (V, V) {
    let (n, c0) = (f.width, f.controlled as usize);
    for j in 0..n {
        let (ia, ib) = (c0 + j, c0 + n + j);
        let x = V::load(b.sources[ia], ch);
        let y = V::load(b.sources[ib], ch);
        let (s, next) = step(x, y, carry);
        carry = next;
        // Where the op does not apply, b keeps its value.
        let want = y ^ ((s ^ y) & on);
        acc = acc | (V::load(&rows[b.lines[ia]], ch) ^ x);
        acc = acc | (V::load(&rows[b.lines[ib]], ch) ^ want);
    }
    (acc, carry)
}

dispatched! {
    /// The block's starting rows: each state bit's pattern on its line
    /// (a copy of a low pattern row, or a row of one repeated word), every
    /// other line 0. Word loops here instead of `memcpy` calls: a block
    /// sets some 20 rows of 512 bytes, and a call per row costs more than
    /// the stores.
    pub(super) fn start<const W: usize>(
        low: &[[u64; W]],
        lines: &[usize],
        zeroed: &[usize],
        base: u64,
        rows: &mut [[u64; W]],
    ) {
        for (bit, &line) in lines.iter().enumerate() {
            let r = &mut rows[line];
            if bit < 6 {
                // The same word all along the row.
                let v = low[bit][0];
                for x in r.iter_mut() {
                    *x = v;
                }
            } else if bit < low.len() {
                let s = &low[bit];
                #[allow(clippy::manual_memcpy)] // vector stores, not a call
                for k in 0..W {
                    r[k] = s[k];
                }
            } else {
                let v = 0u64.wrapping_sub((base >> (bit - 6)) & 1);
                for x in r.iter_mut() {
                    *x = v;
                }
            }
        }
        for &l in zeroed {
            rows[l] = [0; W];
        }
    }
}

dispatched! {
    /// ORs into `bad` (bit `k` of word `i`: state `64 i + k` of the block)
    /// every state on which a circuit row differs from what the op leaves
    /// there: ancillae not 0, inputs changed, results wrong.
    pub(super) fn check<const W: usize>(
        b: &Block<'_, W>,
        f: &Fused,
        rows: &[[u64; W]],
        bad: &mut [u64; W],
    ) {
        let top = f.controlled as usize + 2 * f.width;
        for ch in 0..W / C {
            let mut acc = V::load(bad, ch);
            for &a in b.ancillae {
                acc = acc | V::load(&rows[a], ch);
            }
            // Where the op applies: everywhere, or where the control is 1
            // (and the control itself is unchanged).
            let on = if f.controlled {
                let c = V::load(b.sources[0], ch);
                acc = acc | (V::load(&rows[b.lines[0]], ch) ^ c);
                c
            } else {
                V::ONES
            };
            let (acc, flag) = match f.op {
                Op::Add { .. } => chain(b, f, rows, ch, on, acc, V::ZERO, |x, y, c| {
                    let t = x ^ y;
                    (t ^ c, (x & y) | (c & t))
                }),
                // y - x, with the borrow of y - x.
                Op::Sub => chain(b, f, rows, ch, on, acc, V::ZERO, |x, y, c| {
                    let t = x ^ y;
                    (t ^ c, (!y & x) | (!t & c))
                }),
                // The borrow of x - y: x < y at the end; b is unchanged.
                Op::Compare(Relation::Less | Relation::GreaterEq) => {
                    chain(b, f, rows, ch, V::ZERO, acc, V::ZERO, |x, y, c| {
                        (y, (!x & y) | (!(x ^ y) & c))
                    })
                }
                // The borrow of y - x: y < x at the end.
                Op::Compare(Relation::Greater | Relation::LessEq) => {
                    chain(b, f, rows, ch, V::ZERO, acc, V::ZERO, |x, y, c| {
                        (y, (!y & x) | (!(x ^ y) & c))
                    })
                }
                // All bits alike so far.
                Op::Compare(Relation::Equal | Relation::NotEqual) => {
                    chain(b, f, rows, ch, V::ZERO, acc, V::ONES, |x, y, c| {
                        (y, c & !(x ^ y))
                    })
                }
            };
            let flag = match f.op {
                Op::Add { carry: true } => Some(flag),
                Op::Add { carry: false } | Op::Sub => None,
                Op::Compare(Relation::Less | Relation::Greater | Relation::Equal) => Some(flag),
                Op::Compare(_) => Some(!flag),
            };
            let acc = match flag {
                Some(v) => {
                    let z = V::load(b.sources[top], ch);
                    acc | (V::load(&rows[b.lines[top]], ch) ^ z ^ (v & on))
                }
                None => acc,
            };
            bad.as_chunks_mut::<C>().0[ch] = acc.0;
        }
    }
}

dispatched! {
    /// The one-pass check of `|x>|y> -> |x>|y ^ f(x)>` (a function spec
    /// without a control): ORs into `bad` every state on which an ancilla
    /// is not 0, an input line changed, or output line `k` differs from its
    /// input XOR `values[k]`, the spec's output `k` on the block.
    pub(super) fn check_function<const W: usize>(
        b: &Block<'_, W>,
        inputs: usize,
        values: &[[u64; W]],
        rows: &[[u64; W]],
        bad: &mut [u64; W],
    ) {
        for ch in 0..W / C {
            let mut acc = V::load(bad, ch);
            for &a in b.ancillae {
                acc = acc | V::load(&rows[a], ch);
            }
            for j in 0..inputs {
                let x = V::load(b.sources[j], ch);
                acc = acc | (V::load(&rows[b.lines[j]], ch) ^ x);
            }
            for (k, v) in values.iter().enumerate() {
                let y = V::load(b.sources[inputs + k], ch);
                let want = y ^ V::load(v, ch);
                acc = acc | (V::load(&rows[b.lines[inputs + k]], ch) ^ want);
            }
            bad.as_chunks_mut::<C>().0[ch] = acc.0;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const W: usize = crate::verify::BLOCK_WORDS;

    fn spec(
        op: ArithOp,
        width: usize,
        controlled: bool,
        carry: bool,
        rel: Option<Relation>,
    ) -> ArithSpec {
        ArithSpec {
            op,
            width,
            relation: rel,
            constant: None,
            modulus: None,
            carry_out: carry,
            exponent_bits: 0,
            windows: None,
            controlled,
            data: Vec::new(),
            data_width: 0,
        }
    }

    /// The op on one state by machine integers: the register values after it.
    fn by_integers(f: &Fused, state: u64) -> u64 {
        let n = f.width;
        let c0 = f.controlled as usize;
        let mask = (1u64 << n) - 1;
        let on = !f.controlled || state & 1 == 1;
        let a = (state >> c0) & mask;
        let b = (state >> (c0 + n)) & mask;
        let top = c0 + 2 * n;
        if !on {
            return state;
        }
        let mut out = state & !(mask << (c0 + n));
        match f.op {
            Op::Add { carry } => {
                out |= ((a + b) & mask) << (c0 + n);
                if carry {
                    out ^= ((a + b) >> n) << top;
                }
            }
            Op::Sub => out |= (b.wrapping_sub(a) & mask) << (c0 + n),
            Op::Compare(r) => {
                out |= b << (c0 + n);
                let holds = match r {
                    Relation::Less => a < b,
                    Relation::LessEq => a <= b,
                    Relation::Greater => a > b,
                    Relation::GreaterEq => a >= b,
                    Relation::Equal => a == b,
                    Relation::NotEqual => a != b,
                };
                out ^= (holds as u64) << top;
            }
        }
        out
    }

    /// Every block of a small state space: rows holding the right results
    /// pass; a row with one state's bit flipped fails on that state alone.
    fn agrees(s: &ArithSpec) {
        let f = Fused::plan(s).expect("a fused op");
        let bits = f.bits();
        // One ancilla line after the state lines, and the lines reversed so
        // that line and state bit differ.
        let lines: Vec<usize> = (0..bits).rev().collect();
        let ancillae = [bits];
        let low = low_patterns::<W>(bits);
        let blocks = (1u64 << bits).div_ceil(64 * W as u64);
        for d in Dispatch::available() {
            for blk in 0..blocks {
                let base = blk * W as u64;
                let sources: Vec<&[u64; W]> =
                    (0..bits).map(|j| source::<W>(&low, j, base)).collect();
                let mut rows = vec![[0u64; W]; bits + 1];
                for i in 0..W {
                    for k in 0..64 {
                        let state = (base + i as u64) * 64 + k;
                        let after = by_integers(&f, state);
                        for (j, &l) in lines.iter().enumerate() {
                            rows[l][i] |= ((after >> j) & 1) << k;
                        }
                    }
                }
                let block = Block {
                    lines: &lines,
                    ancillae: &ancillae,
                    sources: &sources,
                };
                let mut bad = [0u64; W];
                check::<W>(d, &block, &f, &rows, &mut bad);
                assert_eq!(bad, [0; W], "{s:?} block {blk} at {:?}", d.level());
                // One wrong bit on each line in turn, at a state of its own.
                for l in 0..=bits {
                    let (i, k) = ((l * 7 + blk as usize) % W, (l * 13) % 64);
                    rows[l][i] ^= 1 << k;
                    let mut bad = [0u64; W];
                    check::<W>(d, &block, &f, &rows, &mut bad);
                    rows[l][i] ^= 1 << k;
                    let mut want = [0u64; W];
                    want[i] = 1 << k;
                    assert_eq!(bad, want, "{s:?} line {l} block {blk}");
                }
            }
        }
    }

    #[test]
    fn adders_and_subtractors_agree_with_machine_integers() {
        for width in [1, 3, 7] {
            for controlled in [false, true] {
                for carry in [false, true] {
                    agrees(&spec(ArithOp::Add, width, controlled, carry, None));
                }
                agrees(&spec(ArithOp::Subtract, width, controlled, false, None));
            }
        }
    }

    #[test]
    fn comparisons_agree_with_machine_integers() {
        for width in [1, 2, 6] {
            for controlled in [false, true] {
                for r in Relation::all() {
                    agrees(&spec(ArithOp::Compare, width, controlled, false, Some(r)));
                }
            }
        }
    }

    /// The function check: rows of `|x>|y ^ f(x)>` for given output rows
    /// pass; one flipped bit on any line (ancilla included) is found at its
    /// own state and nowhere else.
    #[test]
    fn the_function_check_finds_every_wrong_line_at_its_state() {
        let (n, m) = (11usize, 3usize);
        let bits = n + m;
        let lines: Vec<usize> = (0..bits).map(|j| (j * 5) % bits).collect();
        let ancillae = [bits];
        let low = low_patterns::<W>(bits);
        // f_k(x) = parity of (x & mask_k), a function of our own.
        let masks = [0b1_0110_1011u64, 0b0_1101_0001, 0b1_1111_1111];
        for d in Dispatch::available() {
            for blk in 0..(1u64 << bits) / (64 * W as u64) {
                let base = blk * W as u64;
                let sources: Vec<&[u64; W]> =
                    (0..bits).map(|j| source::<W>(&low, j, base)).collect();
                let mut values = vec![[0u64; W]; m];
                let mut rows = vec![[0u64; W]; bits + 1];
                for i in 0..W {
                    for k in 0..64 {
                        let state = (base + i as u64) * 64 + k;
                        let x = state & ((1 << n) - 1);
                        let mut after = state;
                        for (o, mask) in masks.iter().enumerate() {
                            let f = ((x & mask).count_ones() & 1) as u64;
                            values[o][i] |= f << k;
                            after ^= f << (n + o);
                        }
                        for (j, &l) in lines.iter().enumerate() {
                            rows[l][i] |= ((after >> j) & 1) << k;
                        }
                    }
                }
                let block = Block {
                    lines: &lines,
                    ancillae: &ancillae,
                    sources: &sources,
                };
                let mut bad = [0u64; W];
                check_function::<W>(d, &block, n, &values, &rows, &mut bad);
                assert_eq!(bad, [0; W], "block {blk} at {:?}", d.level());
                for l in 0..=bits {
                    let (i, k) = ((l * 11 + blk as usize) % W, (l * 17) % 64);
                    rows[l][i] ^= 1 << k;
                    let mut bad = [0u64; W];
                    check_function::<W>(d, &block, n, &values, &rows, &mut bad);
                    rows[l][i] ^= 1 << k;
                    let mut want = [0u64; W];
                    want[i] = 1 << k;
                    assert_eq!(bad, want, "line {l} block {blk}");
                }
            }
        }
    }

    #[test]
    fn constants_and_moduli_stay_on_the_materialized_route() {
        let mut s = spec(ArithOp::Add, 4, false, false, None);
        s.constant = Some(3u32.into());
        assert!(Fused::plan(&s).is_none());
        let mut s = spec(ArithOp::Add, 4, false, false, None);
        s.modulus = Some(13u32.into());
        assert!(Fused::plan(&s).is_none());
        assert!(Fused::plan(&spec(ArithOp::Multiply, 4, false, false, None)).is_none());
    }
}
