//! The Clifford+T form (`--format clifford-t`) against an outside
//! state-vector simulator (the `qasmsim` crate): every gadget (Toffoli of
//! T-depth 3, 4-T temporary AND, measured uncompute) and small whole circuits
//! act as the lowered circuit's classical map on basis states and on random
//! superpositions, whatever the measurements give; T-count and T-depth read
//! from the text agree with the cost report; Bennett circuits stay within 4 T
//! per AND node (Meuli et al., ICCAD 2019).

mod common;

use oraculum::circuit::{Circuit, LineInfo, Role};
use oraculum::export::write_clifford_t;
use oraculum::pipeline::build_one;
use oraculum::{
    parse_spec, BuildOptions, Control, Cost, Gate, Line, Method, QasmHeader, Uncompute,
};

/// A small deterministic generator (xorshift), so that every run checks the
/// same states.
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
    fn angle(&mut self) -> f64 {
        (self.next() % 10_000) as f64 / 10_000.0 * std::f64::consts::PI * 2.0
    }
}

/// qasmsim's qubit of each line: registers in declaration order, each in index order.
fn qubit_of(c: &Circuit) -> Vec<usize> {
    let regs = c.registers();
    c.lines()
        .iter()
        .map(|l| {
            let before: usize = regs
                .iter()
                .take_while(|(r, _)| *r != l.register)
                .map(|(_, n)| n)
                .sum();
            before + l.index as usize
        })
        .collect()
}

/// `text` with `prep` inserted after the declarations.
fn with_prep(text: &str, prep: &str) -> String {
    let mut out = String::new();
    let mut done = false;
    let lines: Vec<&str> = text.lines().collect();
    for (i, l) in lines.iter().enumerate() {
        out.push_str(l);
        out.push('\n');
        let decl = l.starts_with("qreg ") || l.starts_with("creg ");
        let next_decl = lines
            .get(i + 1)
            .is_some_and(|n| n.starts_with("qreg ") || n.starts_with("creg "));
        if decl && !next_decl && !done {
            out.push_str(prep);
            done = true;
        }
    }
    out
}

/// The gates only (after the declarations).
fn body(text: &str) -> Vec<String> {
    let mut seen = false;
    let mut out = Vec::new();
    for l in text.lines() {
        if l.starts_with("qreg ") || l.starts_with("creg ") {
            seen = true;
            continue;
        }
        if seen && !l.starts_with("//") && !l.trim().is_empty() {
            out.push(l.to_string());
        }
    }
    out
}

/// T gates and T-depth counted from the text: each `t`/`tdg` one layer after
/// the latest gate on its qubit, other gates pass the latest layer on.
fn t_figures(text: &str) -> (usize, usize) {
    let mut level: std::collections::HashMap<String, usize> = Default::default();
    let (mut count, mut depth) = (0, 0);
    for l in body(text) {
        let l = l.trim_end_matches(';');
        let l = l.split(") ").last().unwrap();
        let (op, args) = l.split_once(' ').unwrap();
        if op == "measure" {
            continue;
        }
        let qs: Vec<String> = args.split(',').map(|s| s.to_string()).collect();
        let mut v = qs
            .iter()
            .map(|q| level.get(q).copied().unwrap_or(0))
            .max()
            .unwrap();
        if op == "t" || op == "tdg" {
            v += 1;
            count += 1;
        }
        for q in qs {
            level.insert(q, v);
        }
        depth = depth.max(v);
    }
    (count, depth)
}

/// The same program with each measurement into a classical register of its
/// own (`m` becomes `m0`, `m1`, ...: the `if`s after a measurement read it).
/// In OpenQASM 2 a measurement overwrites its bit, so this changes nothing;
/// qasmsim 1.3 does not overwrite a bit measured before (its second
/// measurement into `m[0]` can leave `m == 2`), which this works around.
fn fresh_cregs(text: &str) -> String {
    let k = text.matches("measure ").count();
    let mut out = String::new();
    let mut n = 0usize;
    for l in text.lines() {
        if l == "creg m[1];" {
            for i in 0..k {
                out.push_str(&format!("creg m{i}[1];\n"));
            }
            continue;
        }
        if l.starts_with("measure ") {
            n += 1;
            out.push_str(&l.replace("-> m[0]", &format!("-> m{}[0]", n - 1)));
        } else if l.starts_with("if(m==1)") {
            out.push_str(&l.replace("if(m==1)", &format!("if(m{}==1)", n - 1)));
        } else {
            out.push_str(l);
        }
        out.push('\n');
    }
    out
}

/// Checks `c` (lowered, at most 12 lines) in Clifford+T form on `basis` basis
/// states and `random` random superpositions of its free lines (ancillae at
/// 0), each run several times: the final state is the initial one with every
/// basis state moved by the classical map.
fn check(c: &Circuit, basis: usize, random: usize, rng: &mut Rng) -> usize {
    let written = write_clifford_t(c, &QasmHeader::default()).unwrap();
    let text = fresh_cregs(&written);
    for l in body(&text) {
        let l = l.split(") ").last().unwrap();
        let op = l.split(' ').next().unwrap();
        assert!(
            ["h", "s", "sdg", "t", "tdg", "x", "cx", "cz", "measure"].contains(&op),
            "{op}"
        );
    }
    let qubit = qubit_of(c);
    let free: Vec<usize> = (0..c.width())
        .filter(|&i| c.lines()[i].role != Role::Ancilla)
        .collect();
    let map = |i: usize| -> usize {
        // qasmsim index -> our state -> simulate -> qasmsim index
        let mut s = 0u64;
        for (line, &q) in qubit.iter().enumerate() {
            s |= (((i >> q) & 1) as u64) << line;
        }
        let s = c.simulate(s);
        let mut j = 0usize;
        for (line, &q) in qubit.iter().enumerate() {
            j |= (((s >> line) & 1) as usize) << q;
        }
        j
    };
    let anc_mask: usize = (0..c.width())
        .filter(|&i| c.lines()[i].role == Role::Ancilla)
        .map(|i| 1 << qubit[i])
        .sum();
    let mut runs = 0;
    for k in 0..basis + random {
        let mut prep = String::new();
        for &f in &free {
            let l = &c.lines()[f];
            if k < basis {
                if rng.next() & 1 == 1 {
                    prep.push_str(&format!("x {}[{}];\n", l.register, l.index));
                }
            } else {
                prep.push_str(&format!(
                    "u3({},{},{}) {}[{}];\n",
                    rng.angle() / 2.0,
                    rng.angle(),
                    rng.angle(),
                    l.register,
                    l.index
                ));
            }
        }
        let init = qasmsim::run(
            &with_prep(
                &text
                    .lines()
                    .take_while(|l| {
                        !l.starts_with("x ")
                            && !l.starts_with("h ")
                            && !l.starts_with("cx ")
                            && !l.starts_with("if")
                            && !l.starts_with("t ")
                            && !l.starts_with("measure")
                    })
                    .collect::<Vec<_>>()
                    .join("\n"),
                &prep,
            ),
            None,
        )
        .unwrap();
        let init = init.statevector().as_complex_bases().to_vec();
        for _ in 0..3 {
            let run = qasmsim::run(&with_prep(&text, &prep), None).unwrap();
            let out = run.statevector().as_complex_bases();
            // States with an ancilla at 1 have amplitude 0 in `init`; the
            // others move by the map, and since both states are normalized
            // nothing else is left in `out`.
            for (i, a) in init.iter().enumerate() {
                if anc_mask & i != 0 {
                    continue;
                }
                let b = out[map(i)];
                assert!(
                    (a.re - b.re).abs() < 1e-9 && (a.im - b.im).abs() < 1e-9,
                    "amplitude of {i} moved to {}: {a:?} became {b:?}; nonzero now: {:?}\n{prep}\n{text}",
                    map(i),
                    out.iter().enumerate().filter(|(_, z)| z.re.abs() + z.im.abs() > 1e-6).map(|(j, z)| (j, z.re, z.im)).collect::<Vec<_>>()
                );
            }
            runs += 1;
        }
    }
    runs
}

fn lines(n: usize, anc: usize) -> Vec<LineInfo> {
    (0..n + anc)
        .map(|i| LineInfo {
            register: if i < n { "q" } else { "anc" }.into(),
            index: if i < n { i } else { i - n } as u32,
            role: if i < n { Role::Data } else { Role::Ancilla },
            label: String::new(),
        })
        .collect()
}

// Each gadget alone, every polarity: a Toffoli on data lines; a temporary AND
// and its measured uncompute around a CNOT copying the AND out.
#[test]
fn gadgets_act_as_their_classical_map() {
    let mut rng = Rng(0x9e3779b97f4a7c15);
    for pa in [true, false] {
        for pb in [true, false] {
            let (a, b) = (
                Control {
                    line: Line(0),
                    positive: pa,
                },
                Control {
                    line: Line(1),
                    positive: pb,
                },
            );
            let tof =
                Circuit::from_parts(lines(3, 0), vec![Gate::new(vec![a, b], Line(2)).unwrap()])
                    .unwrap();
            check(&tof, 8, 4, &mut rng);
            let pair = Circuit::from_parts(
                lines(3, 1),
                vec![
                    Gate::temporary_and(a, b, Line(3)).unwrap(),
                    Gate::cnot(3, 2),
                    Gate::measured(a, b, Line(3)).unwrap(),
                ],
            )
            .unwrap();
            check(&pair, 8, 4, &mut rng);
            let text = write_clifford_t(&pair, &QasmHeader::default()).unwrap();
            // 4 T, T-depth 2, for the temporary AND; none for the uncompute.
            assert_eq!(t_figures(&text), (4, 2));
            let text = write_clifford_t(&tof, &QasmHeader::default()).unwrap();
            assert_eq!(t_figures(&text), (7, 3));
        }
    }
}

fn spec(text: &str) -> oraculum::Spec {
    parse_spec("t.toml", text).unwrap()
}

fn measured(s: &oraculum::Spec, m: Method) -> (Circuit, Cost) {
    let o = build_one(
        s,
        m,
        &BuildOptions {
            uncompute: Uncompute::Measure,
            verify: Some(Default::default()),
            ..BuildOptions::default()
        },
        &(),
    )
    .unwrap();
    assert!(o.verification.is_proven());
    (o.lowered, o.cost)
}

// Small whole circuits in measure mode: Gidney adders, a controlled lookup,
// majority and greenhouse by Bennett.
#[test]
fn small_circuits_match_their_map_in_clifford_t_form() {
    common::tables();
    let mut rng = Rng(0x2545f4914f6cdd1d);
    let specs = [
        ("kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\ncarry_out = true\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"lookup\"\nwidth = 2\ndata_width = 2\ncontrolled = true\ndata = [1, 2, 3, 1]\n", Method::Structural),
        ("kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"most\"]\n[table]\nmost = \"0xe8\"\n", Method::Xag),
        ("kind = \"function\"\ninputs = [\"a\", \"b\", \"c\", \"d\"]\noutputs = [\"y\"]\n[expr]\ny = \"a & b & c & !d\"\n", Method::Esop),
    ];
    let mut runs = 0;
    for (text, m) in specs {
        let (c, cost) = measured(&spec(text), m);
        assert!(c.width() <= 12, "{}", c.width());
        runs += check(&c, 6, 6, &mut rng);
        let qasm = write_clifford_t(&c, &QasmHeader::default()).unwrap();
        assert_eq!(t_figures(&qasm), (cost.t_count, cost.t_depth), "{text}");
    }
    assert!(runs >= 100);
    let g = std::fs::read_to_string(common::repo().join("specs/greenhouse.toml")).unwrap();
    let (c, _) = measured(&spec(&g), Method::Bennett);
    assert!(c.width() <= 12);
    check(&c, 4, 4, &mut rng);
}

// Meuli, Soeken, Campbell, Roetteler, De Micheli, ICCAD 2019: at most 4 T per
// AND node of the XOR-AND network. T gates counted in the written text.
#[test]
fn bennett_in_clifford_t_form_has_at_most_4_t_per_and_node() {
    common::tables();
    for entry in std::fs::read_dir(common::repo().join("specs")).unwrap() {
        let path = entry.unwrap().path();
        let s = parse_spec("s", &std::fs::read_to_string(&path).unwrap()).unwrap();
        let oraculum::SpecBody::Function(f) = &s.body else {
            continue;
        };
        let net = oraculum::synth::network_of(f).unwrap();
        let ands = net
            .nodes()
            .iter()
            .filter(|n| matches!(n, oraculum::logic::Node::And(..)))
            .count();
        let (c, _) = measured(&s, Method::Bennett);
        let text = write_clifford_t(&c, &QasmHeader::default()).unwrap();
        let (t, _) = t_figures(&text);
        assert!(
            t <= 4 * ands,
            "{}: {t} T for {ands} AND nodes",
            path.display()
        );
    }
}
