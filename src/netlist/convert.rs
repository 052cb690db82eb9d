//! From a raw netlist to the crate's AND/XOR `Network`: n-ary nodes balanced, OR by De Morgan.

use super::{Edge, Netlist, NodeKind};
use crate::logic::{Lit, Network};

/// Builds the [`Network`] of a netlist: each n-ary node becomes a balanced
/// tree of two-input AND or XOR nodes (depth ⌈log2 n⌉), an OR becomes the
/// complemented AND of complemented operands (De Morgan); an empty AND is
/// the constant 1, an empty OR or XOR the constant 0. The network folds
/// constants and merges equal nodes as it always does, so its gate count can
/// be below the netlist's.
///
/// Returns the network, whose `outputs` are the netlist's outputs in order,
/// and each output's don't-care literal where it has one. Inputs keep their
/// order (input `j` is network input `j`).
///
/// Iterative; time O(nodes + fanins) hash operations, memory O(signals).
pub fn to_network(netlist: &Netlist) -> (Network, Vec<Option<Lit>>) {
    let mut net = Network::new(netlist.input_count());
    let mut lit_of: Vec<Lit> = Vec::with_capacity(netlist.signal_count());
    lit_of.push(Lit::FALSE);
    lit_of.extend((0..netlist.input_count()).map(|j| net.input(j)));
    let lit = |lit_of: &[Lit], e: Edge| {
        let l = lit_of[e.signal()];
        if e.complemented() {
            l.inverted()
        } else {
            l
        }
    };
    let mut level: Vec<Lit> = Vec::new();
    for i in 0..netlist.node_count() {
        let (kind, fanins) = netlist.node(i);
        let or = kind == NodeKind::Or;
        level.clear();
        level.extend(fanins.iter().map(|&e| {
            let l = lit(&lit_of, e);
            if or {
                l.inverted()
            } else {
                l
            }
        }));
        // Pairwise rounds: a balanced tree without recursion.
        while level.len() > 1 {
            let half = level.len() / 2;
            for k in 0..half {
                let (a, b) = (level[2 * k], level[2 * k + 1]);
                level[k] = match kind {
                    NodeKind::Xor => net.xor(a, b),
                    _ => net.and(a, b),
                };
            }
            if level.len() % 2 == 1 {
                level[half] = level[level.len() - 1];
                level.truncate(half + 1);
            } else {
                level.truncate(half);
            }
        }
        let value = match (kind, level.first()) {
            (NodeKind::And, None) => Lit::TRUE,
            (NodeKind::Or, None) | (NodeKind::Xor, None) => Lit::FALSE,
            (NodeKind::Or, Some(&l)) => l.inverted(),
            (_, Some(&l)) => l,
        };
        lit_of.push(value);
    }
    net.outputs = netlist
        .outputs()
        .iter()
        .map(|o| lit(&lit_of, o.edge))
        .collect();
    let dont_cares = netlist
        .outputs()
        .iter()
        .map(|o| o.dont_care.map(|d| lit(&lit_of, d)))
        .collect();
    (net, dont_cares)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::logic::Node;

    /// Value of every network node on 64 patterns (inputs as words).
    fn simulate(net: &Network, input: &[u64]) -> Vec<u64> {
        let mut v: Vec<u64> = Vec::with_capacity(net.nodes().len());
        let word = |v: &[u64], l: Lit| if l.neg { !v[l.node] } else { v[l.node] };
        for n in net.nodes() {
            let w = match *n {
                Node::Zero => 0,
                Node::Input(j) => input[j],
                Node::And(a, b) => word(&v, a) & word(&v, b),
                Node::Xor(a, b) => word(&v, a) ^ word(&v, b),
            };
            v.push(w);
        }
        v
    }

    #[test]
    fn every_kind_and_arity_matches_eval() {
        let mut n = Netlist::new((0..5).map(|j| format!("i{j}")).collect());
        let e: Vec<Edge> = (0..5).map(|j| n.input_edge(j)).collect();
        for kind in [NodeKind::And, NodeKind::Or, NodeKind::Xor] {
            for arity in 0..=5 {
                let fanins: Vec<Edge> = (0..arity)
                    .map(|k| e[k].complemented_if(k % 2 == 1))
                    .collect();
                let out = n.add_node(kind, &fanins);
                n.add_output(format!("{kind:?}{arity}"), out.inverted(), Some(out));
            }
        }
        let (net, dcs) = to_network(&n);
        // All 32 patterns of 5 inputs in one word.
        let input: Vec<u64> = (0..5)
            .map(|j| (0..32).fold(0u64, |w, p| w | (((p >> j) & 1) as u64) << p))
            .collect();
        let want = n.eval_words(&input);
        let v = simulate(&net, &input);
        let word = |l: Lit| if l.neg { !v[l.node] } else { v[l.node] };
        let mask = (1u64 << 32) - 1;
        for (k, &o) in net.outputs.iter().enumerate() {
            assert_eq!(
                word(o) & mask,
                want[k] & mask,
                "output {}",
                n.outputs()[k].name
            );
            assert_eq!(word(dcs[k].unwrap()) & mask, !want[k] & mask);
        }
        // A 5-input node: 4 two-input gates, balanced.
        assert!(net.gates() <= 3 * 4 * 6);
    }
}
