//! Multi-level synthesis with uncomputation: the function becomes a logic
//! network, each internal node is computed into an ancilla, the outputs are
//! copied out, and the computation is run backwards so every ancilla ends at 0
//! (Bennett, "Logical reversibility of computation", IBM J. Res. Dev. 17, 1973).
//!
//! An AND node costs one Toffoli (mixed polarities, no NOT needed), an XOR node
//! two CNOTs, a NOT nothing (it is a complemented edge). Outputs that are XORs
//! are copied leaf by leaf, so XOR trees feeding only outputs need no ancilla.
//! A forward pass of `G` gates with `m` single-node outputs gives `2G + m` gates.
//!
//! With a qubit budget the order of computing and uncomputing is a reversible
//! pebbling game on the network: a node may be computed or uncomputed only
//! while its operands are held. Two strategies play it. The checkpoint schedule
//! (`checkpoints.rs`: Bennett's recursive time-space trade-off over the
//! topological order) takes `O(n log n)` work per budget plus its moves, and
//! runs on a fixed grid of budgets, so its Toffoli count never rises with the
//! budget. For networks of
//! at most [`PEBBLE_SAT_MAX_NODES`] nodes a SAT search also runs (Meuli,
//! Soeken, Roetteler, Bjorner, De Micheli, "Reversible pebbling game for
//! quantum memory management", DATE 2019): one variable per node and step, the
//! move rule as clauses, and a sequential counter (Sinz 2005) bounding the
//! pebbles held at every step; the number of steps grows until a schedule
//! exists. The cheaper of the two in Toffolis is used. Recomputed nodes are
//! what the smaller budget costs.
//!
//! Complexity: linear in the network for plain Bennett; the checkpoint
//! schedule runs a few dozen grid budgets and stops each run once it costs
//! more than the best so far; the SAT search is bounded by
//! `--exact-seconds` and its encoding by `--max-clauses` before it is built.

use super::checkpoints::{best_on_grid, Schedule};
use super::pebble::{pebble, Pebbling};
use super::{network_of, SynthError, SynthLimits, Synthesis};
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::logic::{Lit, Network, Node};
use crate::progress::{Event, Progress, Task};
use crate::spec::FunctionSpec;
use crate::xag::{minimize_ands, RewriteReport, Xag4Database};
use std::collections::{BTreeMap, BTreeSet};
use std::time::{Duration, Instant};

/// What must be computed: the leaves each output XORs together (inputs and
/// AND nodes, with the output's overall complement), and every internal node
/// those leaves need.
pub(super) struct Plan {
    /// Per output: (leaf nodes, complemented).
    pub(super) copies: Vec<(Vec<usize>, bool)>,
    /// Internal nodes to hold, in topological order.
    pub(super) needed: Vec<usize>,
    /// Operand nodes of each needed node that are themselves internal.
    pub(super) operands: BTreeMap<usize, Vec<usize>>,
}

pub(super) fn plan(net: &Network) -> Plan {
    let nodes = net.nodes();
    let mut copies = Vec::new();
    for &out in &net.outputs {
        // XOR trees are flattened: a leaf reached an even number of times
        // cancels. Shared XOR nodes are visited once, highest node first
        // (operands come before the nodes that use them), carrying the
        // parity of the paths that reach them: walking them as a tree would
        // take time exponential in the depth of shared XORs.
        let mut frontier: BTreeMap<usize, bool> = BTreeMap::new();
        let mut leaves: Vec<usize> = Vec::new();
        let mut neg = out.neg;
        frontier.insert(out.node, true);
        while let Some((v, odd)) = frontier.pop_last() {
            if !odd {
                continue;
            }
            match nodes[v] {
                Node::Xor(a, b) => {
                    debug_assert!(a.node < v && b.node < v, "operands precede their node");
                    neg ^= a.neg ^ b.neg;
                    for u in [a.node, b.node] {
                        let e = frontier.entry(u).or_insert(false);
                        *e = !*e;
                    }
                }
                Node::Zero => {}
                _ => leaves.push(v),
            }
        }
        leaves.sort_unstable();
        copies.push((leaves, neg));
    }
    let internal = |v: usize| matches!(nodes[v], Node::And(..) | Node::Xor(..));
    let mut need: BTreeSet<usize> = BTreeSet::new();
    let mut stack: Vec<usize> = copies
        .iter()
        .flat_map(|(l, _)| l.iter().copied())
        .filter(|&v| internal(v))
        .collect();
    while let Some(v) = stack.pop() {
        if !need.insert(v) {
            continue;
        }
        if let Node::And(a, b) | Node::Xor(a, b) = nodes[v] {
            for u in [a.node, b.node] {
                if internal(u) {
                    stack.push(u);
                }
            }
        }
    }
    let needed: Vec<usize> = need.iter().copied().collect();
    let operands = needed
        .iter()
        .map(|&v| {
            let ops = match nodes[v] {
                Node::And(a, b) | Node::Xor(a, b) => [a.node, b.node]
                    .into_iter()
                    .filter(|&u| internal(u))
                    .collect(),
                _ => Vec::new(),
            };
            (v, ops)
        })
        .collect();
    Plan {
        copies,
        needed,
        operands,
    }
}

/// Gates that compute (or, the same gates again, uncompute) node `v` into its line.
fn node_gates(net: &Network, v: usize, line_of: &dyn Fn(usize) -> Line) -> Vec<Gate> {
    let t = line_of(v);
    match net.nodes()[v] {
        Node::And(a, b) => {
            let c = |l: Lit| Control {
                line: line_of(l.node),
                positive: !l.neg,
            };
            vec![Gate::new(vec![c(a), c(b)], t).expect("operands differ from the node")]
        }
        Node::Xor(a, b) => {
            let mut g = vec![
                Gate::cnot(line_of(a.node).0, t.0),
                Gate::cnot(line_of(b.node).0, t.0),
            ];
            if a.neg ^ b.neg {
                g.push(Gate::not(t.0));
            }
            g
        }
        _ => Vec::new(),
    }
}

/// Most nodes for which the SAT pebbling runs beside the checkpoint schedule.
pub const PEBBLE_SAT_MAX_NODES: usize = 150;

/// Why no schedule was made.
enum Unscheduled {
    /// None fits; this many pebbles would.
    Budget(usize),
    /// A budget of the SAT search stopped it and no checkpoint schedule fits.
    Other(SynthError),
}

/// A schedule within `pebbles` ancillae: the cheapest checkpoint schedule of the
/// budget grid, and for networks of at most [`PEBBLE_SAT_MAX_NODES`] nodes the
/// SAT schedule when it costs fewer Toffolis. Returns the schedule and a note
/// on how it was found.
fn schedule_within(
    net: &Network,
    p: &Plan,
    pebbles: usize,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<(Vec<Vec<usize>>, &'static str), Unscheduled> {
    let is_and = |v: usize| matches!(net.nodes()[v], Node::And(..));
    let (grid, smallest) = best_on_grid(p, pebbles, &is_and, progress);
    let sat = if p.needed.len() <= PEBBLE_SAT_MAX_NODES {
        let deadline = Instant::now() + Duration::from_secs_f64(limits.exact_seconds.max(0.0));
        let stage = |done| {
            progress.event(Event::Stage {
                task: Task::PebblingBySat,
                done,
                total: done,
            })
        };
        stage(0);
        let found = pebble(p, pebbles, deadline, limits.max_clauses);
        stage(1);
        Some(found)
    } else {
        None
    };
    let by_checkpoints = |s: Schedule| s.moves.into_iter().map(|v| vec![v]).collect::<Vec<_>>();
    match (sat, grid) {
        (Some(Pebbling::Found(s)), g) => {
            let toffolis = s.iter().flatten().filter(|&&v| is_and(v)).count();
            match g {
                Some(g) if g.toffolis < toffolis => Ok((by_checkpoints(g), "by checkpoints")),
                _ => Ok((s, "by SAT")),
            }
        }
        (_, Some(g)) => Ok((by_checkpoints(g), "by checkpoints")),
        (Some(Pebbling::OutOfTime), None) => Err(Unscheduled::Other(SynthError::OutOfTime {
            what: format!("the search for a schedule within {pebbles} ancillae"),
            seconds: limits.exact_seconds,
        })),
        (_, None) => Err(Unscheduled::Budget(
            smallest.unwrap_or(p.needed.len()).max(pebbles + 1),
        )),
    }
}

/// Bennett's compute-copy-uncompute for `f`, with a pebbling schedule when
/// `limits.max_qubits` asks for fewer qubits than plain Bennett uses.
pub fn bennett(
    f: &FunctionSpec,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    bennett_on(f, &network_of(f)?, limits, Vec::new(), progress)
}

/// The network of `f` rewritten to fewer AND nodes (never more) by cut
/// rewriting with the 4-input database, and what the rewriting did.
pub fn xag_network(f: &FunctionSpec) -> Result<(Network, RewriteReport), SynthError> {
    let net = network_of(f)?;
    let db = Xag4Database::build();
    Ok(minimize_ands(&net, &db))
}

/// [`bennett`] on the network of `f` rewritten by [`xag_network`].
pub fn bennett_xag(
    f: &FunctionSpec,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    let (net, r) = xag_network(f)?;
    let note = format!(
        "xag: {} AND nodes as written, {} after cut rewriting ({} rounds)",
        r.before, r.after, r.rounds
    );
    bennett_on(f, &net, limits, vec![note], progress)
}

/// Bennett's compute-copy-uncompute of `net`, the network of `f`.
fn bennett_on(
    f: &FunctionSpec,
    net: &Network,
    limits: &SynthLimits,
    mut notes: Vec<String>,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    let p = plan(net);
    let n = f.inputs.len();
    let m = f.outputs.len();
    let full = n + m + p.needed.len();
    let budget = limits.max_qubits.unwrap_or(usize::MAX);
    let schedule: Vec<Vec<usize>> = if budget >= full {
        // Plain Bennett: every node once, in topological order.
        p.needed.iter().map(|&v| vec![v]).collect()
    } else {
        let pebbles = budget.saturating_sub(n + m);
        let (schedule, note) =
            schedule_within(net, &p, pebbles, limits, progress).map_err(|e| match e {
                Unscheduled::Budget(needed) => SynthError::Budget {
                    budget,
                    needed: n + m + needed,
                },
                Unscheduled::Other(e) => e,
            })?;
        notes.push(format!(
            "bennett: scheduled within {budget} qubits ({pebbles} ancillae for {} nodes) {note}",
            p.needed.len()
        ));
        schedule
    };
    // Assign ancilla lines: each node gets a line while it is held; lines are reused.
    let mut c = Circuit::new(f.layout().lines());
    let mut line_of_node: BTreeMap<usize, Line> = BTreeMap::new();
    let mut free: Vec<Line> = Vec::new();
    let mut forward: Vec<Gate> = Vec::new();
    for step in &schedule {
        // Uncompute before compute, so that a freed line serves the same step.
        let mut step = step.clone();
        step.sort_by_key(|v| !line_of_node.contains_key(v));
        for &v in &step {
            let held = line_of_node.contains_key(&v);
            let line = match line_of_node.get(&v) {
                Some(&l) => l,
                None => free.pop().unwrap_or_else(|| c.add_ancilla()),
            };
            line_of_node.insert(v, line);
            let lookup = |u: usize| -> Line {
                match net.nodes()[u] {
                    Node::Input(j) => Line(j as u32),
                    _ => line_of_node[&u],
                }
            };
            forward.extend(node_gates(net, v, &lookup));
            if held {
                // Uncomputed: the line is free again.
                line_of_node.remove(&v);
                free.push(line);
            }
        }
    }
    for g in &forward {
        c.push(g.clone());
    }
    for (j, (leaves, neg)) in p.copies.iter().enumerate() {
        let y = Line((n + j) as u32);
        for &v in leaves {
            let src = match net.nodes()[v] {
                Node::Input(i) => Line(i as u32),
                _ => line_of_node[&v],
            };
            c.push(Gate::cnot(src.0, y.0));
        }
        if *neg {
            c.push(Gate::not(y.0));
        }
    }
    for g in forward.into_iter().rev() {
        c.push(g);
    }
    Ok(Synthesis {
        circuit: c,
        notes,
        stop: None,
    })
}

/// The gates of plain Bennett's forward pass and the copies, for checking the
/// `2G + m` count: (forward gates, copy gates).
pub fn bennett_counts(f: &FunctionSpec) -> Result<(usize, usize), SynthError> {
    let net = network_of(f)?;
    let p = plan(&net);
    let forward = p
        .needed
        .iter()
        .map(|&v| match net.nodes()[v] {
            Node::And(..) => 1,
            Node::Xor(a, b) => 2 + (a.neg ^ b.neg) as usize,
            _ => 0,
        })
        .sum();
    let copies = p
        .copies
        .iter()
        .map(|(l, neg)| l.len() + *neg as usize)
        .sum();
    Ok((forward, copies))
}
