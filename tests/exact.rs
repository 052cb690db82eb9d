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

/// Four lines: the breadth-first table reproduces the number of functions of
/// minimum size 0 to 5 over the 32-gate library (Golubitsky and Maslov, IEEE
/// Trans. Computers 61(9), 2012; checks.md), meet-in-the-middle queries find
/// circuits no longer than a known one of up to 10 gates, and the disk cache
/// is rebuilt when corrupt.
#[test]
fn four_lines_table_queries_and_cache() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("t.bin");
    let (t, built) = oraculum::Exact4::load_or_build(&path);
    assert!(built);
    assert_eq!(t.distribution(), vec![1, 32, 784, 16204, 294507, 4807552]);
    let (again, built) = oraculum::Exact4::load_or_build(&path);
    assert!(!built, "the cache is used");
    assert_eq!(again.distribution(), t.distribution());
    let mut bytes = std::fs::read(&path).unwrap();
    let mid = bytes.len() / 2;
    bytes[mid] ^= 0x5a;
    std::fs::write(&path, &bytes).unwrap();
    let (_, built) = oraculum::Exact4::load_or_build(&path);
    assert!(built, "a corrupt cache is rebuilt");

    // Random circuits of k gates: the query's circuit is no longer and computes the same.
    let mut seed = 99u64;
    let mut next = || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        seed >> 33
    };
    for k in [0usize, 3, 6, 8, 10] {
        for _ in 0..3 {
            let mut images: Vec<u64> = (0..16).collect();
            for _ in 0..k {
                let target = next() % 4;
                let controls = (next() % 16) & !(1 << target);
                for v in images.iter_mut() {
                    if *v & controls == controls {
                        *v ^= 1 << target;
                    }
                }
            }
            let gates = t.query(&images).expect("at most 10 gates");
            assert!(gates.len() <= k, "{} > {k}", gates.len());
            for (i, &want) in images.iter().enumerate() {
                assert_eq!(gates.iter().fold(i as u64, |s, g| g.apply(s)), want);
            }
        }
    }
}
