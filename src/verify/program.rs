//! The verifier's own compiled evaluator for Boolean expressions: a straight-line word program over registers.
//!
//! A spec's expression, given as a DAG of [`Node`]s in topological order, is
//! compiled once into a flat list of word operations and then run over a
//! block of `W` words per register, each row operation one vectorized pass,
//! so no tree is walked per block (the bit-slicing of Biham, "A fast new DES
//! implementation in software", FSE 1997).
//!
//! Three things keep the passes few and the registers in L1:
//!
//! - **Block constants.** On a block of `W` words (`W` a power of two, the
//!   block aligned to `W`), state bits 0-5 are the same word in every word of
//!   the block and bits `6 + log2 W` and up are all-0 or all-1 across it. Such
//!   variables, and every node over them alone, are single words ("scalars")
//!   computed once per block; a row operation folds its scalar operands into
//!   one word. Only bits 6 to `5 + log2 W` need rows.
//! - **Registers reused after the last reader**, as in linear-scan
//!   allocation (Poletto, Sarkar, "Linear scan register allocation", TOPLAS
//!   1999), so a chain of 10^6 nodes needs a handful of registers.
//! - **Accumulation in place.** An AND, OR or XOR with two or more row
//!   operands that nothing else reads folds each of them into one accumulator
//!   as soon as it is computed, instead of keeping them all live until the
//!   node's turn; and such an operand that is itself an operation on at most
//!   two rows is fused into the accumulation (`acc ^= a & b` in one pass, as
//!   for an ESOP: Sasao, "AND-EXOR expressions and their optimization", 1993).
//!
//! NOT nodes and one-operand gates cost nothing: a value is a register plus a
//! complement bit. XOR operands are made positive (their complements go into
//! the result's bit), and an AND or OR with mostly complemented row operands
//! becomes its De Morgan dual.
//!
//! Compilation is O(nodes + edges) time and memory, evaluation one pass of
//! `W` words per row operation plus O(operands) word operations per block;
//! both are loops, with no recursion.
#![allow(dead_code)] // Remove once the verifier's block loop calls this module.

use super::kernel::{dispatched, Dispatch, Level};

/// One node of an expression DAG; children are indices of earlier nodes.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Node {
    /// `0` or `1`.
    Const(bool),
    /// Free variable `j`: bit `j` of the basis state's number.
    Var(u32),
    /// Complement of a node.
    Not(u32),
    /// Conjunction (`1` when empty).
    And(Vec<u32>),
    /// Disjunction (`0` when empty).
    Or(Vec<u32>),
    /// Exclusive or (`0` when empty).
    Xor(Vec<u32>),
}

/// Free variables a [`Node::Var`] may name: bits of a 64-bit state number.
pub const MAX_VARIABLES: u32 = 64;

/// Why a DAG was refused or a block could not be evaluated.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum ProgramError {
    /// A child that is not an earlier node.
    #[error("node {node}: child {child} is not an earlier node")]
    NotTopological {
        /// The node.
        node: usize,
        /// Its child.
        child: u32,
    },
    /// A variable past [`MAX_VARIABLES`].
    #[error("node {node}: variable {var} is past the 64 bits of a state number")]
    VariableOutOfRange {
        /// The node.
        node: usize,
        /// The variable.
        var: u32,
    },
    /// An output that names no node.
    #[error("output {output}: node {node} does not exist ({nodes} nodes)")]
    OutputOutOfRange {
        /// Number of the output.
        output: usize,
        /// The node it names.
        node: u32,
        /// Nodes in the DAG.
        nodes: usize,
    },
    /// More nodes or operands than the program's `u32` format holds.
    #[error("the DAG has more than 2^31 nodes or operands")]
    TooLarge,
    /// A block length that is not a power of two.
    #[error("a block of {0} words: the word program needs a power of two")]
    BlockWords(usize),
    /// A block of another length than the program was compiled for.
    #[error("a block of {given} words for a program compiled for {compiled}")]
    WrongWords {
        /// Words per row the program was compiled for.
        compiled: usize,
        /// Words per row given.
        given: usize,
    },
    /// A block that does not start at a multiple of its length.
    #[error("a block of {words} words starting at word {first_word}, not a multiple of {words}")]
    Misaligned {
        /// The first word.
        first_word: u64,
        /// Words per row.
        words: usize,
    },
    /// An output buffer whose row count is not the number of outputs.
    #[error("{rows} output rows given for {outputs} outputs")]
    OutputShape {
        /// Rows given.
        rows: usize,
        /// Outputs of the program.
        outputs: usize,
    },
}

// Operations in a program's code (see `WordProgram`).
const SCALAR_PATTERN: u32 = 0;
const SCALAR_OP: u32 = 1;
const ROW_PATTERN: u32 = 2;
const ROW_OP: u32 = 3;

// Combinations: the three of the trade and "take the right operand".
const AND: u32 = 0;
const OR: u32 = 1;
const XOR: u32 = 2;
const TAKE: u32 = 3;
/// A free variable's pattern, among the operation kinds of compilation.
const PATTERN: u32 = 4;

/// A value during compilation: who computes it, and whether it is read complemented.
#[derive(Clone, Copy, PartialEq, Eq)]
struct Value {
    /// The node whose operation computes it, or [`ZERO`].
    owner: u32,
    complement: bool,
}

/// The owner of the constants: scalar slot 0, which holds 0.
const ZERO: u32 = u32::MAX;
/// "Never read" / "no register" / "no hook".
const NEVER: u32 = u32::MAX;
/// Readers at the end: outputs.
const END: u32 = u32::MAX - 1;

/// One operation of compilation, before registers: node `node` computes
/// `kind` of `operands[start..end]` (for a pattern, `start` is the variable).
#[derive(Clone, Copy)]
struct Planned {
    node: u32,
    kind: u32,
    start: u32,
    end: u32,
}

/// Where an output is: `register << 2 | complemented << 1 | is_row` over the scalar slots or the rows.
type Place = u64;

/// A compiled expression DAG.
///
/// Layout of `code`, operation after operation (`lit` = `index << 1 |
/// complemented`):
/// - `SCALAR_PATTERN slot var`: the pattern of a block-constant variable;
/// - `SCALAR_OP kind slot n lit...`: a word from scalar slots;
/// - `ROW_PATTERN register var`: the pattern of a variable that varies in the block;
/// - `ROW_OP outer<<4|inner dst md|mi<<1 ns nr slit... rlit...`: row `dst =
///   outer(dst ^ md, inner(rows..., scalars...) ^ mi)`, where `outer` TAKE
///   ignores the old `dst`; `dst` is never one of the rows; more than two rows
///   only when `mi` is 0 and `outer` is TAKE or `inner`.
#[derive(Clone, Debug)]
pub struct WordProgram {
    code: Vec<u32>,
    words: usize,
    registers: usize,
    slots: usize,
    outputs: Vec<Place>,
    row_passes: usize,
    fused: usize,
    accumulators: usize,
    dispatch: Dispatch,
}

/// The registers and scalar slots of a [`WordProgram`] run, kept between blocks.
#[derive(Clone, Debug, Default)]
pub struct Scratch<const W: usize> {
    rows: Vec<[u64; W]>,
    scalars: Vec<u64>,
}

impl<const W: usize> Scratch<W> {
    /// Empty; [`WordProgram::evaluate`] sizes it.
    pub fn new() -> Scratch<W> {
        Scratch {
            rows: Vec::new(),
            scalars: Vec::new(),
        }
    }
}

impl WordProgram {
    /// Compiles `nodes` (each child an earlier index) for blocks of `words`
    /// words (a power of two), so that output `k` is node `outputs[k]`.
    /// Nodes no output depends on are dropped. Every node and output is
    /// checked before any work; O(nodes + edges) time and memory.
    pub fn compile(
        nodes: &[Node],
        outputs: &[u32],
        words: usize,
        dispatch: Dispatch,
    ) -> Result<WordProgram, ProgramError> {
        if !words.is_power_of_two() {
            return Err(ProgramError::BlockWords(words));
        }
        if nodes.len() >= 1 << 31 {
            return Err(ProgramError::TooLarge);
        }
        let mut edges = 0usize;
        for (i, node) in nodes.iter().enumerate() {
            let children: &[u32] = match node {
                Node::Const(_) => &[],
                Node::Var(j) if *j >= MAX_VARIABLES => {
                    return Err(ProgramError::VariableOutOfRange { node: i, var: *j })
                }
                Node::Var(_) => &[],
                Node::Not(a) => std::slice::from_ref(a),
                Node::And(v) | Node::Or(v) | Node::Xor(v) => v,
            };
            edges += children.len();
            if let Some(&child) = children.iter().find(|&&c| c as usize >= i) {
                return Err(ProgramError::NotTopological { node: i, child });
            }
        }
        if edges >= 1 << 31 {
            return Err(ProgramError::TooLarge);
        }
        for (output, &node) in outputs.iter().enumerate() {
            if node as usize >= nodes.len() {
                return Err(ProgramError::OutputOutOfRange {
                    output,
                    node,
                    nodes: nodes.len(),
                });
            }
        }
        // Variables from `split` up are all-0 or all-1 across an aligned block.
        let split = 6 + words.trailing_zeros();
        let n = nodes.len();

        // Liveness, last reader first: a node is needed when an output or a
        // needed node reads it.
        let mut needed = vec![false; n];
        for &o in outputs {
            needed[o as usize] = true;
        }
        for i in (0..n).rev() {
            if !needed[i] {
                continue;
            }
            match &nodes[i] {
                Node::Not(a) => needed[*a as usize] = true,
                Node::And(v) | Node::Or(v) | Node::Xor(v) => {
                    for &c in v {
                        needed[c as usize] = true;
                    }
                }
                Node::Const(_) | Node::Var(_) => {}
            }
        }

        // Values and operations, first node first.
        let constant = |bit: bool| Value {
            owner: ZERO,
            complement: bit,
        };
        let mut value = vec![constant(false); n];
        let mut scalar = vec![false; n];
        let mut plan: Vec<Planned> = Vec::new();
        let mut operands: Vec<Value> = Vec::new();
        let mut var_owner = [NEVER; MAX_VARIABLES as usize];
        for (i, node) in nodes.iter().enumerate() {
            if !needed[i] {
                continue;
            }
            let me = i as u32;
            let (kind, children) = match node {
                Node::Const(b) => {
                    value[i] = constant(*b);
                    continue;
                }
                Node::Var(j) => {
                    let owner = &mut var_owner[*j as usize];
                    if *owner == NEVER {
                        *owner = me;
                        scalar[i] = *j < 6 || *j >= split;
                        plan.push(Planned {
                            node: me,
                            kind: PATTERN,
                            start: *j,
                            end: *j,
                        });
                    }
                    value[i] = Value {
                        owner: *owner,
                        complement: false,
                    };
                    continue;
                }
                Node::Not(a) => {
                    let v = value[*a as usize];
                    value[i] = Value {
                        complement: !v.complement,
                        ..v
                    };
                    continue;
                }
                Node::And(v) => (AND, v),
                Node::Or(v) => (OR, v),
                Node::Xor(v) => (XOR, v),
            };
            let start = operands.len();
            // Constant operands fold away; `absorbed` is AND's 0 or OR's 1.
            let mut parity = false;
            let mut absorbed = false;
            for &c in children {
                let v = value[c as usize];
                if v.owner == ZERO {
                    match kind {
                        AND => absorbed |= !v.complement,
                        OR => absorbed |= v.complement,
                        _ => parity ^= v.complement,
                    }
                } else if kind == XOR {
                    parity ^= v.complement;
                    operands.push(Value {
                        complement: false,
                        ..v
                    });
                } else {
                    operands.push(v);
                }
            }
            if absorbed {
                operands.truncate(start);
                value[i] = constant(kind == OR);
                continue;
            }
            let count = operands.len() - start;
            match count {
                0 => {
                    value[i] = constant((kind == AND) ^ parity);
                    continue;
                }
                1 => {
                    let v = operands.pop().expect("one operand");
                    value[i] = Value {
                        complement: v.complement ^ parity,
                        ..v
                    };
                    continue;
                }
                _ => {}
            }
            let list = &mut operands[start..];
            scalar[i] = list.iter().all(|v| scalar[v.owner as usize]);
            let mut kind = kind;
            if kind != XOR && !scalar[i] {
                let rows = list.iter().filter(|v| !scalar[v.owner as usize]);
                let complemented = rows.clone().filter(|v| v.complement).count();
                if 2 * complemented > rows.count() {
                    // De Morgan: AND of complements is the complement of an OR.
                    kind = if kind == AND { OR } else { AND };
                    parity = true;
                    for v in list.iter_mut() {
                        v.complement = !v.complement;
                    }
                }
            }
            plan.push(Planned {
                node: me,
                kind,
                start: start as u32,
                end: operands.len() as u32,
            });
            value[i] = Value {
                owner: me,
                complement: parity,
            };
        }

        // Folding can leave operations that no output reads (an AND absorbed
        // by a 0): keep those an output reaches; count readers and the last one.
        let mut live = vec![false; n];
        for &o in outputs {
            let v = value[o as usize];
            if v.owner != ZERO {
                live[v.owner as usize] = true;
            }
        }
        for p in plan.iter().rev() {
            if live[p.node as usize] && p.kind != PATTERN {
                for v in &operands[p.start as usize..p.end as usize] {
                    live[v.owner as usize] = true;
                }
            }
        }
        plan.retain(|p| live[p.node as usize]);
        let mut last = vec![NEVER; n];
        let mut readers = vec![0u32; n];
        for p in plan.iter().filter(|p| p.kind != PATTERN) {
            for v in &operands[p.start as usize..p.end as usize] {
                last[v.owner as usize] = p.node;
                readers[v.owner as usize] = readers[v.owner as usize].saturating_add(1);
            }
        }
        for &o in outputs {
            let v = value[o as usize];
            if v.owner != ZERO {
                last[v.owner as usize] = END;
                readers[v.owner as usize] = readers[v.owner as usize].saturating_add(1);
            }
        }

        // Accumulators: a row operation with two or more row operands that it
        // alone reads takes each into its accumulator when it is computed.
        let private = |v: &Value, me: u32| {
            !scalar[v.owner as usize]
                && readers[v.owner as usize] == 1
                && last[v.owner as usize] == me
        };
        let mut hook = vec![(NEVER, false); n];
        let mut accumulates = vec![false; n];
        for p in plan
            .iter()
            .filter(|p| p.kind != PATTERN && !scalar[p.node as usize])
        {
            let list = &operands[p.start as usize..p.end as usize];
            if list.iter().filter(|v| private(v, p.node)).count() >= 2 {
                accumulates[p.node as usize] = true;
                for v in list.iter().filter(|v| private(v, p.node)) {
                    hook[v.owner as usize] = (p.node, v.complement);
                }
            }
        }
        let kind_of: Vec<(u32, u32)> = plan.iter().map(|p| (p.node, p.kind)).collect();
        let kind = |node: u32| {
            kind_of
                .binary_search_by_key(&node, |&(m, _)| m)
                .map(|k| kind_of[k].1)
                .expect("a planned node")
        };

        // Registers: a stack of free ones, so the one freed last (still in
        // cache) is taken first. Slot 0 of the scalars holds 0.
        let mut em = Emitter {
            code: Vec::new(),
            free: Vec::new(),
            registers: 0,
            slots: 1,
            row_passes: 0,
            fused: 0,
        };
        let mut place = vec![NEVER; n];
        // Per accumulating node: (register, complement) once started.
        let mut acc: Vec<(u32, bool)> = vec![(NEVER, false); n];
        let (mut scalars, mut rows): (Vec<u32>, Vec<u32>) = (Vec::new(), Vec::new());
        for p in &plan {
            let me = p.node as usize;
            if p.kind == PATTERN {
                if scalar[me] {
                    place[me] = em.slot();
                    em.code.extend([SCALAR_PATTERN, place[me], p.start]);
                } else {
                    place[me] = em.take();
                    em.code.extend([ROW_PATTERN, place[me], p.start]);
                    em.row_passes += 1;
                }
            } else {
                let list = &operands[p.start as usize..p.end as usize];
                let lit = |place: &[u32], v: &Value| -> u32 {
                    let at = if v.owner == ZERO {
                        0
                    } else {
                        place[v.owner as usize]
                    };
                    at << 1 | v.complement as u32
                };
                if scalar[me] {
                    let slot = em.slot();
                    em.code.extend([SCALAR_OP, p.kind, slot, list.len() as u32]);
                    em.code.extend(list.iter().map(|v| lit(&place, v)));
                    place[me] = slot;
                    continue;
                }
                scalars.clear();
                rows.clear();
                for v in list {
                    if scalar[v.owner as usize] {
                        scalars.push(lit(&place, v));
                    } else if !(accumulates[me] && private(v, p.node)) {
                        rows.push(lit(&place, v));
                    }
                }
                let (target, fuse) = match hook[me] {
                    (i, c)
                        if i != NEVER
                            && acc[i as usize].0 != NEVER
                            && rows.len() <= 2
                            && !accumulates[me] =>
                    {
                        (i as usize, Some(c))
                    }
                    _ => (NEVER as usize, None),
                };
                if let Some(c) = fuse {
                    // acc = outer(acc, this operation), in one pass.
                    let (reg, md) = acc[target];
                    em.row_op(kind(target as u32), p.kind, reg, md, c, &scalars, &rows);
                    acc[target].1 = false;
                    em.fused += 1;
                } else if accumulates[me] {
                    let (reg, md) = acc[me];
                    if md || !scalars.is_empty() || !rows.is_empty() {
                        em.row_op(p.kind, p.kind, reg, md, false, &scalars, &rows);
                    }
                    place[me] = reg;
                } else {
                    place[me] = em.take();
                    em.row_op(TAKE, p.kind, place[me], false, false, &scalars, &rows);
                }
                for v in list {
                    let o = v.owner as usize;
                    if last[o] == p.node && place[o] != NEVER && !scalar[o] {
                        em.free.push(place[o]);
                        place[o] = NEVER;
                    }
                }
                if fuse.is_some() {
                    continue;
                }
            }
            // An operand of an accumulating node joins its accumulator now.
            let (i, c) = hook[me];
            if i == NEVER {
                continue;
            }
            let reg = std::mem::replace(&mut place[me], NEVER);
            let i = i as usize;
            if acc[i].0 == NEVER {
                acc[i] = (reg, c);
            } else {
                let k = kind(i as u32);
                em.row_op(k, k, acc[i].0, acc[i].1, false, &[], &[reg << 1 | c as u32]);
                acc[i].1 = false;
                em.free.push(reg);
            }
        }
        let outputs = outputs
            .iter()
            .map(|&o| {
                let v = value[o as usize];
                let (at, row) = match v.owner {
                    ZERO => (0, false),
                    w => (place[w as usize], !scalar[w as usize]),
                };
                (at as u64) << 2 | (v.complement as u64) << 1 | row as u64
            })
            .collect();
        Ok(WordProgram {
            code: em.code,
            words,
            registers: em.registers as usize,
            slots: em.slots as usize,
            outputs,
            row_passes: em.row_passes,
            fused: em.fused,
            accumulators: accumulates.iter().filter(|&&a| a).count(),
            dispatch,
        })
    }

    /// Row registers the program needs: its scratch is `registers() x W` words.
    pub fn registers(&self) -> usize {
        self.registers
    }

    /// Scalar slots (one word each) the program needs.
    pub fn scalars(&self) -> usize {
        self.slots
    }

    /// Outputs.
    pub fn outputs(&self) -> usize {
        self.outputs.len()
    }

    /// Passes over a block's rows (row operations and row patterns).
    pub fn row_passes(&self) -> usize {
        self.row_passes
    }

    /// Words per row the program was compiled for.
    pub fn words(&self) -> usize {
        self.words
    }

    /// The level the program runs at.
    pub fn dispatch(&self) -> Dispatch {
        self.dispatch
    }

    /// The same program at another level.
    pub fn with_dispatch(mut self, dispatch: Dispatch) -> WordProgram {
        self.dispatch = dispatch;
        self
    }

    /// Evaluates every output on the `64 W` basis states numbered from
    /// `64 first_word` on: bit `b` of word `w` of `out[k]` is output `k` on
    /// state `64 (first_word + w) + b`. `W` must be the compiled
    /// [`WordProgram::words`] and `first_word` a multiple of it.
    pub fn evaluate<const W: usize>(
        &self,
        first_word: u64,
        scratch: &mut Scratch<W>,
        out: &mut [[u64; W]],
    ) -> Result<(), ProgramError> {
        if W != self.words {
            return Err(ProgramError::WrongWords {
                compiled: self.words,
                given: W,
            });
        }
        if !first_word.is_multiple_of(W as u64) {
            return Err(ProgramError::Misaligned {
                first_word,
                words: W,
            });
        }
        if out.len() != self.outputs.len() {
            return Err(ProgramError::OutputShape {
                rows: out.len(),
                outputs: self.outputs.len(),
            });
        }
        scratch.rows.resize(self.registers, [0; W]);
        scratch.scalars.resize(self.slots, 0);
        scratch.scalars[0] = 0;
        run_words::<W>(
            self.dispatch,
            &self.code,
            first_word,
            &mut scratch.rows,
            &mut scratch.scalars,
        );
        for (row, &o) in out.iter_mut().zip(&self.outputs) {
            let m = 0u64.wrapping_sub((o >> 1) & 1);
            let at = (o >> 2) as usize;
            if o & 1 == 1 {
                for (d, s) in row.iter_mut().zip(&scratch.rows[at]) {
                    *d = s ^ m;
                }
            } else {
                *row = [scratch.scalars[at] ^ m; W];
            }
        }
        Ok(())
    }
}

/// Code, registers and counts while a program is emitted.
struct Emitter {
    code: Vec<u32>,
    free: Vec<u32>,
    registers: u32,
    slots: u32,
    row_passes: usize,
    fused: usize,
}

impl Emitter {
    fn take(&mut self) -> u32 {
        self.free.pop().unwrap_or_else(|| {
            self.registers += 1;
            self.registers - 1
        })
    }

    fn slot(&mut self) -> u32 {
        self.slots += 1;
        self.slots - 1
    }

    #[allow(clippy::too_many_arguments)]
    fn row_op(
        &mut self,
        outer: u32,
        inner: u32,
        dst: u32,
        md: bool,
        mi: bool,
        scalars: &[u32],
        rows: &[u32],
    ) {
        self.code.extend([
            ROW_OP,
            outer << 4 | inner,
            dst,
            md as u32 | (mi as u32) << 1,
            scalars.len() as u32,
            rows.len() as u32,
        ]);
        self.code.extend(scalars);
        self.code.extend(rows);
        self.row_passes += 1;
    }
}

/// Bit `k` of the result is bit `bit` of `k`.
const fn low_pattern(bit: u32) -> u64 {
    let mut acc = 0u64;
    let mut k = 0;
    while k < 64 {
        if (k >> bit) & 1 == 1 {
            acc |= 1 << k;
        }
        k += 1;
    }
    acc
}

/// Patterns of the state-number bits inside one word.
pub(super) const LOW_PATTERNS: [u64; 6] = [
    low_pattern(0),
    low_pattern(1),
    low_pattern(2),
    low_pattern(3),
    low_pattern(4),
    low_pattern(5),
];

/// Word `w` (states `64 w ..`) of the pattern of state bit `var`.
#[inline(always)]
pub(super) fn pattern_word(var: u32, w: u64) -> u64 {
    if var < 6 {
        LOW_PATTERNS[var as usize]
    } else {
        0u64.wrapping_sub((w >> (var - 6)) & 1)
    }
}

/// Fills `row` with the pattern of state bit `var` on words `first_word ..`.
#[inline(always)]
pub(super) fn pattern<const W: usize>(row: &mut [u64; W], var: u32, first_word: u64) {
    if var < 6 {
        *row = [LOW_PATTERNS[var as usize]; W];
    } else {
        let shift = var - 6;
        for (w, v) in row.iter_mut().enumerate() {
            *v = 0u64.wrapping_sub((first_word.wrapping_add(w as u64) >> shift) & 1);
        }
    }
}

/// A two-operand Boolean function, for the loops below.
trait Combine {
    /// `x` with `op(x, NEUTRAL) = x`.
    const NEUTRAL: u64;
    fn op(a: u64, b: u64) -> u64;
}
struct And;
struct Or;
struct Xor;
/// The right operand: a row operation that does not read its destination.
struct Take;
impl Combine for And {
    const NEUTRAL: u64 = !0;
    #[inline(always)]
    fn op(a: u64, b: u64) -> u64 {
        a & b
    }
}
impl Combine for Or {
    const NEUTRAL: u64 = 0;
    #[inline(always)]
    fn op(a: u64, b: u64) -> u64 {
        a | b
    }
}
impl Combine for Xor {
    const NEUTRAL: u64 = 0;
    #[inline(always)]
    fn op(a: u64, b: u64) -> u64 {
        a ^ b
    }
}
impl Combine for Take {
    const NEUTRAL: u64 = 0;
    #[inline(always)]
    fn op(_: u64, b: u64) -> u64 {
        b
    }
}

/// Index and the mask that complements it, from a literal.
#[inline(always)]
fn literal(o: u32) -> (usize, u64) {
    ((o >> 1) as usize, 0u64.wrapping_sub((o & 1) as u64))
}

/// The word `inner` gives on the scalar operands `list`.
#[inline(always)]
fn fold<I: Combine>(scalars: &[u64], list: &[u32]) -> u64 {
    let mut s = I::NEUTRAL;
    for &l in list {
        let (at, m) = literal(l);
        s = I::op(s, scalars[at] ^ m);
    }
    s
}

/// One `ROW_OP`: `dst = O(dst ^ md, I(rows..., s) ^ mi)`.
#[inline(always)]
fn row_op<const W: usize, O: Combine, I: Combine>(
    regs: &mut [[u64; W]],
    dst: usize,
    (md, mi): (u64, u64),
    s: u64,
    list: &[u32],
) {
    let (below, rest) = regs.split_at_mut(dst);
    let (d, above) = rest
        .split_first_mut()
        .expect("register checked at compile time");
    let get = |r: usize| -> &[u64; W] {
        if r < dst {
            &below[r]
        } else {
            &above[r - dst - 1]
        }
    };
    match *list {
        [] => {
            for v in d.iter_mut() {
                *v = O::op(*v ^ md, s ^ mi);
            }
        }
        [x] => {
            let (ra, ma) = literal(x);
            let a = get(ra);
            for k in 0..W {
                d[k] = O::op(d[k] ^ md, I::op(a[k] ^ ma, s) ^ mi);
            }
        }
        _ => {
            let ((ra, ma), (rb, mb)) = (literal(list[0]), literal(list[1]));
            let (a, b) = (get(ra), get(rb));
            for k in 0..W {
                d[k] = O::op(d[k] ^ md, I::op(I::op(a[k] ^ ma, b[k] ^ mb), s) ^ mi);
            }
            // Past two rows, `mi` is 0 and `O` is `I` or TAKE (see `WordProgram`).
            let mut pairs = list[2..].chunks_exact(2);
            for pair in &mut pairs {
                let ((ra, ma), (rb, mb)) = (literal(pair[0]), literal(pair[1]));
                let (a, b) = (get(ra), get(rb));
                for k in 0..W {
                    d[k] = I::op(I::op(d[k], a[k] ^ ma), b[k] ^ mb);
                }
            }
            if let [x] = *pairs.remainder() {
                let (ra, ma) = literal(x);
                let a = get(ra);
                for k in 0..W {
                    d[k] = I::op(d[k], a[k] ^ ma);
                }
            }
        }
    }
}

/// [`row_op`] with its inner combination named at run time.
#[inline(always)]
fn row_op_inner<const W: usize, O: Combine>(
    inner: u32,
    regs: &mut [[u64; W]],
    dst: usize,
    masks: (u64, u64),
    scalars: (&[u64], &[u32]),
    list: &[u32],
) {
    match inner {
        AND => row_op::<W, O, And>(regs, dst, masks, fold::<And>(scalars.0, scalars.1), list),
        OR => row_op::<W, O, Or>(regs, dst, masks, fold::<Or>(scalars.0, scalars.1), list),
        _ => row_op::<W, O, Xor>(regs, dst, masks, fold::<Xor>(scalars.0, scalars.1), list),
    }
}

dispatched! {
    /// Runs a [`WordProgram`]'s code over `regs` and `scalars`.
    fn run_words<const W: usize>(code: &[u32], first_word: u64, regs: &mut [[u64; W]], scalars: &mut [u64]) {
        let mut i = 0;
        while i + 2 < code.len() {
            match code[i] {
                SCALAR_PATTERN => {
                    scalars[code[i + 1] as usize] = pattern_word(code[i + 2], first_word);
                    i += 3;
                }
                ROW_PATTERN => {
                    pattern::<W>(&mut regs[code[i + 1] as usize], code[i + 2], first_word);
                    i += 3;
                }
                SCALAR_OP => {
                    let (kind, at, n) = (code[i + 1], code[i + 2] as usize, code[i + 3] as usize);
                    let list = &code[i + 4..i + 4 + n];
                    i += 4 + n;
                    scalars[at] = match kind {
                        AND => fold::<And>(scalars, list),
                        OR => fold::<Or>(scalars, list),
                        _ => fold::<Xor>(scalars, list),
                    };
                }
                _ => {
                    let (kinds, dst, flags) = (code[i + 1], code[i + 2] as usize, code[i + 3]);
                    let (ns, nr) = (code[i + 4] as usize, code[i + 5] as usize);
                    let slist = &code[i + 6..i + 6 + ns];
                    let rlist = &code[i + 6 + ns..i + 6 + ns + nr];
                    i += 6 + ns + nr;
                    let masks = (
                        0u64.wrapping_sub((flags & 1) as u64),
                        0u64.wrapping_sub(((flags >> 1) & 1) as u64),
                    );
                    let sc = (&*scalars, slist);
                    let inner = kinds & 15;
                    match kinds >> 4 {
                        AND => row_op_inner::<W, And>(inner, regs, dst, masks, sc, rlist),
                        OR => row_op_inner::<W, Or>(inner, regs, dst, masks, sc, rlist),
                        XOR => row_op_inner::<W, Xor>(inner, regs, dst, masks, sc, rlist),
                        _ => row_op_inner::<W, Take>(inner, regs, dst, masks, sc, rlist),
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SplitMix64 (Steele, Lea, Flood, OOPSLA 2014): test inputs only.
    struct Mix(u64);
    impl Mix {
        fn next(&mut self) -> u64 {
            self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            z ^ (z >> 31)
        }
        fn below(&mut self, n: usize) -> usize {
            (self.next() % n as u64) as usize
        }
    }

    /// The reference: every node's value on one basis state, in node order.
    fn evaluate_state(nodes: &[Node], state: u64) -> Vec<bool> {
        let mut v: Vec<bool> = Vec::with_capacity(nodes.len());
        for n in nodes {
            let x = match n {
                Node::Const(b) => *b,
                Node::Var(j) => (state >> j) & 1 == 1,
                Node::Not(a) => !v[*a as usize],
                Node::And(c) => c.iter().all(|&a| v[a as usize]),
                Node::Or(c) => c.iter().any(|&a| v[a as usize]),
                Node::Xor(c) => c.iter().fold(false, |p, &a| p ^ v[a as usize]),
            };
            v.push(x);
        }
        v
    }

    /// A random DAG: half the children are nodes nothing read yet (so parts
    /// are trees, whose nodes have one reader), the rest any earlier node.
    fn random_dag(rng: &mut Mix, size: usize, vars: std::ops::Range<u32>) -> Vec<Node> {
        assert!(vars.start < vars.end);
        let mut nodes = Vec::with_capacity(size);
        let mut unread: Vec<u32> = Vec::new();
        for i in 0..size {
            let mut pick = |rng: &mut Mix| match unread.pop() {
                Some(c) if rng.next() & 1 == 0 => c,
                other => {
                    unread.extend(other);
                    if rng.next() & 1 == 0 {
                        (i - 1 - rng.below(i.min(8))) as u32
                    } else {
                        rng.below(i) as u32
                    }
                }
            };
            let node = match if i == 0 { 0 } else { rng.below(12) } {
                0..=2 => {
                    Node::Var(vars.start + (rng.next() % (vars.end - vars.start) as u64) as u32)
                }
                3 => Node::Const(rng.next() & 1 == 1),
                4..=5 => Node::Not(pick(rng)),
                k => {
                    // 0 to 5 children, repeats allowed.
                    let n = rng.below(6);
                    let children = (0..n).map(|_| pick(rng)).collect();
                    match k {
                        6..=7 => Node::And(children),
                        8..=9 => Node::Or(children),
                        _ => Node::Xor(children),
                    }
                }
            };
            nodes.push(node);
            unread.push(i as u32);
        }
        nodes
    }

    /// Evaluates `nodes` on the block of `W` words at `first_word` and checks
    /// `states` against [`evaluate_state`]; returns (fused, accumulators).
    fn check<const W: usize>(
        nodes: &[Node],
        outputs: &[u32],
        first_word: u64,
        d: Dispatch,
        states: &[u64],
    ) -> (usize, usize) {
        let p = WordProgram::compile(nodes, outputs, W, d).unwrap();
        let mut out = vec![[0u64; W]; outputs.len()];
        p.evaluate::<W>(first_word, &mut Scratch::new(), &mut out)
            .unwrap();
        for &s in states {
            let want = evaluate_state(nodes, s);
            let (w, b) = ((s / 64 - first_word) as usize, s % 64);
            for (k, &o) in outputs.iter().enumerate() {
                assert_eq!(
                    (out[k][w] >> b) & 1 == 1,
                    want[o as usize],
                    "output {k} (node {o}), state {s}, W {W}, {:?}",
                    d.level()
                );
            }
        }
        (p.fused, p.accumulators)
    }

    /// States of the block of `W` words at `first`: all of them, or 200 at random.
    fn states_of<const W: usize>(rng: &mut Mix, first: u64) -> Vec<u64> {
        if W <= 4 {
            (first * 64..(first + W as u64) * 64).collect()
        } else {
            (0..200)
                .map(|_| (first + rng.below(W) as u64) * 64 + rng.below(64) as u64)
                .collect()
        }
    }

    #[test]
    fn random_dags_match_a_per_state_evaluator_on_every_level() {
        let mut rng = Mix(3);
        let (mut fused, mut accumulators) = (0, 0);
        for d in Dispatch::available() {
            for round in 0..150 {
                let size = 1 + rng.below(300);
                let outputs: Vec<u32> = (0..rng.below(4))
                    .map(|_| rng.below(size) as u32)
                    .chain([size as u32 - 1])
                    .collect();
                // Few variables over whole small blocks, then up to 64 variables
                // on far blocks, so every variable is a row on some W and a
                // block constant on another.
                let vars = 1 + rng.below(12) as u32;
                let few = random_dag(&mut rng, size, 0..vars);
                let many = random_dag(&mut rng, size, 0..40 + round % 25);
                // Variables 6-11 are rows at W = 64: mostly row operations.
                let rows = random_dag(&mut rng, size, 6..12);
                let far = |rng: &mut Mix, w: u64| (rng.next() >> 8) / w * w;
                let first = far(&mut rng, 1);
                let s = states_of::<1>(&mut rng, first);
                check::<1>(&few, &outputs, first, d, &s);
                let s = states_of::<2>(&mut rng, 0);
                check::<2>(&few, &outputs, 0, d, &s);
                let first = far(&mut rng, 64);
                let s = states_of::<64>(&mut rng, first);
                let r = check::<64>(&few, &outputs, first, d, &s);
                fused += r.0;
                accumulators += r.1;
                let r = check::<64>(&rows, &outputs, first, d, &s);
                fused += r.0;
                accumulators += r.1;
                let first = far(&mut rng, 4);
                let s = states_of::<4>(&mut rng, first);
                let r = check::<4>(&many, &outputs, first, d, &s);
                fused += r.0;
                accumulators += r.1;
                let first = far(&mut rng, 64);
                let s = states_of::<64>(&mut rng, first);
                let r = check::<64>(&many, &outputs, first, d, &s);
                fused += r.0;
                accumulators += r.1;
            }
        }
        // The accumulation and fusion paths ran, not only the plain one.
        assert!(
            fused >= 20 && accumulators >= 50,
            "{fused} fused, {accumulators} accumulators"
        );
    }

    #[test]
    fn deep_chains_compile_and_run_in_few_registers() {
        // A 100,000-node chain: v_i = v_{i-1} op x_{i mod 10}, with NOTs in between.
        let mut rng = Mix(5);
        let mut nodes: Vec<Node> = (0..10).map(Node::Var).collect();
        while nodes.len() < 100_000 {
            let prev = nodes.len() as u32 - 1;
            let x = rng.below(10) as u32;
            nodes.push(match rng.below(4) {
                0 => Node::And(vec![prev, x]),
                1 => Node::Or(vec![x, prev]),
                2 => Node::Xor(vec![prev, x]),
                _ => Node::Not(prev),
            });
        }
        let top = nodes.len() as u32 - 1;
        for d in Dispatch::available() {
            let p = WordProgram::compile(&nodes, &[top, 5000], 16, d).unwrap();
            // At 16 words, variables 6-9 are rows; the chain's value, one older
            // output kept live, and one being built.
            assert!(p.registers() <= 7, "{} registers", p.registers());
            let states = states_of::<16>(&mut rng, 0);
            check::<16>(&nodes, &[top, 5000], 0, d, &states);
            let states = states_of::<1>(&mut rng, 3);
            check::<1>(&nodes, &[top, 5000], 3, d, &states);
        }
        // A million nodes: the chain continued, in the same few registers.
        while nodes.len() < 1_000_000 {
            let prev = nodes.len() as u32 - 1;
            let x = rng.below(10) as u32;
            nodes.push(Node::Xor(vec![prev, x]));
        }
        let top = nodes.len() as u32 - 1;
        let p = WordProgram::compile(&nodes, &[top], 16, Dispatch::best()).unwrap();
        assert!(p.registers() <= 6, "{} registers", p.registers());
        let states = states_of::<16>(&mut rng, 16 * 9);
        check::<16>(&nodes, &[top], 16 * 9, Dispatch::best(), &states[..20]);
        // A chain of 100,000 NOTs, and one of one-operand gates.
        let mut nots = vec![Node::Var(3)];
        for i in 0..100_000u32 {
            nots.push(if i % 2 == 0 {
                Node::Not(i)
            } else {
                Node::And(vec![i])
            });
        }
        let top = nots.len() as u32 - 1;
        let states: Vec<u64> = (0..64).collect();
        check::<1>(&nots, &[top], 0, Dispatch::best(), &states);
        // A nest 100,000 deep of XORs whose second operand is a fresh AND of two rows.
        let mut nest: Vec<Node> = (0..12).map(Node::Var).collect();
        let mut acc = 0u32;
        for k in 0..50_000u32 {
            nest.push(Node::And(vec![6 + k % 6, 6 + (k / 6) % 6]));
            nest.push(Node::Xor(vec![acc, nest.len() as u32 - 1]));
            acc = nest.len() as u32 - 1;
        }
        let p = WordProgram::compile(&nest, &[acc], 64, Dispatch::best()).unwrap();
        assert!(p.registers() <= 9, "{} registers", p.registers());
        let states = states_of::<64>(&mut rng, 64);
        check::<64>(&nest, &[acc], 64, Dispatch::best(), &states);
    }

    #[test]
    fn a_wide_xor_of_products_is_accumulated_in_place() {
        // An ESOP of 2,000 products of two row variables: the products are read
        // once each, so they join one accumulator as they are made (fused,
        // one pass each) instead of 2,000 live registers.
        let mut rng = Mix(9);
        let mut nodes: Vec<Node> = (0..20).map(Node::Var).collect();
        let mut terms = Vec::new();
        for _ in 0..2000 {
            let (a, b) = (6 + rng.below(7) as u32, rng.below(20) as u32);
            nodes.push(Node::And(vec![a, b]));
            terms.push(nodes.len() as u32 - 1);
        }
        nodes.push(Node::Xor(terms));
        let top = nodes.len() as u32 - 1;
        let p = WordProgram::compile(&nodes, &[top], 128, Dispatch::best()).unwrap();
        assert!(p.registers() <= 9, "{} registers", p.registers());
        assert!(p.row_passes() <= 2000 + 7, "{} passes", p.row_passes());
        let states = states_of::<128>(&mut rng, 128 * 3);
        check::<128>(&nodes, &[top], 128 * 3, Dispatch::best(), &states);
    }

    #[test]
    fn constants_and_empty_gates_follow_their_identities() {
        // Identities of Boolean algebra, common practice: the empty AND is 1, the
        // empty OR and XOR are 0, x & 0 = 0, x | 1 = 1, x ^ 1 = !x.
        let nodes = vec![
            Node::Var(0),
            Node::Const(false),
            Node::Const(true),
            Node::And(vec![]),
            Node::Or(vec![]),
            Node::Xor(vec![]),
            Node::And(vec![0, 1]),
            Node::Or(vec![0, 2]),
            Node::Xor(vec![0, 2]),
        ];
        let p = WordProgram::compile(&nodes, &[3, 4, 5, 6, 7, 8, 0], 1, Dispatch::best()).unwrap();
        let mut out = vec![[0u64; 1]; 7];
        p.evaluate::<1>(0, &mut Scratch::new(), &mut out).unwrap();
        let x = 0xaaaa_aaaa_aaaa_aaaau64; // bit 0 of the state number
        assert_eq!(
            out.iter().map(|r| r[0]).collect::<Vec<_>>(),
            [!0, 0, 0, 0, !0, !x, x]
        );
        assert_eq!(p.row_passes(), 0, "bit 0 is the same word in every word");
    }

    #[test]
    fn bad_dags_and_blocks_are_refused_with_the_reason() {
        let d = Dispatch::best();
        let compile = |nodes: &[Node], outputs: &[u32]| {
            WordProgram::compile(nodes, outputs, 8, d).unwrap_err()
        };
        assert_eq!(
            compile(&[Node::Var(0), Node::And(vec![0, 2])], &[1]),
            ProgramError::NotTopological { node: 1, child: 2 }
        );
        assert_eq!(
            compile(&[Node::Not(0)], &[0]),
            ProgramError::NotTopological { node: 0, child: 0 }
        );
        assert_eq!(
            compile(&[Node::Var(64)], &[0]),
            ProgramError::VariableOutOfRange { node: 0, var: 64 }
        );
        assert_eq!(
            compile(&[Node::Var(0)], &[1]),
            ProgramError::OutputOutOfRange {
                output: 0,
                node: 1,
                nodes: 1
            }
        );
        assert_eq!(
            WordProgram::compile(&[Node::Var(0)], &[0], 12, d).unwrap_err(),
            ProgramError::BlockWords(12)
        );
        let p = WordProgram::compile(&[Node::Var(0)], &[0], 8, d).unwrap();
        assert_eq!(
            p.evaluate::<8>(0, &mut Scratch::new(), &mut [])
                .unwrap_err(),
            ProgramError::OutputShape {
                rows: 0,
                outputs: 1
            }
        );
        assert_eq!(
            p.evaluate::<4>(0, &mut Scratch::new(), &mut [[0; 4]])
                .unwrap_err(),
            ProgramError::WrongWords {
                compiled: 8,
                given: 4
            }
        );
        assert_eq!(
            p.evaluate::<8>(4, &mut Scratch::new(), &mut [[0; 8]])
                .unwrap_err(),
            ProgramError::Misaligned {
                first_word: 4,
                words: 8
            }
        );
    }
}
