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
//! while its operands are held. The schedule is found by SAT (Meuli, Soeken,
//! Roetteler, Bjorner, De Micheli, "Reversible pebbling game for quantum memory
//! management", DATE 2019): one variable per node and step, the move rule as
//! clauses, and a sequential counter (Sinz 2005) bounding the pebbles held at
//! every step; the number of steps grows until a schedule exists. Recomputed
//! nodes are what the smaller budget costs, in Toffolis.
//!
//! Complexity: linear in the network for plain Bennett; the SAT search is
//! bounded by `--exact-seconds`.

use super::{function_lines, minimize_tables, SynthError, SynthLimits, Synthesis};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo, Role};
use crate::logic::{Lit, Network, Node, MAX_TABLE_VARS};
use crate::lower::ANCILLA_REGISTER;
use crate::spec::{FunctionSpec, OutputDef};
use std::collections::{BTreeMap, BTreeSet};
use std::time::{Duration, Instant};

/// The network of a function spec: expressions directly, tables through their ESOP.
pub fn network_of(f: &FunctionSpec) -> Result<Network, SynthError> {
    let n = f.inputs.len();
    let mut net = Network::new(n);
    for (j, o) in f.outputs.iter().enumerate() {
        let lit = match &o.def {
            OutputDef::Expr(e) => net.expr(e),
            OutputDef::Table(_) => {
                if n > MAX_TABLE_VARS {
                    return Err(SynthError::Limit {
                        what: "the number of inputs of a table",
                        value: n,
                        limit: MAX_TABLE_VARS,
                        flag: "--max-inputs",
                    });
                }
                let t = f.table(j).expect("table outputs have tables");
                let esop = minimize_tables(&[t]);
                let mut acc = Lit::FALSE;
                for (cube, _) in &esop.terms {
                    let mut p = Lit::TRUE;
                    for i in 0..n as u32 {
                        if (cube.care >> i) & 1 == 1 {
                            let x = net.input(i as usize);
                            let l = if (cube.pol >> i) & 1 == 1 {
                                x
                            } else {
                                x.inverted()
                            };
                            p = net.and(p, l);
                        }
                    }
                    acc = net.xor(acc, p);
                }
                acc
            }
        };
        net.outputs.push(lit);
    }
    Ok(net)
}

/// What must be computed: the leaves each output XORs together (inputs and
/// AND nodes, with the output's overall complement), and every internal node
/// those leaves need.
struct Plan {
    /// Per output: (leaf nodes, complemented).
    copies: Vec<(Vec<usize>, bool)>,
    /// Internal nodes to hold, in topological order.
    needed: Vec<usize>,
    /// Operand nodes of each needed node that are themselves internal.
    operands: BTreeMap<usize, Vec<usize>>,
}

fn plan(net: &Network) -> Plan {
    let nodes = net.nodes();
    let mut copies = Vec::new();
    for &out in &net.outputs {
        // XOR trees are flattened: a leaf reached an even number of times cancels.
        let mut parity: BTreeMap<usize, bool> = BTreeMap::new();
        let mut neg = out.neg;
        let mut stack = vec![out.node];
        while let Some(v) = stack.pop() {
            match nodes[v] {
                Node::Xor(a, b) => {
                    neg ^= a.neg ^ b.neg;
                    stack.push(a.node);
                    stack.push(b.node);
                }
                Node::Zero => {}
                _ => {
                    let e = parity.entry(v).or_insert(false);
                    *e = !*e;
                }
            }
        }
        let leaves: Vec<usize> = parity
            .into_iter()
            .filter(|(_, odd)| *odd)
            .map(|(v, _)| v)
            .collect();
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

/// Bennett's compute-copy-uncompute for `f`, with a pebbling schedule when
/// `limits.max_qubits` asks for fewer qubits than plain Bennett uses.
pub fn bennett(f: &FunctionSpec, limits: &SynthLimits) -> Result<Synthesis, SynthError> {
    let net = network_of(f)?;
    let p = plan(&net);
    let n = f.inputs.len();
    let m = f.outputs.len();
    let full = n + m + p.needed.len();
    let budget = limits.max_qubits.unwrap_or(usize::MAX);
    let mut notes = Vec::new();
    let schedule: Vec<Vec<usize>> = if budget >= full {
        // Plain Bennett: every node once, in topological order.
        p.needed.iter().map(|&v| vec![v]).collect()
    } else {
        let pebbles = budget.saturating_sub(n + m);
        let deadline = Instant::now() + Duration::from_secs_f64(limits.exact_seconds.max(0.0));
        match pebble(&p, pebbles, deadline) {
            Some(s) => {
                notes.push(format!(
                    "bennett: scheduled within {budget} qubits ({pebbles} ancillae for {} nodes)",
                    p.needed.len()
                ));
                s
            }
            None => {
                let needed = (pebbles + 1..=p.needed.len())
                    .find(|&k| pebble(&p, k, deadline).is_some())
                    .unwrap_or(p.needed.len());
                return Err(SynthError::Budget {
                    budget,
                    needed: n + m + needed,
                });
            }
        }
    };
    // Assign ancilla lines: each node gets a line while it is held; lines are reused.
    let mut c = Circuit::new(function_lines(f));
    let mut line_of_node: BTreeMap<usize, Line> = BTreeMap::new();
    let mut free: Vec<Line> = Vec::new();
    let mut ancillae = 0u32;
    let mut forward: Vec<Gate> = Vec::new();
    for step in &schedule {
        // Uncompute before compute, so that a freed line serves the same step.
        let mut step = step.clone();
        step.sort_by_key(|v| !line_of_node.contains_key(v));
        for &v in &step {
            let held = line_of_node.contains_key(&v);
            let line = match line_of_node.get(&v) {
                Some(&l) => l,
                None => free.pop().unwrap_or_else(|| {
                    ancillae += 1;
                    c.add_line(LineInfo {
                        register: ANCILLA_REGISTER.into(),
                        index: ancillae - 1,
                        role: Role::Ancilla,
                        label: format!("anc{}", ancillae - 1),
                    })
                }),
            };
            line_of_node.insert(v, line);
            let lookup = |u: usize| -> Line {
                match net.nodes()[u] {
                    Node::Input(j) => Line(j as u32),
                    _ => line_of_node[&u],
                }
            };
            forward.extend(node_gates(&net, v, &lookup));
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
    Ok(Synthesis { circuit: c, notes })
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

/// A pebbling schedule that holds at most `k` nodes at any step and ends with
/// every output leaf held: the nodes toggled at each step. `None` when no
/// schedule was found before `deadline`.
fn pebble(p: &Plan, k: usize, deadline: Instant) -> Option<Vec<Vec<usize>>> {
    let v = &p.needed;
    let count = v.len();
    if count == 0 {
        return Some(Vec::new());
    }
    let goal: BTreeSet<usize> = p
        .copies
        .iter()
        .flat_map(|(l, _)| l.iter().copied())
        .filter(|x| p.operands.contains_key(x))
        .collect();
    if goal.len() > k || k == 0 {
        return None;
    }
    let index: BTreeMap<usize, usize> = v.iter().enumerate().map(|(i, &x)| (x, i)).collect();
    let mut steps = count.max(2);
    while Instant::now() < deadline && steps <= 8 * count + 8 {
        let left = deadline.saturating_duration_since(Instant::now());
        match pebble_steps(p, &index, &goal, k, steps, left) {
            Some(Some(s)) => return Some(s),
            Some(None) => steps *= 2,
            None => return None,
        }
    }
    None
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

/// Most leaves of a piece in [`hierarchical`]: the exact ESOP table covers them.
pub const PIECE_INPUTS: usize = 4;

/// Hierarchical synthesis: the network is cut into pieces of at most
/// [`PIECE_INPUTS`] leaves (inputs or other pieces), each piece's function is
/// synthesized from its minimum ESOP into one ancilla, and the pieces are glued
/// with Bennett's compute-copy-uncompute.
///
/// Cutting: nodes are visited in topological order; a node's leaves are the
/// union of its operands' leaves, and when that union would pass the limit the
/// operands become pieces of their own. Fewer, larger pieces hold fewer
/// ancillae than plain Bennett; each costs its ESOP's Toffolis.
pub fn hierarchical(f: &FunctionSpec, limits: &SynthLimits) -> Result<Synthesis, SynthError> {
    let net = network_of(f)?;
    let p = plan(&net);
    let nodes = net.nodes();
    let internal = |v: usize| matches!(nodes[v], Node::And(..) | Node::Xor(..));
    let mut roots: BTreeSet<usize> = p
        .copies
        .iter()
        .flat_map(|(l, _)| l.iter().copied())
        .filter(|&v| internal(v))
        .collect();
    let mut leaves: BTreeMap<usize, BTreeSet<usize>> = BTreeMap::new();
    for &v in &p.needed {
        let ops = match nodes[v] {
            Node::And(a, b) | Node::Xor(a, b) => [a.node, b.node],
            _ => continue,
        };
        let of = |u: usize, roots: &BTreeSet<usize>, leaves: &BTreeMap<usize, BTreeSet<usize>>| {
            if !internal(u) || roots.contains(&u) {
                BTreeSet::from([u])
            } else {
                leaves[&u].clone()
            }
        };
        let mut set: BTreeSet<usize> = ops.iter().flat_map(|&u| of(u, &roots, &leaves)).collect();
        if set.len() > PIECE_INPUTS {
            for u in ops {
                if internal(u) {
                    roots.insert(u);
                }
            }
            set = ops.iter().copied().collect();
        }
        set.remove(&0);
        leaves.insert(v, set);
    }
    // Synthesize each piece, in topological order, into its own ancilla.
    let n = f.inputs.len();
    let mut c = Circuit::new(function_lines(f));
    let mut line_of: BTreeMap<usize, Line> = (0..n).map(|j| (1 + j, Line(j as u32))).collect();
    let mut forward: Vec<Gate> = Vec::new();
    for &r in &roots {
        let leaf: Vec<usize> = leaves[&r].iter().copied().collect();
        let k = leaf.len();
        let mut table = 0u64;
        for x in 0..1u64 << k {
            let mut val: BTreeMap<usize, bool> = leaf
                .iter()
                .enumerate()
                .map(|(i, &l)| (l, (x >> i) & 1 == 1))
                .collect();
            if piece_value(&net, r, &mut val) {
                table |= 1 << x;
            }
        }
        let index = c.register(ANCILLA_REGISTER).len() as u32;
        let a = c.add_line(LineInfo {
            register: ANCILLA_REGISTER.into(),
            index,
            role: Role::Ancilla,
            label: format!("anc{index}"),
        });
        line_of.insert(r, a);
        let cubes = if k == 0 {
            if table & 1 == 1 {
                vec![crate::logic::Cube::ONE]
            } else {
                Vec::new()
            }
        } else {
            super::EsopTable::get(k).esop(table as usize)
        };
        for cube in cubes {
            let controls: Vec<Control> = (0..k as u32)
                .filter(|i| (cube.care >> i) & 1 == 1)
                .map(|i| Control {
                    line: line_of[&leaf[i as usize]],
                    positive: (cube.pol >> i) & 1 == 1,
                })
                .collect();
            forward.push(Gate::new(controls, a).expect("leaves are other lines"));
        }
    }
    for g in &forward {
        c.push(g.clone());
    }
    for (j, (ls, neg)) in p.copies.iter().enumerate() {
        let y = Line((n + j) as u32);
        for &v in ls {
            c.push(Gate::cnot(line_of[&v].0, y.0));
        }
        if *neg {
            c.push(Gate::not(y.0));
        }
    }
    for g in forward.into_iter().rev() {
        c.push(g);
    }
    let _ = limits;
    Ok(Synthesis {
        circuit: c,
        notes: vec![format!(
            "hierarchical: {} pieces of at most {PIECE_INPUTS} leaves over {} network nodes",
            roots.len(),
            p.needed.len()
        )],
    })
}

/// Value of node `v` given the values of its piece's leaves (memoized in `val`).
fn piece_value(net: &Network, v: usize, val: &mut BTreeMap<usize, bool>) -> bool {
    if let Some(&b) = val.get(&v) {
        return b;
    }
    let r = match net.nodes()[v] {
        Node::Zero => false,
        Node::Input(_) => unreachable!("inputs are leaves"),
        Node::And(a, b) => {
            (piece_value(net, a.node, val) ^ a.neg) && (piece_value(net, b.node, val) ^ b.neg)
        }
        Node::Xor(a, b) => {
            (piece_value(net, a.node, val) ^ a.neg) ^ (piece_value(net, b.node, val) ^ b.neg)
        }
    };
    val.insert(v, r);
    r
}
