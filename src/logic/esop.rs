//! Cubes and exclusive-or sums of products (ESOPs), single- and multi-output.

use super::TruthTable;

/// A product of literals over at most 32 inputs: input `i` appears when bit `i`
/// of `care` is set, positive when bit `i` of `pol` is also set.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Cube {
    /// Inputs that appear.
    pub care: u32,
    /// Of those, the positive ones (always a subset of `care`).
    pub pol: u32,
}

/// A literal's state in a cube.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Literal {
    /// The input does not appear.
    Absent,
    /// `x_i`.
    Positive,
    /// `!x_i`.
    Negative,
}

impl Cube {
    /// The constant-1 cube (no literals).
    pub const ONE: Cube = Cube { care: 0, pol: 0 };

    /// Builds a cube; bits of `pol` outside `care` are dropped.
    pub fn new(care: u32, pol: u32) -> Self {
        Cube {
            care,
            pol: pol & care,
        }
    }

    /// Number of literals.
    pub fn literals(self) -> u32 {
        self.care.count_ones()
    }

    /// Whether the cube is 1 on input `x`.
    pub fn contains(self, x: u64) -> bool {
        (x as u32 & self.care) == self.pol
    }

    /// The state of input `i`.
    pub fn literal(self, i: u32) -> Literal {
        match ((self.care >> i) & 1, (self.pol >> i) & 1) {
            (0, _) => Literal::Absent,
            (_, 1) => Literal::Positive,
            _ => Literal::Negative,
        }
    }

    /// The same cube with input `i` set to `l`.
    pub fn with(self, i: u32, l: Literal) -> Cube {
        let bit = 1u32 << i;
        match l {
            Literal::Absent => Cube::new(self.care & !bit, self.pol),
            Literal::Positive => Cube::new(self.care | bit, self.pol | bit),
            Literal::Negative => Cube::new(self.care | bit, self.pol & !bit),
        }
    }

    /// Inputs on which the two cubes' literals differ.
    pub fn differ(self, other: Cube) -> u32 {
        (self.care ^ other.care) | (self.pol ^ other.pol)
    }

    /// The cube's truth table over `vars` inputs.
    pub fn table(self, vars: usize) -> TruthTable {
        let mut t = TruthTable::zeros(vars);
        let len = t.len();
        for (w, word) in t.words_mut().iter_mut().enumerate() {
            let mut v = !0u64;
            for i in 0..vars.min(32) {
                if (self.care >> i) & 1 == 0 {
                    continue;
                }
                let pattern = if let Some(&p) = super::VAR_PATTERN.get(i) {
                    p
                } else if (w >> (i - 6)) & 1 == 1 {
                    !0
                } else {
                    0
                };
                v &= if (self.pol >> i) & 1 == 1 {
                    pattern
                } else {
                    !pattern
                };
            }
            *word = v;
        }
        if len < 64 {
            t.words_mut()[0] &= (1u64 << len) - 1;
        }
        t
    }
}

/// The third literal state: `x ^ !x = 1`, `x ^ 1 = !x`, `!x ^ 1 = x`.
pub fn third(a: Literal, b: Literal) -> Literal {
    use Literal::*;
    match (a, b) {
        (Absent, Positive) | (Positive, Absent) => Negative,
        (Absent, Negative) | (Negative, Absent) => Positive,
        (Positive, Negative) | (Negative, Positive) => Absent,
        (x, _) => x,
    }
}

/// A multi-output ESOP: each term is a cube and the set of outputs it feeds
/// (bit `j` of the mask for output `j`).
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Esop {
    /// Number of inputs.
    pub vars: usize,
    /// The terms.
    pub terms: Vec<(Cube, u64)>,
}

impl Esop {
    /// Number of distinct cubes (a cube shared by outputs counts once).
    pub fn cubes(&self) -> usize {
        self.terms.len()
    }

    /// Literals over all terms.
    pub fn literals(&self) -> u32 {
        self.terms.iter().map(|(c, _)| c.literals()).sum()
    }

    /// The truth table of output `j`.
    pub fn table(&self, j: usize) -> TruthTable {
        let mut t = TruthTable::zeros(self.vars);
        for (c, outs) in &self.terms {
            if (outs >> j) & 1 == 1 {
                let ct = c.table(self.vars);
                for (a, b) in t.words_mut().iter_mut().zip(ct.words()) {
                    *a ^= b;
                }
            }
        }
        t
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cube_tables_match_pointwise() {
        for care in [0u32, 0b1, 0b101, 0b1111_0001, 0x3ff] {
            for pol in [0u32, 0xffff, 0b100] {
                let c = Cube::new(care, pol);
                let t = c.table(10);
                for x in 0..1024u64 {
                    assert_eq!(t.get(x as usize), c.contains(x));
                }
            }
        }
    }

    #[test]
    fn third_literal_is_the_xor() {
        use Literal::*;
        let value = |l: Literal, x: bool| match l {
            Absent => true,
            Positive => x,
            Negative => !x,
        };
        for a in [Absent, Positive, Negative] {
            for b in [Absent, Positive, Negative] {
                if a == b {
                    continue;
                }
                for x in [false, true] {
                    assert_eq!(value(third(a, b), x), value(a, x) ^ value(b, x));
                }
            }
        }
    }
}
