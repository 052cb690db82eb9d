//! Truth tables over `n` inputs, stored little-endian in a bit vector (bit `i` is `f(i)`).

use bitvec::prelude::*;

/// Bit `k` of `VAR_PATTERN[i]` is bit `i` of `k`: input `i < 6` across the 64
/// entries of one table word.
pub const VAR_PATTERN: [u64; 6] = [
    0xaaaa_aaaa_aaaa_aaaa,
    0xcccc_cccc_cccc_cccc,
    0xf0f0_f0f0_f0f0_f0f0,
    0xff00_ff00_ff00_ff00,
    0xffff_0000_ffff_0000,
    0xffff_ffff_0000_0000,
];

/// The most inputs a truth table may have (2^30 bits = 128 MiB).
pub const MAX_TABLE_VARS: usize = 30;

/// A single-output Boolean function of `vars` inputs; bit `i` is `f(i)`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TruthTable {
    vars: usize,
    bits: BitVec<u64, Lsb0>,
}

/// Why a table string was refused; `offset` is a byte offset into the string.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct TableError {
    /// Byte offset of the problem inside the table string.
    pub offset: usize,
    /// What is wrong.
    pub message: String,
}

impl TruthTable {
    /// The constant-0 function.
    ///
    /// # Panics
    /// If `vars` exceeds [`MAX_TABLE_VARS`]; callers check the limit first.
    pub fn zeros(vars: usize) -> Self {
        assert!(vars <= MAX_TABLE_VARS, "truth table too large");
        TruthTable {
            vars,
            bits: bitvec![u64, Lsb0; 0; 1usize << vars],
        }
    }

    /// Builds a table from a predicate on the input index.
    pub fn from_fn(vars: usize, f: impl Fn(u64) -> bool) -> Self {
        let mut t = TruthTable::zeros(vars);
        for i in 0..t.len() {
            if f(i as u64) {
                t.bits.set(i, true);
            }
        }
        t
    }

    /// Builds a table from raw little-endian words (bits past `2^vars` are ignored).
    pub fn from_words(vars: usize, words: &[u64]) -> Self {
        let mut t = TruthTable::zeros(vars);
        let n = t.len();
        let raw = t.bits.as_raw_mut_slice();
        for (dst, src) in raw.iter_mut().zip(words) {
            *dst = *src;
        }
        if n < 64 {
            raw[0] &= (1u64 << n) - 1;
        }
        t
    }

    /// Parses `0x...` (hex) or `0b...` (binary): bit `i` of the integer is `f(i)`.
    ///
    /// The digit count must fit the table exactly: `2^vars` binary digits, or
    /// `max(1, 2^vars / 4)` hex digits; `_` may separate digits. A hex table for
    /// fewer than two inputs must leave the bits past `2^vars` at 0.
    pub fn parse(text: &str, vars: usize) -> Result<Self, TableError> {
        let err = |offset: usize, message: String| TableError { offset, message };
        if vars > MAX_TABLE_VARS {
            return Err(err(
                0,
                format!(
                    "a truth table takes at most {MAX_TABLE_VARS} inputs, this spec has {vars}"
                ),
            ));
        }
        let (radix_bits, body_start) = if text.starts_with("0x") || text.starts_with("0X") {
            (4u32, 2)
        } else if text.starts_with("0b") || text.starts_with("0B") {
            (1u32, 2)
        } else {
            return Err(err(
                0,
                "a table string starts with 0x (hex) or 0b (binary)".into(),
            ));
        };
        let size = 1usize << vars;
        let body = &text[body_start..];
        let kind = if radix_bits == 4 { "hex" } else { "binary" };
        // First pass: every digit valid, and as many as the table needs,
        // before anything the size of the table is allocated.
        let mut count = 0usize;
        for (i, c) in body.char_indices() {
            if c == '_' {
                continue;
            }
            if c.to_digit(1 << radix_bits).is_none() {
                return Err(err(i + body_start, format!("'{c}' is not a {kind} digit")));
            }
            count += 1;
        }
        let want = if radix_bits == 4 {
            (size / 4).max(1)
        } else {
            size
        };
        if count != want {
            return Err(err(
                0,
                format!(
                    "{vars} inputs need {want} {kind} digits ({size} table bits), found {count}"
                ),
            ));
        }
        // Second pass, from the last digit (the lowest bits) up.
        let mut t = TruthTable::zeros(vars);
        let mut k = 0usize;
        for (i, c) in body.char_indices().rev() {
            let Some(v) = c.to_digit(1 << radix_bits) else {
                continue;
            };
            for b in 0..radix_bits as usize {
                if (v >> b) & 1 == 1 {
                    let bit = k * radix_bits as usize + b;
                    if bit >= size {
                        return Err(err(
                            i + body_start,
                            format!(
                                "bit {bit} is set, but {vars} inputs give only {size} table bits"
                            ),
                        ));
                    }
                    t.bits.set(bit, true);
                }
            }
            k += 1;
        }
        Ok(t)
    }

    /// Number of inputs.
    pub fn vars(&self) -> usize {
        self.vars
    }

    /// Number of entries, `2^vars`.
    pub fn len(&self) -> usize {
        self.bits.len()
    }

    /// Always false: a table has at least one entry.
    pub fn is_empty(&self) -> bool {
        false
    }

    /// `f(i)`.
    pub fn get(&self, i: usize) -> bool {
        self.bits[i]
    }

    /// Sets `f(i)`.
    pub fn set(&mut self, i: usize, value: bool) {
        self.bits.set(i, value);
    }

    /// The table as little-endian words; bits past `2^vars` are 0.
    pub fn words(&self) -> &[u64] {
        self.bits.as_raw_slice()
    }

    /// Mutable words; callers keep bits past `2^vars` at 0.
    pub fn words_mut(&mut self) -> &mut [u64] {
        self.bits.as_raw_mut_slice()
    }

    /// Number of inputs where `f` is 1.
    pub fn count_ones(&self) -> usize {
        self.bits.count_ones()
    }

    /// The table as a hex string in the spec's format.
    pub fn to_hex(&self) -> String {
        let digits = (self.len() / 4).max(1);
        let mut s = String::with_capacity(digits + 2);
        s.push_str("0x");
        for k in (0..digits).rev() {
            let mut v = 0;
            for b in 0..4 {
                let i = 4 * k + b;
                if i < self.len() && self.get(i) {
                    v |= 1 << b;
                }
            }
            s.push(char::from_digit(v, 16).unwrap_or('0'));
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Majority of three is 0xe8 and three-input XOR is 0x96: the convention of
    // design.md (bit i of the integer is f(i)), a fact of the trade, no source.
    #[test]
    fn majority_and_parity_strings() {
        let maj = TruthTable::from_fn(3, |i| i.count_ones() >= 2);
        assert_eq!(maj.to_hex(), "0xe8");
        assert_eq!(TruthTable::parse("0xe8", 3).unwrap(), maj);
        let xor3 = TruthTable::from_fn(3, |i| i.count_ones() % 2 == 1);
        assert_eq!(xor3.to_hex(), "0x96");
        assert_eq!(TruthTable::parse("0b10010110", 3).unwrap(), xor3);
        let and2 = TruthTable::from_fn(2, |i| i == 3);
        assert_eq!(TruthTable::parse("0x8", 2).unwrap(), and2);
    }

    #[test]
    fn wrong_lengths_and_stray_bits_are_refused() {
        assert!(TruthTable::parse("0xe", 3).is_err());
        assert!(TruthTable::parse("0x0e8", 3).is_err());
        assert!(TruthTable::parse("0b101", 2).is_err());
        // One input has 2 table bits; 0x4 sets bit 2.
        let e = TruthTable::parse("0x4", 1).unwrap_err();
        assert!(e.message.contains("bit 2"), "{}", e.message);
        assert!(TruthTable::parse("0x2", 1).unwrap().get(1));
        let e = TruthTable::parse("0xg8", 3).unwrap_err();
        assert_eq!(e.offset, 2);
        assert_eq!(TruthTable::parse("0x_e8", 3).unwrap().to_hex(), "0xe8");
    }

    #[test]
    fn wide_tables_round_trip_through_words() {
        let t = TruthTable::from_fn(10, |i| (i * 2654435761) % 7 < 3);
        let u = TruthTable::from_words(10, t.words());
        assert_eq!(t, u);
        assert_eq!(TruthTable::parse(&t.to_hex(), 10).unwrap(), t);
    }
}
