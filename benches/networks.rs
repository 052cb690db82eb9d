//! Bennett figures for BENCHMARKS.md: qubits against Toffolis under budgets,
//! plain Bennett's gate count beside 2G + m, and the 64-input spec's time.
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
        for o in &curve {
            println!(
                "| {name} | {} | {} | {} | {} |",
                o.cost.qubits,
                o.cost.toffoli,
                o.cost.cnot,
                o.verification.is_proven()
            );
        }
        println!("| {name}: {} budgets in {secs:.2} s | | | | |", curve.len());
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
}
