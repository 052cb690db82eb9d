//! Four-bit reversible functions packed in a `u64` (nibble `i` is the image of `i`) and the 32-gate library acting on them.

use crate::circuit::{Control, Gate, Line};

pub(super) const NIBBLES: u64 = 0x1111_1111_1111_1111;

pub(super) const LOW60: u64 = (1 << 60) - 1;

/// A 4-bit reversible function: nibble `i` holds the image of `i`.
pub(super) type Perm = u64;

/// Packs 16 images into nibbles.
pub fn pack(images: &[u64]) -> Perm {
    images
        .iter()
        .enumerate()
        .fold(0, |a, (i, &v)| a | (v & 15) << (4 * i))
}

/// Whether `images` is a reversible function of 4 bits.
pub(super) fn is_permutation(images: &[u64]) -> bool {
    images.len() == 16
        && images.iter().fold(0u32, |seen, &v| seen | 1 << (v & 15)) == 0xffff
        && images.iter().all(|&v| v < 16)
}

pub(super) fn image(p: Perm, i: u64) -> u64 {
    (p >> (4 * i)) & 15
}

pub(super) fn inverse(p: Perm) -> Perm {
    (0..16).fold(0, |a, i| a | i << (4 * image(p, i)))
}

/// `f . x`: first `x`, then `f`.
pub(super) fn compose(f: Perm, x: Perm) -> Perm {
    (0..16).fold(0, |a, i| a | image(f, image(x, i)) << (4 * i))
}

/// Exchanges the nibbles selected by `mask` with those `shift` bits above.
pub(super) fn delta_swap(p: u64, mask: u64, shift: u32) -> u64 {
    let d = ((p >> shift) ^ p) & mask;
    p ^ d ^ (d << shift)
}

/// A gate of the library, with what it does to values and to positions.
#[derive(Clone, Copy)]
pub(super) struct LibGate {
    pub(super) controls: u64,
    pub(super) target: u64,
    /// Nibbles at the positions where the gate fires and the target bit is 0.
    pub(super) position_mask: u64,
}

impl LibGate {
    /// `g . p`: the gate applied after `p`.
    pub(super) fn after(&self, p: Perm) -> Perm {
        let mut fire = NIBBLES;
        for b in 0..4 {
            if (self.controls >> b) & 1 == 1 {
                fire &= p >> b;
            }
        }
        p ^ ((fire & NIBBLES) << self.target)
    }

    /// `p . g`: the gate applied before `p`.
    pub(super) fn before(&self, p: Perm) -> Perm {
        delta_swap(p, self.position_mask, 4 << self.target)
    }

    pub(super) fn gate(&self) -> Gate {
        let controls = (0..4u32)
            .filter(|b| (self.controls >> b) & 1 == 1)
            .map(Control::pos)
            .collect();
        Gate::new(controls, Line(self.target as u32)).expect("target outside the controls")
    }
}

/// The 32 gates: every set of controls among the other three lines, 8 per target.
pub(super) fn library() -> Vec<LibGate> {
    let mut v = Vec::with_capacity(32);
    for target in 0..4u64 {
        for controls in 0u64..16 {
            if controls & (1 << target) == 0 {
                let position_mask = (0..16u64)
                    .filter(|x| x & controls == controls && x & (1 << target) == 0)
                    .fold(0, |m, x| m | 15 << (4 * x));
                v.push(LibGate {
                    controls,
                    target,
                    position_mask,
                });
            }
        }
    }
    v
}
