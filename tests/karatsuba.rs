//! Karatsuba multiplication of two registers (Gidney, "Asymptotically
//! efficient quantum Karatsuba multiplication", 2019, takes schoolbook as the
//! baseline): forced at small widths and proven exhaustively, an outside
//! product, and its Toffoli counts against schoolbook's.

mod common;

use common::*;
use oraculum::synth::{arithmetic_tally_with, arithmetic_with, Choice};
use oraculum::{parse_spec, verify, SpecBody, Verdict, VerifyOptions};

fn karatsuba_from(k: usize) -> Choice {
    Choice {
        karatsuba_from: Some(k),
        ..Default::default()
    }
}

/// Karatsuba from width 4 on (one level at 4 to 7 bits), proven on every
/// basis state, controlled and not.
#[test]
fn forced_karatsuba_is_proven_at_widths_4_to_6() {
    for w in 4..=6 {
        for ctl in ["controlled = false", "controlled = true"] {
            let text = arith_toml("multiply", w, ctl);
            let spec = parse_spec("k.toml", &text).unwrap();
            let SpecBody::Arithmetic(a) = &spec.body else {
                panic!()
            };
            let forced = arithmetic_with(a, &karatsuba_from(4));
            let school = arithmetic_with(a, &karatsuba_from(usize::MAX));
            assert_ne!(
                forced.gates(),
                school.gates(),
                "{text}: not a different circuit"
            );
            let lowered = oraculum::lower(&forced);
            match verify(&lowered, &spec, &VerifyOptions::default()) {
                Ok(Verdict::Proven { by, .. }) => assert_eq!(by, "exhaustive"),
                other => panic!("{text}: {other:?}"),
            }
            if w == 4 && ctl.ends_with("false") {
                // 13 * 11 = 143 (worked by hand).
                let r = run_registers(&lowered, &[("a", 13), ("b", 11)]);
                assert_eq!(r["p"], 143);
                assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
            }
        }
    }
}

/// Two levels of the recursion (from width 4 at width 16), checked on
/// sample products against the machine's multiplication, and the streaming
/// count equal to the built circuit's.
#[test]
fn two_levels_on_sample_values_and_the_streaming_count() {
    let text = arith_toml("multiply", 16, "");
    let spec = parse_spec("k.toml", &text).unwrap();
    let SpecBody::Arithmetic(a) = &spec.body else {
        panic!()
    };
    let c = arithmetic_with(a, &karatsuba_from(4));
    let lowered = oraculum::lower(&c);
    for (x, y) in [
        (0u128, 0u128),
        (65535, 65535),
        (12345, 54321),
        (1, 40000),
        (256, 255),
    ] {
        for p0 in [0u128, 0xdead_beef] {
            let r = run_registers(&lowered, &[("a", x), ("b", y), ("p", p0)]);
            assert_eq!(r["p"], p0 ^ (x * y), "{x} * {y}");
            assert_eq!(r.get("anc").copied().unwrap_or(0), 0);
        }
    }
    let (t, lines) = arithmetic_tally_with(a, &karatsuba_from(4));
    assert_eq!(t.gates, c.gates().len() as u64);
    assert_eq!(lines, c.width());
}

/// Schoolbook costs `6n^2 - 4` Toffolis here (measured, tests/arithmetic.rs);
/// Karatsuba's recursion `3 K(n / 2) + O(n)` grows as `n^1.58`: it is
/// cheaper from the crossover on and far cheaper at 1024 bits.
#[test]
fn karatsuba_toffolis_against_schoolbook() {
    let count = |w: usize, from: usize| {
        let spec = parse_spec("k.toml", &arith_toml("multiply", w, "")).unwrap();
        let SpecBody::Arithmetic(a) = &spec.body else {
            panic!()
        };
        arithmetic_tally_with(a, &karatsuba_from(from)).0.toffoli
    };
    for w in [8usize, 32, 128, 1024] {
        assert_eq!(
            count(w, usize::MAX),
            6 * (w * w) as u64 - 4,
            "schoolbook at {w}"
        );
    }
    let k = oraculum::synth::KARATSUBA_FROM;
    assert!(count(k, k) < count(k, usize::MAX), "at the crossover {k}");
    assert!(3 * count(1024, k) < count(1024, usize::MAX));
    // The default build uses Karatsuba from the crossover on.
    let spec = parse_spec("k.toml", &arith_toml("multiply", 64, "")).unwrap();
    let SpecBody::Arithmetic(a) = &spec.body else {
        panic!()
    };
    let default = oraculum::synth::arithmetic_tally(a).0.toffoli;
    assert_eq!(default, count(64, k));
    assert!(default < count(64, usize::MAX));
}
