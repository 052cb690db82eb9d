//! Shared pieces of the benchmarks.
#![allow(dead_code)]

/// SplitMix64: a small deterministic generator, so every run measures the same inputs.
pub struct Mix(pub u64);

impl Mix {
    /// The next 64 random bits.
    pub fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
}

/// `"v0", "v1", ...` for an `inputs` list.
pub fn names(n: usize) -> String {
    (0..n)
        .map(|i| format!("\"v{i}\""))
        .collect::<Vec<_>>()
        .join(", ")
}
