//! A circuit builder for arithmetic: ancilla allocation, literals with polarity,
//! majority and AND gadgets, and the split between scaffold and effect gates.
//!
//! Scaffold gates compute and later uncompute temporary values (carries into
//! ancillae, NOT conjugations); without the effect gates between them they
//! compose to the identity. Effect gates change the registers for good. A
//! controlled op adds its control to the effect gates only, which is correct
//! whenever the scaffold's inputs are left alone by the effects (each generator
//! keeps to that; the verifier checks it).

use crate::circuit::{Circuit, Control, Gate, Line, LineInfo};

/// A bit known when the circuit is built (a constant) or held on a line,
/// possibly negated.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Bit {
    /// Always 0.
    Zero,
    /// Always 1.
    One,
    /// The value of `line`, XOR `neg`.
    Lit {
        /// The line.
        line: Line,
        /// Whether the value is the line's complement.
        neg: bool,
    },
}

impl Bit {
    /// The plain value of a line.
    pub fn of(line: Line) -> Bit {
        Bit::Lit { line, neg: false }
    }

    /// A constant.
    pub fn constant(v: bool) -> Bit {
        if v {
            Bit::One
        } else {
            Bit::Zero
        }
    }

    /// The complement.
    pub fn not(self) -> Bit {
        match self {
            Bit::Zero => Bit::One,
            Bit::One => Bit::Zero,
            Bit::Lit { line, neg } => Bit::Lit { line, neg: !neg },
        }
    }

    fn control(self) -> Option<Control> {
        match self {
            Bit::Lit { line, neg } => Some(Control {
                line,
                positive: !neg,
            }),
            _ => None,
        }
    }
}

/// A temporary value computed by scaffold gates `[start, end)` of the circuit,
/// held in `ancilla` if it needed one.
pub struct Temp {
    /// The value.
    pub bit: Bit,
    start: Mark,
    end: Mark,
    ancilla: Option<Line>,
}

/// A place in the gate sequence: the gate index, and in counting mode the
/// running tally, so that undoing a stretch adds its counts without the gates.
#[derive(Clone, Copy, Debug)]
pub struct Mark {
    index: usize,
    tally: Tally,
}

/// Gate counts of a stream of MCT gates, lowered gate by gate as
/// [`crate::lower`] does (a `k >= 3`-control gate becomes `2k - 3` Toffolis),
/// before lowering's pair-cancelling pass.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct Tally {
    /// MCT gates before lowering.
    pub gates: u64,
    /// Gates before lowering with 0, 1, 2 and 3 or more controls.
    pub by_controls: [u64; 4],
    /// Toffolis after lowering, before pair cancellation (an upper bound on
    /// the built circuit's count).
    pub toffoli: u64,
    /// The most controls of one gate.
    pub max_controls: usize,
}

impl Tally {
    /// Counts one gate.
    pub(super) fn add(&mut self, g: &Gate) {
        let k = g.controls().len();
        self.gates += 1;
        self.by_controls[k.min(3)] += 1;
        self.toffoli += match k {
            0 | 1 => 0,
            k => 2 * k as u64 - 3,
        };
        self.max_controls = self.max_controls.max(k);
    }

    /// Counts `count` gates of `k` controls each.
    fn add_many(&mut self, k: usize, count: u64) {
        if count == 0 {
            return;
        }
        self.gates += count;
        self.by_controls[k.min(3)] += count;
        self.toffoli += count
            * match k {
                0 | 1 => 0,
                k => 2 * k as u64 - 3,
            };
        self.max_controls = self.max_controls.max(k);
    }

    fn since(&mut self, start: &Tally, end: &Tally) {
        self.gates += end.gates - start.gates;
        for i in 0..4 {
            self.by_controls[i] += end.by_controls[i] - start.by_controls[i];
        }
        self.toffoli += end.toffoli - start.toffoli;
    }
}

/// Builds a circuit gate by gate, or (counting) tallies the gates and keeps none.
pub struct Builder {
    circuit: Circuit,
    ctrl: Option<Line>,
    free: Vec<Line>,
    counting: Option<Tally>,
    measure: bool,
}

impl Builder {
    /// A builder on `lines`; `ctrl`, if given, is added to every effect gate.
    pub fn new(lines: Vec<LineInfo>, ctrl: Option<Line>) -> Self {
        Builder {
            circuit: Circuit::new(lines),
            ctrl,
            free: Vec::new(),
            counting: None,
            measure: false,
        }
    }

    /// A builder that keeps no gates, only their tally: the streaming count.
    pub fn counting(lines: Vec<LineInfo>) -> Self {
        Builder {
            counting: Some(Tally::default()),
            ..Builder::new(lines, None)
        }
    }

    /// The tally of a counting builder, and its lines (ancillae included,
    /// the lowering pool not).
    pub fn tally(&self) -> (Tally, usize) {
        (self.counting.unwrap_or_default(), self.circuit.width())
    }

    fn push(&mut self, g: Gate) {
        match &mut self.counting {
            Some(t) => t.add(&g),
            None => self.circuit.push(g),
        }
    }

    /// Whether this builder only counts.
    pub fn is_counting(&self) -> bool {
        self.counting.is_some()
    }

    /// Counting only: adds the tally of the gates `[start, end)` once more,
    /// for a stretch the generator would emit again identically up to line
    /// names (the caller checks that it is counting).
    pub fn repeat_count(&mut self, start: Mark, end: Mark) {
        if let Some(t) = &mut self.counting {
            t.since(&start.tally, &end.tally);
        }
    }

    /// Scaffold gates `y[i] ^= p` for every set bit `i` of `word` (`p` a
    /// literal or `One`); counting, the gates are tallied in bulk.
    pub fn xor_word(&mut self, p: Bit, y: &[Line], word: &num_bigint::BigUint) {
        if let Some(t) = &mut self.counting {
            let ones = word.count_ones();
            match p {
                Bit::Zero => {}
                Bit::One => t.add_many(0, ones),
                Bit::Lit { neg, .. } => {
                    t.add_many(1, ones);
                    if neg {
                        t.add_many(0, ones);
                    }
                }
            }
            return;
        }
        for (i, &l) in y.iter().enumerate() {
            if word.bit(i as u64) {
                self.xor_into(l, p, false);
            }
        }
    }

    /// The finished circuit.
    pub fn finish(self) -> Circuit {
        self.circuit
    }

    /// Sets the line that effect gates from now on are controlled by.
    pub fn set_ctrl(&mut self, ctrl: Option<Line>) {
        self.ctrl = ctrl;
    }

    /// The line that effect gates are controlled by now.
    pub fn ctrl(&self) -> Option<Line> {
        self.ctrl
    }

    /// Builds with temporary ANDs and measured uncomputes where a generator
    /// has such a form (`--uncompute measure`).
    pub fn set_measure(&mut self, on: bool) {
        self.measure = on;
    }

    /// Whether the generators use their measured forms.
    pub fn measure(&self) -> bool {
        self.measure
    }

    /// A clean ancilla (reused when one was released).
    pub fn ancilla(&mut self) -> Line {
        if let Some(l) = self.free.pop() {
            return l;
        }
        self.circuit.add_ancilla()
    }

    /// Returns an ancilla that is back at 0.
    pub fn release(&mut self, line: Line) {
        self.free.push(line);
    }

    /// The place after the gates so far.
    pub fn mark(&self) -> Mark {
        Mark {
            index: self.circuit.gates().len(),
            tally: self.counting.unwrap_or_default(),
        }
    }

    /// A gate that is undone later (never controlled).
    pub fn scaffold(&mut self, g: Gate) {
        self.push(g);
    }

    /// A gate that changes a register for good (controlled when the op is).
    pub fn effect(&mut self, g: Gate) {
        match self.ctrl {
            Some(c) => {
                let mut controls = g.controls().to_vec();
                controls.push(Control::pos(c.0));
                let g =
                    Gate::new(controls, g.target()).expect("the control line is its own register");
                self.push(g);
            }
            None => self.push(g),
        }
    }

    fn emit(&mut self, g: Gate, effect: bool) {
        if effect {
            self.effect(g)
        } else {
            self.scaffold(g)
        }
    }

    /// Reverses the order of the gates since `start`, each replaced by its
    /// inverse (a flip is its own; a temporary AND and a measured uncompute
    /// are each other's), so the part becomes its inverse.
    /// (Counting, the order does not change the tally.)
    pub fn reverse_from(&mut self, start: Mark) {
        if self.counting.is_some() {
            return;
        }
        let mut gates = self.circuit.gates().to_vec();
        gates[start.index..].reverse();
        for g in &mut gates[start.index..] {
            *g = g.inverse();
        }
        self.circuit.set_gates(gates);
    }

    /// Replays scaffold gates `[start, end)` backwards, undoing them
    /// (counting, adds their tally again).
    pub fn undo(&mut self, start: Mark, end: Mark) {
        if let Some(t) = &mut self.counting {
            t.since(&start.tally, &end.tally);
            return;
        }
        let gates: Vec<Gate> = self.circuit.gates()[start.index..end.index].to_vec();
        for g in gates.into_iter().rev() {
            self.circuit.push(g.inverse());
        }
    }

    /// Undoes a temporary value and frees its ancilla.
    pub fn undo_temp(&mut self, t: Temp) {
        self.undo(t.start, t.end);
        if let Some(a) = t.ancilla {
            self.release(a);
        }
    }

    /// `target ^= bit`.
    pub fn xor_into(&mut self, target: Line, bit: Bit, effect: bool) {
        match bit {
            Bit::Zero => {}
            Bit::One => self.emit(Gate::not(target.0), effect),
            Bit::Lit { line, neg } => {
                self.emit(Gate::cnot(line.0, target.0), effect);
                if neg {
                    self.emit(Gate::not(target.0), effect);
                }
            }
        }
    }

    /// `target ^= p ^ q` as effect gates. Under a control, two literals are
    /// first folded onto one line (undone after) so that one Toffoli does the work
    /// of two.
    pub fn xor2_into(&mut self, target: Line, p: Bit, q: Bit) {
        match (p, q, self.ctrl) {
            (Bit::Lit { line: pl, neg: pn }, Bit::Lit { line: ql, neg: qn }, Some(c))
                if pl != ql && ql != c && pl != target && ql != target =>
            {
                self.scaffold(Gate::cnot(pl.0, ql.0));
                self.xor_into(
                    target,
                    Bit::Lit {
                        line: ql,
                        neg: pn != qn,
                    },
                    true,
                );
                self.scaffold(Gate::cnot(pl.0, ql.0));
            }
            _ => {
                self.xor_into(target, p, true);
                self.xor_into(target, q, true);
            }
        }
    }

    /// `target ^= x & y`.
    pub fn and_into(&mut self, target: Line, x: Bit, y: Bit, effect: bool) {
        match (x, y) {
            (Bit::Zero, _) | (_, Bit::Zero) => {}
            (Bit::One, b) | (b, Bit::One) => self.xor_into(target, b, effect),
            (Bit::Lit { line: l1, neg: n1 }, Bit::Lit { line: l2, neg: n2 }) if l1 == l2 => {
                if n1 == n2 {
                    self.xor_into(target, x, effect)
                }
            }
            _ => {
                let controls = vec![x.control().expect("literal"), y.control().expect("literal")];
                let g = Gate::new(controls, target).expect("target differs from the operands");
                self.emit(g, effect);
            }
        }
    }

    /// `target ^= maj(p, q, r)`.
    pub fn maj_into(&mut self, target: Line, p: Bit, q: Bit, r: Bit, effect: bool) {
        match reduce_majority(p, q, r) {
            Majority::Const(v) => self.xor_into(target, Bit::constant(v), effect),
            Majority::Copy(b) => self.xor_into(target, b, effect),
            Majority::And(x, y) => self.and_into(target, x, y, effect),
            Majority::Or(x, y) => {
                // x | y = 1 ^ (!x & !y)
                self.xor_into(target, Bit::One, effect);
                self.and_into(target, x.not(), y.not(), effect);
            }
            Majority::Three(p, q, r) => {
                // maj(p, q, r) = (p ^ r)(q ^ r) ^ r: fold r into p and q, one Toffoli, unfold.
                let (
                    Bit::Lit { line: pl, neg: pn },
                    Bit::Lit { line: ql, neg: qn },
                    Bit::Lit { line: rl, neg: rn },
                ) = (p, q, r)
                else {
                    unreachable!("three literals")
                };
                self.scaffold(Gate::cnot(rl.0, pl.0));
                self.scaffold(Gate::cnot(rl.0, ql.0));
                let controls = vec![
                    Control {
                        line: pl,
                        positive: pn == rn,
                    },
                    Control {
                        line: ql,
                        positive: qn == rn,
                    },
                ];
                self.emit(Gate::new(controls, target).expect("distinct lines"), effect);
                self.xor_into(target, r, effect);
                self.scaffold(Gate::cnot(rl.0, ql.0));
                self.scaffold(Gate::cnot(rl.0, pl.0));
            }
        }
    }

    /// Computes `maj(p, q, r)` as a temporary value, using an ancilla only when
    /// the value is not a constant or a literal already on a line.
    pub fn maj_temp(&mut self, p: Bit, q: Bit, r: Bit) -> Temp {
        let start = self.mark();
        let m = reduce_majority(p, q, r);
        let (bit, ancilla) = match m {
            Majority::Const(v) => (Bit::constant(v), None),
            Majority::Copy(b) => (b, None),
            Majority::And(x, y) => {
                let a = self.ancilla();
                self.and_into(a, x, y, false);
                (Bit::of(a), Some(a))
            }
            Majority::Or(x, y) => {
                // x | y = !(!x & !y): keep the AND and remember the negation.
                let a = self.ancilla();
                self.and_into(a, x.not(), y.not(), false);
                (Bit::Lit { line: a, neg: true }, Some(a))
            }
            Majority::Three(p, q, r) => {
                let a = self.ancilla();
                self.maj_into(a, p, q, r, false);
                (Bit::of(a), Some(a))
            }
        };
        Temp {
            bit,
            start,
            end: self.mark(),
            ancilla,
        }
    }
}

/// The majority of three bits, simplified.
#[derive(Clone, Copy, Debug)]
enum Majority {
    Const(bool),
    Copy(Bit),
    And(Bit, Bit),
    Or(Bit, Bit),
    Three(Bit, Bit, Bit),
}

fn reduce_majority(p: Bit, q: Bit, r: Bit) -> Majority {
    let bits = [p, q, r];
    let zeros = bits.iter().filter(|b| **b == Bit::Zero).count();
    let ones = bits.iter().filter(|b| **b == Bit::One).count();
    let lits: Vec<Bit> = bits
        .iter()
        .copied()
        .filter(|b| matches!(b, Bit::Lit { .. }))
        .collect();
    if zeros >= 2 {
        return Majority::Const(false);
    }
    if ones >= 2 {
        return Majority::Const(true);
    }
    if zeros == 1 && ones == 1 {
        return Majority::Copy(lits[0]);
    }
    // Two literals on one line: equal ones decide, opposite ones leave the third.
    for i in 0..lits.len() {
        for j in i + 1..lits.len() {
            if let (Bit::Lit { line: a, neg: na }, Bit::Lit { line: b, neg: nb }) =
                (lits[i], lits[j])
            {
                if a == b {
                    if na == nb {
                        return Majority::Copy(lits[i]);
                    }
                    let rest: Vec<Bit> = bits
                        .iter()
                        .copied()
                        .filter(|x| *x != lits[i] && *x != lits[j])
                        .collect();
                    return match rest.first() {
                        Some(Bit::Zero) => Majority::Const(false),
                        Some(Bit::One) => Majority::Const(true),
                        Some(b) => Majority::Copy(*b),
                        None => Majority::Const(false),
                    };
                }
            }
        }
    }
    match (zeros, ones) {
        (1, 0) => Majority::And(lits[0], lits[1]),
        (0, 1) => Majority::Or(lits[0], lits[1]),
        _ => Majority::Three(lits[0], lits[1], lits[2]),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    use crate::circuit::test_lines as lines;

    /// Every polarity of the three-literal majority, computed as a temporary and
    /// XORed into a target, on every basis state.
    #[test]
    fn majority_gadgets_on_every_polarity() {
        for pol in 0..8u32 {
            let mut b = Builder::new(lines(4), None);
            let lit = |i: u32| Bit::Lit {
                line: Line(i),
                neg: (pol >> i) & 1 == 1,
            };
            let t = b.maj_temp(lit(0), lit(1), lit(2));
            b.xor_into(Line(3), t.bit, true);
            b.undo_temp(t);
            b.maj_into(Line(3), lit(0), lit(1), lit(2), true);
            let c = b.finish();
            for s in 0..8u64 {
                // Applied twice: target unchanged, ancilla clean, inputs unchanged.
                assert_eq!(c.simulate(s), s, "polarity {pol:03b} state {s:03b}");
            }
            let mut b = Builder::new(lines(4), None);
            b.maj_into(Line(3), lit(0), lit(1), lit(2), true);
            let c = b.finish();
            for s in 0..8u64 {
                let v = |i: u32| ((s >> i) & 1 == 1) ^ ((pol >> i) & 1 == 1);
                let m = (v(0) as u8 + v(1) as u8 + v(2) as u8) >= 2;
                assert_eq!(c.simulate(s), s | (m as u64) << 3);
            }
        }
    }

    #[test]
    fn constants_reduce_without_gates() {
        let x = Bit::of(Line(0));
        assert!(matches!(reduce_majority(Bit::Zero, Bit::One, x), Majority::Copy(b) if b == x));
        assert!(matches!(
            reduce_majority(Bit::Zero, Bit::Zero, x),
            Majority::Const(false)
        ));
        assert!(matches!(
            reduce_majority(x, x.not(), Bit::One),
            Majority::Const(true)
        ));
    }
}
