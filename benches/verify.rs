//! Verifier throughput for BENCHMARKS.md: the verifier on 1 and 2 threads, a
//! plain per-state simulator, and an AND/XOR microkernel over the same words,
//! all in one run; then SAT equivalence time for wide adders.
//! Run with `cargo bench --bench verify`.

mod common;
use common::*;

use oraculum::pipeline::build_one;
use oraculum::synth::synthesize;
use oraculum::verify::BLOCK_WORDS;
use oraculum::{
    lower, parse_spec, verify, BuildOptions, Method, Route, SynthLimits, Verdict, VerifyOptions,
};
use std::hint::black_box;
use std::time::Instant;

fn best_of<T>(runs: usize, mut f: impl FnMut() -> T) -> (f64, T) {
    let mut best = f64::MAX;
    let mut last = None;
    for _ in 0..runs {
        let t = Instant::now();
        let r = f();
        best = best.min(t.elapsed().as_secs_f64());
        last = Some(r);
    }
    (best, last.expect("at least one run"))
}

fn main() {
    let mut rng = Mix(7);
    let spec = parse_spec("bench", &xor_of_products(&mut rng, 20, 200)).unwrap();
    let c = lower(
        &synthesize(&spec, Method::ReedMuller, &SynthLimits::default(), &())
            .unwrap()
            .circuit,
    );
    let gates = c.gates().len() as f64;
    let states = 1u64 << 21;
    let work = states as f64 * gates;
    println!(
        "circuit: {} lines, {} gates; {} basis states",
        c.width(),
        gates,
        states
    );

    for threads in [1usize, 2] {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        let (t, v) = best_of(3, || {
            pool.install(|| verify(&c, &spec, &VerifyOptions::default()).unwrap())
        });
        assert!(matches!(v, Verdict::Proven { .. }));
        println!(
            "verifier, {threads} thread(s): {t:.3} s = {:.3e} gate x state evaluations/s",
            work / t
        );
    }

    // A plain simulator: one basis state at a time, one gate at a time.
    let sample = 1u64 << 15;
    let (t, acc) = best_of(3, || {
        let mut acc = 0u64;
        for s in 0..sample {
            acc ^= c.simulate(black_box(s));
        }
        acc
    });
    black_box(acc);
    println!(
        "per-state simulator (1 thread, {sample} states): {:.3e} gate x state evaluations/s",
        sample as f64 * gates / t
    );

    // The microkernel: the verifier's inner loop alone, AND of two control rows
    // XORed into a target row, over the same number of words, 1 thread.
    let lines = c.width();
    let mut rows = vec![0u64; lines * BLOCK_WORDS];
    for (i, w) in rows.iter_mut().enumerate() {
        *w = (i as u64).wrapping_mul(0x9e37_79b9_7f4a_7c15);
    }
    let ops: Vec<(usize, usize, usize)> = c
        .gates()
        .iter()
        .map(|g| {
            let cs: Vec<usize> = g.controls().iter().map(|x| x.line.index()).collect();
            let a = cs.first().copied().unwrap_or(g.target().index());
            let b = cs.get(1).copied().unwrap_or(a);
            (a, b, g.target().index())
        })
        .collect();
    let blocks = states / 64 / BLOCK_WORDS as u64;
    let (t, _) = best_of(3, || {
        for _ in 0..blocks {
            for &(a, b, tgt) in &ops {
                let row = |l: usize| l * BLOCK_WORDS..(l + 1) * BLOCK_WORDS;
                let mut fire = [0u64; BLOCK_WORDS];
                for ((f, &x), &y) in fire.iter_mut().zip(&rows[row(a)]).zip(&rows[row(b)]) {
                    *f = x & y;
                }
                for (v, f) in rows[row(tgt)].iter_mut().zip(fire) {
                    *v ^= f;
                }
            }
            black_box(&rows);
        }
    });
    println!(
        "AND/XOR microkernel (1 thread, same words): {:.3e} gate x state evaluations/s",
        work / t
    );

    // SAT equivalence of adders.
    for w in [16usize, 64, 256, 1024, 2048, 4096, 8192] {
        let runs = if w <= 256 { 3 } else { 1 };
        let s = parse_spec(
            "add",
            &format!("kind = \"arithmetic\"\nop = \"add\"\nwidth = {w}\ncarry_out = true\n"),
        )
        .unwrap();
        let o = build_one(
            &s,
            Method::Structural,
            &BuildOptions {
                verify: None,
                ..Default::default()
            },
            &(),
        )
        .unwrap();
        let sat = VerifyOptions {
            route: Route::Sat,
            ..VerifyOptions::default()
        };
        let (t, v) = best_of(runs, || verify(&o.lowered, &s, &sat).unwrap());
        assert!(matches!(v, Verdict::Proven { by: "sat", .. }));
        let mut bad = o.lowered.clone();
        let mut g = bad.gates().to_vec();
        let k = g.iter().position(|x| x.controls().len() == 2).unwrap() + 2 * w / 3;
        g.remove(k);
        bad.set_gates(g);
        let (tb, vb) = best_of(runs, || verify(&bad, &s, &sat).unwrap());
        assert!(matches!(vb, Verdict::Refuted { .. }));
        println!("SAT, {w}-bit adder with carry-out: proven in {t:.3} s; a dropped gate refuted in {tb:.3} s");
    }
}
