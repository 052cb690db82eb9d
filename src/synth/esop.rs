//! ESOP-based synthesis: extract a small exclusive-or sum of products, then one
//! multi-controlled NOT per cube and output.
//!
//! Extraction starts from the better of two expansions per output: the best
//! fixed-polarity Reed-Muller form (every one of the `2^n` polarities up to 10
//! inputs, a greedy polarity search above), and for up to 10 inputs the best
//! pseudo-Kronecker expansion over the variable order (each node Shannon,
//! positive Davio or negative Davio, chosen by dynamic programming). Cubes that
//! several outputs share become one multi-output term. The terms are then
//! minimized by the exorlink transformations of Song and Perkowski (IEEE TCAD
//! 15(4), 1996): pairs at distance 0 or 1 merge, pairs at distance 2 and 3 are
//! rewritten into equivalent groups of 2 and 3 cubes when that lets cubes merge,
//! and cost-neutral rewrites shake the search out of local minima. The output
//! mask counts as one more multi-valued variable, as in their multi-output form.
//!
//! Circuit construction orders the terms so that neighbouring gates share the
//! longest prefix of controls (lowering then computes each shared AND once), and
//! computes a cube used by three or more outputs into an ancilla once and
//! copies it with CNOTs (`2k - 2` Toffolis instead of `2k - 4 + m`).
//!
//! Complexity: `O(2^n n)` per polarity tried, `O(3^n)` for the pseudo-Kronecker
//! search, and exorlink work bounded by the effort setting. Terms past 2,000
//! skip the pairwise exorlink phase (only identical cubes are shared).

use super::exorlink::{exorlink_minimize, Term};
use super::{reed_muller_coefficients, SynthError, SynthLimits};
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::logic::{Cube, Esop, Literal, TruthTable, VAR_PATTERN};
use crate::progress::{Event, Progress, Task};
use crate::spec::FunctionSpec;
use std::collections::HashMap;

/// Most terms for which the pairwise exorlink phase runs.
pub const EXORLINK_MAX_TERMS: usize = 2000;

/// Work budget of the exorlink phase, in term comparisons (about 0.1 s).
pub const EXORLINK_WORK: u64 = 40_000_000;

/// The ESOP heuristic for `f`, then its circuit.
pub fn esop(
    f: &FunctionSpec,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Circuit, SynthError> {
    let e = esop_counted(f, limits, &mut EsopWork::default(), progress)?;
    check_terms(&e, limits)?;
    Ok(esop_circuit(f, &e))
}

/// The heuristic's ESOP for every output of `f`.
pub fn esop_of(f: &FunctionSpec, limits: &SynthLimits) -> Result<Esop, SynthError> {
    esop_counted(f, limits, &mut EsopWork::default(), &())
}

/// What the heuristic built: cubes made, for checking that a refusal came
/// before the work it refuses.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct EsopWork {
    /// Cubes materialized.
    pub cubes: u64,
}

/// [`esop_of`], counting its work into `work`. The size of every output's
/// expansion is known before any of its cubes is made, so a function whose
/// ESOP would pass the gate limit is refused first: sharing cubes between
/// outputs never lowers the gate count (one gate per cube and output), and
/// exorlink, the only pass that does, runs only on at most
/// [`EXORLINK_MAX_TERMS`] terms. Each output's expansion and then its cubes
/// are reported to `progress`.
pub fn esop_counted(
    f: &FunctionSpec,
    limits: &SynthLimits,
    work: &mut EsopWork,
    progress: &dyn Progress,
) -> Result<Esop, SynthError> {
    let n = f.inputs.len();
    super::check_table_inputs(n, limits)?;
    let m = f.outputs.len();
    let mut plans = Vec::with_capacity(m);
    let mut gates = 0usize;
    let stage = |done: usize| {
        // With no outputs there is no stage (a total of 0 means unknown).
        if m == 0 {
            return;
        }
        progress.event(Event::Stage {
            task: Task::Esop,
            done: done as u64,
            total: 2 * m as u64,
        })
    };
    for j in 0..m {
        stage(j);
        let t = f.table(j).expect("within the table limit");
        let plan = plan(&t);
        gates = gates.saturating_add(plan.size());
        if gates > limits.max_gates && gates > m * EXORLINK_MAX_TERMS {
            return Err(SynthError::Limit {
                what: "the gate count before lowering (the ESOP's cubes, per output)",
                value: gates,
                limit: limits.max_gates,
                kind: crate::limit::Limit::Gates,
            });
        }
        plans.push((t, plan));
    }
    let mut shared: HashMap<Cube, u64> = HashMap::new();
    for (j, (t, plan)) in plans.into_iter().enumerate() {
        stage(m + j);
        let cubes = plan.cubes(&t);
        work.cubes += cubes.len() as u64;
        for c in cubes {
            *shared.entry(c).or_insert(0) ^= 1 << j;
        }
    }
    let esop = finish(n, shared);
    stage(2 * m);
    Ok(esop)
}

/// The expansion chosen for one output, before its cubes are made.
enum Plan {
    /// Fixed polarity `p` with `size` cubes.
    Fixed { p: u32, size: usize },
    /// Cubes already made (small tables: pseudo-Kronecker or fixed polarity).
    Made(Vec<Cube>),
}

impl Plan {
    fn size(&self) -> usize {
        match self {
            Plan::Fixed { size, .. } => *size,
            Plan::Made(c) => c.len(),
        }
    }

    fn cubes(self, t: &TruthTable) -> Vec<Cube> {
        match self {
            Plan::Fixed { p, .. } => fprm_cubes(t, p),
            Plan::Made(c) => c,
        }
    }
}

fn plan(t: &TruthTable) -> Plan {
    if t.vars() > 10 {
        let p = best_polarity(t);
        return Plan::Fixed {
            p,
            size: fprm_cost(t, p).0,
        };
    }
    Plan::Made(best_expansion(t))
}

fn finish(n: usize, shared: HashMap<Cube, u64>) -> Esop {
    let mut terms: Vec<Term> = shared.into_iter().filter(|(_, o)| *o != 0).collect();
    terms.sort();
    if terms.len() <= EXORLINK_MAX_TERMS {
        terms = exorlink_minimize(terms, 40, EXORLINK_WORK);
    }
    Esop { vars: n, terms }
}

/// Extracts and minimizes an ESOP for the given single-output tables (all over
/// the same inputs), sharing cubes between outputs.
pub fn minimize_tables(tables: &[TruthTable]) -> Esop {
    let n = tables.first().map_or(0, |t| t.vars());
    let mut shared: HashMap<Cube, u64> = HashMap::new();
    for (j, t) in tables.iter().enumerate() {
        for c in best_expansion(t) {
            *shared.entry(c).or_insert(0) ^= 1 << j;
        }
    }
    finish(n, shared)
}

fn check_terms(e: &Esop, limits: &SynthLimits) -> Result<(), SynthError> {
    let gates: usize = e.terms.iter().map(|(_, o)| o.count_ones() as usize).sum();
    super::check_gate_count(gates, limits)
}

/// `g(z) = f(z ^ p)`: the table with inputs flipped by the mask `p`.
fn flip_inputs(t: &TruthTable, p: u32) -> TruthTable {
    let mut g = t.clone();
    let n = t.vars();
    let words = g.words_mut();
    for (i, &m) in VAR_PATTERN.iter().enumerate().take(n.min(6)) {
        if (p >> i) & 1 == 1 {
            let s = 1u32 << i;
            for w in words.iter_mut() {
                *w = ((*w & m) >> s) | ((*w << s) & m);
            }
        }
    }
    for i in 6..n {
        if (p >> i) & 1 == 1 {
            let step = 1usize << (i - 6);
            for j in 0..words.len() {
                if j & step == 0 {
                    words.swap(j, j | step);
                }
            }
        }
    }
    g
}

/// The cubes of the fixed-polarity Reed-Muller form with polarity `p` (bit `i`
/// set: input `i` appears complemented).
fn fprm_cubes(t: &TruthTable, p: u32) -> Vec<Cube> {
    let coeffs = reed_muller_coefficients(&flip_inputs(t, p));
    let mut out = Vec::with_capacity(coeffs.count_ones());
    for (w, &word) in coeffs.words().iter().enumerate() {
        let mut bits = word;
        while bits != 0 {
            let k = bits.trailing_zeros() as usize;
            bits &= bits - 1;
            let s = (w * 64 + k) as u32;
            out.push(Cube::new(s, !p));
        }
    }
    out
}

fn fprm_cost(t: &TruthTable, p: u32) -> (usize, u32) {
    let coeffs = reed_muller_coefficients(&flip_inputs(t, p));
    let mut lits = 0u32;
    for (w, &word) in coeffs.words().iter().enumerate() {
        let mut bits = word;
        while bits != 0 {
            let k = bits.trailing_zeros() as usize;
            bits &= bits - 1;
            lits += ((w * 64 + k) as u32).count_ones();
        }
    }
    (coeffs.count_ones(), lits)
}

/// The best fixed polarity: exhaustive up to 10 inputs, greedy above.
fn best_polarity(t: &TruthTable) -> u32 {
    let n = t.vars();
    if n <= 10 {
        return (0..1u32 << n).min_by_key(|&p| fprm_cost(t, p)).unwrap_or(0);
    }
    let mut p = 0u32;
    let mut best = fprm_cost(t, p);
    loop {
        let mut improved = false;
        for i in 0..n {
            let q = p ^ (1 << i);
            let c = fprm_cost(t, q);
            if c < best {
                best = c;
                p = q;
                improved = true;
            }
        }
        if !improved {
            return p;
        }
    }
}

/// The smaller of the best fixed-polarity form and (up to 10 inputs) the best
/// pseudo-Kronecker expansion.
fn best_expansion(t: &TruthTable) -> Vec<Cube> {
    let fprm = fprm_cubes(t, best_polarity(t));
    if t.vars() > 10 {
        return fprm;
    }
    let mut memo = HashMap::new();
    let words = t.words().to_vec();
    let mut pk = Vec::new();
    pkro_cubes(&words, t.vars(), Cube::ONE, &mut pk, &mut memo);
    let cost = |v: &[Cube]| (v.len(), v.iter().map(|c| c.literals()).sum::<u32>());
    if cost(&pk) < cost(&fprm) {
        pk
    } else {
        fprm
    }
}

/// Best (cubes, literals) and top-node choice per (inputs, table).
type PkroMemo = HashMap<(usize, Vec<u64>), ((usize, u32), u8)>;

/// Splits a table of `n` inputs on its top input into (f0, f1).
fn split(words: &[u64], n: usize) -> (Vec<u64>, Vec<u64>) {
    if n <= 6 {
        let half = 1u32 << (n - 1);
        let mask = if half == 64 { !0 } else { (1u64 << half) - 1 };
        (vec![words[0] & mask], vec![(words[0] >> half) & mask])
    } else {
        let h = words.len() / 2;
        (words[..h].to_vec(), words[h..].to_vec())
    }
}

/// (cubes, literals) of the best pseudo-Kronecker expansion, and the choice made
/// at the top node (0 Shannon, 1 positive Davio, 2 negative Davio).
fn pkro_cost(words: &[u64], n: usize, memo: &mut PkroMemo) -> (usize, u32) {
    if words.iter().all(|&w| w == 0) {
        return (0, 0);
    }
    if n == 0 {
        return (1, 0);
    }
    if let Some(&(c, _)) = memo.get(&(n, words.to_vec())) {
        return c;
    }
    let (f0, f1) = split(words, n);
    let f2: Vec<u64> = f0.iter().zip(&f1).map(|(a, b)| a ^ b).collect();
    let c0 = pkro_cost(&f0, n - 1, memo);
    let c1 = pkro_cost(&f1, n - 1, memo);
    let c2 = pkro_cost(&f2, n - 1, memo);
    // Each cube of a half that gets a literal costs one more literal.
    let add = |a: (usize, u32), b: (usize, u32), la: usize, lb: usize| {
        (a.0 + b.0, a.1 + b.1 + (la * a.0 + lb * b.0) as u32)
    };
    let options = [add(c0, c1, 1, 1), add(c0, c2, 0, 1), add(c1, c2, 0, 1)];
    let (choice, best) = options
        .iter()
        .enumerate()
        .min_by_key(|(_, c)| **c)
        .map(|(i, c)| (i as u8, *c))
        .expect("three options");
    memo.insert((n, words.to_vec()), (best, choice));
    best
}

fn pkro_cubes(words: &[u64], n: usize, prefix: Cube, out: &mut Vec<Cube>, memo: &mut PkroMemo) {
    if words.iter().all(|&w| w == 0) {
        return;
    }
    if n == 0 {
        out.push(prefix);
        return;
    }
    pkro_cost(words, n, memo);
    let choice = memo
        .get(&(n, words.to_vec()))
        .map(|(_, c)| *c)
        .expect("cost computed above");
    let v = (n - 1) as u32;
    let (f0, f1) = split(words, n);
    let f2: Vec<u64> = f0.iter().zip(&f1).map(|(a, b)| a ^ b).collect();
    let pos = prefix.with(v, Literal::Positive);
    let neg = prefix.with(v, Literal::Negative);
    match choice {
        0 => {
            pkro_cubes(&f0, n - 1, neg, out, memo);
            pkro_cubes(&f1, n - 1, pos, out, memo);
        }
        1 => {
            pkro_cubes(&f0, n - 1, prefix, out, memo);
            pkro_cubes(&f2, n - 1, pos, out, memo);
        }
        _ => {
            pkro_cubes(&f1, n - 1, prefix, out, memo);
            pkro_cubes(&f2, n - 1, neg, out, memo);
        }
    }
}

/// The lowered Toffoli count of one gate with `k` controls.
fn toffolis(k: usize) -> usize {
    match k {
        0 | 1 => 0,
        2 => 1,
        k => 2 * k - 3,
    }
}

/// One MCT gate per cube and output (a cube feeding three or more outputs goes
/// through an ancilla), ordered so that neighbours share control prefixes.
pub fn esop_circuit(f: &FunctionSpec, e: &Esop) -> Circuit {
    let n = f.inputs.len();
    let mut c = Circuit::new(f.layout().lines());
    let mut terms: Vec<(Vec<Control>, u64)> = e
        .terms
        .iter()
        .map(|(cube, outs)| {
            let controls: Vec<Control> = (0..n as u32)
                .filter(|i| (cube.care >> i) & 1 == 1)
                .map(|i| Control {
                    line: Line(i),
                    positive: (cube.pol >> i) & 1 == 1,
                })
                .collect();
            (controls, *outs)
        })
        .collect();
    terms.sort_by(|a, b| {
        let key = |t: &(Vec<Control>, u64)| -> Vec<(u32, bool)> {
            t.0.iter().map(|c| (c.line.0, !c.positive)).collect()
        };
        key(a).cmp(&key(b)).then(a.1.cmp(&b.1))
    });
    let mut copy_line: Option<Line> = None;
    for (controls, outs) in terms {
        let k = controls.len();
        let m = outs.count_ones() as usize;
        let targets = (0..64)
            .filter(|j| (outs >> j) & 1 == 1)
            .map(|j| Line((n + j) as u32));
        // Through an ancilla: 2 * toffolis(k) - 2 (k - 2) = 2k - 2 when k >= 3, 2 when k = 2.
        let via_ancilla = if k >= 3 { 2 * k - 2 } else { 2 };
        let direct = if k >= 2 { toffolis(k) + (m - 1) } else { 0 };
        if k >= 2 && m >= 2 && via_ancilla < direct {
            let a = *copy_line.get_or_insert_with(|| c.add_ancilla());
            let g = Gate::new(controls, a).expect("inputs control an ancilla");
            c.push(g.clone());
            for t in targets {
                c.push(Gate::cnot(a.0, t.0));
            }
            c.push(g);
        } else {
            for t in targets {
                c.push(Gate::new(controls.clone(), t).expect("inputs control an output"));
            }
        }
    }
    c
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::synth::exorlink::exorlinks;

    fn check(e: &Esop, tables: &[TruthTable]) {
        for (j, t) in tables.iter().enumerate() {
            assert_eq!(&e.table(j), t, "output {j}");
        }
    }

    #[test]
    fn fprm_and_pkro_expand_correctly() {
        let t = TruthTable::from_fn(7, |x| (x * 37 + 11) % 5 < 2);
        for p in [0u32, 1, 0b1010101, 0b1111111] {
            let e = Esop {
                vars: 7,
                terms: fprm_cubes(&t, p).into_iter().map(|c| (c, 1)).collect(),
            };
            check(&e, std::slice::from_ref(&t));
        }
        let mut pk = Vec::new();
        pkro_cubes(t.words(), 7, Cube::ONE, &mut pk, &mut HashMap::new());
        let e = Esop {
            vars: 7,
            terms: pk.into_iter().map(|c| (c, 1)).collect(),
        };
        check(&e, &[t]);
    }

    #[test]
    fn exorlinks_preserve_the_function() {
        let a = (Cube::new(0b0111, 0b0101), 0b01);
        let b = (Cube::new(0b1101, 0b0001), 0b11);
        let want = {
            let e = Esop {
                vars: 4,
                terms: vec![a, b],
            };
            (e.table(0), e.table(1))
        };
        let groups = exorlinks(&a, &b);
        // Three inputs and the output mask differ: distance 4, 4! rewrites.
        assert_eq!(groups.len(), 24);
        for g in groups {
            let e = Esop { vars: 4, terms: g };
            assert_eq!((e.table(0), e.table(1)), want);
        }
    }

    // Majority of three needs 3 cubes and parity of four needs 4 (checks.md,
    // computed by breadth-first search; a known minimum).
    #[test]
    fn known_small_functions() {
        let maj = TruthTable::parse("0xe8", 3).unwrap();
        let e = minimize_tables(std::slice::from_ref(&maj));
        check(&e, &[maj]);
        assert_eq!(e.cubes(), 3);
        let par = TruthTable::parse("0x6996", 4).unwrap();
        let e = minimize_tables(std::slice::from_ref(&par));
        assert_eq!(e.cubes(), 4);
        let f = TruthTable::parse("0xf888", 4).unwrap();
        assert_eq!(minimize_tables(&[f]).cubes(), 3);
    }

    #[test]
    fn shared_cubes_count_once() {
        let a = TruthTable::from_fn(5, |x| x & 0b111 == 0b111);
        let e = minimize_tables(&[a.clone(), a.clone(), a.clone()]);
        check(&e, &[a.clone(), a.clone(), a]);
        assert_eq!(e.cubes(), 1);
        assert_eq!(e.terms[0].1, 0b111);
    }
}
