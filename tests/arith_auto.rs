//! `auto` and `compare` on arithmetic: on small registers they also run the
//! table methods (permutation synthesis of the whole map, and for the ops
//! that write an output register, function synthesis of that output over
//! the other lines) and keep the verified circuit with the fewest Toffolis.

mod common;

use common::*;
use oraculum::{
    build, compare, parse_spec, BuildOptions, Method, Outcome, Verdict, Verification, VerifyOptions,
};

fn verified() -> BuildOptions {
    BuildOptions {
        verify: Some(VerifyOptions::default()),
        ..Default::default()
    }
}

fn run(text: &str, method: Option<Method>) -> Outcome {
    common::tables();
    let spec = parse_spec("auto.toml", text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    build(
        &spec,
        &BuildOptions {
            method,
            ..verified()
        },
    )
    .unwrap_or_else(|e| panic!("{e}\n{text}"))
}

fn proven(o: &Outcome, text: &str) {
    assert!(
        matches!(o.verification, Verification::Ran(Verdict::Proven { .. })),
        "{:?}\n{text}",
        o.verification
    );
}

/// Every output-writing op at small widths: auto is proven, tried the
/// function methods, and is never above the structural generator.
#[test]
fn output_ops_try_function_synthesis_and_keep_the_fewest_toffolis() {
    let mut texts = Vec::new();
    for rel in ["<", "<=", ">", ">=", "==", "!="] {
        texts.push(arith_toml("compare", 3, &format!("relation = \"{rel}\"")));
        texts.push(arith_toml(
            "compare",
            4,
            &format!("relation = \"{rel}\"\nconstant = 11\ncontrolled = true"),
        ));
    }
    for w in 1..=7 {
        texts.push(arith_toml("weight", w, ""));
    }
    for w in 1..=3 {
        texts.push(arith_toml("multiply", w, "controlled = true"));
    }
    texts.push(arith_toml(
        "multiply",
        4,
        "constant = 11\ncontrolled = true",
    ));
    for text in &texts {
        let auto = run(text, None);
        proven(&auto, text);
        let structural = run(text, Some(Method::Structural));
        assert!(auto.cost.toffoli <= structural.cost.toffoli, "{text}");
        let tried = auto.notes.join(" ");
        for m in ["reed-muller", "esop", "bennett", "transform"] {
            assert!(tried.contains(m), "{m} not tried: {tried}\n{text}");
        }
    }
}

/// A 16-word lookup (4 address bits, 4-bit words: the digits of pi, 3, 1,
/// 4, 1, 5, 9, ...): ESOP synthesis of the table beats the structural
/// unary iteration here, and auto keeps it, proven, and still reads the
/// table (outside check: every word read back by simulation).
#[test]
fn a_lookup_written_as_a_function_is_cheaper_and_kept() {
    let data = [3u128, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5, 8, 9, 7, 9, 3];
    let list: Vec<String> = data.iter().map(|d| d.to_string()).collect();
    let text = format!(
        "kind = \"arithmetic\"\nop = \"lookup\"\nwidth = 4\ndata_width = 4\ndata = [{}]\n",
        list.join(", ")
    );
    let auto = run(&text, None);
    proven(&auto, &text);
    let structural = run(&text, Some(Method::Structural));
    let esop = run(&text, Some(Method::Esop));
    proven(&esop, &text);
    assert!(esop.cost.toffoli < structural.cost.toffoli);
    assert!(auto.cost.toffoli <= esop.cost.toffoli);
    assert!(auto.cost.toffoli < structural.cost.toffoli);
    for (a, &want) in data.iter().enumerate() {
        let r = run_registers(&auto.lowered, &[("a", a as u128)]);
        assert_eq!(r["y"], want, "word {a}");
    }
}

/// In-place ops are not functions of other lines: the function methods are
/// not tried and are refused by name; compare lists them for output ops.
#[test]
fn in_place_ops_keep_the_permutation_methods_and_compare_shows_all() {
    let add = "kind = \"arithmetic\"\nop = \"add\"\nconstant = 1\nmodulus = 12\n";
    let auto = run(add, None);
    proven(&auto, add);
    let tried = auto.notes.join(" ");
    assert!(
        tried.contains("transform") && !tried.contains("esop"),
        "{tried}"
    );
    common::tables();
    let spec = parse_spec("a.toml", add).unwrap();
    let e = build(
        &spec,
        &BuildOptions {
            method: Some(Method::Esop),
            ..verified()
        },
    )
    .expect_err("esop on an in-place op");
    assert!(e.to_string().contains("output register"), "{e}");
    let text = arith_toml("weight", 5, "");
    let spec = parse_spec("w.toml", &text).unwrap();
    let rows = compare(&spec, &verified());
    let names: Vec<&str> = rows.iter().map(|(m, _)| m.name()).collect();
    for m in ["structural", "transform", "reed-muller", "esop", "bennett"] {
        assert!(names.contains(&m), "{names:?}");
    }
    for (m, r) in &rows {
        let o = r.as_ref().unwrap_or_else(|e| panic!("{}: {e}", m.name()));
        proven(o, &text);
    }
}
