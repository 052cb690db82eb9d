//! Logic networks: a DAG of two-input AND and XOR nodes over the inputs, with
//! complemented edges, constants folded and equal nodes merged.

use super::expr::{Dag, NodeId, Term};
use std::collections::HashMap;

/// A node's value, possibly complemented: node 0 is the constant 0, so
/// `Lit { node: 0, neg: true }` is the constant 1.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Lit {
    /// The node.
    pub node: usize,
    /// Complemented.
    pub neg: bool,
}

impl Lit {
    /// The constant 0.
    pub const FALSE: Lit = Lit {
        node: 0,
        neg: false,
    };
    /// The constant 1.
    pub const TRUE: Lit = Lit { node: 0, neg: true };

    /// The complement.
    pub fn inverted(self) -> Lit {
        Lit {
            node: self.node,
            neg: !self.neg,
        }
    }

    /// Whether the literal is a constant.
    pub fn is_const(self) -> bool {
        self.node == 0
    }
}

/// A network node.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Node {
    /// The constant 0 (only node 0).
    Zero,
    /// Input `j`.
    Input(usize),
    /// The AND of two literals.
    And(Lit, Lit),
    /// The XOR of two uncomplemented literals.
    Xor(Lit, Lit),
}

/// The kind of an n-ary node being balanced into two-input ones.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Kind {
    And,
    Or,
    Xor,
}

/// A logic network with named outputs.
#[derive(Clone, Debug, Default)]
pub struct Network {
    nodes: Vec<Node>,
    index: HashMap<Node, usize>,
    /// Number of inputs.
    pub inputs: usize,
    /// One literal per output.
    pub outputs: Vec<Lit>,
}

impl Network {
    /// A network with `inputs` input nodes and no gates.
    pub fn new(inputs: usize) -> Self {
        let mut n = Network {
            nodes: Vec::new(),
            index: HashMap::new(),
            inputs,
            outputs: Vec::new(),
        };
        n.add(Node::Zero);
        for j in 0..inputs {
            n.add(Node::Input(j));
        }
        n
    }

    fn add(&mut self, node: Node) -> usize {
        if let Some(&i) = self.index.get(&node) {
            return i;
        }
        self.nodes.push(node);
        let i = self.nodes.len() - 1;
        self.index.insert(node, i);
        i
    }

    /// The nodes, in topological order (every node after its operands).
    pub fn nodes(&self) -> &[Node] {
        &self.nodes
    }

    /// Input `j` as a literal.
    pub fn input(&self, j: usize) -> Lit {
        Lit {
            node: 1 + j,
            neg: false,
        }
    }

    /// `a & b`, folded and merged.
    pub fn and(&mut self, a: Lit, b: Lit) -> Lit {
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        if a == Lit::FALSE || b == Lit::FALSE || a == b.inverted() {
            return Lit::FALSE;
        }
        if a == Lit::TRUE {
            return b;
        }
        if b == Lit::TRUE || a == b {
            return a;
        }
        Lit {
            node: self.add(Node::And(a, b)),
            neg: false,
        }
    }

    /// `a | b` as `!(!a & !b)`.
    pub fn or(&mut self, a: Lit, b: Lit) -> Lit {
        self.and(a.inverted(), b.inverted()).inverted()
    }

    /// `a ^ b`, with complements moved to the result.
    pub fn xor(&mut self, a: Lit, b: Lit) -> Lit {
        let neg = a.neg ^ b.neg;
        let (a, b) = (Lit { neg: false, ..a }, Lit { neg: false, ..b });
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        let r = if a == b {
            Lit::FALSE
        } else if a == Lit::FALSE {
            b
        } else {
            Lit {
                node: self.add(Node::Xor(a, b)),
                neg: false,
            }
        };
        if neg {
            r.inverted()
        } else {
            r
        }
    }

    /// Builds the network of node `root` of `dag` over this network's
    /// inputs; `memo` (one entry per node of `dag`, `None` at first) keeps
    /// what was built, so shared nodes are built once. The walk is
    /// depth-first from `root`, operands left to right, without recursion.
    pub fn dag(&mut self, dag: &Dag, root: NodeId, memo: &mut [Option<Lit>]) -> Lit {
        // (node, operands visited so far)
        let mut stack: Vec<(NodeId, usize)> = vec![(root, 0)];
        while let Some(&mut (v, ref mut next)) = stack.last_mut() {
            if memo[v as usize].is_some() {
                stack.pop();
                continue;
            }
            let t = dag.term(v);
            let operands: &[NodeId] = match &t {
                Term::Not(a) => std::slice::from_ref(a),
                _ => dag.operands(&t),
            };
            if let Some(&a) = operands.get(*next) {
                *next += 1;
                if memo[a as usize].is_none() {
                    stack.push((a, 0));
                }
                continue;
            }
            let lit = match t {
                Term::Const(b) => {
                    if b {
                        Lit::TRUE
                    } else {
                        Lit::FALSE
                    }
                }
                Term::Var(j) => self.input(j as usize),
                Term::Not(a) => memo[a as usize].expect("built").inverted(),
                Term::And(_) | Term::Or(_) | Term::Xor(_) => {
                    // Balanced, so that chains of n terms have depth log n;
                    // repeated terms are merged first (x & x = x, x ^ x = 0).
                    let mut lits: Vec<Lit> = operands
                        .iter()
                        .map(|&a| memo[a as usize].expect("built"))
                        .collect();
                    lits.sort();
                    let kind = match t {
                        Term::And(_) => Kind::And,
                        Term::Or(_) => Kind::Or,
                        _ => Kind::Xor,
                    };
                    if kind == Kind::Xor {
                        let mut kept: Vec<Lit> = Vec::new();
                        for l in lits {
                            if kept.last() == Some(&l) {
                                kept.pop();
                            } else {
                                kept.push(l);
                            }
                        }
                        lits = kept;
                    } else {
                        lits.dedup();
                    }
                    self.reduce(&lits, kind)
                }
            };
            memo[v as usize] = Some(lit);
            stack.pop();
        }
        memo[root as usize].expect("built")
    }

    fn reduce(&mut self, lits: &[Lit], kind: Kind) -> Lit {
        match lits.len() {
            0 => Lit::FALSE,
            1 => lits[0],
            n => {
                let a = self.reduce(&lits[..n / 2], kind);
                let b = self.reduce(&lits[n / 2..], kind);
                match kind {
                    Kind::And => self.and(a, b),
                    Kind::Or => self.or(a, b),
                    Kind::Xor => self.xor(a, b),
                }
            }
        }
    }

    /// Value of every node on input pattern `x` (at most 64 inputs).
    pub fn simulate(&self, x: u64) -> Vec<bool> {
        let mut v = vec![false; self.nodes.len()];
        let lit = |v: &[bool], l: Lit| v[l.node] ^ l.neg;
        for (i, n) in self.nodes.iter().enumerate() {
            v[i] = match *n {
                Node::Zero => false,
                Node::Input(j) => (x >> j) & 1 == 1,
                Node::And(a, b) => lit(&v, a) && lit(&v, b),
                Node::Xor(a, b) => lit(&v, a) ^ lit(&v, b),
            };
        }
        v
    }

    /// The number of AND and XOR nodes.
    pub fn gates(&self) -> usize {
        self.nodes
            .iter()
            .filter(|n| matches!(n, Node::And(..) | Node::Xor(..)))
            .count()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::logic::parse_expr;

    #[test]
    fn folding_and_merging() {
        let names: Vec<String> = ["a", "b", "c"].iter().map(|s| s.to_string()).collect();
        let (d, e) = parse_expr("(a & b) ^ (b & a) ^ c | 0 & a", &names).unwrap();
        let mut n = Network::new(3);
        let out = n.dag(&d, e, &mut vec![None; d.len()]);
        // (a&b) ^ (a&b) folds to 0: the result is c alone.
        assert_eq!(out, n.input(2));
        let (d, e) = parse_expr("a & b | !a & !b", &names).unwrap();
        let mut n = Network::new(3);
        let out = n.dag(&d, e, &mut vec![None; d.len()]);
        for x in 0..8 {
            let v = n.simulate(x);
            assert_eq!(v[out.node] ^ out.neg, d.eval(e, x));
        }
    }
}
