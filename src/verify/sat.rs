//! Equivalence by SAT: a miter between the circuit and the spec, Tseitin-encoded
//! and solved by CaDiCaL, for widths past the exhaustive limit.
//!
//! The circuit side encodes each gate as `t' = t XOR AND(controls)` from fresh
//! variables for the free lines and constant 0 for the ancillae. The spec side
//! is the verifier's own encoding of what the lines must hold: an expression
//! tree, a truth table as a multiplexer tree (identical sub-tables shared), or
//! for arithmetic a ripple-carry reference built from full adders. The miter
//! asks for an input on which some free line differs from the spec or some
//! ancilla ends at 1: unsatisfiable proves the circuit correct on every basis
//! state; a model is a counterexample, which is then confirmed by simulating
//! the circuit alone.
//!
//! Before the solver runs, the miter is swept (`sweep.rs`): signals proven
//! equal signal by signal on small cuts, so a ripple structure needs no
//! global solve, and a random pattern that separates circuit and spec is the
//! counterexample. The solver gets what the sweep left, with its equalities.

use super::bind::{bind, Binding};
use super::eval::Compiled;
use super::sweep::{sweep, Def};
use super::{Counterexample, RegisterValue};
use crate::circuit::layout::ANCILLAE;
use crate::circuit::Circuit;
use crate::logic::{Dag, NodeId, Term};
use crate::progress::{Event, Progress, Task};
use crate::spec::{ArithOp, ArithSpec, BigUint, OutputDef, Relation, Spec, SpecBody};
use std::collections::HashMap;
use std::time::Duration;

/// Most inputs a truth table may have to be encoded for SAT.
pub const SAT_MAX_TABLE_INPUTS: usize = 20;

/// What the SAT check found.
#[derive(Debug)]
pub enum SatOutcome {
    /// No input distinguishes circuit and spec.
    Equivalent,
    /// An input where they differ, confirmed by simulation.
    Counterexample(Counterexample),
    /// The solver hit the time budget.
    Timeout,
}

/// Why the SAT check could not be set up.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SatError {
    /// The circuit's registers do not fit the spec.
    #[error("the circuit does not fit the spec: {0}")]
    Binding(String),
    /// The spec has no encoding here.
    #[error("{0}")]
    Unsupported(String),
    /// The model the solver returned did not survive simulation: a bug.
    #[error("internal error: the solver's counterexample was not confirmed by simulation ({0})")]
    Unconfirmed(String),
}

/// When the solver should give up: its time budget, or the caller's stop.
struct Budget<'a> {
    started: std::time::Instant,
    budget: Duration,
    stop: &'a dyn Progress,
}

impl cadical::Callbacks for Budget<'_> {
    fn started(&mut self) {
        self.started = std::time::Instant::now();
    }

    fn terminate(&mut self) -> bool {
        self.started.elapsed() >= self.budget || self.stop.cancelled()
    }
}

struct Cnf<'a> {
    s: cadical::Solver<Budget<'a>>,
    next: i32,
    truth: i32,
    /// How each variable is defined, for the sweep (index 0 unused).
    defs: Vec<Def>,
}

impl<'a> Cnf<'a> {
    fn new(budget: Duration, stop: &'a dyn Progress) -> Self {
        let mut s: cadical::Solver<Budget<'a>> = cadical::Solver::new();
        s.set_callbacks(Some(Budget {
            started: std::time::Instant::now(),
            budget,
            stop,
        }));
        let mut c = Cnf {
            s,
            next: 0,
            truth: 0,
            defs: vec![Def::Free],
        };
        c.truth = c.var();
        c.s.add_clause([c.truth]);
        c
    }
    fn var(&mut self) -> i32 {
        self.next += 1;
        self.defs.push(Def::Free);
        self.next
    }
    fn constant(&self, v: bool) -> i32 {
        if v {
            self.truth
        } else {
            -self.truth
        }
    }
    fn and(&mut self, lits: &[i32]) -> i32 {
        let mut l: Vec<i32> = Vec::with_capacity(lits.len());
        for &x in lits {
            if x == -self.truth {
                return -self.truth;
            }
            if x != self.truth && !l.contains(&x) {
                if l.contains(&-x) {
                    return -self.truth;
                }
                l.push(x);
            }
        }
        match l.len() {
            0 => self.truth,
            1 => l[0],
            _ => {
                let v = self.var();
                let mut long = vec![v];
                for &x in &l {
                    self.s.add_clause([-v, x]);
                    long.push(-x);
                }
                self.s.add_clause(long);
                self.defs[v as usize] = Def::And(l);
                v
            }
        }
    }
    fn or(&mut self, lits: &[i32]) -> i32 {
        let neg: Vec<i32> = lits.iter().map(|x| -x).collect();
        -self.and(&neg)
    }
    fn xor(&mut self, a: i32, b: i32) -> i32 {
        if a == self.truth {
            return -b;
        }
        if a == -self.truth {
            return b;
        }
        if b == self.truth {
            return -a;
        }
        if b == -self.truth {
            return a;
        }
        if a == b {
            return -self.truth;
        }
        if a == -b {
            return self.truth;
        }
        let z = self.var();
        self.s.add_clause([-z, a, b]);
        self.s.add_clause([-z, -a, -b]);
        self.s.add_clause([z, -a, b]);
        self.s.add_clause([z, a, -b]);
        self.defs[z as usize] = Def::Xor(a, b);
        z
    }
    /// The final literal of every line of `c`: `lines[k]` starts as `vars[k]`,
    /// every other line at 0, and each gate is `t' = t XOR AND(controls)`; a
    /// measured uncompute is `t' = 0`, and the literal "its target differs
    /// from the AND of its controls" goes into `unheld`.
    fn circuit(
        &mut self,
        c: &Circuit,
        lines: &[usize],
        vars: &[i32],
        unheld: &mut Vec<i32>,
    ) -> Vec<i32> {
        let mut line: Vec<i32> = vec![-self.truth; c.width()];
        for (&l, &v) in lines.iter().zip(vars) {
            line[l] = v;
        }
        for g in c.gates() {
            let controls: Vec<i32> = g
                .controls()
                .iter()
                .map(|x| {
                    if x.positive {
                        line[x.line.index()]
                    } else {
                        -line[x.line.index()]
                    }
                })
                .collect();
            let fire = self.and(&controls);
            let t = g.target().index();
            let next = self.xor(line[t], fire);
            if g.is_measured() {
                unheld.push(next);
                line[t] = -self.truth;
            } else if g.is_temporary_and() {
                unheld.push(line[t]);
                line[t] = fire;
            } else {
                line[t] = next;
            }
        }
        line
    }

    /// Asks for an assignment where some of `diffs` holds (and every literal of
    /// `assume`). `None`: out of time; `Some(None)`: none exists; otherwise the
    /// values of `free`.
    fn find(&mut self, diffs: &[i32], assume: &[i32], free: &[i32]) -> Option<Option<Vec<bool>>> {
        let miter = self.or(diffs);
        self.s.add_clause([miter]);
        for &d in assume {
            self.s.add_clause([d]);
        }
        match self.s.solve()? {
            false => Some(None),
            true => Some(Some(
                free.iter()
                    .map(|&v| self.s.value(v).unwrap_or(false))
                    .collect(),
            )),
        }
    }

    fn mux(&mut self, sel: i32, one: i32, zero: i32) -> i32 {
        let a = self.and(&[sel, one]);
        let b = self.and(&[-sel, zero]);
        self.or(&[a, b])
    }
    fn maj(&mut self, a: i32, b: i32, c: i32) -> i32 {
        let ab = self.and(&[a, b]);
        let ac = self.and(&[a, c]);
        let bc = self.and(&[b, c]);
        self.or(&[ab, ac, bc])
    }
    /// `x + y + carry_in` over equal widths: (sum bits, carry out).
    fn add(&mut self, x: &[i32], y: &[i32], carry_in: i32) -> (Vec<i32>, i32) {
        let mut c = carry_in;
        let mut sum = Vec::with_capacity(x.len());
        for (&a, &b) in x.iter().zip(y) {
            let ab = self.xor(a, b);
            sum.push(self.xor(ab, c));
            c = self.maj(a, b, c);
        }
        (sum, c)
    }
    /// `x >= y` as the carry out of `x + !y + 1`.
    fn at_least(&mut self, x: &[i32], y: &[i32]) -> i32 {
        let ny: Vec<i32> = y.iter().map(|v| -v).collect();
        let t = self.truth;
        self.add(x, &ny, t).1
    }
    fn equal(&mut self, x: &[i32], y: &[i32]) -> i32 {
        let diffs: Vec<i32> = x.iter().zip(y).map(|(&a, &b)| self.xor(a, b)).collect();
        let any = self.or(&diffs);
        -any
    }
    /// A truth table over `inputs` (bit `i` of `words` is the value on input pattern
    /// `i`) as a multiplexer tree on the top input, identical halves shared.
    fn truth_table(
        &mut self,
        words: &[u64],
        vars: usize,
        inputs: &[i32],
        memo: &mut HashMap<(usize, Vec<u64>), i32>,
    ) -> i32 {
        if vars == 0 {
            return self.constant(words[0] & 1 == 1);
        }
        let key = (vars, words.to_vec());
        if let Some(&l) = memo.get(&key) {
            return l;
        }
        let (lo, hi) = if vars <= 6 {
            let half = 1u32 << (vars - 1);
            let mask = if half == 64 { !0 } else { (1u64 << half) - 1 };
            (vec![words[0] & mask], vec![(words[0] >> half) & mask])
        } else {
            let h = words.len() / 2;
            (words[..h].to_vec(), words[h..].to_vec())
        };
        let l = if lo == hi {
            self.truth_table(&lo, vars - 1, inputs, memo)
        } else {
            let a = self.truth_table(&hi, vars - 1, inputs, memo);
            let b = self.truth_table(&lo, vars - 1, inputs, memo);
            self.mux(inputs[vars - 1], a, b)
        };
        memo.insert(key, l);
        l
    }
    /// The literal of every node of `dag` that `roots` need, in order
    /// (the graph is topological, so one pass suffices); `x` holds the inputs.
    fn dag(&mut self, dag: &Dag, roots: &[NodeId], x: &[i32]) -> Vec<i32> {
        let mut wanted = vec![false; dag.len()];
        for &r in roots {
            wanted[r as usize] = true;
        }
        for v in (0..dag.len()).rev() {
            if wanted[v] {
                let t = dag.term(v as NodeId);
                if let Term::Not(a) = t {
                    wanted[a as usize] = true;
                }
                for &a in dag.operands(&t) {
                    wanted[a as usize] = true;
                }
            }
        }
        let mut lit = vec![0i32; dag.len()];
        for v in 0..dag.len() {
            if !wanted[v] {
                continue;
            }
            let t = dag.term(v as NodeId);
            let ops: Vec<i32> = dag.operands(&t).iter().map(|&a| lit[a as usize]).collect();
            lit[v] = match t {
                Term::Const(b) => self.constant(b),
                Term::Var(j) => x[j as usize],
                Term::Not(a) => -lit[a as usize],
                Term::And(_) => self.and(&ops),
                Term::Or(_) => self.or(&ops),
                Term::Xor(_) => {
                    let mut acc = -self.truth;
                    for l in ops {
                        acc = self.xor(acc, l);
                    }
                    acc
                }
            };
        }
        roots.iter().map(|&r| lit[r as usize]).collect()
    }
}

/// Builds the spec side: expected literal per free line, and constraints on the
/// inputs (the domain of `add_mod`).
fn expected(cnf: &mut Cnf, spec: &Spec, free: &[i32]) -> Result<(Vec<i32>, Vec<i32>), SatError> {
    let mut domain = Vec::new();
    let out = match &spec.body {
        SpecBody::Function(f) => {
            let n = f.inputs.len();
            let x = &free[..n];
            let mut out = x.to_vec();
            let roots: Vec<NodeId> = f
                .outputs
                .iter()
                .filter_map(|o| match o.def {
                    OutputDef::Expr(r) => Some(r),
                    OutputDef::Table(_) => None,
                })
                .collect();
            let mut exprs = cnf.dag(&f.dag, &roots, x).into_iter();
            for (k, o) in f.outputs.iter().enumerate() {
                let v = match &o.def {
                    OutputDef::Expr(_) => exprs.next().expect("one literal per expression output"),
                    OutputDef::Table(t) => {
                        if n > SAT_MAX_TABLE_INPUTS {
                            return Err(SatError::Unsupported(format!(
                                "a truth table of {n} inputs is too large to encode for SAT (at most {SAT_MAX_TABLE_INPUTS})"
                            )));
                        }
                        cnf.truth_table(t.words(), n, x, &mut HashMap::new())
                    }
                };
                let y = free[n + k];
                out.push(cnf.xor(y, v));
            }
            out
        }
        SpecBody::Permutation(p) => {
            let w = p.width();
            if w > SAT_MAX_TABLE_INPUTS {
                return Err(SatError::Unsupported(format!(
                    "a permutation of {w} lines is too large to encode for SAT (at most {SAT_MAX_TABLE_INPUTS})"
                )));
            }
            let mut memo = HashMap::new();
            (0..w)
                .map(|j| {
                    let bit = words_of(w, |i| (p.apply(i) >> j) & 1 == 1);
                    cnf.truth_table(&bit, w, free, &mut memo)
                })
                .collect()
        }
        SpecBody::Arithmetic(a) => arithmetic(cnf, a, free, &mut domain)?,
    };
    if !super::bind::outer_control(spec) {
        return Ok((out, domain));
    }
    // A controlled function or permutation: `ctrl` is the last free line;
    // the map where it is 1, every line as it was where it is 0.
    let ctrl = free[free.len() - 1];
    let mut out: Vec<i32> = out
        .iter()
        .zip(free)
        .map(|(&f, &x)| cnf.mux(ctrl, f, x))
        .collect();
    out.truncate(free.len() - 1);
    out.push(ctrl);
    Ok((out, domain))
}

fn arithmetic(
    cnf: &mut Cnf,
    s: &ArithSpec,
    free: &[i32],
    domain: &mut Vec<i32>,
) -> Result<Vec<i32>, SatError> {
    let w = s.width;
    let base = s.controlled as usize;
    let a: Vec<i32> = free[base..base + w].to_vec();
    let rest = &free[base + w..];
    let zero = BigUint::default();
    let k = s.constant.as_ref().unwrap_or(&zero);
    let f = -cnf.truth;
    let t = cnf.truth;
    let mut result: Vec<i32> = free.to_vec();
    let regs = &mut result[base..];
    let big = |cnf: &Cnf, v: &BigUint, w: usize| -> Vec<i32> {
        (0..w).map(|i| cnf.constant(v.bit(i as u64))).collect()
    };
    let constant = s.constant.is_some();
    let unsupported = |what: &str| {
        Err(SatError::Unsupported(format!(
            "{what}: its miter (a product or chain of products against the circuit's own adders) is beyond what the solver proves in useful time; use the exhaustive route at small widths"
        )))
    };
    match (s.op, &s.modulus) {
        (ArithOp::Add | ArithOp::Subtract, None) => {
            let sub = s.op == ArithOp::Subtract;
            let (target, addend): (Vec<i32>, Vec<i32>) = if constant {
                (a.clone(), big(cnf, k, w))
            } else {
                (rest[..w].to_vec(), a.clone())
            };
            let at = if constant { 0 } else { w };
            if sub {
                let na: Vec<i32> = addend.iter().map(|v| -v).collect();
                let (diff, _) = cnf.add(&target, &na, t);
                regs[at..at + w].copy_from_slice(&diff);
            } else {
                let (sum, c) = cnf.add(&target, &addend, f);
                regs[at..at + w].copy_from_slice(&sum);
                if s.carry_out {
                    regs[at + w] = cnf.xor(free[base + at + w], c);
                }
            }
        }
        (ArithOp::Add | ArithOp::Subtract, Some(n)) => {
            let sub = s.op == ArithOp::Subtract;
            let nb = big(cnf, n, w + 1);
            let widen = |x: &[i32]| -> Vec<i32> { x.iter().copied().chain([f]).collect() };
            let (target, addend, at): (Vec<i32>, Vec<i32>, usize) = if constant {
                (a.clone(), big(cnf, k, w), 0)
            } else {
                (rest[..w].to_vec(), a.clone(), w)
            };
            domain.push(-cnf.at_least(&widen(&target), &nb));
            if !constant {
                domain.push(-cnf.at_least(&widen(&addend), &nb));
            }
            let (t1, a1) = (widen(&target), widen(&addend));
            let r = if sub {
                // t - a, plus n when it went below 0.
                let na: Vec<i32> = a1.iter().map(|v| -v).collect();
                let (diff, no_borrow) = cnf.add(&t1, &na, t);
                let (wrapped, _) = cnf.add(&diff, &nb, f);
                (0..w)
                    .map(|i| cnf.mux(no_borrow, diff[i], wrapped[i]))
                    .collect::<Vec<_>>()
            } else {
                let (sum, _) = cnf.add(&t1, &a1, f);
                let ge = cnf.at_least(&sum, &nb);
                let nn: Vec<i32> = nb.iter().map(|v| -v).collect();
                let (reduced, _) = cnf.add(&sum, &nn, t);
                (0..w)
                    .map(|i| cnf.mux(ge, reduced[i], sum[i]))
                    .collect::<Vec<_>>()
            };
            regs[at..at + w].copy_from_slice(&r);
        }
        (ArithOp::Compare, _) => {
            let (rhs, y) = if constant {
                (big(cnf, k, w), w)
            } else {
                (rest[..w].to_vec(), 2 * w)
            };
            let holds = match s.relation.expect("compare has a relation") {
                Relation::Less => -cnf.at_least(&a, &rhs),
                Relation::GreaterEq => cnf.at_least(&a, &rhs),
                Relation::Greater => -cnf.at_least(&rhs, &a),
                Relation::LessEq => cnf.at_least(&rhs, &a),
                Relation::Equal => cnf.equal(&a, &rhs),
                Relation::NotEqual => -cnf.equal(&a, &rhs),
            };
            regs[y] = cnf.xor(free[base + y], holds);
        }
        (ArithOp::Multiply, None) if constant => {
            // a * c as the sum of a shifted by each set bit of c.
            let m = w + k.bits() as usize;
            let mut sum = vec![f; m];
            for j in 0..k.bits() as usize {
                if k.bit(j as u64) {
                    let shifted: Vec<i32> =
                        (0..m - j).map(|i| if i < w { a[i] } else { f }).collect();
                    let (s2, _) = cnf.add(&sum[j..], &shifted, f);
                    sum[j..].copy_from_slice(&s2);
                }
            }
            for i in 0..m {
                regs[w + i] = cnf.xor(free[base + w + i], sum[i]);
            }
        }
        (ArithOp::Multiply, None) => return unsupported("multiply of two registers"),
        (ArithOp::Multiply, Some(_)) => return unsupported("modular multiply by a constant"),
        (ArithOp::Power, _) => return unsupported("power"),
        (ArithOp::Weight, _) => {
            // The popcount by full and half adders level by level (a running
            // sum, one bit at a time, is a miter the solver did not finish
            // in 120 s at 32 bits).
            let m = rest.len();
            let mut levels: Vec<std::collections::VecDeque<i32>> =
                vec![a.iter().copied().collect()];
            let mut i = 0;
            while i < levels.len() {
                while levels[i].len() >= 2 {
                    let x = levels[i].pop_front().expect("two bits");
                    let y = levels[i].pop_front().expect("two bits");
                    let (sum, carry) = match levels[i].pop_front() {
                        Some(z) => {
                            let xy = cnf.xor(x, y);
                            (cnf.xor(xy, z), cnf.maj(x, y, z))
                        }
                        None => (cnf.xor(x, y), cnf.and(&[x, y])),
                    };
                    levels[i].push_back(sum);
                    if levels.len() == i + 1 {
                        levels.push(Default::default());
                    }
                    levels[i + 1].push_back(carry);
                }
                i += 1;
            }
            for j in 0..m {
                let bit = levels.get(j).and_then(|l| l.front().copied()).unwrap_or(f);
                regs[w + j] = cnf.xor(rest[j], bit);
            }
        }
        (ArithOp::Lookup, _) => {
            if w > SAT_MAX_TABLE_INPUTS {
                return Err(SatError::Unsupported(
                    "lookup address too wide for SAT".into(),
                ));
            }
            let mut memo = HashMap::new();
            for j in 0..s.data_width {
                let bit = words_of(w, |v| (s.data[v as usize] >> j) & 1 == 1);
                let v = cnf.truth_table(&bit, w, &a, &mut memo);
                regs[w + j] = cnf.xor(rest[j], v);
            }
        }
    }
    if s.controlled {
        let ctrl = free[0];
        for i in 1..free.len() {
            result[i] = cnf.mux(ctrl, result[i], free[i]);
        }
    }
    Ok(result)
}

/// Checks `circuit` against `spec` by SAT within `budget`.
pub fn sat_equivalence(
    circuit: &Circuit,
    spec: &Spec,
    budget: Duration,
    stop: &dyn Progress,
) -> Result<SatOutcome, SatError> {
    let binding: Binding = bind(circuit, &super::bind::expected_registers(spec))
        .map_err(|e| SatError::Binding(e.to_string()))?;
    let mut cnf = Cnf::new(budget, stop);
    let free: Vec<i32> = binding.free.iter().map(|_| cnf.var()).collect();
    let (want, domain) = expected(&mut cnf, spec, &free)?;
    let mut unheld = Vec::new();
    let line = cnf.circuit(circuit, &binding.free, &free, &mut unheld);
    let mut diffs: Vec<i32> = binding
        .free
        .iter()
        .zip(&want)
        .map(|(&l, &e)| cnf.xor(line[l], e))
        .collect();
    diffs.extend(binding.ancillae.iter().map(|&a| line[a]));
    diffs.extend(unheld);
    // Sweep first: for structured circuits every difference is usually
    // proven 0 signal by signal, with no global solve at all.
    let started = std::time::Instant::now();
    let merged = sweep(&cnf.defs, cnf.truth, &mut |done, total| {
        stop.event(Event::Stage {
            task: Task::Sweep,
            done,
            total,
        });
        started.elapsed() >= budget || stop.cancelled()
    });
    let swept = cnf.defs.len() as u64;
    stop.event(Event::Stage {
        task: Task::Sweep,
        done: swept,
        total: swept,
    });
    let falsity = -cnf.truth;
    if diffs.iter().all(|&d| merged.resolve(d) == falsity) {
        return Ok(SatOutcome::Equivalent);
    }
    // A random pattern of the sweep that already tells them apart is a
    // counterexample without a solve (confirmed by simulation as any other).
    // Only the solver's model may end in an internal error: a witness
    // that simulation does not confirm falls through to the solver.
    if let Some(input) = merged.witness(&diffs, &domain, &free) {
        if let Ok(found) = confirm(circuit, spec, &binding, &input) {
            return Ok(found);
        }
    }
    for (v, r) in merged.equalities() {
        cnf.s.add_clause([-v, r]);
        cnf.s.add_clause([v, -r]);
    }
    stop.event(Event::Stage {
        task: Task::Solve,
        done: 0,
        total: 0,
    });
    let found = cnf.find(&diffs, &domain, &free);
    stop.event(Event::Stage {
        task: Task::Solve,
        done: 1,
        total: 1,
    });
    match found {
        None => Ok(SatOutcome::Timeout),
        Some(None) => Ok(SatOutcome::Equivalent),
        Some(Some(input)) => confirm(circuit, spec, &binding, &input),
    }
}

/// Simulates the circuit on the solver's input and checks, with plain bit
/// arithmetic, that it really disagrees with the spec.
/// Runs `c` on one basis state, line by line: `lines[k]` starts at `input[k]`,
/// every other line at 0. Returns (lines before, lines after, the first
/// measured uncompute whose target did not hold its AND, described).
fn simulate_bits(
    c: &Circuit,
    lines: &[usize],
    input: &[bool],
) -> (Vec<bool>, Vec<bool>, Option<String>) {
    let mut v = vec![false; c.width()];
    for (&l, &x) in lines.iter().zip(input) {
        v[l] = x;
    }
    let before = v.clone();
    let mut unheld = None;
    for (k, g) in c.gates().iter().enumerate() {
        let fire = g.controls().iter().all(|x| v[x.line.index()] == x.positive);
        let t = g.target().index();
        if g.is_measured() {
            if v[t] != fire && unheld.is_none() {
                let info = &c.lines()[t];
                unheld = Some(format!(
                    "gate {k}, a measured uncompute, finds {}[{}] = {} but the AND of its controls is {}: the ancilla does not hold the AND it uncomputes",
                    info.register, info.index, v[t] as u8, fire as u8
                ));
            }
            v[t] = false;
        } else if g.is_temporary_and() {
            if v[t] && unheld.is_none() {
                let info = &c.lines()[t];
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
    (before, v, unheld)
}

fn confirm(
    circuit: &Circuit,
    spec: &Spec,
    b: &Binding,
    input: &[bool],
) -> Result<SatOutcome, SatError> {
    let (before, v, unheld) = simulate_bits(circuit, &b.free, input);
    let free_in: Vec<bool> = b.free.iter().map(|&l| before[l]).collect();
    let want = reference_bits(spec, &free_in);
    let mut want_lines = vec![false; circuit.width()];
    if let Some(w) = &want {
        for (k, &l) in b.free.iter().enumerate() {
            want_lines[l] = w[k];
        }
    }
    let show = |vals: &[bool]| -> Vec<RegisterValue> {
        b.registers
            .iter()
            .map(|(name, lines)| {
                let bits: Vec<bool> = lines.iter().map(|&l| vals[l]).collect();
                RegisterValue::new(name, &bits)
            })
            .collect()
    };
    let mut problem = unheld;
    if let Some(want) = want.filter(|_| problem.is_none()) {
        for (k, &l) in b.free.iter().enumerate() {
            if v[l] != want[k] {
                let info = &circuit.lines()[l];
                problem = Some(format!(
                    "{}[{}] is {}, expected {}: line differs from the spec",
                    info.register, info.index, v[l] as u8, want[k] as u8
                ));
                break;
            }
        }
    }
    if problem.is_none() {
        if let Some(&a) = b.ancillae.iter().find(|&&a| v[a]) {
            let info = &circuit.lines()[a];
            problem = Some(format!(
                "{}[{}] is 1: ancilla is not returned to 0",
                info.register, info.index
            ));
        }
    }
    match problem {
        Some(problem) => Ok(SatOutcome::Counterexample(Counterexample {
            state: (free_in.len() <= 64).then(|| {
                free_in
                    .iter()
                    .enumerate()
                    .fold(0u64, |s, (i, &x)| s | (x as u64) << i)
            }),
            input: show(&before)
                .into_iter()
                .filter(|r| r.register != ANCILLAE)
                .collect(),
            expected: show(&want_lines),
            actual: show(&v),
            problem,
        })),
        None => Err(SatError::Unconfirmed(
            "simulation matches the spec on the solver's input".into(),
        )),
    }
}

fn bits_to_u64(bits: &[bool]) -> Option<u64> {
    (bits.len() <= 64).then(|| {
        bits.iter()
            .enumerate()
            .fold(0, |v, (i, &b)| v | (b as u64) << i)
    })
}

/// The truth table of `f` over `vars` inputs as little-endian words (bit `i`
/// of the table is `f(i)`).
fn words_of(vars: usize, f: impl Fn(u64) -> bool) -> Vec<u64> {
    let size = 1u64 << vars;
    let mut words = vec![0u64; size.div_ceil(64) as usize];
    for i in 0..size {
        words[(i / 64) as usize] |= (f(i) as u64) << (i % 64);
    }
    words
}

/// The spec's expected value of every free line, by plain bit arithmetic;
/// `None` outside the op's domain.
fn reference_bits(spec: &Spec, free: &[bool]) -> Option<Vec<bool>> {
    if super::bind::outer_control(spec) {
        // `ctrl` last: nothing changes where it is 0.
        let (ctrl, rest) = free.split_last()?;
        if !ctrl {
            return Some(free.to_vec());
        }
        let mut out = reference_plain(spec, rest)?;
        out.truncate(rest.len());
        out.push(true);
        return Some(out);
    }
    reference_plain(spec, free)
}

/// [`reference_bits`] of the map without its control.
fn reference_plain(spec: &Spec, free: &[bool]) -> Option<Vec<bool>> {
    match &spec.body {
        SpecBody::Function(f) => {
            let n = f.inputs.len();
            let mut out = free.to_vec();
            let roots: Vec<NodeId> = f
                .outputs
                .iter()
                .filter_map(|o| match o.def {
                    OutputDef::Expr(r) => Some(r),
                    OutputDef::Table(_) => None,
                })
                .collect();
            let pattern = |j: u32, _: u64| if free[j as usize] { !0 } else { 0 };
            let mut exprs = Compiled::new(&f.dag, &roots)
                .run(0, 1, &pattern)
                .into_iter()
                .map(|r| r[0] & 1 == 1);
            for (k, o) in f.outputs.iter().enumerate() {
                let v = match &o.def {
                    OutputDef::Expr(_) => exprs.next().expect("one value per expression output"),
                    OutputDef::Table(t) => t.get(bits_to_u64(&free[..n])? as usize),
                };
                out[n + k] ^= v;
            }
            Some(out)
        }
        SpecBody::Permutation(p) => {
            let x = bits_to_u64(free)?;
            let img = p.apply(x);
            Some((0..free.len()).map(|j| (img >> j) & 1 == 1).collect())
        }
        SpecBody::Arithmetic(s) => {
            // Register values from the free lines, in layout order.
            let sizes = s.layout().sizes();
            let mut values = Vec::with_capacity(sizes.len());
            let mut at = 0;
            for &(_, size) in &sizes {
                let mut v = BigUint::default();
                for j in 0..size {
                    v.set_bit(j as u64, free[at + j]);
                }
                values.push(v);
                at += size;
            }
            let result = super::reference::big_reference(s, &values)?;
            let mut out = Vec::with_capacity(free.len());
            for (v, &(_, size)) in result.iter().zip(&sizes) {
                out.extend((0..size).map(|j| v.bit(j as u64)));
            }
            Some(out)
        }
    }
}

/// Checks that circuit `a` does what circuit `b` does: on every basis state of
/// their shared registers (every register but `anc`, which must have the same
/// names and sizes in both), with ancillae starting at 0, `a` gives the same
/// values as `b` on those registers and returns its own ancillae to 0.
pub fn circuits_equivalent(
    a: &Circuit,
    b: &Circuit,
    budget: Duration,
) -> Result<SatOutcome, SatError> {
    let regs = |c: &Circuit| -> Vec<(String, usize)> {
        c.registers()
            .into_iter()
            .filter(|(n, _)| n != ANCILLAE)
            .collect()
    };
    let (ra, rb) = (regs(a), regs(b));
    let mut sa = ra.clone();
    let mut sb = rb.clone();
    sa.sort();
    sb.sort();
    if sa != sb {
        return Err(SatError::Binding(format!(
            "the circuits' registers differ: {ra:?} against {rb:?}"
        )));
    }
    let free_a: Vec<usize> = ra
        .iter()
        .flat_map(|(n, _)| a.register(n))
        .map(|l| l.index())
        .collect();
    let free_b: Vec<usize> = ra
        .iter()
        .flat_map(|(n, _)| b.register(n))
        .map(|l| l.index())
        .collect();
    let mut cnf = Cnf::new(budget, &());
    let free: Vec<i32> = free_a.iter().map(|_| cnf.var()).collect();
    let mut unheld = Vec::new();
    let out_a = cnf.circuit(a, &free_a, &free, &mut unheld);
    let out_b = cnf.circuit(b, &free_b, &free, &mut unheld);
    let mut diffs: Vec<i32> = free_a
        .iter()
        .zip(&free_b)
        .map(|(&la, &lb)| cnf.xor(out_a[la], out_b[lb]))
        .collect();
    diffs.extend(a.register(ANCILLAE).iter().map(|l| out_a[l.index()]));
    diffs.extend(unheld);
    match cnf.find(&diffs, &[], &free) {
        None => Ok(SatOutcome::Timeout),
        Some(None) => Ok(SatOutcome::Equivalent),
        Some(Some(input)) => {
            let (before, va, unheld_a) = simulate_bits(a, &free_a, &input);
            let (_, vb, unheld_b) = simulate_bits(b, &free_b, &input);
            let show = |c: &Circuit, vals: &[bool], with_anc: bool| -> Vec<RegisterValue> {
                c.registers()
                    .into_iter()
                    .filter(|(n, _)| with_anc || n != ANCILLAE)
                    .map(|(n, _)| {
                        let bits: Vec<bool> =
                            c.register(&n).iter().map(|l| vals[l.index()]).collect();
                        RegisterValue::new(&n, &bits)
                    })
                    .collect()
            };
            let differing = free_a
                .iter()
                .zip(&free_b)
                .find(|(&la, &lb)| va[la] != vb[lb]);
            let unheld = unheld_a
                .map(|u| format!("in the first circuit, {u}"))
                .or(unheld_b.map(|u| format!("in the second circuit, {u}")));
            let problem = match (unheld, differing) {
                (Some(u), _) => u,
                (None, Some((&la, _))) => {
                    let info = &a.lines()[la];
                    format!(
                        "{}[{}] differs between the circuits",
                        info.register, info.index
                    )
                }
                (None, None) => match a.register(ANCILLAE).iter().find(|l| va[l.index()]) {
                    Some(l) => format!(
                        "anc[{}] is 1: ancilla is not returned to 0",
                        a.lines()[l.index()].index
                    ),
                    None => {
                        return Err(SatError::Unconfirmed(
                            "simulation shows the circuits agree on the solver's input".into(),
                        ))
                    }
                },
            };
            Ok(SatOutcome::Counterexample(Counterexample {
                state: (input.len() <= 64).then(|| {
                    input
                        .iter()
                        .enumerate()
                        .fold(0u64, |s, (i, &x)| s | (x as u64) << i)
                }),
                input: show(a, &before, false),
                expected: show(b, &vb, false),
                actual: show(a, &va, true),
                problem,
            }))
        }
    }
}
