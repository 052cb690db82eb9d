//! Property tests: random specs go through synthesis, lowering and the verifier;
//! exported OpenQASM agrees with an outside simulator; mutants are refuted.

mod common;

use common::*;
use oraculum::synth::esop_of;
use oraculum::synth::exact_esop;
use oraculum::{
    build, parse_spec, verify, BuildOptions, Circuit, Method, SpecBody, SynthLimits, Verdict,
    Verification, VerifyOptions,
};
use proptest::prelude::*;
use std::time::Duration;

fn built(toml: &str) -> oraculum::Outcome {
    run(toml, None)
}

fn built_with(toml: &str, method: Method) -> oraculum::Outcome {
    run(toml, Some(method))
}

fn run(toml: &str, method: Option<Method>) -> oraculum::Outcome {
    common::tables();
    let spec = parse_spec("random.toml", toml).expect("generated specs are valid");
    build(
        &spec,
        &BuildOptions {
            method,
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        },
    )
    .expect("build runs")
}

/// Runs a lowered function circuit on input `x` (targets and ancillae at 0), reading `y`.
/// The state is one bool per line, so circuits wider than 64 lines run too;
/// `rest` counts the ancillae left at 1.
fn run_function(c: &Circuit, n: usize, m: usize, x: u64) -> (u64, u64) {
    let mut state = vec![false; c.width()];
    for (i, s) in state.iter_mut().enumerate().take(n) {
        *s = x >> i & 1 == 1;
    }
    for g in c.gates() {
        if g.controls()
            .iter()
            .all(|k| state[k.line.0 as usize] == k.positive)
        {
            let t = g.target().0 as usize;
            state[t] = !state[t];
        }
    }
    let y = (0..m).fold(0u64, |a, j| a | (state[n + j] as u64) << j);
    let rest = state[n + m..].iter().filter(|&&b| b).count() as u64;
    (y, rest)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, ..ProptestConfig::default() })]

    #[test]
    fn random_functions_are_proven(f in arb_function(10, 4)) {
        let out = built(&f.to_toml());
        prop_assert!(out.verification.is_proven(), "{:?}", out.verification);
        prop_assert!(out.lowered.gates().iter().all(|g| g.controls().len() <= 2));
        // A direct check beside the verifier: a test-side model on every input.
        let (n, m) = (f.inputs, f.outputs.len());
        for x in 0..1u64 << n {
            let (y, rest) = run_function(&out.lowered, n, m, x);
            let want = f.eval(x).iter().enumerate().fold(0, |a, (j, &b)| a | (b as u64) << j);
            prop_assert_eq!(y, want, "input {}", x);
            prop_assert_eq!(rest, 0, "ancillae dirty on input {}", x);
        }
    }

    #[test]
    fn every_function_method_is_proven(f in arb_function(10, 4)) {
        let toml = f.to_toml();
        for m in [Method::ReedMuller, Method::Esop, Method::Bennett, Method::Xag, Method::Hierarchical] {
            let out = built_with(&toml, m);
            prop_assert!(out.verification.is_proven(), "{}: {:?}", m, out.verification);
        }
        // The table route of esop-exact is instant; the SAT route has its own test.
        if f.inputs <= 4 && f.outputs.len() == 1 {
            let exact = built_with(&toml, Method::EsopExact);
            prop_assert!(exact.verification.is_proven());
        }
        // auto is never worse than any single method it tries.
        let auto = built(&toml);
        let rm = built_with(&toml, Method::ReedMuller);
        prop_assert!(auto.cost.toffoli <= rm.cost.toffoli);
    }

    #[test]
    fn random_permutations_are_proven((w, images) in arb_permutation(6)) {
        let out = built(&permutation_toml(w, &images));
        prop_assert!(out.verification.is_proven(), "{:?}", out.verification);
        // A test-side simulation on every input (the circuit may pass 64
        // lines: permutations out of place take ancillae): the data lines
        // hold the image, every other line ends at 0.
        for (i, &img) in images.iter().enumerate() {
            let mut state = vec![false; out.lowered.width()];
            for (j, s) in state.iter_mut().enumerate().take(w) {
                *s = (i >> j) & 1 == 1;
            }
            for g in out.lowered.gates() {
                if g.controls().iter().all(|k| state[k.line.0 as usize] == k.positive) {
                    let t = g.target().0 as usize;
                    state[t] = !state[t];
                }
            }
            let data = (0..w).fold(0u64, |a, j| a | (state[j] as u64) << j);
            prop_assert_eq!(data, img);
            prop_assert!(state[w..].iter().all(|&b| !b), "an ancilla left at 1");
        }
    }

    /// Every single-gate drop or control flip that changes the function is refuted,
    /// and every one that does not is proven.
    #[test]
    fn mutants_are_caught(f in arb_function(4, 2), pick in any::<prop::sample::Index>()) {
        let spec = parse_spec("m.toml", &f.to_toml()).unwrap();
        let out = built(&f.to_toml());
        let c = &out.lowered;
        let bits = f.inputs + f.outputs.len();
        let mut mutants = Vec::new();
        for k in 0..c.gates().len() {
            let mut gates = c.gates().to_vec();
            gates.remove(k);
            mutants.push(gates);
            for j in 0..c.gates()[k].controls().len() {
                let mut gates = c.gates().to_vec();
                gates[k] = gates[k].with_flipped_control(j);
                mutants.push(gates);
            }
        }
        // All of them for small circuits; a sampled slice for large ones.
        let start = if mutants.len() > 64 { pick.index(mutants.len() - 64) } else { 0 };
        for gates in mutants.into_iter().skip(start).take(64) {
            let mut m = c.clone();
            m.set_gates(gates);
            let changed = (0..1u64 << bits).any(|s| m.simulate(s) != c.simulate(s));
            let verdict = verify(&m, &spec, &VerifyOptions::default()).unwrap();
            match verdict {
                Verdict::Refuted { counterexample } => {
                    prop_assert!(changed, "an equivalent mutant was refuted");
                    let s = counterexample.state.expect("small circuits number their states");
                    prop_assert_ne!(m.simulate(s), c.simulate(s), "the counterexample is not one");
                }
                Verdict::Proven { .. } => prop_assert!(!changed, "a wrong mutant was proven"),
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 16, ..ProptestConfig::default() })]

    /// The ESOP heuristic never claims fewer cubes than a proven minimum, and
    /// both ESOPs compute the function.
    #[test]
    fn heuristic_esop_is_never_below_the_exact_one(f in arb_function(5, 2)) {
        let spec = parse_spec("e.toml", &f.to_toml()).unwrap();
        let SpecBody::Function(fs) = &spec.body else { unreachable!() };
        let tables: Vec<_> = (0..fs.outputs.len()).map(|j| fs.table(j).unwrap()).collect();
        let exact = exact_esop(&tables, Duration::from_secs(3));
        let heur = esop_of(fs, &SynthLimits::default()).unwrap();
        for (j, t) in tables.iter().enumerate() {
            prop_assert_eq!(&exact.esop.table(j), t);
            prop_assert_eq!(&heur.table(j), t);
        }
        prop_assert!(heur.cubes() >= exact.lower_bound);
        if exact.is_minimal() {
            prop_assert!(heur.cubes() >= exact.esop.cubes());
        }
    }

}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    /// The exported OpenQASM 2, run by the `qasmsim` crate, gives the spec's outputs.
    #[test]
    fn qasm_agrees_with_an_outside_simulator(f in arb_function(5, 3), seeds in prop::collection::vec(any::<u64>(), 4)) {
        let out = built(&f.to_toml());
        prop_assume!(out.lowered.width() <= 14);
        let qasm = out.qasm().unwrap();
        let (n, m) = (f.inputs, f.outputs.len());
        for seed in seeds {
            let x = seed % (1 << n);
            let y0 = (seed >> 32) % (1 << m);
            let mut set: Vec<(String, usize)> = (0..n).filter(|i| (x >> i) & 1 == 1).map(|i| ("x".to_string(), i)).collect();
            set.extend((0..m).filter(|j| (y0 >> j) & 1 == 1).map(|j| ("y".to_string(), j)));
            let got = qasmsim_run(&qasm, &set);
            let want = f.eval(x).iter().enumerate().fold(y0, |a, (j, &b)| a ^ (b as u64) << j);
            prop_assert_eq!(got["x"], x);
            prop_assert_eq!(got["y"], want);
            if let Some(a) = got.get("anc") { prop_assert_eq!(*a, 0); }
        }
    }

    #[test]
    fn permutation_qasm_agrees_with_an_outside_simulator((w, images) in arb_permutation(4), pick in 0usize..16) {
        let out = built(&permutation_toml(w, &images));
        let qasm = out.qasm().unwrap();
        let i = pick % images.len();
        let set: Vec<(String, usize)> = (0..w).filter(|b| (i >> b) & 1 == 1).map(|b| ("x".to_string(), b)).collect();
        let got = qasmsim_run(&qasm, &set);
        prop_assert_eq!(got["x"], images[i]);
        if let Some(a) = got.get("anc") { prop_assert_eq!(*a, 0); }
    }
}

#[test]
fn skipped_verification_is_reported_as_skipped() {
    let spec = parse_spec(
        "s.toml",
        "kind = \"permutation\"\nwidth = 1\nimages = [1, 0]\n",
    )
    .unwrap();
    let out = build(
        &spec,
        &BuildOptions {
            method: None,
            verify: None,
            ..Default::default()
        },
    )
    .unwrap();
    assert!(matches!(out.verification, Verification::Skipped { .. }));
    assert!(!out.verification.is_proven());
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 500, ..ProptestConfig::default() })]

    /// The optimizer keeps the function of random circuits (up to 8 lines and
    /// 60 gates), never makes them longer once lowered, and never raises the
    /// lowered Toffoli count.
    #[test]
    fn optimizer_keeps_the_function(c in (1usize..=8).prop_flat_map(|w| arb_circuit(w, 60))) {
        let mut o = c.clone();
        oraculum::opt::optimize(&mut o);
        prop_assert!(o.gates().len() <= c.gates().len());
        prop_assert!(oraculum::lower(&o).gates().len() <= oraculum::lower(&c).gates().len());
        for s in 0..1u64 << c.width() {
            prop_assert_eq!(o.simulate(s), c.simulate(s));
        }
        let toffolis = |x: &Circuit| oraculum::lower(x).gates().iter().filter(|g| g.controls().len() == 2).count();
        prop_assert!(toffolis(&o) <= toffolis(&c), "{} > {}", toffolis(&o), toffolis(&c));
    }
}

/// A random chain of `[let]` definitions over `n` inputs: definition `i` may
/// read the inputs and every earlier definition; one output reads all.
fn arb_definitions(n: usize) -> impl Strategy<Value = (Vec<TExpr>, TExpr)> {
    (1usize..=6).prop_flat_map(move |k| {
        let defs: Vec<_> = (0..k).map(|i| arb_expr(n + i).boxed()).collect();
        (defs, arb_expr(n + k))
    })
}

/// Evaluates definitions and output on `x`, the test's own way: each
/// definition once, in order.
fn eval_definitions(n: usize, defs: &[TExpr], out: &TExpr, x: u64) -> bool {
    let mut v = x;
    for (i, d) in defs.iter().enumerate() {
        v |= (d.eval(v) as u64) << (n + i);
    }
    out.eval(v)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    /// Shared `[let]` nodes (one node per definition, referenced by every use)
    /// give the same function as expanding each definition's text into every
    /// use, the way definitions were read before they were shared.
    #[test]
    fn shared_definitions_mean_what_their_expansion_means(
        (n, (defs, out)) in (2usize..=7).prop_flat_map(|n| (Just(n), arb_definitions(n)))
    ) {
        let inputs = input_names(n);
        let mut names = inputs.clone();
        let mut expanded = inputs.clone();
        let mut lets = String::new();
        for (i, d) in defs.iter().enumerate() {
            lets.push_str(&format!("d{i} = \"{}\"\n", d.render(&names)));
            expanded.push(format!("({})", d.render(&expanded)));
            names.push(format!("d{i}"));
        }
        let quoted: Vec<String> = inputs.iter().map(|s| format!("\"{s}\"")).collect();
        let head = format!("kind = \"function\"\ninputs = [{}]\noutputs = [\"f\"]\n", quoted.join(", "));
        let shared = format!("{head}[let]\n{lets}[expr]\nf = \"{}\"\n", out.render(&names));
        let inline = format!("{head}[expr]\nf = \"{}\"\n", out.render(&expanded));
        for toml in [&shared, &inline] {
            let o = built_with(toml, Method::Bennett);
            prop_assert!(o.verification.is_proven(), "{:?}", o.verification);
            for x in 0..1u64 << n {
                let (y, rest) = run_function(&o.lowered, n, 1, x);
                prop_assert_eq!(y == 1, eval_definitions(n, &defs, &out, x), "input {}", x);
                prop_assert_eq!(rest, 0);
            }
        }
        // And each spec proves the other's circuit.
        let a = parse_spec("shared.toml", &shared).unwrap();
        let b = parse_spec("inline.toml", &inline).unwrap();
        let ca = built_with(&shared, Method::Bennett).lowered;
        let cb = built_with(&inline, Method::Bennett).lowered;
        let ab = verify(&ca, &b, &VerifyOptions::default()).unwrap();
        let ba = verify(&cb, &a, &VerifyOptions::default()).unwrap();
        prop_assert!(matches!(ab, Verdict::Proven { .. }), "{:?}", ab);
        prop_assert!(matches!(ba, Verdict::Proven { .. }), "{:?}", ba);
    }
}
