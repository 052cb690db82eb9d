//! Exhaustive bit-sliced simulation: every basis state of a slice of the
//! state space through the gate list, 64 states a word and `BLOCK_WORDS`
//! words a block, blocks in parallel.
//!
//! Per block: the free lines get their state patterns, the gate program
//! ([`super::kernel`]) runs over the rows at the CPU's widest vectors, the
//! spec's expected rows come from the compiled expressions
//! ([`super::program`]) or the bit-sliced arithmetic references
//! ([`super::ripple`]), and the rows are compared word by word. Adders,
//! subtractors, comparators and functions with expression outputs and no
//! control skip the pattern and expected rows: [`super::fused`] compares
//! the circuit's rows in one pass (running the adder's chain there).

use super::bind::{bind, Binding};
use super::fused::{self, Fused};
use super::kernel::{Dispatch, GateProgram, Literal};
use super::program::{pattern, Node, Scratch, WordProgram};
use super::reference::{arithmetic_reference, Model, Reference};
use super::{Counterexample, RegisterValue, Verdict, VerifyError, VerifyOptions, BLOCK_WORDS};
use crate::circuit::layout::ANCILLAE;
use crate::circuit::Circuit;
use crate::logic::{Dag, NodeId, Term};
use crate::progress::{Event, Progress};
use crate::spec::{OutputDef, Spec, SpecBody};
use rayon::prelude::*;
use std::sync::atomic::{AtomicU64, Ordering};

const W: usize = BLOCK_WORDS;

/// The spec's graph in the verifier's own node form (every node; the
/// program keeps only what the outputs need).
pub(super) fn nodes_of(dag: &Dag) -> Vec<Node> {
    dag.terms()
        .iter()
        .map(|t| match *t {
            Term::Const(b) => Node::Const(b),
            Term::Var(j) => Node::Var(j),
            Term::Not(a) => Node::Not(a),
            Term::And(_) => Node::And(dag.operands(t).to_vec()),
            Term::Or(_) => Node::Or(dag.operands(t).to_vec()),
            Term::Xor(_) => Node::Xor(dag.operands(t).to_vec()),
        })
        .collect()
}

/// Exhaustive check of the words `[first, end)` of the state space (64 states a word).
pub(super) fn verify_words(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    progress: &dyn Progress,
    first: u64,
    end: u64,
) -> Result<Verdict, VerifyError> {
    let layout = super::bind::expected_registers(spec);
    let binding = bind(circuit, &layout)?;
    if let Some(problem) = super::bind::form_mismatch(circuit, spec) {
        return Ok(Verdict::form_refuted(problem));
    }
    let bits = binding.free.len() as u32;
    let states_all = if bits < 63 { 1u64 << bits } else { u64::MAX };
    let end = end.min(states_all.div_ceil(64));
    let first = first.min(end);
    let span = (end - first).saturating_mul(64).min(states_all);
    if bits >= 63 || span > opts.max_states {
        return Err(VerifyError::TooLarge {
            bits,
            limit: opts.max_states,
        });
    }
    let dispatch = Dispatch::best();
    let model = match &spec.body {
        SpecBody::Function(f) => {
            let mut roots: Vec<NodeId> = Vec::new();
            let outputs = f
                .outputs
                .iter()
                .map(|o| match &o.def {
                    OutputDef::Table(t) => Reference::Words(t.words(), t.len()),
                    OutputDef::Expr(root) => {
                        roots.push(*root);
                        Reference::Expr(roots.len() - 1)
                    }
                })
                .collect();
            let program = WordProgram::compile(&nodes_of(&f.dag), &roots, W, dispatch)
                .map_err(|e| VerifyError::Binding(format!("the spec's expressions: {e}")))?;
            Model::Function {
                inputs: f.inputs.len(),
                outputs,
                program,
            }
        }
        SpecBody::Permutation(p) => Model::Permutation { images: p.images() },
        SpecBody::Arithmetic(a) => Model::Arithmetic { spec: a, layout },
    };
    let mut program = GateProgram::new(circuit.width(), dispatch)
        .map_err(|e| VerifyError::Binding(e.to_string()))?;
    for g in circuit.gates() {
        let controls: Vec<Literal> = g
            .controls()
            .iter()
            .map(|c| Literal {
                line: c.line.0,
                positive: c.positive,
            })
            .collect();
        if g.is_measured() {
            program.push_measured(g.target().0, &controls)
        } else if g.is_temporary_and() {
            program.push_and(g.target().0, &controls)
        } else {
            program.push(g.target().0, &controls)
        }
        .map_err(|e| VerifyError::Binding(e.to_string()))?;
    }
    let fused = match &spec.body {
        SpecBody::Arithmetic(a) => Fused::plan(a).filter(|f| f.bits() == binding.free.len()),
        _ => None,
    };
    let low = fused::low_patterns::<W>(binding.free.len());
    let unbound: Vec<usize> = (0..circuit.width())
        .filter(|l| !binding.free.contains(l))
        .collect();
    let plain_function = match &model {
        Model::Function { outputs, .. } => {
            !super::bind::outer_control(spec)
                && outputs
                    .iter()
                    .enumerate()
                    .all(|(k, r)| matches!(r, Reference::Expr(e) if *e == k))
        }
        _ => false,
    };
    let checker = Checker {
        one_pass: fused.is_some() || plain_function,
        fused,
        low,
        unbound,
        zero: [0; W],
        controlled: super::bind::outer_control(spec),
        circuit,
        width: circuit.width(),
        program,
        binding,
        model,
        states: states_all,
        dispatch,
    };
    // Blocks are aligned to their size, so the compiled expressions see
    // whole blocks; the words outside [first, end) are not checked.
    let (lo, hi) = (first / W as u64, end.div_ceil(W as u64));
    let done = AtomicU64::new(0);
    let checked = AtomicU64::new(0);
    // A cancelled block is `Some(Err(()))`, so that the search ends there as
    // at a failure instead of passing over every remaining block.
    // Blocks go to threads in runs of about 2^20 gate x word operations, so a
    // short circuit does not pay the scheduler once per 8,192 states.
    let per_block = (circuit.gates().len() + 2 * circuit.width()).max(1) * W;
    let run = (1usize << 20).div_ceil(per_block).clamp(1, 64);
    // Block numbers fit a usize: the state space is at most 2^63 states.
    let found = (lo as usize..hi as usize)
        .into_par_iter()
        .with_min_len(run)
        .map_init(Work::default, |work, b| {
            let b = b as u64;
            if progress.cancelled() {
                return Some(Err(()));
            }
            let r = checker.block(b * W as u64, first, end, work, &checked);
            let d = done.fetch_add(64 * W as u64, Ordering::Relaxed);
            progress.event(Event::Verify {
                done: (d + 64 * W as u64).min(span),
                total: span,
            });
            r.map(Ok)
        })
        .find_first(Option::is_some)
        .flatten();
    let failure = match found {
        Some(Err(())) => return Err(VerifyError::Cancelled),
        Some(Ok(state)) => Some(state),
        None if progress.cancelled() => return Err(VerifyError::Cancelled),
        None => None,
    };
    Ok(match failure {
        None => {
            let checked = checked.into_inner();
            Verdict::Proven {
                by: "exhaustive",
                free_bits: bits,
                states: checked,
                outside_domain: span - checked,
            }
        }
        Some(state) => Verdict::Refuted {
            counterexample: Box::new(checker.explain(state)),
        },
    })
}

/// The buffers of one thread, reused from block to block.
#[derive(Default)]
struct Work {
    scratch: Scratch<W>,
    inputs: Vec<[u64; W]>,
    rows: Vec<[u64; W]>,
    expected: Vec<[u64; W]>,
    temp: Vec<[u64; W]>,
}

struct Checker<'a> {
    /// The one-pass check of an adder, subtractor or comparator, if the spec is one.
    fused: Option<Fused>,
    /// Blocks checked in one pass: a fused op, or a function without a
    /// control whose output `k` is the program's output `k`.
    one_pass: bool,
    /// The pattern rows of the low state bits, the same on every block.
    low: Vec<[u64; W]>,
    /// The lines that are no state bit (ancillae), 0 at the start.
    unbound: Vec<usize>,
    /// A row of 0s.
    zero: [u64; W],
    /// A controlled function or permutation: `ctrl` is the last free line,
    /// and the map applies where it is 1.
    controlled: bool,
    circuit: &'a Circuit,
    width: usize,
    program: GateProgram,
    binding: Binding,
    model: Model<'a>,
    states: u64,
    dispatch: Dispatch,
}

impl Checker<'_> {
    /// The state patterns of the free lines on the block at word `base`.
    fn inputs(&self, base: u64, into: &mut Vec<[u64; W]>) {
        into.resize(self.binding.free.len(), [0; W]);
        for (bit, row) in into.iter_mut().enumerate() {
            pattern::<W>(row, bit as u32, base);
        }
    }

    /// The expected value of every free line on the block at word `base`
    /// (into `work.expected`), and the mask of states inside the op's domain.
    fn expected(&self, base: u64, work: &mut Work) -> [u64; W] {
        let mut care = [!0u64; W];
        let Work {
            scratch,
            inputs,
            expected,
            temp,
            ..
        } = work;
        match &self.model {
            Model::Function {
                inputs: n,
                outputs,
                program,
            } => {
                temp.resize(program.outputs(), [0; W]);
                let rows = temp;
                program
                    .evaluate::<W>(base, scratch, rows)
                    .expect("compiled for this block size");
                let out = expected;
                out.clear();
                out.extend_from_slice(&inputs[..*n]);
                for (k, r) in outputs.iter().enumerate() {
                    let mut row = inputs[n + k];
                    match r {
                        Reference::Expr(e) => {
                            for (v, f) in row.iter_mut().zip(&rows[*e]) {
                                *v ^= f;
                            }
                        }
                        // x is the low n bits of the state number.
                        Reference::Words(words, len) => {
                            for (i, v) in row.iter_mut().enumerate() {
                                let w = base + i as u64;
                                *v ^= if *len >= 64 {
                                    words[(w % (*len as u64 / 64)) as usize]
                                } else {
                                    (0..64).fold(0u64, |acc, k| {
                                        acc | ((words[0] >> (k % *len as u64)) & 1) << k
                                    })
                                };
                            }
                        }
                    }
                    out.push(row);
                }
                self.blend_control(inputs, out);
                care
            }
            Model::Permutation { images } => {
                let out = expected;
                out.clear();
                let lines = inputs.len() - self.controlled as usize;
                out.resize(lines, [0; W]);
                let mask = (images.len() - 1) as u64;
                for i in 0..W {
                    for k in 0..64u64 {
                        let s = (base + i as u64) * 64 + k;
                        if s >= self.states {
                            break;
                        }
                        let img = images[(s & mask) as usize];
                        for (j, o) in out.iter_mut().enumerate() {
                            o[i] |= ((img >> j) & 1) << k;
                        }
                    }
                }
                self.blend_control(inputs, out);
                care
            }
            Model::Arithmetic { spec, layout } => {
                let d = self.dispatch;
                if !super::reference::sliced(d, spec, inputs, expected, temp, &mut care) {
                    *expected = self.per_state(base, spec, layout, &mut care);
                }
                care
            }
        }
    }

    /// For a controlled spec (`ctrl` the last free line, absent from `out`
    /// so far): the map where `ctrl` is 1, the input where it is 0, and
    /// `ctrl` itself unchanged.
    fn blend_control(&self, inputs: &[[u64; W]], out: &mut Vec<[u64; W]>) {
        if !self.controlled {
            return;
        }
        let ctrl = inputs[inputs.len() - 1];
        for (o, x) in out.iter_mut().zip(inputs) {
            for i in 0..W {
                o[i] = (o[i] & ctrl[i]) | (x[i] & !ctrl[i]);
            }
        }
        out.push(ctrl);
    }

    /// The arithmetic reference one state at a time, for the ops the
    /// bit-sliced references do not cover.
    fn per_state(
        &self,
        base: u64,
        spec: &crate::spec::ArithSpec,
        layout: &[(&'static str, usize)],
        care: &mut [u64; W],
    ) -> Vec<[u64; W]> {
        let mut out = vec![[0u64; W]; self.binding.free.len()];
        let mut values = vec![0u64; layout.len()];
        let mut result = vec![0u64; layout.len()];
        for i in 0..W {
            for k in 0..64u64 {
                let s = (base + i as u64) * 64 + k;
                if s >= self.states {
                    break;
                }
                let mut shift = 0;
                for (v, (_, width)) in values.iter_mut().zip(layout) {
                    *v = (s >> shift) & ((1u64 << width) - 1);
                    shift += width;
                }
                if !arithmetic_reference(spec, &values, &mut result) {
                    care[i] &= !(1u64 << k);
                    continue;
                }
                let mut bit = 0;
                for (v, (_, width)) in result.iter().zip(layout) {
                    for j in 0..*width {
                        out[bit][i] |= ((v >> j) & 1) << k;
                        bit += 1;
                    }
                }
            }
        }
        out
    }

    /// Simulates the block at word `base`; returns the first failing state
    /// of the words `[first, end)` in it.
    fn block(
        &self,
        base: u64,
        first: u64,
        end: u64,
        work: &mut Work,
        checked: &AtomicU64,
    ) -> Option<u64> {
        if self.one_pass {
            let bad = self.one_pass(base, work);
            return self.first_bad(base, first, end, &bad, &[!0; W], checked);
        }
        self.inputs(base, &mut work.inputs);
        let mut rows = std::mem::take(&mut work.rows);
        rows.clear();
        rows.resize(self.width, [0; W]);
        for (bit, &line) in self.binding.free.iter().enumerate() {
            rows[line] = work.inputs[bit];
        }
        // Bit k of word i: a measured uncompute found its ancilla different
        // from the AND it must hold, on that state.
        let mut unheld = [0u64; W];
        self.program
            .run_block_checked::<W>(&mut rows, &mut unheld)
            .expect("the program was built for this width");
        let care = self.expected(base, work);
        let expected = &work.expected;
        // Every line's difference ORed into one row, line by line (whole
        // rows at a time, so the loops vectorize), then the words in order.
        let mut bad = unheld;
        for &a in &self.binding.ancillae {
            for (b, v) in bad.iter_mut().zip(&rows[a]) {
                *b |= v;
            }
        }
        for (&line, e) in self.binding.free.iter().zip(expected.iter()) {
            for ((b, v), x) in bad.iter_mut().zip(&rows[line]).zip(e) {
                *b |= v ^ x;
            }
        }
        let failed = self.first_bad(base, first, end, &bad, &care, checked);
        work.rows = rows;
        failed
    }

    /// The rows after the circuit on the block at word `base`, checked in
    /// one pass against the fused op or the function's outputs: the OR of
    /// every wrong state's bits.
    fn one_pass(&self, base: u64, work: &mut Work) -> [u64; W] {
        const { assert!(W <= 128 && W.is_multiple_of(fused::C)) };
        let Work {
            rows,
            scratch,
            temp,
            ..
        } = work;
        rows.resize(self.width, [0; W]);
        let mut sources: [&[u64; W]; 64] = [&self.zero; 64];
        for (bit, s) in sources.iter_mut().take(self.binding.free.len()).enumerate() {
            *s = fused::source::<W>(&self.low, bit, base);
        }
        let (free, unbound) = (&self.binding.free, &self.unbound);
        fused::start::<W>(self.dispatch, &self.low, free, unbound, base, rows);
        let mut bad = [0u64; W];
        self.program
            .run_block_checked::<W>(rows, &mut bad)
            .expect("the program was built for this width");
        let block = fused::Block {
            lines: &self.binding.free,
            ancillae: &self.binding.ancillae,
            sources: &sources[..self.binding.free.len()],
        };
        match (&self.fused, &self.model) {
            (Some(plan), _) => fused::check::<W>(self.dispatch, &block, plan, rows, &mut bad),
            (
                None,
                Model::Function {
                    inputs, program, ..
                },
            ) => {
                temp.resize(program.outputs(), [0; W]);
                program
                    .evaluate::<W>(base, scratch, temp)
                    .expect("compiled for this block size");
                fused::check_function::<W>(self.dispatch, &block, *inputs, temp, rows, &mut bad);
            }
            _ => unreachable!("one pass is taken for fused ops and plain functions"),
        }
        bad
    }

    /// The first state of the words `[first, end)` of the block at `base`
    /// with its bit set in `bad` and in `care`; counts the states checked.
    fn first_bad(
        &self,
        base: u64,
        first: u64,
        end: u64,
        bad: &[u64; W],
        care: &[u64; W],
        checked: &AtomicU64,
    ) -> Option<u64> {
        // A whole block inside the range with nothing wrong: the common case, in one pass.
        let whole = base >= first && base + W as u64 <= end && self.states >= 64 * W as u64;
        if whole && bad.iter().zip(care).all(|(b, c)| b & c == 0) {
            let count = care.iter().map(|c| c.count_ones() as u64).sum();
            checked.fetch_add(count, Ordering::Relaxed);
            return None;
        }
        let mut count = 0u64;
        let mut failed = None;
        let valid_last = if self.states < 64 {
            (1u64 << self.states) - 1
        } else {
            !0
        };
        for i in 0..W {
            let word = base + i as u64;
            if word < first || word >= end {
                continue;
            }
            let mask = valid_last & care[i];
            count += mask.count_ones() as u64;
            if bad[i] & mask != 0 {
                failed = Some(word * 64 + (bad[i] & mask).trailing_zeros() as u64);
                break;
            }
        }
        checked.fetch_add(count, Ordering::Relaxed);
        failed
    }

    /// Re-simulates the failing `state` alone and describes it.
    fn explain(&self, state: u64) -> Counterexample {
        let mut v = vec![false; self.width];
        for (bit, &line) in self.binding.free.iter().enumerate() {
            v[line] = (state >> bit) & 1 == 1;
        }
        let before = v.clone();
        let mut unheld = None;
        for (k, g) in self.circuit.gates().iter().enumerate() {
            let fire = g.controls().iter().all(|c| v[c.line.index()] == c.positive);
            let t = g.target().index();
            if g.is_measured() {
                if v[t] != fire && unheld.is_none() {
                    let info = &self.circuit.lines()[t];
                    unheld = Some(format!(
                        "gate {k}, a measured uncompute, finds {}[{}] = {} but the AND of its controls is {}: the ancilla does not hold the AND it uncomputes",
                        info.register, info.index, v[t] as u8, fire as u8
                    ));
                }
                v[t] = false;
            } else if g.is_temporary_and() {
                if v[t] && unheld.is_none() {
                    let info = &self.circuit.lines()[t];
                    unheld = Some(format!(
                        "gate {k}, a temporary AND, finds {}[{}] = 1: its target must be 0",
                        info.register, info.index
                    ));
                }
                v[t] = fire;
            } else if fire {
                v[t] = !v[t];
            }
        }
        let word = state / 64;
        let base = word / W as u64 * W as u64;
        let mut work = Work::default();
        self.inputs(base, &mut work.inputs);
        self.expected(base, &mut work);
        let mut want = vec![false; self.width];
        for (&line, e) in self.binding.free.iter().zip(&work.expected) {
            want[line] = (e[(word - base) as usize] >> (state % 64)) & 1 == 1;
        }
        let show = |vals: &[bool]| -> Vec<RegisterValue> {
            self.binding
                .registers
                .iter()
                .map(|(name, lines)| {
                    let bits: Vec<bool> = lines.iter().map(|&l| vals[l]).collect();
                    RegisterValue::new(name, &bits)
                })
                .collect()
        };
        let mut problem = String::from("no difference found on re-simulation");
        'find: for (name, lines) in &self.binding.registers {
            for (i, &l) in lines.iter().enumerate() {
                if v[l] != want[l] {
                    let what = if self.binding.ancillae.contains(&l) {
                        "ancilla is not returned to 0"
                    } else {
                        "line differs from the spec"
                    };
                    problem = format!(
                        "{name}[{i}] is {}, expected {}: {what}",
                        v[l] as u8, want[l] as u8
                    );
                    break 'find;
                }
            }
        }
        if let Some(u) = unheld {
            problem = u;
        }
        Counterexample {
            state: Some(state),
            input: show(&before)
                .into_iter()
                .filter(|r| r.register != ANCILLAE)
                .collect(),
            expected: show(&want),
            actual: show(&v),
            problem,
        }
    }
}
