//! The verifier's own evaluator of the spec's expressions: the nodes the
//! outputs need, as a straight-line program over registers of words, run on
//! any number of words of basis states at once. It shares no code with the
//! evaluators of synthesis.

use crate::logic::{Dag, NodeId, Term};

/// One step: a register gets a function of input patterns or other registers.
#[derive(Clone, Debug)]
enum Step {
    Fill(u32, u64),
    Input(u32, u32),
    Negate(u32, u32),
    /// Destination, identity of the fold, the operation, the operand registers.
    Fold(u32, Fold, Vec<u32>),
}

#[derive(Clone, Copy, Debug)]
enum Fold {
    All,
    Any,
    Parity,
}

/// The expressions of a spec, ready to run on words of basis states.
pub(super) struct Compiled {
    steps: Vec<Step>,
    outputs: Vec<u32>,
    registers: usize,
}

impl Compiled {
    /// The program of the nodes `roots` of `dag`; registers are handed back
    /// after the last use of their value, so memory follows the live values.
    pub(super) fn new(dag: &Dag, roots: &[NodeId]) -> Compiled {
        let n = dag.len();
        let mut wanted = vec![false; n];
        let mut keep = vec![false; n];
        for &r in roots {
            wanted[r as usize] = true;
            keep[r as usize] = true;
        }
        let args_of = |t: &Term| -> Vec<u32> {
            match *t {
                Term::Not(a) => vec![a],
                _ => dag.operands(t).to_vec(),
            }
        };
        // Last reader of each node, scanning from the top of the graph down.
        let mut last = vec![usize::MAX; n];
        for v in (0..n).rev() {
            if wanted[v] {
                for a in args_of(&dag.term(v as NodeId)) {
                    wanted[a as usize] = true;
                    if last[a as usize] == usize::MAX {
                        last[a as usize] = v;
                    }
                }
            }
        }
        let mut slot = vec![0u32; n];
        let mut spare: Vec<u32> = Vec::new();
        let mut registers = 0u32;
        let mut steps = Vec::new();
        for v in 0..n {
            if !wanted[v] {
                continue;
            }
            let t = dag.term(v as NodeId);
            let args = args_of(&t);
            let regs: Vec<u32> = args.iter().map(|&a| slot[a as usize]).collect();
            let dst = match spare.pop() {
                Some(r) => r,
                None => {
                    registers += 1;
                    registers - 1
                }
            };
            steps.push(match t {
                Term::Const(b) => Step::Fill(dst, if b { !0 } else { 0 }),
                Term::Var(j) => Step::Input(dst, j),
                Term::Not(_) => Step::Negate(dst, regs[0]),
                Term::And(_) => Step::Fold(dst, Fold::All, regs),
                Term::Or(_) => Step::Fold(dst, Fold::Any, regs),
                Term::Xor(_) => Step::Fold(dst, Fold::Parity, regs),
            });
            slot[v] = dst;
            for a in args {
                if last[a as usize] == v && !keep[a as usize] {
                    spare.push(slot[a as usize]);
                    // A node read twice by v is handed back once.
                    last[a as usize] = usize::MAX - 1;
                }
            }
        }
        Compiled {
            steps,
            outputs: roots.iter().map(|&r| slot[r as usize]).collect(),
            registers: registers as usize,
        }
    }

    /// Runs on `words` words of basis states from word `first` (word `w`
    /// holds states `64 w ..`); `input(j, w)` is the pattern of input `j` on
    /// word `w`. Returns each output's words, one after the other.
    pub(super) fn run(
        &self,
        first: u64,
        words: usize,
        input: &dyn Fn(u32, u64) -> u64,
    ) -> Vec<Vec<u64>> {
        let mut r = vec![0u64; self.registers * words];
        for s in &self.steps {
            match s {
                Step::Fill(d, v) => r[*d as usize * words..][..words].fill(*v),
                Step::Input(d, j) => {
                    for (k, x) in r[*d as usize * words..][..words].iter_mut().enumerate() {
                        *x = input(*j, first + k as u64);
                    }
                }
                Step::Negate(d, a) => {
                    for k in 0..words {
                        r[*d as usize * words + k] = !r[*a as usize * words + k];
                    }
                }
                Step::Fold(d, f, args) => {
                    for k in 0..words {
                        let mut acc = match f {
                            Fold::All => !0u64,
                            _ => 0,
                        };
                        for &a in args {
                            let x = r[a as usize * words + k];
                            acc = match f {
                                Fold::All => acc & x,
                                Fold::Any => acc | x,
                                Fold::Parity => acc ^ x,
                            };
                        }
                        r[*d as usize * words + k] = acc;
                    }
                }
            }
        }
        self.outputs
            .iter()
            .map(|&o| r[o as usize * words..][..words].to_vec())
            .collect()
    }
}
