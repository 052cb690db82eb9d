//! Fault-tolerant cost at the published counts: `--uncompute measure` gives
//! Gidney's adder, his controlled adder at 8n + O(1) T, the comparator on
//! the same carry chain at n, unary-iteration lookup, MCT lowering at k - 1
//! and Bennett at one Toffoli-equivalent per AND node, each proven by the
//! verifier; modular addition of registers has no Toffoli left.

mod common;

use oraculum::circuit::{Circuit, Kind, LineInfo, Role};
use oraculum::logic::Node;
use oraculum::pipeline::build_one;
use oraculum::synth::{network_of, unary_lookup};
use oraculum::{
    parse_spec, BuildOptions, Line, Method, Route, Spec, SpecBody, Uncompute, Verdict,
    VerifyOptions,
};

fn measure(verify: Option<Route>) -> BuildOptions {
    BuildOptions {
        method: None,
        verify: verify.map(|route| VerifyOptions {
            route,
            ..VerifyOptions::default()
        }),
        uncompute: Uncompute::Measure,
        ..BuildOptions::default()
    }
}

fn proven(v: &oraculum::Verification) -> bool {
    matches!(v, oraculum::Verification::Ran(Verdict::Proven { .. }))
}

fn arith(op: &str, width: usize, extra: &str) -> Spec {
    parse_spec("t.toml", &common::arith_toml(op, width, extra)).unwrap()
}

// Gidney, "Halving the cost of quantum addition", Quantum 2, 74 (2018),
// abstract and Fig. 4: an n-bit adder mod 2^n with n - 1 Toffoli-equivalents
// (4n + O(1) T), n with a carry-out. Counts for n = 1..64; proofs exhaustive
// up to n = 8 and by SAT at 16, 32 and 64.
#[test]
fn gidney_adder_costs_n_minus_1_and_n_with_carry_out() {
    for n in 1..=64 {
        let prove = n <= 8 || [16, 32, 64].contains(&n);
        let route = if n <= 8 {
            Route::Exhaustive
        } else {
            Route::Sat
        };
        for carry in [false, true] {
            let s = arith("add", n, if carry { "carry_out = true\n" } else { "" });
            let o = build_one(
                &s,
                Method::Structural,
                &measure(prove.then_some(route)),
                &(),
            )
            .unwrap();
            let want = if carry { n } else { n - 1 };
            assert_eq!(o.cost.toffoli_equivalent, want, "n = {n}, carry {carry}");
            assert_eq!(o.cost.toffoli, 0, "n = {n}");
            assert_eq!(o.cost.measured, want, "n = {n}");
            // 4n + O(1) T (Gidney 2018): here exactly 4 per AND.
            assert_eq!(o.cost.t_count, 4 * want, "n = {n}");
            assert_eq!(o.cost.mode, Uncompute::Measure);
            if prove {
                assert!(proven(&o.verification), "n = {n}: {:?}", o.verification);
            }
        }
    }
    // Subtraction is the same adder between NOTs: n - 1 as well.
    for n in [1, 5, 8] {
        let o = build_one(
            &arith("subtract", n, ""),
            Method::Structural,
            &measure(Some(Route::Auto)),
            &(),
        )
        .unwrap();
        assert_eq!(o.cost.toffoli_equivalent, n - 1);
        assert!(proven(&o.verification));
    }
}

// The comparator y ^= (a < b) in measure mode is the carry-out of !a + b by
// the carry chain of Gidney's adder (Gidney, Quantum 2, 74, 2018, Fig. 4):
// the adder with a carry-out costs n Toffoli-equivalents (4n T), and so does
// the comparator, every AND uncomputed by measurement; a control on the op
// is one AND more. The in-place MAJ comparator of toffoli mode (Cuccaro et
// al. 2004) costs 2n - 1 Toffolis. Counts for n = 1..64 and every order
// relation; proofs exhaustive up to n = 8, by SAT at 16, 32 and 64.
#[test]
fn comparator_costs_n_in_measure_mode() {
    for n in 1..=64 {
        let prove = n <= 8 || [16, 32, 64].contains(&n);
        let route = if n <= 8 {
            Route::Exhaustive
        } else {
            Route::Sat
        };
        for rel in ["<", "<=", ">", ">="] {
            for controlled in [false, true] {
                let extra = format!(
                    "relation = \"{rel}\"\n{}",
                    if controlled {
                        "controlled = true\n"
                    } else {
                        ""
                    }
                );
                let s = arith("compare", n, &extra);
                let o = build_one(
                    &s,
                    Method::Structural,
                    &measure(prove.then_some(route)),
                    &(),
                )
                .unwrap();
                let want = n + controlled as usize;
                let what = format!("n = {n}, {rel}, controlled {controlled}");
                assert_eq!(o.cost.toffoli_equivalent, want, "{what}");
                assert_eq!((o.cost.toffoli, o.cost.measured), (0, want), "{what}");
                assert_eq!(o.cost.t_count, 4 * want, "{what}");
                if prove {
                    assert!(proven(&o.verification), "{what}: {:?}", o.verification);
                }
                if rel == "<" && !controlled && n >= 2 {
                    let mut plain = measure(None);
                    plain.uncompute = Uncompute::Toffoli;
                    let t = build_one(&s, Method::Structural, &plain, &()).unwrap();
                    assert_eq!(t.cost.toffoli, 2 * n - 1, "{what}");
                }
            }
        }
    }
}

// Gidney, "Halving the cost of quantum addition", Quantum 2, 74 (2018),
// abstract: an n-bit controlled adder of T-count 8n + O(1). Ours: the
// carries of a + b as in the plain adder (n - 1 temporary ANDs) and one
// temporary AND of the control with each sum bit (n): 2n - 1
// Toffoli-equivalents, 8n - 4 T, no Toffoli; a carry-out adds two ANDs; the
// controlled subtraction is the same adder between NOTs. Counts for n =
// 1..64, proofs exhaustive up to n = 6 and by SAT at 16, 32 and 64.
#[test]
fn controlled_adder_costs_8n_t() {
    for n in 1..=64 {
        let prove = n <= 6 || [16, 32, 64].contains(&n);
        let route = if n <= 6 {
            Route::Exhaustive
        } else {
            Route::Sat
        };
        for (op, extra, want) in [
            ("add", "", 2 * n - 1),
            ("add", "carry_out = true\n", 2 * n + 1),
            ("subtract", "", 2 * n - 1),
        ] {
            let s = arith(op, n, &format!("controlled = true\n{extra}"));
            let o = build_one(
                &s,
                Method::Structural,
                &measure(prove.then_some(route)),
                &(),
            )
            .unwrap();
            let what = format!("{op} n = {n} {extra}");
            assert_eq!(o.cost.toffoli_equivalent, want, "{what}");
            assert_eq!((o.cost.toffoli, o.cost.measured), (0, want), "{what}");
            assert_eq!(o.cost.t_count, 4 * want, "{what}");
            // 8n + O(1) (Gidney 2018): within 8n + 4 here.
            assert!(o.cost.t_count <= 8 * n + 4, "{what}");
            if prove {
                assert!(proven(&o.verification), "{what}: {:?}", o.verification);
            }
        }
    }
}

// Modular addition and subtraction of registers (b = (a +- b) mod N) in
// measure mode: its register adder and comparator are the measured chains,
// its constant adders are measured by the pipeline: measured uncomputes,
// fewer Toffolis than toffoli mode (none at all but for a few the pipeline's
// rewrite cannot prove, in subtraction at n = 16), and fewer
// Toffoli-equivalents than toffoli mode has Toffolis (no published count for
// this construction; the figures are in BENCHMARKS.md).
#[test]
fn modular_register_addition_is_measured() {
    for (n, modulus) in [
        (2, 3),
        (3, 5),
        (4, 13),
        (5, 29),
        (6, 61),
        (8, 251),
        (16, 65521),
    ] {
        for op in ["add", "subtract"] {
            for controlled in [false, true] {
                let extra = format!(
                    "modulus = {modulus}\n{}",
                    if controlled {
                        "controlled = true\n"
                    } else {
                        ""
                    }
                );
                let s = arith(op, n, &extra);
                let route = if n <= 6 {
                    Route::Exhaustive
                } else {
                    Route::Auto
                };
                let o = build_one(&s, Method::Structural, &measure(Some(route)), &()).unwrap();
                let what = format!("{op} mod {modulus}, controlled {controlled}");
                assert!(proven(&o.verification), "{what}: {:?}", o.verification);
                let mut plain = measure(None);
                plain.uncompute = Uncompute::Toffoli;
                let t = build_one(&s, Method::Structural, &plain, &()).unwrap();
                assert!(
                    o.cost.measured > 0 && o.cost.toffoli < t.cost.toffoli,
                    "{what}: {:?}",
                    o.cost
                );
                assert!(
                    o.cost.toffoli_equivalent < t.cost.toffoli,
                    "{what}: {} >= {}",
                    o.cost.toffoli_equivalent,
                    t.cost.toffoli
                );
            }
        }
    }
}

// The schoolbook multiplier p ^= a * b in measure mode: each row after the
// first is Gidney's controlled adder with a carry-out (2n + 1 temporary
// ANDs), built and undone; proven, with measured uncomputes and fewer
// Toffoli-equivalents than toffoli mode has Toffolis (no published count for
// this form; figures in BENCHMARKS.md).
#[test]
fn register_multiplier_uses_the_controlled_adder() {
    for n in 2..=5 {
        for controlled in [false, true] {
            let s = arith(
                "multiply",
                n,
                if controlled {
                    "controlled = true\n"
                } else {
                    ""
                },
            );
            let o = build_one(&s, Method::Structural, &measure(Some(Route::Auto)), &()).unwrap();
            let what = format!("multiply {n}, controlled {controlled}");
            assert!(proven(&o.verification), "{what}: {:?}", o.verification);
            let mut plain = measure(None);
            plain.uncompute = Uncompute::Toffoli;
            let t = build_one(&s, Method::Structural, &plain, &()).unwrap();
            // Every row but the first: 2n + 1 ANDs computed, as many measured.
            assert!(
                o.cost.measured >= 2 * (n - 1) * (2 * n + 1),
                "{what}: {:?}",
                o.cost
            );
            assert!(
                o.cost.toffoli_equivalent < t.cost.toffoli && o.cost.t_count < t.cost.t_count,
                "{what}: {:?} against {:?}",
                o.cost,
                t.cost
            );
        }
    }
}

fn lines(regs: &[(&str, usize, Role)]) -> Vec<LineInfo> {
    regs.iter()
        .flat_map(|&(r, n, role)| {
            (0..n).map(move |i| LineInfo {
                register: r.into(),
                index: i as u32,
                role,
                label: String::new(),
            })
        })
        .collect()
}

/// Runs `c` on one basis state, checking every measured uncompute's
/// requirement (its target holds the AND of its control literals) and every
/// temporary AND's (its target is 0), as the verifier does; our own replay.
fn run_checked(c: &Circuit, mut s: u64) -> u64 {
    for (k, g) in c.gates().iter().enumerate() {
        let t = 1u64 << g.target().0;
        let and = g
            .controls()
            .iter()
            .all(|x| ((s >> x.line.0) & 1 == 1) == x.positive);
        match g.kind() {
            Kind::Measured => {
                assert_eq!(
                    s & t != 0,
                    and,
                    "gate {k}: the ancilla does not hold the AND"
                );
                s &= !t;
            }
            Kind::And => {
                assert_eq!(s & t, 0, "gate {k}: the ancilla is not clean");
                if and {
                    s |= t;
                }
            }
            Kind::Flip => s = g.apply(s),
        }
    }
    s
}

// Babbush et al., "Encoding electronic spectra in quantum circuits with
// linear T complexity", PRX 8, 041015 (2018), Sec. III.A: unary iteration
// over L words costs L - 1 Toffolis (4L - 4 T) with a control; here L - 2
// without one (the root's two children are the top address bit's literals),
// and each uncompute a Toffoli in toffoli form, at most 2(L - 1). Every word
// nonzero, so no subtree is skipped. Each circuit is run on every address
// below L (the promise of the construction) with y at 0 and at a pattern.
#[test]
fn unary_iteration_lookup_costs_l_minus_1() {
    for l in 2usize..=256 {
        let w = usize::BITS as usize - (l - 1).leading_zeros() as usize;
        let dw = 9;
        let data: Vec<u64> = (0..l as u64).map(|x| (x * 37 + 1) % 511 + 1).collect();
        for ctrl in [false, true] {
            for m in [true, false] {
                let c0 = ctrl as usize;
                let mut c = Circuit::new(lines(&[
                    ("ctrl", c0, Role::Input),
                    ("a", w, Role::Input),
                    ("y", dw, Role::Output),
                ]));
                let cl = ctrl.then_some(Line(0));
                let a: Vec<Line> = (c0..c0 + w).map(|i| Line(i as u32)).collect();
                let y: Vec<Line> = (c0 + w..c0 + w + dw).map(|i| Line(i as u32)).collect();
                unary_lookup(&mut c, cl, &a, &y, &data, m);
                let ands = c.gates().iter().filter(|g| g.is_temporary_and()).count();
                let toffolis = c
                    .gates()
                    .iter()
                    .filter(|g| g.is_flip() && g.controls().len() == 2)
                    .count();
                let want = if ctrl { l - 1 } else { l - 2 };
                if m {
                    assert_eq!((ands, toffolis), (want, 0), "L = {l}, ctrl {ctrl}");
                    assert_eq!(c.measured_count(), want);
                } else {
                    assert_eq!(toffolis, 2 * want, "L = {l}, ctrl {ctrl}");
                    assert!(toffolis <= 2 * (l - 1));
                }
                assert!(c.width() <= c0 + 2 * w + dw);
                for x in 0..l as u64 {
                    for on in [false, true] {
                        if !ctrl && !on {
                            continue;
                        }
                        for y0 in [0u64, 0b101101011] {
                            let s = (on as u64 & ctrl as u64) | (x << c0) | (y0 << (c0 + w));
                            let fire = !ctrl || on;
                            let want_y = y0 ^ if fire { data[x as usize] } else { 0 };
                            let want =
                                (s & !(((1u64 << dw) - 1) << (c0 + w))) | (want_y << (c0 + w));
                            assert_eq!(run_checked(&c, s), want, "L = {l} x = {x}");
                        }
                    }
                }
            }
        }
    }
}

// Lookups from specs (2^w words) proven by the verifier in both modes, with
// and without a control: L - 1 (L - 2) in measure mode, 2(L - 1) at most in
// toffoli mode.
#[test]
fn lookup_specs_are_proven_in_both_modes() {
    for w in 1..=8usize {
        let l = 1usize << w;
        let data: Vec<String> = (0..l)
            .map(|x| ((x * 53 + 7) % 255 + 1).to_string())
            .collect();
        for ctrl in [false, true] {
            let extra = format!(
                "data_width = 8\ndata = [{}]\ncontrolled = {ctrl}\n",
                data.join(", ")
            );
            let s = arith("lookup", w, &extra);
            for mode in [Uncompute::Measure, Uncompute::Toffoli] {
                let mut opts = measure(Some(Route::Auto));
                opts.uncompute = mode;
                let o = build_one(&s, Method::Structural, &opts, &()).unwrap();
                assert!(proven(&o.verification), "w = {w}: {:?}", o.verification);
                let want = if ctrl { l - 1 } else { l - 2 };
                match mode {
                    Uncompute::Measure => assert_eq!(o.cost.toffoli_equivalent, want, "w = {w}"),
                    Uncompute::Toffoli => assert!(o.cost.toffoli <= 2 * (l - 1), "w = {w}"),
                }
            }
        }
    }
}

// A k-control NOT lowered on clean ancillae: the chain of k - 2 ANDs, one
// Toffoli onto the target, the chain uncomputed by measurement: k - 1
// Toffoli-equivalents (Gidney 2018, Sec. 3), against 2k - 3 Toffolis
// (Barenco et al., PRA 52, 3457, 1995).
#[test]
fn mct_lowering_costs_k_minus_1_in_measure_mode() {
    for k in 3..=10usize {
        let names = common::input_names(k);
        let quoted: Vec<String> = names.iter().map(|s| format!("\"{s}\"")).collect();
        let text = format!(
            "kind = \"function\"\ninputs = [{}]\noutputs = [\"y\"]\n[expr]\ny = \"{}\"\n",
            quoted.join(", "),
            names.join(" & ")
        );
        let s = parse_spec("and.toml", &text).unwrap();
        for (mode, want) in [(Uncompute::Measure, k - 1), (Uncompute::Toffoli, 2 * k - 3)] {
            let mut opts = measure(Some(Route::Auto));
            opts.uncompute = mode;
            let o = build_one(&s, Method::Esop, &opts, &()).unwrap();
            assert_eq!(o.cost.toffoli_equivalent, want, "k = {k} {mode:?}");
            assert!(proven(&o.verification));
        }
    }
}

/// AND nodes reachable from the outputs of the spec's network, counted here
/// by a walk of our own.
fn and_nodes(s: &Spec) -> Option<usize> {
    let SpecBody::Function(f) = &s.body else {
        return None;
    };
    let net = network_of(f).ok()?;
    let nodes = net.nodes();
    let mut seen = vec![false; nodes.len()];
    let mut stack: Vec<usize> = net.outputs.iter().map(|l| l.node).collect();
    let mut ands = 0;
    while let Some(v) = stack.pop() {
        if std::mem::replace(&mut seen[v], true) {
            continue;
        }
        match nodes[v] {
            Node::And(a, b) => {
                ands += 1;
                stack.extend([a.node, b.node]);
            }
            Node::Xor(a, b) => stack.extend([a.node, b.node]),
            _ => {}
        }
    }
    Some(ands)
}

// Meuli, Soeken, Campbell, Roetteler, De Micheli, "The role of
// multiplicative complexity in compiling low T-count oracle circuits",
// ICCAD 2019: with measured uncomputes a XOR-AND network costs one AND (4 T)
// per AND node when nothing is recomputed. Every demo function spec.
#[test]
fn bennett_costs_one_toffoli_equivalent_per_and_node() {
    common::tables();
    let mut checked = 0;
    for entry in std::fs::read_dir(common::repo().join("specs")).unwrap() {
        let path = entry.unwrap().path();
        let name = path.display().to_string();
        let s = parse_spec(&name, &std::fs::read_to_string(&path).unwrap()).unwrap();
        let Some(ands) = and_nodes(&s) else { continue };
        let o = build_one(&s, Method::Bennett, &measure(Some(Route::Auto)), &()).unwrap();
        assert_eq!(o.cost.toffoli_equivalent, ands, "{name}");
        assert!(o.cost.t_count <= 4 * ands + 3 * o.cost.toffoli, "{name}");
        assert!(proven(&o.verification), "{name}: {:?}", o.verification);
        checked += 1;
    }
    assert!(checked >= 5, "{checked} function specs");
}

// Every demo spec (auto) and every arithmetic op at a small width, built in
// measure mode, is proven by the verifier; measure mode never costs more
// Toffoli-equivalents than toffoli mode has Toffolis.
#[test]
fn every_demo_spec_and_op_is_proven_in_measure_mode() {
    common::tables();
    let mut specs: Vec<(String, Spec)> = Vec::new();
    for entry in std::fs::read_dir(common::repo().join("specs")).unwrap() {
        let path = entry.unwrap().path();
        let name = path.display().to_string();
        specs.push((
            name.clone(),
            parse_spec(&name, &std::fs::read_to_string(&path).unwrap()).unwrap(),
        ));
    }
    for (op, extra) in [
        ("add", ""),
        ("add", "controlled = true\n"),
        ("add", "carry_out = true\n"),
        ("subtract", ""),
        ("add", "constant = 5\n"),
        ("compare", "relation = \"<\"\n"),
        ("compare", "relation = \"<\"\nconstant = 9\n"),
        ("compare", "relation = \"==\"\nconstant = 6\n"),
        ("add", "constant = 1\nmodulus = 11\n"),
        ("add", "modulus = 13\n"),
        ("subtract", "modulus = 13\n"),
        ("add", "modulus = 13\ncontrolled = true\n"),
        ("subtract", "controlled = true\n"),
        ("compare", "relation = \">=\"\ncontrolled = true\n"),
        ("compare", "relation = \"==\"\n"),
        ("compare", "relation = \"!=\"\n"),
    ] {
        specs.push((format!("{op} {extra}"), arith(op, 4, extra)));
    }
    for (name, s) in &specs {
        let o = oraculum::build(s, &measure(Some(Route::Auto))).unwrap();
        assert!(proven(&o.verification), "{name}: {:?}", o.verification);
        let mut plain = measure(None);
        plain.uncompute = Uncompute::Toffoli;
        let t = oraculum::build(s, &plain).unwrap();
        assert!(
            o.cost.toffoli_equivalent <= t.cost.toffoli,
            "{name}: {} > {}",
            o.cost.toffoli_equivalent,
            t.cost.toffoli
        );
    }
}
