//! The Clifford+T reader: every demo spec, in both uncompute modes, written
//! in Clifford+T form, reads back to the gates of its lowered circuit and is
//! proven from disk by `verify` on the command line; a file with one `t`
//! turned into `tdg` (or back), or one statement moved, is refused at its
//! line, and statements outside the form at theirs. What the sequences mean
//! is checked by state-vector simulation in tests/clifford_t.rs.

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
