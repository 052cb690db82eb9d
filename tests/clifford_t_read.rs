//! The Clifford+T reader: every demo spec, in both uncompute modes, written
//! in Clifford+T form, reads back to the gates of its lowered circuit and is
//! proven from disk by `verify` on the command line; a file with one `t`
//! turned into `tdg` (or back), or one statement moved, is refused at its
//! line, and statements outside the form at theirs; a gadget's CZ moved is
//! refused or refuted, its reset dropped refused. What the sequences mean is
//! checked by state-vector simulation in tests/clifford_t.rs.

mod common;

use common::{run_in, text};
use oraculum::export::{read_circuit_with, ReadLimits};
use oraculum::pipeline::build;
use oraculum::{parse_spec, BuildOptions, Circuit, Control, Gate, Uncompute};

/// The gates of `c` as the form writes them: a negative control of a flip or
/// a temporary AND is an `x` before and after the gate on positive controls;
/// a measured uncompute keeps its literals.
fn as_written(c: &Circuit) -> Vec<Gate> {
    let mut out = Vec::new();
    for g in c.gates() {
        if g.is_measured() {
            out.push(g.clone());
            continue;
        }
        let neg: Vec<u32> = g
            .controls()
            .iter()
            .filter(|c| !c.positive)
            .map(|c| c.line.0)
            .collect();
        out.extend(neg.iter().map(|&n| Gate::not(n)));
        let pos: Vec<Control> = g
            .controls()
            .iter()
            .map(|c| Control::pos(c.line.0))
            .collect();
        out.push(if g.is_temporary_and() {
            Gate::temporary_and(pos[0], pos[1], g.target()).unwrap()
        } else {
            Gate::new(pos, g.target()).unwrap()
        });
        out.extend(neg.iter().map(|&n| Gate::not(n)));
    }
    out
}

fn read(name: &str, text: &str) -> Result<Circuit, Box<oraculum::export::ReadError>> {
    read_circuit_with(name, text, &ReadLimits::default()).map_err(Box::new)
}

/// The 1-based line of the reader's refusal of `text`.
fn refused_at(text: &str) -> usize {
    match read("m.qasm", text) {
        Ok(_) => panic!("a mutated file was read:\n{text}"),
        Err(e) => e.located().expect("a located error").location.line,
    }
}

#[test]
fn demo_specs_in_clifford_t_form_read_back_and_are_proven_from_disk() {
    common::tables();
    let dir = common::workspace();
    let mut files = 0;
    let mut measured = 0;
    for entry in std::fs::read_dir(common::repo().join("specs")).unwrap() {
        let path = entry.unwrap().path();
        let stem = path.file_stem().unwrap().to_string_lossy().into_owned();
        let s = parse_spec("s", &std::fs::read_to_string(&path).unwrap()).unwrap();
        for mode in [Uncompute::Toffoli, Uncompute::Measure] {
            let o = build(
                &s,
                &BuildOptions {
                    uncompute: mode,
                    verify: Some(Default::default()),
                    ..BuildOptions::default()
                },
            )
            .unwrap_or_else(|e| panic!("{stem}: {e}"));
            assert!(o.verification.is_proven(), "{stem}");
            let written = o.clifford_t().unwrap();
            assert!(!written.contains("ccx"), "{stem}");
            let back = read(&stem, &written).unwrap_or_else(|e| panic!("{stem} {mode:?}: {e}"));
            assert_eq!(
                back.gates(),
                as_written(&o.lowered).as_slice(),
                "{stem} {mode:?}"
            );
            assert_eq!(back.phase(), o.lowered.phase(), "{stem}");
            assert_eq!(back.measured_count(), o.lowered.measured_count());
            measured += back.measured_count();
            // The cost of the file read back is the report's: the same
            // T-count and Toffoli-equivalents.
            let cost = oraculum::Cost::measure(&o.mct, &back);
            assert_eq!(
                (cost.t_count, cost.toffoli_equivalent),
                (o.cost.t_count, o.cost.toffoli_equivalent),
                "{stem} {mode:?}"
            );
            let file = format!("{stem}-{mode:?}.qasm");
            std::fs::write(dir.path().join(&file), &written).unwrap();
            let spec = format!("specs/{stem}.toml");
            let out = run_in(dir.path(), &["verify", &file, "--spec", &spec]);
            let (so, se) = text(&out);
            assert_eq!(out.status.code(), Some(0), "{file}: {so}{se}");
            assert!(so.contains("verified"), "{file}: {so}");
            files += 1;
        }
    }
    assert!(files >= 32, "{files}");
    assert!(measured > 0);
}

#[test]
fn mutated_clifford_t_files_are_refused_at_their_line() {
    common::tables();
    let g = std::fs::read_to_string(common::repo().join("specs/greenhouse.toml")).unwrap();
    let s = parse_spec("g", &g).unwrap();
    let o = build(
        &s,
        &BuildOptions {
            uncompute: Uncompute::Measure,
            ..BuildOptions::default()
        },
    )
    .unwrap();
    let written = o.clifford_t().unwrap();
    assert!(read("g.qasm", &written).is_ok());
    assert!(o.lowered.measured_count() > 0 && o.cost.temporary_and > 0);
    let lines: Vec<&str> = written.lines().collect();
    let body = |l: &str| {
        !(l.is_empty()
            || l.starts_with("//")
            || l.starts_with("OPENQASM")
            || l.starts_with("include")
            || l.starts_with("qreg")
            || l.starts_with("creg"))
    };
    // Every t turned into tdg and every tdg into t: refused at that line.
    let mut swaps = 0;
    for (i, l) in lines.iter().enumerate() {
        let swapped = if let Some(r) = l.strip_prefix("tdg ") {
            format!("t {r}")
        } else if let Some(r) = l.strip_prefix("t ") {
            format!("tdg {r}")
        } else {
            continue;
        };
        let mut m = lines.clone();
        m[i] = &swapped;
        assert_eq!(refused_at(&m.join("\n")), i + 1, "{l} -> {swapped}");
        swaps += 1;
    }
    assert_eq!(swaps, o.cost.t_count);
    // One statement moved down past the next, when at least one of the two
    // is a step of a longer sequence (two whole x/cx gates may trade places
    // and still be gates): refused at the first line of the two or at a
    // later step of the same sequence (a Toffoli's two controls bind in the
    // order they are met, so swapping 't a; t b' fails where 'cx a,b' comes).
    let single = |l: &str| l.starts_with("x ") || l.starts_with("cx ");
    let mut moved = 0;
    for i in 0..lines.len() - 1 {
        let (a, b) = (lines[i], lines[i + 1]);
        if a == b || !body(a) || !body(b) || (single(a) && single(b)) {
            continue;
        }
        let mut m = lines.clone();
        m.swap(i, i + 1);
        let at = refused_at(&m.join("\n"));
        assert!(
            (i + 1..=i + 17).contains(&at),
            "lines {} and {} swapped, refused at {at}",
            i + 1,
            i + 2
        );
        moved += 1;
    }
    assert!(moved > 50, "{moved}");
    // One statement dropped inside a sequence: refused.
    for (i, l) in lines.iter().enumerate() {
        if !body(l) || single(l) {
            continue;
        }
        let mut m = lines.clone();
        m.remove(i);
        let at = refused_at(&m.join("\n"));
        assert!(
            (i.saturating_sub(16)..=i + 17).contains(&at),
            "line {} dropped, refused at {at}",
            i + 1
        );
    }
}

// Statements the writer never emits are refused at their line and column:
// a ccx, an sdg, a barrier, a cz outside a measured uncompute, a lone
// measurement, a whole-register operand, a second condition.
#[test]
fn statements_outside_the_form_are_refused_where_they_are() {
    let head =
        "OPENQASM 2.0;\ninclude \"qelib1.inc\";\n// format: clifford+t\nqreg q[3];\ncreg m[1];\n";
    for (stmt, column) in [
        ("ccx q[0],q[1],q[2];", 1),
        ("sdg q[0];", 1),
        ("barrier q;", 1),
        ("cz q[0],q[1];", 1),
        ("measure q[0] -> m[0];", 1),
        ("x q;", 3),
        ("if(m==1) x q[0];", 1),
        ("if(m==0) x q[0];", 3),
        ("u3(0,0,0) q[0];", 1),
        ("h q[2]; t q[0]; t q[1]; t q[2]; cx q[1],q[0];", 33),
    ] {
        let text = format!("{head}{stmt}\n");
        let e = read("bad.qasm", &text).unwrap_err();
        let loc = &e.located().unwrap_or_else(|| panic!("{e}")).location;
        assert_eq!((loc.line, loc.column), (6, column), "{stmt}: {e}");
    }
    // A file that ends inside a Toffoli.
    let e = read("end.qasm", &format!("{head}h q[2];\nt q[0];\n")).unwrap_err();
    assert!(e.to_string().contains("ends early"), "{e}");
}

/// Whether gate `k` of `c`, a measured uncompute, has its requirement on
/// every basis state of the free lines (ancillae at 0), by this test's own
/// run of the gates before it: its ancilla holds the AND of its two
/// literals. Then a gadget whose CZ was moved to that pair is a correct
/// gadget (an equivalent mutant: the qubit moved to holds, with the one
/// kept, the same AND; a copy of the replaced qubit is the plainest case).
fn requirement_holds(c: &Circuit, k: usize) -> bool {
    let free: Vec<usize> = (0..c.width())
        .filter(|&i| c.lines()[i].register != "anc")
        .collect();
    assert!(free.len() <= 20 && c.width() <= 64);
    let g = &c.gates()[k];
    assert!(g.is_measured());
    (0u64..1 << free.len()).all(|st| {
        let mut x = 0u64;
        for (j, &i) in free.iter().enumerate() {
            x |= ((st >> j) & 1) << i;
        }
        let x = c.gates()[..k].iter().fold(x, |x, h| h.apply(x));
        let and = g
            .controls()
            .iter()
            .all(|ctl| ((x >> ctl.line.index()) & 1 == 1) == ctl.positive);
        ((x >> g.target().index()) & 1 == 1) == and
    })
}

// The mutation campaign on the gadget as a file holds it, plain OpenQASM 2
// and Clifford+T alike: its CZ moved (one of its qubits replaced by every
// other qubit in turn) is refused by the reader or refuted by the verifier
// (a measured uncompute whose ancilla does not hold the AND), unless the
// ancilla holds the AND of the moved pair too on every state (then it is a
// correct gadget, checked by the test's own run of the gates before); its
// reset (the
// `if(m==1) x` on the ancilla) dropped is refused at the next line (at the
// gadget's first line or the file's last when nothing follows).
#[test]
fn gadgets_with_their_cz_moved_or_their_reset_dropped_are_refused_or_refuted() {
    common::tables();
    let (mut refused, mut refuted, mut same, mut dropped) = (0, 0, 0, 0);
    for stem in ["greenhouse", "seating", "tide-gate", "glyph-rom"] {
        let path = common::repo().join(format!("specs/{stem}.toml"));
        let s = parse_spec("s", &std::fs::read_to_string(path).unwrap()).unwrap();
        let o = build(
            &s,
            &BuildOptions {
                uncompute: Uncompute::Measure,
                ..BuildOptions::default()
            },
        )
        .unwrap();
        for text in [
            oraculum::write_qasm(&o.lowered, &Default::default()).unwrap(),
            o.clifford_t().unwrap(),
        ] {
            let c = read(stem, &text).unwrap();
            let names: Vec<String> = c
                .lines()
                .iter()
                .map(|l| format!("{}[{}]", l.register, l.index))
                .collect();
            let lines: Vec<&str> = text.lines().collect();
            let gadgets: Vec<usize> = (0..lines.len())
                .filter(|&i| lines[i].starts_with("if(m==1) cz "))
                .collect();
            assert_eq!(gadgets.len(), c.measured_count(), "{stem}");
            assert!(!gadgets.is_empty(), "{stem}");
            for (nth, &i) in gadgets.iter().enumerate() {
                let k = c
                    .gates()
                    .iter()
                    .enumerate()
                    .filter(|(_, g)| g.is_measured())
                    .nth(nth)
                    .unwrap()
                    .0;
                let g = &c.gates()[k];
                let pair = lines[i]
                    .trim_start_matches("if(m==1) cz ")
                    .trim_end_matches(';');
                let (a, b) = pair.split_once(',').unwrap();
                for keep in [a, b] {
                    for (l, new) in names.iter().enumerate() {
                        if new == a || new == b {
                            continue;
                        }
                        let mut mutated = lines.clone();
                        let moved = format!("if(m==1) cz {keep},{new};");
                        mutated[i] = &moved;
                        let Ok(bad) = read(stem, &mutated.join("\n")) else {
                            refused += 1;
                            continue;
                        };
                        match oraculum::verify(&bad, &s, &Default::default()).unwrap() {
                            oraculum::Verdict::Refuted { counterexample } => {
                                assert!(
                                    counterexample.problem.contains("measured uncompute"),
                                    "{stem}: {}",
                                    counterexample.problem
                                );
                                refuted += 1;
                            }
                            v => {
                                assert!(
                                    l != g.target().index() && requirement_holds(&bad, k),
                                    "{stem}: cz moved to {moved} proven: {v:?}"
                                );
                                same += 1;
                            }
                        }
                    }
                }
                // The reset dropped: the statement after the cz's x's.
                let reset = (i + 1..lines.len())
                    .find(|&j| lines[j] == format!("if(m==1) x {};", names[g.target().index()]))
                    .unwrap();
                let mut mutated = lines.clone();
                mutated.remove(reset);
                let e = read(stem, &mutated.join("\n")).unwrap_err();
                let at = e.located().unwrap().location.line;
                // At the line after it, or, when it was the file's last
                // statement, at the gadget's `h` (plain reader) or the last
                // line (Clifford+T reader: the file ends early).
                let h = lines[..i]
                    .iter()
                    .rposition(|l| l.starts_with("measure "))
                    .unwrap();
                assert!(
                    at == reset + 1 || (reset == mutated.len() && (at == h || at == mutated.len())),
                    "{stem}: reset dropped at line {}, {e}",
                    reset + 1
                );
                dropped += 1;
            }
        }
    }
    assert!(
        refuted > 50 && dropped >= 16,
        "{refuted} refuted, {dropped} dropped"
    );
    println!("cz moved: {refused} refused, {refuted} refuted, {same} same gadget; {dropped} resets dropped");
}
