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

#[test]
fn add_sub_compare_every_width_1_to_8_exhaustively() {
    for w in 1..=8 {
        for ctl in CONTROLS {
            assert_proven(&arith_toml("add", w, ctl));
            assert_proven(&arith_toml("add", w, &format!("{ctl}\ncarry_out = true")));
            assert_proven(&arith_toml("sub", w, ctl));
            assert_proven(&arith_toml("less_than", w, ctl));
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
                assert_proven(&arith_toml("add_const", w, &extra));
                assert_proven(&arith_toml("less_than_const", w, &extra));
                assert_proven(&arith_toml("equal_const", w, &extra));
            }
        }
    }
}

#[test]
fn modular_ops_for_moduli_2_to_40() {
    for n in 2..=40u64 {
        for ctl in CONTROLS {
            let extra = format!("{ctl}\nmodulus = {n}");
            let text = format!("kind = \"arithmetic\"\nop = \"increment_mod\"\n{extra}\n");
            assert_proven(&text);
            let out = assert_proven(&format!(
                "kind = \"arithmetic\"\nop = \"add_mod\"\n{extra}\n"
            ));
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
        let text =
            format!("kind = \"arithmetic\"\nop = \"increment_mod\"\nmodulus = {n}\nwidth = 7\n");
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
    let lt = build_spec(&arith_toml("less_than", 8, ""), false).lowered;
    assert_eq!(run_registers(&lt, &[("a", 3), ("b", 200)])["y"], 1);
    assert_eq!(run_registers(&lt, &[("a", 200), ("b", 3)])["y"], 0);
    let m = build_spec(
        "kind = \"arithmetic\"\nop = \"add_mod\"\nmodulus = 7\n",
        false,
    )
    .lowered;
    assert_eq!(run_registers(&m, &[("a", 3), ("b", 4)])["b"], 0); // 7 mod 7
    let inc = build_spec(
        "kind = \"arithmetic\"\nop = \"increment_mod\"\nmodulus = 7\n",
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
        let t = |text: String| build_spec(&text, false).cost;
        let add = t(arith_toml("add", n, ""));
        assert_eq!(add.toffoli, 2 * n - 2, "add n={n}");
        assert!(add.qubits <= 2 * n + 1, "one ancilla at most, n={n}");
        let addc = t(arith_toml("add", n, "carry_out = true"));
        assert_eq!(addc.toffoli, 2 * n - 1, "add with carry n={n}");
        assert!(addc.toffoli <= 2 * n);
        let sub = t(arith_toml("sub", n, ""));
        assert_eq!(sub.toffoli, 2 * n - 2, "sub n={n}");
        let lt = t(arith_toml("less_than", n, ""));
        assert_eq!(lt.toffoli, 2 * n - 1, "less_than n={n}");
        if n >= 3 {
            let eq = t(arith_toml("equal_const", n, "constant = 5"));
            assert_eq!(eq.toffoli, 2 * n - 3, "equal_const n={n}");
            assert_eq!(eq.qubits, n + 1 + n - 2);
        }
        // A constant folds into the carries: never more than two Toffolis a bit.
        let ltc = t(arith_toml("less_than_const", n, "constant = 1"));
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
    let lt = build_spec(&arith_toml("less_than", 100, "controlled = true"), false).lowered;
    for (a, b) in [(3u128, 200u128), (200, 3), (1 << 99, (1 << 99) + 1), (7, 7)] {
        for ctrl in [0, 1] {
            let r = run_registers(&lt, &[("ctrl", ctrl), ("a", a), ("b", b)]);
            assert_eq!(r["y"], ctrl * (a < b) as u128);
            assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
        }
    }
    let inc = build_spec(
        "kind = \"arithmetic\"\nop = \"increment_mod\"\nmodulus = 1000003\n",
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
        &arith_toml("less_than_const", 4, "constant = 11\ncontrolled = true"),
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
