//! Runs the real `oraculum` binary in temporary folders: the README's commands,
//! exit codes, error locations, and atomic writes.

mod common;

use common::{qasmsim_run, repo, run_in, text, workspace, COST_FIELDS};

#[test]
fn readme_first_command_works_on_a_fresh_copy() {
    let readme = std::fs::read_to_string(repo().join("README.md")).unwrap();
    let line = readme
        .lines()
        .find(|l| l.trim_start().starts_with("cargo run --release -- "))
        .expect("the README gives the build-and-run command");
    let args: Vec<&str> = line
        .trim()
        .trim_start_matches("cargo run --release -- ")
        .split_whitespace()
        .collect();
    let dir = workspace();
    let o = run_in(dir.path(), &args);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{out}\n{err}");
    assert!(out.contains("verified on all"), "{out}");
    let written = args[args.iter().position(|a| *a == "-o").unwrap() + 1];
    let qasm = std::fs::read_to_string(dir.path().join(written)).unwrap();
    assert!(qasm.starts_with("OPENQASM 2.0;\ninclude \"qelib1.inc\";\n"));
    // And the file it wrote verifies against its spec with the second tool.
    let o = run_in(dir.path(), &["verify", written, "--spec", args[1]]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
}

#[test]
fn ci_runs_the_readme_test_command() {
    let readme = std::fs::read_to_string(repo().join("README.md")).unwrap();
    let test_cmd = readme
        .lines()
        .map(str::trim)
        .find(|l| l.starts_with("cargo test"))
        .expect("the README gives the test command");
    let ci = std::fs::read_to_string(repo().join(".ci/run")).unwrap();
    assert!(
        ci.lines().any(|l| l.trim() == test_cmd),
        ".ci/run must run `{test_cmd}`"
    );
}

#[test]
fn every_demo_spec_synthesizes_and_verifies() {
    let dir = workspace();
    let mut count = 0;
    for e in std::fs::read_dir(dir.path().join("specs")).unwrap() {
        let p = e.unwrap().path();
        let spec = p.to_str().unwrap();
        let out = format!("{spec}.qasm");
        let o = run_in(dir.path(), &["synth", spec, "-o", &out, "--json"]);
        let (stdout, err) = text(&o);
        assert_eq!(o.status.code(), Some(0), "{spec}: {err}");
        let v: serde_json::Value = serde_json::from_str(&stdout).unwrap();
        assert_eq!(v["verification"]["verdict"], "proven", "{spec}");
        for field in COST_FIELDS {
            assert!(
                v["cost"].get(field).is_some(),
                "{spec}: cost.{field} missing"
            );
        }
        assert_eq!(
            v["cost"]["t_count"],
            v["cost"]["toffoli"].as_u64().unwrap() * 7
        );
        let o = run_in(dir.path(), &["verify", &out, "--spec", spec]);
        assert_eq!(o.status.code(), Some(0), "{spec}: {:?}", text(&o));
        count += 1;
    }
    assert!(count >= 5, "at least five demo specs");
}

#[test]
fn circuit_goes_to_stdout_without_output_file() {
    let dir = workspace();
    let o = run_in(dir.path(), &["synth", "specs/dice-shuffle.toml"]);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0));
    assert!(out.starts_with("OPENQASM 2.0;"), "{out}");
    assert!(out.contains("qreg x[3];"));
    assert!(err.contains("verified on all 8 basis states"), "{err}");
}

#[test]
fn tampered_circuit_is_refuted_with_exit_1() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "g.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    let qasm = std::fs::read_to_string(dir.path().join("g.qasm")).unwrap();
    // Drop the last gate.
    let mut lines: Vec<&str> = qasm.lines().collect();
    let last = lines
        .iter()
        .rposition(|l| l.starts_with("cx") || l.starts_with("ccx"))
        .unwrap();
    lines.remove(last);
    std::fs::write(dir.path().join("bad.qasm"), lines.join("\n")).unwrap();
    let o = run_in(
        dir.path(),
        &["verify", "bad.qasm", "--spec", "specs/greenhouse.toml"],
    );
    let (out, _) = text(&o);
    assert_eq!(o.status.code(), Some(1), "{out}");
    assert!(out.contains("refuted"), "{out}");
    assert!(out.contains("expected") && out.contains("actual"), "{out}");
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "bad.qasm",
            "--spec",
            "specs/greenhouse.toml",
            "--json",
        ],
    );
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["verdict"], "refuted");
    assert!(v["counterexample"]["state"].is_u64());
}

#[test]
fn cost_reads_a_qasm_file() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("c.qasm");
    std::fs::write(
        &p,
        "OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg q[3];\nccx q[0],q[1],q[2];\nccx q[0],q[2],q[1];\ncx q[0],q[1];\nx q[2];\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["cost", "c.qasm", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["toffoli"], 2);
    assert_eq!(v["cnot"], 1);
    assert_eq!(v["not"], 1);
    assert_eq!(v["qubits"], 3);
    assert_eq!(v["t_count"], 14);
    // Both Toffolis share lines: two Toffoli layers.
    assert_eq!(v["toffoli_depth"], 2);
}

#[test]
fn resource_limit_exits_3_and_names_the_flag_and_writes_nothing() {
    let dir = workspace();
    let exhaustive_only = [
        "synth",
        "specs/greenhouse.toml",
        "-o",
        "g.qasm",
        "--max-states",
        "16",
        "--verify-method",
        "exhaustive",
    ];
    let o = run_in(dir.path(), &exhaustive_only);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("--max-states"), "{err}");
    assert!(!dir.path().join("g.qasm").exists());
    let no_time = [
        "synth",
        "specs/greenhouse.toml",
        "-o",
        "g.qasm",
        "--verify-method",
        "sat",
        "--sat-seconds",
        "0",
    ];
    let o = run_in(dir.path(), &no_time);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("--sat-seconds"), "{err}");
    assert!(!dir.path().join("g.qasm").exists());
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/seating.toml",
            "--method",
            "esop",
            "--max-inputs",
            "4",
        ],
    );
    assert_eq!(o.status.code(), Some(3));
    assert!(text(&o).1.contains("--max-inputs"));
}

#[test]
fn the_spec_is_never_overwritten() {
    let dir = workspace();
    let before = std::fs::read(dir.path().join("specs/greenhouse.toml")).unwrap();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/greenhouse.toml",
            "-o",
            "specs/greenhouse.toml",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        std::fs::read(dir.path().join("specs/greenhouse.toml")).unwrap(),
        before
    );
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/greenhouse.toml",
            "-o",
            "no/such/folder/g.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("cannot write"), "{:?}", text(&o));
    // No temporary files are left behind.
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert!(
        left.iter().all(|n| !n.to_string_lossy().contains(".tmp-")),
        "{left:?}"
    );
}

#[test]
fn usage_errors_exit_2() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "--method", "magic"],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("reed-muller"));
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "--method", "structural"],
    );
    assert_eq!(o.status.code(), Some(2));
    let o = run_in(dir.path(), &["synth", "specs/missing.toml"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("specs/missing.toml"));
    let o = run_in(dir.path(), &["frobnicate"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run_in(dir.path(), &["--version"]);
    assert_eq!(o.status.code(), Some(0));
}

/// Writes `spec` to a file, runs `synth` on it and returns (line, column, message).
fn bad_spec(spec: &str) -> (usize, usize, String) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), spec).unwrap();
    let o = run_in(dir.path(), &["synth", "bad.toml", "-o", "out.qasm"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(!dir.path().join("out.qasm").exists());
    // `error: <message>`, then ` --> bad.toml:<line>:<column>`.
    assert!(err.starts_with("error: "), "{err}");
    let place = err
        .lines()
        .find_map(|l| l.trim_start().strip_prefix("--> bad.toml:"))
        .unwrap_or_else(|| panic!("{err}"));
    let mut parts = place.splitn(2, ':');
    let line = parts.next().unwrap().parse().unwrap();
    let col = parts.next().unwrap().parse().unwrap();
    // The snippet: `N | <the line>` and below it a caret under the column.
    let lines: Vec<&str> = err.lines().collect();
    let shown = lines
        .iter()
        .position(|l| l.starts_with(&format!("{line} | ")))
        .unwrap_or_else(|| panic!("the offending line is shown: {err}"));
    let source_line = &lines[shown][format!("{line} | ").len()..];
    assert_eq!(source_line, spec.lines().nth(line - 1).unwrap(), "{err}");
    let caret_line = lines[shown + 1];
    let gutter = format!("{line} | ").chars().count();
    let caret_at = caret_line.chars().position(|c| c == '^').expect("a caret");
    assert_eq!(
        caret_at - gutter + 1,
        col,
        "the caret sits under column {col}: {err}"
    );
    (line, col, err)
}

#[test]
fn unknown_key() {
    let (l, c, e) = bad_spec("kind = \"function\"\ncolour = \"red\"\n");
    assert_eq!((l, c), (2, 1), "{e}");
    assert!(e.contains("colour"), "{e}");
}

#[test]
fn output_given_twice() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\"]\n[table]\nf = \"0x8\"\n[expr]\nf = \"a & b\"\n",
    );
    assert_eq!((l, c), (7, 1), "{e}");
    assert!(e.contains("given twice"), "{e}");
}

#[test]
fn output_not_given() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\", \"g\"]\n[table]\nf = \"0x8\"\n",
    );
    assert_eq!((l, c), (3, 17), "{e}");
    assert!(e.contains("'g'"), "{e}");
}

#[test]
fn output_not_declared() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[expr]\nf = \"a\"\nh = \"!a\"\n",
    );
    assert_eq!((l, c), (6, 1), "{e}");
}

#[test]
fn table_of_the_wrong_length() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"f\"]\n[table]\nf = \"0xe\"\n",
    );
    assert_eq!((l, c), (5, 6), "{e}");
    assert!(e.contains("2 hex digits"), "{e}");
}

#[test]
fn table_with_bits_past_the_end() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[table]\nf = \"0x6\"\n",
    );
    assert_eq!((l, c), (5, 8), "{e}");
    assert!(e.contains("bit 2"), "{e}");
}

#[test]
fn table_with_a_bad_digit() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"f\"]\n[table]\nf = \"0xz8\"\n",
    );
    assert_eq!((l, c), (5, 8), "{e}");
}

#[test]
fn unknown_identifier() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"hot\", \"cold\"]\noutputs = [\"f\"]\n[expr]\nf = \"hot & !warm\"\n",
    );
    assert_eq!((l, c), (5, 13), "{e}");
    assert!(e.contains("warm"), "{e}");
}

#[test]
fn expression_syntax_error() {
    let (l, c, e) = bad_spec(
        "kind = \"function\"\ninputs = [\"a\", \"b\"]\noutputs = [\"f\"]\n[expr]\nf = \"(a & b | \"\n",
    );
    // The term after '|' is missing: the caret sits at the end of the expression.
    assert_eq!((l, c), (5, 15), "{e}");
}

#[test]
fn duplicate_names() {
    let (l, c, e) =
        bad_spec("kind = \"function\"\ninputs = [\"a\", \"b\", \"a\"]\noutputs = [\"f\"]\n");
    assert_eq!((l, c), (2, 21), "{e}");
    let (l, c, e) = bad_spec("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"a\"]\n");
    assert_eq!((l, c), (3, 12), "{e}");
    assert!(e.contains("twice"), "{e}");
}

#[test]
fn images_not_a_bijection() {
    let (l, c, e) = bad_spec("kind = \"permutation\"\nwidth = 2\nimages = [3, 1, 2, 1]\n");
    assert_eq!((l, c), (3, 20), "{e}");
    assert!(e.contains("bijection"), "{e}");
    let (l, c, _) = bad_spec("kind = \"permutation\"\nwidth = 2\nimages = [3, 1, 2, 4]\n");
    assert_eq!((l, c), (3, 20));
}

#[test]
fn images_of_the_wrong_count() {
    let (l, c, e) = bad_spec("kind = \"permutation\"\nwidth = 2\nimages = [0, 1, 2]\n");
    assert_eq!((l, c), (3, 10), "{e}");
    assert!(e.contains("needs 4 images"), "{e}");
}

#[test]
fn toml_syntax_and_type_errors() {
    let (l, _, _) = bad_spec("kind = \"function\"\ninputs = [\"a\"\n");
    assert!(l >= 2);
    let (l, c, _) = bad_spec("kind = \"permutation\"\nwidth = \"two\"\nimages = [1, 0]\n");
    assert_eq!((l, c), (2, 9));
    let (l, c, e) = bad_spec("kind = \"funktion\"\n");
    assert_eq!((l, c), (1, 8), "{e}");
    assert!(e.contains("help: kind is one of"), "{e}");
}

#[test]
fn qasm_errors_have_locations() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("c.qasm"),
        "OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg x[3];\nqreg y[2];\n  h x[0];\n",
    )
    .unwrap();
    let o = run_in(
        dir.path(),
        &["verify", "c.qasm", "--spec", "specs/greenhouse.toml"],
    );
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2));
    assert!(err.contains("c.qasm:5:3"), "{err}");
}

#[test]
fn compare_lists_every_method_and_marks_the_best() {
    let dir = workspace();
    let o = run_in(dir.path(), &["compare", "specs/greenhouse.toml", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let methods = v["methods"].as_array().unwrap();
    let names: Vec<&str> = methods
        .iter()
        .map(|m| m["method"].as_str().unwrap())
        .collect();
    assert_eq!(
        names,
        [
            "reed-muller",
            "esop",
            "bennett",
            "xag",
            "hierarchical",
            "esop-exact"
        ]
    );
    for m in methods {
        assert_eq!(m["verification"]["verdict"], "proven", "{m}");
    }
    let best = v["best"].as_str().unwrap();
    let fewest = methods
        .iter()
        .map(|m| m["cost"]["toffoli"].as_u64().unwrap())
        .min()
        .unwrap();
    let best_row = methods.iter().find(|m| m["method"] == best).unwrap();
    assert_eq!(best_row["cost"]["toffoli"].as_u64().unwrap(), fewest);
    // The same choice is what auto writes.
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "--json", "-o", "g.qasm"],
    );
    let auto: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(auto["cost"]["toffoli"].as_u64().unwrap(), fewest);
    assert!(auto["notes"][0]
        .as_str()
        .unwrap()
        .starts_with("auto: tried"));
    let o = run_in(dir.path(), &["compare", "specs/dice-shuffle.toml"]);
    let (out, _) = text(&o);
    assert!(out.contains("transform*"), "{out}");
}

#[test]
fn shards_from_the_command_line() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &["synth", "specs/fuel-sum.toml", "-o", "f.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    for k in 0..4 {
        let shard = format!("{k}/4");
        let out = format!("s{k}.json");
        let o = run_in(
            dir.path(),
            &[
                "verify",
                "f.qasm",
                "--spec",
                "specs/fuel-sum.toml",
                "--shard",
                &shard,
                "-o",
                &out,
            ],
        );
        assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    }
    let o = run_in(
        dir.path(),
        &[
            "merge",
            "--circuit",
            "f.qasm",
            "--spec",
            "specs/fuel-sum.toml",
            "s0.json",
            "s1.json",
            "s2.json",
            "s3.json",
        ],
    );
    let (out, _) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{out}");
    assert!(out.contains("verified on all 131072 basis states"), "{out}");
    let o = run_in(
        dir.path(),
        &[
            "merge",
            "--circuit",
            "f.qasm",
            "--spec",
            "specs/fuel-sum.toml",
            "s0.json",
            "s1.json",
            "s3.json",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("missing: [2]"), "{:?}", text(&o));
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "f.qasm",
            "--spec",
            "specs/fuel-sum.toml",
            "--shard",
            "4/4",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn sat_route_from_the_command_line() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("wide.toml"),
        "kind = \"arithmetic\"\nop = \"compare\"\nrelation = \"<\"\nwidth = 48\ncontrolled = true\n",
    )
    .unwrap();
    let o = run_in(
        dir.path(),
        &["synth", "wide.toml", "-o", "w.qasm", "--json"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["verification"]["by"], "sat");
    assert_eq!(v["verification"]["free_bits"], 98);
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "w.qasm",
            "--spec",
            "wide.toml",
            "--method",
            "exhaustive",
        ],
    );
    assert_eq!(o.status.code(), Some(3));
    assert!(text(&o).1.contains("--max-states"));
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "w.qasm",
            "--spec",
            "wide.toml",
            "--method",
            "proof",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn a_circuit_against_another_circuit() {
    let dir = workspace();
    for (m, out) in [
        ("transform", "t.qasm"),
        ("transform-bidir", "b.qasm"),
        ("exact", "e.qasm"),
    ] {
        let o = run_in(
            dir.path(),
            &["synth", "specs/dice-shuffle.toml", "--method", m, "-o", out],
        );
        assert_eq!(o.status.code(), Some(0), "{m}");
    }
    let o = run_in(dir.path(), &["verify", "t.qasm", "--against", "b.qasm"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    assert!(text(&o).0.contains("equivalent"));
    let o = run_in(
        dir.path(),
        &["verify", "e.qasm", "--against", "t.qasm", "--json"],
    );
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["verdict"], "proven");
    // Another function on the same registers differs, with a counterexample.
    std::fs::write(
        dir.path().join("p.toml"),
        "kind = \"permutation\"\nwidth = 3\nimages = [5, 2, 7, 0, 6, 1, 3, 4]\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["synth", "p.toml", "-o", "p.qasm"]);
    assert_eq!(o.status.code(), Some(0));
    let o = run_in(dir.path(), &["verify", "p.qasm", "--against", "t.qasm"]);
    assert_eq!(o.status.code(), Some(1));
    let (out, _) = text(&o);
    assert!(out.contains("differs"), "{out}");
    // Registers that do not match are bad input.
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "-o", "g.qasm"],
    );
    assert_eq!(o.status.code(), Some(0));
    let o = run_in(dir.path(), &["verify", "g.qasm", "--against", "t.qasm"]);
    assert_eq!(o.status.code(), Some(2));
}

/// `table` builds the 4-line table into the cache folder, reports the
/// published counts (Golubitsky and Maslov 2012; checks.md), loads it the
/// second time, and refuses a depth it cannot build; `exact` uses the depth-7
/// table, and a search its budget stops gives a circuit that is not claimed
/// minimal, with the bound proven so far.
#[test]
fn the_exact_table_command() {
    let dir = workspace();
    let cache = dir.path().join("cache");
    let run = |args: &[&str]| {
        std::process::Command::new(env!("CARGO_BIN_EXE_oraculum"))
            .current_dir(dir.path())
            .env("ORACULUM_CACHE", &cache)
            .args(args)
            .output()
            .unwrap()
    };
    let o = run(&["table", "--depth", "5", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["action"], "built");
    assert_eq!(v["reach"], 10);
    let functions: Vec<u64> = v["levels"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| l["functions"].as_u64().unwrap())
        .collect();
    assert_eq!(functions, vec![1, 32, 784, 16204, 294507, 4807552]);
    assert!(cache.join("exact4-depth5-v2.bin").is_file());
    let o = run(&["table", "--depth", "5"]);
    assert_eq!(o.status.code(), Some(0));
    assert!(text(&o).0.starts_with("loaded the 4-line table of depth 5"));
    for bad in ["0", "9"] {
        let o = run(&["table", "--depth", bad]);
        assert_eq!(o.status.code(), Some(2), "{bad}");
        assert!(text(&o).1.contains("--depth"));
    }
    let o = run(&["table", "--depth", "7"]);
    assert_eq!(o.status.code(), Some(0));
    // One of the benchmark's random functions, needing 14 gates (the depth-8
    // table finds 14 with its passes): the depth-7 table rules out 13 and
    // then finds a neighbour of 13 gates. With no time at all, the report
    // gives the bound proven so far (not in the table: 8) and the heuristic.
    std::fs::write(
        dir.path().join("far.toml"),
        "kind = \"permutation\"\nwidth = 4\nimages = [10, 0, 13, 7, 15, 1, 4, 5, 3, 6, 2, 14, 8, 12, 11, 9]\n",
    )
    .unwrap();
    let report = |args: &[&str]| {
        let o = run(args);
        assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
        let (out, err) = text(&o);
        out + &err
    };
    // A budget no machine runs out of: the verdict does not depend on speed.
    let r = report(&[
        "synth",
        "far.toml",
        "--method",
        "exact",
        "--exact-seconds",
        "36000",
        "-o",
        "far.qasm",
    ]);
    assert!(r.contains("loaded the 4-line table of depth 7"), "{r}");
    assert!(r.contains("exact: 14 gates, proven minimal"), "{r}");
    assert!(r.contains("verified on all 16 basis states"), "{r}");
    let r = report(&[
        "synth",
        "far.toml",
        "--method",
        "exact",
        "--exact-seconds",
        "0",
        "-o",
        "far0.qasm",
    ]);
    assert!(
        r.contains("NOT proven minimal: no circuit of fewer than 8 gates exists, and the search stopped at its time budget"),
        "{r}"
    );
    assert!(r.contains("raise --exact-seconds"), "{r}");
    assert!(r.contains("verified on all 16 basis states"), "{r}");
}

/// A design file is a spec: a BLIF full adder (sum = a XOR b XOR c, carry =
/// majority; common practice) synthesized directly, its circuit run by the
/// outside simulator on all eight inputs, then verified against the file.
#[test]
fn blif_file_is_synthesized_and_verified_directly() {
    let dir = tempfile::tempdir().unwrap();
    let blif = ".model full_adder\n.inputs a b c\n.outputs s co\n\
                .names a b c s\n100 1\n010 1\n001 1\n111 1\n\
                .names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n";
    std::fs::write(dir.path().join("fa.blif"), blif).unwrap();
    let o = run_in(dir.path(), &["synth", "fa.blif", "-o", "fa.qasm"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let qasm = std::fs::read_to_string(dir.path().join("fa.qasm")).unwrap();
    for x in 0..8usize {
        let set: Vec<(String, usize)> = (0..3)
            .filter(|j| (x >> j) & 1 == 1)
            .map(|j| ("x".to_string(), j))
            .collect();
        let got = qasmsim_run(&qasm, &set);
        let ones = x.count_ones() as u64;
        let want = (ones & 1) | (u64::from(ones >= 2) << 1);
        assert_eq!(got["y"], want, "input {x:03b}");
        assert_eq!(got["x"], x as u64, "input {x:03b} kept");
    }
    let o = run_in(dir.path(), &["verify", "fa.qasm", "--spec", "fa.blif"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    // A circuit of another function is refuted against the same file.
    let wrong = blif.replace("111 1", "110 1");
    std::fs::write(dir.path().join("wrong.blif"), wrong).unwrap();
    let o = run_in(dir.path(), &["verify", "fa.qasm", "--spec", "wrong.blif"]);
    assert_eq!(o.status.code(), Some(1), "{:?}", text(&o));
}

/// A malformed design file stops with file, line and column, exit 2.
#[test]
fn malformed_design_file_is_located() {
    let dir = tempfile::tempdir().unwrap();
    let blif = ".model m\n.inputs a\n.outputs y\n.names a q y\n1 1\n.end\n";
    std::fs::write(dir.path().join("bad.blif"), blif).unwrap();
    let o = run_in(dir.path(), &["synth", "bad.blif"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("bad.blif:5:"), "{err}");
}

/// An EPFL circuit (int2float, AIGER binary; MIT licence, tests/data/epfl)
/// is read, synthesized and proven on every basis state.
#[test]
fn epfl_aiger_file_synthesizes_and_verifies() {
    let dir = tempfile::tempdir().unwrap();
    let aig = repo().join("tests/data/epfl/int2float.aig");
    let o = run_in(dir.path(), &["synth", aig.to_str().unwrap(), "--json"]);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["verification"]["verdict"], "proven");
}

/// A `kind = "netlist"` spec names a design file (taken from the spec's
/// folder) and selects outputs in its own order: the BLIF full adder with
/// carry first, then sum (carry = majority, sum = parity; common practice),
/// run by the outside simulator; the carry alone as a phase oracle is
/// synthesized and verified.
#[test]
fn netlist_spec_selects_outputs_of_a_design_file() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir(dir.path().join("specs")).unwrap();
    let blif = ".model full_adder\n.inputs a b c\n.outputs s co\n\
                .names a b c s\n100 1\n010 1\n001 1\n111 1\n\
                .names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n";
    std::fs::write(dir.path().join("specs/fa.blif"), blif).unwrap();
    let spec = "kind = \"netlist\"\nfile = \"fa.blif\"\noutputs = [\"co\", \"s\"]\n";
    std::fs::write(dir.path().join("specs/swap.toml"), spec).unwrap();
    let o = run_in(dir.path(), &["synth", "specs/swap.toml", "-o", "swap.qasm"]);
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let qasm = std::fs::read_to_string(dir.path().join("swap.qasm")).unwrap();
    for x in 0..8usize {
        let set: Vec<(String, usize)> = (0..3)
            .filter(|j| (x >> j) & 1 == 1)
            .map(|j| ("x".to_string(), j))
            .collect();
        let got = qasmsim_run(&qasm, &set);
        let ones = x.count_ones() as u64;
        let want = u64::from(ones >= 2) | ((ones & 1) << 1);
        assert_eq!(got["y"], want, "input {x:03b}");
    }
    let phase = "kind = \"netlist\"\nfile = \"fa.blif\"\noutputs = [\"co\"]\n\
                 [oracle]\nform = \"phase\"\n";
    std::fs::write(dir.path().join("specs/carry.toml"), phase).unwrap();
    let o = run_in(
        dir.path(),
        &["synth", "specs/carry.toml", "-o", "carry.qasm"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let o = run_in(
        dir.path(),
        &["verify", "carry.qasm", "--spec", "specs/carry.toml"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
}

/// A netlist spec's mistakes are placed: a missing file at its `file` value,
/// an unknown output at its name in the selection, a phase oracle of two
/// outputs, a malformed design at its place in the design file; exit 2.
#[test]
fn netlist_spec_errors_are_located() {
    let dir = tempfile::tempdir().unwrap();
    let blif = ".model fa\n.inputs a b c\n.outputs s co\n\
                .names a b c s\n100 1\n010 1\n001 1\n111 1\n\
                .names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n";
    std::fs::write(dir.path().join("fa.blif"), blif).unwrap();
    std::fs::write(
        dir.path().join("bad.blif"),
        ".model m\n.inputs a\n.outputs y\n.names a q y\n1 1\n.end\n",
    )
    .unwrap();
    let cases: [(&str, &str, &str); 4] = [
        (
            "kind = \"netlist\"\nfile = \"none.blif\"\n",
            "s.toml:2:8",
            "cannot read",
        ),
        (
            "kind = \"netlist\"\nfile = \"fa.blif\"\noutputs = [\"s\", \"cout\"]\n",
            "s.toml:3:17",
            "no output 'cout'",
        ),
        (
            "kind = \"netlist\"\nfile = \"fa.blif\"\n[oracle]\nform = \"phase\"\n",
            "s.toml:4:8",
            "",
        ),
        (
            "kind = \"netlist\"\nfile = \"bad.blif\"\n",
            "bad.blif:5:",
            "",
        ),
    ];
    for (spec, place, words) in cases {
        std::fs::write(dir.path().join("s.toml"), spec).unwrap();
        let o = run_in(dir.path(), &["synth", "s.toml"]);
        let (_, err) = text(&o);
        assert_eq!(o.status.code(), Some(2), "{spec}: {err}");
        assert!(err.contains(place), "{spec}: {err}");
        assert!(err.contains(words), "{spec}: {err}");
    }
}

// `--uncompute measure`: fuel-sum is an 8-bit adder with carry-out, n = 8
// Toffoli-equivalents by Gidney's adder (Quantum 2, 74, 2018) against
// 2n - 1 = 15 Toffolis in toffoli mode; the file written is proven from disk.
#[test]
fn measure_mode_from_the_command_line() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/fuel-sum.toml",
            "--uncompute",
            "measure",
            "--json",
            "-o",
            "m.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["cost"]["mode"], "measure");
    assert_eq!(v["cost"]["toffoli_equivalent"], 8);
    let o = run_in(
        dir.path(),
        &["verify", "m.qasm", "--spec", "specs/fuel-sum.toml"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let o = run_in(dir.path(), &["synth", "specs/fuel-sum.toml", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["cost"]["mode"], "toffoli");
    assert_eq!(v["cost"]["toffoli"], 15);
    // compare shows the mode and ranks by Toffoli-equivalents.
    let o = run_in(
        dir.path(),
        &[
            "compare",
            "specs/greenhouse.toml",
            "--uncompute",
            "measure",
            "--json",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["mode"], "measure");
    let methods = v["methods"].as_array().unwrap();
    let fewest = methods
        .iter()
        .map(|m| m["cost"]["toffoli_equivalent"].as_u64().unwrap())
        .min()
        .unwrap();
    let best = methods.iter().find(|m| m["method"] == v["best"]).unwrap();
    assert_eq!(best["cost"]["toffoli_equivalent"].as_u64().unwrap(), fewest);
    let o = run_in(
        dir.path(),
        &["compare", "specs/greenhouse.toml", "--uncompute", "measure"],
    );
    assert!(text(&o).0.contains("uncompute: measure"), "{:?}", text(&o));
    let o = run_in(
        dir.path(),
        &["synth", "specs/greenhouse.toml", "--uncompute", "both"],
    );
    assert_eq!(o.status.code(), Some(2));
}

// `--format clifford-t` writes a file that `verify` reads back and proves
// from disk, and `cost` reports with the same T-count as the file's header;
// the same file with one `t` turned into `tdg` is refused at its line (exit 2,
// never "verified").
#[test]
fn clifford_t_files_are_proven_from_disk() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/fuel-sum.toml",
            "--uncompute",
            "measure",
            "--format",
            "clifford-t",
            "-o",
            "ct.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let written = std::fs::read_to_string(dir.path().join("ct.qasm")).unwrap();
    assert!(written.contains("\ntdg ") && !written.contains("ccx"));
    let o = run_in(
        dir.path(),
        &["verify", "ct.qasm", "--spec", "specs/fuel-sum.toml"],
    );
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{out}{err}");
    assert!(out.contains("verified"), "{out}");
    let o = run_in(dir.path(), &["cost", "ct.qasm", "--json"]);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let t = v["t_count"].as_u64().unwrap();
    assert!(written.contains(&format!("// t-count {t},")), "{t}");
    let at = written.lines().position(|l| l.starts_with("t ")).unwrap();
    let mutated: Vec<String> = written
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == at {
                l.replacen("t ", "tdg ", 1)
            } else {
                l.to_string()
            }
        })
        .collect();
    std::fs::write(dir.path().join("bad.qasm"), mutated.join("\n")).unwrap();
    let o = run_in(
        dir.path(),
        &["verify", "bad.qasm", "--spec", "specs/fuel-sum.toml"],
    );
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{out}{err}");
    assert!(err.contains(&format!("bad.qasm:{}:1", at + 1)), "{err}");
    assert!(!out.contains("verified"), "{out}");
}

// `draw --uncompute measure` marks temporary ANDs and measured uncomputes.
#[test]
fn draw_marks_measured_gates() {
    let dir = workspace();
    let o = run_in(
        dir.path(),
        &[
            "draw",
            "specs/tide-gate.toml",
            "--method",
            "bennett",
            "--lowered",
            "--uncompute",
            "measure",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let (out, _) = text(&o);
    assert!(out.contains('∧') && out.contains('M'), "{out}");
    assert!(out.contains("measured uncomputes"), "{out}");
    let o = run_in(
        dir.path(),
        &[
            "draw",
            "specs/tide-gate.toml",
            "--method",
            "bennett",
            "--lowered",
        ],
    );
    assert!(!text(&o).0.contains('∧'));
}
