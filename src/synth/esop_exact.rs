//! Exact minimum ESOPs for functions of at most 5 inputs.
//!
//! Single-output functions of up to 4 inputs: breadth-first search over XORs of
//! cubes from the constant 0, once per input count, over all `2^(2^n)`
//! functions and `3^n` cubes (for 4 inputs: 65,536 functions, 81 cubes; about
//! 5 million steps, built on first use). The table gives the minimum and one
//! minimum ESOP of every function.
//!
//! Everything else up to 5 inputs (and multi-output functions, where a cube
//! shared by outputs counts once): a SAT encoding solved by CaDiCaL. "Is there
//! an ESOP of `k` cubes?" becomes clauses over each cube's literals and output
//! links, each cube's value on each input pattern, and an XOR chain per output
//! and pattern (Tseitin). Starting from the heuristic's size, `k` falls until
//! the solver proves `k` impossible; that proves the last solution minimal. A
//! time budget stops the descent and reports the best ESOP with its proven
//! lower bound.

use super::esop::{esop_circuit, minimize_tables};
use super::{SynthError, SynthLimits, Synthesis};
use crate::exact::Tables;
use crate::limit::{Limit, Stop};
use crate::logic::{Cube, Esop, TruthTable};
use crate::spec::FunctionSpec;
use std::time::{Duration, Instant};

/// Most inputs `esop-exact` takes.
pub const EXACT_ESOP_MAX_INPUTS: usize = 5;

/// What the exact search found.
#[derive(Clone, Debug)]
pub struct ExactEsop {
    /// The best ESOP found.
    pub esop: Esop,
    /// A proven lower bound on the number of cubes; equal to `esop.cubes()` when
    /// the ESOP is proven minimal.
    pub lower_bound: usize,
}

impl ExactEsop {
    /// Whether the ESOP is proven minimal.
    pub fn is_minimal(&self) -> bool {
        self.lower_bound == self.esop.cubes()
    }
}

/// The `esop-exact` method: a minimum ESOP (or the best within the search
/// budget, with its proven bound), one gate per cube and output.
pub(super) fn esop_exact_circuit(
    f: &FunctionSpec,
    limits: &SynthLimits,
) -> Result<Synthesis, SynthError> {
    let n = f.inputs.len();
    if n > EXACT_ESOP_MAX_INPUTS {
        return Err(SynthError::NotApplicable {
            method: "esop-exact",
            kind: "function",
            hint: "it takes at most 5 inputs; use esop",
        });
    }
    let tables: Vec<_> = (0..f.outputs.len())
        .map(|j| f.table(j).expect("at most 5 inputs"))
        .collect();
    let budget = Duration::from_secs_f64(limits.exact_seconds.max(0.0));
    let r = exact_esop(&tables, budget);
    let (note, stop) = if r.is_minimal() {
        (
            format!("esop-exact: {} cubes, proven minimal", r.esop.cubes()),
            None,
        )
    } else {
        (
            format!(
                "esop-exact: {} cubes, NOT proven minimal: the search stopped at the time budget with a proven lower bound of {} cubes",
                r.esop.cubes(),
                r.lower_bound
            ),
            Some(Stop {
                limit: Some(Limit::SearchSeconds),
                bound: r.lower_bound,
                unit: "cubes",
            }),
        )
    };
    Ok(Synthesis {
        circuit: esop_circuit(f, &r.esop),
        notes: vec![note],
        stop,
    })
}

/// The exact minimum ESOP of `tables` (all over the same at most 5 inputs),
/// within `budget`.
pub fn exact_esop(tables: &[TruthTable], budget: Duration) -> ExactEsop {
    let n = tables[0].vars();
    assert!(n <= EXACT_ESOP_MAX_INPUTS, "checked by the caller");
    if tables.len() == 1 && (1..=4).contains(&n) {
        let t = Tables::get().esop(n);
        let f = tables[0].words()[0] as usize;
        let cubes = t.esop(f);
        let k = cubes.len();
        return ExactEsop {
            esop: Esop {
                vars: n,
                terms: cubes.into_iter().map(|c| (c, 1)).collect(),
            },
            lower_bound: k,
        };
    }
    let start = Instant::now();
    let mut best = minimize_tables(tables);
    // A lower bound: no output can do with fewer cubes than its own minimum
    // where a table exists; otherwise 1 for a non-zero function.
    let mut lower = tables
        .iter()
        .map(|t| {
            if (1..=4).contains(&n) {
                Tables::get().esop(n).size(t.words()[0] as usize)
            } else {
                (t.count_ones() > 0) as usize
            }
        })
        .max()
        .unwrap_or(0);
    while best.cubes() > lower {
        let left = budget.saturating_sub(start.elapsed());
        if left.is_zero() {
            break;
        }
        match solve(tables, best.cubes() - 1, left) {
            Some(Some(e)) => best = e,
            Some(None) => lower = best.cubes(),
            None => break,
        }
    }
    ExactEsop {
        esop: best,
        lower_bound: lower,
    }
}

/// Is there an ESOP of at most `k` cubes? `None` when the budget ran out.
// Indices name the variables of the encoding (cube j, input i, pattern x).
#[allow(clippy::needless_range_loop)]
fn solve(tables: &[TruthTable], k: usize, budget: Duration) -> Option<Option<Esop>> {
    let n = tables[0].vars();
    let m = tables.len();
    let points = 1usize << n;
    let (mut s, mut var) = super::sat_solver(budget);
    // care[j][i], pol[j][i], out[j][t]
    let care: Vec<Vec<i32>> = (0..k).map(|_| (0..n).map(|_| var()).collect()).collect();
    let pol: Vec<Vec<i32>> = (0..k).map(|_| (0..n).map(|_| var()).collect()).collect();
    let out: Vec<Vec<i32>> = (0..k).map(|_| (0..m).map(|_| var()).collect()).collect();
    // miss[j][i][b]: cube j has input i with polarity b.
    let mut miss = vec![vec![[0i32; 2]; n]; k];
    for j in 0..k {
        for i in 0..n {
            for (b, slot) in miss[j][i].iter_mut().enumerate() {
                let e = var();
                *slot = e;
                let p = if b == 1 { pol[j][i] } else { -pol[j][i] };
                s.add_clause([-e, care[j][i]]);
                s.add_clause([-e, p]);
                s.add_clause([e, -care[j][i], -p]);
            }
        }
    }
    // value[j][x]: cube j is 1 on input pattern x.
    let mut value = vec![vec![0i32; points]; k];
    for j in 0..k {
        for x in 0..points {
            let v = var();
            value[j][x] = v;
            let mut long = vec![v];
            for i in 0..n {
                let bit = (x >> i) & 1;
                // The cube is 0 on x exactly when some literal disagrees with x.
                let wrong = miss[j][i][1 - bit];
                s.add_clause([-v, -wrong]);
                long.push(wrong);
            }
            s.add_clause(long);
        }
    }
    for (t, table) in tables.iter().enumerate() {
        for x in 0..points {
            let mut acc: Option<i32> = None;
            for j in 0..k {
                let u = var();
                s.add_clause([-u, value[j][x]]);
                s.add_clause([-u, out[j][t]]);
                s.add_clause([u, -value[j][x], -out[j][t]]);
                acc = Some(match acc {
                    None => u,
                    Some(a) => {
                        let z = var();
                        s.add_clause([-z, a, u]);
                        s.add_clause([-z, -a, -u]);
                        s.add_clause([z, -a, u]);
                        s.add_clause([z, a, -u]);
                        z
                    }
                });
            }
            let want = table.get(x);
            match acc {
                Some(a) => s.add_clause([if want { a } else { -a }]),
                None if want => s.add_clause(std::iter::empty::<i32>()),
                None => {}
            }
        }
    }
    // Symmetry: cubes in increasing order of their codes is not needed for
    // correctness; unused cubes (no output) are dropped when decoding.
    match s.solve() {
        None => None,
        Some(false) => Some(None),
        Some(true) => {
            let mut terms = Vec::new();
            for j in 0..k {
                let outs = (0..m).fold(0u64, |o, t| {
                    o | (s.value(out[j][t]).unwrap_or(false) as u64) << t
                });
                if outs == 0 {
                    continue;
                }
                let (mut c, mut p) = (0u32, 0u32);
                for i in 0..n {
                    if s.value(care[j][i]).unwrap_or(false) {
                        c |= 1 << i;
                        if s.value(pol[j][i]).unwrap_or(false) {
                            p |= 1 << i;
                        }
                    }
                }
                terms.push((Cube::new(c, p), outs));
            }
            Some(Some(Esop { vars: n, terms }))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The distribution of minimum ESOP sizes over all 65,536 functions of 4
    // inputs (checks.md, computed by breadth-first search; average 3.6553).
    #[test]
    fn four_input_distribution() {
        let t = Tables::get().esop(4);
        assert_eq!(t.distribution(), vec![1, 81, 2268, 21744, 37530, 3888, 24]);
        let total: usize = (0..65536).map(|f| t.size(f)).sum();
        assert!((total as f64 / 65536.0 - 3.6553).abs() < 5e-5);
    }

    #[test]
    fn table_esops_are_correct() {
        let t = Tables::get().esop(4);
        for f in (0..65536usize).step_by(97) {
            let cubes = t.esop(f);
            assert_eq!(cubes.len(), t.size(f));
            let g = cubes.iter().fold(0usize, |acc, c| {
                acc ^ (0..16u64).fold(0usize, |m, x| m | (c.contains(x) as usize) << x)
            });
            assert_eq!(g, f);
        }
    }

    // Parity of four needs 4 cubes, majority of three 3, x0 x1 | x2 x3 needs 3
    // (checks.md).
    #[test]
    fn named_functions() {
        assert_eq!(Tables::get().esop(4).size(0x6996), 4);
        assert_eq!(Tables::get().esop(3).size(0xe8), 3);
        assert_eq!(Tables::get().esop(4).size(0xf888), 3);
    }

    #[test]
    fn sat_agrees_with_the_table_on_four_inputs() {
        // Force the SAT route with two copies of the output: sharing makes the
        // minimum equal to the single-output minimum.
        for f in [0x6996u64, 0xf888, 0x1ee1, 0x8001, 0x7ff8] {
            let t = TruthTable::from_words(4, &[f]);
            let r = exact_esop(&[t.clone(), t.clone()], Duration::from_secs(20));
            assert!(r.is_minimal());
            assert_eq!(
                r.esop.cubes(),
                Tables::get().esop(4).size(f as usize),
                "{f:#x}"
            );
            assert_eq!(r.esop.table(0), t);
            assert_eq!(r.esop.table(1), t);
        }
    }
}
