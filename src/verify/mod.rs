//! The independent verifier: exhaustive bit-sliced simulation of every basis state.
//!
//! This module shares no code with synthesis, optimization or lowering. It reads
//! only the circuit's gate list and register names and the spec's data (tables,
//! expressions, images), keeps its own simulator and its own expression evaluator,
//! and binds lines to spec variables by register name, exactly as it would for a
//! circuit read from a file written by anyone.
//!
//! Basis states are numbered by the free lines (inputs and targets): for a
//! function spec, state bit `j < n` is `x[j]` and bit `n + k` is `y[k]`; for a
//! permutation, bit `j` is `x[j]`. Ancillae start at 0. Each machine word holds
//! 64 states; a block of [`BLOCK_WORDS`] words runs through the whole gate list
//! before the next block, and blocks run in parallel.

mod sat;
mod shard;

pub use sat::{circuits_equivalent, sat_equivalence, SatError, SatOutcome, SAT_MAX_TABLE_INPUTS};
pub use shard::{fingerprint, merge_shards, verify_shard, ShardError, ShardResult, SHARD_FORMAT};

use crate::circuit::Circuit;
use crate::logic::Expr;
use crate::spec::{ArithOp, ArithSpec, OutputDef, Spec, SpecBody};
use rayon::prelude::*;
use serde::Serialize;
use std::fmt;
use std::sync::atomic::{AtomicU64, Ordering};

/// Words (of 64 basis states) per block.
pub const BLOCK_WORDS: usize = 64;

/// Default for [`VerifyOptions::max_states`]: 2^30 basis states.
pub const DEFAULT_MAX_STATES: u64 = 1 << 30;

/// How to prove a circuit.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Route {
    /// Exhaustive simulation within `max_states`, SAT past it.
    #[default]
    Auto,
    /// Exhaustive simulation only.
    Exhaustive,
    /// SAT equivalence only.
    Sat,
}

impl Route {
    /// Every route with its user-visible name.
    pub const ALL: [(Route, &'static str); 3] = [
        (Route::Auto, "auto"),
        (Route::Exhaustive, "exhaustive"),
        (Route::Sat, "sat"),
    ];

    /// Looks a route up by name.
    pub fn from_name(name: &str) -> Option<Route> {
        Route::ALL.iter().find(|(_, n)| *n == name).map(|(r, _)| *r)
    }
}

/// Default for [`VerifyOptions::sat_seconds`].
pub const DEFAULT_SAT_SECONDS: f64 = 300.0;

/// Options of a verification run.
#[derive(Clone, Copy, Debug)]
pub struct VerifyOptions {
    /// The most basis states to simulate; past it the run is refused or goes to
    /// SAT (`--max-states`).
    pub max_states: u64,
    /// Which proof to use.
    pub route: Route,
    /// Seconds the SAT solver may take (`--sat-seconds`).
    pub sat_seconds: f64,
}

impl Default for VerifyOptions {
    fn default() -> Self {
        VerifyOptions {
            max_states: DEFAULT_MAX_STATES,
            route: Route::Auto,
            sat_seconds: DEFAULT_SAT_SECONDS,
        }
    }
}

/// The value of one register in a counterexample.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct RegisterValue {
    /// Register name.
    pub register: String,
    /// Bits, most significant first, as `0b...`.
    pub bits: String,
    /// The value as an integer when it fits in 64 bits.
    pub value: Option<u64>,
}

impl RegisterValue {
    fn new(register: &str, bits: &[bool]) -> Self {
        let text: String = bits
            .iter()
            .rev()
            .map(|&b| if b { '1' } else { '0' })
            .collect();
        let value = (bits.len() <= 64).then(|| {
            bits.iter()
                .enumerate()
                .fold(0u64, |v, (i, &b)| v | (b as u64) << i)
        });
        RegisterValue {
            register: register.to_string(),
            bits: format!("0b{text}"),
            value,
        }
    }
}

impl fmt::Display for RegisterValue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.value {
            Some(v) => write!(f, "{}={} ({})", self.register, v, self.bits),
            None => write!(f, "{}={}", self.register, self.bits),
        }
    }
}

/// One basis state on which the circuit does not do what the spec says.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct Counterexample {
    /// The basis state's number (see the module docs for the bit order), when
    /// it fits in 64 bits.
    pub state: Option<u64>,
    /// The registers going in.
    pub input: Vec<RegisterValue>,
    /// The registers the spec asks for coming out.
    pub expected: Vec<RegisterValue>,
    /// The registers the circuit gives.
    pub actual: Vec<RegisterValue>,
    /// The first line that differs, in words.
    pub problem: String,
}

impl fmt::Display for Counterexample {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let join = |v: &[RegisterValue]| {
            v.iter()
                .map(|r| r.to_string())
                .collect::<Vec<_>>()
                .join(" ")
        };
        writeln!(f, "input    {}", join(&self.input))?;
        writeln!(f, "expected {}", join(&self.expected))?;
        writeln!(f, "actual   {}", join(&self.actual))?;
        write!(f, "{}", self.problem)
    }
}

/// The outcome of a verification that ran.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(tag = "verdict", rename_all = "lowercase")]
pub enum Verdict {
    /// Every basis state checked and correct.
    Proven {
        /// `exhaustive` or `sat`.
        by: &'static str,
        /// Free lines (inputs and targets): the proof covers `2^free_bits` states.
        free_bits: u32,
        /// How many basis states were simulated and checked (0 for SAT).
        states: u64,
        /// Basis states outside the op's domain (inputs at or above the
        /// modulus of `add_mod`), simulated but not checked.
        #[serde(skip_serializing_if = "is_zero")]
        outside_domain: u64,
    },
    /// A basis state where the circuit is wrong.
    Refuted {
        /// The first failing state found.
        counterexample: Box<Counterexample>,
    },
}

impl Verdict {
    /// One line for people: how much was proven, or that it was refuted.
    pub fn summary(&self) -> String {
        match self {
            Verdict::Proven {
                by: "sat",
                free_bits,
                ..
            } => format!("verified by SAT equivalence on all 2^{free_bits} basis states"),
            Verdict::Proven {
                states,
                outside_domain: 0,
                ..
            } => format!("verified on all {states} basis states"),
            Verdict::Proven {
                states,
                outside_domain,
                ..
            } => format!(
                "verified on all {states} basis states of the domain ({outside_domain} outside it, where the op promises nothing)"
            ),
            Verdict::Refuted { counterexample } => match counterexample.state {
                Some(s) => format!("refuted on basis state {s}"),
                None => "refuted".to_string(),
            },
        }
    }
}

fn is_zero(v: &u64) -> bool {
    *v == 0
}

/// Why a verification could not run.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum VerifyError {
    /// Too many basis states for the exhaustive check.
    #[error("exhaustive verification needs 2^{bits} basis states, over the limit of {limit}; raise it with --max-states, or write the circuit unproven with --no-verify (nothing was verified)")]
    TooLarge {
        /// Free lines, so `2^bits` states.
        bits: u32,
        /// The limit in force.
        limit: u64,
    },
    /// The circuit's registers do not fit the spec.
    #[error("the circuit does not fit the spec: {0}")]
    Binding(String),
    /// The SAT solver ran out of time.
    #[error("the SAT check did not finish within {0} s; raise it with --sat-seconds (nothing was verified)")]
    SatTimeout(f64),
    /// SAT cannot encode this spec or confirm its answer.
    #[error(transparent)]
    Sat(#[from] SatError),
}

impl VerifyError {
    /// True when a resource limit, not the input, stopped the check.
    pub fn is_limit(&self) -> bool {
        matches!(
            self,
            VerifyError::TooLarge { .. } | VerifyError::SatTimeout(_)
        )
    }
}

/// One output's reference.
enum Reference<'a> {
    Words(&'a [u64], usize),
    Expr(&'a Expr),
}

/// What to compare each line against.
enum Model<'a> {
    Function {
        inputs: usize,
        outputs: Vec<Reference<'a>>,
    },
    Permutation {
        images: &'a [u64],
    },
    Arithmetic {
        spec: &'a ArithSpec,
        /// (register, width) in state-bit order.
        layout: Vec<(&'static str, usize)>,
    },
}

/// The registers of an arithmetic op, in OpenQASM order, as the spec contract states them.
fn arithmetic_layout(s: &ArithSpec) -> Vec<(&'static str, usize)> {
    let w = s.width;
    let mut l = Vec::new();
    if s.controlled {
        l.push(("ctrl", 1));
    }
    l.push(("a", w));
    match s.op {
        ArithOp::Add | ArithOp::Sub | ArithOp::AddMod | ArithOp::LessThan => l.push(("b", w)),
        _ => {}
    }
    match s.op {
        ArithOp::LessThan | ArithOp::LessThanConst | ArithOp::EqualConst => l.push(("y", 1)),
        ArithOp::Lookup => l.push(("y", s.data_width)),
        ArithOp::Add if s.carry_out => l.push(("cout", 1)),
        _ => {}
    }
    l
}

/// The op on register values: `None` when the input is outside the op's domain.
/// Values are in layout order; registers are at most 62 bits wide here.
fn arithmetic_reference(s: &ArithSpec, v: &[u64]) -> Option<Vec<u64>> {
    let mut out = v.to_vec();
    let (ctrl, base) = if s.controlled {
        (v[0] == 1, 1)
    } else {
        (true, 0)
    };
    let w = s.width as u32;
    let mask = |x: u128| (x & ((1u128 << w) - 1)) as u64;
    let k = s.constant.unwrap_or(0) as u128;
    let n = s.modulus.unwrap_or(1) as u128;
    let a = v[base] as u128;
    if s.op == ArithOp::AddMod && (a >= n || v[base + 1] as u128 >= n) {
        return None;
    }
    if !ctrl {
        return Some(out);
    }
    match s.op {
        ArithOp::Add => {
            let b = v[base + 1] as u128;
            out[base + 1] = mask(a + b);
            if s.carry_out {
                out[base + 2] ^= ((a + b) >> w) as u64;
            }
        }
        ArithOp::Sub => {
            let b = v[base + 1] as u128;
            out[base + 1] = mask(b + (1u128 << w) - a);
        }
        ArithOp::AddConst => out[base] = mask(a + k),
        ArithOp::LessThan => out[base + 2] ^= (a < v[base + 1] as u128) as u64,
        ArithOp::LessThanConst => out[base + 1] ^= (a < k) as u64,
        ArithOp::EqualConst => out[base + 1] ^= (a == k) as u64,
        ArithOp::IncrementMod => {
            if a < n {
                out[base] = ((a + 1) % n) as u64;
            }
        }
        ArithOp::AddMod => out[base + 1] = ((a + v[base + 1] as u128) % n) as u64,
        ArithOp::Lookup => out[base + 1] ^= s.data[a as usize],
    }
    Some(out)
}

/// Gate in the verifier's own form: controls as (line, fire-on-1) pairs.
struct Op {
    target: usize,
    controls: Vec<(usize, bool)>,
}

struct Binding {
    /// Circuit line of each free state bit.
    free: Vec<usize>,
    /// Lines that must end at 0.
    ancillae: Vec<usize>,
    /// (register, lines in index order) for reports.
    registers: Vec<(String, Vec<usize>)>,
}

fn bind(circuit: &Circuit, expect: &[(&str, usize)]) -> Result<Binding, VerifyError> {
    let mut free = Vec::new();
    let mut registers = Vec::new();
    let known: Vec<&str> = expect.iter().map(|(n, _)| *n).collect();
    for (name, size) in expect {
        let lines: Vec<usize> = circuit.register(name).iter().map(|l| l.index()).collect();
        if lines.len() != *size {
            return Err(VerifyError::Binding(format!(
                "register '{name}' should have {size} lines, it has {}",
                lines.len()
            )));
        }
        free.extend(&lines);
        registers.push((name.to_string(), lines));
    }
    let mut ancillae = Vec::new();
    for (name, _) in circuit.registers() {
        if known.contains(&name.as_str()) {
            continue;
        }
        if name != "anc" {
            return Err(VerifyError::Binding(format!(
                "register '{name}' is neither one of {} nor the ancilla register 'anc'",
                known.join(", ")
            )));
        }
        let lines: Vec<usize> = circuit.register(&name).iter().map(|l| l.index()).collect();
        ancillae.extend(&lines);
        registers.push((name, lines));
    }
    Ok(Binding {
        free,
        ancillae,
        registers,
    })
}

/// Proves or refutes that `circuit` realizes `spec` on every basis state.
pub fn verify(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
) -> Result<Verdict, VerifyError> {
    verify_with_progress(circuit, spec, opts, &|_, _| {})
}

/// [`verify`], calling `progress(states done, states in all)` as blocks finish
/// (from several threads; the calls are not ordered).
pub fn verify_with_progress(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> Result<Verdict, VerifyError> {
    let free_bits = free_lines(circuit, spec)?;
    let fits = free_bits < 63 && (1u64 << free_bits) <= opts.max_states;
    let use_sat = match opts.route {
        Route::Sat => true,
        Route::Exhaustive => false,
        Route::Auto => !fits,
    };
    if !use_sat {
        let words = if free_bits < 63 {
            (1u64 << free_bits).div_ceil(64)
        } else {
            u64::MAX
        };
        return verify_words(circuit, spec, opts, progress, 0, words);
    }
    let budget = std::time::Duration::from_secs_f64(opts.sat_seconds.max(0.0));
    match sat_equivalence(circuit, spec, budget) {
        Ok(SatOutcome::Equivalent) => Ok(Verdict::Proven {
            by: "sat",
            free_bits,
            states: 0,
            outside_domain: 0,
        }),
        Ok(SatOutcome::Counterexample(c)) => Ok(Verdict::Refuted {
            counterexample: Box::new(c),
        }),
        Ok(SatOutcome::Timeout) => Err(VerifyError::SatTimeout(opts.sat_seconds)),
        Err(SatError::Unsupported(why)) if opts.route == Route::Auto => {
            let _ = why;
            Err(VerifyError::TooLarge {
                bits: free_bits,
                limit: opts.max_states,
            })
        }
        Err(e) => Err(e.into()),
    }
}

/// The register layout a spec asks of a circuit.
fn layout_of(spec: &Spec) -> Vec<(&'static str, usize)> {
    match &spec.body {
        SpecBody::Function(f) => vec![("x", f.inputs.len()), ("y", f.outputs.len())],
        SpecBody::Permutation(p) => vec![("x", p.width())],
        SpecBody::Arithmetic(a) => arithmetic_layout(a),
    }
}

/// Number of free lines (inputs and targets) once the circuit is bound to the spec.
pub fn free_lines(circuit: &Circuit, spec: &Spec) -> Result<u32, VerifyError> {
    Ok(bind(circuit, &layout_of(spec))?.free.len() as u32)
}

/// Exhaustive check of the words `[first, end)` of the state space (64 states a word).
fn verify_words(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
    first: u64,
    end: u64,
) -> Result<Verdict, VerifyError> {
    let (binding, model) = match &spec.body {
        SpecBody::Function(f) => {
            let b = bind(circuit, &[("x", f.inputs.len()), ("y", f.outputs.len())])?;
            let outputs = f
                .outputs
                .iter()
                .map(|o| match &o.def {
                    OutputDef::Table(t) => Reference::Words(t.words(), t.len()),
                    OutputDef::Expr(e) => Reference::Expr(e),
                })
                .collect();
            (
                b,
                Model::Function {
                    inputs: f.inputs.len(),
                    outputs,
                },
            )
        }
        SpecBody::Permutation(p) => (
            bind(circuit, &[("x", p.width())])?,
            Model::Permutation { images: p.images() },
        ),
        SpecBody::Arithmetic(a) => {
            let layout = arithmetic_layout(a);
            (
                bind(circuit, &layout)?,
                Model::Arithmetic { spec: a, layout },
            )
        }
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
        progress((d + 64 * BLOCK_WORDS as u64).min(span), span);
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

fn eval(e: &Expr, x: &dyn Fn(usize) -> u64) -> u64 {
    match e {
        Expr::Const(true) => !0,
        Expr::Const(false) => 0,
        Expr::Var(j) => x(*j),
        Expr::Not(a) => !eval(a, x),
        Expr::And(v) => v.iter().map(|a| eval(a, x)).fold(!0, |p, q| p & q),
        Expr::Xor(v) => v.iter().map(|a| eval(a, x)).fold(0, |p, q| p ^ q),
        Expr::Or(v) => v.iter().map(|a| eval(a, x)).fold(0, |p, q| p | q),
    }
}

/// [`eval`] over a block of words at once. Literal children of a gate node are
/// folded in straight from the input rows, without a temporary row.
fn eval_block(e: &Expr, x: &[[u64; BLOCK_WORDS]]) -> [u64; BLOCK_WORDS] {
    fn fold(
        v: &[Expr],
        x: &[[u64; BLOCK_WORDS]],
        init: u64,
        op: impl Fn(u64, u64) -> u64,
    ) -> [u64; BLOCK_WORDS] {
        let mut r = [init; BLOCK_WORDS];
        for a in v {
            match a {
                Expr::Var(j) => {
                    for (p, &q) in r.iter_mut().zip(&x[*j]) {
                        *p = op(*p, q);
                    }
                }
                Expr::Not(inner) if matches!(**inner, Expr::Var(_)) => {
                    let Expr::Var(j) = **inner else {
                        unreachable!()
                    };
                    for (p, &q) in r.iter_mut().zip(&x[j]) {
                        *p = op(*p, !q);
                    }
                }
                _ => {
                    let t = eval_block(a, x);
                    for (p, q) in r.iter_mut().zip(t) {
                        *p = op(*p, q);
                    }
                }
            }
        }
        r
    }
    match e {
        Expr::Const(b) => [if *b { !0 } else { 0 }; BLOCK_WORDS],
        Expr::Var(j) => x[*j],
        Expr::Not(a) => eval_block(a, x).map(|v| !v),
        Expr::And(v) => fold(v, x, !0, |p, q| p & q),
        Expr::Xor(v) => fold(v, x, 0, |p, q| p ^ q),
        Expr::Or(v) => fold(v, x, 0, |p, q| p | q),
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
        // Expressions are evaluated once for the whole block, row by row.
        let expr_rows: Vec<Option<Box<[u64; BLOCK_WORDS]>>> = match &self.model {
            Model::Function { inputs, outputs } => {
                let x: Vec<[u64; BLOCK_WORDS]> = (0..*inputs)
                    .map(|j| std::array::from_fn(|w| free_word(j, first + w as u64)))
                    .collect();
                outputs
                    .iter()
                    .map(|r| match r {
                        Reference::Expr(e) => Some(Box::new(eval_block(e, &x))),
                        Reference::Words(..) => None,
                    })
                    .collect()
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
                *p = r.as_ref().map_or(0, |r| r[w]);
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
            Model::Function { inputs, outputs } => {
                let n = *inputs;
                out.extend((0..n).map(|b| free_word(b, w)));
                for (k, r) in outputs.iter().enumerate() {
                    let f = match r {
                        Reference::Expr(e) => match pre {
                            Some(p) => p[k],
                            None => eval(e, &|j| free_word(j, w)),
                        },
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
                .filter(|r| r.register != "anc")
                .collect(),
            expected: show(&want),
            actual: show(&v),
            problem,
        }
    }
}
