//! Arithmetic generators: exhaustive verification at small widths, outside facts,
//! Toffoli counts against the published formulas, and wide circuits simulated.

mod common;

use common::*;
use oraculum::{build, parse_spec, BuildOptions, Outcome, Verdict, Verification, VerifyOptions};

fn build_spec(text: &str, verify: bool) -> Outcome {
    common::tables();
    let spec = parse_spec("arith.toml", text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    build(
        &spec,
        &BuildOptions {
            verify: verify.then(VerifyOptions::default),
            ..Default::default()
        },
    )
    .unwrap_or_else(|e| panic!("{e}\n{text}"))
}

/// The structural generator's cost (auto may pick a table method at small widths).
fn structural_cost(text: &str) -> oraculum::Cost {
    common::tables();
    let spec = parse_spec("arith.toml", text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    build(
        &spec,
        &BuildOptions {
            method: Some(oraculum::Method::Structural),
            verify: None,
            ..Default::default()
        },
    )
    .unwrap_or_else(|e| panic!("{e}\n{text}"))
    .cost
}

fn assert_proven(text: &str) -> Outcome {
    let out = build_spec(text, true);
    match &out.verification {
        Verification::Ran(Verdict::Proven { .. }) => {}
        other => panic!("not proven: {other:?}\n{text}"),
    }
    assert!(out.lowered.gates().iter().all(|g| g.controls().len() <= 2));
    out
}

const CONTROLS: [&str; 2] = ["controlled = false", "controlled = true"];
const LT: &str = "relation = \"<\"";
const EQ: &str = "relation = \"==\"";

#[test]
fn add_sub_compare_every_width_1_to_8_exhaustively() {
    for w in 1..=8 {
        for ctl in CONTROLS {
            assert_proven(&arith_toml("add", w, ctl));
            assert_proven(&arith_toml("add", w, &format!("{ctl}\ncarry_out = true")));
            assert_proven(&arith_toml("subtract", w, ctl));
            assert_proven(&arith_toml("compare", w, &format!("{ctl}\n{LT}")));
        }
    }
}

#[test]
fn constant_ops_every_width_1_to_8_exhaustively() {
    for w in 1..=8usize {
        let top = (1u64 << w) - 1;
        // Every constant up to 5 bits; the edges and a spread above that.
        let constants: Vec<u64> = if w <= 5 {
            (0..=top).collect()
        } else {
            vec![
                0,
                1,
                2,
                3,
                top / 3,
                top / 2,
                top / 2 + 1,
                top - 1,
                top,
                0b1010_1010 & top,
            ]
        };
        for &k in &constants {
            for ctl in CONTROLS {
                let extra = format!("{ctl}\nconstant = {k}");
                assert_proven(&arith_toml("add", w, &extra));
                assert_proven(&arith_toml("compare", w, &format!("{extra}\n{LT}")));
                assert_proven(&arith_toml("compare", w, &format!("{extra}\n{EQ}")));
            }
        }
    }
}

#[test]
fn modular_ops_for_moduli_2_to_40() {
    for n in 2..=40u64 {
        for ctl in CONTROLS {
            let extra = format!("{ctl}\nmodulus = {n}");
            let text = format!("kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\n{extra}\n");
            assert_proven(&text);
            let out = assert_proven(&format!("kind = \"arithmetic\"\nop = \"add\"\n{extra}\n"));
            // add_mod promises nothing for inputs at or above the modulus.
            let w = 64 - (n - 1).leading_zeros() as u64;
            let c = if ctl.ends_with("true") { 2 } else { 1 };
            if let Verification::Ran(Verdict::Proven {
                states,
                outside_domain,
                ..
            }) = out.verification
            {
                assert_eq!(states, c * n * n, "modulus {n}");
                assert_eq!(states + outside_domain, c << (2 * w));
            }
        }
        // A register wider than the modulus needs: values past it stay put.
        let text = format!(
            "kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\nmodulus = {n}\nwidth = 7\n"
        );
        assert_proven(&text);
    }
}

#[test]
fn lookup_tables_exhaustively() {
    let mut seed = 7u64;
    for w in 1..=8 {
        for ctl in CONTROLS {
            let data: Vec<String> = (0..1u64 << w)
                .map(|_| {
                    seed = seed
                        .wrapping_mul(6364136223846793005)
                        .wrapping_add(1442695040888963407);
                    ((seed >> 33) % 8).to_string()
                })
                .collect();
            let extra = format!("{ctl}\ndata_width = 3\ndata = [{}]", data.join(", "));
            assert_proven(&arith_toml("lookup", w, &extra));
        }
    }
}

// Worked values (common practice): 34 + 8 = 42; an 8-bit adder wraps
// 200 + 100 to 44; 8-bit less_than on (3, 200) is 1 and on (200, 3) is 0;
// 21 mod 7 = 0.
#[test]
fn worked_values() {
    let add = build_spec(&arith_toml("add", 8, ""), false).lowered;
    assert_eq!(run_registers(&add, &[("a", 34), ("b", 8)])["b"], 42);
    assert_eq!(run_registers(&add, &[("a", 200), ("b", 100)])["b"], 44);
    let addc = build_spec(&arith_toml("add", 8, "carry_out = true"), false).lowered;
    let r = run_registers(&addc, &[("a", 200), ("b", 100)]);
    assert_eq!((r["b"], r["cout"], r["anc"]), (44, 1, 0));
    let lt = build_spec(&arith_toml("compare", 8, LT), false).lowered;
    assert_eq!(run_registers(&lt, &[("a", 3), ("b", 200)])["y"], 1);
    assert_eq!(run_registers(&lt, &[("a", 200), ("b", 3)])["y"], 0);
    let m = build_spec("kind = \"arithmetic\"\nop = \"add\"\nmodulus = 7\n", false).lowered;
    assert_eq!(run_registers(&m, &[("a", 3), ("b", 4)])["b"], 0); // 7 mod 7
    let inc = build_spec(
        "kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\nmodulus = 7\n",
        false,
    )
    .lowered;
    // 20 -> 21 is 0 mod 7: 6 wraps to 0.
    assert_eq!(run_registers(&inc, &[("a", 6)])["a"], 0);
    assert_eq!(run_registers(&inc, &[("a", 7)])["a"], 7);
}

/// Toffoli counts against checks.md: Cuccaro et al. 2004 (add mod 2^n: at most
/// 2n - 1 in the optimised form, here 2n - 2; with carry-out at most 2n);
/// the comparator as the carry-out of !a + b (at most 2n); equal_const from one
/// n-control gate lowered with n - 2 clean ancillae, 2n - 3 (common practice).
#[test]
fn toffoli_counts_meet_the_published_formulas() {
    for n in [1usize, 2, 3, 4, 5, 8, 16, 32, 64, 128, 1024] {
        let t = |text: String| structural_cost(&text);
        let add = t(arith_toml("add", n, ""));
        assert_eq!(add.toffoli, 2 * n - 2, "add n={n}");
        assert!(add.qubits <= 2 * n + 1, "one ancilla at most, n={n}");
        let addc = t(arith_toml("add", n, "carry_out = true"));
        assert_eq!(addc.toffoli, 2 * n - 1, "add with carry n={n}");
        assert!(addc.toffoli <= 2 * n);
        let sub = t(arith_toml("subtract", n, ""));
        assert_eq!(sub.toffoli, 2 * n - 2, "sub n={n}");
        let lt = t(arith_toml("compare", n, LT));
        assert_eq!(lt.toffoli, 2 * n - 1, "less_than n={n}");
        if n >= 3 {
            let eq = t(arith_toml("compare", n, &format!("constant = 5\n{EQ}")));
            assert_eq!(eq.toffoli, 2 * n - 3, "equal_const n={n}");
            assert_eq!(eq.qubits, n + 1 + n - 2);
        }
        // A constant folds into the carries: never more than two Toffolis a bit.
        let ltc = t(arith_toml("compare", n, &format!("constant = 1\n{LT}")));
        assert!(ltc.toffoli < 2 * n, "less_than_const n={n}");
    }
}

/// Wide circuits cannot be checked exhaustively; simulate chosen values with a
/// test-side simulator instead (this is a check, not a proof).
#[test]
fn wide_adders_and_comparators_on_sample_values() {
    let add = build_spec(&arith_toml("add", 64, "carry_out = true"), false).lowered;
    let cases = [
        (0u128, 0u128),
        (u64::MAX as u128, 1),
        (0x0123_4567_89ab_cdef, 0xfedc_ba98_7654_3210),
        (1 << 63, 1 << 63),
    ];
    for (a, b) in cases {
        let r = run_registers(&add, &[("a", a), ("b", b)]);
        assert_eq!(r["b"], (a + b) & (u64::MAX as u128));
        assert_eq!(r["cout"], (a + b) >> 64);
        assert_eq!(r["a"], a);
        assert_eq!(r["anc"], 0);
    }
    let lt = build_spec(
        &arith_toml("compare", 100, &format!("controlled = true\n{LT}")),
        false,
    )
    .lowered;
    for (a, b) in [(3u128, 200u128), (200, 3), (1 << 99, (1 << 99) + 1), (7, 7)] {
        for ctrl in [0, 1] {
            let r = run_registers(&lt, &[("ctrl", ctrl), ("a", a), ("b", b)]);
            assert_eq!(r["y"], ctrl * (a < b) as u128);
            assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
        }
    }
    let inc = build_spec(
        "kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\nmodulus = 1000003\n",
        false,
    )
    .lowered;
    for a in [0u128, 5, 1_000_002, 1_000_003, (1 << 20) - 1] {
        let r = run_registers(&inc, &[("a", a)]);
        let want = if a < 1_000_003 {
            (a + 1) % 1_000_003
        } else {
            a
        };
        assert_eq!(r["a"], want, "a = {a}");
    }
}

/// The exported OpenQASM of small arithmetic circuits, run by the `qasmsim`
/// crate, agrees with plain arithmetic.
#[test]
fn arithmetic_qasm_agrees_with_an_outside_simulator() {
    let out = build_spec(&arith_toml("add", 3, "carry_out = true"), true);
    let qasm = out.qasm().unwrap();
    for (a, b) in [(5u64, 6u64), (7, 7), (0, 3), (4, 4)] {
        let mut set = Vec::new();
        for i in 0..3 {
            if (a >> i) & 1 == 1 {
                set.push(("a".to_string(), i));
            }
            if (b >> i) & 1 == 1 {
                set.push(("b".to_string(), i));
            }
        }
        let r = qasmsim_run(&qasm, &set);
        assert_eq!(r["a"], a);
        assert_eq!(r["b"], (a + b) % 8);
        assert_eq!(r["cout"], (a + b) / 8);
        assert_eq!(r["anc"], 0);
    }
    let out = build_spec(
        &arith_toml(
            "compare",
            4,
            &format!("constant = 11\ncontrolled = true\n{LT}"),
        ),
        true,
    );
    let qasm = out.qasm().unwrap();
    for a in [0u64, 10, 11, 15] {
        let mut set: Vec<(String, usize)> = vec![("ctrl".to_string(), 0)];
        set.extend(
            (0..4)
                .filter(|i| (a >> i) & 1 == 1)
                .map(|i| ("a".to_string(), i)),
        );
        let r = qasmsim_run(&qasm, &set);
        assert_eq!(r["y"], (a < 11) as u64, "a = {a}");
    }
}

// ---------------------------------------------------------------------------
// The schema of few verbs: every op proven exhaustively at widths 1-6.

const RELATIONS: [&str; 6] = ["<", "<=", ">", ">=", "==", "!="];

fn coprime(c: u64, n: u64) -> bool {
    let (mut x, mut y) = (c, n);
    while y != 0 {
        (x, y) = (y, x % y);
    }
    x == 1
}

#[test]
fn every_relation_on_registers_and_constants_widths_1_to_6() {
    for w in 1..=6usize {
        let top = (1u64 << w) - 1;
        let constants: Vec<u64> = if w <= 4 {
            (0..=top).collect()
        } else {
            vec![0, 1, 2, top / 3, top / 2 + 1, top - 1, top]
        };
        for rel in RELATIONS {
            for ctl in CONTROLS {
                let r = format!("{ctl}\nrelation = \"{rel}\"");
                assert_proven(&arith_toml("compare", w, &r));
                for &k in &constants {
                    assert_proven(&arith_toml("compare", w, &format!("{r}\nconstant = {k}")));
                }
                // The phase form: registers, and constants at the edges.
                let phase = format!("{r}\n[oracle]\nform = \"phase\"");
                assert_proven(&arith_toml("compare", w, &phase));
                for k in [0, top / 2, top] {
                    assert_proven(&arith_toml(
                        "compare",
                        w,
                        &format!("{r}\nconstant = {k}\n[oracle]\nform = \"phase\""),
                    ));
                }
            }
        }
    }
}

#[test]
fn subtract_and_constants_with_carry_widths_1_to_6() {
    for w in 1..=6usize {
        let top = (1u64 << w) - 1;
        for ctl in CONTROLS {
            for k in [0, 1, top / 2 + 1, top] {
                let c = format!("{ctl}\nconstant = {k}");
                assert_proven(&arith_toml("subtract", w, &c));
                assert_proven(&arith_toml("add", w, &format!("{c}\ncarry_out = true")));
            }
        }
    }
}

#[test]
fn modular_add_and_subtract_for_every_modulus_to_63() {
    for n in 2..=63u64 {
        for ctl in CONTROLS {
            let m = format!("{ctl}\nmodulus = {n}");
            assert_proven(&format!("kind = \"arithmetic\"\nop = \"subtract\"\n{m}\n"));
            let mut ks = vec![0, 1, n / 2, n - 1];
            ks.dedup();
            for k in ks {
                for op in ["add", "subtract"] {
                    let out = assert_proven(&format!(
                        "kind = \"arithmetic\"\nop = \"{op}\"\n{m}\nconstant = {k}\n"
                    ));
                    // The promise is a < n: the other states are outside.
                    if let Verification::Ran(Verdict::Proven { states, .. }) = out.verification {
                        let c = if ctl.ends_with("true") { 2 } else { 1 };
                        assert_eq!(states, c * n, "{op} {k} mod {n}");
                    }
                }
            }
        }
    }
}

#[test]
fn multiply_registers_and_constants_widths_1_to_6() {
    for w in 1..=6usize {
        for ctl in CONTROLS {
            assert_proven(&arith_toml("multiply", w, ctl));
            for c in [1u64, 2, 3, 5, 11, 13, 37, (1 << w) - 1] {
                assert_proven(&arith_toml(
                    "multiply",
                    w,
                    &format!("{ctl}\nconstant = {c}"),
                ));
            }
        }
    }
}

#[test]
fn modular_multiply_for_every_modulus_to_63() {
    for n in 2..=63u64 {
        // The smallest base past 1, the largest, and one between, each coprime.
        let mut bases: Vec<u64> = [2, n / 2, n - 1]
            .into_iter()
            .map(|c| (c..n).find(|&c| coprime(c, n)).unwrap_or(1))
            .collect();
        bases.push(1);
        bases.sort();
        bases.dedup();
        for c in bases {
            for ctl in CONTROLS {
                let out = assert_proven(&format!(
                    "kind = \"arithmetic\"\nop = \"multiply\"\nconstant = {c}\nmodulus = {n}\n{ctl}\n"
                ));
                if let Verification::Ran(Verdict::Proven { states, .. }) = out.verification {
                    let k = if ctl.ends_with("true") { 2 } else { 1 };
                    assert_eq!(states, k * n, "{c} * x mod {n}");
                }
            }
        }
    }
}

#[test]
fn power_for_exponents_of_1_to_6_bits() {
    for (c, n) in [
        (7u64, 15u64),
        (2, 21),
        (2, 35),
        (5, 63),
        (1, 2),
        (2, 3),
        (3, 61),
        (11, 32),
    ] {
        for e in 1..=6 {
            for ctl in CONTROLS {
                assert_proven(&format!(
                    "kind = \"arithmetic\"\nop = \"power\"\nconstant = {c}\nmodulus = {n}\nexponent_bits = {e}\n{ctl}\n"
                ));
            }
        }
    }
    // Every modulus to 63 once, with three exponent bits.
    for n in 2..=63u64 {
        let c = (2..n).find(|&c| coprime(c, n)).unwrap_or(1);
        assert_proven(&format!(
            "kind = \"arithmetic\"\nop = \"power\"\nconstant = {c}\nmodulus = {n}\nexponent_bits = 3\n"
        ));
    }
}

#[test]
fn weight_widths_1_to_10() {
    for w in 1..=10usize {
        for ctl in CONTROLS {
            assert_proven(&arith_toml("weight", w, ctl));
        }
    }
}

/// Outside values. 7^e mod 15 for e = 0..15 is 1, 7, 4, 13, 1, ... (common
/// practice: the textbook order-4 example of period finding); 2 has order 6
/// mod 21 (2^6 = 64 = 3 * 21 + 1, and 2, 4, 8, 16, 11 are not 1: common
/// practice); 13 * 11 = 143; popcounts of 0b1011 = 3, 0xff = 8, 0 = 0.
#[test]
fn outside_values_of_period_finding_weight_and_products() {
    let p15 = build_spec(
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 7\nmodulus = 15\nexponent_bits = 4\n",
        false,
    )
    .lowered;
    let cycle = [1u128, 7, 4, 13];
    for e in 0..16u128 {
        let r = run_registers(&p15, &[("e", e), ("x", 1)]);
        assert_eq!(r["x"], cycle[(e % 4) as usize], "7^{e} mod 15");
        assert_eq!(r["e"], e);
        assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
    }
    let p21 = build_spec(
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 2\nmodulus = 21\nexponent_bits = 3\n",
        false,
    )
    .lowered;
    let ones: Vec<u128> = (1..8)
        .filter(|&e| run_registers(&p21, &[("e", e), ("x", 1)])["x"] == 1)
        .collect();
    assert_eq!(ones, [6], "the order of 2 mod 21 is 6");
    let mul = build_spec(&arith_toml("multiply", 4, ""), false).lowered;
    assert_eq!(run_registers(&mul, &[("a", 13), ("b", 11)])["p"], 143);
    let mulc = build_spec(&arith_toml("multiply", 4, "constant = 11"), false).lowered;
    assert_eq!(run_registers(&mulc, &[("a", 13)])["p"], 143);
    let m = build_spec(
        "kind = \"arithmetic\"\nop = \"multiply\"\nconstant = 11\nmodulus = 150\n",
        false,
    )
    .lowered;
    assert_eq!(run_registers(&m, &[("x", 13)])["x"], 143);
    let wt = build_spec(&arith_toml("weight", 8, ""), false).lowered;
    for (a, want) in [(0b1011u128, 3u128), (0xff, 8), (0, 0)] {
        assert_eq!(run_registers(&wt, &[("a", a)])["y"], want);
    }
}

/// Hamming weight by the adder tree takes n - popcount(n) Toffolis to
/// compute (the bound usually cited for measured uncompute, memory), twice
/// that with the Toffoli uncompute; the comparator family stays within the
/// Cuccaro comparator's 2n - 1 plus its multi-controlled equality.
#[test]
fn weight_and_comparison_counts_against_the_formulas() {
    for n in [1usize, 2, 3, 4, 5, 7, 8, 16, 31, 64, 100, 1024] {
        let cost = structural_cost(&arith_toml("weight", n, ""));
        let pc = n.count_ones() as usize;
        assert_eq!(cost.toffoli, 2 * (n - pc), "weight n={n}");
        for rel in ["<", "<=", ">", ">="] {
            let c = structural_cost(&arith_toml("compare", n, &format!("relation = \"{rel}\"")));
            assert_eq!(c.toffoli, 2 * n - 1, "{rel} n={n}");
        }
    }
}

/// Constants and moduli past 64 bits, written as strings: a 100-bit modular
/// adder and multiply on sample values, against u128 arithmetic.
#[test]
fn constants_and_moduli_past_64_bits() {
    let n: u128 = (1 << 99) + 277; // an odd 100-bit modulus
    let c: u128 = (1 << 98) + 12345;
    let text =
        format!("kind = \"arithmetic\"\nop = \"add\"\nconstant = \"{c:#x}\"\nmodulus = \"{n}\"\n");
    let add = build_spec(&text, false).lowered;
    for a in [0u128, 1, n - 1, n / 2, c] {
        let r = run_registers(&add, &[("a", a)]);
        assert_eq!(r["a"], (a + c) % n, "a = {a}");
        assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
    }
    let cmp = build_spec(
        &arith_toml(
            "compare",
            100,
            &format!("relation = \">=\"\nconstant = \"{c}\""),
        ),
        false,
    )
    .lowered;
    for a in [0u128, c - 1, c, c + 1, (1 << 100) - 1] {
        assert_eq!(run_registers(&cmp, &[("a", a)])["y"], (a >= c) as u128);
    }
}

/// The SAT route proves the adders, comparators, weight and constant
/// multiplication at 32 and 64 bits; the products of registers, the modular
/// multiply and power are refused as unsupported.
#[test]
fn sat_route_at_32_and_64_bits() {
    use oraculum::Route;
    let sat = VerifyOptions {
        route: Route::Sat,
        sat_seconds: 120.0,
        ..Default::default()
    };
    let prove = |text: String| {
        common::tables();
        let spec = parse_spec("sat.toml", &text).unwrap();
        let out = build(
            &spec,
            &BuildOptions {
                verify: Some(sat),
                ..Default::default()
            },
        )
        .unwrap_or_else(|e| panic!("{e}\n{text}"));
        match out.verification {
            Verification::Ran(Verdict::Proven { by: "sat", .. }) => {}
            other => panic!("not proven by SAT: {other:?}\n{text}"),
        }
    };
    for w in [32usize, 64] {
        prove(arith_toml(
            "subtract",
            w,
            "constant = 12345\ncontrolled = true",
        ));
        prove(arith_toml("add", w, "constant = 99\ncarry_out = true"));
        for rel in RELATIONS {
            prove(arith_toml("compare", w, &format!("relation = \"{rel}\"")));
            prove(arith_toml(
                "compare",
                w,
                &format!("relation = \"{rel}\"\nconstant = 1000"),
            ));
        }
        prove(arith_toml("weight", w, ""));
        prove(arith_toml("multiply", w, "constant = 11"));
    }
    prove(format!(
        "kind = \"arithmetic\"\nop = \"add\"\nconstant = 5\nmodulus = {}\n",
        (1u64 << 31) - 1
    ));
    let refused = |text: &str| {
        common::tables();
        let spec = parse_spec("sat.toml", text).unwrap();
        let e = build(
            &spec,
            &BuildOptions {
                verify: Some(sat),
                ..Default::default()
            },
        )
        .err()
        .unwrap_or_else(|| panic!("SAT took {text}"));
        assert!(
            e.to_string().contains("beyond what the solver proves"),
            "{e}"
        );
    };
    refused(&arith_toml("multiply", 32, ""));
    refused("kind = \"arithmetic\"\nop = \"multiply\"\nconstant = 3\nmodulus = 1000003\n");
    refused("kind = \"arithmetic\"\nop = \"power\"\nconstant = 3\nmodulus = 1000003\nexponent_bits = 4\n");
}

/// `auto` also runs permutation synthesis of the same map when the registers
/// make at most 16 lines, and keeps the verified circuit with fewest
/// Toffolis: never more than the structural generator's.
#[test]
fn auto_runs_the_table_methods_on_small_registers() {
    for text in [
        "kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\nmodulus = 12\n".to_string(),
        arith_toml("compare", 3, "relation = \"<=\"\nconstant = 5"),
        arith_toml("multiply", 2, "constant = 3"),
    ] {
        let auto = assert_proven(&text);
        common::tables();
        let spec = parse_spec("a.toml", &text).unwrap();
        let structural = build(
            &spec,
            &BuildOptions {
                method: Some(oraculum::Method::Structural),
                ..Default::default()
            },
        )
        .unwrap();
        assert!(auto.cost.toffoli <= structural.cost.toffoli, "{text}");
        assert!(
            auto.notes.iter().any(|n| n.contains("transform")),
            "{:?}",
            auto.notes
        );
    }
}
