//! Fewer AND nodes in a logic network: cut rewriting with the 4-input
//! database of AND-minimal circuits.
//!
//! Every node's cuts of at most 4 leaves are enumerated bottom-up with their
//! truth tables; a cut's cost is the multiplicative complexity of its
//! function (from [`Xag4Database`]), so a cut whose function is affine (an
//! XOR written as three ANDs in an AIG) costs nothing and a majority costs
//! one. Each node keeps the cut of least area flow (its cost plus its leaves'
//! flows, shared among the node's fanouts); the outputs are then covered by
//! the chosen cuts and every chosen cut is rebuilt from its minimum circuit.
//! This is the mapping view of the cut rewriting of Testa, Soeken, Amarù and
//! De Micheli, "Reducing the multiplicative complexity in logic networks for
//! cryptography and security applications" (DAC 2019). Rounds repeat while
//! the count of ANDs reachable from the outputs falls, and a round that
//! would raise it is dropped, so the result never has more ANDs than the
//! input. XORs are free: depth and XOR count are not minimized.
//!
//! Complexity: linear in the network, with at most [`CUTS_PER_NODE`] cuts of
//! at most 4 leaves per node and at most [`MAX_ROUNDS`] rounds.

use super::database::Xag4Database;
use super::form::Affine;
use crate::logic::{Lit, Network, Node};

/// Most cuts kept per node (the cheapest by area flow).
pub const CUTS_PER_NODE: usize = 12;
/// Most rewriting rounds.
pub const MAX_ROUNDS: usize = 6;

/// What [`minimize_ands`] did.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct RewriteReport {
    /// AND nodes reachable from the outputs before.
    pub before: usize,
    /// AND nodes reachable from the outputs after.
    pub after: usize,
    /// Rounds that lowered the count.
    pub rounds: usize,
}

/// A cut: up to 4 leaf nodes (sorted) and the node's function of them
/// (leaf `i` is variable `i`; row `r` is bit `r`).
#[derive(Clone, Copy, Debug)]
struct Cut {
    leaves: [u32; 4],
    len: u8,
    table: u16,
    flow: f64,
}

impl Cut {
    fn leaves(&self) -> &[u32] {
        &self.leaves[..self.len as usize]
    }
}

/// The table of variable 0 over 4 variables.
const VAR0: u16 = 0xaaaa;

/// The nodes reachable from the outputs, and each one's fanout count among
/// them (outputs count as fanouts).
fn reach(net: &Network) -> (Vec<bool>, Vec<u32>) {
    let nodes = net.nodes();
    let mut live = vec![false; nodes.len()];
    let mut refs = vec![0u32; nodes.len()];
    for o in &net.outputs {
        live[o.node] = true;
        refs[o.node] += 1;
    }
    for v in (0..nodes.len()).rev() {
        if !live[v] {
            continue;
        }
        if let Node::And(a, b) | Node::Xor(a, b) = nodes[v] {
            for l in [a, b] {
                live[l.node] = true;
                refs[l.node] += 1;
            }
        }
    }
    (live, refs)
}

/// The AND nodes reachable from the outputs: the network's Toffoli count
/// under Bennett's compute-copy-uncompute, halved.
pub fn and_count(net: &Network) -> usize {
    let (live, _) = reach(net);
    net.nodes()
        .iter()
        .zip(&live)
        .filter(|(n, &l)| l && matches!(n, Node::And(..)))
        .count()
}

/// `table` (over `from`'s leaves) as a table over `to`'s leaves, a superset.
fn expand(table: u16, from: &[u32], to: &[u32]) -> u16 {
    let mut pos = [0usize; 4];
    for (i, l) in from.iter().enumerate() {
        pos[i] = to.iter().position(|t| t == l).expect("a superset");
    }
    let mut out = 0u16;
    for r in 0..16usize {
        let mut row = 0usize;
        for (i, &p) in pos.iter().enumerate().take(from.len()) {
            row |= (r >> p & 1) << i;
        }
        out |= (table >> row & 1) << r;
    }
    out
}

/// The sorted union of two leaf sets, if it has at most 4 leaves.
fn merge(a: &[u32], b: &[u32]) -> Option<([u32; 4], u8)> {
    let mut out = [0u32; 4];
    let (mut i, mut j, mut n) = (0, 0, 0);
    while i < a.len() || j < b.len() {
        let next = match (a.get(i), b.get(j)) {
            (Some(&x), Some(&y)) if x == y => {
                i += 1;
                j += 1;
                x
            }
            (Some(&x), Some(&y)) if x < y => {
                i += 1;
                x
            }
            (Some(_), Some(&y)) => {
                j += 1;
                y
            }
            (Some(&x), None) => {
                i += 1;
                x
            }
            (None, Some(&y)) => {
                j += 1;
                y
            }
            (None, None) => unreachable!("the loop condition"),
        };
        if n == 4 {
            return None;
        }
        out[n] = next;
        n += 1;
    }
    Some((out, n as u8))
}

/// One round: enumerate cuts, choose by area flow, rebuild the cover.
fn round(net: &Network, db: &Xag4Database) -> Network {
    let nodes = net.nodes();
    let (live, refs) = reach(net);
    // Per node: its cuts (the trivial cut last) and the index of the chosen one.
    let mut cuts: Vec<Vec<Cut>> = vec![Vec::new(); nodes.len()];
    let mut best: Vec<usize> = vec![0; nodes.len()];
    let mut flow: Vec<f64> = vec![0.0; nodes.len()];
    for v in 0..nodes.len() {
        if !live[v] {
            continue;
        }
        let trivial = Cut {
            leaves: [v as u32, 0, 0, 0],
            len: 1,
            table: VAR0,
            flow: 0.0,
        };
        let (a, b, is_and) = match nodes[v] {
            Node::And(a, b) => (a, b, true),
            Node::Xor(a, b) => (a, b, false),
            _ => {
                cuts[v].push(trivial);
                continue;
            }
        };
        let mut mine: Vec<Cut> = Vec::new();
        for ca in &cuts[a.node] {
            for cb in &cuts[b.node] {
                let Some((leaves, len)) = merge(ca.leaves(), cb.leaves()) else {
                    continue;
                };
                let to = &leaves[..len as usize];
                if mine.iter().any(|c| c.leaves() == to) {
                    continue;
                }
                let ta = expand(ca.table, ca.leaves(), to) ^ if a.neg { 0xffff } else { 0 };
                let tb = expand(cb.table, cb.leaves(), to) ^ if b.neg { 0xffff } else { 0 };
                let table = if is_and { ta & tb } else { ta ^ tb };
                let cost = db.and_count(table) as f64;
                let flow_in: f64 = to.iter().map(|&l| flow[l as usize]).sum();
                mine.push(Cut {
                    leaves,
                    len,
                    table,
                    flow: cost + flow_in,
                });
            }
        }
        mine.sort_by(|x, y| x.flow.total_cmp(&y.flow).then(x.len.cmp(&y.len)));
        mine.truncate(CUTS_PER_NODE);
        // The fanins' own cut {a, b} is always among them, so `mine` is not empty.
        best[v] = 0;
        flow[v] = mine[0].flow / f64::from(refs[v].max(1));
        mine.push(trivial);
        cuts[v] = mine;
    }
    // Cover from the outputs, then rebuild in topological order.
    let mut needed = vec![false; nodes.len()];
    let mut stack: Vec<usize> = net.outputs.iter().map(|o| o.node).collect();
    while let Some(v) = stack.pop() {
        if needed[v] {
            continue;
        }
        needed[v] = true;
        if matches!(nodes[v], Node::And(..) | Node::Xor(..)) {
            stack.extend(cuts[v][best[v]].leaves().iter().map(|&l| l as usize));
        }
    }
    let mut out = Network::new(net.inputs);
    let mut lit_of: Vec<Lit> = vec![Lit::FALSE; nodes.len()];
    for v in 0..nodes.len() {
        if !needed[v] {
            continue;
        }
        lit_of[v] = match nodes[v] {
            Node::Zero => Lit::FALSE,
            Node::Input(j) => out.input(j),
            _ => {
                let cut = &cuts[v][best[v]];
                let mut leaves = [Lit::FALSE; 4];
                for (i, &l) in cut.leaves().iter().enumerate() {
                    leaves[i] = lit_of[l as usize];
                }
                instantiate(&mut out, db, cut.table, &leaves)
            }
        };
    }
    out.outputs = net
        .outputs
        .iter()
        .map(|o| {
            let l = lit_of[o.node];
            if o.neg {
                l.inverted()
            } else {
                l
            }
        })
        .collect();
    out
}

/// Builds the minimum circuit of `table` over the literals `leaves` in `net`.
fn instantiate(net: &mut Network, db: &Xag4Database, table: u16, leaves: &[Lit; 4]) -> Lit {
    let xag = db.circuit(table);
    let mut gates: Vec<Lit> = Vec::with_capacity(xag.and_count());
    let value = |net: &mut Network, gates: &[Lit], f: Affine| -> Lit {
        let mut acc = if f.constant() { Lit::TRUE } else { Lit::FALSE };
        for (i, &leaf) in leaves.iter().enumerate() {
            if f.inputs() >> i & 1 == 1 {
                acc = net.xor(acc, leaf);
            }
        }
        for (j, &g) in gates.iter().enumerate() {
            if f.gates() >> j & 1 == 1 {
                acc = net.xor(acc, g);
            }
        }
        acc
    };
    for &[a, b] in xag.gates() {
        let la = value(net, &gates, a);
        let lb = value(net, &gates, b);
        let g = net.and(la, lb);
        gates.push(g);
    }
    value(net, &gates, xag.outputs()[0])
}

/// The network with fewer (never more) AND nodes reachable from its
/// outputs, computing the same function (see the module documentation).
pub fn minimize_ands(net: &Network, db: &Xag4Database) -> (Network, RewriteReport) {
    let before = and_count(net);
    let mut best = net.clone();
    let mut count = before;
    let mut rounds = 0;
    for _ in 0..MAX_ROUNDS {
        let next = round(&best, db);
        let c = and_count(&next);
        if c >= count {
            break;
        }
        best = next;
        count = c;
        rounds += 1;
    }
    (
        best,
        RewriteReport {
            before,
            after: count,
            rounds,
        },
    )
}
