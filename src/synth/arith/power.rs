//! `power`: `e, x -> e, x * c^e mod N` for `x < N`, the modular
//! exponentiation of period finding.
//!
//! Construction (the textbook one, Vedral, Barenco, Ekert 1996; Beauregard
//! 2003, memory): one in-place modular multiplication by `c^(2^i) mod N`
//! controlled by exponent bit `e_i`, for each `i` ([`super::multiply`]); a
//! factor that is 1 mod N is skipped. With `m` exponent bits and an `n`-bit
//! modulus that is about `m * 18n^2` Toffolis (measured). Gidney and Ekerå,
//! "How to factor 2048 bit RSA integers in 8 hours using 20 million noisy
//! qubits" (Quantum 5, 433, 2021), reach `0.3 n^3 + 0.0005 n^3 lg n` for
//! `m = 1.5n` (abstract, memory) with windowed arithmetic, measured
//! uncomputation and coset representation, none of which is used here.

use super::multiply::multiply_mod_in_place;
use super::{Bit, Builder};
use crate::circuit::Line;
use crate::spec::BigUint;
use num_traits::One;

/// `x -> x * c^e mod n` under `ctrl`.
pub(super) fn power(
    b: &mut Builder,
    e: &[Line],
    x: &[Line],
    c: &BigUint,
    n: &BigUint,
    ctrl: Option<Line>,
) {
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
