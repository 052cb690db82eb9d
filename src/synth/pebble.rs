//! Reversible pebbling by SAT: the order of computing and uncomputing the nodes of a network within a number of ancillae (Meuli, Soeken, Roetteler, Bjorner, De Micheli, DATE 2019).

use super::bennett::Plan;
use std::collections::{BTreeMap, BTreeSet};
use std::time::{Duration, Instant};

/// What a pebbling search found.
pub(super) enum Pebbling {
    /// The nodes toggled at each step.
    Found(Vec<Vec<usize>>),
    /// No schedule of up to `8 N + 8` steps exists.
    Impossible,
    /// The deadline passed first.
    OutOfTime,
    /// The encoding would need more clauses than the limit allows.
    TooLarge,
}

/// Clauses of the encoding of `steps` steps: the fixed start and end, four
/// per operand edge and step, and the sequential counter of every step.
fn clauses(count: usize, edges: usize, k: usize, steps: usize) -> usize {
    2 * count + steps * edges * 4 + steps.saturating_sub(1) * count * (1 + 2 * k)
}

/// A pebbling schedule that holds at most `k` nodes at any step and ends with
/// every output leaf held, searched until `deadline`, with encodings of at
/// most `max_clauses` clauses.
pub(super) fn pebble(p: &Plan, k: usize, deadline: Instant, max_clauses: usize) -> Pebbling {
    let v = &p.needed;
    let count = v.len();
    if count == 0 {
        return Pebbling::Found(Vec::new());
    }
    let goal: BTreeSet<usize> = p
        .copies
        .iter()
        .flat_map(|(l, _)| l.iter().copied())
        .filter(|x| p.operands.contains_key(x))
        .collect();
    if goal.len() > k || k == 0 {
        return Pebbling::Impossible;
    }
    let edges: usize = p.operands.values().map(Vec::len).sum();
    let index: BTreeMap<usize, usize> = v.iter().enumerate().map(|(i, &x)| (x, i)).collect();
    let mut steps = count.max(2);
    while steps <= 8 * count + 8 {
        let need = clauses(count, edges, k, steps);
        if need > max_clauses {
            return Pebbling::TooLarge;
        }
        if Instant::now() >= deadline {
            return Pebbling::OutOfTime;
        }
        let left = deadline.saturating_duration_since(Instant::now());
        match pebble_steps(p, &index, &goal, k, steps, left) {
            Some(Some(s)) => return Pebbling::Found(s),
            Some(None) => steps *= 2,
            None => return Pebbling::OutOfTime,
        }
    }
    Pebbling::Impossible
}

// Indices name the variables of the encoding (node i, step t).
#[allow(clippy::needless_range_loop)]
/// One SAT call for a fixed number of steps. `Some(None)`: proven impossible in
/// that many steps; `None`: out of time.
fn pebble_steps(
    p: &Plan,
    index: &BTreeMap<usize, usize>,
    goal: &BTreeSet<usize>,
    k: usize,
    steps: usize,
    budget: Duration,
) -> Option<Option<Vec<Vec<usize>>>> {
    let count = p.needed.len();
    let (mut s, mut var) = super::sat_solver(budget);
    let pv: Vec<Vec<i32>> = (0..=steps)
        .map(|_| (0..count).map(|_| var()).collect())
        .collect();
    for i in 0..count {
        s.add_clause([-pv[0][i]]);
        let node = p.needed[i];
        s.add_clause([if goal.contains(&node) {
            pv[steps][i]
        } else {
            -pv[steps][i]
        }]);
    }
    for t in 0..steps {
        for (i, &node) in p.needed.iter().enumerate() {
            for u in &p.operands[&node] {
                let j = index[u];
                let (a, b) = (pv[t][i], pv[t + 1][i]);
                // A change of node i needs operand j held before and after.
                s.add_clause([a, -b, pv[t][j]]);
                s.add_clause([a, -b, pv[t + 1][j]]);
                s.add_clause([-a, b, pv[t][j]]);
                s.add_clause([-a, b, pv[t + 1][j]]);
            }
        }
    }
    // At most k held at every step: sequential counter (Sinz 2005).
    for t in 1..steps {
        let x = &pv[t];
        let r: Vec<Vec<i32>> = (0..count)
            .map(|_| (0..k).map(|_| var()).collect())
            .collect();
        for i in 0..count {
            s.add_clause([-x[i], r[i][0]]);
            if i > 0 {
                for j in 0..k {
                    s.add_clause([-r[i - 1][j], r[i][j]]);
                }
                for j in 1..k {
                    s.add_clause([-x[i], -r[i - 1][j - 1], r[i][j]]);
                }
                s.add_clause([-x[i], -r[i - 1][k - 1]]);
            }
        }
    }
    match s.solve() {
        None => None,
        Some(false) => Some(None),
        Some(true) => {
            let held = |t: usize, i: usize| s.value(pv[t][i]).unwrap_or(false);
            let schedule = (0..steps)
                .map(|t| {
                    (0..count)
                        .filter(|&i| held(t, i) != held(t + 1, i))
                        .map(|i| p.needed[i])
                        .collect::<Vec<_>>()
                })
                .filter(|step: &Vec<usize>| !step.is_empty())
                .collect();
            Some(Some(schedule))
        }
    }
}
