//! Exact synthesis on three lines against the published optimum of every
//! 3-bit reversible function (Shende, Prasad, Markov, Hayes, IEEE TCAD 22(6),
//! 2003; checks.md), every circuit proven by the verifier.

use oraculum::{
    permutation_lines, verify, Circuit, Exact3, OracleForm, Permutation, Spec, SpecBody, Verdict,
    VerifyOptions,
};

#[test]
fn every_3_bit_function_gets_its_minimum_and_verifies() {
    let table = Exact3::get();
    let mut counts = vec![0usize; 9];
    let mut images: Vec<u64> = (0..8).collect();
    // Heap's algorithm: all 40,320 permutations of 0..8.
    let mut c = [0usize; 8];
    let visit = |images: &[u64], counts: &mut Vec<usize>| {
        let gates = table.circuit(images);
        counts[gates.len()] += 1;
        let mut circuit = Circuit::new(permutation_lines(3));
        for g in gates {
            circuit.push(g);
        }
        let spec = Spec {
            name: None,
            body: SpecBody::Permutation(Permutation::new(3, images.to_vec()).unwrap()),
            form: OracleForm::Xor,
        };
        let v = verify(&circuit, &spec, &VerifyOptions::default()).unwrap();
        assert!(matches!(v, Verdict::Proven { .. }), "{images:?}");
    };
    visit(&images, &mut counts);
    let mut i = 0;
    while i < 8 {
        if c[i] < i {
            if i % 2 == 0 {
                images.swap(0, i);
            } else {
                images.swap(c[i], i);
            }
            visit(&images, &mut counts);
            c[i] += 1;
            i = 0;
        } else {
            c[i] = 0;
            i += 1;
        }
    }
    assert_eq!(counts, vec![1, 12, 102, 625, 2780, 8921, 17049, 10253, 577]);
    let total: usize = counts.iter().enumerate().map(|(k, n)| k * n).sum();
    assert!((total as f64 / 40320.0 - 5.8655).abs() < 5e-5);
}
