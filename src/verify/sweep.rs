//! SAT sweeping for the miter: signals of the circuit and of the spec's
//! encoding that agree on random simulation are proven equal one by one, in
//! the order they were built, each on a small cut of its own cone, so a
//! ripple structure is proven bit by bit in linear time instead of in one
//! monolithic solve (the idea of fraiging and SAT sweeping: Kuehlmann,
//! Paruthi, Krohm, Ganai, "Robust Boolean reasoning for equivalence checking
//! and functional property verification", IEEE TCAD 21(12), 2002; Mishchenko,
//! Chatterjee, Jiang, Brayton, "FRAIGs", 2005).
//!
//! A candidate pair is proven by evaluating both signals exhaustively over a
//! cut of at most [`CUT_LEAVES`] signals, the cut found by expanding the cone
//! from its latest node down. Treating the cut's signals as independent
//! inputs only adds assignments, so equality on the cut is equality of the
//! signals: every merge is a proof. A pair the cut cannot prove is simply not
//! merged; what remains unproven goes to the solver, with every proven
//! equality added as clauses.

use std::collections::{BTreeSet, HashMap};

/// Most signals of the cut on which a pair is proven by truth tables.
const CUT_LEAVES: usize = 12;

/// Most nodes a cut expands before the pair is left to the solver.
const CUT_NODES: usize = 64;

/// Simulation words per signal: 256 random input patterns.
const WORDS: usize = 4;

/// How a variable of the encoding is defined.
#[derive(Clone, Debug)]
pub(super) enum Def {
    /// An input of the miter, or a variable defined by clauses of its own.
    Free,
    /// The AND of literals.
    And(Vec<i32>),
    /// The XOR of two literals.
    Xor(i32, i32),
}

/// The signals proven equal: for every variable, the literal of the earliest
/// variable it equals (itself when none), `truth` for the constants.
pub(super) struct Merged {
    repr: Vec<i32>,
    /// Every variable's value on the random patterns.
    words: Vec<[u64; WORDS]>,
    /// Whether the sweep ran to the end (else `words` is partly unset).
    complete: bool,
}

impl Merged {
    /// The representative literal of `lit`.
    pub(super) fn resolve(&self, lit: i32) -> i32 {
        let r = self.repr[lit.unsigned_abs() as usize];
        if lit < 0 {
            -r
        } else {
            r
        }
    }

    /// A random pattern on which some literal of `any` is 1 and every one of
    /// `all` is 1, as the values of `vars` on it.
    pub(super) fn witness(&self, any: &[i32], all: &[i32], vars: &[i32]) -> Option<Vec<bool>> {
        if !self.complete {
            return None;
        }
        let w = &self.words;
        let holds = |l: i32, p: usize| (lit_words(w, l)[p / 64] >> (p % 64)) & 1 == 1;
        let p = (0..64 * WORDS)
            .find(|&p| any.iter().any(|&l| holds(l, p)) && all.iter().all(|&l| holds(l, p)))?;
        Some(vars.iter().map(|&v| holds(v, p)).collect())
    }

    /// Every proven equality `v = lit` with `v` not its own representative.
    pub(super) fn equalities(&self) -> impl Iterator<Item = (i32, i32)> + '_ {
        self.repr
            .iter()
            .enumerate()
            .skip(1)
            .filter(|&(v, &r)| r != v as i32)
            .map(|(v, &r)| (v as i32, r))
    }
}

fn lit_words(words: &[[u64; WORDS]], lit: i32) -> [u64; WORDS] {
    let w = words[lit.unsigned_abs() as usize];
    if lit < 0 {
        w.map(|x| !x)
    } else {
        w
    }
}

/// Sweeps the variables `1..defs.len()` (index 0 unused), `truth` being the
/// constant-true variable. `stop` is asked now and then, with the variables
/// swept so far and in all, whether to give up; what was proven until then
/// stands.
pub(super) fn sweep(defs: &[Def], truth: i32, stop: &mut dyn FnMut(u64, u64) -> bool) -> Merged {
    let n = defs.len();
    let mut repr: Vec<i32> = (0..n as i32).collect();
    let mut words: Vec<[u64; WORDS]> = vec![[0; WORDS]; n];
    let mut seed = 0x9e37_79b9_7f4a_7c15u64;
    let mut random = move || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        seed
    };
    // Signature (normalized so that the first pattern is 0) -> the literal
    // of the earliest variable with it, in the same normalization.
    let mut seen: HashMap<[u64; WORDS], i32> = HashMap::new();
    let mut complete = true;
    for v in 1..n {
        // Asked first thing too, so a zero budget does no work.
        if v % 1024 == 1 && stop(v as u64 - 1, n as u64) {
            complete = false;
            break;
        }
        words[v] = if v as i32 == truth {
            [!0; WORDS]
        } else {
            match &defs[v] {
                Def::Free => [(); WORDS].map(|_| random()),
                Def::And(lits) => lits.iter().fold([!0; WORDS], |acc, &l| {
                    let w = lit_words(&words, l);
                    std::array::from_fn(|i| acc[i] & w[i])
                }),
                Def::Xor(a, b) => {
                    let (x, y) = (lit_words(&words, *a), lit_words(&words, *b));
                    std::array::from_fn(|i| x[i] ^ y[i])
                }
            }
        };
        let flip = words[v][0] & 1 == 1;
        let key = if flip { words[v].map(|x| !x) } else { words[v] };
        let lit = if flip { -(v as i32) } else { v as i32 };
        match seen.get(&key) {
            None => {
                seen.insert(key, lit);
            }
            Some(&earlier) => {
                if matches!(defs[v], Def::Free) && v as i32 != truth {
                    continue;
                }
                let m = Merged {
                    repr,
                    words: Vec::new(),
                    complete: false,
                };
                let target = m.resolve(earlier);
                let proven = equal_on_cut(defs, &m, truth, lit, target);
                repr = m.repr;
                if proven {
                    // `lit` equals `target`, so `v` equals the literal of
                    // `target` with `lit`'s sign.
                    repr[v] = if lit < 0 { -target } else { target };
                }
            }
        }
    }
    Merged {
        repr,
        words,
        complete,
    }
}

/// A node's kind and its operands as representative literals.
fn node(defs: &[Def], m: &Merged, v: u32) -> (bool, Vec<i32>) {
    match &defs[v as usize] {
        Def::Free => (false, Vec::new()),
        Def::And(lits) => (true, lits.iter().map(|&l| m.resolve(l)).collect()),
        Def::Xor(x, y) => (false, vec![m.resolve(*x), m.resolve(*y)]),
    }
}

/// Whether literals `a` and `b` are equal on a cut of their joint cone.
fn equal_on_cut(defs: &[Def], m: &Merged, truth: i32, a: i32, b: i32) -> bool {
    let var = |l: i32| l.unsigned_abs();
    let expandable = |v: u32| v as i32 != truth && !matches!(defs[v as usize], Def::Free);
    let mut frontier: BTreeSet<u32> = [var(a), var(b)]
        .into_iter()
        .filter(|&v| v as i32 != truth)
        .collect();
    let mut inner: Vec<u32> = Vec::new();
    let mut stuck: BTreeSet<u32> = BTreeSet::new();
    let mut checks = 1usize;
    while inner.len() < CUT_NODES {
        let Some(&v) = frontier
            .iter()
            .rev()
            .find(|&&v| expandable(v) && !stuck.contains(&v))
        else {
            break;
        };
        let mut next = frontier.clone();
        next.remove(&v);
        for l in node(defs, m, v).1 {
            if var(l) as i32 != truth {
                next.insert(var(l));
            }
        }
        if next.len() > CUT_LEAVES {
            stuck.insert(v);
            continue;
        }
        frontier = next;
        inner.push(v);
        // Try the cut at 1, 2, 4, ... expansions and when nothing is left.
        if inner.len() == checks {
            checks *= 2;
            if tables_equal(defs, m, &frontier, &inner, truth, a, b) {
                return true;
            }
        }
    }
    tables_equal(defs, m, &frontier, &inner, truth, a, b)
}

/// The truth table of leaf `i` of `k` over `len` words.
fn projection(i: usize, len: usize, mask: u64) -> Vec<u64> {
    const P: [u64; 6] = [
        0xaaaa_aaaa_aaaa_aaaa,
        0xcccc_cccc_cccc_cccc,
        0xf0f0_f0f0_f0f0_f0f0,
        0xff00_ff00_ff00_ff00,
        0xffff_0000_ffff_0000,
        0xffff_ffff_0000_0000,
    ];
    (0..len)
        .map(|w| {
            if i < 6 {
                P[i] & mask
            } else if (w >> (i - 6)) & 1 == 1 {
                !0
            } else {
                0
            }
        })
        .collect()
}

/// Evaluates `a` and `b` on every assignment of the `leaves`, the `inner`
/// nodes computed from them (each from its operands' representatives).
fn tables_equal(
    defs: &[Def],
    m: &Merged,
    leaves: &BTreeSet<u32>,
    inner: &[u32],
    truth: i32,
    a: i32,
    b: i32,
) -> bool {
    let k = leaves.len();
    let len = if k <= 6 { 1 } else { 1 << (k - 6) };
    let mask = if k < 6 { (1u64 << (1 << k)) - 1 } else { !0 };
    let mut table: HashMap<u32, Vec<u64>> = leaves
        .iter()
        .enumerate()
        .map(|(i, &leaf)| (leaf, projection(i, len, mask)))
        .collect();
    let get = |table: &HashMap<u32, Vec<u64>>, l: i32| -> Option<Vec<u64>> {
        let v = l.unsigned_abs();
        let t = if v as i32 == truth {
            vec![mask; len]
        } else {
            table.get(&v)?.clone()
        };
        Some(if l < 0 {
            t.iter().map(|x| !x & mask).collect()
        } else {
            t
        })
    };
    // Operands are earlier variables than their node, so ascending order
    // computes every operand first.
    let mut order = inner.to_vec();
    order.sort_unstable();
    for &v in &order {
        let (is_and, ops) = node(defs, m, v);
        let mut acc = if is_and {
            vec![mask; len]
        } else {
            vec![0; len]
        };
        for &l in &ops {
            let Some(t) = get(&table, l) else {
                return false;
            };
            for (x, y) in acc.iter_mut().zip(&t) {
                if is_and {
                    *x &= y;
                } else {
                    *x ^= y;
                }
            }
        }
        table.insert(v, acc);
    }
    match (get(&table, a), get(&table, b)) {
        (Some(x), Some(y)) => x == y,
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Variables: 1 truth, 2..=4 inputs a b c, then the nodes pushed.
    fn inputs() -> Vec<Def> {
        vec![Def::Free, Def::Free, Def::Free, Def::Free, Def::Free]
    }

    #[test]
    fn a_majority_written_two_ways_is_merged() {
        // maj(a, b, c) as OR of the three ANDs (5..=8), and as
        // ((a ^ c) & (b ^ c)) ^ c (9..=12), the form of a ripple adder's
        // carry gadget (Cuccaro et al. 2004, common practice).
        let mut d = inputs();
        d.push(Def::And(vec![2, 3])); // 5 = ab
        d.push(Def::And(vec![2, 4])); // 6 = ac
        d.push(Def::And(vec![3, 4])); // 7 = bc
        d.push(Def::And(vec![-5, -6, -7])); // 8 = !maj
        d.push(Def::Xor(2, 4)); // 9
        d.push(Def::Xor(3, 4)); // 10
        d.push(Def::And(vec![9, 10])); // 11
        d.push(Def::Xor(11, 4)); // 12 = maj
        let m = sweep(&d, 1, &mut |_, _| false);
        assert_eq!(m.resolve(12), -8);
        assert_eq!(m.resolve(8), 8);
    }

    #[test]
    fn different_signals_are_never_merged() {
        // a & b against a & b & c: equal on 7 of 8 patterns, rarely on all
        // 256 random ones, and never merged.
        let mut d = inputs();
        d.push(Def::And(vec![2, 3])); // 5
        d.push(Def::And(vec![2, 3, 4])); // 6
        d.push(Def::Xor(5, 6)); // 7 = a & b & !c, not constant
        let m = sweep(&d, 1, &mut |_, _| false);
        assert_eq!(m.resolve(6), 6);
        assert_eq!(m.resolve(7), 7);
        assert_eq!(m.equalities().count(), 0);
    }

    #[test]
    fn a_signal_that_is_constant_merges_with_truth() {
        let mut d = inputs();
        d.push(Def::Xor(2, 3)); // 5 = a ^ b
        d.push(Def::Xor(5, 3)); // 6 = a
        d.push(Def::Xor(6, 2)); // 7 = 0
        let m = sweep(&d, 1, &mut |_, _| false);
        assert_eq!(m.resolve(6), 2);
        assert_eq!(m.resolve(7), -1);
    }

    #[test]
    fn a_sweep_stopped_at_once_proves_nothing_and_offers_no_witness() {
        let mut d = inputs();
        d.push(Def::Xor(2, 3));
        d.push(Def::Xor(5, 3));
        let m = sweep(&d, 1, &mut |_, _| true);
        assert_eq!(m.equalities().count(), 0);
        assert_eq!(m.witness(&[6], &[], &[2, 3]), None);
    }
}
