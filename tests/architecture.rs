//! The module layout of docs/architecture.md, checked on the source: the
//! allowed arrows between top-level modules, no cycle, the verifier's
//! independence, no file system or environment access and no global state
//! outside the places that are allowed them.
//!
//! The check reads every `crate::` path in the code (comments stripped) of
//! each file under `src/` and attributes it to the file's top-level module.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

mod common;

/// The allowed arrows: each top-level module and the modules it may use.
/// docs/architecture.md draws the same table.
const ALLOWED: &[(&str, &[&str])] = &[
    ("source", &[]),
    ("limit", &[]),
    ("circuit", &[]),
    ("logic", &[]),
    ("exact", &["circuit", "logic"]),
    ("progress", &["exact"]),
    ("xag", &["logic"]),
    ("netlist", &["source", "logic"]),
    ("spec", &["source", "logic", "circuit", "netlist"]),
    ("lower", &["circuit"]),
    ("mutate", &["circuit"]),
    ("opt", &["circuit", "exact", "lower"]),
    (
        "synth",
        &[
            "circuit", "logic", "spec", "exact", "opt", "limit", "progress", "xag",
        ],
    ),
    (
        "verify",
        &["circuit", "spec", "logic", "limit", "progress", "source"],
    ),
    (
        "pipeline",
        &[
            "circuit", "spec", "synth", "opt", "lower", "verify", "limit", "progress",
        ],
    ),
    (
        "export",
        &[
            "circuit", "source", "spec", "pipeline", "verify", "synth", "exact", "limit",
        ],
    ),
];

/// What the verifier may take from `logic`: the spec's data types, never an
/// evaluation routine (it has its own).
const VERIFY_LOGIC_DATA: &[&str] = &["Dag", "NodeId", "Term", "TruthTable", "Permutation"];

/// Calls into evaluation code of the synthesis side that the verifier must not make.
const VERIFY_FORBIDDEN_CALLS: &[&str] = &[
    "from_expr",
    "eval_word",
    ".eval(",
    "eval_all",
    ".simulate(",
    ".table(",
    "cancel_pairs",
    "TruthTable::from_fn",
];

/// Files allowed to touch the file system or the environment (the command
/// line is a separate crate and not scanned here).
const IO_ALLOWED: &[&str] = &["src/exact/four/store.rs"];

/// Files allowed process-wide state: the one table handle.
const GLOBAL_ALLOWED: &[&str] = &["src/exact/mod.rs"];

/// Files over 600 lines, each holding one concept (named in its `//!` line).
const LONG_FILES: &[&str] = &[
    // One format: the OpenQASM 2 reader and writer, with the measured
    // uncompute's gadget read and written as one gate.
    "src/export/qasm2.rs",
    // The OpenQASM 3 reader: its tokenizer, gate and subroutine definitions
    // and gadget.
    "src/export/qasm3_read.rs",
    // ESOP cubes and their algebra.
    "src/logic/esop.rs",
    // The verifier's SAT miter.
    "src/verify/sat.rs",
    // The verifier's gate kernel, compiled three times over CPU levels.
    "src/verify/kernel.rs",
    // The verifier's compiled word program for expressions.
    "src/verify/program.rs",
    // One reader each: BLIF, AIGER.
    "src/netlist/blif.rs",
    "src/netlist/aiger.rs",
    // The raw netlist and its evaluation, with the readers' shared tests.
    "src/netlist/mod.rs",
    // Exact minimum-AND synthesis of small XOR-AND graphs.
    "src/xag/exact.rs",
];

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// The code of a file with `//` comments blanked out (strings are kept; a
/// `//` inside a string is rare enough in this code base to ignore), and
/// without its tests (a `#[cfg(test)]` module closes every file here).
fn code_of(text: &str) -> String {
    let text = match text.find("#[cfg(test)]") {
        Some(k) => &text[..k],
        None => text,
    };
    text.lines()
        .map(|l| match l.find("//") {
            Some(k) => &l[..k],
            None => l,
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// (file relative to the repository, its top-level module, its code).
fn sources() -> Vec<(String, String, String)> {
    let root = common::repo();
    let mut files = Vec::new();
    rust_files(&root.join("src"), &mut files);
    files.sort();
    files
        .into_iter()
        .filter_map(|p| {
            let rel = p
                .strip_prefix(&root)
                .unwrap()
                .to_string_lossy()
                .replace('\\', "/");
            let inner = rel.strip_prefix("src/").unwrap();
            let top = inner
                .split('/')
                .next()
                .unwrap()
                .trim_end_matches(".rs")
                .to_string();
            if matches!(top.as_str(), "lib" | "main" | "cli") || rel.ends_with("/tests.rs") {
                return None;
            }
            let text = std::fs::read_to_string(&p).unwrap();
            Some((rel, top, code_of(&text)))
        })
        .collect()
}

/// Every `crate::NAME` in the code, with the item names that follow it.
fn crate_paths(code: &str) -> Vec<(String, String)> {
    let mut out = Vec::new();
    let mut rest = code;
    while let Some(k) = rest.find("crate::") {
        let after = &rest[k + 7..];
        let name: String = after
            .chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
            .collect();
        let tail: String = after[name.len()..]
            .chars()
            .take_while(|c| *c != ';' && *c != '\n' && *c != '(')
            .collect();
        out.push((name, tail));
        rest = after;
    }
    out
}

fn edges() -> BTreeMap<String, BTreeSet<(String, String)>> {
    let mut g: BTreeMap<String, BTreeSet<(String, String)>> = BTreeMap::new();
    for (file, top, code) in sources() {
        for (to, _) in crate_paths(&code) {
            if to != top {
                g.entry(top.clone()).or_default().insert((to, file.clone()));
            }
        }
    }
    g
}

#[test]
fn every_arrow_between_modules_is_allowed() {
    let allowed: BTreeMap<&str, &[&str]> = ALLOWED.iter().copied().collect();
    let mut bad = Vec::new();
    for (from, tos) in edges() {
        let ok = allowed.get(from.as_str()).unwrap_or_else(|| {
            panic!("module '{from}' is missing from ALLOWED and docs/architecture.md")
        });
        for (to, file) in tos {
            if !ok.contains(&to.as_str()) {
                bad.push(format!("{file}: {from} -> {to}"));
            }
        }
    }
    assert!(bad.is_empty(), "forbidden arrows:\n{}", bad.join("\n"));
}

#[test]
fn the_modules_form_no_cycle() {
    let g = edges();
    let next: BTreeMap<&str, Vec<&str>> = g
        .iter()
        .map(|(k, v)| (k.as_str(), v.iter().map(|(t, _)| t.as_str()).collect()))
        .collect();
    // Depth-first search with an explicit stack; a grey node met again closes a cycle.
    let mut colour: BTreeMap<&str, u8> = BTreeMap::new();
    for &start in next.keys() {
        if colour.contains_key(start) {
            continue;
        }
        let mut stack: Vec<(&str, usize)> = vec![(start, 0)];
        colour.insert(start, 1);
        while let Some((v, i)) = stack.pop() {
            let succ = next.get(v).map(|s| s.as_slice()).unwrap_or(&[]);
            if i < succ.len() {
                stack.push((v, i + 1));
                let w = succ[i];
                match colour.get(w) {
                    Some(1) => {
                        let path: Vec<&str> = stack.iter().map(|(n, _)| *n).collect();
                        panic!("module cycle: {} -> {w}", path.join(" -> "));
                    }
                    Some(_) => {}
                    None => {
                        colour.insert(w, 1);
                        stack.push((w, 0));
                    }
                }
            } else {
                colour.insert(v, 2);
            }
        }
    }
}

#[test]
fn the_verifier_uses_no_evaluation_code_of_synthesis() {
    let mut bad = Vec::new();
    for (file, top, code) in sources() {
        if top != "verify" {
            continue;
        }
        for (to, tail) in crate_paths(&code) {
            if to != "logic" {
                continue;
            }
            let names: Vec<&str> = tail
                .split(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
                .filter(|n| !n.is_empty())
                .collect();
            for n in names {
                if !VERIFY_LOGIC_DATA.contains(&n) {
                    bad.push(format!("{file}: uses logic::{n}"));
                }
            }
        }
        for call in VERIFY_FORBIDDEN_CALLS {
            if code.contains(call) {
                bad.push(format!("{file}: calls {call}"));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "the verifier reaches into synthesis code:\n{}",
        bad.join("\n")
    );
}

#[test]
fn the_core_touches_no_file_and_no_environment() {
    let mut bad = Vec::new();
    for (file, _, code) in sources() {
        if IO_ALLOWED.contains(&file.as_str()) {
            continue;
        }
        for word in [
            "std::fs",
            "std::env",
            "File::",
            "env::var",
            "std::io::stdin",
            "std::process",
        ] {
            if code.contains(word) {
                bad.push(format!("{file}: {word}"));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "file system or environment outside the store:\n{}",
        bad.join("\n")
    );
}

#[test]
fn the_core_keeps_no_global_state_but_the_table_handle() {
    let mut bad = Vec::new();
    for (file, _, code) in sources() {
        if GLOBAL_ALLOWED.contains(&file.as_str()) {
            continue;
        }
        for word in ["OnceLock", "thread_local!", "lazy_static", "OnceCell"] {
            if code.contains(word) {
                bad.push(format!("{file}: {word}"));
            }
        }
        for line in code.lines() {
            let t = line.trim_start();
            if t.starts_with("static ")
                || t.starts_with("pub static ")
                || t.contains(" static mut ")
            {
                bad.push(format!("{file}: {t}"));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "global state in the core:\n{}",
        bad.join("\n")
    );
}

#[test]
fn every_file_says_what_it_is_and_long_files_hold_one_concept() {
    let root = common::repo();
    let mut files = Vec::new();
    rust_files(&root.join("src"), &mut files);
    let mut bad = Vec::new();
    for p in files {
        let rel = p
            .strip_prefix(&root)
            .unwrap()
            .to_string_lossy()
            .replace('\\', "/");
        let text = std::fs::read_to_string(&p).unwrap();
        if !text.starts_with("//!") {
            bad.push(format!("{rel}: no //! line"));
        }
        let lines = text.lines().count();
        if lines > 600 && !LONG_FILES.contains(&rel.as_str()) {
            bad.push(format!("{rel}: {lines} lines"));
        }
    }
    assert!(bad.is_empty(), "{}", bad.join("\n"));
}
