//! `add` and `subtract` with `modulus`: `b -> (b ± a) mod N` and
//! `a -> (a ± c) mod N`, for inputs below `N` (the domain promise).
//!
//! Construction of `a -> (a + c) mod N` (the constant modular adder of
//! Vedral, Barenco, Ekert, Phys. Rev. A 54, 147, 1996, rearranged around a
//! comparator as in Häner, Roetteler, Svore, arXiv:1611.07995, 2017, but with
//! clean ancillae): `g = [a < N - c]` by a constant comparator; one adder adds
//! `c` where `g` and `c - N (mod 2^n)` where not, the two constants merged bit
//! by bit into literals of `g`; then `g` is cleared by `g ^= [r < c] ^ 1`, which
//! is the same predicate on the result `r`. Uncontrolled that is two constant
//! comparators and one carry-chain adder, `6n + O(1)` Toffolis (measured; VBE
//! use five plain adders per modular addition, about `20n` Toffolis derived
//! from their adder of `4n - 2`; Häner et al. count their dirty-ancilla
//! constant adder in `O(n log n)` gates, a different trade). Under a control
//! the adder's effects take the control and `g` is cleared by the comparator
//! of whichever branch ran (one more comparator).
//!
//! Subtraction is the add circuit run backwards (every gate is its own
//! inverse): the inverse of `b -> b + a mod N` on `a, b < N` is `b -> b - a mod N`.

use super::{
    add_in_place, add_mod, const_bit, increment_mod, less_than_const, Bit, Builder, Registers,
};
use crate::circuit::{Gate, Line};
use crate::spec::{ArithOp, BigUint};
use num_traits::{One, Zero};

/// The modular `add` or `subtract` of a spec with `modulus = n`.
pub(super) fn add_or_subtract(
    b: &mut Builder,
    op: ArithOp,
    r: &Registers,
    constant: Option<&BigUint>,
    n: &BigUint,
) {
    match constant {
        None => {
            let start = b.mark();
            add_mod(b, &r.a, &r.b, n, r.ctrl);
            if op == ArithOp::Subtract {
                b.reverse_from(start);
            }
        }
        Some(c) => {
            let c = if op == ArithOp::Subtract {
                (n - c) % n
            } else {
                c.clone()
            };
            if c.is_one() {
                increment_mod(b, &r.a, n, r.ctrl);
            } else {
                add_const_mod(b, &r.a, &c, n, r.ctrl);
            }
        }
    }
}

/// `a -> (a + c) mod n` for `a < n` and `c < n`, controlled by `ctrl`.
pub(super) fn add_const_mod(
    b: &mut Builder,
    a: &[Line],
    c: &BigUint,
    n: &BigUint,
    ctrl: Option<Line>,
) {
    if c.is_zero() {
        return;
    }
    let w = a.len();
    let g = b.ancilla();
    let rest = n - c;
    b.set_ctrl(None);
    less_than_const(b, a, &rest, g);
    // c where g, c - n (mod 2^w) where not.
    let d = ((BigUint::one() << w) + c - n) % (BigUint::one() << w);
    let q: Vec<Bit> = (0..w)
        .map(|i| match (const_bit(c, i), const_bit(&d, i)) {
            (x, y) if x == y => Bit::constant(x),
            (true, false) => Bit::of(g),
            _ => Bit::of(g).not(),
        })
        .collect();
    b.set_ctrl(ctrl);
    add_in_place(b, a, &q, None);
    // Where the adder ran, g = [r >= c].
    less_than_const(b, a, c, g);
    b.effect(Gate::not(g.0));
    b.set_ctrl(None);
    if let Some(cl) = ctrl {
        // Where it did not, a is unchanged and g = [a < n - c] still.
        b.scaffold(Gate::not(cl.0));
        b.set_ctrl(Some(cl));
        less_than_const(b, a, &rest, g);
        b.set_ctrl(None);
        b.scaffold(Gate::not(cl.0));
    }
    b.release(g);
}
