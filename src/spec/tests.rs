//! Unit tests of the spec reader: kinds, keys, errors and their locations.
use super::*;

fn err(text: &str) -> SpecError {
    parse_spec("t.toml", text).unwrap_err()
}

fn at(e: &SpecError) -> (usize, usize) {
    (e.location.line, e.location.column)
}

#[test]
fn design_example_parses() {
    let s = parse_spec(
        "t.toml",
        r#"
kind = "function"
name = "greenhouse-vent"
inputs = ["hot", "humid", "night"]
outputs = ["vent", "fan"]

[table]
vent = "0x3e"

[expr]
fan = "hot & !night | humid ^ hot"
"#,
    )
    .unwrap();
    assert_eq!(s.name.as_deref(), Some("greenhouse-vent"));
    let SpecBody::Function(f) = s.body else {
        panic!("function kind")
    };
    assert_eq!(f.inputs, ["hot", "humid", "night"]);
    assert_eq!(f.table(0).unwrap().to_hex(), "0x3e");
    // hot & !night | (humid ^ hot), by precedence.
    let fan = f.table(1).unwrap();
    for i in 0..8 {
        let (hot, humid, night) = (i & 1 == 1, i & 2 == 2, i & 4 == 4);
        assert_eq!(fan.get(i), (hot && !night) || (humid ^ hot));
    }
}

#[test]
fn constants_past_the_toml_integer_range() {
    let s = parse_spec(
        "t.toml",
        "kind = \"arithmetic\"\nop = \"add\"\nwidth = 64\nconstant = \"0xffff_ffff_ffff_fffe\"\n",
    )
    .unwrap();
    let SpecBody::Arithmetic(a) = s.body else {
        panic!("arithmetic")
    };
    assert_eq!(a.constant, Some(BigUint::from(u64::MAX - 1)));
    let e = err("kind = \"arithmetic\"\nop = \"add\"\nwidth = 8\nconstant = \"twelve\"\n");
    assert_eq!(at(&e), (4, 12), "{e}");
    assert_eq!(e.kind, SpecErrorKind::NotANumber("constant"));
    let e = err("kind = \"arithmetic\"\nop = \"add\"\nwidth = 8\nconstant = 300\n");
    assert!(
        matches!(e.kind, SpecErrorKind::DoesNotFit { bits: 8, .. }),
        "{e}"
    );
}

#[test]
fn definitions_resolve_in_any_order_and_cycles_are_refused() {
    let s = parse_spec(
        "t.toml",
        "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"f\"]\n[let]\nz = \"y & c\"\ny = \"a ^ b\"\n[expr]\nf = \"z | !y\"\n",
    )
    .unwrap();
    let SpecBody::Function(f) = s.body else {
        panic!()
    };
    let t = f.table(0).unwrap();
    for x in 0..8 {
        let (a, b, c) = (x & 1 == 1, x & 2 == 2, x & 4 == 4);
        assert_eq!(t.get(x), !(a ^ b) || c);
    }
    let e = err("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\np = \"q & a\"\nq = \"p\"\n[expr]\nf = \"p\"\n");
    assert!(matches!(e.kind, SpecErrorKind::Cycle(_)), "{e}");
    assert_eq!(e.location.line, 5);
    let e = err("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\na = \"1\"\n[expr]\nf = \"a\"\n");
    assert_eq!(e.kind, SpecErrorKind::NameTwice("a".into()));
}

#[test]
fn shared_definitions_count_once() {
    // Doubling definitions: 2^25 nodes if substituted, 51 shared.
    let mut text = String::from(
        "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\nd0 = \"a\"\n",
    );
    for i in 1..26 {
        text.push_str(&format!("d{i} = \"d{} ^ d{}\"\n", i - 1, i - 1));
    }
    text.push_str("[expr]\nf = \"d25 ^ a\"\n");
    let s = parse_spec("t.toml", &text).unwrap();
    let SpecBody::Function(f) = s.body else {
        panic!()
    };
    assert!(f.dag.len() < 60, "{}", f.dag.len());
    // d_i is 0 for i >= 1 (x ^ x), so f = a.
    assert_eq!(f.table(0).unwrap().to_hex(), "0x2");
}

#[test]
fn locations_of_common_mistakes() {
    let e =
        err("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[expr]\nf = \"a & b\"\n");
    assert_eq!(at(&e), (5, 10), "{e}");
    let e = err("kind = \"permutation\"\nwidth = 2\nimages = [0, 1, 1, 3]\n");
    assert_eq!(at(&e), (3, 17), "{e}");
    let e = err("kind = \"permutation\"\nwidht = 2\n");
    assert_eq!(at(&e).0, 2, "{e}");
    assert!(matches!(e.kind, SpecErrorKind::UnknownKey { .. }), "{e}");
    let e = err("kind = \"permutation\"\ninputs = [\"a\"]\n");
    assert!(matches!(e.kind, SpecErrorKind::KeyNotForKind { .. }), "{e}");
}
