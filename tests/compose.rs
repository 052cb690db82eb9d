//! Oracles that drop into an algorithm (issue 16): the gate form, and the
//! reader's expansion of gate definitions (OpenQASM 2, Cross, Bishop, Smolin,
//! Gambetta 2017, section 3: a gate body uses only gates defined before it,
//! on its own arguments, which are distinct).

mod common;

use common::{run_in, text, workspace};
use oraculum::export::{read_qasm, read_qasm_with, ReadLimits};

/// Every demo spec written plainly and in gate form: the reader gives the same
/// gate list for both, and the verifier proves the gate-form file.
#[test]
fn the_gate_form_and_its_expansion_verify_alike() {
    let dir = workspace();
    let mut count = 0;
    for e in std::fs::read_dir(dir.path().join("specs")).unwrap() {
        let p = e.unwrap().path();
        let spec = p.to_str().unwrap().to_string();
        let plain = format!("{spec}.qasm");
        let gate = format!("{spec}.gate.qasm");
        let o = run_in(dir.path(), &["synth", &spec, "-o", &plain, "-m", "bennett"]);
        if o.status.code() != Some(0) {
            // Not every spec takes every method (permutations, arithmetic).
            let o = run_in(dir.path(), &["synth", &spec, "-o", &plain]);
            assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        }
        let method = if run_in(dir.path(), &["synth", &spec, "-m", "bennett"])
            .status
            .success()
        {
            "bennett"
        } else {
            "auto"
        };
        let o = run_in(
            dir.path(),
            &[
                "synth",
                &spec,
                "-o",
                &gate,
                "-m",
                method,
                "--as-gate",
                "oracle",
            ],
        );
        assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        let a = std::fs::read_to_string(dir.path().join(&plain)).unwrap();
        let b = std::fs::read_to_string(dir.path().join(&gate)).unwrap();
        assert!(b.contains("\ngate oracle "), "{b}");
        let ca = read_qasm("plain", &a).unwrap();
        let cb = read_qasm("gate", &b).unwrap();
        assert_eq!(ca.gates(), cb.gates(), "{spec}");
        assert_eq!(ca.phase(), cb.phase(), "{spec}");
        assert_eq!(ca.lines(), cb.lines(), "{spec}");
        let o = run_in(dir.path(), &["verify", &gate, "--spec", &spec]);
        let (out, err) = text(&o);
        assert_eq!(o.status.code(), Some(0), "{spec}: {out}{err}");
        assert!(out.contains(": verified "), "{out}");
        count += 1;
    }
    assert!(count >= 10);
}

const HEAD: &str = "OPENQASM 2.0;\ninclude \"qelib1.inc\";\n";

/// Nested definitions expand in order: maj (the majority step of Cuccaro,
/// Draper, Kutin, Moulton 2004, figure 3: cx c,b; cx c,a; ccx a,b,c) applied
/// inside a second definition.
#[test]
fn nested_definitions_expand_in_order() {
    let text = format!(
        "{HEAD}gate maj a,b,c {{ cx c,b; cx c,a; ccx a,b,c; }}\ngate twice p,q,r,s {{ maj p,q,r; barrier p,s; maj s,q,r; x s; }}\nqreg x[4];\ntwice x[0],x[1],x[2],x[3];\n"
    );
    let c = read_qasm("t.qasm", &text).unwrap();
    use oraculum::Gate;
    assert_eq!(
        c.gates(),
        &[
            Gate::cnot(2, 1),
            Gate::cnot(2, 0),
            Gate::toffoli(0, 1, 2),
            Gate::cnot(2, 1),
            Gate::cnot(2, 3),
            Gate::toffoli(3, 1, 2),
            Gate::not(3),
        ]
    );
    // A whole-register application repeats the gate across the registers.
    let text = format!("{HEAD}gate flip a,b {{ cx a,b; }}\nqreg x[2];\nqreg y[2];\nflip x,y;\n");
    let c = read_qasm("t.qasm", &text).unwrap();
    assert_eq!(c.gates(), &[Gate::cnot(0, 2), Gate::cnot(1, 3)]);
}

fn error_at(text: &str) -> (usize, usize, String) {
    let e = read_qasm("t.qasm", text).unwrap_err();
    let l = e.located().expect("a located error").clone();
    (l.location.line, l.location.column, e.to_string())
}

#[test]
fn bad_definitions_are_refused_at_their_place() {
    // Repeated argument in a body.
    let (l, c, m) = error_at(&format!("{HEAD}gate g a,b {{\n  cx a,a;\n}}\nqreg q[2];\n"));
    assert_eq!((l, c), (4, 8), "{m}");
    assert!(m.contains("twice"), "{m}");
    // Wrong arity at the application.
    let (l, c, m) = error_at(&format!(
        "{HEAD}gate g a,b {{ cx a,b; }}\nqreg q[3];\ng q[0],q[1],q[2];\n"
    ));
    assert_eq!((l, c), (5, 2), "{m}");
    assert!(m.contains("takes 2 operand(s), found 3"), "{m}");
    // The same qubit twice at the application.
    let (l, _, m) = error_at(&format!(
        "{HEAD}gate g a,b {{ cx a,b; }}\nqreg q[3];\ng q[1],q[1];\n"
    ));
    assert_eq!(l, 5, "{m}");
    assert!(m.contains("same qubit twice"), "{m}");
    // A gate used before it is defined, or not at all.
    let (l, c, m) = error_at(&format!("{HEAD}gate g a {{ h a; }}\n"));
    assert_eq!((l, c), (3, 12), "{m}");
    // An indexed operand inside a body.
    let (l, c, m) = error_at(&format!("{HEAD}qreg q[2];\ngate g a {{ x q[0]; }}\n"));
    assert_eq!((l, c), (4, 14), "{m}");
    assert!(m.contains("without an index"), "{m}");
    // Parameters, redefinition, a missing brace.
    let (_, _, m) = error_at(&format!("{HEAD}gate g(theta) a {{ x a; }}\n"));
    assert!(m.contains("parameters"), "{m}");
    let (l, _, m) = error_at(&format!("{HEAD}gate g a {{ x a; }}\ngate g a {{ x a; }}\n"));
    assert_eq!(l, 4, "{m}");
    assert!(m.contains("already defined"), "{m}");
    let (l, _, m) = error_at(&format!("{HEAD}gate g a {{ x a;\n"));
    assert_eq!(l, 3, "{m}");
    assert!(m.contains("'}'"), "{m}");
    let (_, _, m) = error_at(&format!("{HEAD}gate ccx a,b,c {{ x a; }}\n"));
    assert!(m.contains("already defined"), "{m}");
}

/// Twenty nested definitions, each applying the previous ten times, expand to
/// 10^20 gates: the budget refuses the application before anything is built.
#[test]
fn the_gate_budget_is_checked_before_expansion() {
    let mut deep = format!("{HEAD}gate g0 a {{ x a; }}\n");
    for k in 1..=20 {
        let body = format!("g{} a; ", k - 1).repeat(10);
        deep.push_str(&format!("gate g{k} a {{ {body}}}\n"));
    }
    deep.push_str("qreg q[1];\ng20 q[0];\n");
    let e = read_qasm("t.qasm", &deep).unwrap_err();
    assert!(
        matches!(e, oraculum::export::ReadError::Limit { value, .. } if value == u64::MAX || value >= 10u64.pow(19)),
        "{e}"
    );
    // Within a budget the same kind of file is read: g3 is 10^3 gates.
    let mut small = format!("{HEAD}gate g0 a {{ x a; }}\n");
    for k in 1..=3 {
        let body = format!("g{} a; ", k - 1).repeat(10);
        small.push_str(&format!("gate g{k} a {{ {body}}}\n"));
    }
    small.push_str("qreg q[1];\ng3 q[0];\n");
    let limits = ReadLimits {
        max_gates: 1000,
        ..ReadLimits::default()
    };
    assert_eq!(
        read_qasm_with("t", &small, &limits).unwrap().gates().len(),
        1000
    );
    let limits = ReadLimits {
        max_gates: 999,
        ..ReadLimits::default()
    };
    assert!(read_qasm_with("t", &small, &limits).is_err());
    // From the command line: exit 3, naming the option.
    let dir = workspace();
    std::fs::write(dir.path().join("big.qasm"), &deep).unwrap();
    let o = run_in(dir.path(), &["cost", "big.qasm"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("--max-gates"), "{err}");
}

#[test]
fn a_bad_gate_name_is_a_usage_error() {
    let dir = workspace();
    for bad in ["cx", "Oracle", "x", "9lives", "anc"] {
        let o = run_in(
            dir.path(),
            &["synth", "specs/greenhouse.toml", "--as-gate", bad],
        );
        assert_eq!(o.status.code(), Some(2), "{bad}: {:?}", text(&o));
    }
}

/// The plain reader (moved here from src/export/qasm2.rs).
#[test]
fn reads_what_it_writes_and_refuses_the_rest() {
    use oraculum::export::{write_qasm, QasmHeader};
    use oraculum::Gate;
    let text = "OPENQASM 2.0;\ninclude \"qelib1.inc\"; // the standard library\nqreg x[2];\nqreg y[1];\ncreg c[1];\nccx x[0],x[1],y[0];\nCX x[0], y[0];\nx y;\nbarrier x;\n";
    let c = read_qasm("t.qasm", text).unwrap();
    assert_eq!(c.width(), 3);
    assert_eq!(
        c.gates(),
        &[Gate::toffoli(0, 1, 2), Gate::cnot(0, 2), Gate::not(2)]
    );
    let again = write_qasm(&c, &QasmHeader::default()).unwrap();
    assert_eq!(read_qasm("again", &again).unwrap().gates(), c.gates());

    let e = read_qasm("t.qasm", "OPENQASM 2.0;\nqreg q[2];\nh q[0];\n").unwrap_err();
    let e = e.located().unwrap();
    assert_eq!((e.location.line, e.location.column), (3, 1));
    let e = read_qasm("t.qasm", "OPENQASM 2.0;\nqreg q[2];\ncx q[0], q[5];\n").unwrap_err();
    let e = e.located().unwrap();
    assert_eq!((e.location.line, e.location.column), (3, 10));
    let e = read_qasm("t.qasm", "OPENQASM 2.0;\nqreg q[2];\ncx q[1],q[1];\n").unwrap_err();
    assert!(e.to_string().contains("same qubit"), "{e}");
    assert!(read_qasm("t.qasm", "qreg q[2];").is_err());
    assert!(read_qasm("t.qasm", "OPENQASM 2.0;\nqreg q[2]").is_err());
}

/// The gate form run by an outside simulator (the `qasmsim` crate): every
/// input of the greenhouse spec gives the spec's outputs, evaluated here from
/// the spec's own text (vent = table 0x3e, fan = hot & !night | humid ^ hot),
/// with the ancilla back at 0.
#[test]
fn an_outside_simulator_runs_the_gate_form() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "--as-gate", "vent_oracle"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let qasm = text(&o).0;
    assert!(qasm.contains("\ngate vent_oracle "), "{qasm}");
    for i in 0..8u64 {
        let set: Vec<(String, usize)> = (0..3)
            .filter(|j| (i >> j) & 1 == 1)
            .map(|j| ("x".to_string(), j))
            .collect();
        let r = common::qasmsim_run(&qasm, &set);
        let (hot, humid, night) = (i & 1 == 1, i & 2 == 2, i & 4 == 4);
        let vent = (0x3e >> i) & 1 == 1;
        let fan = (hot && !night) || (humid ^ hot);
        assert_eq!(r["x"], i, "input {i}");
        assert_eq!(r["y"], vent as u64 | ((fan as u64) << 1), "input {i}");
        assert_eq!(r["anc"], 0, "input {i}");
    }
}

/// Runs `gates` on a basis state of every line (line `i` is bit `i`); a
/// plain simulator of the test's own.
fn run_gates(gates: &[oraculum::Gate], mut state: u64) -> u64 {
    for g in gates {
        if g.controls()
            .iter()
            .all(|c| ((state >> c.line.0) & 1 == 1) == c.positive)
        {
            state ^= 1 << g.target().0;
        }
    }
    state
}

/// `--inverse` on every demo spec of at most 18 lines: the circuit followed by
/// its inverse is the identity on every basis state of every line (ancillae
/// included, not only at 0), the inverse file proves with `verify --inverse`,
/// and the forward verification of the inverse succeeds exactly for the specs
/// whose map is its own inverse (xor and phase oracles are, a fact of the
/// trade; a permutation other than an involution and an adder are not).
#[test]
fn the_inverse_composed_with_the_circuit_is_the_identity() {
    let dir = workspace();
    let mut checked = 0;
    for e in std::fs::read_dir(dir.path().join("specs")).unwrap() {
        let p = e.unwrap().path();
        let spec = p.to_str().unwrap().to_string();
        let fwd = format!("{spec}.qasm");
        let inv = format!("{spec}.inv.qasm");
        let o = run_in(dir.path(), &["synth", &spec, "-o", &fwd]);
        assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        let o = run_in(dir.path(), &["synth", &spec, "-o", &inv, "--inverse"]);
        assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        let a = read_qasm(
            "fwd",
            &std::fs::read_to_string(dir.path().join(&fwd)).unwrap(),
        )
        .unwrap();
        let inv_text = std::fs::read_to_string(dir.path().join(&inv)).unwrap();
        assert!(inv_text.contains("// inverse: "), "{inv_text}");
        let b = read_qasm("inv", &inv_text).unwrap();
        let o = run_in(dir.path(), &["verify", &inv, "--spec", &spec, "--inverse"]);
        assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        assert!(
            text(&o).0.contains("against the inverse of"),
            "{:?}",
            text(&o)
        );
        let self_inverse = !spec.contains("shuffle")
            && !spec.contains("lamp-cycle")
            && !spec.contains("fuel-sum")
            && !spec.contains("ticket-counter")
            && !spec.contains("beacon-period");
        let o = run_in(dir.path(), &["verify", &inv, "--spec", &spec]);
        let want = if self_inverse { 0 } else { 1 };
        assert_eq!(o.status.code(), Some(want), "{spec}: {:?}", text(&o));
        if a.width() > 18 {
            continue;
        }
        assert_eq!(a.lines(), b.lines());
        let both: Vec<oraculum::Gate> = a.gates().iter().chain(b.gates()).cloned().collect();
        for s in 0..1u64 << a.width() {
            assert_eq!(run_gates(&both, s), s, "{spec}: basis state {s}");
        }
        checked += 1;
    }
    assert!(checked >= 10, "{checked}");
}

/// The inverses against maps written out by hand: the inverse of the adder
/// `b = a + b` subtracts (34 + 8 = 42, so 42 - 34 = 8; 100 - 200 = 156 mod
/// 256), and the inverse of the dice-shuffle permutation
/// [5, 2, 7, 0, 6, 1, 4, 3] is [3, 5, 1, 7, 6, 0, 4, 2] (image i is the
/// position of i in the list), proven as a spec of its own.
#[test]
fn inverses_match_maps_written_by_hand() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("add.toml"),
        "kind = \"arithmetic\"\nop = \"add\"\nwidth = 8\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["synth", "add.toml", "--inverse"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let sub = read_qasm("sub", &text(&o).0).unwrap();
    assert_eq!(common::run_registers(&sub, &[("a", 34), ("b", 42)])["b"], 8);
    assert_eq!(
        common::run_registers(&sub, &[("a", 200), ("b", 100)])["b"],
        156
    );
    std::fs::write(
        dir.path().join("undo.toml"),
        "kind = \"permutation\"\nwidth = 3\nimages = [3, 5, 1, 7, 6, 0, 4, 2]\n",
    )
    .unwrap();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/dice-shuffle.toml",
            "--inverse",
            "-o",
            "undo.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let o = run_in(dir.path(), &["verify", "undo.qasm", "--spec", "undo.toml"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    // A file with one gate dropped is refuted against the inverse, with a
    // counterexample of the backward run.
    let undo = std::fs::read_to_string(dir.path().join("undo.qasm")).unwrap();
    let gate_line = undo
        .lines()
        .collect::<Vec<_>>()
        .iter()
        .rposition(|l| l.starts_with("cx ") || l.starts_with("x "))
        .unwrap();
    let broken: Vec<&str> = undo
        .lines()
        .enumerate()
        .filter(|(k, _)| *k != gate_line)
        .map(|(_, l)| l)
        .collect();
    std::fs::write(dir.path().join("broken.qasm"), broken.join("\n")).unwrap();
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "broken.qasm",
            "--spec",
            "specs/dice-shuffle.toml",
            "--inverse",
            "--json",
        ],
    );
    assert_eq!(o.status.code(), Some(1), "{:?}", text(&o));
    let j: serde_json::Value = serde_json::from_str(&text(&o).0).unwrap();
    assert_eq!(j["verdict"], "refuted");
    assert_eq!(j["inverse"], true);
    assert!(j["counterexample"]["problem"]
        .as_str()
        .unwrap()
        .contains("backwards"));
    // The synth report says it is the inverse.
    let o = run_in(dir.path(), &["synth", "add.toml", "--inverse", "--json"]);
    let j: serde_json::Value = serde_json::from_str(&text(&o).0).unwrap();
    assert_eq!(j["inverse"], true);
    assert_eq!(j["verification"]["verdict"], "proven");
}

/// Grover's iteration on a state vector of the test's own (the oracle flips
/// the sign of the marked amplitudes, the diffusion reflects every amplitude
/// about their mean): the probability of measuring a marked input after `k`
/// iterations from the uniform superposition.
fn grover_success(marked: &[bool], k: u64) -> f64 {
    let n = marked.len() as f64;
    let mut a = vec![1.0 / n.sqrt(); marked.len()];
    for _ in 0..k {
        for (v, &m) in a.iter_mut().zip(marked) {
            if m {
                *v = -*v;
            }
        }
        let mean = a.iter().sum::<f64>() / n;
        for v in a.iter_mut() {
            *v = 2.0 * mean - *v;
        }
    }
    a.iter()
        .zip(marked)
        .filter(|(_, &m)| m)
        .map(|(v, _)| v * v)
        .sum()
}

fn grover_of(toml: &str) -> serde_json::Value {
    let dir = workspace();
    std::fs::write(dir.path().join("p.toml"), toml).unwrap();
    let o = run_in(dir.path(), &["synth", "p.toml", "--json", "-m", "esop"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    serde_json::from_str(&text(&o).0).unwrap()
}

/// The 8-bit values of popcount 4: binomial(8, 4) = 70 of 256, one iteration
/// (theta = asin(sqrt(70/256)), floor(pi / (4 theta)) = 1), success
/// probability 0.993 to three places (the figures of issue 16; the naive round(pi/4
/// sqrt(N/M)) = 2 iterations would give 0.15, which the state vector shows
/// too). As a table and as an expression (an OR of the 70 products), and as
/// a phase oracle.
#[test]
fn popcount_four_marks_seventy_and_needs_one_iteration() {
    let marked: Vec<bool> = (0..256u32).map(|x| x.count_ones() == 4).collect();
    // 0.993 to three places, 0.99361 more exactly (sin^2(3 asin(sqrt(70/256)))).
    assert_eq!((grover_success(&marked, 1) * 1000.0).floor(), 993.0);
    assert!((grover_success(&marked, 2) - 0.15).abs() < 0.01);
    let names: Vec<String> = (0..8).map(|j| format!("b{j}")).collect();
    let head = format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [\"four\"]\n",
        names
            .iter()
            .map(|n| format!("\"{n}\""))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let products: Vec<String> = (0..256usize)
        .filter(|&x| marked[x])
        .map(|x| {
            let lits: Vec<String> = (0..8)
                .map(|j| format!("{}{}", if (x >> j) & 1 == 1 { "" } else { "!" }, names[j]))
                .collect();
            format!("({})", lits.join(" & "))
        })
        .collect();
    let specs = [
        format!("{head}[table]\nfour = \"{}\"\n", common::hex_table(&marked)),
        format!("{head}[expr]\nfour = \"{}\"\n", products.join(" | ")),
        format!(
            "{head}[table]\nfour = \"{}\"\n[oracle]\nform = \"phase\"\n",
            common::hex_table(&marked)
        ),
    ];
    for toml in &specs {
        let j = grover_of(toml);
        assert_eq!(j["verification"]["verdict"], "proven");
        assert_eq!(j["marked"], 70, "{toml}");
        assert_eq!(j["input_bits"], 8);
        assert_eq!(j["grover_iterations"], 1);
        let p = j["success_probability"].as_f64().unwrap();
        assert_eq!((p * 1000.0).floor(), 993.0, "{p}");
        assert!((p - grover_success(&marked, 1)).abs() < 1e-9, "{p}");
    }
    // The text report says the same.
    let dir = workspace();
    std::fs::write(dir.path().join("p.toml"), &specs[0]).unwrap();
    let o = run_in(dir.path(), &["synth", "p.toml", "-o", "p.qasm"]);
    let out = text(&o).0;
    assert!(
        out.contains("grover: 70 of 2^8 inputs marked, 1 iteration, success probability 0.9936"),
        "{out}"
    );
}

/// Specs that are not predicates get no Grover fields; an expression past
/// `--max-states` reports "unknown" for each.
#[test]
fn grover_fields_only_for_predicates_and_unknown_past_the_limit() {
    let dir = workspace();
    let o = run_in(dir.path(), &["synth", "specs/greenhouse.toml", "--json"]);
    let j: serde_json::Value = serde_json::from_str(&text(&o).0).unwrap();
    assert!(j.get("marked").is_none(), "{j}");
    // 64 inputs, past --max-states: counted by model counting. The card
    // must equal the door code (2^32 pairs) and have odd parity (half of
    // them): 2^31 marked (by hand).
    let o = run_in(dir.path(), &["synth", "specs/badge-match.toml", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let j: serde_json::Value = serde_json::from_str(&text(&o).0).unwrap();
    assert_eq!(j["marked"], 1u64 << 31, "{j}");
    let theta = 2f64.powf(-16.5).asin();
    let k = (std::f64::consts::PI / (4.0 * theta)).floor() as u64;
    assert_eq!(j["grover_iterations"], k);
    // A cone past the model counter's node limit (a chain of 20,001
    // definitions): every figure unknown, found before any clause is built.
    let mut toml = String::from(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\"]\n[let]\nd0 = \"a\"\n",
    );
    for i in 1..=20_001 {
        let v = if i % 2 == 0 { "a" } else { "b" };
        toml.push_str(&format!(
            "d{i} = \"d{} & {v} | !d{} & !{v}\"\n",
            i - 1,
            i - 1
        ));
    }
    toml.push_str("[expr]\nf = \"d20001\"\n");
    let spec = oraculum::parse_spec("chain.toml", &toml).unwrap();
    assert!(oraculum::verify::count_marked(&spec, 2, &()).is_err());
    let g = oraculum::pipeline::grover_facts(&spec, 2, &())
        .unwrap()
        .unwrap();
    assert_eq!(g.marked, oraculum::pipeline::Fact::Unknown("unknown"));
    assert_eq!(
        g.grover_iterations,
        oraculum::pipeline::Fact::Unknown("unknown")
    );
}

/// The 8-bit values of popcount 4 beside 32 inputs the predicate ignores:
/// 2^40 inputs, past the default --max-states, so the marked inputs are
/// counted by model counting: 70 * 2^32 (binomial(8, 4) = 70 times every
/// value of the other bits), with M/N = 70/256 as before, so 1 iteration and
/// success probability 0.993 (Boyer, Brassard, Hoyer, Tapp 1998; issue 16).
#[test]
fn popcount_four_past_the_state_limit_is_counted_by_models() {
    let names: Vec<String> = (0..40).map(|j| format!("b{j}")).collect();
    let products: Vec<String> = (0..256usize)
        .filter(|x| x.count_ones() == 4)
        .map(|x| {
            let lits: Vec<String> = (0..8)
                .map(|j| format!("{}{}", if (x >> j) & 1 == 1 { "" } else { "!" }, names[j]))
                .collect();
            format!("({})", lits.join(" & "))
        })
        .collect();
    let toml = format!(
        "kind = \"function\"\ninputs = [{}]\noutputs = [\"four\"]\n[expr]\nfour = \"{}\"\n",
        names
            .iter()
            .map(|n| format!("\"{n}\""))
            .collect::<Vec<_>>()
            .join(", "),
        products.join(" | ")
    );
    let spec = oraculum::parse_spec("p40.toml", &toml).unwrap();
    let g = oraculum::pipeline::grover_facts(&spec, oraculum::verify::DEFAULT_MAX_STATES, &())
        .unwrap()
        .unwrap();
    use oraculum::pipeline::Fact;
    assert_eq!(g.marked, Fact::Known(70 << 32));
    assert_eq!(g.input_bits, 40);
    assert_eq!(g.grover_iterations, Fact::Known(1));
    let Fact::Known(p) = g.success_probability else {
        panic!("known")
    };
    assert_eq!((p * 1000.0).floor(), 993.0, "{p}");
}

/// Random predicates of 10 inputs beside 26 unused ones (2^36 inputs, past
/// the default --max-states): the model count is the direct enumeration's
/// count times 2^26.
#[test]
fn model_counts_of_random_predicates_match_enumeration() {
    use proptest::strategy::{Strategy, ValueTree};
    let mut runner = proptest::test_runner::TestRunner::deterministic();
    let names = common::input_names(36);
    for _ in 0..40 {
        let e = common::arb_expr(10)
            .new_tree(&mut runner)
            .unwrap()
            .current();
        let toml = common::expr_toml(&names, &e.render(&names[..10]));
        let spec = oraculum::parse_spec("r.toml", &toml).unwrap();
        let want = (0..1u64 << 10).filter(|&x| e.eval(x)).count() as u64;
        let got = oraculum::verify::count_marked(&spec, oraculum::verify::DEFAULT_MAX_STATES, &())
            .unwrap();
        assert_eq!(got, Some(want << 26), "{toml}");
    }
}

/// A 20-input expression (256 blocks of the verifier's count), and the
/// model count one state past the limit: both against the test's own
/// evaluation of every input.
#[test]
fn a_wide_count_matches_direct_enumeration() {
    use proptest::strategy::{Strategy, ValueTree};
    let mut runner = proptest::test_runner::TestRunner::deterministic();
    let names = common::input_names(20);
    for _ in 0..4 {
        let e = common::arb_expr(20)
            .new_tree(&mut runner)
            .unwrap()
            .current();
        let toml = common::expr_toml(&names, &e.render(&names));
        let spec = oraculum::parse_spec("w.toml", &toml).unwrap();
        let want = (0..1u64 << 20).filter(|&x| e.eval(x)).count() as u64;
        let got = oraculum::verify::count_marked(&spec, 1 << 20, &()).unwrap();
        assert_eq!(got, Some(want), "{toml}");
        // One state short of the inputs: counted by model counting, alike.
        let models = oraculum::verify::count_marked(&spec, (1 << 20) - 1, &()).unwrap();
        assert_eq!(models, Some(want), "{toml}");
    }
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig { cases: 48, ..Default::default() })]

    /// Random one-output predicates of 1 to 10 inputs (tables and
    /// expressions): `marked` is the count of a direct enumeration, and the
    /// success probability after `grover_iterations` is the state vector's,
    /// at least 1 - M/N (for k = floor(pi / (4 theta)), (2k + 1) theta is
    /// within theta of pi/2, so the success is at least cos^2 theta = 1 - M/N;
    /// Boyer, Brassard, Hoyer, Tapp 1998, section 3, from memory).
    #[test]
    fn grover_facts_of_random_predicates(f in common::arb_function(10, 1)) {
        common::tables();
        let spec = oraculum::parse_spec("r.toml", &f.to_toml()).unwrap();
        let out = oraculum::build(&spec, &oraculum::BuildOptions {
            method: Some(oraculum::Method::Esop),
            verify: Some(oraculum::VerifyOptions::default()),
            ..Default::default()
        }).unwrap();
        let marked: Vec<bool> = (0..1u64 << f.inputs).map(|x| f.eval(x)[0]).collect();
        let m = marked.iter().filter(|&&b| b).count() as u64;
        let g = out.grover.expect("a predicate has Grover facts");
        use oraculum::pipeline::Fact;
        proptest::prop_assert_eq!(g.marked, Fact::Known(m));
        let (Fact::Known(k), Fact::Known(p)) = (g.grover_iterations, g.success_probability) else {
            panic!("known within the limits");
        };
        if m == 0 {
            proptest::prop_assert_eq!((k, p), (0, 0.0));
        } else {
            let sim = grover_success(&marked, k);
            proptest::prop_assert!((p - sim).abs() < 1e-9, "{} vs {}", p, sim);
            let n = marked.len() as f64;
            proptest::prop_assert!(p >= 1.0 - m as f64 / n - 1e-9, "{}", p);
        }
    }
}

/// `[registers]` renames the registers of the written file (function,
/// permutation and arithmetic specs, ancillae too): no standard name is left,
/// the file verifies against its spec, and an outside simulator (`qasmsim`)
/// reads the results from the own registers: the adder's `total` is
/// `addend + total` (34 + 8 = 42), the comparison's `flag` is the spec's.
#[test]
fn own_register_names_are_written_and_read_back() {
    let dir = workspace();
    let specs = [
        (
            "door.toml",
            "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"open\"]\n[expr]\nopen = \"a & b | c\"\n[registers]\nx = \"key\"\ny = \"flag\"\nanc = \"work\"\n",
            vec!["key", "flag", "work"],
        ),
        (
            "sum.toml",
            "kind = \"arithmetic\"\nop = \"add\"\nwidth = 6\ncarry_out = true\n[registers]\na = \"addend\"\nb = \"total\"\ncout = \"carry\"\n",
            vec!["addend", "total", "carry"],
        ),
        (
            "lamps.toml",
            "kind = \"permutation\"\nwidth = 3\nimages = [5, 2, 7, 0, 6, 1, 4, 3]\n[registers]\nx = \"lamp\"\n",
            vec!["lamp"],
        ),
    ];
    for (name, toml, regs) in &specs {
        std::fs::write(dir.path().join(name), toml).unwrap();
        let qasm = format!("{name}.qasm");
        let o = run_in(dir.path(), &["synth", name, "-o", &qasm]);
        assert_eq!(o.status.code(), Some(0), "{name}: {:?}", text(&o));
        let t = std::fs::read_to_string(dir.path().join(&qasm)).unwrap();
        for r in regs {
            assert!(t.contains(&format!("qreg {r}[")), "{t}");
        }
        // The standard names the spec renames are gone.
        let renamed = toml.split("[registers]\n").nth(1).unwrap();
        for line in renamed.lines() {
            let std_name = line.split(" = ").next().unwrap();
            assert!(!t.contains(&format!("qreg {std_name}[")), "{name}: {t}");
        }
        let o = run_in(dir.path(), &["verify", &qasm, "--spec", name]);
        assert_eq!(o.status.code(), Some(0), "{name}: {:?}", text(&o));
        // The same file in gate form verifies too.
        let o = run_in(
            dir.path(),
            &["synth", name, "-o", "g.qasm", "--as-gate", "step"],
        );
        assert_eq!(o.status.code(), Some(0), "{name}: {:?}", text(&o));
        let o = run_in(dir.path(), &["verify", "g.qasm", "--spec", name]);
        assert_eq!(o.status.code(), Some(0), "{name}: {:?}", text(&o));
    }
    let door = std::fs::read_to_string(dir.path().join("door.toml.qasm")).unwrap();
    for x in 0..8u64 {
        let set: Vec<(String, usize)> = (0..3)
            .filter(|j| (x >> j) & 1 == 1)
            .map(|j| ("key".to_string(), j))
            .collect();
        let r = common::qasmsim_run(&door, &set);
        let want = (x & 1 == 1 && x & 2 == 2) || x & 4 == 4;
        assert_eq!(r["flag"], want as u64, "input {x}");
        assert_eq!(r["key"], x);
        assert!(r.get("work").is_none_or(|&w| w == 0));
    }
    let sum = std::fs::read_to_string(dir.path().join("sum.toml.qasm")).unwrap();
    let bits = |reg: &str, v: u64| -> Vec<(String, usize)> {
        (0..6)
            .filter(|j| (v >> j) & 1 == 1)
            .map(|j| (reg.to_string(), j))
            .collect()
    };
    let mut set = bits("addend", 34);
    set.extend(bits("total", 8));
    let r = common::qasmsim_run(&sum, &set);
    assert_eq!((r["addend"], r["total"], r["carry"]), (34, 42, 0));
    let mut set = bits("addend", 40);
    set.extend(bits("total", 30));
    let r = common::qasmsim_run(&sum, &set);
    // 40 + 30 = 70 = 64 + 6: carry 1, total 6.
    assert_eq!((r["total"], r["carry"]), (6, 1));
}

/// A file from elsewhere with other register names: refused with exit 2
/// until `--registers` says which is which; then proven, and a wrong mapping
/// (inputs and output swapped) is not proven.
#[test]
fn verify_binds_other_names_with_registers() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "g.qasm"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let g = std::fs::read_to_string(dir.path().join("g.qasm")).unwrap();
    let other = g
        .replace("x[", "sensor[")
        .replace("y[", "act[")
        .replace("anc[", "scratch[");
    std::fs::write(dir.path().join("other.qasm"), &other).unwrap();
    let o = run_in(
        dir.path(),
        &["verify", "other.qasm", "--spec", "specs/greenhouse.toml"],
    );
    assert_eq!(o.status.code(), Some(2), "{:?}", text(&o));
    let args = [
        "verify",
        "other.qasm",
        "--spec",
        "specs/greenhouse.toml",
        "--registers",
    ];
    let o = run_in(
        dir.path(),
        &[&args[..], &["sensor=x,act=y,scratch=anc"]].concat(),
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    assert!(text(&o).0.contains("verified"), "{:?}", text(&o));
    // Not a register of the file; malformed; two registers onto one name.
    for bad in [
        "sensor=x,act=y,nope=anc",
        "sensor",
        "sensor=x,act=x,scratch=anc",
    ] {
        let o = run_in(dir.path(), &[&args[..], &[bad]].concat());
        assert_eq!(o.status.code(), Some(2), "{bad}: {:?}", text(&o));
    }
    // A spec's own names are applied to a file that has them.
    let own = std::fs::read_to_string(dir.path().join("specs/greenhouse.toml")).unwrap()
        + "[registers]\nx = \"sensor\"\ny = \"act\"\nanc = \"scratch\"\n";
    std::fs::write(dir.path().join("own.toml"), own).unwrap();
    let o = run_in(dir.path(), &["verify", "other.qasm", "--spec", "own.toml"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    // The wrong way round: a three-line input register cannot be the outputs.
    let o = run_in(
        dir.path(),
        &[&args[..], &["sensor=y,act=x,scratch=anc"]].concat(),
    );
    assert_ne!(o.status.code(), Some(0), "{:?}", text(&o));
}

/// Bad `[registers]` tables, each refused at its line and column.
#[test]
fn bad_register_tables_are_refused_at_their_place() {
    let head = "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[expr]\nf = \"a\"\n[registers]\n";
    let cases = [
        ("z = \"key\"\n", (7, 1), "not a register of this spec"),
        ("x = \"Key\"\n", (7, 5), "cannot name a register"),
        ("x = \"qreg\"\n", (7, 5), "cannot name a register"),
        (
            "x = \"flag\"\ny = \"flag\"\n",
            (8, 5),
            "two registers would be named 'flag'",
        ),
        ("x = \"y\"\n", (7, 5), "two registers would be named 'y'"),
        ("a = \"key\"\n", (7, 1), "its registers are x, y, anc"),
    ];
    for (body, (line, col), msg) in cases {
        let e = oraculum::parse_spec("t.toml", &format!("{head}{body}")).unwrap_err();
        assert_eq!(
            (e.location.line, e.location.column),
            (line, col),
            "{body}: {e}"
        );
        assert!(e.to_string().contains(msg), "{body}: {e}");
    }
    // Swapping two names is one renaming, and allowed.
    let s = oraculum::parse_spec("t.toml", &format!("{head}x = \"y\"\ny = \"x\"\n")).unwrap();
    assert_eq!(s.register_name("x"), "y");
    // The arithmetic registers take own names, the kind's own only.
    let arith =
        "kind = \"arithmetic\"\nop = \"compare\"\nrelation = \"<\"\nwidth = 4\n[registers]\n";
    assert!(oraculum::parse_spec(
        "t.toml",
        &format!("{arith}a = \"left\"\nb = \"right\"\ny = \"less\"\n")
    )
    .is_ok());
    let e = oraculum::parse_spec("t.toml", &format!("{arith}cout = \"c\"\n")).unwrap_err();
    assert_eq!((e.location.line, e.location.column), (6, 1), "{e}");
}

/// Every basis state of `c`'s free registers (ancillae at 0) against a map
/// of the test's own, by its own simulator: with `ctrl` at 0 every register
/// keeps its value, with `ctrl` at 1 `map` gives the registers after.
/// `free` lists (register, size) without `ctrl`; true when all agree.
fn controlled_map_holds(
    c: &oraculum::Circuit,
    free: &[(&str, usize)],
    map: &dyn Fn(&[u128]) -> Vec<u128>,
) -> bool {
    let bits: usize = free.iter().map(|(_, s)| s).sum();
    for s in 0..1u128 << (bits + 1) {
        let mut values = Vec::new();
        let mut shift = 0;
        for (_, size) in free {
            values.push((s >> shift) & ((1 << size) - 1));
            shift += size;
        }
        let ctrl = s >> bits;
        let mut inputs: Vec<(&str, u128)> =
            free.iter().map(|(n, _)| *n).zip(values.clone()).collect();
        inputs.push(("ctrl", ctrl));
        let out = common::run_registers(c, &inputs);
        let want = if ctrl == 1 {
            map(&values)
        } else {
            values.clone()
        };
        let got: Vec<u128> = free.iter().map(|(n, _)| out[*n]).collect();
        if got != want || out.get("anc").copied().unwrap_or(0) != 0 || out["ctrl"] != ctrl {
            return false;
        }
    }
    true
}

/// `controlled = true` on a truth table (majority of three, 0xe8), an
/// expression network with definitions, and a permutation (the dice shuffle
/// [5, 2, 7, 0, 6, 1, 4, 3]), through every method that applies: each
/// circuit is proven by both routes, and the test's own simulator finds it
/// the identity with the control at 0 and the map with it at 1 on every
/// basis state. Every single-fault mutant of one circuit per spec is refuted
/// exactly when the test's own check finds it wrong, and dropping the control
/// from one gate is refuted on a state with the control at 0.
#[test]
fn controlled_function_and_permutation_specs_are_proven_at_both_controls() {
    use oraculum::verify::{verify, Route, Verdict, VerifyOptions};
    common::tables();
    let majority = "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"most\"]\ncontrolled = true\n[table]\nmost = \"0xe8\"\n";
    let network = "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\", \"d\"]\noutputs = [\"f\", \"g\"]\ncontrolled = true\n[let]\ns = \"a ^ b\"\n[expr]\nf = \"s & c | d\"\ng = \"s & !d\"\n";
    let shuffle =
        "kind = \"permutation\"\nwidth = 3\nimages = [5, 2, 7, 0, 6, 1, 4, 3]\ncontrolled = true\n";
    let maj = |v: &[u128]| {
        let x = v[0];
        vec![x, v[1] ^ ((0xe8 >> x) & 1)]
    };
    let net = |v: &[u128]| {
        let b = |j: u32| (v[0] >> j) & 1 == 1;
        let s = b(0) ^ b(1);
        let f = (s && b(2)) || b(3);
        let g = s && !b(3);
        vec![v[0], v[1] ^ (f as u128 | (g as u128) << 1)]
    };
    let images = [5u128, 2, 7, 0, 6, 1, 4, 3];
    let shuf = |v: &[u128]| vec![images[v[0] as usize]];
    type Map<'a> = &'a dyn Fn(&[u128]) -> Vec<u128>;
    type Case<'a> = (&'a str, Vec<(&'a str, usize)>, Map<'a>, &'a [&'a str]);
    let cases: [Case; 3] = [
        (
            majority,
            vec![("x", 3), ("y", 1)],
            &maj,
            &[
                "reed-muller",
                "esop",
                "bennett",
                "xag",
                "exact",
                "transform",
            ],
        ),
        (
            network,
            vec![("x", 4), ("y", 2)],
            &net,
            &["reed-muller", "esop", "bennett", "xag", "hierarchical"],
        ),
        (
            shuffle,
            vec![("x", 3)],
            &shuf,
            &["transform", "transform-bidir", "exact"],
        ),
    ];
    let sat = VerifyOptions {
        route: Route::Sat,
        ..VerifyOptions::default()
    };
    for (toml, free, map, methods) in &cases {
        let spec = oraculum::parse_spec("c.toml", toml).unwrap();
        assert_eq!(spec.layout().sizes()[0], ("ctrl", 1), "ctrl comes first");
        for m in *methods {
            let opts = oraculum::BuildOptions {
                method: oraculum::Method::from_name(m),
                verify: Some(VerifyOptions::default()),
                ..Default::default()
            };
            let out = oraculum::pipeline::build(&spec, &opts).unwrap();
            let c = &out.lowered;
            assert!(out.verification.is_proven(), "{m}: {:?}", out.verification);
            assert!(
                matches!(
                    verify(c, &spec, &sat).unwrap(),
                    Verdict::Proven { by: "sat", .. }
                ),
                "{m}"
            );
            assert!(controlled_map_holds(c, free, *map), "{toml}\n{m}");
            assert_eq!(c.lines()[0].register, "ctrl");
            assert!(
                out.notes
                    .iter()
                    .any(|n| n.starts_with("the control costs ")),
                "{:?}",
                out.notes
            );
        }
        let opts = oraculum::BuildOptions {
            method: oraculum::Method::from_name(methods[0]),
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        };
        let c = oraculum::pipeline::build(&spec, &opts).unwrap().lowered;
        let mut refuted = 0;
        for (fault, m) in oraculum::mutate::mutants(&c) {
            let right = controlled_map_holds(&m, free, *map);
            let v = verify(&m, &spec, &VerifyOptions::default()).unwrap();
            let proven = matches!(v, Verdict::Proven { .. });
            assert_eq!(proven, right, "{}: {toml}", fault.name());
            refuted += !right as usize;
        }
        assert!(refuted > 10, "{refuted}");
        // The control dropped from the first gate that has it.
        let k = c
            .gates()
            .iter()
            .position(|g| g.has_control(oraculum::Line(0)))
            .unwrap();
        let mut gates = c.gates().to_vec();
        let cs = gates[k]
            .controls()
            .iter()
            .copied()
            .filter(|x| x.line != oraculum::Line(0))
            .collect();
        gates[k] = oraculum::Gate::new(cs, gates[k].target()).unwrap();
        let mut m = c.clone();
        m.set_gates(gates);
        match verify(&m, &spec, &VerifyOptions::default()).unwrap() {
            Verdict::Refuted { counterexample } => {
                // At 1 the mutant is the circuit; only the control at 0 shows it.
                let ctrl = counterexample.input.iter().find(|r| r.register == "ctrl");
                assert_eq!(ctrl.unwrap().value, Some(0), "{counterexample:?}");
            }
            v => panic!("{v:?}"),
        }
        assert!(matches!(
            verify(&m, &spec, &sat).unwrap(),
            Verdict::Refuted { .. }
        ));
    }
}
