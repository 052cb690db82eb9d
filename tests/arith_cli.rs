//! The command line on bad arithmetic specs of the op schema: each mistake
//! exits 2 with its place (file:line:column) and a message that says the fix.

mod common;

use common::*;

/// Writes `spec` as `bad.toml`, runs `synth` on it, returns (exit code, stderr).
fn synth_bad(spec: &str) -> (Option<i32>, String) {
    let dir = workspace();
    std::fs::write(dir.path().join("bad.toml"), spec).unwrap();
    let o = run_in(dir.path(), &["synth", "bad.toml"]);
    (o.status.code(), text(&o).1)
}

fn assert_refused(spec: &str, place: &str, says: &[&str]) {
    let (code, err) = synth_bad(spec);
    assert_eq!(code, Some(2), "{err}");
    assert!(err.contains(place), "no {place} in:\n{err}");
    for s in says {
        assert!(err.contains(s), "no '{s}' in:\n{err}");
    }
    assert!(!err.contains("panicked"), "{err}");
}

#[test]
fn old_op_names_say_the_new_form() {
    let cases = [
        ("add_const", "op = \"add\" with constant = C"),
        ("sub", "op = \"subtract\""),
        ("less_than", "op = \"compare\" with relation = \"<\""),
        ("less_than_const", "relation = \"<\" and constant = C"),
        ("equal_const", "relation = \"==\" and constant = C"),
        ("increment_mod", "constant = 1 and modulus = N"),
        ("add_mod", "op = \"add\" with modulus = N"),
    ];
    for (old, new) in cases {
        assert_refused(
            &format!("kind = \"arithmetic\"\nwidth = 4\nop = \"{old}\"\n"),
            "bad.toml:3:6",
            &[&format!("op '{old}' is no longer"), new],
        );
    }
}

#[test]
fn keys_of_the_schema_are_checked_where_they_are() {
    assert_refused(
        "kind = \"arithmetic\"\nop = \"compare\"\nwidth = 4\nrelation = \"=<\"\n",
        "bad.toml:4:12",
        &["unknown relation '=<'", "<, <=, >, >=, ==, !="],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"compare\"\nwidth = 4\n",
        "bad.toml:2:6",
        &["needs 'relation'"],
    );
    // gcd(6, 15) = 3: no inverse, so no in-place multiply.
    assert_refused(
        "kind = \"arithmetic\"\nop = \"multiply\"\nmodulus = 15\nconstant = 6\n",
        "bad.toml:4:12",
        &["gcd(c, N) = 1"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"power\"\nmodulus = 15\nconstant = 7\n",
        "bad.toml:2:6",
        &["needs 'exponent_bits'"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"add\"\nwidth = 4\n[oracle]\nform = \"phase\"\n",
        "bad.toml:5:8",
        &["arithmetic compare"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"add\"\nmodulus = 12\ncarry_out = true\n",
        "bad.toml:4:13",
        &["'carry_out' does not apply"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"relation\"\nwidth = 4\n",
        "bad.toml:2:6",
        &[
            "unknown op",
            "add, subtract, compare, multiply, power, weight, lookup",
        ],
    );
    // A 100-bit modulus does not fit a 64-bit register.
    assert_refused(
        "kind = \"arithmetic\"\nop = \"add\"\nwidth = 64\nmodulus = \"0xc000_0000_0000_0000_0000_00f1\"\n",
        "bad.toml:3:9",
        &["width 64 cannot hold the modulus"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"add\"\nmodulus = 12\nconstant = 12\n",
        "bad.toml:4:12",
        &["below the modulus 12"],
    );
    assert_refused(
        "kind = \"arithmetic\"\nop = \"weight\"\nwidth = 4\nconstant = 1\n",
        "bad.toml:4:12",
        &["'constant' does not apply to op 'weight'"],
    );
}

#[test]
fn cost_of_a_spec_counts_by_streaming() {
    let dir = workspace();
    std::fs::write(
        dir.path().join("p.toml"),
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 7\nmodulus = 15\nexponent_bits = 4\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["cost", "p.toml", "--json"]);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert!(v["toffoli_at_most"].as_u64().unwrap() > 0, "{out}");
    assert!(v["qubits"].as_u64().unwrap() >= 8, "{out}");
    // The windows the spec fixes are the ones counted.
    std::fs::write(
        dir.path().join("w.toml"),
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 7\nmodulus = 15\nexponent_bits = 4\nexponent_window = 3\nmultiply_window = 2\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["cost", "w.toml", "--json"]);
    let (out, err) = text(&o);
    assert_eq!(o.status.code(), Some(0), "{err}");
    let w: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(
        w["construction"], "windowed: lookups addressed by 3 exponent bits and 2 factor bits",
        "{out}"
    );
    // A window key alone is an error at its line and column, exit 2.
    std::fs::write(
        dir.path().join("half.toml"),
        "kind = \"arithmetic\"\nop = \"power\"\nconstant = 7\nmodulus = 15\nexponent_bits = 4\nexponent_window = 3\n",
    )
    .unwrap();
    let o = run_in(dir.path(), &["cost", "half.toml"]);
    assert_eq!(o.status.code(), Some(2), "{:?}", text(&o));
    assert!(text(&o).1.contains("half.toml:6:19"), "{:?}", text(&o));
    // A function spec is not counted this way.
    let o = run_in(dir.path(), &["cost", "specs/greenhouse.toml"]);
    assert_eq!(o.status.code(), Some(2), "{:?}", text(&o));
    assert!(text(&o).1.contains("arithmetic specs only"));
}
