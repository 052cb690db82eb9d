//! Multi-level oracles: Bennett's compute-copy-uncompute, qubit budgets,
//! definitions, and phase oracles checked on a statevector simulator.

mod common;

use common::*;
use oraculum::pipeline::build_one;
use oraculum::synth::bennett_counts;
use oraculum::{
    parse_spec, read_qasm, BuildOptions, Method, SpecBody, SynthError, SynthLimits, Verdict,
    Verification,
};
use proptest::prelude::*;

fn with_budget(q: Option<usize>) -> BuildOptions {
    common::tables();
    BuildOptions {
        method: Some(Method::Bennett),
        limits: SynthLimits {
            max_qubits: q,
            exact_seconds: 5.0,
            ..SynthLimits::default()
        },
        verify: Some(Default::default()),
        ..BuildOptions::default()
    }
}

fn expr_spec(n: usize, exprs: &[String]) -> String {
    let names = input_names(n);
    let quoted: Vec<String> = names.iter().map(|s| format!("\"{s}\"")).collect();
    let outs: Vec<String> = (0..exprs.len()).map(|j| format!("\"out{j}\"")).collect();
    let mut s = format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [{}]\n[expr]\n",
        quoted.join(", "),
        outs.join(", ")
    );
    for (j, e) in exprs.iter().enumerate() {
        s.push_str(&format!("out{j} = \"{e}\"\n"));
    }
    s
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 40, ..ProptestConfig::default() })]

    /// Random networks of up to 12 inputs: plain Bennett and every budget it
    /// accepts give correct outputs and clean ancillae, within the budget.
    #[test]
    fn bennett_under_every_accepted_budget((n, es) in (2usize..=12).prop_flat_map(|n| (Just(n), prop::collection::vec(arb_expr(n), 1..=3)))) {
        let names = input_names(n);
        let texts: Vec<String> = es.iter().map(|e| e.render(&names)).collect();
        let spec = parse_spec("net.toml", &expr_spec(n, &texts)).unwrap();
        let plain = build_one(&spec, Method::Bennett, &with_budget(None), &()).unwrap();
        prop_assert!(plain.verification.is_proven());
        // The test's own check on every input.
        for x in 0..1u64 << n {
            let out = plain.lowered.simulate(x);
            let want = es.iter().enumerate().fold(0u64, |a, (j, e)| a | (e.eval(x) as u64) << j);
            prop_assert_eq!((out >> n) & ((1 << es.len()) - 1), want);
            prop_assert_eq!(out >> (n + es.len()), 0, "ancillae clean");
        }
        let mut q = plain.cost.qubits;
        while q > n + es.len() {
            q -= 1;
            match build_one(&spec, Method::Bennett, &with_budget(Some(q)), &()) {
                Ok(o) => {
                    prop_assert!(o.verification.is_proven(), "budget {}", q);
                    prop_assert!(o.cost.qubits <= q);
                }
                Err(e) => {
                    let budget_error = matches!(e, oraculum::BuildError::Synth(SynthError::Budget { needed, .. }) if needed > q);
                    prop_assert!(budget_error, "{}", e);
                    break;
                }
            }
        }
    }
}

// Bennett 1973 (checks.md): a forward circuit of G gates with m outputs
// becomes 2G + m gates.
#[test]
fn plain_bennett_has_2g_plus_m_gates() {
    let text = expr_spec(
        6,
        &[
            "in0 & in1 & (in2 | in3)".into(),
            "(in4 ^ in5) & in0".into(),
            "in1 & !in2 & in3 & !in5".into(),
        ],
    );
    let spec = parse_spec("b.toml", &text).unwrap();
    let SpecBody::Function(f) = &spec.body else {
        unreachable!()
    };
    let (g, m) = bennett_counts(f).unwrap();
    assert_eq!(m, 3, "each output is a single node: one copy each");
    let out = build_one(&spec, Method::Bennett, &with_budget(None), &()).unwrap();
    assert_eq!(out.mct.gates().len(), 2 * g + m);
    assert!(out.verification.is_proven());
}

#[test]
fn a_64_input_spec_is_proven_by_sat() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/specs/badge-match.toml"
    ))
    .unwrap();
    let spec = parse_spec("badge-match.toml", &text).unwrap();
    let out = build_one(&spec, Method::Bennett, &with_budget(None), &()).unwrap();
    match out.verification {
        Verification::Ran(Verdict::Proven { by, free_bits, .. }) => {
            assert_eq!(by, "sat");
            assert_eq!(free_bits, 65);
        }
        other => panic!("{other:?}"),
    }
    // Spot checks with the test's own simulator: matching codes of odd parity open.
    let code: u128 = 0x8000_0001 ^ 0x10;
    let x = code | code << 32;
    let r = run_registers(&out.lowered, &[("x", x)]);
    assert_eq!(r["y"], 1);
    let r = run_registers(&out.lowered, &[("x", x ^ (1 << 40))]);
    assert_eq!(r["y"], 0);
    assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
}

/// The phase oracle, run by the `qasmsim` statevector simulator on the uniform
/// superposition, gives amplitude (-1)^f(x) / sqrt(2^n) on |x>|0>|0> and
/// nothing elsewhere.
#[test]
fn phase_oracle_on_a_statevector_simulator() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/specs/vault-phase.toml"
    ))
    .unwrap();
    let spec = parse_spec("vault.toml", &text).unwrap();
    let out = build_one(&spec, Method::Esop, &with_budget(None), &()).unwrap();
    assert!(out.verification.is_proven());
    let qasm = out.qasm().unwrap();
    assert_eq!(qasm.matches("\nh ").count(), 2);
    // Put the inputs into uniform superposition right after the declarations.
    let n = 4;
    let mut src = String::new();
    let mut done = false;
    for line in qasm.lines() {
        if !done
            && !line.starts_with("qreg")
            && !line.starts_with("//")
            && !line.starts_with("OPENQASM")
            && !line.starts_with("include")
        {
            for i in 0..n {
                src.push_str(&format!("h x[{i}];\n"));
            }
            done = true;
        }
        src.push_str(line);
        src.push('\n');
    }
    let run = qasmsim::run(&src, None).unwrap();
    let amps = run.statevector().as_complex_bases();
    let scale = 1.0 / (1u64 << n) as f64;
    let scale = scale.sqrt();
    for (i, a) in amps.iter().enumerate() {
        let x = i as u64 & ((1 << n) - 1);
        let (a1, a0, b1, b0) = ((x >> 1) & 1, x & 1, (x >> 3) & 1, (x >> 2) & 1);
        let f = (a1 * 2 + a0) < (b1 * 2 + b0);
        let want = if i >> n != 0 {
            0.0
        } else if f {
            -scale
        } else {
            scale
        };
        assert!(
            (a.re - want).abs() < 1e-9 && a.im.abs() < 1e-9,
            "basis {i}: {a:?}, want {want}"
        );
    }
    // The reader takes the file back as its xor form.
    let c = read_qasm("vault.qasm", &qasm).unwrap();
    assert_eq!(
        c.gates(),
        out.lowered.gates(),
        "{:?}\n{:?}",
        c.gates().len(),
        out.lowered.gates().len()
    );
    let stray = qasm.replacen("x x[0];", "h x[0];", 1);
    assert!(read_qasm("vault.qasm", &stray).is_err());
}

#[test]
fn impossible_budget_names_one_that_works() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/specs/shift-rota.toml"
    ))
    .unwrap();
    let spec = parse_spec("rota.toml", &text).unwrap();
    let e = build_one(&spec, Method::Bennett, &with_budget(Some(10)), &()).unwrap_err();
    let oraculum::BuildError::Synth(SynthError::Budget { budget, needed }) = e else {
        panic!("{e}")
    };
    assert_eq!(budget, 10);
    let o = build_one(&spec, Method::Bennett, &with_budget(Some(needed)), &()).unwrap();
    assert!(o.verification.is_proven() && o.cost.qubits <= needed);
}

/// A 12-input scheduling predicate of our own with shared terms.
const ROOM_PLAN: &str = "kind = \"function\"\nname = \"room-plan\"\ninputs = [\"m0\",\"m1\",\"m2\",\"m3\",\"m4\",\"m5\",\"r0\",\"r1\",\"r2\",\"r3\",\"r4\",\"r5\"]\noutputs = [\"ok\", \"tight\"]\n[let]\nclash = \"m0 & r0 | m1 & r1 | m2 & r2 | m3 & r3 | m4 & r4 | m5 & r5\"\nload = \"(m0 ^ m1 ^ m2) & (m3 | m4 | m5)\"\n[expr]\nok = \"!clash & load & (r0 | r1)\"\ntight = \"clash ^ load & r5\"\n";

#[test]
fn the_tradeoff_curve_buys_fewer_toffolis_with_every_qubit() {
    // Room-plan's raw schedules are not monotone (SAT's schedule at 24
    // qubits cost 100 Toffolis where 23 qubits cost 92, measured): the curve
    // keeps only the points no smaller budget beats.
    for (name, text) in [
        ("room-plan", ROOM_PLAN.to_string()),
        (
            "shift-rota",
            std::fs::read_to_string(repo().join("specs/shift-rota.toml")).unwrap(),
        ),
        (
            "seating",
            std::fs::read_to_string(repo().join("specs/seating.toml")).unwrap(),
        ),
    ] {
        let s = parse_spec(name, &text).unwrap();
        let curve = oraculum::pipeline::tradeoff(&s, &with_budget(None));
        // Notes may say the SAT share ran out (that depends on the
        // machine's speed); none may say the curve was skipped.
        assert!(
            !curve.notes.iter().any(|n| n.contains("skipped")),
            "{name}: {:?}",
            curve.notes
        );
        let curve = curve.points;
        assert!(curve.len() >= 2, "{name}: {} points", curve.len());
        for w in curve.windows(2) {
            assert!(w[1].cost.qubits < w[0].cost.qubits, "{name}");
            assert!(w[1].cost.toffoli > w[0].cost.toffoli, "{name}");
        }
        for o in &curve {
            assert!(o.verification.is_proven(), "{name} at {}", o.cost.qubits);
        }
    }
}

#[test]
fn compare_says_when_the_tradeoff_curve_is_skipped() {
    // 2,010 AND nodes: a chain of definitions past the curve's 2,000-node limit.
    let mut text = String::from(
        "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"f\"]\n[let]\nd0 = \"a & b\"\n",
    );
    for i in 1..2010 {
        let v = ["a", "b", "c"][i % 3];
        text.push_str(&format!("d{i} = \"d{} & {v} ^ {v}\"\n", i - 1));
    }
    text.push_str("[expr]\nf = \"d2009\"\n");
    let s = parse_spec("long", &text).unwrap();
    let curve = oraculum::pipeline::tradeoff(&s, &with_budget(None));
    assert!(curve.points.is_empty());
    assert_eq!(curve.notes.len(), 1, "{:?}", curve.notes);
    assert!(
        curve.notes[0].contains("more than 2000"),
        "{:?}",
        curve.notes
    );
}

/// Progress events of every long stage reach the caller's sink: each
/// `compare` method, the trade-off curve, pebbling (checkpoint grid and SAT),
/// ESOP outputs, and the SAT route's sweep and solve. Each stage ends with
/// `done == total` (or `1 of 1` after an unknown total).
#[test]
fn long_stages_report_progress_and_end() {
    use oraculum::{Event, Progress, Route, Task, VerifyOptions};
    use std::sync::Mutex;
    struct Log(Mutex<Vec<(Task, u64, u64)>>);
    impl Progress for Log {
        fn event(&self, e: Event) {
            if let Event::Stage { task, done, total } = e {
                self.0.lock().unwrap().push((task, done, total));
            }
        }
    }
    let s = parse_spec("room-plan", ROOM_PLAN).unwrap();
    let log = Log(Mutex::new(Vec::new()));
    let mut opts = with_budget(None);
    opts.method = None;
    let rows = oraculum::pipeline::compare_with_progress(&s, &opts, &log);
    let curve = oraculum::pipeline::tradeoff_with_progress(&s, &with_budget(None), &log);
    assert!(curve.points.len() >= 2);
    let events = log.0.into_inner().unwrap();
    let seen = |t: &dyn Fn(&Task) -> bool| events.iter().filter(|(k, _, _)| t(k)).count();
    for (m, _) in &rows {
        let name = m.name();
        assert_eq!(
            seen(&|k| *k == Task::Compare(name)),
            1,
            "{name}: {events:?}"
        );
    }
    assert!(seen(&|k| *k == Task::Esop) >= 2, "{events:?}");
    assert!(seen(&|k| *k == Task::Curve) >= 2, "{events:?}");
    // The curve's budgets below plain Bennett run the checkpoint grid.
    assert!(seen(&|k| *k == Task::Pebbling) >= 2, "{events:?}");
    for task in [Task::Esop, Task::Curve, Task::Pebbling, Task::PebblingBySat] {
        let last = events.iter().rev().find(|(k, _, _)| *k == task);
        if let Some(&(_, done, total)) = last {
            assert!(
                total > 0 && done == total,
                "{task:?} ends at {done} of {total}"
            );
        }
    }
    // The SAT route reports its sweep and its solve.
    let log = Log(Mutex::new(Vec::new()));
    let o = build_one(&s, Method::Bennett, &with_budget(None), &()).unwrap();
    let v = VerifyOptions {
        route: Route::Sat,
        ..VerifyOptions::default()
    };
    let verdict = oraculum::verify::verify_with_progress(&o.lowered, &s, &v, &log).unwrap();
    assert!(
        matches!(verdict, oraculum::Verdict::Proven { .. }),
        "{verdict:?}"
    );
    let events = log.0.into_inner().unwrap();
    let sweep: Vec<_> = events.iter().filter(|e| e.0 == Task::Sweep).collect();
    let last = sweep.last().expect("sweep events");
    assert!(last.1 == last.2 && last.2 > 0, "{sweep:?}");
}
