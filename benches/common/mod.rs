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

/// A one-output spec over `n` inputs: the XOR of `terms` random products of 2
/// to 5 distinct inputs, as an expression.
pub fn xor_of_products(rng: &mut Mix, n: usize, terms: usize) -> String {
    let t: Vec<String> = (0..terms)
        .map(|_| {
            let k = 2 + (rng.next() % 4) as usize;
            let mut vars: Vec<usize> = Vec::new();
            while vars.len() < k {
                let v = (rng.next() % n as u64) as usize;
                if !vars.contains(&v) {
                    vars.push(v);
                }
            }
            vars.iter()
                .map(|v| format!("v{v}"))
                .collect::<Vec<_>>()
                .join(" & ")
        })
        .collect();
    format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [\"f\"]\n[expr]\nf = \"{}\"\n",
        names(n),
        t.join(" ^ ")
    )
}
