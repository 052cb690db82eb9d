//! Exact model counting of a predicate too wide to enumerate: the number of
//! inputs on which an expression graph is 1, by DPLL with unit propagation,
//! splitting into independent components and caching each component's count
//! (the scheme of component-caching #SAT solvers: Bayardo and Pehoushek, AAAI
//! 2000; Sang et al., SAT 2004; Thurley, SAT 2006). The verifier's own.
//!
//! The graph's cone is Tseitin-encoded: one variable per input and per
//! internal node, clauses that fix every node variable to its node's value.
//! Each input pattern has exactly one extension to the node variables, so
//! the models of the clauses with the root asserted are the marked inputs.

use super::program::Node;
use std::collections::HashMap;

/// Most nodes of the root's cone the counter takes (checked before any
/// clause is built).
pub const MODEL_COUNT_MAX_NODES: usize = 20_000;

/// The counter's work budget in clause literals visited (about a few
/// seconds); past it the count is unknown.
pub const MODEL_COUNT_MAX_WORK: u64 = 1 << 31;

/// Why no count was made.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CountStop {
    /// The cone has more than [`MODEL_COUNT_MAX_NODES`] nodes.
    TooLarge,
    /// The search took more than its step budget.
    Budget,
    /// The caller stopped it.
    Cancelled,
}

type Clause = Vec<i32>;

struct Counter<'a> {
    steps: u64,
    budget: u64,
    cache: HashMap<Vec<Clause>, u128>,
    cancelled: &'a (dyn Fn() -> bool + Sync),
}

/// The inputs `x` of `0 .. 2^inputs` on which node `root` of `nodes` is 1,
/// within `budget` units of work (each clause literal visited by
/// propagation counts one, each branch and cache hit one). `inputs` is at
/// most 127.
pub fn count_models(
    nodes: &[Node],
    root: u32,
    inputs: u32,
    budget: u64,
    cancelled: &(dyn Fn() -> bool + Sync),
) -> Result<u128, CountStop> {
    assert!(inputs < 128, "counts are u128");
    // The cone, children before parents.
    let mut in_cone = vec![false; nodes.len()];
    let mut stack = vec![root];
    let mut size = 0usize;
    while let Some(k) = stack.pop() {
        if std::mem::replace(&mut in_cone[k as usize], true) {
            continue;
        }
        size += 1;
        if size > MODEL_COUNT_MAX_NODES {
            return Err(CountStop::TooLarge);
        }
        match &nodes[k as usize] {
            Node::Not(a) => stack.push(*a),
            Node::And(v) | Node::Or(v) | Node::Xor(v) => stack.extend(v),
            Node::Const(_) | Node::Var(_) => {}
        }
    }
    // Variables 1..=inputs are the inputs; node variables follow; `truth`
    // is a variable held at 1.
    let mut next = inputs as i32;
    let mut fresh = || {
        next += 1;
        next
    };
    let truth = fresh();
    let mut clauses: Vec<Clause> = vec![vec![truth]];
    let mut lit = vec![0i32; nodes.len()];
    for k in 0..nodes.len() {
        if !in_cone[k] {
            continue;
        }
        lit[k] = match &nodes[k] {
            Node::Const(b) => {
                if *b {
                    truth
                } else {
                    -truth
                }
            }
            Node::Var(j) => *j as i32 + 1,
            Node::Not(a) => -lit[*a as usize],
            Node::And(v) | Node::Or(v) => {
                let or = matches!(nodes[k], Node::Or(_));
                // An OR is the complement of the AND of complements.
                let ops: Vec<i32> = v
                    .iter()
                    .map(|&a| {
                        if or {
                            -lit[a as usize]
                        } else {
                            lit[a as usize]
                        }
                    })
                    .collect();
                let g = fresh();
                let mut long = vec![g];
                for &o in &ops {
                    clauses.push(vec![-g, o]);
                    long.push(-o);
                }
                clauses.push(long);
                if or {
                    -g
                } else {
                    g
                }
            }
            Node::Xor(v) => {
                let mut acc = -truth;
                for &a in v {
                    let b = lit[a as usize];
                    let g = fresh();
                    clauses.push(vec![-g, acc, b]);
                    clauses.push(vec![-g, -acc, -b]);
                    clauses.push(vec![g, -acc, b]);
                    clauses.push(vec![g, acc, -b]);
                    acc = g;
                }
                acc
            }
        };
    }
    clauses.push(vec![lit[root as usize]]);
    let vars: Vec<i32> = (1..=next).collect();
    let mut c = Counter {
        steps: 0,
        budget,
        cache: HashMap::new(),
        cancelled,
    };
    // Deep formulas recurse deeply: a thread with room for it.
    std::thread::scope(|s| {
        std::thread::Builder::new()
            .stack_size(256 << 20)
            .spawn_scoped(s, || c.count(clauses, vars))
            .expect("a thread for the count")
            .join()
            .expect("the count does not panic")
    })
}

impl Counter<'_> {
    fn step(&mut self, work: u64) -> Result<(), CountStop> {
        let before = self.steps;
        self.steps = self.steps.saturating_add(work);
        if self.steps > self.budget {
            return Err(CountStop::Budget);
        }
        if before >> 16 != self.steps >> 16 && (self.cancelled)() {
            return Err(CountStop::Cancelled);
        }
        Ok(())
    }

    /// Models of `clauses` over `vars` (every variable of the clauses is in
    /// `vars`; a variable of `vars` in no clause doubles the count).
    fn count(&mut self, mut clauses: Vec<Clause>, vars: Vec<i32>) -> Result<u128, CountStop> {
        self.step(1)?;
        let mut assigned: HashMap<i32, bool> = HashMap::new();
        // Unit propagation.
        while let Some(unit) = clauses.iter().find(|c| c.len() == 1).map(|c| c[0]) {
            assigned.insert(unit.abs(), unit > 0);
            self.step(clauses.iter().map(|c| c.len() as u64).sum())?;
            let mut out = Vec::with_capacity(clauses.len());
            for c in clauses {
                if c.contains(&unit) {
                    continue;
                }
                let c: Clause = c.into_iter().filter(|&l| l != -unit).collect();
                if c.is_empty() {
                    return Ok(0);
                }
                out.push(c);
            }
            clauses = out;
        }
        let mut occurs: HashMap<i32, usize> = HashMap::new();
        for c in &clauses {
            for l in c {
                *occurs.entry(l.abs()).or_insert(0) += 1;
            }
        }
        let free = vars
            .iter()
            .filter(|v| !assigned.contains_key(v) && !occurs.contains_key(v))
            .count() as u32;
        let factor = 1u128 << free;
        if clauses.is_empty() {
            return Ok(factor);
        }
        // Components: variables joined by the clauses they share.
        let mut ids: HashMap<i32, usize> = HashMap::new();
        for &v in occurs.keys() {
            let k = ids.len();
            ids.insert(v, k);
        }
        let mut parent: Vec<usize> = (0..ids.len()).collect();
        fn root(p: &mut [usize], mut x: usize) -> usize {
            while p[x] != x {
                p[x] = p[p[x]];
                x = p[x];
            }
            x
        }
        for c in &clauses {
            let a = root(&mut parent, ids[&c[0].abs()]);
            for l in &c[1..] {
                let b = root(&mut parent, ids[&l.abs()]);
                parent[b] = a;
            }
        }
        let mut groups: HashMap<usize, Vec<Clause>> = HashMap::new();
        for c in clauses {
            let r = root(&mut parent, ids[&c[0].abs()]);
            groups.entry(r).or_default().push(c);
        }
        let mut total = factor;
        let mut parts: Vec<Vec<Clause>> = groups.into_values().collect();
        parts.sort_by_key(|p| p.len());
        for mut part in parts {
            for c in part.iter_mut() {
                c.sort_unstable();
            }
            part.sort_unstable();
            let n = self.component(part)?;
            if n == 0 {
                return Ok(0);
            }
            total = total.saturating_mul(n);
        }
        Ok(total)
    }

    /// Models of one connected component over exactly its variables, cached.
    fn component(&mut self, part: Vec<Clause>) -> Result<u128, CountStop> {
        if let Some(&n) = self.cache.get(&part) {
            self.step(1)?;
            return Ok(n);
        }
        let mut occurs: HashMap<i32, usize> = HashMap::new();
        for c in &part {
            for l in c {
                *occurs.entry(l.abs()).or_insert(0) += 1;
            }
        }
        let mut vars: Vec<i32> = occurs.keys().copied().collect();
        vars.sort_unstable();
        let branch = *vars
            .iter()
            .max_by_key(|v| (occurs[v], -**v))
            .expect("a component has a variable");
        let mut n = 0u128;
        for lit in [branch, -branch] {
            let mut cls = part.clone();
            cls.push(vec![lit]);
            n = n.saturating_add(self.count(cls, vars.clone())?);
        }
        self.cache.insert(part, n);
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Majority of three (0xe8) marks 4 of 8; x0 ^ x1 ^ x2 marks 4; an AND of
    // three marks 1; a constant 0 marks none; 40 inputs with one in the
    // expression: 2^39 (by hand).
    #[test]
    fn small_counts_by_hand() {
        let never = &|| false;
        let maj = vec![
            Node::Var(0),
            Node::Var(1),
            Node::Var(2),
            Node::And(vec![0, 1]),
            Node::And(vec![0, 2]),
            Node::And(vec![1, 2]),
            Node::Or(vec![3, 4, 5]),
            Node::Xor(vec![0, 1, 2]),
            Node::And(vec![0, 1, 2]),
            Node::Const(false),
        ];
        assert_eq!(count_models(&maj, 6, 3, 1000, never), Ok(4));
        assert_eq!(count_models(&maj, 7, 3, 1000, never), Ok(4));
        assert_eq!(count_models(&maj, 8, 3, 1000, never), Ok(1));
        assert_eq!(count_models(&maj, 9, 3, 1000, never), Ok(0));
        assert_eq!(count_models(&maj, 0, 40, 1000, never), Ok(1 << 39));
        assert_eq!(count_models(&maj, 6, 3, 1, never), Err(CountStop::Budget));
    }
}
