//! Circuits are unchanged by refactoring: the OpenQASM of every demo spec and
//! method hashes to the value recorded in `tests/data/golden.txt`.
//!
//! The file was written from main before the module layout changed (commit
//! cb714c9); a change of circuit is either a bug or a deliberate improvement,
//! and then the file is rewritten with `ORACULUM_GOLDEN=write`, in the same
//! commit that says why.

mod common;

use oraculum::{build, parse_spec, BuildOptions, Method};

/// FNV-1a of the text, written here so the test depends on nothing it checks.
fn hash(text: &str) -> String {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in text.as_bytes() {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    format!("{h:016x}")
}

fn rows() -> Vec<String> {
    common::tables();
    let root = common::repo();
    let mut specs: Vec<_> = std::fs::read_dir(root.join("specs"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    specs.sort();
    let mut out = Vec::new();
    for path in specs {
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        let text = std::fs::read_to_string(&path).unwrap();
        let spec = parse_spec(&name, &text).unwrap();
        for method in std::iter::once(None).chain(Method::all().map(Some)) {
            let method_name = method.map_or("auto", Method::name);
            // esop-exact stops at a time budget.
            if method == Some(Method::EsopExact) {
                continue;
            }
            let opts = BuildOptions {
                method,
                verify: None,
                ..Default::default()
            };
            let h = match build(&spec, &opts) {
                Ok(o) => hash(&o.qasm().unwrap()),
                Err(_) => "refused".to_string(),
            };
            out.push(format!("{name} {method_name} {h}"));
        }
    }
    out
}

#[test]
fn every_demo_circuit_is_unchanged() {
    let file = common::repo().join("tests/data/golden.txt");
    let now = rows();
    if std::env::var("ORACULUM_GOLDEN").as_deref() == Ok("write") {
        std::fs::write(&file, now.join("\n") + "\n").unwrap();
        return;
    }
    let recorded = std::fs::read_to_string(&file).unwrap();
    let recorded: Vec<&str> = recorded.lines().collect();
    assert_eq!(recorded.len(), now.len(), "rows differ in number");
    let changed: Vec<String> = recorded
        .iter()
        .zip(&now)
        .filter(|(a, b)| **a != b.as_str())
        .map(|(a, b)| format!("recorded {a}\n     now {b}"))
        .collect();
    assert!(
        changed.is_empty(),
        "circuits changed:\n{}",
        changed.join("\n")
    );
}
