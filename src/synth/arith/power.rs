//! `power`: `e, x -> e, x * c^e mod N` for `x < N`, the modular
//! exponentiation of period finding, in two constructions.
//!
//! - **One multiplication per exponent bit** (the textbook construction,
//!   Vedral, Barenco, Ekert 1996; Beauregard 2003, memory): one in-place
//!   modular multiplication by `c^(2^i) mod N` controlled by exponent bit
//!   `e_i`, for each `i` ([`super::multiply`]); a factor that is 1 mod N is
//!   skipped. With `m` exponent bits and an `n`-bit modulus that is about
//!   `16 m n^2` Toffolis (measured: 561,756 at n = m = 32).
//! - **Windowed** ([`super::window`]: Gidney 2019; Gidney and Ekerå 2021):
//!   table lookups addressed by a window of exponent bits and a window of
//!   factor bits replace the controlled additions, about
//!   `2 m n / (we wm) * (4 * 2^(we + wm) + 8n)` Toffolis.
//!
//! Unless the spec fixes the windows (`exponent_window`,
//! `multiply_window`), [`power_form`] picks the construction and the
//! windows with the fewest Toffolis by a cost model: the lookups' counts
//! by formula, the adders' counts by running the counting builder on one
//! adder of the width.

use super::modular::add_const_mod;
use super::multiply::multiply_mod_in_place;
use super::window::{effective_bits, power_windowed, windowed_estimate};
use super::{add_mod, Bit, Builder};
use crate::circuit::{Line, LineInfo, Role};
use crate::spec::{ArithSpec, BigUint};
use num_traits::One;

/// How `power` is built.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PowerForm {
    /// One controlled modular multiplication per exponent bit.
    PerBit,
    /// Windowed: `exponent` bits of the exponent and `factor` bits of the
    /// multiplication's factor address each lookup.
    Windowed {
        /// Exponent bits per window.
        exponent: usize,
        /// Factor bits per window.
        factor: usize,
    },
}

/// Largest window the cost model tries (each of the two).
const MODEL_MAX_WINDOW: usize = 8;

/// The construction of `power` for `spec`: the spec's windows if it gives
/// them, else the cheaper of the two constructions by the cost model.
pub fn power_form(spec: &ArithSpec) -> PowerForm {
    if let Some((we, wm)) = spec.windows {
        return PowerForm::Windowed {
            exponent: we,
            factor: wm,
        };
    }
    let w = spec.width;
    let (Some(c), Some(n)) = (&spec.constant, &spec.modulus) else {
        return PowerForm::PerBit;
    };
    let adder = count(2 * w, |b| {
        let a: Vec<Line> = (0..w as u32).map(Line).collect();
        let s: Vec<Line> = (w as u32..2 * w as u32).map(Line).collect();
        add_mod(b, &a, &s, n, None);
    });
    // A controlled multiplication is 2w controlled constant modular
    // additions and a controlled swap (w Toffolis); one addition of c mod n
    // stands for all of them.
    let addition = count(w + 1, |b| {
        let t: Vec<Line> = (0..w as u32).map(Line).collect();
        add_const_mod(b, &t, &(c % n), n, Some(Line(w as u32)));
    });
    let multiply = 2 * w as u64 * addition + w as u64;
    // Exponent bits before the first factor c^(2^i) = 1 mod n (all later
    // ones are 1 too).
    let bits = effective_bits(c, n, spec.exponent_bits);
    let factors = bits as u64;
    // Under a control every multiplication also computes and uncomputes
    // ctrl & e_i, and each of its 2w additions ctrl & x_j.
    let extra = if spec.controlled { 2 + 4 * w as u64 } else { 0 };
    let mut best = (factors * (multiply + extra), PowerForm::PerBit);
    for we in 1..=MODEL_MAX_WINDOW.min(bits) {
        for wm in 1..=MODEL_MAX_WINDOW.min(w) {
            let t = windowed_estimate(w, bits, spec.controlled, we, wm, adder);
            if t < best.0 {
                best = (
                    t,
                    PowerForm::Windowed {
                        exponent: we,
                        factor: wm,
                    },
                );
            }
        }
    }
    best.1
}

/// The Toffoli count of what `f` builds on `lines` lines (plus ancillae).
fn count(lines: usize, f: impl FnOnce(&mut Builder)) -> u64 {
    let infos = (0..lines)
        .map(|i| LineInfo {
            register: "q".into(),
            index: i as u32,
            role: Role::Data,
            label: String::new(),
        })
        .collect();
    let mut b = Builder::counting(infos);
    f(&mut b);
    b.tally().0.toffoli
}

/// `x -> x * c^e mod n` under `ctrl`, in `form`.
#[allow(clippy::too_many_arguments)]
pub(super) fn power(
    b: &mut Builder,
    e: &[Line],
    x: &[Line],
    c: &BigUint,
    n: &BigUint,
    ctrl: Option<Line>,
    form: PowerForm,
) {
    if let PowerForm::Windowed { exponent, factor } = form {
        return power_windowed(b, e, x, c, n, ctrl, exponent, factor);
    }
    let mut k = c % n;
    for &ei in e {
        if !k.is_one() {
            match ctrl {
                None => multiply_mod_in_place(b, x, &k, n, Some(ei)),
                Some(cl) => {
                    let z = b.ancilla();
                    b.and_into(z, Bit::of(cl), Bit::of(ei), false);
                    multiply_mod_in_place(b, x, &k, n, Some(z));
                    b.and_into(z, Bit::of(cl), Bit::of(ei), false);
                    b.release(z);
                }
            }
        }
        k = &k * &k % n;
    }
}
