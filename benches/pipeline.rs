//! Figures for BENCHMARKS.md: verifier throughput and synthesis time.
//! Run with `cargo bench --bench pipeline`; it prints one line per figure.

mod common;
use common::*;

use oraculum::synth::synthesize;
use oraculum::{
    build, lower, parse_spec, verify, BuildOptions, Method, SynthLimits, VerifyOptions,
};
use std::time::Instant;

/// A random `n`-input, one-output table spec.
fn random_table(rng: &mut Mix, n: usize) -> String {
    let digits: String = (0..(1usize << n) / 4)
        .map(|_| char::from_digit((rng.next() % 16) as u32, 16).unwrap())
        .collect();
    format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [\"f\"]\n[table]\nf = \"0x{digits}\"\n",
        names(n)
    )
}

fn main() {
    let mut rng = Mix(2026);
    let threads = rayon::current_num_threads();

    let spec = parse_spec("bench20", &xor_of_products(&mut rng, 20, 200)).unwrap();
    let lowered = lower(
        &synthesize(&spec, Method::ReedMuller, &SynthLimits::default(), &())
            .unwrap()
            .circuit,
    );
    let gates = lowered.gates().len() as f64;
    let mut best = f64::MAX;
    let mut states = 0;
    for _ in 0..3 {
        let t = Instant::now();
        let v = verify(&lowered, &spec, &VerifyOptions::default()).unwrap();
        best = best.min(t.elapsed().as_secs_f64());
        if let oraculum::Verdict::Proven { states: s, .. } = v {
            states = s;
        } else {
            panic!("the benchmark circuit must verify");
        }
    }
    println!(
        "verify 20-input function: {states} basis states x {gates} gates in {best:.3} s = {:.3e} gate-state evaluations/s ({threads} threads)",
        states as f64 * gates / best
    );

    for n in [12usize, 16] {
        let spec = parse_spec("random", &random_table(&mut rng, n)).unwrap();
        let out = build(
            &spec,
            &BuildOptions {
                method: Some(Method::ReedMuller),
                verify: Some(VerifyOptions::default()),
                ..Default::default()
            },
        )
        .unwrap();
        assert!(out.verification.is_proven());
        println!(
            "reed-muller random {n}-input function: {} MCT gates, {} Toffoli, {} qubits; synth {:.3} s, lower {:.3} s, verify {:.3} s",
            out.cost.mct_total(),
            out.cost.toffoli,
            out.cost.qubits,
            out.timings.synth,
            out.timings.lower,
            out.timings.verify
        );
    }
}
