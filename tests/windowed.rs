//! Windowed modular exponentiation (Gidney, "Windowed quantum arithmetic",
//! 2019; Gidney and Ekerå, Quantum 5, 433, 2021): proven exhaustively at
//! small widths with the windows forced, checked on outside values, its
//! streaming count against the built circuit, and the cost model's pick
//! against the exact counts of both constructions.

mod common;

use common::*;
use oraculum::synth::{arithmetic_tally_with, arithmetic_with, Choice, PowerForm};
use oraculum::{parse_spec, verify, ArithSpec, Spec, SpecBody, Verdict, VerifyOptions};

fn arith(text: &str) -> (Spec, ArithSpec) {
    let spec = parse_spec("w.toml", text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    let SpecBody::Arithmetic(a) = &spec.body else {
        panic!("not arithmetic")
    };
    let a = a.clone();
    (spec, a)
}

fn power_toml(c: u64, n: u64, e: usize, controlled: bool) -> String {
    format!(
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = {c}\nmodulus = {n}\nexponent_bits = {e}\ncontrolled = {controlled}\n"
    )
}

fn windowed(exponent: usize, factor: usize) -> Choice {
    Choice {
        power: Some(PowerForm::Windowed { exponent, factor }),
        ..Default::default()
    }
}

/// Builds `text` with `choice`, lowers it, and proves it on every basis
/// state of the domain; returns the lowered circuit.
fn proven(text: &str, choice: &Choice) -> oraculum::Circuit {
    let (spec, a) = arith(text);
    let lowered = oraculum::lower(&arithmetic_with(&a, choice));
    match verify(&lowered, &spec, &VerifyOptions::default()) {
        Ok(Verdict::Proven { by, .. }) => assert_eq!(by, "exhaustive"),
        other => panic!("not proven with {choice:?}: {other:?}\n{text}"),
    }
    assert!(lowered.gates().iter().all(|g| g.controls().len() <= 2));
    lowered
}

fn coprime(c: u64, n: u64) -> bool {
    let (mut a, mut b) = (c, n);
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a == 1
}

/// Every modulus 2..=63 (one base each, the smallest coprime one past 1),
/// exponents of 1 to 6 bits, three window shapes, controlled and not.
#[test]
fn windowed_power_every_modulus_to_63_exponents_to_6_bits() {
    for n in 2..=63u64 {
        let c = (2..n).find(|&c| coprime(c, n)).unwrap_or(1);
        for e in 1..=6 {
            for (we, wm) in [(1, 1), (2, 3), (3, 2)] {
                for controlled in [false, true] {
                    proven(&power_toml(c, n, e, controlled), &windowed(we, wm));
                }
            }
        }
    }
    // Windows wider than the exponent or the register, and the largest base.
    for (c, n) in [(7u64, 15u64), (2, 21), (62, 63), (5, 63), (3, 61), (11, 32)] {
        for (we, wm) in [(4, 4), (6, 1), (1, 6), (8, 8)] {
            for controlled in [false, true] {
                proven(&power_toml(c, n, 6, controlled), &windowed(we, wm));
            }
        }
    }
}

/// Outside values (common practice, the textbook examples of period
/// finding): 7^e mod 15 for e = 0..15 is 1, 7, 4, 13, 1, ... (order 4), and
/// 2 has order 6 mod 21 (2^6 = 64 = 3 * 21 + 1; 2, 4, 8, 16, 11 are not 1).
#[test]
fn windowed_power_on_the_textbook_values() {
    for (we, wm) in [(1, 1), (2, 2), (4, 4), (3, 1)] {
        let p15 = proven(&power_toml(7, 15, 4, false), &windowed(we, wm));
        let cycle = [1u128, 7, 4, 13];
        for e in 0..16u128 {
            for x in [1u128, 2, 14] {
                let r = run_registers(&p15, &[("e", e), ("x", x)]);
                assert_eq!(
                    r["x"],
                    x * cycle[(e % 4) as usize] % 15,
                    "{x} * 7^{e} mod 15"
                );
                assert_eq!(r["e"], e);
                assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
            }
        }
        let p21 = proven(&power_toml(2, 21, 3, false), &windowed(we, wm));
        let ones: Vec<u128> = (1..8)
            .filter(|&e| run_registers(&p21, &[("e", e), ("x", 1)])["x"] == 1)
            .collect();
        assert_eq!(ones, [6], "the order of 2 mod 21 is 6");
    }
}

/// The streaming count (`oraculum cost SPEC`), which tallies repeated modular
/// adders and lookups' copies in bulk, finds the same gates by number of
/// controls and the same lines as the built windowed circuit.
#[test]
fn windowed_streaming_count_matches_the_built_circuit() {
    for (text, (we, wm)) in [
        (power_toml(7, 1003, 5, false), (2, 3)),
        (power_toml(7, 1003, 5, true), (3, 2)),
        (power_toml(3, 61, 6, true), (1, 1)),
        (power_toml(5, 4093, 7, false), (4, 4)),
    ] {
        let (_, a) = arith(&text);
        let choice = windowed(we, wm);
        let (t, lines) = arithmetic_tally_with(&a, &choice);
        let raw = arithmetic_with(&a, &choice);
        let mut by = [0u64; 4];
        let mut bound = 0u64;
        for g in raw.gates() {
            let k = g.controls().len();
            by[k.min(3)] += 1;
            bound += if k >= 2 { 2 * k as u64 - 3 } else { 0 };
        }
        assert_eq!(t.gates, raw.gates().len() as u64, "{text}");
        assert_eq!(t.by_controls, by, "{text}");
        assert_eq!(t.toffoli, bound, "{text}");
        assert_eq!(lines, raw.width(), "{text}");
    }
}

/// The cost model picks the construction with the fewest Toffolis: its pick
/// is never above the exact count of one multiplication per exponent bit,
/// and windowed wins once the register is a few bits wide.
#[test]
fn the_cost_model_picks_the_cheaper_construction() {
    let per_bit = Choice {
        power: Some(PowerForm::PerBit),
        ..Default::default()
    };
    for (c, n, e, controlled) in [
        (7u64, 15u64, 4usize, false),
        (2, 21, 6, true),
        (3, 61, 6, false),
        (7, 1003, 10, false),
        (7, 1003, 10, true),
        (3, 65_521, 16, false),
    ] {
        let (_, a) = arith(&power_toml(c, n, e, controlled));
        let picked = oraculum::synth::power_form(&a);
        let ours = arithmetic_tally_with(
            &a,
            &Choice {
                power: Some(picked),
                ..Default::default()
            },
        )
        .0
        .toffoli;
        let bitwise = arithmetic_tally_with(&a, &per_bit).0.toffoli;
        assert!(
            ours <= bitwise,
            "{c}^e mod {n}: {picked:?} {ours} > {bitwise}"
        );
        if n > 1000 {
            assert!(
                matches!(picked, PowerForm::Windowed { .. }),
                "{n}: {picked:?}"
            );
            // At 10 and more exponent bits the windows save more than half.
            assert!(2 * ours < bitwise, "{n}: {ours} against {bitwise}");
        }
    }
}

/// The spec fixes the windows with `exponent_window` and `multiply_window`
/// (both or neither, each 1 to 8); the default build then uses them.
#[test]
fn window_keys_are_read_and_checked() {
    let base = power_toml(7, 15, 4, false);
    let (_, a) = arith(&format!("{base}exponent_window = 2\nmultiply_window = 3\n"));
    assert_eq!(a.windows, Some((2, 3)));
    assert_eq!(
        oraculum::synth::power_form(&a),
        PowerForm::Windowed {
            exponent: 2,
            factor: 3
        }
    );
    for (extra, needle, line) in [
        ("exponent_window = 2\n", "needs 'multiply_window'", 7),
        (
            "multiply_window = 0\nexponent_window = 1\n",
            "between 1 and 8",
            7,
        ),
        (
            "exponent_window = 9\nmultiply_window = 1\n",
            "between 1 and 8",
            7,
        ),
    ] {
        let text = format!("{base}{extra}");
        let e = parse_spec("w.toml", &text).expect_err(&text).to_string();
        assert!(e.contains(needle), "{e}");
        assert!(e.contains(&format!("w.toml:{line}:")), "{e}");
    }
    let add = "kind = \"arithmetic\"\nop = \"add\"\nwidth = 4\nexponent_window = 2\n";
    let e = parse_spec("w.toml", add).expect_err("add").to_string();
    assert!(e.contains("exponent_window"), "{e}");
}

/// The windowed count in closed form, from two outside-checked parts: the
/// modular adder's own count (the `op = "add", modulus = N` spec) and the
/// unary-iteration lookup's `2(L - 2)` (Babbush et al. 2018 with every
/// uncompute a Toffoli), per exponent window `2 ceil(n / wm) - 1` adders and
/// `4 ceil(n / wm) - 1` lookups (the first looked up straight into the clean
/// register, every other one undone); and the ratio to Gidney and Ekerå's
/// `2 n m / (we wm) * (2n + 2^(we + wm))` at the same windows (their eq. 1;
/// the per-addition count recalled from memory) is the 4 of a modular adder
/// of 8n against 2n and lookups at four times theirs.
#[test]
fn windowed_count_in_closed_form_and_against_gidney_ekera() {
    let n = 128usize;
    let m = 192usize;
    let modulus = format!("\"0x{}b\"", "f".repeat(n / 4 - 1)); // 2^128 - 5
    let text = format!(
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 3\nmodulus = {modulus}\nexponent_bits = {m}\n"
    );
    let (_, a) = arith(&text);
    let (_, add) = arith(&format!(
        "kind = \"arithmetic\"\nop = \"add\"\nmodulus = {modulus}\n"
    ));
    let adder = oraculum::synth::arithmetic_tally(&add).0.toffoli;
    for (we, wm) in [(5usize, 5usize), (4, 4), (3, 6)] {
        let ours = arithmetic_tally_with(&a, &windowed(we, wm)).0.toffoli;
        let mut want = 0u64;
        for e0 in (0..m).step_by(we) {
            let le = we.min(m - e0);
            let mut first = true;
            for f0 in (0..n).step_by(wm) {
                let lm = wm.min(n - f0);
                let lookup = 2 * ((1u64 << (le + lm)) - 2);
                want += if first { lookup } else { 2 * lookup + adder };
                want += 2 * lookup + adder;
                first = false;
            }
        }
        assert_eq!(ours, want, "windows {we}, {wm}");
        let ge =
            2.0 * (n * m) as f64 / (we * wm) as f64 * (2.0 * n as f64 + (1u64 << (we + wm)) as f64);
        let ratio = ours as f64 / ge;
        assert!((3.3..4.2).contains(&ratio), "windows {we}, {wm}: {ratio}");
    }
}
