//! Verification at scale: SAT equivalence of wide adders, agreement of the SAT
//! and exhaustive routes, sharded checks, and the fault-injection campaign.

mod common;

use common::*;
use oraculum::mutate::mutants;
use oraculum::mutate::Fault;
use oraculum::pipeline::build_one;
use oraculum::verify::merge_shards;
use oraculum::verify::verify_shard;
use oraculum::verify::ShardError;
use oraculum::{
    parse_spec, verify, BuildOptions, Circuit, Method, Route, Spec, Verdict, VerifyOptions,
};

fn spec(text: &str) -> Spec {
    common::tables();
    parse_spec("t.toml", text).unwrap_or_else(|e| panic!("{e}"))
}

fn lowered(s: &Spec, m: Method) -> Circuit {
    common::tables();
    build_one(s, m, &BuildOptions::default(), &())
        .unwrap()
        .lowered
}

fn route(r: Route) -> VerifyOptions {
    VerifyOptions {
        route: r,
        ..VerifyOptions::default()
    }
}

fn proven(v: &Verdict) -> bool {
    matches!(v, Verdict::Proven { .. })
}

#[test]
fn sat_proves_32_and_64_bit_adders_and_refutes_a_dropped_gate() {
    for w in [32usize, 64] {
        let s = spec(&arith_toml("add", w, "carry_out = true"));
        let c = lowered(&s, Method::Structural);
        let v = verify(&c, &s, &VerifyOptions::default()).unwrap();
        assert!(matches!(v, Verdict::Proven { by: "sat", .. }), "{v:?}");
        // Drop one Toffoli in the middle of the carry chain.
        let k = c
            .gates()
            .iter()
            .enumerate()
            .filter(|(_, g)| g.controls().len() == 2)
            .map(|(k, _)| k)
            .nth(w / 2)
            .unwrap();
        let mut bad = c.clone();
        let mut gates = c.gates().to_vec();
        gates.remove(k);
        bad.set_gates(gates);
        let Verdict::Refuted { counterexample } =
            verify(&bad, &s, &VerifyOptions::default()).unwrap()
        else {
            panic!("a dropped Toffoli must be refuted")
        };
        // Confirm with the test's own simulator and plain arithmetic.
        let value = |name: &str| {
            counterexample
                .input
                .iter()
                .find(|r| r.register == name)
                .map(|r| r.value.unwrap() as u128)
                .unwrap_or(0)
        };
        let (a, b) = (value("a"), value("b"));
        let r = run_registers(&bad, &[("a", a), ("b", b)]);
        let mask = (1u128 << w) - 1;
        let right = r["b"] == (a + b) & mask && r["cout"] == (a + b) >> w && r["a"] == a;
        assert!(
            !right || r["anc"] != 0,
            "the counterexample must show a wrong result"
        );
    }
}

/// A small deterministic sample of a long list.
fn sample<T: Clone>(v: &[T], most: usize) -> Vec<T> {
    if v.len() <= most {
        return v.to_vec();
    }
    let step = v.len() as f64 / most as f64;
    (0..most)
        .map(|i| v[(i as f64 * step) as usize].clone())
        .collect()
}

/// The test's own equivalence check: every basis state of the free lines
/// (the lines of `c` outside `anc`), ancillae at 0, compared line by line.
/// Whether `c` and `m` agree on every basis state inside the spec's domain
/// (for a modular op, the registers it promises below the modulus).
fn same_function(c: &Circuit, m: &Circuit, s: &Spec) -> bool {
    let free: Vec<usize> = (0..c.width())
        .filter(|&i| c.lines()[i].register != "anc")
        .collect();
    let promise: Vec<(Vec<usize>, u64)> = match &s.body {
        oraculum::SpecBody::Arithmetic(a) => {
            let n = a.modulus.as_ref().map_or(0, |n| n.to_u64_digits()[0]);
            a.below_modulus()
                .iter()
                .map(|name| {
                    let lines = (0..c.width())
                        .filter(|&i| c.lines()[i].register == *name)
                        .collect();
                    (lines, n)
                })
                .collect()
        }
        _ => Vec::new(),
    };
    (0..1u64 << free.len()).all(|st| {
        let state = free
            .iter()
            .enumerate()
            .fold(0u64, |acc, (b, &l)| acc | ((st >> b) & 1) << l);
        let inside = promise.iter().all(|(lines, n)| {
            let v = lines
                .iter()
                .enumerate()
                .fold(0u64, |acc, (j, &l)| acc | ((state >> l) & 1) << j);
            v < *n
        });
        !inside || c.simulate(state) == m.simulate(state)
    })
}

struct Campaign {
    mutants: usize,
    refuted: usize,
    equivalent: usize,
    missed: usize,
}

fn campaign(s: &Spec, c: &Circuit, most: usize, tally: &mut Campaign, both_routes: bool) {
    for (fault, m) in sample(&mutants(c), most) {
        let changed = !same_function(c, &m, s);
        let v = verify(&m, s, &route(Route::Exhaustive)).unwrap();
        tally.mutants += 1;
        match (changed, proven(&v)) {
            (true, false) => tally.refuted += 1,
            (false, true) => tally.equivalent += 1,
            _ => {
                tally.missed += 1;
                eprintln!("missed: {fault:?}, changed = {changed}, verdict = {v:?}");
            }
        }
        if both_routes {
            let by_sat = verify(&m, s, &route(Route::Sat)).unwrap();
            assert_eq!(
                proven(&by_sat),
                proven(&v),
                "SAT and exhaustive disagree on a {fault:?} mutant"
            );
        }
    }
}

/// Fault injection over every demo spec small enough for the test's scalar
/// simulator, and over circuits of every method: no mutant is missed. The
/// SAT route is checked against the exhaustive one on the same mutants.
#[test]
fn mutation_campaign_misses_nothing() {
    let mut tally = Campaign {
        mutants: 0,
        refuted: 0,
        equivalent: 0,
        missed: 0,
    };
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("specs");
    let mut specs = 0;
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        let s = spec(&std::fs::read_to_string(&p).unwrap());
        let c = oraculum::build(&s, &BuildOptions::default())
            .unwrap()
            .lowered;
        let free = c.lines().iter().filter(|l| l.register != "anc").count();
        // Every mutant is a whole copy of the circuit: past a few hundred
        // gates (the period-finding demo has thousands) they fill the memory.
        if free > 12 || c.width() > 64 || c.gates().len() > 600 {
            continue;
        }
        campaign(&s, &c, 800, &mut tally, free <= 6);
        specs += 1;
    }
    assert!(specs >= 6, "most demo specs take part ({specs})");
    let generated = [
        ("kind = \"function\"\ninputs = [\"a\", \"b\", \"c\", \"d\"]\noutputs = [\"f\", \"g\"]\n[table]\nf = \"0x6996\"\ng = \"0xf888\"\n", Method::Esop),
        ("kind = \"function\"\ninputs = [\"a\", \"b\", \"c\", \"d\"]\noutputs = [\"f\"]\n[table]\nf = \"0x1ee1\"\n", Method::ReedMuller),
        ("kind = \"function\"\ninputs = [\"a\", \"b\", \"c\", \"d\"]\noutputs = [\"f\"]\n[table]\nf = \"0x7ff8\"\n", Method::EsopExact),
        ("kind = \"permutation\"\nwidth = 3\nimages = [7, 0, 1, 3, 4, 2, 6, 5]\n", Method::Transform),
    ];
    for (text, m) in generated {
        let s = spec(text);
        campaign(&s, &lowered(&s, m), 1500, &mut tally, true);
    }
    for (op, extra) in [
        ("add", "carry_out = true"),
        ("compare", "controlled = true\nrelation = \"<\""),
        ("add", "constant = 1\nmodulus = 5"),
    ] {
        let text = if extra.contains("modulus") {
            format!("kind = \"arithmetic\"\nop = \"{op}\"\n{extra}\n")
        } else {
            arith_toml(op, 3, extra)
        };
        let s = spec(&text);
        campaign(&s, &lowered(&s, Method::Structural), 1500, &mut tally, true);
    }
    eprintln!(
        "mutation campaign: {} mutants, {} refuted, {} equivalent, {} missed",
        tally.mutants, tally.refuted, tally.equivalent, tally.missed
    );
    assert!(tally.mutants > 5_000);
    assert!(tally.refuted > 0 && tally.equivalent > 0);
    assert_eq!(tally.missed, 0);
    assert_eq!(Fault::all().count(), 5);
}

#[test]
fn shards_merge_into_the_same_verdict_and_gaps_are_refused() {
    let s = spec(&arith_toml("add", 6, "carry_out = true\ncontrolled = true"));
    let c = lowered(&s, Method::Structural);
    let whole = verify(&c, &s, &VerifyOptions::default()).unwrap();
    let opts = VerifyOptions::default();
    let shards: Vec<_> = (0..5)
        .map(|k| verify_shard(&c, &s, &opts, k, 5, b"circuit", b"spec", &()).unwrap())
        .collect();
    let merged = merge_shards(&shards, &c, &s, b"circuit", b"spec").unwrap();
    match (&whole, &merged) {
        (Verdict::Proven { states: a, .. }, Verdict::Proven { states: b, .. }) => assert_eq!(a, b),
        other => panic!("{other:?}"),
    }
    let mut missing = shards.clone();
    missing.remove(3);
    assert!(
        matches!(merge_shards(&missing, &c, &s, b"circuit", b"spec"), Err(ShardError::Missing(m, 5)) if m == vec![3])
    );
    let mut doubled = shards.clone();
    doubled.push(shards[1].clone());
    assert!(matches!(
        merge_shards(&doubled, &c, &s, b"circuit", b"spec"),
        Err(ShardError::Duplicate(1))
    ));
    let other = verify_shard(&c, &s, &opts, 2, 5, b"another circuit", b"spec", &()).unwrap();
    let mut mixed = shards.clone();
    mixed[2] = other;
    assert!(matches!(
        merge_shards(&mixed, &c, &s, b"circuit", b"spec"),
        Err(ShardError::Mismatch(_))
    ));
    // A wrong circuit: some shard refutes, and so does the merge.
    let mut bad = c.clone();
    let mut gates = c.gates().to_vec();
    gates.remove(gates.len() / 2);
    bad.set_gates(gates);
    let shards: Vec<_> = (0..5)
        .map(|k| verify_shard(&bad, &s, &opts, k, 5, b"bad", b"spec", &()).unwrap())
        .collect();
    assert!(matches!(
        merge_shards(&shards, &bad, &s, b"bad", b"spec").unwrap(),
        Verdict::Refuted { .. }
    ));
}

#[test]
fn exhaustive_route_refuses_past_the_limit_and_sat_takes_over() {
    let s = spec(&arith_toml("compare", 20, "relation = \"<\""));
    let c = lowered(&s, Method::Structural);
    let small = VerifyOptions {
        max_states: 1 << 20,
        route: Route::Exhaustive,
        ..VerifyOptions::default()
    };
    assert!(matches!(
        verify(&c, &s, &small),
        Err(oraculum::VerifyError::TooLarge { .. })
    ));
    let auto = VerifyOptions {
        max_states: 1 << 20,
        ..VerifyOptions::default()
    };
    assert!(matches!(
        verify(&c, &s, &auto).unwrap(),
        Verdict::Proven { by: "sat", .. }
    ));
}

/// Circuit against circuit by SAT: two syntheses of the same 12-input function
/// are equivalent; dropping a gate from one is caught, and the counterexample
/// is confirmed by the test's own simulation.
#[test]
fn circuit_against_circuit() {
    let s = spec("kind = \"function\"\ninputs = [\"a\",\"b\",\"c\",\"d\",\"e\",\"f\",\"g\",\"h\",\"i\",\"j\",\"k\",\"l\"]\noutputs = [\"o\"]\n[expr]\no = \"(a & b | c ^ d) & (e | !f & g) ^ h & i & !j | k & l\"\n");
    let x = lowered(&s, Method::Bennett);
    let y = lowered(&s, Method::Esop);
    // A budget no machine runs out of: the verdicts do not depend on speed.
    let budget = std::time::Duration::from_secs(36_000);
    assert!(matches!(
        oraculum::verify::circuits_equivalent(&x, &y, budget).unwrap(),
        oraculum::verify::SatOutcome::Equivalent
    ));
    let mut bad = y.clone();
    let mut gates = y.gates().to_vec();
    gates.remove(gates.len() / 2);
    bad.set_gates(gates);
    match oraculum::verify::circuits_equivalent(&bad, &x, budget).unwrap() {
        oraculum::verify::SatOutcome::Counterexample(c) => {
            let state = c.state.unwrap();
            let xs = x.simulate(state) & ((1 << 13) - 1);
            let bs = bad.simulate(state);
            assert!(xs != bs & ((1 << 13) - 1) || bs >> 13 != 0);
        }
        other => panic!("{other:?}"),
    }
}
