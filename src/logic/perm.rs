//! Permutations of `2^width` basis states: reversible functions synthesized in place.

/// The most lines a permutation spec may have (2^24 images).
pub const MAX_PERMUTATION_WIDTH: usize = 24;

/// A bijection on `0..2^width`; `images[i] = f(i)`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Permutation {
    width: usize,
    images: Vec<u64>,
}

/// Why a list of images is not a permutation.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum PermutationError {
    /// Width past [`MAX_PERMUTATION_WIDTH`].
    #[error("a permutation takes at most {MAX_PERMUTATION_WIDTH} lines, this one has {0}")]
    TooWide(usize),
    /// Not `2^width` images.
    #[error("width {width} needs {expected} images, found {found}")]
    WrongCount {
        /// Lines.
        width: usize,
        /// `2^width`.
        expected: usize,
        /// What was given.
        found: usize,
    },
    /// An image past `2^width - 1`.
    #[error("image {value} at position {index} is out of range 0..{limit}")]
    OutOfRange {
        /// Position in the list.
        index: usize,
        /// The image.
        value: u64,
        /// `2^width`.
        limit: u64,
    },
    /// Two inputs map to the same image.
    #[error(
        "image {value} at position {index} already appears at position {first}: not a bijection"
    )]
    Repeated {
        /// Position of the second occurrence.
        index: usize,
        /// Position of the first.
        first: usize,
        /// The image.
        value: u64,
    },
}

impl Permutation {
    /// Validates `images` as a bijection on `width` bits.
    pub fn new(width: usize, images: Vec<u64>) -> Result<Self, PermutationError> {
        if width > MAX_PERMUTATION_WIDTH {
            return Err(PermutationError::TooWide(width));
        }
        let size = 1usize << width;
        if images.len() != size {
            return Err(PermutationError::WrongCount {
                width,
                expected: size,
                found: images.len(),
            });
        }
        let mut seen = vec![usize::MAX; size];
        for (index, &value) in images.iter().enumerate() {
            if value >= size as u64 {
                return Err(PermutationError::OutOfRange {
                    index,
                    value,
                    limit: size as u64,
                });
            }
            let slot = &mut seen[value as usize];
            if *slot != usize::MAX {
                return Err(PermutationError::Repeated {
                    index,
                    first: *slot,
                    value,
                });
            }
            *slot = index;
        }
        Ok(Permutation { width, images })
    }

    /// The identity on `width` lines.
    pub fn identity(width: usize) -> Self {
        Permutation {
            width,
            images: (0..1u64 << width).collect(),
        }
    }

    /// Number of lines.
    pub fn width(&self) -> usize {
        self.width
    }

    /// `images[i] = f(i)`.
    pub fn images(&self) -> &[u64] {
        &self.images
    }

    /// `f(i)`.
    pub fn apply(&self, i: u64) -> u64 {
        self.images[i as usize]
    }

    /// The inverse permutation.
    pub fn inverse(&self) -> Permutation {
        let mut inv = vec![0; self.images.len()];
        for (i, &v) in self.images.iter().enumerate() {
            inv[v as usize] = i as u64;
        }
        Permutation {
            width: self.width,
            images: inv,
        }
    }

    /// Whether the permutation is even (a product of an even number of transpositions).
    pub fn is_even(&self) -> bool {
        let mut seen = vec![false; self.images.len()];
        let mut transpositions = 0usize;
        for start in 0..self.images.len() {
            let mut len = 0usize;
            let mut i = start;
            while !seen[i] {
                seen[i] = true;
                i = self.images[i] as usize;
                len += 1;
            }
            transpositions += len.saturating_sub(1);
        }
        transpositions.is_multiple_of(2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn validation() {
        assert!(Permutation::new(2, vec![1, 0, 3, 2]).is_ok());
        assert!(matches!(
            Permutation::new(2, vec![1, 0, 3]),
            Err(PermutationError::WrongCount { .. })
        ));
        assert!(matches!(
            Permutation::new(2, vec![1, 0, 4, 2]),
            Err(PermutationError::OutOfRange { index: 2, .. })
        ));
        assert!(matches!(
            Permutation::new(2, vec![1, 0, 1, 2]),
            Err(PermutationError::Repeated {
                index: 2,
                first: 0,
                ..
            })
        ));
    }

    #[test]
    fn inverse_and_parity() {
        let p = Permutation::new(3, vec![7, 0, 1, 3, 4, 2, 6, 5]).unwrap();
        let q = p.inverse();
        for i in 0..8 {
            assert_eq!(q.apply(p.apply(i)), i);
        }
        // A single transposition is odd; the identity is even.
        assert!(!Permutation::new(1, vec![1, 0]).unwrap().is_even());
        assert!(Permutation::identity(3).is_even());
    }
}
