//! Exhaustive bit-sliced simulation: every basis state of a slice of the state space through the gate list, 64 states a word, blocks in parallel.

use super::bind::{bind, Binding};
use super::eval::Compiled;
use super::reference::{arithmetic_reference, Model, Reference};
use super::{Counterexample, RegisterValue, Verdict, VerifyError, VerifyOptions, BLOCK_WORDS};
use crate::circuit::layout::ANCILLAE;
use crate::circuit::Circuit;
use crate::progress::{Event, Progress};
use crate::spec::{OutputDef, Spec, SpecBody};
use rayon::prelude::*;
use std::sync::atomic::{AtomicU64, Ordering};

/// Gate in the verifier's own form: controls as (line, fire-on-1) pairs.
struct Op {
    target: usize,
    controls: Vec<(usize, bool)>,
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
    let layout = spec.layout().sizes();
    let binding = bind(circuit, &layout)?;
    if let Some(problem) = super::bind::form_mismatch(circuit, spec) {
        return Ok(Verdict::form_refuted(problem));
    }
    let model = match &spec.body {
        SpecBody::Function(f) => {
            let mut roots = Vec::new();
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
            Model::Function {
                inputs: f.inputs.len(),
                outputs,
                program: Compiled::new(&f.dag, &roots),
            }
        }
        SpecBody::Permutation(p) => Model::Permutation { images: p.images() },
        SpecBody::Arithmetic(a) => Model::Arithmetic { spec: a, layout },
    };
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
    let states = states_all;
    let ops: Vec<Op> = circuit
        .gates()
        .iter()
        .map(|g| Op {
            target: g.target().index(),
            controls: g
                .controls()
                .iter()
                .map(|c| (c.line.index(), c.positive))
                .collect(),
        })
        .collect();
    let checker = Checker {
        width: circuit.width(),
        ops,
        binding,
        model,
        states,
    };
    let blocks = (end - first).div_ceil(BLOCK_WORDS as u64);
    let done = AtomicU64::new(0);
    let checked = AtomicU64::new(0);
    let failure = (0..blocks).into_par_iter().find_map_first(|b| {
        let start = first + b * BLOCK_WORDS as u64;
        let r = checker.block(start, end, &checked);
        let d = done.fetch_add(64 * BLOCK_WORDS as u64, Ordering::Relaxed);
        progress.event(Event::Verify {
            done: (d + 64 * BLOCK_WORDS as u64).min(span),
            total: span,
        });
        r
    });
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

struct Checker<'a> {
    width: usize,
    ops: Vec<Op>,
    binding: Binding,
    model: Model<'a>,
    states: u64,
}

/// Bit `k` of the result is bit `bit` of `k`.
const fn low_pattern(bit: usize) -> u64 {
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

const LOW: [u64; 6] = [
    low_pattern(0),
    low_pattern(1),
    low_pattern(2),
    low_pattern(3),
    low_pattern(4),
    low_pattern(5),
];

/// Word `w` (states `64 w ..`) of the pattern of state bit `bit`.
fn free_word(bit: usize, w: u64) -> u64 {
    if bit < 6 {
        LOW[bit]
    } else if (w >> (bit - 6)) & 1 == 1 {
        !0
    } else {
        0
    }
}

impl Checker<'_> {
    /// Simulates one block starting at word `first`; returns the first failing state.
    fn block(&self, first: u64, end: u64, checked: &AtomicU64) -> Option<u64> {
        let n_words = (end - first).min(BLOCK_WORDS as u64) as usize;
        let mut st = vec![0u64; self.width * BLOCK_WORDS];
        for (bit, &line) in self.binding.free.iter().enumerate() {
            for w in 0..n_words {
                st[line * BLOCK_WORDS + w] = free_word(bit, first + w as u64);
            }
        }
        let row = |l: usize| l * BLOCK_WORDS..(l + 1) * BLOCK_WORDS;
        let flip = |positive: bool| if positive { 0 } else { !0u64 };
        for op in &self.ops {
            // The common shapes get their own loops, which the compiler vectorizes.
            let mut fire = [!0u64; BLOCK_WORDS];
            match op.controls.as_slice() {
                [] => {}
                [(a, pa)] => {
                    let fa = flip(*pa);
                    for (f, &v) in fire.iter_mut().zip(&st[row(*a)]) {
                        *f = v ^ fa;
                    }
                }
                [(a, pa), (b, pb)] => {
                    let (fa, fb) = (flip(*pa), flip(*pb));
                    let (ra, rb) = (&st[row(*a)], &st[row(*b)]);
                    for ((f, &x), &y) in fire.iter_mut().zip(ra).zip(rb) {
                        *f = (x ^ fa) & (y ^ fb);
                    }
                }
                controls => {
                    for &(c, positive) in controls {
                        let fc = flip(positive);
                        for (f, &v) in fire.iter_mut().zip(&st[row(c)]) {
                            *f &= v ^ fc;
                        }
                    }
                }
            }
            for (v, f) in st[row(op.target)].iter_mut().zip(fire) {
                *v ^= f;
            }
        }
        let valid = if self.states < 64 {
            (1u64 << self.states) - 1
        } else {
            !0
        };
        // Expressions are evaluated once for the whole block.
        let expr_rows: Vec<Vec<u64>> = match &self.model {
            Model::Function { program, .. } => {
                program.run(first, BLOCK_WORDS, &|j, w| free_word(j as usize, w))
            }
            _ => Vec::new(),
        };
        let mut expected = Vec::with_capacity(self.binding.free.len());
        let mut pre = vec![0u64; expr_rows.len()];
        for w in 0..n_words {
            let word = first + w as u64;
            let at = |line: usize| st[line * BLOCK_WORDS + w];
            let mut bad = 0u64;
            for &a in &self.binding.ancillae {
                bad |= at(a);
            }
            for (p, r) in pre.iter_mut().zip(&expr_rows) {
                *p = r[w];
            }
            let care = self.expected_words(word, &mut expected, Some(&pre));
            for (&line, e) in self.binding.free.iter().zip(&expected) {
                bad |= at(line) ^ e;
            }
            bad &= valid & care;
            checked.fetch_add((valid & care).count_ones() as u64, Ordering::Relaxed);
            if bad != 0 {
                return Some(word * 64 + bad.trailing_zeros() as u64);
            }
        }
        None
    }

    /// Expected value of every free line, for the 64 states of word `w`, into
    /// `out`; returns the mask of states inside the op's domain. `pre` holds
    /// each expression output's value on this word when already computed.
    fn expected_words(&self, w: u64, out: &mut Vec<u64>, pre: Option<&[u64]>) -> u64 {
        let nfree = self.binding.free.len();
        out.clear();
        let mut care = !0u64;
        match &self.model {
            Model::Function {
                inputs,
                outputs,
                program,
            } => {
                let n = *inputs;
                out.extend((0..n).map(|b| free_word(b, w)));
                let alone;
                let pre = match pre {
                    Some(p) => p,
                    None => {
                        alone = program
                            .run(w, 1, &|j, w| free_word(j as usize, w))
                            .into_iter()
                            .map(|r| r[0])
                            .collect::<Vec<u64>>();
                        &alone
                    }
                };
                for (k, r) in outputs.iter().enumerate() {
                    let f = match r {
                        Reference::Expr(e) => pre[*e],
                        // x is the low n bits of the state number.
                        Reference::Words(words, len) if *len >= 64 => {
                            words[(w % (*len as u64 / 64)) as usize]
                        }
                        Reference::Words(words, len) => (0..64).fold(0u64, |acc, k| {
                            acc | ((words[0] >> (k % *len as u64)) & 1) << k
                        }),
                    };
                    out.push(free_word(n + k, w) ^ f);
                }
            }
            Model::Permutation { images } => {
                out.resize(nfree, 0);
                for k in 0..64u64 {
                    let s = w * 64 + k;
                    if s >= self.states {
                        break;
                    }
                    let img = images[s as usize];
                    for (j, o) in out.iter_mut().enumerate() {
                        *o |= ((img >> j) & 1) << k;
                    }
                }
            }
            Model::Arithmetic { spec, layout } => {
                out.resize(nfree, 0);
                let mut values = vec![0u64; layout.len()];
                for k in 0..64u64 {
                    let s = w * 64 + k;
                    if s >= self.states {
                        break;
                    }
                    let mut shift = 0;
                    for (v, (_, width)) in values.iter_mut().zip(layout) {
                        *v = (s >> shift) & ((1u64 << width) - 1);
                        shift += width;
                    }
                    match arithmetic_reference(spec, &values) {
                        None => care &= !(1u64 << k),
                        Some(result) => {
                            let mut bit = 0;
                            for (v, (_, width)) in result.iter().zip(layout) {
                                for j in 0..*width {
                                    out[bit] |= ((v >> j) & 1) << k;
                                    bit += 1;
                                }
                            }
                        }
                    }
                }
            }
        }
        care
    }

    /// Re-simulates the failing `state` alone and describes it.
    fn explain(&self, state: u64) -> Counterexample {
        let mut v = vec![false; self.width];
        for (bit, &line) in self.binding.free.iter().enumerate() {
            v[line] = (state >> bit) & 1 == 1;
        }
        let before = v.clone();
        for op in &self.ops {
            if op.controls.iter().all(|&(c, p)| v[c] == p) {
                v[op.target] = !v[op.target];
            }
        }
        let mut word = Vec::new();
        self.expected_words(state / 64, &mut word, None);
        let mut want = vec![false; self.width];
        for (&line, e) in self.binding.free.iter().zip(&word) {
            want[line] = (e >> (state % 64)) & 1 == 1;
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
