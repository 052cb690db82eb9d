//! ESOP figures for BENCHMARKS.md. Run with `cargo bench --bench esop`.

mod common;
use common::*;

use oraculum::logic::TruthTable;
use oraculum::pipeline::build_one;
use oraculum::synth::minimize_tables;
use oraculum::Tables;
use oraculum::{parse_spec, BuildOptions, Method, SynthLimits};
use std::time::Instant;

fn random_spec(rng: &mut Mix, n: usize, m: usize) -> String {
    let outs: Vec<String> = (0..m).map(|j| format!("\"f{j}\"")).collect();
    let mut s = format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [{}]\n[table]\n",
        names(n),
        outs.join(", ")
    );
    for j in 0..m {
        let digits: String = (0..((1usize << n) / 4).max(1))
            .map(|_| char::from_digit((rng.next() % 16) as u32, 16).unwrap())
            .collect();
        s.push_str(&format!("f{j} = \"0x{digits}\"\n"));
    }
    s
}

fn main() {
    // 1. The heuristic over every 4-input function, against the exact table.
    let t = Instant::now();
    let exact = Tables::get().esop(4);
    let (mut heur, mut opt, mut worse) = (0usize, 0usize, 0usize);
    for f in 0..65536u64 {
        let tt = TruthTable::from_words(4, &[f]);
        let h = minimize_tables(&[tt]).cubes();
        let o = exact.size(f as usize);
        assert!(h >= o);
        heur += h;
        opt += o;
        worse += (h > o) as usize;
    }
    println!(
        "4-input functions: esop heuristic average {:.4} cubes, exact {:.4} ({:+.2}%), {} of 65536 above the minimum, {:.1} s",
        heur as f64 / 65536.0,
        opt as f64 / 65536.0,
        100.0 * (heur as f64 / opt as f64 - 1.0),
        worse,
        t.elapsed().as_secs_f64()
    );

    // 2. Lowered Toffoli counts, esop against reed-muller, random functions.
    let mut rng = Mix(42);
    let no_verify = BuildOptions {
        verify: None,
        ..Default::default()
    };
    for n in [6usize, 8, 10] {
        let (mut rm, mut es, mut secs) = (0usize, 0usize, 0f64);
        let count = 1000;
        for k in 0..count {
            let m = 1 + k % 4;
            let spec = parse_spec("r", &random_spec(&mut rng, n, m)).unwrap();
            let a = build_one(&spec, Method::ReedMuller, &no_verify, &()).unwrap();
            let b = build_one(&spec, Method::Esop, &no_verify, &()).unwrap();
            rm += a.cost.toffoli;
            es += b.cost.toffoli;
            secs += b.timings.synth;
        }
        println!(
            "random {n}-input functions, 1-4 outputs, {count} of them: average Toffoli reed-muller {:.1}, esop {:.1} ({:+.1}%); esop synthesis {:.2} ms each",
            rm as f64 / count as f64,
            es as f64 / count as f64,
            100.0 * (es as f64 / rm as f64 - 1.0),
            1000.0 * secs / count as f64
        );
    }

    // 3. Scale.
    let big = BuildOptions {
        verify: None,
        limits: SynthLimits {
            max_gates: 50_000_000,
            ..SynthLimits::default()
        },
        ..Default::default()
    };
    for (n, m) in [(16usize, 1usize), (16, 16), (20, 1)] {
        let spec = parse_spec("r", &random_spec(&mut rng, n, m)).unwrap();
        let t = Instant::now();
        let o = build_one(&spec, Method::Esop, &big, &()).unwrap();
        println!(
            "random {n}-input {m}-output function: esop {} terms -> {} Toffoli, synth {:.2} s, lower {:.2} s (total {:.2} s)",
            o.cost.mct_total(),
            o.cost.toffoli,
            o.timings.synth,
            o.timings.lower,
            t.elapsed().as_secs_f64()
        );
    }
    // A structured 20-input, 16-output function: each output an XOR of 12
    // random products of 2 to 4 literals.
    let mut s = format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [{}]\n[expr]\n",
        names(20),
        (0..16)
            .map(|j| format!("\"f{j}\""))
            .collect::<Vec<_>>()
            .join(", ")
    );
    for j in 0..16 {
        let terms: Vec<String> = (0..12)
            .map(|_| {
                let k = 2 + (rng.next() % 3) as usize;
                (0..k)
                    .map(|_| {
                        let v = rng.next() % 20;
                        if rng.next().is_multiple_of(2) {
                            format!("v{v}")
                        } else {
                            format!("!v{v}")
                        }
                    })
                    .collect::<Vec<_>>()
                    .join(" & ")
            })
            .collect();
        s.push_str(&format!("f{j} = \"{}\"\n", terms.join(" ^ ")));
    }
    let spec = parse_spec("s", &s).unwrap();
    let t = Instant::now();
    let o = build_one(&spec, Method::Esop, &big, &()).unwrap();
    println!(
        "structured 20-input 16-output function: esop {} gates -> {} Toffoli, {} qubits, total {:.2} s",
        o.cost.mct_total(),
        o.cost.toffoli,
        o.cost.qubits,
        t.elapsed().as_secs_f64()
    );
}
