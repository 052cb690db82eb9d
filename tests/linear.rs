//! Affine permutations by Gaussian elimination (method `linear`), proven by
//! the verifier: the Gray code on n lines in n - 1 CNOTs (the figure;
//! common practice: each output bit XORs two neighbouring inputs), and `auto`
//! picks it over transformation-based synthesis.

mod common;

use oraculum::pipeline::build_one;
use oraculum::{build, parse_spec, BuildOptions, Method};

fn gray_spec(n: usize) -> String {
    let images: Vec<u64> = (0..1u64 << n).map(|x| x ^ (x >> 1)).collect();
    common::permutation_toml(n, &images)
}

#[test]
fn the_gray_code_is_proven_in_n_minus_1_cnots() {
    for n in [2usize, 5, 10] {
        let spec = parse_spec("gray", &gray_spec(n)).unwrap();
        let opts = BuildOptions {
            verify: Some(Default::default()),
            ..BuildOptions::default()
        };
        let o = build_one(&spec, Method::Linear, &opts, &()).unwrap();
        assert!(o.verification.is_proven(), "n = {n}: {:?}", o.verification);
        assert_eq!(o.cost.cnot, n - 1, "n = {n}");
        assert_eq!((o.cost.toffoli, o.cost.not), (0, 0), "n = {n}");
        // auto runs linear beside the transformation-based methods and keeps
        // a circuit no worse.
        let auto = build(&spec, &opts).unwrap();
        assert!(auto.verification.is_proven());
        assert_eq!(auto.cost.toffoli, 0);
        assert!(
            auto.cost.cnot + auto.cost.not < n,
            "n = {n}: {:?}",
            auto.cost
        );
    }
}

#[test]
fn a_permutation_that_is_not_affine_is_refused_with_the_reason() {
    // lamp-cycle: 0 -> 3, 1 -> 8, 2 -> 14, so an affine map would send 3 to
    // 8 ^ 14 ^ 3 = 5; it sends 3 to 1.
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/specs/lamp-cycle.toml"
    ))
    .unwrap();
    let spec = parse_spec("lamp-cycle", &text).unwrap();
    let e = build_one(&spec, Method::Linear, &BuildOptions::default(), &()).unwrap_err();
    assert!(e.to_string().contains("affine"), "{e}");
}
