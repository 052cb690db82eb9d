//! ESOP figures for BENCHMARKS.md. Run with `cargo bench --bench esop`;
//! sections can be picked: `cargo bench --bench esop -- heuristic toffoli scale refusals`.

mod common;
use common::*;

use oraculum::logic::TruthTable;
use oraculum::pipeline::build_one;
use oraculum::synth::{esop_counted, minimize_tables, EsopWork, SynthError};
use oraculum::SpecBody;
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
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with('-'))
        .collect();
    let wants = |s: &str| args.is_empty() || args.iter().any(|a| a == s);
    if wants("heuristic") {
        heuristic();
    }
    let mut rng = Mix(42);
    if wants("toffoli") {
        toffoli(&mut rng);
    }
    if wants("scale") {
        scale(&mut rng);
    }
    if wants("refusals") {
        refusals();
    }
}

/// Random tables past the default gate cap, refused with exit 3: the time
/// the command line takes to say so (reading the spec included), and in
/// process the reading and the refusal apart, with the cubes built before it.
fn refusals() {
    let exe = env!("CARGO_BIN_EXE_oraculum");
    let dir = tempfile::tempdir().unwrap();
    println!("random tables, `oraculum synth SPEC --method esop --no-verify`, default --max-gates 2,000,000:");
    println!(
        "inputs outputs  spec MB  exit  command s  read s  refusal s  cubes built  gates counted"
    );
    let mut rng = Mix(24);
    for (n, m) in [
        (20usize, 8usize),
        (20, 16),
        (22, 8),
        (22, 16),
        (24, 8),
        (24, 16),
    ] {
        let text = random_spec(&mut rng, n, m);
        let path = dir.path().join(format!("r{n}x{m}.toml"));
        std::fs::write(&path, &text).unwrap();
        let t = Instant::now();
        let o = std::process::Command::new(exe)
            .args([
                "synth",
                path.to_str().unwrap(),
                "--method",
                "esop",
                "--no-verify",
            ])
            .args(["-o", dir.path().join("out.qasm").to_str().unwrap()])
            .output()
            .unwrap();
        let command = t.elapsed().as_secs_f64();
        let t = Instant::now();
        let spec = parse_spec("r", &text).unwrap();
        let read = t.elapsed().as_secs_f64();
        let SpecBody::Function(f) = &spec.body else {
            unreachable!()
        };
        let mut work = EsopWork::default();
        let t = Instant::now();
        let r = esop_counted(f, &SynthLimits::default(), &mut work, &());
        let refusal = t.elapsed().as_secs_f64();
        let counted = match r {
            Err(SynthError::Limit { value, .. }) => value.to_string(),
            Err(e) => format!("error: {e}"),
            Ok(e) => format!("not refused: {} terms", e.terms.len()),
        };
        println!(
            "{n:6} {m:7} {:8.1} {:5} {command:10.2} {read:7.2} {refusal:10.2} {:12} {counted:>14}",
            text.len() as f64 / 1e6,
            o.status
                .code()
                .map_or("none".to_string(), |c| c.to_string()),
            work.cubes,
        );
    }
}

/// 1. The heuristic over every 4-input function, against the exact table.
fn heuristic() {
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
}

/// 2. Lowered Toffoli counts, esop against reed-muller, random functions.
fn toffoli(rng: &mut Mix) {
    let no_verify = BuildOptions {
        verify: None,
        ..Default::default()
    };
    for n in [6usize, 8, 10] {
        let (mut rm, mut es, mut secs) = (0usize, 0usize, 0f64);
        let count = 1000;
        for k in 0..count {
            let m = 1 + k % 4;
            let spec = parse_spec("r", &random_spec(rng, n, m)).unwrap();
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
}

/// 3. Scale.
fn scale(rng: &mut Mix) {
    let big = BuildOptions {
        verify: None,
        limits: SynthLimits {
            max_gates: 50_000_000,
            ..SynthLimits::default()
        },
        ..Default::default()
    };
    for (n, m) in [(16usize, 1usize), (16, 16), (20, 1)] {
        let spec = parse_spec("r", &random_spec(rng, n, m)).unwrap();
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
