//! Every hole through which a wrong circuit could be called "verified", or a
//! user's file lost, pinned down by a test named after it: phase wrappers,
//! measurements, forged shard files, what `-o` points at, crafted inputs
//! under a memory cap, the advice limit messages give, and reproducible
//! output on any number of threads.

mod common;

use common::{run_in, text, workspace};
use std::path::Path;

fn binary() -> &'static str {
    env!("CARGO_BIN_EXE_oraculum")
}

/// The synthesized OpenQASM of a spec of the workspace, with a method.
fn synth(dir: &Path, spec: &str, method: &str) -> String {
    let o = run_in(dir, &["synth", spec, "--method", method, "-o", "c.qasm"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    std::fs::read_to_string(dir.join("c.qasm")).unwrap()
}

/// Exit code of `verify FILE --spec SPEC` on `qasm`.
fn verify_code(dir: &Path, qasm: &str, spec: &str) -> (i32, String) {
    std::fs::write(dir.join("m.qasm"), qasm).unwrap();
    let o = run_in(dir, &["verify", "m.qasm", "--spec", spec]);
    let (out, err) = text(&o);
    (o.status.code().unwrap_or(-1), out + &err)
}

/// The qubits a file declares, as `reg[i]` names, in order.
fn qubits(qasm: &str) -> Vec<String> {
    qasm.lines()
        .filter_map(|l| l.strip_prefix("qreg "))
        .flat_map(|d| {
            let (name, size) = d.trim_end_matches("];").split_once('[').unwrap();
            let size: usize = size.parse().unwrap();
            (0..size).map(move |i| format!("{name}[{i}]"))
        })
        .collect()
}

/// The gate statements between the declarations and the end.
fn body(qasm: &str) -> (Vec<String>, Vec<String>) {
    let mut head = Vec::new();
    let mut gates = Vec::new();
    for l in qasm.lines() {
        let is_gate = !(l.starts_with("//")
            || l.starts_with("OPENQASM")
            || l.starts_with("include")
            || l.starts_with("qreg")
            || l.is_empty());
        if is_gate {
            gates.push(l.to_string());
        } else {
            head.push(l.to_string());
        }
    }
    (head, gates)
}

fn join(head: &[String], gates: &[String]) -> String {
    let mut s = head.join("\n");
    s.push('\n');
    s.push_str(&gates.join("\n"));
    s.push('\n');
    s
}

/// The statevector of `qasm` with `inputs` put in uniform superposition
/// first (the `qasmsim` crate, an OpenQASM 2 simulator from the registry):
/// is it `(-1)^f(x) / sqrt(2^n)` on `|x>|0..0>` and 0 elsewhere?
fn is_phase_oracle(qasm: &str, inputs: usize, f: &dyn Fn(u64) -> bool) -> bool {
    let (head, gates) = body(qasm);
    let mut prep: Vec<String> = (0..inputs).map(|i| format!("h x[{i}];")).collect();
    prep.extend(gates);
    let Ok(run) = qasmsim::run(&join(&head, &prep), None) else {
        return false;
    };
    let amps = run.statevector().as_complex_bases();
    let scale = 1.0 / ((1u64 << inputs) as f64).sqrt();
    amps.iter().enumerate().all(|(i, a)| {
        let i = i as u64;
        let want = if i >> inputs != 0 {
            0.0
        } else if f(i) {
            -scale
        } else {
            scale
        };
        (a.re - want).abs() < 1e-9 && a.im.abs() < 1e-9
    })
}

/// vault-phase's predicate, from the spec's own description: `a < b` for
/// two 2-bit numbers `a = x0 + 2 x1`, `b = x2 + 2 x3`.
fn vault(x: u64) -> bool {
    let (a, b) = (x & 3, (x >> 2) & 3);
    a < b
}

/// workshop-timetable's predicate, from the spec's description: four 2-bit slots
/// `a, b, c, d`; valid when `a != b`, `c > a`, `d != c` and `b != 3`.
fn timetable(x: u64) -> bool {
    let slot = |k: u64| (x >> (2 * k)) & 3;
    let (a, b, c, d) = (slot(0), slot(1), slot(2), slot(3));
    a != b && c > a && d != c && b != 3
}

#[test]
fn a_phase_wrapper_on_any_qubit_but_the_output_is_refuted() {
    let dir = workspace();
    let qasm = synth(dir.path(), "specs/vault-phase.toml", "esop");
    assert!(
        is_phase_oracle(&qasm, 4, &vault),
        "the synthesized oracle is right"
    );
    let (code, _) = verify_code(dir.path(), &qasm, "specs/vault-phase.toml");
    assert_eq!(code, 0);
    let (head, gates) = body(&qasm);
    let wrapped = &gates[2..gates.len() - 2];
    let mut refuted = 0;
    for q in qubits(&qasm) {
        if q == "y[0]" {
            continue;
        }
        let mut g = vec![format!("x {q};"), format!("h {q};")];
        g.extend(wrapped.iter().cloned());
        g.extend([format!("h {q};"), format!("x {q};")]);
        let moved = join(&head, &g);
        let (code, out) = verify_code(dir.path(), &moved, "specs/vault-phase.toml");
        assert_eq!(code, 1, "wrapper on {q} must be refuted: {out}");
        assert!(out.contains("phase wrapper is on"), "{out}");
        refuted += 1;
    }
    assert!(refuted >= 5, "inputs and ancillae tried: {refuted}");
}

#[test]
fn a_phase_file_against_an_xor_spec_and_a_bare_file_against_a_phase_spec_are_refuted() {
    let dir = workspace();
    let qasm = synth(dir.path(), "specs/vault-phase.toml", "esop");
    let spec = std::fs::read_to_string(dir.path().join("specs/vault-phase.toml")).unwrap();
    let xor = spec.replace("form = \"phase\"", "form = \"xor\"");
    assert_ne!(xor, spec);
    std::fs::write(dir.path().join("xor.toml"), xor).unwrap();
    let (code, out) = verify_code(dir.path(), &qasm, "xor.toml");
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("asks for an xor oracle"), "{out}");
    let (head, gates) = body(&qasm);
    let bare = join(&head, &gates[2..gates.len() - 2]);
    let (code, out) = verify_code(dir.path(), &bare, "specs/vault-phase.toml");
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("has no phase wrapper"), "{out}");
    // The bare core is a correct xor oracle, and is proven as one.
    let (code, out) = verify_code(dir.path(), &bare, "xor.toml");
    assert_eq!(code, 0, "{out}");
}

/// Every demo phase spec, its wrapper moved to every qubit, dropped,
/// duplicated, or half removed: judged by the statevector simulator and by
/// the verifier, no mutant that is not a phase oracle of the spec is ever
/// called verified.
#[test]
fn phase_oracle_mutation_campaign_has_no_false_verified() {
    let dir = workspace();
    let mut mutants = 0;
    let mut false_verified = 0;
    let mut refused_or_refuted = 0;
    type Case = (&'static str, &'static str, usize, fn(u64) -> bool);
    let cases: [Case; 2] = [
        ("specs/vault-phase.toml", "esop", 4, vault),
        ("specs/workshop-timetable.toml", "esop", 8, timetable),
    ];
    for (spec, method, inputs, pred) in cases {
        let qasm = synth(dir.path(), spec, method);
        assert!(is_phase_oracle(&qasm, inputs, &pred), "{spec}");
        let (head, gates) = body(&qasm);
        let core = &gates[2..gates.len() - 2];
        let mut variants: Vec<String> = Vec::new();
        for q in qubits(&qasm) {
            let mut g = vec![format!("x {q};"), format!("h {q};")];
            g.extend(core.iter().cloned());
            g.extend([format!("h {q};"), format!("x {q};")]);
            variants.push(join(&head, &g));
        }
        variants.push(join(&head, core));
        let mut twice = gates[..2].to_vec();
        twice.extend(gates.iter().cloned());
        twice.extend(gates[gates.len() - 2..].iter().cloned());
        variants.push(join(&head, &twice));
        variants.push(join(&head, &gates[..gates.len() - 2]));
        variants.push(join(&head, &gates[2..]));
        let mut only_h = gates.clone();
        only_h.remove(0);
        variants.push(join(&head, &only_h));
        for v in variants {
            mutants += 1;
            let right = is_phase_oracle(&v, inputs, &pred);
            let (code, _) = verify_code(dir.path(), &v, spec);
            if code == 0 && !right {
                false_verified += 1;
            }
            if code != 0 {
                refused_or_refuted += 1;
            }
        }
    }
    assert!(mutants > 20, "{mutants}");
    assert_eq!(false_verified, 0);
    // Only the unchanged wrapper on y[0] (one per spec) is a phase oracle.
    assert_eq!(refused_or_refuted, mutants - 2);
}

#[test]
fn a_mid_circuit_measurement_is_refused_with_its_line() {
    let dir = workspace();
    let qasm = synth(dir.path(), "specs/fuel-sum.toml", "structural");
    let (head, mut gates) = body(&qasm);
    let mut head = head;
    head.push("creg c[1];".into());
    gates.insert(gates.len() / 2, "measure a[0] -> c[0];".into());
    let measured = join(&head, &gates);
    let (code, out) = verify_code(dir.path(), &measured, "specs/fuel-sum.toml");
    assert_eq!(code, 2, "{out}");
    let line = measured
        .lines()
        .position(|l| l.starts_with("measure"))
        .unwrap()
        + 1;
    assert!(out.contains(&format!("m.qasm:{line}:1")), "{out}");
    assert!(out.contains("'measure' is not read"), "{out}");
    for stmt in ["reset a[0];", "if(c==1) x a[0];"] {
        let (head2, mut g) = body(&qasm);
        let mut h = head2;
        h.push("creg c[1];".into());
        g.insert(1, stmt.into());
        let (code, out) = verify_code(dir.path(), &join(&h, &g), "specs/fuel-sum.toml");
        assert_eq!(code, 2, "{stmt}: {out}");
    }
}

#[test]
fn an_undeclared_register_is_an_error_at_its_line() {
    let dir = workspace();
    for stmt in ["barrier q;", "barrier a, nowhere;"] {
        let qasm = format!("OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg a[2];\n{stmt}\n");
        let (code, out) = verify_code(dir.path(), &qasm, "specs/fuel-sum.toml");
        assert_eq!(code, 2, "{out}");
        assert!(out.contains("m.qasm:4:"), "{out}");
        assert!(out.contains("is not declared"), "{out}");
    }
}

/// The shard files of a proven 4-way split of fuel-sum, as JSON values.
fn shards(dir: &Path) -> Vec<serde_json::Value> {
    let o = run_in(dir, &["synth", "specs/fuel-sum.toml", "-o", "f.qasm"]);
    assert_eq!(o.status.code(), Some(0));
    (0..4)
        .map(|k| {
            let o = run_in(
                dir,
                &[
                    "verify",
                    "f.qasm",
                    "--spec",
                    "specs/fuel-sum.toml",
                    "--shard",
                    &format!("{k}/4"),
                ],
            );
            assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
            serde_json::from_slice(&o.stdout).unwrap()
        })
        .collect()
}

fn merge(dir: &Path, set: &[serde_json::Value]) -> (i32, String) {
    let mut args = vec![
        "merge".to_string(),
        "--circuit".into(),
        "f.qasm".into(),
        "--spec".into(),
        "specs/fuel-sum.toml".into(),
    ];
    for (k, v) in set.iter().enumerate() {
        let name = format!("forged-{k}.json");
        std::fs::write(dir.join(&name), serde_json::to_string(v).unwrap()).unwrap();
        args.push(name);
    }
    let args: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = run_in(dir, &args);
    let (out, err) = text(&o);
    (o.status.code().unwrap_or(-1), out + &err)
}

#[test]
fn forged_shard_files_are_refused() {
    let dir = workspace();
    let good = shards(dir.path());
    let (code, out) = merge(dir.path(), &good);
    assert_eq!(code, 0, "{out}");
    type Forge = fn(&mut Vec<serde_json::Value>);
    let forgeries: Vec<(&str, Forge)> = vec![
        ("a range that skips half its words", |s| {
            let end = s[1]["end_word"].as_u64().unwrap();
            let first = s[1]["first_word"].as_u64().unwrap();
            s[1]["end_word"] = (first + (end - first) / 2).into();
        }),
        ("ranges shifted together", |s| {
            for v in s.iter_mut() {
                let f = v["first_word"].as_u64().unwrap();
                let e = v["end_word"].as_u64().unwrap();
                v["first_word"] = (f / 2).into();
                v["end_word"] = (e / 2).into();
            }
        }),
        ("10^12 states", |s| {
            s[0]["states"] = 1_000_000_000_000u64.into()
        }),
        ("zero states", |s| s[2]["states"] = 0.into()),
        ("free_bits 64 everywhere", |s| {
            for v in s.iter_mut() {
                v["free_bits"] = 64.into();
            }
        }),
        ("free_bits 5 everywhere", |s| {
            for v in s.iter_mut() {
                v["free_bits"] = 5.into();
            }
        }),
        ("another circuit's hash", |s| {
            for v in s.iter_mut() {
                v["circuit_hash"] = "00".repeat(32).into();
            }
        }),
        ("a proven shard with a counterexample", |s| {
            s[3]["counterexample"] = serde_json::json!({
                "state": 5, "input": [], "expected": [], "actual": [], "problem": "x"
            });
        }),
        ("a refutation that does not hold", |s| {
            s[3]["proven"] = false.into();
            let first = s[3]["first_word"].as_u64().unwrap();
            s[3]["counterexample"] = serde_json::json!({
                "state": first * 64, "input": [], "expected": [], "actual": [], "problem": "x"
            });
        }),
        ("a split into 2^31 shards", |s| {
            for v in s.iter_mut() {
                v["of"] = (1u64 << 31).into();
            }
        }),
        ("a split into 2^63 shards", |s| {
            for v in s.iter_mut() {
                v["of"] = (1u64 << 63).into();
            }
        }),
    ];
    for (what, forge) in forgeries {
        let mut set = good.clone();
        forge(&mut set);
        let (code, out) = merge(dir.path(), &set);
        assert_eq!(code, 2, "{what}: {out}");
        assert!(!out.contains("verified on"), "{what}: {out}");
    }
    // A refuted shard flipped to proven is caught when its circuit is wrong:
    // the merge re-derives counts, and a flipped shard has 0 states checked.
    let mut flipped = good.clone();
    flipped[1]["proven"] = true.into();
    flipped[1]["states"] = 0.into();
    let (code, _) = merge(dir.path(), &flipped);
    assert_eq!(code, 2);
}

#[cfg(unix)]
fn is_root() -> bool {
    std::process::Command::new("id")
        .arg("-u")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim() == "0")
        .unwrap_or(false)
}

#[cfg(unix)]
#[test]
fn writing_onto_a_device_node_writes_into_it_and_keeps_the_node() {
    use std::os::unix::fs::FileTypeExt;
    if !is_root() {
        eprintln!("skipped: making a device node needs root");
        return;
    }
    let dir = workspace();
    let node = dir.path().join("null");
    let made = std::process::Command::new("mknod")
        .args([node.to_str().unwrap(), "c", "1", "3"])
        .status()
        .unwrap();
    assert!(made.success());
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "null"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let m = std::fs::symlink_metadata(&node).unwrap();
    assert!(m.file_type().is_char_device(), "still a device node");
    let stray = std::fs::read_dir(dir.path())
        .unwrap()
        .filter(|e| {
            e.as_ref()
                .unwrap()
                .file_name()
                .to_string_lossy()
                .starts_with(".oraculum")
        })
        .count();
    assert_eq!(stray, 0);
}

#[cfg(unix)]
#[test]
fn writing_onto_a_symlink_replaces_its_target_and_keeps_the_link() {
    let dir = workspace();
    std::fs::create_dir(dir.path().join("out")).unwrap();
    std::fs::write(dir.path().join("out/real.qasm"), "old").unwrap();
    std::os::unix::fs::symlink("out/real.qasm", dir.path().join("link.qasm")).unwrap();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "link.qasm"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let m = std::fs::symlink_metadata(dir.path().join("link.qasm")).unwrap();
    assert!(m.file_type().is_symlink(), "the link stays a link");
    let written = std::fs::read_to_string(dir.path().join("out/real.qasm")).unwrap();
    assert!(written.starts_with("OPENQASM 2.0;"));
    // A dangling link: its target is created.
    std::os::unix::fs::symlink("out/new.qasm", dir.path().join("dangling.qasm")).unwrap();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "dangling.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    assert!(dir.path().join("out/new.qasm").is_file());
    assert!(std::fs::symlink_metadata(dir.path().join("dangling.qasm"))
        .unwrap()
        .file_type()
        .is_symlink());
}

#[cfg(unix)]
#[test]
fn writing_onto_a_fifo_writes_into_it_and_keeps_the_fifo() {
    use std::os::unix::fs::FileTypeExt;
    let dir = workspace();
    let fifo = dir.path().join("pipe");
    let made = std::process::Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .unwrap();
    assert!(made.success());
    let reader = {
        let fifo = fifo.clone();
        std::thread::spawn(move || std::fs::read_to_string(fifo).unwrap())
    };
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "pipe"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let got = reader.join().unwrap();
    assert!(got.starts_with("OPENQASM 2.0;"), "{got}");
    assert!(std::fs::symlink_metadata(&fifo)
        .unwrap()
        .file_type()
        .is_fifo());
}

#[cfg(unix)]
#[test]
fn writing_over_a_file_keeps_its_permission_bits() {
    use std::os::unix::fs::PermissionsExt;
    let dir = workspace();
    let target = dir.path().join("kept.qasm");
    std::fs::write(&target, "old").unwrap();
    std::fs::set_permissions(&target, std::fs::Permissions::from_mode(0o640)).unwrap();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "kept.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    let mode = std::fs::metadata(&target).unwrap().permissions().mode() & 0o777;
    assert_eq!(mode, 0o640);
    assert!(std::fs::read_to_string(&target)
        .unwrap()
        .starts_with("OPENQASM"));
}

#[test]
fn dash_writes_to_standard_output() {
    let dir = workspace();
    let o = run_in(dir.path(), &["synth", "specs/greenhouse.toml", "-o", "-"]);
    assert_eq!(o.status.code(), Some(0));
    assert!(String::from_utf8_lossy(&o.stdout).starts_with("OPENQASM 2.0;"));
    assert!(!dir.path().join("-").exists());
}

/// Runs the binary with its address space capped at 4 GiB (`ulimit -v` in a
/// shell), and returns how it ended: its exit code, or `None` if a signal
/// ended it.
#[cfg(unix)]
fn capped(dir: &Path, args: &[&str]) -> (Option<i32>, String) {
    let o = std::process::Command::new("sh")
        .arg("-c")
        .arg("ulimit -v 4194304; exec \"$0\" \"$@\"")
        .arg(binary())
        .args(args)
        .current_dir(dir)
        .env(
            "ORACULUM_CACHE",
            std::env::temp_dir().join("oraculum-test-cache"),
        )
        .output()
        .unwrap();
    (
        o.status.code(),
        String::from_utf8_lossy(&o.stderr).to_string(),
    )
}

#[cfg(unix)]
#[test]
fn crafted_inputs_under_a_4_gb_cap_end_with_a_code_never_a_signal() {
    let dir = workspace();
    let d = dir.path();
    // A chain of 20,000 definitions, each using the one before.
    let mut chain = String::from(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\"]\n[let]\nd0 = \"a ^ b\"\n",
    );
    for i in 1..20_000 {
        chain.push_str(&format!("d{i} = \"d{} ^ a\"\n", i - 1));
    }
    chain.push_str("[expr]\nf = \"d19999\"\n");
    std::fs::write(d.join("chain.toml"), &chain).unwrap();
    // Definitions that double: 2^2000 nodes as trees, 4,000 shared.
    let mut double = String::from(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\"]\n[let]\ne0 = \"a & b\"\n",
    );
    for i in 1..2000 {
        double.push_str(&format!("e{i} = \"e{} ^ !e{}\"\n", i - 1, i - 1));
    }
    double.push_str("[expr]\nf = \"e1999 | a\"\n");
    std::fs::write(d.join("double.toml"), &double).unwrap();
    // Whole-register gates on 2^20 qubits: 2^31 gates if expanded.
    let mut huge = String::from("OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg q[1048576];\n");
    for _ in 0..2048 {
        huge.push_str("x q;\n");
    }
    std::fs::write(d.join("huge.qasm"), &huge).unwrap();
    // A lookup of 2^20 words of 63 bits, all ones: 66 million gates.
    let mut lookup = String::from(
        "kind = \"arithmetic\"\nop = \"lookup\"\nwidth = 20\ndata_width = 63\ndata = [",
    );
    let word = (1u64 << 63) - 1;
    for i in 0..1 << 20 {
        if i > 0 {
            lookup.push(',');
        }
        lookup.push_str(&word.to_string());
    }
    lookup.push_str("]\n");
    std::fs::write(d.join("lookup.toml"), &lookup).unwrap();
    // A 30-input table: 2^28 hex digits would be 256 MB of text; a table
    // with the wrong digit count must be refused before any table exists.
    std::fs::write(
        d.join("table.toml"),
        format!(
            "kind = \"function\"\ninputs = [{}]\noutputs = [\"f\"]\n[table]\nf = \"0x{}\"\n",
            (0..30)
                .map(|i| format!("\"i{i}\""))
                .collect::<Vec<_>>()
                .join(", "),
            "f".repeat(1 << 20)
        ),
    )
    .unwrap();
    // A 400-node network scheduled in a tight qubit budget.
    let mut net = String::from("kind = \"function\"\ninputs = [");
    net.push_str(
        &(0..16)
            .map(|i| format!("\"i{i}\""))
            .collect::<Vec<_>>()
            .join(", "),
    );
    net.push_str("]\noutputs = [\"f\"]\n[let]\n");
    for k in 0..400 {
        let a = if k < 2 {
            format!("i{}", k % 16)
        } else {
            format!("n{}", k - 1)
        };
        let b = if k < 3 {
            format!("i{}", (k + 5) % 16)
        } else {
            format!("n{}", k - 2 - k % 2)
        };
        net.push_str(&format!("n{k} = \"{a} & !{b} ^ i{}\"\n", k % 16));
    }
    net.push_str("[expr]\nf = \"n399\"\n");
    std::fs::write(d.join("net.toml"), &net).unwrap();
    let cases: Vec<(Vec<&str>, &[i32])> = vec![
        (vec!["synth", "chain.toml", "-o", "o.qasm"], &[0]),
        (vec!["draw", "chain.toml"], &[0]),
        (vec!["synth", "double.toml", "-o", "o.qasm"], &[0]),
        (vec!["cost", "huge.qasm"], &[3]),
        (vec!["verify", "huge.qasm", "--spec", "double.toml"], &[3]),
        (vec!["draw", "huge.qasm"], &[3]),
        (vec!["synth", "lookup.toml", "-o", "o.qasm"], &[3]),
        (vec!["synth", "table.toml", "-o", "o.qasm"], &[2]),
        (
            vec![
                "synth",
                "net.toml",
                "--method",
                "bennett",
                "--max-qubits",
                "30",
                "-o",
                "o.qasm",
            ],
            &[0, 3],
        ),
    ];
    for (args, want) in cases {
        let (code, err) = capped(d, &args);
        let code = code.unwrap_or_else(|| panic!("{args:?} ended by a signal: {err}"));
        assert!(want.contains(&code), "{args:?} exited {code}: {err}");
        assert!(!err.contains("panicked"), "{args:?}: {err}");
    }
}

#[test]
fn a_closed_pipe_ends_quietly() {
    let dir = workspace();
    let mut child = std::process::Command::new(binary())
        .args(["draw", "specs/workshop-timetable.toml"])
        .current_dir(dir.path())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Read one line, then close the pipe.
    let mut out = child.stdout.take().unwrap();
    let mut first = [0u8; 8];
    std::io::Read::read_exact(&mut out, &mut first).unwrap();
    drop(out);
    let o = child.wait_with_output().unwrap();
    assert!(matches!(o.status.code(), Some(0) | None), "{:?}", o.status);
    assert!(!String::from_utf8_lossy(&o.stderr).contains("panicked"));
}

#[test]
fn names_longer_than_the_format_width_limit_are_drawn() {
    let dir = workspace();
    let long = "a".repeat(70_000);
    std::fs::write(
        dir.path().join("long.toml"),
        format!("kind = \"function\"\ninputs = [\"{long}\", \"b\"]\noutputs = [\"f\"]\n[expr]\nf = \"{long} & b\"\n"),
    )
    .unwrap();
    let o = run_in(dir.path(), &["draw", "long.toml"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let o = run_in(dir.path(), &["draw", "long.toml", "--svg", "l.svg"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
}

#[test]
fn a_hundred_thousand_outputs_are_validated() {
    let n = 100_000;
    let mut s = String::from("kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [");
    s.push_str(
        &(0..n)
            .map(|i| format!("\"o{i}\""))
            .collect::<Vec<_>>()
            .join(", "),
    );
    s.push_str("]\n[expr]\n");
    for i in 0..n {
        s.push_str(&format!(
            "o{i} = \"{}\"\n",
            if i % 2 == 0 { "a & b" } else { "a ^ b" }
        ));
    }
    let spec = oraculum::parse_spec("many.toml", &s).unwrap();
    let oraculum::SpecBody::Function(f) = spec.body else {
        unreachable!()
    };
    assert_eq!(f.outputs.len(), n);
    assert_eq!(f.outputs[99_999].name, "o99999");
    // A name used twice among them is still found, at its place.
    let twice = s.replacen("\"o77\"]", "\"o77\", \"o5\"]", 1);
    let twice = twice.replacen("\"o99999\"]", "\"o99999\", \"o5\"]", 1);
    let e = oraculum::parse_spec("many.toml", &twice).unwrap_err();
    assert_eq!(
        e.kind,
        oraculum::spec::SpecErrorKind::NameTwice("o5".into())
    );
}

#[test]
fn past_the_exhaustive_limit_verify_offers_the_sat_route_not_a_synth_flag() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/fuel-sum.toml", "-o", "f.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "f.qasm",
            "--spec",
            "specs/fuel-sum.toml",
            "--method",
            "exhaustive",
            "--max-states",
            "16",
        ],
    );
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("--method sat"), "{err}");
    assert!(!err.contains("--no-verify"), "{err}");
}

#[test]
fn a_tiny_sat_budget_names_the_sat_budget() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/badge-match.toml",
            "--method",
            "bennett",
            "--verify-method",
            "sat",
            "--sat-seconds",
            "0.000001",
            "-o",
            "b.qasm",
        ],
    );
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("--sat-seconds"), "{err}");
    assert!(!err.contains("--max-inputs"), "{err}");
}

#[test]
fn a_pebbling_search_out_of_time_says_so_instead_of_claiming_no_circuit_fits() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/workshop-timetable.toml",
            "--method",
            "bennett",
            "--max-qubits",
            "16",
            "--exact-seconds",
            "0.001",
            "-o",
            "t.qasm",
        ],
    );
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("ran out of time"), "{err}");
    assert!(err.contains("--exact-seconds"), "{err}");
    assert!(!err.contains("no circuit fits"), "{err}");
    // With time, 16 qubits work.
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/workshop-timetable.toml",
            "--method",
            "bennett",
            "--max-qubits",
            "16",
            "--exact-seconds",
            "36000",
            "-o",
            "t.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
}

#[test]
fn permutations_wider_than_any_method_are_refused_at_the_width() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("wide.toml"),
        "kind = \"permutation\"\nwidth = 17\nimages = [0, 1]\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["synth", "wide.toml"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("wide.toml:2:9"), "{err}");
    assert!(err.contains("between 1 and 16"), "{err}");
}

/// `exact` and `auto` on 4-line functions give the same file, byte for byte,
/// on one thread and on two, run after run.
#[test]
fn results_are_the_same_on_any_number_of_threads() {
    let dir = workspace();
    let specs = [
        // A 4-bit S-box (the PRESENT cipher's, Bogdanov et al. 2007, from memory).
        "kind = \"permutation\"\nwidth = 4\nimages = [12, 5, 6, 11, 9, 0, 10, 13, 3, 14, 15, 8, 4, 7, 1, 2]\n",
        // hwb4: rotate the input by its Hamming weight (common practice).
        "kind = \"permutation\"\nwidth = 4\nimages = [0, 2, 4, 12, 8, 5, 9, 11, 1, 6, 10, 13, 3, 14, 7, 15]\n",
    ];
    for (k, s) in specs.iter().enumerate() {
        let name = format!("p{k}.toml");
        std::fs::write(dir.path().join(&name), s).unwrap();
        for method in ["exact", "auto"] {
            let mut seen: Option<Vec<u8>> = None;
            for threads in ["1", "2", "1", "2"] {
                let o = std::process::Command::new(binary())
                    .args([
                        "synth",
                        &name,
                        "--method",
                        method,
                        "--exact-seconds",
                        "36000",
                    ])
                    .current_dir(dir.path())
                    .env("RAYON_NUM_THREADS", threads)
                    .env(
                        "ORACULUM_CACHE",
                        std::env::temp_dir().join("oraculum-test-cache"),
                    )
                    .output()
                    .unwrap();
                assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
                match &seen {
                    None => seen = Some(o.stdout),
                    Some(first) => {
                        assert_eq!(first, &o.stdout, "{name} {method} on {threads} threads")
                    }
                }
            }
        }
    }
}

/// The ESOP gate limit is checked before any cube is built: a random
/// function of 24 inputs and 16 outputs has about 2^23 cubes per output (a
/// random Boolean function's Reed-Muller spectrum is dense, common
/// practice), far past the default 2,000,000 gates, and is refused with
/// nothing built. The assertion is on the work counter, not on time.
#[test]
fn esop_limit_is_checked_before_its_cubes_are_built() {
    use oraculum::logic::{Dag, TruthTable};
    use oraculum::spec::{FunctionSpec, Output, OutputDef};
    use oraculum::synth::{esop_counted, EsopWork, SynthError, SynthLimits};

    let n = 24;
    let mut state = 0x9e37_79b9_7f4a_7c15u64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    let outputs = (0..16)
        .map(|j| {
            let words: Vec<u64> = (0..(1usize << n) / 64).map(|_| next()).collect();
            Output {
                name: format!("f{j}"),
                def: OutputDef::Table(TruthTable::from_words(n, &words)),
            }
        })
        .collect();
    let f = FunctionSpec {
        inputs: (0..n).map(|i| format!("x{i}")).collect(),
        outputs,
        dag: Dag::default(),
    };
    let mut work = EsopWork::default();
    match esop_counted(&f, &SynthLimits::default(), &mut work, &()) {
        Err(SynthError::Limit { limit, value, .. }) => {
            assert_eq!(limit, 2_000_000);
            assert!(value > limit, "{value}");
        }
        other => panic!(
            "expected the gate limit, got {:?}",
            other.map(|e| e.terms.len())
        ),
    }
    assert_eq!(work.cubes, 0, "cubes were built before the refusal");
}

/// One gate with twelve controls lowers to `2 * 12 - 3 = 21` Toffolis
/// (Barenco et al., Phys. Rev. A 52, 3457, 1995): under `--max-gates 2` the
/// lowered cap is 16, so the job stops with exit 3 naming `--max-gates`, and
/// writes nothing.
#[test]
fn the_lowered_size_is_checked_before_lowering() {
    let dir = workspace();
    let names: Vec<String> = (0..12).map(|i| format!("s{i}")).collect();
    let spec = format!(
        "name = \"all-seals\"\nkind = \"function\"\ninputs = [{}]\noutputs = [\"open\"]\n\n[expr]\nopen = \"{}\"\n",
        names.iter().map(|n| format!("\"{n}\"")).collect::<Vec<_>>().join(", "),
        names.join(" & ")
    );
    std::fs::write(dir.path().join("seals.toml"), spec).unwrap();
    let args = ["synth", "seals.toml", "--method", "esop", "-o", "s.qasm"];
    let o = run_in(dir.path(), &args);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    std::fs::remove_file(dir.path().join("s.qasm")).unwrap();
    let mut tight = args.to_vec();
    tight.extend(["--max-gates", "2"]);
    let o = run_in(dir.path(), &tight);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("lowered gate count is 21"), "{err}");
    assert!(err.contains("--max-gates"), "{err}");
    assert!(!dir.path().join("s.qasm").exists());
}
