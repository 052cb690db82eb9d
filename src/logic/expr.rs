//! The shared graph the expressions of a spec are stored in.
//!
//! Every expression of a spec lives in one [`Dag`]: nodes in topological order
//! (operands before the nodes that use them), so a named definition written
//! once is one node however often it is used, and every walk over the graph
//! is a loop, never a recursion whose depth the input decides.

use std::fmt;

/// A node of a [`Dag`], by its index.
pub type NodeId = u32;

/// What a node computes. N-ary nodes keep their operands in the graph's
/// operand list; [`Dag::operands`] gives them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Term {
    /// `0` or `1`.
    Const(bool),
    /// Input number `j` (bit `j` of the input index).
    Var(u32),
    /// Negation of a node.
    Not(NodeId),
    /// Conjunction of two or more nodes.
    And(Operands),
    /// Exclusive or of two or more nodes.
    Xor(Operands),
    /// Disjunction of two or more nodes.
    Or(Operands),
}

/// Where an n-ary node's operands sit in the graph's operand list.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Operands {
    start: u32,
    len: u32,
}

/// Boolean expressions over numbered inputs, sharing nodes: a graph whose
/// nodes come after their operands.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Dag {
    terms: Vec<Term>,
    operands: Vec<NodeId>,
}

impl Dag {
    /// An empty graph.
    pub fn new() -> Self {
        Dag::default()
    }

    /// Number of nodes.
    pub fn len(&self) -> usize {
        self.terms.len()
    }

    /// Whether the graph has no node.
    pub fn is_empty(&self) -> bool {
        self.terms.is_empty()
    }

    /// The node `id`.
    pub fn term(&self, id: NodeId) -> Term {
        self.terms[id as usize]
    }

    /// Every node, in topological order.
    pub fn terms(&self) -> &[Term] {
        &self.terms
    }

    /// The operands of an n-ary node (empty for the others).
    pub fn operands(&self, t: &Term) -> &[NodeId] {
        match t {
            Term::And(o) | Term::Xor(o) | Term::Or(o) => {
                &self.operands[o.start as usize..(o.start + o.len) as usize]
            }
            _ => &[],
        }
    }

    fn push(&mut self, t: Term) -> NodeId {
        self.terms.push(t);
        (self.terms.len() - 1) as NodeId
    }

    /// A constant node.
    pub fn constant(&mut self, value: bool) -> NodeId {
        self.push(Term::Const(value))
    }

    /// A node for input `j`.
    pub fn var(&mut self, j: u32) -> NodeId {
        self.push(Term::Var(j))
    }

    /// The negation of `a` (a node already in the graph).
    pub fn not(&mut self, a: NodeId) -> NodeId {
        assert!((a as usize) < self.len(), "operands come first");
        self.push(Term::Not(a))
    }

    fn nary(&mut self, kind: fn(Operands) -> Term, ops: &[NodeId]) -> NodeId {
        assert!(
            ops.iter().all(|&a| (a as usize) < self.len()),
            "operands come first"
        );
        let start = self.operands.len() as u32;
        self.operands.extend_from_slice(ops);
        self.push(kind(Operands {
            start,
            len: ops.len() as u32,
        }))
    }

    /// The conjunction of `ops` (nodes already in the graph).
    pub fn and(&mut self, ops: &[NodeId]) -> NodeId {
        self.nary(Term::And, ops)
    }

    /// The exclusive or of `ops`.
    pub fn xor(&mut self, ops: &[NodeId]) -> NodeId {
        self.nary(Term::Xor, ops)
    }

    /// The disjunction of `ops`.
    pub fn or(&mut self, ops: &[NodeId]) -> NodeId {
        self.nary(Term::Or, ops)
    }

    /// The value of every node on input index `x` (inputs past 63 read 0).
    pub fn eval_all(&self, x: u64) -> Vec<bool> {
        self.eval_prefix(self.len(), x)
    }

    /// The values of the first `count` nodes on input index `x`.
    fn eval_prefix(&self, count: usize, x: u64) -> Vec<bool> {
        let mut v: Vec<bool> = Vec::with_capacity(count);
        for t in &self.terms[..count] {
            let b = match *t {
                Term::Const(b) => b,
                Term::Var(j) => j < 64 && (x >> j) & 1 == 1,
                Term::Not(a) => !v[a as usize],
                Term::And(_) => self.operands(t).iter().all(|&a| v[a as usize]),
                Term::Xor(_) => self
                    .operands(t)
                    .iter()
                    .fold(false, |acc, &a| acc ^ v[a as usize]),
                Term::Or(_) => self.operands(t).iter().any(|&a| v[a as usize]),
            };
            v.push(b);
        }
        v
    }

    /// The value of node `root` on input index `x`.
    pub fn eval(&self, root: NodeId, x: u64) -> bool {
        self.eval_prefix(root as usize + 1, x)[root as usize]
    }

    /// The highest input number used, if any.
    pub fn max_var(&self) -> Option<usize> {
        self.terms
            .iter()
            .filter_map(|t| match t {
                Term::Var(j) => Some(*j as usize),
                _ => None,
            })
            .max()
    }
}

impl fmt::Display for Dag {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, t) in self.terms.iter().enumerate() {
            let ops: Vec<String> = self.operands(t).iter().map(|a| a.to_string()).collect();
            match t {
                Term::Const(b) => writeln!(f, "{i}: {}", *b as u8)?,
                Term::Var(j) => writeln!(f, "{i}: x{j}")?,
                Term::Not(a) => writeln!(f, "{i}: !{a}")?,
                Term::And(_) => writeln!(f, "{i}: {}", ops.join(" & "))?,
                Term::Xor(_) => writeln!(f, "{i}: {}", ops.join(" ^ "))?,
                Term::Or(_) => writeln!(f, "{i}: {}", ops.join(" | "))?,
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nodes_share_and_evaluate_in_order() {
        let mut d = Dag::new();
        let a = d.var(0);
        let b = d.var(1);
        let ab = d.and(&[a, b]);
        let f = d.xor(&[ab, ab, a]);
        let g = d.not(f);
        for x in 0..4u64 {
            let (va, vb) = (x & 1 == 1, x & 2 == 2);
            assert_eq!(d.eval(f, x), va);
            assert_eq!(d.eval(g, x), !va);
            assert_eq!(d.eval(ab, x), va && vb);
        }
        assert_eq!(d.max_var(), Some(1));
        assert_eq!(d.operands(&d.term(f)), &[ab, ab, a]);
    }
}
