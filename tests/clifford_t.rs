//! The Clifford+T form (`--format clifford-t`) against an outside
//! state-vector simulator (the `qasmsim` crate): every gadget (Toffoli of
//! T-depth 3, 4-T temporary AND, measured uncompute) and small whole circuits
//! act as the lowered circuit's classical map on basis states and on random
//! superpositions, whatever the measurements give; T-count and T-depth read
//! from the text agree with the cost report; Bennett circuits stay within 4 T
//! per AND node (Meuli et al., ICCAD 2019); and every demo spec of at most 20
//! qubits in measure mode, as plain OpenQASM 2 and (up to 13 qubits) in
//! Clifford+T form, moves every amplitude where the spec's own map sends it.

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
    for l in body(&written) {
        let l = l.split(") ").last().unwrap();
        let op = l.split(' ').next().unwrap();
        assert!(
            ["h", "s", "sdg", "t", "tdg", "x", "cx", "cz", "measure"].contains(&op),
            "{op}"
        );
    }
    let map = |s: u64| (c.simulate(s), false);
    simulate_against(c, &written, &map, &Prep::default(), basis, random, 3, rng).0
}

/// How the initial states are made beyond independent random qubits: the
/// lines left at 0 (a phase oracle's line), and for a promised domain, a
/// line rotated only where another is 0 (`x c; cu3 c,t; x c;`), so no
/// amplitude falls outside it.
#[derive(Default)]
struct Prep {
    zero: Vec<usize>,
    only_where_zero: Vec<(usize, usize)>,
}

/// Simulates `text` (OpenQASM 2, plain or Clifford+T, of the lowered circuit
/// `c`) with qasmsim on `basis` random basis states and `random` random
/// superpositions of the free lines of `c` (ancillae and `prep.zero` at 0),
/// each `runs` times, so that every measurement's outcome is drawn afresh;
/// every amplitude must arrive where `map` sends its basis state (our line
/// numbering), negated when `map` says so. Returns the runs and the
/// measurement outcomes seen as (zeros, ones).
#[allow(clippy::too_many_arguments)]
fn simulate_against(
    c: &Circuit,
    text: &str,
    map: &dyn Fn(u64) -> (u64, bool),
    prep_rule: &Prep,
    basis: usize,
    random: usize,
    runs_each: usize,
    rng: &mut Rng,
) -> (usize, (usize, usize)) {
    let text = fresh_cregs(text);
    let qubit = qubit_of(c);
    let free: Vec<usize> = (0..c.width())
        .filter(|&i| c.lines()[i].role != Role::Ancilla && !prep_rule.zero.contains(&i))
        .collect();
    let to_ours = |i: usize| -> u64 {
        let mut s = 0u64;
        for (line, &q) in qubit.iter().enumerate() {
            s |= (((i >> q) & 1) as u64) << line;
        }
        s
    };
    let to_sim = |s: u64| -> usize {
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
    // The declarations alone: the program that makes the initial state.
    let last_decl = text
        .lines()
        .collect::<Vec<_>>()
        .iter()
        .rposition(|l| l.starts_with("qreg ") || l.starts_with("creg "))
        .unwrap();
    let decls = text
        .lines()
        .take(last_decl + 1)
        .collect::<Vec<_>>()
        .join("\n");
    let name = |i: usize| format!("{}[{}]", c.lines()[i].register, c.lines()[i].index);
    let (mut runs, mut zeros, mut ones) = (0, 0, 0);
    for k in 0..basis + random {
        let mut prep = String::new();
        for &f in &free {
            if k < basis {
                if rng.next() & 1 == 1 {
                    prep.push_str(&format!("x {};\n", name(f)));
                }
                continue;
            }
            let u = format!("({},{},{})", rng.angle() / 2.0, rng.angle(), rng.angle());
            match prep_rule.only_where_zero.iter().find(|p| p.1 == f) {
                Some(&(ctl, _)) => prep.push_str(&format!(
                    "x {c};\ncu3{u} {c},{t};\nx {c};\n",
                    c = name(ctl),
                    t = name(f)
                )),
                None => prep.push_str(&format!("u3{u} {};\n", name(f))),
            }
        }
        // A basis state outside the domain is left out.
        let set = |l: usize| prep.contains(&format!("x {};\n", name(l)));
        if k < basis
            && prep_rule
                .only_where_zero
                .iter()
                .any(|&(ctl, t)| set(ctl) && set(t))
        {
            continue;
        }
        let init = qasmsim::run(&with_prep(&decls, &prep), None).unwrap();
        let init = init.statevector().as_complex_bases().to_vec();
        for _ in 0..runs_each {
            let run = qasmsim::run(&with_prep(&text, &prep), None).unwrap();
            for (reg, v) in run.memory() {
                if reg.starts_with('m') {
                    if *v == 0 {
                        zeros += 1
                    } else {
                        ones += 1
                    }
                }
            }
            let out = run.statevector().as_complex_bases();
            // States with an ancilla at 1 have amplitude 0 in `init`; the
            // others move by the map, and since both states are normalized
            // nothing else is left in `out`.
            for (i, a) in init.iter().enumerate() {
                if anc_mask & i != 0 || a.re.abs() + a.im.abs() < 1e-12 {
                    continue;
                }
                let (to, neg) = map(to_ours(i));
                let j = to_sim(to);
                let sign = if neg { -1.0 } else { 1.0 };
                let b = out[j];
                assert!(
                    (sign * a.re - b.re).abs() < 1e-9 && (sign * a.im - b.im).abs() < 1e-9,
                    "amplitude of {i} moved to {j} (sign {sign}): {a:?} became {b:?}; nonzero now: {:?}\n{prep}\n{text}",
                    out.iter().enumerate().filter(|(_, z)| z.re.abs() + z.im.abs() > 1e-6).map(|(j, z)| (j, z.re, z.im)).collect::<Vec<_>>()
                );
            }
            runs += 1;
        }
    }
    (runs, (zeros, ones))
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

// Small whole circuits in measure mode: Gidney adders (plain, with a
// carry-out, controlled), comparators on the same carry chain, a controlled
// lookup, majority and greenhouse by Bennett.
#[test]
fn small_circuits_match_their_map_in_clifford_t_form() {
    common::tables();
    let mut rng = Rng(0x2545f4914f6cdd1d);
    let specs = [
        ("kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\ncarry_out = true\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"add\"\nwidth = 3\ncontrolled = true\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"compare\"\nwidth = 3\nrelation = \"<\"\n", Method::Structural),
        ("kind = \"arithmetic\"\nop = \"compare\"\nwidth = 2\nrelation = \">=\"\ncontrolled = true\n", Method::Structural),
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

/// A demo spec's map, written here from the spec file's own words (not from
/// anything oraculum computes): the registers' values after, and whether the
/// amplitude is negated (phase oracles), from the values before.
type Regs = std::collections::HashMap<String, u64>;
type Map = Box<dyn Fn(&Regs) -> (Regs, bool)>;

fn demo_map(stem: &str) -> Option<Map> {
    fn bit(v: u64, i: u32) -> bool {
        (v >> i) & 1 == 1
    }
    fn xor_y(r: &Regs, f: u64) -> (Regs, bool) {
        let mut o = r.clone();
        *o.get_mut("y").unwrap() ^= f;
        (o, false)
    }
    fn image(r: &Regs, images: &'static [u64]) -> (Regs, bool) {
        let mut o = r.clone();
        o.insert("x".into(), images[r["x"] as usize]);
        (o, false)
    }
    Some(match stem {
        // weight, width 6: y ^= popcount(a).
        "crew-count" => Box::new(|r| xor_y(r, r["a"].count_ones() as u64)),
        // compare a >= 4, width 3, phase form.
        "crew-quorum" => Box::new(|r| (r.clone(), r["a"] >= 4)),
        "dice-shuffle" => Box::new(|r| image(r, &[5, 2, 7, 0, 6, 1, 4, 3])),
        // compare a < 21, width 6, controlled.
        "frost-alarm" => Box::new(|r| xor_y(r, (r["ctrl"] == 1 && r["a"] < 21) as u64)),
        "glyph-rom" => Box::new(|r| {
            let data = [
                0b01110, 0b10001, 0b11111, 0b10101, 0b00100, 0b01010, 0b10001, 0,
            ];
            xor_y(r, data[r["a"] as usize])
        }),
        // vent = 0x3e, fan = hot & !night | humid ^ hot (x0 hot, x1 humid, x2 night).
        "greenhouse" => Box::new(|r| {
            let x = r["x"];
            let (hot, humid, night) = (bit(x, 0), bit(x, 1), bit(x, 2));
            let vent = bit(0x3e, x as u32);
            let fan = (hot && !night) | (humid ^ hot);
            xor_y(r, vent as u64 | (fan as u64) << 1)
        }),
        "lamp-cycle" => {
            Box::new(|r| image(r, &[3, 8, 14, 1, 0, 11, 5, 12, 7, 2, 9, 6, 15, 10, 4, 13]))
        }
        "seating" => Box::new(|r| {
            let x = r["x"];
            let [ada, bo, cy, di, ed, fay] = [0, 1, 2, 3, 4, 5].map(|i| bit(x, i));
            let pair = !(ada ^ bo);
            let apart = !(cy && di);
            let valid = pair && apart && ed && (fay ^ bo ^ cy);
            xor_y(r, valid as u64 | (pair as u64) << 1 | (apart as u64) << 2)
        }),
        "shift-rota" => Box::new(|r| {
            let x = r["x"];
            let [da, db, na, nb, nc, nd, dap, dbp] = [0, 1, 2, 3, 4, 5, 6, 7].map(|i| bit(x, i));
            let ok = (da || db) && (na ^ nb) && (nc ^ nd) && !(da && dap) && !(db && dbp);
            xor_y(r, ok as u64)
        }),
        // add constant 1 modulo 12, on the domain a < 12.
        "ticket-counter" => Box::new(|r| {
            let mut o = r.clone();
            o.insert("a".into(), (r["a"] + 1) % 12);
            (o, false)
        }),
        "tide-gate" => Box::new(|r| xor_y(r, bit(0xff08, r["x"] as u32) as u64)),
        // a < b on two 2-bit numbers (x0 a0, x1 a1, x2 b0, x3 b1), phase form.
        "vault-phase" => Box::new(|r| {
            let x = r["x"];
            (r.clone(), (x & 3) < (x >> 2))
        }),
        _ => return None,
    })
}

/// The registers' values of a state in `c`'s line numbering, and back.
fn registers_of(c: &Circuit, s: u64) -> Regs {
    let mut r = Regs::new();
    for (i, l) in c.lines().iter().enumerate() {
        *r.entry(l.register.clone()).or_insert(0) |= ((s >> i) & 1) << l.index;
    }
    r
}

fn state_of(c: &Circuit, r: &Regs) -> u64 {
    c.lines()
        .iter()
        .enumerate()
        .map(|(i, l)| ((r[&l.register] >> l.index) & 1) << i)
        .sum()
}

// Every demo spec of at most 20 qubits, built in measure mode (proven by the
// verifier), written as plain OpenQASM 2 and, up to 13 qubits, in Clifford+T
// form, simulated by qasmsim on random basis states and random
// superpositions of its free registers, each run three times with the
// measurements drawn afresh: every amplitude lands where the spec's map (as
// written above from the spec files) sends it, whatever the outcomes.
#[test]
fn small_demo_specs_in_measure_mode_match_the_spec_map_in_simulation() {
    common::tables();
    let mut rng = Rng(0x6a09e667f3bcc908);
    let (mut files, mut measured, mut zeros, mut ones) = (0, 0, 0, 0);
    let mut covered = Vec::new();
    for entry in std::fs::read_dir(common::repo().join("specs")).unwrap() {
        let path = entry.unwrap().path();
        let stem = path.file_stem().unwrap().to_string_lossy().into_owned();
        let s = spec(&std::fs::read_to_string(&path).unwrap());
        let o = oraculum::pipeline::build(
            &s,
            &BuildOptions {
                uncompute: Uncompute::Measure,
                verify: Some(Default::default()),
                ..BuildOptions::default()
            },
        )
        .unwrap();
        assert!(o.verification.is_proven(), "{stem}");
        let c = &o.lowered;
        if c.width() > 20 {
            continue;
        }
        let f = demo_map(&stem).unwrap_or_else(|| panic!("{stem}: write its map in demo_map"));
        let map = |st: u64| {
            let (r, neg) = f(&registers_of(c, st));
            (state_of(c, &r), neg)
        };
        let mut prep = Prep::default();
        if let Some(p) = c.phase() {
            prep.zero.push(p.index());
        }
        if stem == "ticket-counter" {
            // a < 12: a[3] set only where a[2] is 0.
            let line = |i: u32| {
                c.lines()
                    .iter()
                    .position(|l| l.register == "a" && l.index == i)
                    .unwrap()
            };
            prep.only_where_zero.push((line(2), line(3)));
        }
        let plain = oraculum::write_qasm(c, &QasmHeader::default()).unwrap();
        let mut texts = vec![plain];
        if c.width() <= 13 {
            texts.push(write_clifford_t(c, &QasmHeader::default()).unwrap());
        }
        // Fewer states on the widest circuits keep the test within seconds.
        let (basis, random) = if c.width() <= 13 { (4, 4) } else { (2, 2) };
        for text in &texts {
            let (runs, (z, one)) =
                simulate_against(c, text, &map, &prep, basis, random, 3, &mut rng);
            assert!(runs > 0, "{stem}");
            zeros += z;
            ones += one;
            files += 1;
        }
        measured += c.measured_count();
        covered.push(stem);
    }
    covered.sort();
    assert!(covered.len() >= 12, "{covered:?}");
    assert!(
        files >= 20 && measured >= 20,
        "{files} files, {measured} measured"
    );
    // Both outcomes of the measured uncomputes were drawn, many times over (each
    // is a fair coin: X-basis measurement of an ancilla in a basis state).
    assert!(zeros > 20 && ones > 20, "{zeros} zeros, {ones} ones");
}
