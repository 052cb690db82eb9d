//! Bennett figures for BENCHMARKS.md: qubits against Toffolis under budgets,
//! plain Bennett's gate count beside 2G + m, and the 64-input spec's time.
//! Then pebbling's growth: random networks with reuse of 10^2 to 10^5 nodes
//! under budgets of a half, a quarter and an eighth of their nodes.
//! Run with `cargo bench --bench networks`.

use oraculum::pipeline::build_one;
use oraculum::pipeline::tradeoff;
use oraculum::synth::bennett_counts;
use oraculum::{parse_spec, BuildOptions, Method, SpecBody, SynthLimits};
use std::time::Instant;

fn main() {
    let root = env!("CARGO_MANIFEST_DIR");
    let opts = BuildOptions {
        method: Some(Method::Bennett),
        limits: SynthLimits {
            exact_seconds: 20.0,
            ..SynthLimits::default()
        },
        verify: Some(Default::default()),
        ..BuildOptions::default()
    };
    // A network of our own: a 12-input scheduling predicate with shared terms.
    let sched = "kind = \"function\"\nname = \"room-plan\"\ninputs = [\"m0\",\"m1\",\"m2\",\"m3\",\"m4\",\"m5\",\"r0\",\"r1\",\"r2\",\"r3\",\"r4\",\"r5\"]\noutputs = [\"ok\", \"tight\"]\n[let]\nclash = \"m0 & r0 | m1 & r1 | m2 & r2 | m3 & r3 | m4 & r4 | m5 & r5\"\nload = \"(m0 ^ m1 ^ m2) & (m3 | m4 | m5)\"\n[expr]\nok = \"!clash & load & (r0 | r1)\"\ntight = \"clash ^ load & r5\"\n";
    let specs: Vec<(String, String)> = vec![
        (
            "shift-rota".into(),
            std::fs::read_to_string(format!("{root}/specs/shift-rota.toml")).unwrap(),
        ),
        (
            "seating-plan".into(),
            std::fs::read_to_string(format!("{root}/specs/seating.toml")).unwrap(),
        ),
        ("room-plan".into(), sched.to_string()),
    ];
    println!("| network | qubits | Toffoli | CNOT | verified |");
    println!("|---|---|---|---|---|");
    for (name, text) in &specs {
        let s = parse_spec(name, text).unwrap();
        let t = Instant::now();
        let curve = tradeoff(&s, &opts);
        let secs = t.elapsed().as_secs_f64();
        for note in &curve.notes {
            println!("| {name}: {note} | | | | |");
        }
        for o in &curve.points {
            println!(
                "| {name} | {} | {} | {} | {} |",
                o.cost.qubits,
                o.cost.toffoli,
                o.cost.cnot,
                o.verification.is_proven()
            );
        }
        println!(
            "| {name}: {} points in {secs:.2} s | | | | |",
            curve.points.len()
        );
    }
    println!();
    for (name, text) in &specs {
        let s = parse_spec(name, text).unwrap();
        let SpecBody::Function(f) = &s.body else {
            unreachable!()
        };
        let (g, m) = bennett_counts(f).unwrap();
        let o = build_one(&s, Method::Bennett, &opts, &()).unwrap();
        println!(
            "{name}: plain Bennett {} gates; forward G = {g}, copies m = {m}, 2G + m = {}",
            o.mct.gates().len(),
            2 * g + m
        );
    }
    let text = std::fs::read_to_string(format!("{root}/specs/badge-match.toml")).unwrap();
    let s = parse_spec("badge-match", &text).unwrap();
    let t = Instant::now();
    let o = build_one(
        &s,
        Method::Bennett,
        &BuildOptions {
            verify: None,
            ..opts
        },
        &(),
    )
    .unwrap();
    let synth = t.elapsed().as_secs_f64();
    let t = Instant::now();
    let v = build_one(&s, Method::Bennett, &opts, &()).unwrap();
    println!(
        "badge-match (64 inputs): {} qubits, {} Toffoli; synthesized and lowered in {synth:.4} s; with SAT proof {:.3} s ({})",
        o.cost.qubits, o.cost.toffoli, t.elapsed().as_secs_f64(), v.verification.is_proven()
    );
    pebbling_growth();
}

/// A function spec of our own: 16 inputs and `n` shared definitions, each an
/// XOR of two of the eight signals before it ANDed with a third; three
/// outputs.
fn random_network(n: usize, seed: u64) -> String {
    let mut state = seed;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    let inputs: Vec<String> = (0..16).map(|i| format!("\"i{i}\"")).collect();
    let mut signals: Vec<String> = (0..16).map(|i| format!("i{i}")).collect();
    let mut text = format!(
        "kind = \"function\"\nname = \"grown\"\ninputs = [{}]\noutputs = [\"o0\", \"o1\", \"o2\"]\n[let]\n",
        inputs.join(", ")
    );
    for k in 0..n {
        let len = signals.len();
        // Three distinct signals of the last eight: an XOR and an AND.
        let i = 1 + next() as usize % 8;
        let j = 1 + (i + next() as usize % 7) % 8;
        let l = (1..=8).find(|&l| l != i && l != j).unwrap();
        let (a, b, c) = (&signals[len - i], &signals[len - j], &signals[len - l]);
        text.push_str(&format!("n{k} = \"({a} ^ {b}) & !{c}\"\n"));
        signals.push(format!("n{k}"));
    }
    text.push_str(&format!(
        "[expr]\no0 = \"n{}\"\no1 = \"n{}\"\no2 = \"n{}\"\n",
        n - 1,
        n - 2,
        n - 3
    ));
    text
}

fn pebbling_growth() {
    println!();
    println!("| nodes | ancillae of plain Bennett | budget | qubits | Toffoli | seconds |");
    println!("|---|---|---|---|---|---|");
    for n in [100usize, 1_000, 10_000, 100_000] {
        let s = parse_spec("grown", &random_network(n, 0x5eed + n as u64)).unwrap();
        // Bennett within `max_qubits`, synthesized and lowered, not verified.
        let within = |max_qubits: Option<usize>| {
            let limits = SynthLimits {
                exact_seconds: 5.0,
                max_gates: 100_000_000,
                max_qubits,
                ..SynthLimits::default()
            };
            let opts = BuildOptions {
                method: Some(Method::Bennett),
                limits,
                verify: None,
                ..BuildOptions::default()
            };
            build_one(&s, Method::Bennett, &opts, &())
        };
        let t = Instant::now();
        let plain = within(None).unwrap();
        let ancillae = plain.cost.qubits - 19;
        println!(
            "| {n} | {ancillae} | none | {} | {} | {:.2} |",
            plain.cost.qubits,
            plain.cost.toffoli,
            t.elapsed().as_secs_f64()
        );
        for share in [2usize, 4, 8] {
            let budget = 19 + ancillae / share;
            let t = Instant::now();
            let o = within(Some(budget));
            let secs = t.elapsed().as_secs_f64();
            match o {
                Ok(o) => println!(
                    "| {n} | {ancillae} | {budget} | {} | {} | {secs:.2} |",
                    o.cost.qubits, o.cost.toffoli
                ),
                Err(e) => {
                    println!("| {n} | {ancillae} | {budget} | no schedule: {e} | | {secs:.2} |")
                }
            }
        }
    }
}
