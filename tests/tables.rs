//! Functions given as truth tables against the same functions given as
//! expressions (method `xag`): the table's multi-level decomposition, the AES
//! S-box from its definition, every circuit proven by the verifier. The
//! bounds are the counts this branch reaches (lower bounds of quality: a
//! change that costs more fails), beside the target of 1.5 x the
//! expression.

mod common;

use common::tables::*;
use oraculum::pipeline::build;
use oraculum::{parse_spec, BuildOptions, Cost, Method, Uncompute};

/// The cost of `text` by method `xag`, the circuit proven.
fn xag_cost(name: &str, text: &str, uncompute: Uncompute) -> Cost {
    let spec = parse_spec(name, text).unwrap_or_else(|e| panic!("{name}: {e}"));
    let opts = BuildOptions {
        method: Some(Method::Xag),
        verify: Some(Default::default()),
        uncompute,
        ..Default::default()
    };
    let out = build(&spec, &opts).unwrap_or_else(|e| panic!("{name}: {e}"));
    assert!(
        out.verification.is_proven(),
        "{name}: {:?}",
        out.verification
    );
    out.cost
}

/// The weight function of 8..16 inputs as a table costs what its adder tree
/// costs: `2(n - popcount(n))` Toffolis, two per AND of the count (Boyar and
/// Peralta, "Tight bounds for the multiplicative complexity of symmetric
/// Boolean functions", TCS 2008: `n - popcount(n)` ANDs; from memory).
#[test]
fn weight_tables_cost_their_expression() {
    for n in [8, 10, 12, 14, 16] {
        let table = xag_cost("table", &weight_table(n), Uncompute::Toffoli).toffoli;
        let expr = xag_cost("expr", &weight_expr(n), Uncompute::Toffoli).toffoli;
        println!("weight {n}: table {table}, expression {expr}");
        assert_eq!(expr, 2 * (n - n.count_ones() as usize), "n = {n}");
        assert_eq!(table, expr, "n = {n}");
    }
}

/// Multipliers of 3x3..6x6 bits as tables: the counts reached (the issue
/// measured 6,941 Toffolis for 6x6 through the ESOP alone): 3x3 within 1.5 x
/// of the schoolbook expression, the larger ones not yet.
#[test]
fn multiplier_tables_stay_at_or_under_the_counts_reached() {
    // (width, most Toffolis as a table)
    for (w, most) in [(3, 44), (4, 102), (5, 270), (6, 656)] {
        let table = xag_cost("table", &multiplier_table(w), Uncompute::Toffoli).toffoli;
        let expr = xag_cost("expr", &multiplier_expr(w), Uncompute::Toffoli).toffoli;
        println!("multiplier {w}x{w}: table {table}, expression {expr}");
        assert!(table <= most, "{w}x{w}: {table} > {most}");
        // The schoolbook array: w^2 partial-product ANDs and w^2 - w adders
        // of one AND each, two Toffolis per AND (common practice).
        assert_eq!(expr, 2 * (2 * w * w - w), "{w}x{w}");
    }
}

/// FIPS 197 values of the S-box computed from its definition: S(0x00) =
/// 0x63 and S(0x53) = 0xed (section 5.1.1's worked example), S(0x01) = 0x7c
/// and S(0xff) = 0x16 (figure 7, recalled from memory), and it is a
/// permutation.
#[test]
fn aes_sbox_matches_fips_197() {
    let s = aes_sbox();
    assert_eq!(s[0x00], 0x63);
    assert_eq!(s[0x53], 0xed);
    assert_eq!(s[0x01], 0x7c);
    assert_eq!(s[0xff], 0x16);
    let mut seen = [false; 256];
    for v in s {
        assert!(!seen[v as usize], "{v:#x} twice");
        seen[v as usize] = true;
    }
}

/// The AES S-box as an xor oracle, proven in both uncompute modes. The
/// published circuits have 32-34 ANDs (Boyar and Peralta 2010/2012; recalled
/// from memory), so 64-68 Toffolis with Toffoli uncompute and 32-34 with
/// measured uncompute; the generic decomposition is far from them, and
/// these are the counts reached (the issue measured 1,149 through the ESOP).
#[test]
fn aes_sbox_as_an_xor_oracle_is_proven() {
    let text = aes_sbox_table();
    let pure = xag_cost("aes_sbox", &text, Uncompute::Toffoli);
    let measured = xag_cost("aes_sbox", &text, Uncompute::Measure);
    println!(
        "aes sbox: {} Toffolis (Toffoli uncompute), {} Toffolis + {} measured (measured uncompute), {} qubits",
        pure.toffoli, measured.toffoli, measured.measured, pure.qubits
    );
    assert!(pure.toffoli <= 216, "{}", pure.toffoli);
    assert!(
        measured.toffoli_equivalent <= 108,
        "{}",
        measured.toffoli_equivalent
    );
    // Every AND still costs at least one Toffoli-equivalent: not below the
    // published 32.
    assert!(measured.toffoli_equivalent >= 32);
    assert_eq!(pure.toffoli, 2 * measured.toffoli_equivalent);
}

/// `text` by `method` (`None`: auto), the circuit proven: (Toffolis,
/// method that ran).
fn toffolis(text: &str, method: Option<Method>) -> (usize, Method) {
    let spec = parse_spec("spec.toml", text).unwrap_or_else(|e| panic!("{e}"));
    let opts = BuildOptions {
        method,
        verify: Some(Default::default()),
        ..Default::default()
    };
    let out = build(&spec, &opts).unwrap_or_else(|e| panic!("{e}"));
    assert!(out.verification.is_proven(), "{:?}", out.verification);
    (out.cost.toffoli, out.method)
}

/// The AES S-box in place (a permutation of 8 lines) by compute out of
/// place, uncompute the input with the inverse's oracle: proven, and
/// cheaper than transformation-based synthesis (the issue measured 2,830
/// Toffolis for the in-place S-box; published in-place circuits are about
/// twice an xor oracle's 32-34 ANDs, recalled from memory), so auto takes it.
#[test]
fn aes_sbox_in_place_goes_out_of_place() {
    let s: Vec<u64> = aes_sbox().iter().map(|&v| v as u64).collect();
    let text = common::permutation_toml(8, &s);
    let (oop, _) = toffolis(&text, Some(Method::Xag));
    let (tbs, _) = toffolis(&text, Some(Method::Transform));
    let (bidir, _) = toffolis(&text, Some(Method::TransformBidir));
    let (auto, method) = toffolis(&text, None);
    println!(
        "aes sbox in place: out of place {oop}, transform {tbs}, transform-bidir {bidir}, auto {auto} ({method:?})"
    );
    assert!(oop < tbs.min(bidir), "{oop} >= {}", tbs.min(bidir));
    assert_eq!((auto, method), (oop, Method::Xag));
    // Two xor oracles (the forward one's 216 Toffolis above, the inverse's
    // near it), the swap in CNOTs: the count reached.
    assert!(oop <= 426, "{oop}");
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(12))]
    /// Random permutations of 1..7 lines out of place: the verifier proves
    /// each circuit against the permutation (inside `toffolis`).
    #[test]
    fn random_permutations_out_of_place_are_proven((w, images) in common::arb_permutation(7)) {
        let (_, m) = toffolis(&common::permutation_toml(w, &images), Some(Method::Xag));
        proptest::prop_assert_eq!(m, Method::Xag);
    }
}
