//! Pebbling that scales to networks of millions of nodes: Bennett's
//! checkpointing carried from chains to networks, over the topological order.
//!
//! A range `[a, b)` of the order is pebbled with the nodes before it that it
//! reads already held. Its frontier is the set of its nodes read at or after
//! `b` (or copied to an output). When the whole range fits in the free
//! pebbles, it is computed node by node and every node off the frontier is
//! uncomputed in reverse order, while its operands are still held. When it
//! does not fit, it is split in halves `[a, m)` and `[m, b)`: the first half is
//! pebbled (leaving its frontier, which the second half reads), then the
//! second half, then the first half's moves are played backwards (they undo it
//! exactly, since the nodes before `a` are still held), except the last
//! uncompute of each node that is still read after `b`. This is Bennett's
//! time-space trade-off ("Time/space trade-offs for reversible computation",
//! SIAM J. Comput. 18(4), 1989): a chain of `n` passes `O(log n)` pebbles at
//! `n^1.58` moves, and the same recursion applies to any network because a
//! range's frontier is exactly what the rest of the order reads.
//!
//! The last range of the order keeps everything it computes (Bennett's final
//! uncompute clears it), so a budget as large as the network gives plain
//! Bennett with one move per node. [`best_on_grid`] runs the recursion on a
//! fixed grid of budgets and keeps the cheapest schedule that fits, so a
//! larger budget never costs more Toffolis than a smaller one (the grid below
//! a budget contains the grid below any smaller budget). Each run stops as
//! soon as it would exceed the best schedule found so far.

use super::bennett::Plan;
use crate::progress::{Event, Progress, Task};
use std::collections::{HashMap, HashSet};

/// A pebbling schedule: one node toggled per step.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(super) struct Schedule {
    /// The node toggled at each step.
    pub(super) moves: Vec<usize>,
    /// Most nodes held at once.
    pub(super) peak: usize,
    /// Toffolis of the moves (every move of an AND node is one Toffoli).
    pub(super) toffolis: usize,
}

/// The order of the needed nodes, each node's operands as positions in it, and
/// the last position that reads each node (`usize::MAX` for an output leaf).
struct Order {
    /// The network node at each position.
    nodes: Vec<usize>,
    operands: Vec<Vec<usize>>,
    last_use: Vec<usize>,
    is_and: Vec<bool>,
}

impl Order {
    /// The order `seq`, a topological order of `p.needed`.
    fn new(p: &Plan, seq: &[usize], is_and: &dyn Fn(usize) -> bool) -> Order {
        let position: HashMap<usize, usize> =
            seq.iter().enumerate().map(|(i, &v)| (v, i)).collect();
        let operands: Vec<Vec<usize>> = seq
            .iter()
            .map(|v| p.operands[v].iter().map(|u| position[u]).collect())
            .collect();
        let mut last_use = vec![0usize; seq.len()];
        for (i, ops) in operands.iter().enumerate() {
            for &j in ops {
                last_use[j] = last_use[j].max(i);
            }
        }
        for (leaves, _) in &p.copies {
            for v in leaves {
                if let Some(&i) = position.get(v) {
                    last_use[i] = usize::MAX;
                }
            }
        }
        Order {
            nodes: seq.to_vec(),
            operands,
            last_use,
            is_and: seq.iter().map(|&v| is_and(v)).collect(),
        }
    }

    /// The two orders the grid runs on: the network's own topological order,
    /// and the depth-first post-order from the outputs, which computes each
    /// operand just before its first reader (a tree of `n` nodes then has a
    /// frontier of its depth, not of its width).
    fn both(p: &Plan, is_and: &dyn Fn(usize) -> bool) -> [Order; 2] {
        [
            Order::new(p, &p.needed, is_and),
            Order::new(p, &post_order(p), is_and),
        ]
    }

    /// How many nodes of `[a, b)` are read at or after `end`.
    fn frontier(&self, a: usize, b: usize, end: usize) -> usize {
        self.last_use[a..b].iter().filter(|&&u| u >= end).count()
    }
}

/// The needed nodes in depth-first post-order from the output leaves,
/// operands in their stored order (then any node no output reads, so the
/// order is a permutation of `p.needed`); iterative, so any depth is safe.
fn post_order(p: &Plan) -> Vec<usize> {
    let mut done: HashSet<usize> = HashSet::with_capacity(p.needed.len());
    let mut out = Vec::with_capacity(p.needed.len());
    let mut stack: Vec<(usize, usize)> = Vec::new();
    let roots = p
        .copies
        .iter()
        .flat_map(|(l, _)| l.iter().copied())
        .chain(p.needed.iter().copied());
    for root in roots {
        if !p.operands.contains_key(&root) || done.contains(&root) {
            continue;
        }
        stack.push((root, 0));
        while let Some(&mut (v, ref mut next)) = stack.last_mut() {
            let ops = &p.operands[&v];
            if let Some(&u) = ops.get(*next) {
                *next += 1;
                // Mark on entry so a node is pushed once.
                if done.insert(u) {
                    stack.push((u, 0));
                }
                continue;
            }
            stack.pop();
            if v == root {
                done.insert(v);
            }
            out.push(v);
        }
    }
    out
}

/// Why a run stopped.
enum Stop {
    /// The budget is too small for this recursion.
    Tight,
    /// The schedule would cost more Toffolis than the cap.
    Costly,
}

/// The moves being written and what they cost so far.
struct Run<'o> {
    o: &'o Order,
    moves: Vec<usize>,
    toffolis: usize,
    cap: usize,
    /// Scratch marks for the backwards replay.
    seen: Vec<bool>,
    /// The first half's share of a range that is split: `1 / split`.
    split: usize,
}

impl Run<'_> {
    fn push(&mut self, i: usize) -> Result<(), Stop> {
        self.moves.push(i);
        self.toffolis += self.o.is_and[i] as usize;
        if self.toffolis > self.cap {
            return Err(Stop::Costly);
        }
        Ok(())
    }

    /// Where a range that does not fit is split.
    fn middle(&self, a: usize, b: usize) -> usize {
        a + ((b - a) / self.split).max(1)
    }

    /// Drops the moves after the first `len`.
    fn truncate(&mut self, len: usize) {
        for &i in &self.moves[len..] {
            self.toffolis -= self.o.is_and[i] as usize;
        }
        self.moves.truncate(len);
    }

    /// How many nodes of `[a, b)` [`Run::range`] leaves held (the same
    /// recursion, down the second halves only).
    fn left(&self, a: usize, b: usize, held: usize, budget: usize, last: bool) -> usize {
        let o = self.o;
        if held + (b - a) <= budget {
            return if last { b - a } else { o.frontier(a, b, b) };
        }
        if b - a < 2 {
            return 0;
        }
        let m = self.middle(a, b);
        o.frontier(a, m, b) + self.left(m, b, held + o.frontier(a, m, m), budget, last)
    }

    /// Pebbles `[a, b)` with `held` nodes held before it and at most `budget`
    /// at any time. `last`: nothing after this range but the final
    /// uncompute, so it keeps all it computes.
    fn range(
        &mut self,
        a: usize,
        b: usize,
        held: usize,
        budget: usize,
        last: bool,
    ) -> Result<(), Stop> {
        let o = self.o;
        if held + (b - a) <= budget {
            for i in a..b {
                self.push(i)?;
            }
            if !last {
                for i in (a..b).rev() {
                    if o.last_use[i] < b {
                        self.push(i)?;
                    }
                }
            }
            return Ok(());
        }
        if b - a < 2 {
            return Err(Stop::Tight);
        }
        let m = self.middle(a, b);
        // The first half runs forwards, then backwards beside what the
        // second half leaves and what the first keeps for later.
        let first_kept = o.frontier(a, m, b);
        let second_held = held + o.frontier(a, m, m);
        let from = self.moves.len();
        // A last second half that keeps everything saves its uncompute but
        // leaves less room for the first half's way back; when that room is
        // too small, the second half uncomputes like any other.
        let mut second_last = last;
        let to = loop {
            let second_left = self.left(m, b, second_held, budget, second_last);
            let room = budget
                .checked_sub(second_left + first_kept)
                .filter(|&r| r > held);
            let planned = match room {
                Some(room) => self.range(a, m, held, room, false),
                None => Err(Stop::Tight),
            };
            match planned {
                Ok(()) => break self.moves.len(),
                Err(Stop::Tight) if second_last => {
                    self.truncate(from);
                    second_last = false;
                }
                Err(e) => return Err(e),
            }
        };
        self.range(m, b, second_held, budget, second_last)?;
        // Backwards, skipping the last uncompute of each node still read
        // after `b`: found as the first occurrence in the forward moves.
        for k in from..to {
            let i = self.moves[k];
            self.seen[i] = false;
        }
        let mut skip = Vec::new();
        for k in from..to {
            let i = self.moves[k];
            if !self.seen[i] {
                self.seen[i] = true;
                if o.last_use[i] >= b {
                    skip.push(k);
                }
            }
        }
        let mut skip = skip.into_iter().rev().peekable();
        for k in (from..to).rev() {
            if skip.peek() == Some(&k) {
                skip.next();
                continue;
            }
            let i = self.moves[k];
            self.push(i)?;
        }
        Ok(())
    }
}

/// The shares of a split range that go first: halves, thirds, ... A small
/// first part is replayed backwards at little cost; halves need the fewest
/// pebbles.
const SPLITS: [usize; 5] = [2, 3, 4, 8, 16];

/// The checkpoint schedule within `k` pebbles and at most `cap` Toffolis, or
/// `None` when it does not fit or would cost more.
fn run_capped(o: &Order, k: usize, cap: usize, split: usize) -> Option<Vec<usize>> {
    let n = o.operands.len();
    let mut r = Run {
        o,
        moves: Vec::with_capacity(n),
        toffolis: 0,
        cap,
        seen: vec![false; n],
        split,
    };
    match r.range(0, n, 0, k, true) {
        Ok(()) => Some(r.moves),
        Err(Stop::Tight | Stop::Costly) => None,
    }
}

/// The checkpoint schedule within `k` pebbles, or `None` when it does not fit.
#[cfg(test)]
fn run(o: &Order, k: usize) -> Option<Vec<usize>> {
    run_capped(o, k, usize::MAX, 2)
}

/// The peak and Toffoli count of `moves`, checking that every move has its
/// operands held (a schedule that breaks the rule is a bug, reported as `None`).
fn measure(o: &Order, moves: &[usize]) -> Option<(usize, usize)> {
    let mut on = vec![false; o.operands.len()];
    let (mut held, mut peak, mut toffolis) = (0usize, 0usize, 0usize);
    for &i in moves {
        if o.operands[i].iter().any(|&j| !on[j]) {
            return None;
        }
        on[i] = !on[i];
        if on[i] {
            held += 1;
            peak = peak.max(held);
        } else {
            held -= 1;
        }
        toffolis += o.is_and[i] as usize;
    }
    Some((peak, toffolis))
}

/// The moves, peak and Toffolis of a schedule within `k` pebbles and `cap`
/// Toffolis, with every move checked.
fn fitting(o: &Order, k: usize, cap: usize, split: usize) -> Option<(Vec<usize>, usize, usize)> {
    let moves = run_capped(o, k, cap, split)?;
    let (peak, toffolis) = measure(o, &moves).expect("checkpoint moves keep operands held");
    debug_assert!(peak <= k, "budget {k}, peak {peak}");
    (peak <= k).then_some((moves, peak, toffolis))
}

/// The budgets of the grid: 1, 2, 3, ... growing by about 12% a step.
pub(super) fn grid(up_to: usize) -> Vec<usize> {
    let mut g = Vec::new();
    let mut k = 1usize;
    while k < up_to {
        g.push(k);
        k = (k + 1).max(k + k / 8);
    }
    g.push(up_to);
    g
}

/// The cheapest checkpoint schedule (fewest Toffolis, then fewest pebbles)
/// over the grid budgets up to `k` and every split, or `None` when none fits;
/// then also the smallest grid budget above `k` that fits, if any.
pub(super) fn best_on_grid(
    p: &Plan,
    k: usize,
    is_and: &dyn Fn(usize) -> bool,
    progress: &dyn Progress,
) -> (Option<Schedule>, Option<usize>) {
    let orders = Order::both(p, is_and);
    let n = p.needed.len();
    let budgets = grid(n.max(1));
    let mut best: Option<Schedule> = None;
    // From the largest budget down: the first schedule found is usually the
    // cheapest, and a run that would cost more than the best so far stops
    // early.
    let tried: Vec<usize> = budgets.iter().copied().filter(|&g| g <= k).rev().collect();
    for (done, &g) in tried.iter().enumerate() {
        progress.event(Event::Stage {
            task: Task::Pebbling,
            done: done as u64,
            total: tried.len() as u64,
        });
        for o in &orders {
            for split in SPLITS {
                let cap = best.as_ref().map_or(usize::MAX, |b| b.toffolis);
                let Some((moves, peak, toffolis)) = fitting(o, g, cap, split) else {
                    continue;
                };
                let better = best
                    .as_ref()
                    .is_none_or(|b| (toffolis, peak) < (b.toffolis, b.peak));
                if better {
                    best = Some(Schedule {
                        moves: moves.iter().map(|&i| o.nodes[i]).collect(),
                        peak,
                        toffolis,
                    });
                }
            }
        }
    }
    if !tried.is_empty() {
        progress.event(Event::Stage {
            task: Task::Pebbling,
            done: tried.len() as u64,
            total: tried.len() as u64,
        });
    }
    let smallest = match &best {
        Some(_) => None,
        None => budgets.iter().copied().filter(|&g| g > k).find(|&g| {
            orders.iter().any(|o| {
                SPLITS
                    .iter()
                    .any(|&s| fitting(o, g, usize::MAX, s).is_some())
            })
        }),
    };
    (best, smallest)
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::BTreeMap;

    /// `w` leaves listed first, then a chain of ANDs folding them in one by
    /// one (node `w + i` reads node `w + i - 1` and leaf `i + 1`): the shape
    /// of a CNF's clauses and their conjunction, in the order a reader
    /// builds them.
    fn leaves_then_fold(w: usize) -> Plan {
        let mut operands = BTreeMap::new();
        for i in 0..w {
            operands.insert(i, vec![]);
        }
        operands.insert(w, vec![0, 1]);
        for i in 1..w - 1 {
            operands.insert(w + i, vec![w + i - 1, i + 1]);
        }
        let last = 2 * w - 2;
        Plan {
            copies: vec![(vec![last], false)],
            needed: (0..=last).collect(),
            operands,
        }
    }

    #[test]
    fn the_post_order_keeps_a_wide_fold_narrow() {
        // In the order as built, every leaf is computed before the fold
        // reads it, so the frontier is the whole width; the post-order
        // computes each leaf just before its reader. Counted by hand: the
        // fold's chain then needs pebbles for a chain of w - 1 nodes plus
        // one leaf at a time.
        let w = 40;
        let p = leaves_then_fold(w);
        let built = Order::new(&p, &p.needed, &|_| true);
        let post = Order::new(&p, &post_order(&p), &|_| true);
        assert!(run(&built, 20).is_none());
        let moves = run(&post, 20).expect("the post-order fits 20 pebbles");
        let (peak, _) = measure(&post, &moves).unwrap();
        assert!(peak <= 20);
        // And the grid, which runs both orders, finds it.
        let (s, _) = best_on_grid(&p, 20, &|_| true, &());
        assert!(s.is_some());
    }

    /// A chain of `n` nodes, each reading the one before; the last is an output.
    fn chain(n: usize) -> Plan {
        Plan {
            copies: vec![(vec![n - 1], false)],
            needed: (0..n).collect(),
            operands: (0..n)
                .map(|i| (i, if i == 0 { vec![] } else { vec![i - 1] }))
                .collect::<BTreeMap<_, _>>(),
        }
    }

    #[test]
    fn a_budget_as_large_as_the_network_is_plain_bennett() {
        let p = chain(50);
        let o = Order::new(&p, &p.needed, &|_| true);
        let moves = run(&o, 50).unwrap();
        assert_eq!(moves, (0..50).collect::<Vec<_>>());
    }

    #[test]
    fn schedules_fit_their_budget_and_keep_operands_held() {
        let p = chain(200);
        let o = Order::new(&p, &p.needed, &|_| true);
        for split in SPLITS {
            for k in 1..=200 {
                if let Some(moves) = run_capped(&o, k, usize::MAX, split) {
                    let (peak, toffolis) = measure(&o, &moves).expect("legal moves");
                    assert!(peak <= k, "budget {k} split {split}: peak {peak}");
                    assert!(toffolis >= 200, "every node is computed at least once");
                }
            }
        }
        // One pebble cannot pass a chain of two: the first node must stay
        // held while the second is computed.
        assert!(run(&Order::new(&chain(2), &chain(2).needed, &|_| true), 1).is_none());
    }

    #[test]
    fn a_long_chain_passes_logarithmically_many_pebbles() {
        // Bennett 1989: recursive halving pebbles a chain of n with
        // O(log n) pebbles. Each level of halving costs this recursion two
        // pebbles (the checkpoint and the first half's cleared frontier), so
        // 2 log2(n) + 2 is its bound; 10,000 nodes pass 16 pebbles (measured)
        // where one pass of segments would need k(k + 1)/2 >= n, 141.
        for n in [100usize, 1000, 10_000] {
            let c = chain(n);
            let o = Order::new(&c, &c.needed, &|_| true);
            let bound = 2 * (usize::BITS - n.leading_zeros()) as usize + 2;
            let moves = run(&o, bound).unwrap_or_else(|| panic!("chain {n} within {bound}"));
            let (peak, _) = measure(&o, &moves).unwrap();
            assert!(peak <= bound);
        }
        let c = chain(10_000);
        assert!(run(&Order::new(&c, &c.needed, &|_| true), 16).is_some());
    }

    /// A random network in topological order: each node reads up to two of
    /// the eight before it; the last three are outputs.
    fn random_dag(n: usize, seed: u64) -> Plan {
        let mut state = seed;
        let mut next = move || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let operands = (0..n)
            .map(|i| {
                let mut ops: Vec<usize> = (0..2)
                    .filter(|_| i > 0)
                    .map(|_| i - 1 - (next() as usize % i.min(8)))
                    .collect();
                ops.sort_unstable();
                ops.dedup();
                (i, ops)
            })
            .collect::<BTreeMap<_, _>>();
        Plan {
            copies: vec![((n.saturating_sub(3)..n).collect(), false)],
            needed: (0..n).collect(),
            operands,
        }
    }

    #[test]
    fn random_networks_get_legal_schedules_far_below_their_size() {
        for seed in 1..=20u64 {
            let p = random_dag(400, seed);
            let (s, smallest) = best_on_grid(&p, 160, &|_| true, &());
            // Measured: every seed fits in about 64 of 400; 160 leaves room.
            let s =
                s.unwrap_or_else(|| panic!("seed {seed}: none within 160, smallest {smallest:?}"));
            assert!(s.peak <= 160);
            let o = Order::new(&p, &p.needed, &|_| true);
            let moves: Vec<usize> = s.moves.clone();
            assert_eq!(
                measure(&o, &moves),
                Some((s.peak, s.toffolis)),
                "seed {seed}"
            );
            // Fewer pebbles than nodes cost recomputation.
            assert!(s.toffolis > 400, "seed {seed}");
        }
    }

    #[test]
    fn the_grid_curve_never_rises_with_the_budget() {
        for p in [chain(300), random_dag(300, 7)] {
            let mut last = usize::MAX;
            let mut first = None;
            for k in 1..=300 {
                let (s, smallest) = best_on_grid(&p, k, &|_| true, &());
                match s {
                    Some(s) => {
                        assert!(s.peak <= k);
                        assert!(s.toffolis <= last, "budget {k}");
                        assert_eq!(smallest, None);
                        first.get_or_insert(k);
                        last = s.toffolis;
                    }
                    None => {
                        assert!(first.is_none(), "budget {k} fits no more");
                        assert!(smallest.is_some_and(|g| g > k), "budget {k}");
                    }
                }
            }
            assert_eq!(
                last, 300,
                "the full budget is plain Bennett: one move per node"
            );
        }
    }
}
