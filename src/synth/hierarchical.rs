//! Hierarchical synthesis: the network cut into pieces of at most four leaves, each from its minimum ESOP, glued by Bennett's compute-copy-uncompute.

use super::bennett::plan;
use super::{network_of, SynthError, SynthLimits, Synthesis};
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::exact::Tables;
use crate::logic::{Network, Node};
use crate::spec::FunctionSpec;
use std::collections::{BTreeMap, BTreeSet};

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
    let mut c = Circuit::new(f.layout().lines());
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
        let a = c.add_ancilla();
        line_of.insert(r, a);
        let cubes = if k == 0 {
            if table & 1 == 1 {
                vec![crate::logic::Cube::ONE]
            } else {
                Vec::new()
            }
        } else {
            Tables::get().esop(k).esop(table as usize)
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
        stop: None,
    })
}

/// Value of node `v` given the values of its piece's leaves (memoized in
/// `val`), by a walk with an explicit stack: a piece may be a long chain.
fn piece_value(net: &Network, v: usize, val: &mut BTreeMap<usize, bool>) -> bool {
    let mut stack = vec![v];
    while let Some(&u) = stack.last() {
        if val.contains_key(&u) {
            stack.pop();
            continue;
        }
        let (a, b, and) = match net.nodes()[u] {
            Node::Zero => {
                val.insert(u, false);
                stack.pop();
                continue;
            }
            Node::Input(_) => unreachable!("inputs are leaves"),
            Node::And(a, b) => (a, b, true),
            Node::Xor(a, b) => (a, b, false),
        };
        match (val.get(&a.node), val.get(&b.node)) {
            (Some(&x), Some(&y)) => {
                let (x, y) = (x ^ a.neg, y ^ b.neg);
                val.insert(u, if and { x && y } else { x ^ y });
                stack.pop();
            }
            (x, y) => {
                if x.is_none() {
                    stack.push(a.node);
                }
                if y.is_none() {
                    stack.push(b.node);
                }
            }
        }
    }
    val[&v]
}
