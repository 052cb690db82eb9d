//! Exact synthesis on three lines against the published optimum of every
//! 3-bit reversible function (Shende, Prasad, Markov, Hayes, IEEE TCAD 22(6),
//! 2003; checks.md), every circuit proven by the verifier.

use oraculum::logic::Permutation;
use oraculum::Tables;
use oraculum::{verify, Circuit, OracleForm, Spec, SpecBody, Verdict, VerifyOptions};

#[test]
fn every_3_bit_function_gets_its_minimum_and_verifies() {
    let table = Tables::get().exact3(3);
    let mut counts = vec![0usize; 9];
    let mut images: Vec<u64> = (0..8).collect();
    // Heap's algorithm: all 40,320 permutations of 0..8.
    let mut c = [0usize; 8];
    let visit = |images: &[u64], counts: &mut Vec<usize>| {
        let gates = table.circuit(images);
        counts[gates.len()] += 1;
        let mut circuit = Circuit::new(oraculum::spec::permutation_layout(3).lines());
        for g in gates {
            circuit.push(g);
        }
        let spec = Spec {
            name: None,
            body: SpecBody::Permutation(Permutation::new(3, images.to_vec()).unwrap()),
            form: OracleForm::Xor,
            registers: Vec::new(),
            controlled: false,
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

/// A fixed-seed linear congruential generator (Knuth's MMIX constants).
fn lcg(mut seed: u64) -> impl FnMut() -> u64 {
    move || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        seed >> 33
    }
}

fn random_circuit_images(k: usize, next: &mut impl FnMut() -> u64) -> Vec<u64> {
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
    images
}

fn runs(gates: &[oraculum::Gate], images: &[u64]) -> bool {
    images
        .iter()
        .enumerate()
        .all(|(i, &want)| gates.iter().fold(i as u64, |s, g| g.apply(s)) == want)
}

/// Four lines: the symmetry-reduced breadth-first table reproduces the number
/// of functions of minimum size 0 to 6 over the 32-gate library (Golubitsky
/// and Maslov, IEEE Trans. Computers 61(9), 2012; checks.md), queries past
/// the table find circuits no longer than a known one and prove them minimal,
/// a function past the table's reach gets a proven bound, and the disk cache
/// is used, and rebuilt when corrupt or of another depth.
#[test]
fn four_lines_table_queries_and_cache() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("t.bin");
    let quiet = |_: oraculum::exact::BuildProgress| {};
    let (t, built) = oraculum::exact::Exact4::load_or_build(&path, 6, &quiet);
    assert!(built);
    assert_eq!(
        t.distribution(),
        vec![1, 32, 784, 16204, 294507, 4807552, 70763560]
    );
    // A class has at most 48 members (24 relabellings, inversion), so at
    // least functions / 48 classes; the identity, NOT, CNOT, Toffoli and
    // 3-control Toffoli classes are the first two levels' 1 + 4.
    for l in t.levels() {
        assert!(l.classes * 48 >= l.functions && l.classes <= l.functions);
    }
    assert_eq!(t.levels()[1].classes, 4);
    let (again, built) = oraculum::exact::Exact4::load_or_build(&path, 6, &quiet);
    assert!(!built, "the cache is used");
    assert_eq!(again.levels(), t.levels());
    let (_, built) = oraculum::exact::Exact4::load_or_build(&path, 5, &quiet);
    assert!(built, "a table of another depth is rebuilt");
    let (_, built) = oraculum::exact::Exact4::load_or_build(&path, 6, &quiet);
    assert!(built);
    let mut bytes = std::fs::read(&path).unwrap();
    let mid = bytes.len() / 2;
    bytes[mid] ^= 0x5a;
    std::fs::write(&path, &bytes).unwrap();
    assert!(
        oraculum::exact::Exact4::load(&path).is_none(),
        "corruption is caught"
    );
    let (_, built) = oraculum::exact::Exact4::load_or_build(&path, 6, &quiet);
    assert!(built, "a corrupt cache is rebuilt");
    std::fs::write(&path, &bytes[..bytes.len() - 9]).unwrap();
    assert!(
        oraculum::exact::Exact4::load(&path).is_none(),
        "truncation is caught"
    );

    // Random circuits of k gates: the circuit found is no longer, computes
    // the same, and is proven minimal (depth 6 reaches 12 gates).
    let mut next = lcg(99);
    assert_eq!(t.reach(), 12);
    // A budget no machine runs out of: the verdicts do not depend on speed.
    let budget = std::time::Duration::from_secs(36_000);
    for k in [0usize, 3, 6, 7, 9, 11] {
        for _ in 0..3 {
            let images = random_circuit_images(k, &mut next);
            let r = t.solve(&images, budget);
            assert!(r.minimal, "{k} gates are within reach");
            assert!(r.gates.len() <= k, "{} > {k}", r.gates.len());
            assert_eq!(r.lower_bound, r.gates.len());
            assert!(runs(&r.gates, &images));
        }
    }
    // Minima are consistent: a circuit of k gates followed by one gate needs
    // at most one gate more, and at least one fewer.
    for _ in 0..10 {
        let images = random_circuit_images(9, &mut next);
        let r = t.solve(&images, budget);
        let g = next() % 4;
        let more: Vec<u64> = images.iter().map(|v| v ^ (1 << g)).collect();
        let s = t.solve(&more, budget);
        assert!(s.minimal && r.minimal);
        assert!(s.gates.len().abs_diff(r.gates.len()) <= 1);
    }
    // Past the passes, the search tries the 64 neighbours of the function:
    // a depth-4 table reaches 8 gates that way. Every random 8-gate circuit
    // gets the same minimum from it as from the depth-6 table, which finds
    // those directly.
    let (small, _) = oraculum::exact::Exact4::load_or_build(&dir.path().join("s.bin"), 4, &quiet);
    assert_eq!(small.reach(), 8);
    let mut eights = 0;
    for _ in 0..12 {
        let images = random_circuit_images(8, &mut next);
        let (a, b) = (small.solve(&images, budget), t.solve(&images, budget));
        assert!(a.minimal && b.minimal);
        assert_eq!(a.gates.len(), b.gates.len());
        assert!(runs(&a.gates, &images));
        eights += (a.gates.len() == 8) as usize;
    }
    assert!(eights > 0, "some random 8-gate circuits are minimal");
    // A random function almost surely needs more than 8 gates (99.6% of
    // the 10,000 in the transform benchmark, BENCHMARKS.md): the depth-4
    // table proves the bound 9 and claims no circuit.
    let mut v: Vec<u64> = (0..16).collect();
    for i in (1..16).rev() {
        v.swap(i, (next() % (i as u64 + 1)) as usize);
    }
    let far = small.solve(&v, budget);
    if t.solve(&v, budget).gates.len() > 8 {
        assert!(!far.minimal && far.gates.is_empty());
        assert_eq!(far.lower_bound, 9);
    }
    // A zero budget stops the search at once with the bound it has proven:
    // the function is not in the table, so it needs at least 7 gates.
    let images = random_circuit_images(11, &mut next);
    if t.solve(&images, budget).gates.len() > 6 {
        let r = t.solve(&images, std::time::Duration::ZERO);
        assert!(!r.minimal);
        assert_eq!(r.lower_bound, 7);
    }
}

/// The depth-7 table: 932,651,938 functions need exactly 7 gates (checks.md
/// gives this from memory of Golubitsky and Maslov 2012), and every function
/// count is the sum of its classes' sizes found by the build.
#[test]
fn four_lines_seven_gates() {
    let t = oraculum::exact::Exact4::build(7, &|_| {});
    assert_eq!(t.distribution()[7], 932_651_938);
    assert_eq!(t.reach(), 14);
    // The depth-6 table reaches 12 gates through the neighbours of a
    // function; the depth-7 table finds those sizes with its passes, and
    // both agree on random 12-gate circuits.
    let six = oraculum::exact::Exact4::build(6, &|_| {});
    let mut next = lcg(5);
    let budget = std::time::Duration::from_secs(36_000);
    for _ in 0..4 {
        let images = random_circuit_images(12, &mut next);
        let (a, b) = (six.solve(&images, budget), t.solve(&images, budget));
        assert!(a.minimal && b.minimal);
        assert_eq!(a.gates.len(), b.gates.len());
        assert!(runs(&a.gates, &images) && runs(&b.gates, &images));
    }
    // Random 12-gate circuits mostly shrink; half of all random functions
    // need exactly 12 (BENCHMARKS.md), so take three of those.
    let mut twelves = 0;
    for _ in 0..40 {
        let mut v: Vec<u64> = (0..16).collect();
        for i in (1..16).rev() {
            v.swap(i, (next() % (i as u64 + 1)) as usize);
        }
        let b = t.solve(&v, budget);
        if b.gates.len() != 12 {
            continue;
        }
        let a = six.solve(&v, budget);
        assert!(a.minimal && b.minimal);
        assert_eq!(a.gates.len(), 12);
        assert!(runs(&a.gates, &v));
        twelves += 1;
        if twelves == 3 {
            break;
        }
    }
    assert_eq!(twelves, 3, "three of 40 random functions need 12 gates");
    // The MMD example needs 6 gates on 3 lines and hwb3 needs 7 (checks.md);
    // with a fourth, idle line the 32-gate library can do no worse, and the
    // circuit found is proven minimal and correct.
    for (three, most) in [
        (vec![7, 0, 1, 3, 4, 2, 6, 5], 6),
        (vec![0, 2, 4, 5, 1, 6, 3, 7], 7),
    ] {
        let images: Vec<u64> = (0..16u64)
            .map(|x| (x & 8) | three[(x & 7) as usize])
            .collect();
        let r = t.solve(&images, std::time::Duration::from_secs(36_000));
        assert!(r.minimal);
        assert!(r.gates.len() <= most, "{three:?}: {}", r.gates.len());
        assert!(runs(&r.gates, &images));
    }
}
