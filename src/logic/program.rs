//! Expressions compiled to straight-line word programs: every node of a
//! [`Dag`] that an output needs becomes one or more word operations on a
//! register, registers are reused once their value is dead, and the program
//! runs over blocks of 64 words (4,096 input patterns) at a time.
//!
//! This is how synthesis turns expressions into truth tables: the graph is
//! walked once per block, not once per word, and memory stays at the live
//! registers times the block, not the graph's size times the table.

use super::expr::{Dag, NodeId, Term};
use super::table::{TruthTable, VAR_PATTERN};

/// Words per block.
pub const BLOCK: usize = 64;

#[derive(Clone, Copy, Debug)]
enum Op {
    Const { dst: u32, value: bool },
    Var { dst: u32, var: u32 },
    Not { dst: u32, a: u32 },
    And { dst: u32, a: u32, b: u32 },
    Or { dst: u32, a: u32, b: u32 },
    Xor { dst: u32, a: u32, b: u32 },
}

/// A compiled program computing some nodes of a graph.
#[derive(Clone, Debug)]
pub struct Program {
    ops: Vec<Op>,
    outputs: Vec<u32>,
    registers: usize,
}

impl Program {
    /// Compiles the nodes `roots` of `dag` (and what they need).
    ///
    /// Complexity: linear in the graph.
    pub fn compile(dag: &Dag, roots: &[NodeId]) -> Program {
        let n = dag.len();
        // Which nodes are needed, and each one's last user.
        let mut needed = vec![false; n];
        for &r in roots {
            needed[r as usize] = true;
        }
        let mut last_use = vec![0u32; n];
        for v in (0..n).rev() {
            if !needed[v] {
                continue;
            }
            let t = dag.term(v as NodeId);
            let uses: &[NodeId] = match &t {
                Term::Not(a) => std::slice::from_ref(a),
                _ => dag.operands(&t),
            };
            for &a in uses {
                needed[a as usize] = true;
                last_use[a as usize] = last_use[a as usize].max(v as u32);
            }
        }
        let mut is_root = vec![false; n];
        for &r in roots {
            is_root[r as usize] = true;
        }
        let mut reg = vec![u32::MAX; n];
        let mut free: Vec<u32> = Vec::new();
        let mut registers = 0u32;
        let mut ops = Vec::new();
        // Registers whose value dies at node v, freed once v is computed.
        let mut dying: Vec<u32> = Vec::new();
        for v in 0..n {
            if !needed[v] {
                continue;
            }
            let dst = free.pop().unwrap_or_else(|| {
                registers += 1;
                registers - 1
            });
            let t = dag.term(v as NodeId);
            match t {
                Term::Const(value) => ops.push(Op::Const { dst, value }),
                Term::Var(var) => ops.push(Op::Var { dst, var }),
                Term::Not(a) => ops.push(Op::Not {
                    dst,
                    a: reg[a as usize],
                }),
                Term::And(_) | Term::Or(_) | Term::Xor(_) => {
                    let args = dag.operands(&t);
                    let make = |dst: u32, a: u32, b: u32| match t {
                        Term::And(_) => Op::And { dst, a, b },
                        Term::Or(_) => Op::Or { dst, a, b },
                        _ => Op::Xor { dst, a, b },
                    };
                    match args {
                        [] => ops.push(Op::Const {
                            dst,
                            value: matches!(t, Term::And(_)),
                        }),
                        [a] => {
                            let a = reg[*a as usize];
                            ops.push(make(dst, a, a));
                            if matches!(t, Term::Xor(_)) {
                                // a ^ a is 0: a one-operand XOR is a copy.
                                ops.pop();
                                ops.push(Op::Or { dst, a, b: a });
                            }
                        }
                        [a, b, rest @ ..] => {
                            ops.push(make(dst, reg[*a as usize], reg[*b as usize]));
                            for c in rest {
                                ops.push(make(dst, dst, reg[*c as usize]));
                            }
                        }
                    }
                }
            }
            reg[v] = dst;
            let uses: &[NodeId] = match &t {
                Term::Not(a) => std::slice::from_ref(a),
                _ => dag.operands(&t),
            };
            for &a in uses {
                let a = a as usize;
                if last_use[a] == v as u32 && !is_root[a] && reg[a] != u32::MAX {
                    dying.push(reg[a]);
                    reg[a] = u32::MAX;
                }
            }
            free.append(&mut dying);
        }
        Program {
            ops,
            outputs: roots.iter().map(|&r| reg[r as usize]).collect(),
            registers: registers as usize,
        }
    }

    /// Registers the program uses.
    pub fn registers(&self) -> usize {
        self.registers
    }

    /// Runs the program on words `first .. first + BLOCK` of the input space
    /// (word `w` holds inputs `64 w .. 64 w + 63`); `regs` holds
    /// `registers() * BLOCK` words. Returns each output's block.
    pub fn run<'r>(&self, first: u64, regs: &'r mut [u64]) -> Vec<&'r [u64]> {
        let row = |r: u32| r as usize * BLOCK..(r as usize + 1) * BLOCK;
        for op in &self.ops {
            match *op {
                Op::Const { dst, value } => regs[row(dst)].fill(if value { !0 } else { 0 }),
                Op::Var { dst, var } => {
                    for (k, w) in regs[row(dst)].iter_mut().enumerate() {
                        *w = var_word(var, first + k as u64);
                    }
                }
                Op::Not { dst, a } => {
                    for k in 0..BLOCK {
                        regs[dst as usize * BLOCK + k] = !regs[a as usize * BLOCK + k];
                    }
                }
                Op::And { dst, a, b } => binary(regs, dst, a, b, |x, y| x & y),
                Op::Or { dst, a, b } => binary(regs, dst, a, b, |x, y| x | y),
                Op::Xor { dst, a, b } => binary(regs, dst, a, b, |x, y| x ^ y),
            }
        }
        let regs: &'r [u64] = regs;
        self.outputs.iter().map(|&r| &regs[row(r)]).collect()
    }
}

fn binary(regs: &mut [u64], dst: u32, a: u32, b: u32, f: impl Fn(u64, u64) -> u64) {
    let (d, a, b) = (dst as usize * BLOCK, a as usize * BLOCK, b as usize * BLOCK);
    for k in 0..BLOCK {
        regs[d + k] = f(regs[a + k], regs[b + k]);
    }
}

/// Word `w` of input `var`: the pattern within a word for the low six
/// inputs, all ones or all zeros for the others.
fn var_word(var: u32, w: u64) -> u64 {
    if var < 6 {
        VAR_PATTERN[var as usize]
    } else if var - 6 < 64 && (w >> (var - 6)) & 1 == 1 {
        !0
    } else {
        0
    }
}

/// The truth tables over `vars` inputs of the nodes `roots` of `dag`.
///
/// # Panics
/// If `vars` exceeds the table limit; callers check it first.
pub fn tables(vars: usize, dag: &Dag, roots: &[NodeId]) -> Vec<TruthTable> {
    let program = Program::compile(dag, roots);
    let mut out: Vec<TruthTable> = roots.iter().map(|_| TruthTable::zeros(vars)).collect();
    let words = out.first().map_or(0, |t| t.words().len());
    let mut regs = vec![0u64; program.registers() * BLOCK];
    let mut first = 0;
    while first < words {
        let n = (words - first).min(BLOCK);
        let rows = program.run(first as u64, &mut regs);
        for (t, row) in out.iter_mut().zip(rows) {
            t.words_mut()[first..first + n].copy_from_slice(&row[..n]);
        }
        first += BLOCK;
    }
    for t in &mut out {
        let len = t.len();
        if len < 64 {
            t.words_mut()[0] &= (1u64 << len) - 1;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::logic::parse_expr;

    #[test]
    fn tables_agree_with_pointwise_evaluation() {
        let vars: Vec<String> = (0..9).map(|i| format!("v{i}")).collect();
        for text in [
            "v0 & !v8 | (v2 ^ v7) & ~v1 ^ v5",
            "v3",
            "!(v0 | v1 | v2 | v3) ^ (v4 & v5 & v6 & v7 & v8)",
            "1 ^ v0 ^ v0",
        ] {
            let (dag, root) = parse_expr(text, &vars).unwrap();
            let t = &tables(9, &dag, &[root])[0];
            for x in 0..512u64 {
                assert_eq!(t.get(x as usize), dag.eval(root, x), "{text} at {x}");
            }
            let small = &tables(2, &dag, &[root])[0];
            for x in 0..4u64 {
                assert_eq!(small.get(x as usize), dag.eval(root, x), "{text} at {x}");
            }
        }
    }

    #[test]
    fn a_long_chain_needs_few_registers() {
        // x0 ^ x1 ^ ... as a chain of 100,000 two-input nodes.
        let mut dag = Dag::new();
        let mut acc = dag.var(0);
        for i in 1..100_000u32 {
            let v = dag.var(i % 20);
            acc = dag.xor(&[acc, v]);
        }
        let p = Program::compile(&dag, &[acc]);
        assert!(p.registers() <= 3, "{}", p.registers());
        let t = &tables(20, &dag, &[acc])[0];
        // Each input appears 5,000 times, except x0 which appears 5,000 times too
        // (i = 0 mod 20 from 20 on, plus the start): every parity is even.
        assert_eq!(t.count_ones(), 0);
    }
}
