//! Exorlink minimization of an exclusive-or sum of products (Song and
//! Perkowski, IEEE TCAD 15(4), 1996): pairs of terms at distance 0 or 1 merge,
//! pairs at distance 2 and 3 are rewritten into equivalent groups of 2 and 3
//! terms when that lets terms merge, and cost-neutral rewrites shake the search
//! out of local minima. A term is a cube and the mask of the outputs it feeds;
//! the mask counts as one more multi-valued variable.

use crate::logic::{third, Cube};

/// A term: a cube and the outputs it feeds.
pub type Term = (Cube, u64);
/// Distance of two terms: inputs whose literals differ, plus one if the output
/// masks differ.
fn distance(a: &Term, b: &Term) -> u32 {
    a.0.differ(b.0).count_ones() + (a.1 != b.1) as u32
}

/// Merges two terms at distance 1; `None` when they cancel (distance 0) or the
/// result feeds no output.
fn merge(a: Term, b: Term) -> Option<Term> {
    let d = a.0.differ(b.0);
    if d == 0 {
        let outs = a.1 ^ b.1;
        return (outs != 0).then_some((a.0, outs));
    }
    let v = d.trailing_zeros();
    Some((a.0.with(v, third(a.0.literal(v), b.0.literal(v))), a.1))
}

/// Adds `pending` terms to `terms`, merging every pair at distance 0 or 1 as it goes.
fn absorb(terms: &mut Vec<Term>, mut pending: Vec<Term>) {
    while let Some(c) = pending.pop() {
        match terms.iter().position(|t| distance(t, &c) <= 1) {
            Some(k) => {
                let t = terms.swap_remove(k);
                if let Some(m) = merge(t, c) {
                    pending.push(m);
                }
            }
            None => terms.push(c),
        }
    }
}

fn cost(terms: &[Term]) -> (usize, u32) {
    (terms.len(), terms.iter().map(|(c, _)| c.literals()).sum())
}

/// Positions (inputs, and `u32::MAX` for the output mask) where two terms differ.
fn positions(a: &Term, b: &Term) -> Vec<u32> {
    let d = a.0.differ(b.0);
    let mut p: Vec<u32> = (0..32).filter(|i| (d >> i) & 1 == 1).collect();
    if a.1 != b.1 {
        p.push(u32::MAX);
    }
    p
}

/// The exorlink rewrites of a pair at distance `k`: for each order of the
/// differing positions, `k` terms whose XOR equals `a ^ b` (Song and Perkowski
/// 1996): term `j` takes `b` at the positions before `j`, the XOR of the two
/// literals at position `j`, and `a` after it.
pub(super) fn exorlinks(a: &Term, b: &Term) -> Vec<Vec<Term>> {
    let pos = positions(a, b);
    let mut out = Vec::new();
    for order in permutations(&pos) {
        let mut group = Vec::with_capacity(order.len());
        for j in 0..order.len() {
            let mut t = *a;
            for &p in &order[..j] {
                t = set_position(t, b, p);
            }
            let p = order[j];
            t = if p == u32::MAX {
                (t.0, a.1 ^ b.1)
            } else {
                (t.0.with(p, third(a.0.literal(p), b.0.literal(p))), t.1)
            };
            if t.1 != 0 {
                group.push(t);
            }
        }
        out.push(group);
    }
    out
}

fn set_position(t: Term, from: &Term, p: u32) -> Term {
    if p == u32::MAX {
        (t.0, from.1)
    } else {
        (t.0.with(p, from.0.literal(p)), t.1)
    }
}

fn permutations(items: &[u32]) -> Vec<Vec<u32>> {
    if items.len() <= 1 {
        return vec![items.to_vec()];
    }
    let mut out = Vec::new();
    for i in 0..items.len() {
        let mut rest = items.to_vec();
        let first = rest.remove(i);
        for mut p in permutations(&rest) {
            p.insert(0, first);
            out.push(p);
        }
    }
    out
}

/// A small deterministic generator for the cost-neutral moves.
struct Mix(u64);
impl Mix {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
}

/// Exorlink minimization: improving rewrites at distance 2 then 3; when none
/// improves, a random cost-neutral distance-2 rewrite, up to `effort` times in a
/// row without progress, and at most about `work` term comparisons in all.
/// Returns the best set of terms seen.
pub fn exorlink_minimize(terms: Vec<Term>, effort: usize, work: u64) -> Vec<Term> {
    let mut current = Vec::new();
    absorb(&mut current, terms);
    let mut best = current.clone();
    let mut rng = Mix(0x9e37_79b9_7f4a_7c15);
    let mut stale = 0;
    let mut spent = 0u64;
    while stale < effort && spent < work {
        if improve(&mut current, &mut spent, work) {
            if cost(&current) < cost(&best) {
                best = current.clone();
                stale = 0;
            }
            continue;
        }
        stale += 1;
        // A random pair at distance 2, rewritten without loss.
        spent += (current.len() * current.len()) as u64 / 2;
        let pairs: Vec<(usize, usize)> = (0..current.len())
            .flat_map(|i| (i + 1..current.len()).map(move |j| (i, j)))
            .filter(|&(i, j)| distance(&current[i], &current[j]) == 2)
            .collect();
        if pairs.is_empty() {
            break;
        }
        let (i, j) = pairs[(rng.next() % pairs.len() as u64) as usize];
        let options = exorlinks(&current[i], &current[j]);
        let pick = options[(rng.next() % options.len() as u64) as usize].clone();
        let (a, b) = (current[i], current[j]);
        current.retain(|t| *t != a && *t != b);
        absorb(&mut current, pick);
        if cost(&current) < cost(&best) {
            best = current.clone();
            stale = 0;
        }
    }
    best.sort();
    best
}

/// One improving exorlink rewrite, if there is one within the work budget.
fn improve(current: &mut Vec<Term>, spent: &mut u64, work: u64) -> bool {
    let before = cost(current);
    for d in [2u32, 3] {
        for i in 0..current.len() {
            *spent += current.len() as u64;
            if *spent > work {
                return false;
            }
            for j in i + 1..current.len() {
                if distance(&current[i], &current[j]) != d {
                    continue;
                }
                *spent += 2 * current.len() as u64;
                let (a, b) = (current[i], current[j]);
                for group in exorlinks(&a, &b) {
                    let mut trial: Vec<Term> = current
                        .iter()
                        .enumerate()
                        .filter(|(k, _)| *k != i && *k != j)
                        .map(|(_, t)| *t)
                        .collect();
                    absorb(&mut trial, group);
                    if cost(&trial) < before {
                        *current = trial;
                        return true;
                    }
                }
            }
        }
    }
    false
}
