//! Design-file readers against real benchmarks (EPFL), hand-made worked examples, bad input and long inputs.

use oraculum::logic::{Lit, Network, Node};
use oraculum::netlist::{
    read_aiger, read_blif, read_cnf, read_netlist, read_pla, to_network, Edge, Netlist, NodeKind,
    ReadError, ReadLimits,
};

const EPFL: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/epfl");

/// splitmix64 (Steele, Lea, Flood, "Fast splittable pseudorandom number
/// generators", OOPSLA 2014): a fixed-seed generator for test patterns.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
}

fn limits() -> ReadLimits {
    ReadLimits::default()
}

fn read_file(name: &str) -> Netlist {
    let path = format!("{EPFL}/{name}");
    let bytes = std::fs::read(&path).unwrap();
    read_netlist(&path, &bytes, &limits()).unwrap_or_else(|e| panic!("{e}"))
}

/// A's count from an AIGER header, read here without the reader.
fn header_ands(name: &str) -> usize {
    let bytes = std::fs::read(format!("{EPFL}/{name}")).unwrap();
    let line = bytes.split(|&b| b == b'\n').next().unwrap();
    let fields: Vec<&str> = std::str::from_utf8(line).unwrap().split(' ').collect();
    fields[5].parse().unwrap()
}

// ---------------------------------------------------------------- SAT miter

/// A small Tseitin encoding (G. S. Tseitin, "On the complexity of derivation
/// in propositional calculus", 1968) of netlists into CaDiCaL, written here
/// from the netlist's public node list only.
struct Encoder {
    sat: cadical::Solver,
    next: i32,
    falsity: i32,
}

impl Encoder {
    fn new() -> Encoder {
        let mut sat: cadical::Solver = cadical::Solver::new();
        sat.add_clause([-1]);
        Encoder {
            sat,
            next: 2,
            falsity: 1,
        }
    }

    fn fresh(&mut self) -> i32 {
        self.next += 1;
        self.next - 1
    }

    /// Encodes `n` over input variables `inputs`; returns one literal per output.
    fn netlist(&mut self, n: &Netlist, inputs: &[i32]) -> Vec<i32> {
        let mut var = vec![self.falsity];
        var.extend_from_slice(inputs);
        let lit = |var: &[i32], e: Edge| {
            let v = var[e.signal()];
            if e.complemented() {
                -v
            } else {
                v
            }
        };
        for i in 0..n.node_count() {
            let (kind, fanins) = n.node(i);
            let ls: Vec<i32> = fanins.iter().map(|&e| lit(&var, e)).collect();
            let z = match kind {
                NodeKind::And => self.and(&ls),
                NodeKind::Or => {
                    let neg: Vec<i32> = ls.iter().map(|l| -l).collect();
                    -self.and(&neg)
                }
                NodeKind::Xor => {
                    let mut acc = self.falsity;
                    for &l in &ls {
                        acc = self.xor(acc, l);
                    }
                    acc
                }
            };
            var.push(z);
        }
        n.outputs().iter().map(|o| lit(&var, o.edge)).collect()
    }

    fn and(&mut self, ls: &[i32]) -> i32 {
        let z = self.fresh();
        for &l in ls {
            self.sat.add_clause([-z, l]);
        }
        let mut long: Vec<i32> = ls.iter().map(|l| -l).collect();
        long.push(z);
        self.sat.add_clause(long);
        z
    }

    fn xor(&mut self, a: i32, b: i32) -> i32 {
        let z = self.fresh();
        self.sat.add_clause([-z, a, b]);
        self.sat.add_clause([-z, -a, -b]);
        self.sat.add_clause([z, -a, b]);
        self.sat.add_clause([z, a, -b]);
        z
    }
}

/// Whether some input makes output `k` of `a` differ from output `k` of `b`
/// (with `b`'s output `flip` complemented, to check the miter can fail).
fn miter_satisfiable(a: &Netlist, b: &Netlist, flip: Option<usize>) -> bool {
    let mut enc = Encoder::new();
    let inputs: Vec<i32> = (0..a.input_count()).map(|_| enc.fresh()).collect();
    let oa = enc.netlist(a, &inputs);
    let mut ob = enc.netlist(b, &inputs);
    if let Some(k) = flip {
        ob[k] = -ob[k];
    }
    let diffs: Vec<i32> = oa.iter().zip(&ob).map(|(&x, &y)| enc.xor(x, y)).collect();
    enc.sat.add_clause(diffs);
    enc.sat.solve().expect("no resource limit was set")
}

// ------------------------------------------------------------ simulation

fn random_words(rng: &mut Rng, inputs: usize) -> Vec<u64> {
    (0..inputs).map(|_| rng.next()).collect()
}

/// Every network node's value on 64 patterns, computed here from the node list.
fn network_words(net: &Network, input: &[u64]) -> Vec<u64> {
    let mut v: Vec<u64> = Vec::with_capacity(net.nodes().len());
    for n in net.nodes() {
        let w = match *n {
            Node::Zero => 0,
            Node::Input(j) => input[j],
            Node::And(a, b) => lit_word(&v, a) & lit_word(&v, b),
            Node::Xor(a, b) => lit_word(&v, a) ^ lit_word(&v, b),
        };
        v.push(w);
    }
    v
}

fn lit_word(v: &[u64], l: Lit) -> u64 {
    if l.neg {
        !v[l.node]
    } else {
        v[l.node]
    }
}

/// `to_network` agrees with `Netlist::eval_words` (outputs and don't-cares)
/// on `rounds` × 64 random patterns.
fn check_network(n: &Netlist, rounds: usize, seed: u64) -> Network {
    let (net, dcs) = to_network(n);
    assert_eq!(net.inputs, n.input_count());
    assert_eq!(net.outputs.len(), n.outputs().len());
    let mut rng = Rng(seed);
    for _ in 0..rounds {
        let input = random_words(&mut rng, n.input_count());
        let signals = n.simulate_words(&input);
        let v = network_words(&net, &input);
        for (k, o) in n.outputs().iter().enumerate() {
            assert_eq!(
                lit_word(&v, net.outputs[k]),
                o.edge.word(&signals),
                "output {}",
                o.name
            );
            assert_eq!(
                dcs[k].map(|d| lit_word(&v, d)),
                o.dont_care.map(|d| d.word(&signals))
            );
        }
    }
    net
}

// ------------------------------------------------------------------ EPFL

/// Inputs and outputs of the EPFL circuits, as published with the suite
/// (Amarù, Gaillardon, De Micheli, "The EPFL Combinational Benchmark Suite",
/// IWLS 2015, Table 1); the numbers are quoted from memory.
const CIRCUITS: [(&str, usize, usize); 8] = [
    ("adder", 256, 129),
    ("bar", 135, 128),
    ("cavlc", 10, 11),
    ("ctrl", 7, 26),
    ("dec", 8, 256),
    ("int2float", 11, 7),
    ("priority", 128, 8),
    ("router", 60, 30),
];

#[test]
fn epfl_blif_and_aiger_compute_the_same_function() {
    for (name, inputs, outputs) in CIRCUITS {
        let blif = read_file(&format!("{name}.blif"));
        let aig = read_file(&format!("{name}.aig"));
        assert_eq!(
            (blif.input_count(), blif.outputs().len()),
            (inputs, outputs),
            "{name}.blif"
        );
        assert_eq!(
            (aig.input_count(), aig.outputs().len()),
            (inputs, outputs),
            "{name}.aig"
        );
        assert_eq!(
            aig.node_count(),
            header_ands(&format!("{name}.aig")),
            "{name}"
        );
        assert!((0..aig.node_count())
            .all(|i| aig.node(i).0 == NodeKind::And && aig.node(i).1.len() == 2));
        // Both files come from the same source: same names, same order.
        assert_eq!(blif.inputs(), aig.inputs(), "{name}");
        let names = |n: &Netlist| {
            n.outputs()
                .iter()
                .map(|o| o.name.clone())
                .collect::<Vec<_>>()
        };
        assert_eq!(names(&blif), names(&aig), "{name}");

        // 64 rounds of 64 random patterns: 4096 patterns.
        let mut rng = Rng(0x5eed ^ inputs as u64);
        for _ in 0..64 {
            let input = random_words(&mut rng, inputs);
            assert_eq!(blif.eval_words(&input), aig.eval_words(&input), "{name}");
        }
        // Proof over all inputs; and the miter is not vacuous.
        assert!(
            !miter_satisfiable(&blif, &aig, None),
            "{name}: the miter found a difference"
        );
        assert!(
            miter_satisfiable(&blif, &aig, Some(outputs - 1)),
            "{name}: flipped output not found"
        );
    }
}

#[test]
fn epfl_networks_match_their_netlists() {
    for (name, ..) in CIRCUITS {
        for ext in ["blif", "aig"] {
            let n = read_file(&format!("{name}.{ext}"));
            let net = check_network(&n, 8, 7);
            if ext == "aig" {
                // Folding and merging never add gates to an AIG.
                assert!(net.gates() <= n.node_count(), "{name}");
            }
        }
    }
}

#[test]
fn epfl_adder_as_a_network() {
    let blif = read_file("adder.blif");
    let aig = read_file("adder.aig");
    let (from_blif, _) = to_network(&blif);
    let (from_aig, _) = to_network(&aig);
    println!(
        "adder: BLIF {} nodes / {} fanins -> network {} gates; AIGER {} ANDs -> network {} gates",
        blif.node_count(),
        blif.fanin_count(),
        from_blif.gates(),
        aig.node_count(),
        from_aig.gates()
    );
    assert!(from_aig.gates() <= 1020);
    check_network(&blif, 16, 11);
}

// ------------------------------------------------------- worked examples

/// (sum, carry) of a full adder, from integer addition.
fn full_adder(a: bool, b: bool, c: bool) -> (bool, bool) {
    let s = a as u8 + b as u8 + c as u8;
    (s & 1 == 1, s >= 2)
}

fn assert_full_adder(n: &Netlist) {
    assert_eq!(n.input_count(), 3);
    assert_eq!(n.outputs().len(), 2);
    for m in 0..8u32 {
        let (a, b, c) = (m & 1 == 1, m & 2 == 2, m & 4 == 4);
        let (s, co) = full_adder(a, b, c);
        assert_eq!(n.eval(&[a, b, c]), vec![s, co], "pattern {m}");
    }
}

const FULL_ADDER_BLIF: &str = "# full adder
.model full_adder
.inputs a b cin
.outputs s cout
.names a b cin s
100 1
010 1
001 1
111 1
.names a b cin cout
11- 1
1-1 1
-11 1
.end
";

/// The full adder as an AIG, written by hand: x = a ^ b as !(a & b) & !(!a & !b),
/// s = x ^ cin the same way, cout = (a & b) | (x & cin).
/// ANDs as (lhs, rhs0, rhs1), inputs a = 2, b = 4, cin = 6.
const FULL_ADDER_ANDS: [(u32, u32, u32); 7] = [
    (8, 4, 2),    // a & b
    (10, 5, 3),   // !a & !b
    (12, 11, 9),  // x = !(a&b) & !(!a&!b)
    (14, 12, 6),  // x & cin
    (16, 13, 7),  // !x & !cin
    (18, 17, 15), // s
    (20, 15, 9),  // !(x&cin) & !(a&b) = !cout
];
const FULL_ADDER_OUTPUTS: [u32; 2] = [18, 21];

fn full_adder_aag() -> String {
    let mut t = String::from("aag 10 3 0 2 7\n2\n4\n6\n18\n21\n");
    for (l, r0, r1) in FULL_ADDER_ANDS {
        t.push_str(&format!("{l} {r0} {r1}\n"));
    }
    t.push_str("i0 a\ni1 b\ni2 cin\no0 s\no1 cout\nc\nhand-made\n");
    t
}

/// An independent binary AIGER writer, from the format's description: the
/// header, output literals in ASCII, then per AND the deltas lhs - rhs0 and
/// rhs0 - rhs1 (rhs0 >= rhs1) in 7-bit groups, low group first, high bit
/// set on all but the last.
fn encode_aig(inputs: u32, outputs: &[u32], ands: &[(u32, u32, u32)], symbols: &str) -> Vec<u8> {
    let m = inputs + ands.len() as u32;
    let mut out = format!("aig {m} {inputs} 0 {} {}\n", outputs.len(), ands.len()).into_bytes();
    for o in outputs {
        out.extend_from_slice(format!("{o}\n").as_bytes());
    }
    for (k, &(lhs, a, b)) in ands.iter().enumerate() {
        assert_eq!(
            lhs,
            2 * (inputs + 1 + k as u32),
            "binary AIGER numbers ANDs in order"
        );
        let (r0, r1) = if a >= b { (a, b) } else { (b, a) };
        for mut x in [lhs - r0, r0 - r1] {
            while x >= 0x80 {
                out.push((x & 0x7f) as u8 | 0x80);
                x >>= 7;
            }
            out.push(x as u8);
        }
    }
    out.extend_from_slice(symbols.as_bytes());
    out
}

#[test]
fn full_adder_in_every_gate_format() {
    let blif = read_blif("fa.blif", FULL_ADDER_BLIF, &limits()).unwrap();
    assert_full_adder(&blif);
    assert_eq!(blif.inputs(), ["a", "b", "cin"]);
    // 4 + 3 cubes and 2 covers, as written.
    assert_eq!(blif.node_count(), 9);

    let aag = read_aiger("fa.aag", full_adder_aag().as_bytes(), &limits()).unwrap();
    assert_full_adder(&aag);
    assert_eq!(aag.outputs()[1].name, "cout");
    assert_eq!(aag.node_count(), 7);

    let bytes = encode_aig(3, &FULL_ADDER_OUTPUTS, &FULL_ADDER_ANDS, "i0 a\no1 cout\n");
    let aig = read_aiger("fa.aig", &bytes, &limits()).unwrap();
    assert_full_adder(&aig);
    assert_eq!(aig.inputs(), ["a", "x1", "x2"]);
    assert_eq!(aig.outputs()[0].name, "y0");
    for (i, &(_, a, b)) in FULL_ADDER_ANDS.iter().enumerate() {
        let (kind, f) = aig.node(i);
        let want = [
            Edge::new((a >> 1) as usize, a & 1 == 1),
            Edge::new((b >> 1) as usize, b & 1 == 1),
        ];
        assert_eq!(kind, NodeKind::And);
        let mut got = f.to_vec();
        got.sort();
        let mut want = want.to_vec();
        want.sort();
        assert_eq!(got, want, "AND {i}");
    }

    for ty in ["f", "fr", "fdr"] {
        // The full truth table, with both planes for the types that read the off-set.
        let mut pla = format!(".i 3\n.o 2\n.ilb a b cin\n.ob s cout\n.type {ty}\n.p 8\n");
        for m in 0..8u32 {
            let (a, b, c) = (m & 1 == 1, m & 2 == 2, m & 4 == 4);
            let (s, co) = full_adder(a, b, c);
            pla.push_str(&format!(
                "{}{}{} {}{}\n",
                a as u8, b as u8, c as u8, s as u8, co as u8
            ));
        }
        pla.push_str(".e\n");
        let n = read_pla("fa.pla", &pla, &limits()).unwrap();
        assert_full_adder(&n);
        // Every pattern is in the on- or the off-set: no don't-care is left.
        let v = n.simulate_words(&[0b1010_1010, 0b1100_1100, 0b1111_0000]);
        for o in n.outputs() {
            assert_eq!(o.dont_care.map_or(0, |d| d.word(&v)) & 0xff, 0, "{ty}");
        }
    }
}

#[test]
fn aiger_binary_against_an_independent_encoder() {
    // A random AIG with operands far back, so deltas take several bytes.
    let mut rng = Rng(42);
    let inputs = 40u32;
    let mut ands = Vec::new();
    for k in 0..3000u32 {
        let lhs = 2 * (inputs + 1 + k);
        let a = rng.below(lhs as usize) as u32;
        let b = rng.below(lhs as usize) as u32;
        ands.push((lhs, a, b));
    }
    let outputs: Vec<u32> = (0..20)
        .map(|_| rng.below(2 * (inputs as usize + 3000) + 2) as u32)
        .collect();
    let bin = read_aiger("r.aig", &encode_aig(inputs, &outputs, &ands, ""), &limits()).unwrap();
    // The same AIG in ASCII, ANDs written in reverse order.
    let mut aag = format!(
        "aag {} {inputs} 0 {} {}\n",
        inputs + 3000,
        outputs.len(),
        ands.len()
    );
    for j in 0..inputs {
        aag.push_str(&format!("{}\n", 2 * (j + 1)));
    }
    for o in &outputs {
        aag.push_str(&format!("{o}\n"));
    }
    for &(l, a, b) in ands.iter().rev() {
        aag.push_str(&format!("{l} {a} {b}\n"));
    }
    let asc = read_aiger("r.aag", aag.as_bytes(), &limits()).unwrap();
    // Both against a direct evaluation of the generated AND list.
    for _ in 0..8 {
        let input = random_words(&mut rng, inputs as usize);
        let mut v = vec![0u64];
        v.extend_from_slice(&input);
        let lw = |v: &[u64], l: u32| {
            let w = v[(l >> 1) as usize];
            if l & 1 == 1 {
                !w
            } else {
                w
            }
        };
        for &(_, a, b) in &ands {
            let w = lw(&v, a) & lw(&v, b);
            v.push(w);
        }
        let want: Vec<u64> = outputs.iter().map(|&o| lw(&v, o)).collect();
        assert_eq!(bin.eval_words(&input), want);
        assert_eq!(asc.eval_words(&input), want);
    }
}

#[test]
fn pla_types_keep_dont_cares_apart() {
    // "x is a prime", x a BCD digit (inputs b0..b3, b0 least significant);
    // codes 10..15 are don't-cares. Written per type; cube lines list b3 first
    // through `.ilb`, so the plane is read in input order b3 b2 b1 b0.
    let prime = |x: u32| matches!(x, 2 | 3 | 5 | 7);
    let minterm = |x: u32| format!("{:04b}", x);
    let on: String = (0..10)
        .filter(|&x| prime(x))
        .map(|x| format!("{} 1\n", minterm(x)))
        .collect();
    let off: String = (0..10)
        .filter(|&x| !prime(x))
        .map(|x| format!("{} 0\n", minterm(x)))
        .collect();
    let dc = "101- -\n11-- -\n";
    let head = ".i 4\n.o 1\n.ilb b3 b2 b1 b0\n.ob prime\n";
    let cases = [
        ("f", format!("{on}{off}{dc}"), false),
        ("fd", format!("{on}{dc}"), true),
        ("fr", format!("{on}{off}"), true),
        ("fdr", format!("{on}{off}{dc}"), true),
    ];
    for (ty, body, has_dc) in cases {
        let n = read_pla("p.pla", &format!("{head}.type {ty}\n{body}.e\n"), &limits()).unwrap();
        let o = &n.outputs()[0];
        assert_eq!(o.dont_care.is_some(), has_dc, "{ty}");
        // Input j of the netlist is b(3-j); pattern x in bit x of each word.
        let words: Vec<u64> = (0..4)
            .map(|j| (0..16).fold(0u64, |w, x| w | (((x >> (3 - j)) & 1) as u64) << x))
            .collect();
        let v = n.simulate_words(&words);
        for x in 0..16u32 {
            let value = o.edge.word(&v) >> x & 1 == 1;
            let dont_care = o.dont_care.is_some_and(|d| d.word(&v) >> x & 1 == 1);
            if x < 10 {
                assert_eq!((value, dont_care), (prime(x), false), "{ty} x={x}");
            } else {
                // `f` has no don't-cares: the codes past 9 are off.
                assert_eq!(dont_care, has_dc, "{ty} x={x}");
                if !has_dc {
                    assert!(!value, "{ty} x={x}");
                }
            }
        }
    }
}

#[test]
fn cnf_counts_match_brute_force() {
    // Exactly one of x1..x4: 4 models (a fact of counting), and a second
    // formula whose models are counted here by brute force from the clauses.
    let mut one_hot: Vec<Vec<i32>> = vec![vec![1, 2, 3, 4]];
    for i in 1..=4 {
        for j in i + 1..=4 {
            one_hot.push(vec![-i, -j]);
        }
    }
    let other: Vec<Vec<i32>> = vec![
        vec![1, -2, 3],
        vec![-1, 4],
        vec![2, 3, -4, 5],
        vec![-3, -5],
        vec![5, 1],
    ];
    for (clauses, vars, known) in [(one_hot, 4usize, Some(4)), (other, 5, None)] {
        let mut text = format!("c test\np cnf {vars} {}\n", clauses.len());
        for c in &clauses {
            for l in c {
                text.push_str(&format!("{l} "));
            }
            text.push_str("0\n");
        }
        let n = read_cnf("f.cnf", &text, &limits()).unwrap();
        assert_eq!(n.input_count(), vars);
        assert_eq!(n.inputs()[0], "x1");
        let mut count = 0;
        let mut brute = 0;
        for m in 0..1u32 << vars {
            let x: Vec<bool> = (0..vars).map(|j| m >> j & 1 == 1).collect();
            count += n.eval(&x)[0] as usize;
            let sat = clauses.iter().all(|c| {
                c.iter()
                    .any(|&l| x[l.unsigned_abs() as usize - 1] == (l > 0))
            });
            brute += sat as usize;
        }
        assert_eq!(count, brute);
        if let Some(k) = known {
            assert_eq!(count, k);
        }
    }
}

// ---------------------------------------------------------- bad input

#[test]
fn errors_name_file_line_and_column() {
    let cases: [(&str, &[u8], &str); 6] = [
        (
            "d.blif",
            b".model m\n.inputs a\n.outputs y\n.names a y\n2 1\n",
            "d.blif:5:1: bad input plane character `2`",
        ),
        (
            "d.blif",
            b".model m\n.inputs a\n.outputs y\n.latch a y\n",
            "d.blif:4:1: `.latch` is sequential",
        ),
        (
            "d.aag",
            b"aag 2 1 0 1 1\n2\n4\n4 2 5\n",
            "d.aag:4:1: combinational cycle",
        ),
        (
            "d.aig",
            b"aig 2 1 0 1 1\n4\n\x05\x00",
            "d.aig:3:1: AND 0 (literal 4): first delta 5",
        ),
        (
            "d.pla",
            b".i 2\n.o 1\n1- 3\n",
            "d.pla:3:4: bad output plane character `3`",
        ),
        (
            "d.cnf",
            b"p cnf 2 1\n1 -3 0\n",
            "d.cnf:2:3: variable 3 is past the 2",
        ),
    ];
    for (path, bytes, want) in cases {
        let e = read_netlist(path, bytes, &limits()).unwrap_err();
        let shown = e.to_string();
        assert!(shown.starts_with(want), "{shown}");
        // The error carries the offending line for the command line to show.
        let ReadError::Malformed(located) = &e else {
            panic!("{e:?}")
        };
        assert!(!located.line_text.is_empty(), "{shown}");
    }
    let e = read_netlist(
        "d.aig",
        b"aig 9 9 0 0 0\n",
        &ReadLimits {
            max_inputs: 4,
            ..limits()
        },
    )
    .unwrap_err();
    assert_eq!(
        e,
        ReadError::Limit {
            what: "inputs",
            value: 9,
            limit: 4
        }
    );
    assert_eq!(e.to_string(), "inputs: 9 is over the limit of 4");
}

#[test]
fn random_bytes_never_panic() {
    // Mutations of valid files through every reader: errors, never panics.
    let seeds: [(&str, Vec<u8>); 5] = [
        ("m.blif", FULL_ADDER_BLIF.as_bytes().to_vec()),
        ("m.aag", full_adder_aag().into_bytes()),
        (
            "m.aig",
            encode_aig(3, &FULL_ADDER_OUTPUTS, &FULL_ADDER_ANDS, "i0 a\n"),
        ),
        (
            "m.pla",
            b".i 2\n.o 2\n.type fr\n1- 10\n01 ~-\n.e\n".to_vec(),
        ),
        ("m.cnf", b"p cnf 3 2\n1 -2 0\n3 0\n".to_vec()),
    ];
    let mut rng = Rng(9);
    let small = ReadLimits {
        max_nodes: 1000,
        max_fanins: 4000,
        max_inputs: 100,
    };
    for (path, seed) in &seeds {
        for _ in 0..2000 {
            let mut b = seed.clone();
            for _ in 0..1 + rng.below(4) {
                let at = rng.below(b.len());
                match rng.below(3) {
                    0 => b[at] = rng.next() as u8,
                    1 => {
                        b.remove(at);
                    }
                    _ => b.insert(at, b"01-\n .#\\=9"[rng.below(10)]),
                }
                if b.is_empty() {
                    break;
                }
            }
            if let Ok(n) = read_netlist(path, &b, &small) {
                let input = vec![0x0f0f_u64; n.input_count()];
                let _ = n.eval_words(&input);
                check_network(&n, 1, 3);
            }
        }
    }
}

// ---------------------------------------------------------- long inputs

const CHAIN: usize = 200_000;

#[test]
fn long_chains_in_every_format() {
    // BLIF: 200,000 inverters written output first, so sorting runs the
    // whole depth. An even count of inverters: the output is the input.
    let mut t = String::from(".model chain\n.inputs n0\n.outputs y\n.names n200000 y\n1 1\n");
    for k in (1..=CHAIN).rev() {
        t.push_str(&format!(".names n{} n{k}\n0 1\n", k - 1));
    }
    let n = read_blif("chain.blif", &t, &limits()).unwrap();
    assert_eq!(n.node_count(), 2 * CHAIN + 2);
    assert_eq!(n.eval(&[true]), vec![true]);
    assert_eq!(n.eval(&[false]), vec![false]);
    check_network(&n, 1, 1);

    // AIGER ASCII, reverse order: v_k = !v_{k-1} & b, v_0 = a; the output is
    // v_CHAIN, which for an even chain is !(!a & b) & b = (a | !b) & b = a & b.
    let mut t = format!(
        "aag {} 2 0 1 {CHAIN}\n2\n4\n{}\n",
        CHAIN + 2,
        2 * (CHAIN + 2)
    );
    for k in (1..=CHAIN).rev() {
        let prev = if k == 1 { 2 } else { 2 * (k + 1) };
        t.push_str(&format!("{} {} 4\n", 2 * (k + 2), prev + 1));
    }
    let n = read_aiger("chain.aag", t.as_bytes(), &limits()).unwrap();
    assert_eq!(n.node_count(), CHAIN);
    for (a, b) in [(false, false), (false, true), (true, false), (true, true)] {
        assert_eq!(n.eval(&[a, b]), vec![a && b]);
    }
    check_network(&n, 1, 2);

    // Binary AIGER of the same chain (ANDs already in order there).
    let ands: Vec<(u32, u32, u32)> = (1..=CHAIN as u32)
        .map(|k| (2 * (k + 2), if k == 1 { 2 } else { 2 * (k + 1) } + 1, 4))
        .collect();
    let bytes = encode_aig(2, &[2 * (CHAIN as u32 + 2)], &ands, "");
    let b = read_aiger("chain.aig", &bytes, &limits()).unwrap();
    assert_eq!(b.node_count(), CHAIN);
    for (a, bb) in [(false, true), (true, true), (true, false)] {
        assert_eq!(b.eval(&[a, bb]), vec![a && bb]);
    }

    // PLA: 200,000 minterms of 18 inputs: the output is x < 200,000, with
    // the plane written most significant input first.
    let mut t = String::from(".i 18\n.o 1\n.type f\n");
    for x in 0..CHAIN {
        t.push_str(&format!("{:018b} 1\n", x));
    }
    let n = read_pla("long.pla", &t, &limits()).unwrap();
    assert_eq!(n.node_count(), CHAIN + 1);
    for x in [0usize, 1, 199_999, 200_000, 262_143, 131_072] {
        let bits: Vec<bool> = (0..18).map(|j| x >> (17 - j) & 1 == 1).collect();
        assert_eq!(n.eval(&bits), vec![x < CHAIN], "x = {x}");
    }

    // CNF: x_k -> x_{k+1} for 200,000 k: satisfied exactly by 0..01..1.
    let vars = CHAIN + 1;
    let mut t = format!("p cnf {vars} {CHAIN}\n");
    for k in 1..=CHAIN {
        t.push_str(&format!("-{k} {} 0\n", k + 1));
    }
    let n = read_cnf("long.cnf", &t, &limits()).unwrap();
    assert_eq!(n.node_count(), CHAIN + 1);
    let mut x = vec![false; vars];
    assert_eq!(n.eval(&x), vec![true]);
    x[vars - 1] = true;
    x[vars - 2] = true;
    assert_eq!(n.eval(&x), vec![true]);
    x[0] = true;
    assert_eq!(n.eval(&x), vec![false]);
    check_network(&n, 1, 4);
}

#[test]
fn deep_hierarchy_flattens_without_recursion() {
    // Model m_k instantiates m_{k+1} once; the last one is an inverter: 2,000
    // levels of hierarchy around one cover.
    let depth = 2000;
    let mut t = String::new();
    for k in 0..depth {
        t.push_str(&format!(
            ".model m{k}\n.inputs i\n.outputs o\n.subckt m{} i=i o=o\n.end\n",
            k + 1
        ));
    }
    t.push_str(&format!(
        ".model m{depth}\n.inputs i\n.outputs o\n.names i o\n0 1\n.end\n"
    ));
    let n = read_blif("deep.blif", &t, &limits()).unwrap();
    assert_eq!(n.eval(&[true]), vec![false]);
    assert_eq!(n.node_count(), 2);
}

#[test]
fn random_netlists_through_to_network() {
    let mut rng = Rng(77);
    for _ in 0..50 {
        let inputs = 1 + rng.below(12);
        let mut n = Netlist::new((0..inputs).map(|j| format!("i{j}")).collect());
        for _ in 0..rng.below(60) {
            let kind = [NodeKind::And, NodeKind::Or, NodeKind::Xor][rng.below(3)];
            let fanins: Vec<Edge> = (0..rng.below(7))
                .map(|_| Edge::new(rng.below(n.signal_count()), rng.below(2) == 1))
                .collect();
            n.add_node(kind, &fanins);
        }
        for k in 0..1 + rng.below(4) {
            let e = Edge::new(rng.below(n.signal_count()), rng.below(2) == 1);
            let dc = (rng.below(2) == 1).then(|| Edge::new(rng.below(n.signal_count()), false));
            n.add_output(format!("o{k}"), e, dc);
        }
        check_network(&n, 4, rng.next());
    }
}
