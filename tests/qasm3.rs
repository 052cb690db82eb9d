//! OpenQASM 3 output (Cross et al., "OpenQASM 3: a broader and deeper
//! quantum assembly language", ACM TQC 2022): every file the writer makes
//! is read back by our reader as its OpenQASM 2 twin, runs alike on basis
//! states, is proven by the verifier, and is parsed by the standard's
//! reference parser (the `openqasm3` package from PyPI, installed by
//! `.ci/run` into a virtual environment; `ORACULUM_QASM3_PYTHON` names its
//! interpreter).

mod common;

use common::{run_in, text, workspace};
use oraculum::export::{read_qasm, read_qasm3_with, write_qasm3, Qasm3Options, ReadLimits};
use oraculum::verify::{verify, Verdict, VerifyOptions};
use oraculum::{Circuit, Control, Gate, Line, LineInfo, Role};

fn read3(name: &str, text: &str) -> Circuit {
    read_qasm3_with(name, text, &ReadLimits::default())
        .unwrap_or_else(|e| panic!("{name}: {e}\n{text}"))
}

/// Runs every file through the reference parser; without the interpreter
/// (a local run without `.ci/run`) says so and checks nothing, but under
/// CI (`ORACULUM_CI` set, as .ci/run does) a missing interpreter fails.
fn reference_parse(files: &[std::path::PathBuf]) {
    let Ok(python) = std::env::var("ORACULUM_QASM3_PYTHON") else {
        assert!(
            std::env::var_os("ORACULUM_CI").is_none(),
            "ORACULUM_QASM3_PYTHON is not set under ORACULUM_CI: .ci/run installs the reference parser"
        );
        eprintln!(
            "note: ORACULUM_QASM3_PYTHON is not set; {} OpenQASM 3 file(s) not run through the reference parser (.ci/run does)",
            files.len()
        );
        return;
    };
    let script = common::repo().join("tests/data/qasm3_parse.py");
    let o = std::process::Command::new(&python)
        .arg(&script)
        .args(files)
        .output()
        .unwrap_or_else(|e| panic!("{python} does not run: {e}"));
    let (out, err) = text(&o);
    assert!(o.status.success(), "reference parser refused:\n{out}{err}");
    assert_eq!(
        out.lines().filter(|l| l.starts_with("parsed ")).count(),
        files.len(),
        "{out}"
    );
}

/// Every basis state of the non-ancilla lines (ancillae at 0): both
/// circuits give the same non-ancilla registers, and (when `clean`: a map
/// with no domain; a modular op promises nothing outside it) each ends its
/// ancillae at 0.
fn same_on_basis_states(a: &Circuit, b: &Circuit, clean: bool) {
    let free: Vec<(String, usize)> = a
        .registers()
        .into_iter()
        .filter(|(n, _)| n != "anc")
        .collect();
    let bits: usize = free.iter().map(|(_, s)| s).sum();
    assert!(bits <= 14);
    for s in 0..1u128 << bits {
        let mut inputs = Vec::new();
        let mut shift = 0;
        for (n, size) in &free {
            inputs.push((n.as_str(), (s >> shift) & ((1 << size) - 1)));
            shift += size;
        }
        let ra = common::run_registers(a, &inputs);
        let rb = common::run_registers(b, &inputs);
        for (n, _) in &free {
            assert_eq!(ra[n], rb[n], "register {n}, state {s}");
        }
        if clean {
            assert_eq!(ra.get("anc").copied().unwrap_or(0), 0, "state {s}");
            assert_eq!(rb.get("anc").copied().unwrap_or(0), 0, "state {s}");
        }
    }
}

/// Every demo spec and a controlled majority, as OpenQASM 3 plain, in gate
/// form, inverted and with unlowered gates (`--keep-mct`): the plain,
/// gate-form and inverse files read as their OpenQASM 2 twins (same lines,
/// gates and phase line), the unlowered file runs as the lowered one on
/// every basis state (up to 14 free bits) and is proven against the spec,
/// and the reference parser takes every file.
#[test]
fn every_qasm3_file_reads_as_its_qasm2_twin_and_the_reference_parser_takes_it() {
    common::tables();
    let dir = workspace();
    std::fs::write(
        dir.path().join("specs/controlled-majority.toml"),
        "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"most\"]\ncontrolled = true\n[table]\nmost = \"0xe8\"\n",
    )
    .unwrap();
    let mut files = Vec::new();
    let mut specs = 0;
    let mut paths: Vec<_> = std::fs::read_dir(dir.path().join("specs"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    paths.sort();
    for p in paths {
        let stem = p.file_stem().unwrap().to_string_lossy().into_owned();
        let spec = oraculum::parse_spec(&stem, &std::fs::read_to_string(&p).unwrap()).unwrap();
        let opts = oraculum::BuildOptions {
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        };
        let mut out = oraculum::pipeline::build(&spec, &opts).unwrap();
        out.rename_registers(&spec.registers);
        let mut inv = oraculum::pipeline::invert(out.clone(), &spec, &opts, &()).unwrap();
        inv.rename_registers(&[]);
        let back = |c: Circuit| c.with_registers_renamed(&spec.registers_back());
        let plain = Qasm3Options::default();
        let gate = Qasm3Options {
            gate: Some("oracle".into()),
            keep_mct: false,
        };
        let mct = Qasm3Options {
            gate: None,
            keep_mct: true,
        };
        let twin = read_qasm("2", &out.qasm().unwrap()).unwrap();
        for (label, text3, twin) in [
            ("plain", out.qasm3(&plain).unwrap(), twin.clone()),
            ("gate", out.qasm3(&gate).unwrap(), twin.clone()),
            (
                "inverse",
                inv.qasm3(&plain).unwrap(),
                read_qasm("2", &inv.qasm().unwrap()).unwrap(),
            ),
        ] {
            assert!(text3.starts_with("OPENQASM 3.0;\ninclude \"stdgates.inc\";\n"));
            let c = read3(&stem, &text3);
            assert_eq!(c.lines(), twin.lines(), "{stem} {label}");
            assert_eq!(c.gates(), twin.gates(), "{stem} {label}");
            assert_eq!(c.phase(), twin.phase(), "{stem} {label}");
            let f = dir.path().join(format!("{stem}.{label}.qasm3"));
            std::fs::write(&f, &text3).unwrap();
            files.push(f);
        }
        let text3 = out.qasm3(&mct).unwrap();
        let c = read3(&stem, &text3);
        let v = verify(&back(c.clone()), &spec, &VerifyOptions::default()).unwrap();
        assert!(matches!(v, Verdict::Proven { .. }), "{stem}: {v:?}");
        let free: usize = c
            .registers()
            .iter()
            .filter(|(n, _)| n != "anc")
            .map(|(_, s)| s)
            .sum();
        if free <= 14 {
            let domain =
                matches!(&spec.body, oraculum::SpecBody::Arithmetic(a) if a.modulus.is_some());
            same_on_basis_states(&c, &twin, !domain);
        }
        let f = dir.path().join(format!("{stem}.mct.qasm3"));
        std::fs::write(&f, &text3).unwrap();
        files.push(f);
        specs += 1;
    }
    assert!(specs >= 14, "{specs}");
    // The command line writes the same and verifies it.
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/controlled-majority.toml",
            "--format",
            "qasm3",
            "-o",
            "m.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let written = std::fs::read_to_string(dir.path().join("m.qasm")).unwrap();
    assert!(
        written.contains("qubit[1] ctrl_;\nqubit[3] x_;\nqubit[1] y_;\n"),
        "{written}"
    );
    let o = run_in(
        dir.path(),
        &[
            "verify",
            "m.qasm",
            "--spec",
            "specs/controlled-majority.toml",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    files.push(dir.path().join("m.qasm"));
    reference_parse(&files);
}

fn line(register: &str, index: u32, role: Role) -> LineInfo {
    LineInfo {
        register: register.into(),
        index,
        role,
        label: String::new(),
    }
}

/// The measured uncompute (Jones, PRA 87, 022328, 2013, Fig. 3; Gidney,
/// Quantum 2, 74, 2018, Fig. 3) as `h t; m = measure t; if (m) { ... }`,
/// with a negative control conjugated by `x` inside the block: written,
/// read back as the same gates, parsed by the reference parser; a block
/// out of order is refused at its line.
#[test]
fn the_measured_uncompute_is_an_if_block() {
    let lines = vec![
        line("q", 0, Role::Data),
        line("q", 1, Role::Data),
        line("anc", 0, Role::Ancilla),
    ];
    let (a, b) = (Control::neg(0), Control::pos(1));
    let gates = vec![
        Gate::temporary_and(a, b, Line(2)).unwrap(),
        Gate::measured(a, b, Line(2)).unwrap(),
    ];
    let c = Circuit::from_parts(lines, gates.clone()).unwrap();
    let text3 = write_qasm3(&c, &Default::default(), &Qasm3Options::default()).unwrap();
    assert!(text3.contains("bit m;\n"), "{text3}");
    assert!(
        text3.contains(
            "h anc[0];\nm = measure anc[0];\nif (m) { x q[0]; cz q[0], q[1]; x q[0]; x anc[0]; }\n"
        ),
        "{text3}"
    );
    let back = read3("g", &text3);
    assert_eq!(back.gates().last(), gates.last());
    assert_eq!(
        back.gates().iter().filter(|g| g.is_temporary_and()).count(),
        1
    );
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("gadget.qasm3");
    std::fs::write(&f, &text3).unwrap();
    let declared = text3
        .replace("bit m;\n", "")
        .replace("m = measure", "bit m = measure");
    let g = dir.path().join("declared.qasm3");
    std::fs::write(&g, &declared).unwrap();
    assert_eq!(read3("d", &declared).gates(), back.gates());
    reference_parse(&[f, g]);
    let wrong = text3.replace(
        "x q[0]; cz q[0], q[1]; x q[0];",
        "cz q[0], q[1]; x q[0]; x q[0];",
    );
    let e = read_qasm3_with("w", &wrong, &ReadLimits::default()).unwrap_err();
    let at = wrong
        .lines()
        .position(|l| l.starts_with("h anc[0]"))
        .unwrap()
        + 1;
    assert_eq!(e.located().unwrap().location.line, at, "{e}");
}

/// Each case, after `head`, is refused at its line and column with a message
/// that says `what`.
fn refused_at(head: &str, cases: &[(&str, usize, usize, &str)]) {
    for &(body, line, col, what) in cases {
        let t = format!("{head}{body}");
        let e = read_qasm3_with("b.qasm", &t, &ReadLimits::default()).unwrap_err();
        let l = e.located().unwrap_or_else(|| panic!("{body}: {e}"));
        assert_eq!(
            (l.location.line, l.location.column),
            (line, col),
            "{body}: {e}"
        );
        assert!(e.to_string().contains(what), "{body}: {e}");
    }
}

/// Mistakes in an OpenQASM 3 file are refused at their line and column,
/// and the gate budget is checked before a definition is expanded.
#[test]
fn bad_qasm3_is_refused_at_its_place() {
    let head = "OPENQASM 3.0;\ninclude \"stdgates.inc\";\nqubit[3] q;\n";
    let cases = [
        ("x r[0];\n", 4, 3, "not declared"),
        ("ctrl(2) @ x q[0], q[1];\n", 4, 11, "takes 3 operand"),
        ("x q[3];\n", 4, 5, "past the end"),
        ("measure q[0];\n", 4, 1, "not read"),
        ("cx q[0], q[0];\n", 4, 1, "same qubit"),
        ("gate g a { x b; }\n", 4, 14, "not an argument"),
    ];
    refused_at(head, &cases);
    let e = read_qasm3_with("v.qasm", "OPENQASM 2.0;\n", &ReadLimits::default()).unwrap_err();
    assert!(e.to_string().contains("OPENQASM 3.0"), "{e}");
    // 2^20 gates from ten doublings, refused before expansion at 1,000.
    let mut t = String::from(head);
    t.push_str("gate d0 a, b { cx a, b; }\n");
    for k in 1..=20 {
        t.push_str(&format!(
            "gate d{k} a, b {{ d{} a, b; d{} a, b; }}\n",
            k - 1,
            k - 1
        ));
    }
    t.push_str("d20 q[0], q[1];\n");
    let limits = ReadLimits {
        max_gates: 1000,
        ..ReadLimits::default()
    };
    let e = read_qasm3_with("big.qasm", &t, &limits).unwrap_err();
    assert!(
        matches!(
            e,
            oraculum::export::ReadError::Limit {
                value: 1_048_576,
                ..
            }
        ),
        "{e}"
    );
}

/// The test's own state-vector run of an OpenQASM 3 program of `qubit`,
/// `bit`, `h`, `x`, `cx`, `ccx`, `ctrl(k) @ x`, one `gate` definition of
/// those and a final `measure`: the amplitudes (real: every gate is).
fn run_program(text: &str) -> (Vec<f64>, std::collections::HashMap<String, (usize, usize)>) {
    let clean: String = text
        .lines()
        .map(|l| l.split("//").next().unwrap())
        .collect::<Vec<_>>()
        .join("\n");
    let g0 = clean.find("\ngate ").unwrap() + 1;
    let g1 = g0 + clean[g0..].find('}').unwrap() + 1;
    let head = &clean[g0 + 5..g0 + clean[g0..].find('{').unwrap()];
    let mut head_words = head.split_whitespace();
    let gate_name = head_words.next().unwrap().to_string();
    let args: Vec<String> = head_words
        .collect::<String>()
        .split(',')
        .map(|s| s.trim().to_string())
        .collect();
    let body: Vec<String> = clean[g0..g1][clean[g0..g1].find('{').unwrap() + 1..]
        .trim_end_matches('}')
        .split(';')
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
        .collect();
    let top: Vec<String> = format!("{}{}", &clean[..g0], &clean[g1..])
        .split(';')
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
        .collect();
    let mut regs = std::collections::HashMap::new();
    let mut width = 0;
    for s in &top {
        if let Some(rest) = s.strip_prefix("qubit[") {
            let (n, name) = rest.split_once(']').unwrap();
            let n: usize = n.parse().unwrap();
            regs.insert(name.trim().to_string(), (width, n));
            width += n;
        }
    }
    let mut amp = vec![0.0f64; 1 << width];
    amp[0] = 1.0;
    let qubits = |op: &str| -> Vec<usize> {
        let op = op.trim();
        match op.split_once('[') {
            Some((r, i)) => vec![regs[r].0 + i.trim_end_matches(']').parse::<usize>().unwrap()],
            None => (regs[op].0..regs[op].0 + regs[op].1).collect(),
        }
    };
    fn apply(amp: &mut [f64], gate: &str, q: &[usize]) {
        let t = *q.last().unwrap();
        if gate == "h" {
            let r = std::f64::consts::FRAC_1_SQRT_2;
            for s in 0..amp.len() {
                if s >> t & 1 == 0 {
                    let (a, b) = (amp[s], amp[s | 1 << t]);
                    amp[s] = r * (a + b);
                    amp[s | 1 << t] = r * (a - b);
                }
            }
            return;
        }
        let controls = &q[..q.len() - 1];
        for s in 0..amp.len() {
            if s >> t & 1 == 0 && controls.iter().all(|&c| s >> c & 1 == 1) {
                amp.swap(s, s | 1 << t);
            }
        }
    }
    fn gate_of(word: &str) -> &str {
        match word {
            "cx" | "ccx" | "x" => "x",
            w if w.starts_with("ctrl(") => "x",
            w => w,
        }
    }
    for s in &top {
        let s = s.replace(" @ x", "@x");
        let (word, ops) = s.split_once(' ').unwrap_or((&s, ""));
        match word {
            "OPENQASM" | "include" => continue,
            _ if word.starts_with("qubit[") || word.starts_with("bit[") => continue,
            "result" => continue, // the final measurement reads the state
            w if w == gate_name => {
                let lines: Vec<usize> = ops.split(',').flat_map(qubits).collect();
                for b in &body {
                    let (bw, bops) = b.split_once(' ').unwrap();
                    let q: Vec<usize> = bops
                        .split(',')
                        .map(|a| lines[args.iter().position(|x| x == a.trim()).unwrap()])
                        .collect();
                    apply(&mut amp, gate_of(bw), &q);
                }
            }
            w => {
                let ops: Vec<Vec<usize>> = ops.split(',').map(qubits).collect();
                if ops.len() == 1 && ops[0].len() > 1 {
                    for &q in &ops[0] {
                        apply(&mut amp, gate_of(w), &[q]);
                    }
                } else {
                    let q: Vec<usize> = ops.into_iter().flatten().collect();
                    apply(&mut amp, gate_of(w), &q);
                }
            }
        }
    }
    (amp, regs)
}

/// The README's Grover program (docs/grover-vault.qasm): the reference
/// parser takes it; its oracle gate, cut out and applied alone, is proven
/// against specs/vault-phase.toml; and the test's own state-vector run of
/// the whole program ends with y and every ancilla at 0 and measures a
/// marked combination (a < b for two 2-bit dials) with probability
/// sin^2(3 theta), sin^2(theta) = 6/16, which is exactly 27/32 = 0.84375
/// (sin 3t = sin t (3 - 4 sin^2 t); Boyer, Brassard, Hoyer, Tapp 1998), the
/// figure `synth` reports for one iteration.
#[test]
fn the_readme_grover_program_parses_and_finds_the_vault() {
    let path = common::repo().join("docs/grover-vault.qasm");
    let program = std::fs::read_to_string(&path).unwrap();
    reference_parse(std::slice::from_ref(&path));
    let g0 = program.find("\ngate vault_oracle").unwrap() + 1;
    let g1 = g0 + program[g0..].find("\n}\n").unwrap() + 3;
    let alone = format!(
        "OPENQASM 3.0;\ninclude \"stdgates.inc\";\n{}qubit[4] x_;\nqubit[1] y_;\nqubit[7] anc;\nx y_[0];\nh y_[0];\nvault_oracle x_[0], x_[1], x_[2], x_[3], y_[0], anc[0], anc[1], anc[2], anc[3], anc[4], anc[5], anc[6];\nh y_[0];\nx y_[0];\n",
        &program[g0..g1]
    );
    let c = read3("alone", &alone);
    let spec = oraculum::parse_spec(
        "vault-phase.toml",
        &std::fs::read_to_string(common::repo().join("specs/vault-phase.toml")).unwrap(),
    )
    .unwrap();
    let v = verify(&c, &spec, &VerifyOptions::default()).unwrap();
    assert!(matches!(v, Verdict::Proven { .. }), "{v:?}");
    let (amp, regs) = run_program(&program);
    let (x0, _) = regs["x_"];
    let mut found = 0.0;
    for (s, a) in amp.iter().enumerate() {
        let p = a * a;
        if p < 1e-12 {
            continue;
        }
        assert_eq!(s >> 4, 0, "y and the ancillae end at 0 (state {s})");
        let x = (s >> x0) & 15;
        let (a, b) = (x & 3, x >> 2);
        if a < b {
            found += p;
        }
    }
    assert!((found - 27.0 / 32.0).abs() < 1e-9, "{found}");
    let dir = workspace();
    let o = run_in(dir.path(), &["synth", "specs/vault-phase.toml", "--json"]);
    let j: serde_json::Value = serde_json::from_str(&text(&o).0).unwrap();
    assert_eq!(j["marked"], 6);
    assert_eq!(j["grover_iterations"], 1);
    assert!((j["success_probability"].as_f64().unwrap() - found).abs() < 1e-9);
}

/// The gate form of a circuit with measured uncomputes is a subroutine
/// (OpenQASM 3, Cross et al. 2022, section on subroutines: a `gate` body is
/// unitary, a `def` may measure): every demo spec built with `--uncompute
/// measure` whose circuit measures is written as `def oracle(qubit ...)`
/// with a local bit, read back as the same gates, lines and phase line as
/// its plain OpenQASM 2 twin, proven against its spec, and parsed by the
/// reference parser; the command line writes and verifies the same, and
/// the OpenQASM 2 gate form is refused with the way out named.
#[test]
fn a_gate_form_with_measured_uncomputes_is_a_subroutine() {
    common::tables();
    let dir = workspace();
    let mut paths: Vec<_> = std::fs::read_dir(dir.path().join("specs"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    paths.sort();
    let mut files = Vec::new();
    for p in paths {
        let stem = p.file_stem().unwrap().to_string_lossy().into_owned();
        let spec = oraculum::parse_spec(&stem, &std::fs::read_to_string(&p).unwrap()).unwrap();
        let opts = oraculum::BuildOptions {
            verify: Some(VerifyOptions::default()),
            uncompute: oraculum::Uncompute::Measure,
            ..Default::default()
        };
        let mut out = oraculum::pipeline::build(&spec, &opts).unwrap();
        out.rename_registers(&spec.registers);
        if out.lowered.measured_count() == 0 {
            continue;
        }
        let gate = Qasm3Options {
            gate: Some("oracle".into()),
            keep_mct: false,
        };
        let text3 = out.qasm3(&gate).unwrap();
        assert!(text3.contains("\ndef oracle(qubit "), "{stem}:\n{text3}");
        assert!(text3.contains("{\n  bit m;\n"), "{stem}:\n{text3}");
        assert!(!text3.contains("\ngate "), "{stem}");
        let c = read3(&stem, &text3);
        let twin = read_qasm("2", &out.qasm().unwrap()).unwrap();
        assert_eq!(c.lines(), twin.lines(), "{stem}");
        assert_eq!(c.gates(), twin.gates(), "{stem}");
        assert_eq!(c.phase(), twin.phase(), "{stem}");
        let back = c.with_registers_renamed(&spec.registers_back());
        let v = verify(&back, &spec, &VerifyOptions::default()).unwrap();
        assert!(matches!(v, Verdict::Proven { .. }), "{stem}: {v:?}");
        let f = dir.path().join(format!("{stem}.def.qasm3"));
        std::fs::write(&f, &text3).unwrap();
        files.push(f);
    }
    assert!(files.len() >= 8, "{} demo specs measure", files.len());
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/vault-phase.toml",
            "--uncompute",
            "measure",
            "--format",
            "qasm3",
            "--as-gate",
            "vault_oracle",
            "-o",
            "v.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    let o = run_in(
        dir.path(),
        &["verify", "v.qasm", "--spec", "specs/vault-phase.toml"],
    );
    assert_eq!(o.status.code(), Some(0), "{:?}", text(&o));
    files.push(dir.path().join("v.qasm"));
    let o = run_in(
        dir.path(),
        &[
            "synth",
            "specs/vault-phase.toml",
            "--uncompute",
            "measure",
            "--as-gate",
            "vault_oracle",
            "-o",
            "v2.qasm",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{:?}", text(&o));
    assert!(text(&o).1.contains("--format qasm3"), "{:?}", text(&o));
    assert!(!dir.path().join("v2.qasm").exists());
    reference_parse(&files);
}

/// Subroutines are read with their own checks, at their place: operands
/// are the arguments, `h` only starts a gadget, a subroutine is called
/// (not applied as a gate) with as many distinct qubits as it takes, and
/// nested calls are counted against the gate budget before expansion.
#[test]
fn bad_subroutines_are_refused_at_their_place() {
    let head = "OPENQASM 3.0;\ninclude \"stdgates.inc\";\nqubit[3] q;\n";
    let ok = format!(
        "{head}def f(qubit a, qubit b, qubit t) {{\n  bit m;\n  ccx a, b, t;\n  h t;\n  m = measure t;\n  if (m) {{ x a; cz a, b; x a; x t; }}\n}}\nx q[0];\nf(q[1], q[0], q[2]);\n"
    );
    let c = read3("ok", &ok);
    assert_eq!(c.gates().len(), 3, "{ok}");
    assert_eq!(
        c.gates()[2],
        Gate::measured(Control::neg(1), Control::pos(0), Line(2)).unwrap()
    );
    let cases = [
        ("def f(qubit a) { x q[0]; }\n", 4, 20, "not an argument"),
        ("def f(qubit a) { x a[0]; }\n", 4, 20, "without an index"),
        ("def f(qubit[2] a) { x a; }\n", 4, 7, "one qubit"),
        ("def f(qubit a) { h a; }\n", 4, 18, "measured uncompute"),
        ("def f(qubit a) { qubit b; }\n", 4, 18, "not read inside"),
        (
            "def f(qubit a, qubit b) { cx a, b; }\nf(q[0]);\n",
            5,
            1,
            "takes 2",
        ),
        (
            "def f(qubit a, qubit b) { cx a, b; }\nf(q[0], q[0]);\n",
            5,
            9,
            "twice",
        ),
        (
            "def f(qubit a, qubit b) { cx a, b; }\nf q[0], q[1];\n",
            5,
            1,
            "call it",
        ),
        (
            "def f(qubit a) { x a; }\ndef f(qubit a) { x a; }\n",
            5,
            5,
            "already",
        ),
    ];
    refused_at(head, &cases);
    // 2^20 gates from twenty doubling subroutines: refused before anything
    // is expanded, at the first body over the budget (d10, 1,024 gates).
    let mut t = String::from(head);
    t.push_str("def d0(qubit a, qubit b) { cx a, b; }\n");
    for k in 1..=20 {
        t.push_str(&format!(
            "def d{k}(qubit a, qubit b) {{ d{}(a, b); d{}(a, b); }}\n",
            k - 1,
            k - 1
        ));
    }
    t.push_str("d20(q[0], q[1]);\n");
    let limits = ReadLimits {
        max_gates: 1000,
        ..ReadLimits::default()
    };
    let e = read_qasm3_with("big.qasm", &t, &limits).unwrap_err();
    assert!(
        matches!(e, oraculum::export::ReadError::Limit { value: 1_024, .. }),
        "{e}"
    );
}
