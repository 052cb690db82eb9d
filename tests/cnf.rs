//! DIMACS CNF formulas as Grover predicates: a `kind = "netlist"` spec with a
//! phase oracle marks the satisfying assignments; the marked count the
//! verifier reports is checked against a brute-force model count done here.

mod common;

use common::{run_in, text};

/// splitmix64 (Steele, Lea, Flood, OOPSLA 2014): fixed-seed formulas.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
}

/// A random 3-SAT formula: `clauses` clauses of three distinct variables,
/// each negated with probability 1/2 (the uniform random 3-SAT model; common
/// practice).
fn random_3sat(rng: &mut Rng, vars: usize, clauses: usize) -> Vec<[i64; 3]> {
    (0..clauses)
        .map(|_| {
            let mut c = [0i64; 3];
            let mut k = 0;
            while k < 3 {
                let r = rng.next();
                let v = (r % vars as u64) as i64 + 1;
                if c[..k].iter().any(|l| l.abs() == v) {
                    continue;
                }
                c[k] = if r >> 40 & 1 == 1 { -v } else { v };
                k += 1;
            }
            c
        })
        .collect()
}

fn dimacs(vars: usize, f: &[[i64; 3]]) -> String {
    let mut s = format!("c random 3-SAT\np cnf {vars} {}\n", f.len());
    for c in f {
        s += &format!("{} {} {} 0\n", c[0], c[1], c[2]);
    }
    s
}

/// Models counted by trying every assignment (variable `v` is bit `v - 1`).
fn brute_force_models(vars: usize, f: &[[i64; 3]]) -> u64 {
    (0..1u64 << vars)
        .filter(|x| {
            f.iter().all(|c| {
                c.iter().any(|&l| {
                    let bit = x >> (l.unsigned_abs() - 1) & 1 == 1;
                    bit == (l > 0)
                })
            })
        })
        .count() as u64
}

/// Random 3-SAT at clause ratio 4.26 (near the satisfiability threshold,
/// Mitchell, Selman, Levesque, AAAI 1992) and below it, 10 to 14 variables,
/// fixed seeds: each formula becomes a phase oracle through a netlist spec,
/// is synthesized and proven, and the marked count equals the model count.
#[test]
fn random_3sat_phase_oracles_mark_every_model() {
    let dir = tempfile::tempdir().unwrap();
    let mut rng = Rng(4_26);
    let mut some_unsat = false;
    let mut some_sat = false;
    for (k, (vars, ratio)) in [(10, 4.26), (12, 4.26), (14, 4.26), (12, 3.0), (14, 2.0)]
        .into_iter()
        .enumerate()
    {
        let clauses = (vars as f64 * ratio).round() as usize;
        let f = random_3sat(&mut rng, vars, clauses);
        let models = brute_force_models(vars, &f);
        some_unsat |= models == 0;
        some_sat |= models > 0;
        std::fs::write(dir.path().join(format!("f{k}.cnf")), dimacs(vars, &f)).unwrap();
        let spec = format!("kind = \"netlist\"\nfile = \"f{k}.cnf\"\n[oracle]\nform = \"phase\"\n");
        std::fs::write(dir.path().join(format!("f{k}.toml")), spec).unwrap();
        let o = run_in(
            dir.path(),
            &[
                "synth",
                &format!("f{k}.toml"),
                "--json",
                "-o",
                &format!("f{k}.qasm"),
            ],
        );
        let (out, err) = text(&o);
        assert_eq!(o.status.code(), Some(0), "{vars} vars: {err}");
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        assert_eq!(v["verification"]["verdict"], "proven", "{v}");
        assert_eq!(v["input_bits"], vars as u64, "{v}");
        assert_eq!(v["marked"], models, "{vars} vars, {clauses} clauses");
        println!(
            "{vars} vars, {clauses} clauses: {models} models, {} Toffolis, {} qubits ({})",
            v["cost"]["toffoli"], v["cost"]["qubits"], v["method"]
        );
    }
    // These seeds give both answers: an unsatisfiable formula marks nothing.
    assert!(some_sat && some_unsat);
}
