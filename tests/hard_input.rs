//! Hard input: random and mutated specs, expressions and OpenQASM files
//! (plain and Clifford+T) go through every reader (and, when they parse, the
//! whole pipeline under small limits) without a panic; the binary answers bad
//! files with exit 2.

mod common;

use oraculum::export::{read_circuit_with, ReadLimits};
use oraculum::logic::parse_expr;
use oraculum::pipeline::build_one;
use oraculum::{parse_spec, read_qasm, verify, BuildOptions, Method, SynthLimits, VerifyOptions};
use proptest::prelude::*;

fn demo_texts() -> Vec<String> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("specs");
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| std::fs::read_to_string(e.unwrap().path()).unwrap())
        .collect();
    v.sort();
    v
}

/// Small limits, so that whatever parses also runs quickly.
fn small() -> BuildOptions {
    common::tables();
    BuildOptions {
        method: None,
        limits: SynthLimits {
            max_table_inputs: 10,
            max_gates: 5_000,
            exact_seconds: 0.2,
            ..SynthLimits::default()
        },
        verify: Some(VerifyOptions {
            max_states: 1 << 14,
            sat_seconds: 1.0,
            ..VerifyOptions::default()
        }),
        ..BuildOptions::default()
    }
}

#[derive(Clone, Debug)]
enum Edit {
    Insert(usize, char),
    Delete(usize),
    Replace(usize, char),
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut chars: Vec<char> = text.chars().collect();
    for e in edits {
        let n = chars.len().max(1);
        match *e {
            Edit::Insert(at, c) => chars.insert(at % (chars.len() + 1), c),
            Edit::Delete(at) if !chars.is_empty() => {
                chars.remove(at % n);
            }
            Edit::Replace(at, c) if !chars.is_empty() => chars[at % n] = c,
            _ => {}
        }
    }
    chars.into_iter().collect()
}

fn interesting_char() -> impl Strategy<Value = char> {
    prop_oneof![
        prop::sample::select(vec![
            '"', '\'', '[', ']', '=', '\n', ',', '0', '1', '9', 'x', 'b', '-', '&', '|', '^', '!',
            '~', '(', ')', ';', '{', '}', '#', ' ', '\\', 'é', '\u{0}'
        ]),
        any::<char>(),
    ]
}

fn edits() -> impl Strategy<Value = Vec<Edit>> {
    prop::collection::vec(
        prop_oneof![
            (any::<usize>(), interesting_char()).prop_map(|(a, c)| Edit::Insert(a, c)),
            any::<usize>().prop_map(Edit::Delete),
            (any::<usize>(), interesting_char()).prop_map(|(a, c)| Edit::Replace(a, c)),
        ],
        1..6,
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 600, ..ProptestConfig::default() })]

    #[test]
    fn mutated_specs_never_panic(pick in any::<prop::sample::Index>(), e in edits()) {
        let texts = demo_texts();
        let text = apply(&texts[pick.index(texts.len())], &e);
        match parse_spec("fuzz.toml", &text) {
            Ok(spec) => {
                let _ = oraculum::build(&spec, &small());
            }
            Err(err) => {
                // Every error has a place in the file.
                prop_assert!(err.location.line >= 1 && err.location.column >= 1);
                prop_assert!(err.location.line <= text.lines().count().max(1) + 1);
            }
        }
    }

    #[test]
    fn random_text_never_panics(text in "\\PC{0,200}") {
        let _ = parse_spec("fuzz.toml", &text);
        let _ = read_qasm("fuzz.qasm", &text);
        let _ = parse_expr(&text, &["a".to_string(), "b".to_string()]);
    }

    #[test]
    fn random_expressions_never_panic(text in "[ab01!~&^|() x]{0,60}") {
        let names = ["a".to_string(), "b".to_string()];
        if let Err(e) = parse_expr(&text, &names) {
            prop_assert!(e.offset <= text.len());
        }
    }

    #[test]
    fn mutated_qasm_never_panics(e in edits()) {
        let spec = parse_spec("g.toml", &demo_texts().into_iter().find(|t| t.contains("greenhouse")).unwrap()).unwrap();
        let out = build_one(&spec, Method::Esop, &BuildOptions::default(), &()).unwrap();
        let text = apply(&out.qasm().unwrap(), &e);
        if let Ok(c) = read_qasm("fuzz.qasm", &text) {
            let _ = verify(&c, &spec, &small().verify.unwrap());
        }
    }

    // The Clifford+T reader on a measure-mode file with a few edits: no
    // panic, every refusal placed inside the file, and what it reads goes
    // through the verifier.
    #[test]
    fn mutated_clifford_t_never_panics(e in edits()) {
        let spec = parse_spec("g.toml", &demo_texts().into_iter().find(|t| t.contains("greenhouse")).unwrap()).unwrap();
        let opts = BuildOptions { uncompute: oraculum::Uncompute::Measure, ..BuildOptions::default() };
        let out = build_one(&spec, Method::Bennett, &opts, &()).unwrap();
        let text = apply(&out.clifford_t().unwrap(), &e);
        match read_circuit_with("fuzz.qasm", &text, &ReadLimits::default()) {
            Ok(c) => {
                let _ = verify(&c, &spec, &small().verify.unwrap());
            }
            Err(err) => {
                if let Some(l) = err.located() {
                    prop_assert!(l.location.line >= 1 && l.location.line <= text.lines().count().max(1) + 1);
                }
            }
        }
    }

    #[test]
    fn random_text_in_clifford_t_form_never_panics(text in "\\PC{0,200}") {
        let marked = format!("OPENQASM 2.0;\n// format: clifford+t\nqreg q[3];\ncreg m[1];\n{text}");
        let _ = read_circuit_with("fuzz.qasm", &marked, &ReadLimits::default());
    }
}

#[test]
fn deep_nesting_is_refused_not_overflowed() {
    let deep = format!(
        "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[expr]\nf = \"{}a{}\"\n",
        "(".repeat(5000),
        ")".repeat(5000)
    );
    assert!(parse_spec("deep.toml", &deep).is_err());
    let arrays = format!("kind = {}1{}\n", "[".repeat(5000), "]".repeat(5000));
    assert!(parse_spec("deep.toml", &arrays).is_err());
    let huge = "OPENQASM 2.0;\nqreg q[4294967295];\n";
    assert!(read_qasm("huge.qasm", huge).is_err());
}

#[test]
fn the_binary_answers_garbage_with_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("junk.toml");
    std::fs::write(&p, [0xffu8, 0xfe, 0x00, 0x41, 0x0a]).unwrap();
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_oraculum"))
        .args(["synth", p.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let q = dir.path().join("junk.qasm");
    std::fs::write(&q, "OPENQASM 2.0;\nqreg x[1];\nU(0,0,0) x[0];\n").unwrap();
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_oraculum"))
        .args(["cost", q.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
}
