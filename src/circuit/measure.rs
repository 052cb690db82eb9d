//! Measured uncomputation: every Toffoli that uncomputes an AND held by a
//! line becomes a measured uncompute ([`Kind::Measured`], 0 T, 0 Toffoli),
//! and the Toffoli that computed that AND into a clean ancilla becomes a
//! temporary AND ([`Kind::And`], 4 T instead of 7). Jones, "Low-overhead
//! constructions for the fault-tolerant Toffoli gate", PRA 87, 022328
//! (2013); Gidney, "Halving the cost of quantum addition", Quantum 2, 74
//! (2018).
//!
//! The pass proves each rewrite symbolically, for every input at once: the
//! value of every line is kept as an affine form over GF(2) (a sorted set of
//! symbols and a constant) of the circuit's initial values and of one fresh
//! symbol per Toffoli. NOT and CNOT act on the forms exactly. A Toffoli onto
//! a line whose form is 0 gives it a new symbol `s`, recorded as the AND of
//! its two literal forms. A later Toffoli onto a line whose form is exactly
//! `s`, with controls whose forms now are the recorded ones, clears that line
//! on every input: it is rewritten as a measured uncompute, and the Toffoli
//! that made `s` as a temporary AND. Any other gate gives its target a fresh
//! unrecorded symbol; a form that would pass [`MAX_TERMS`] symbols is
//! replaced by a fresh symbol too (it stands for the line's value at that
//! point, a fixed function of the inputs, so equal forms stay equal
//! functions; a line left alone until its AND is uncomputed still matches). Equal forms are equal functions, so every
//! rewrite keeps the circuit's function; the verifier checks each one anyway.
//!
//! Lines of the `anc` register start at 0; every other line starts as its
//! own symbol. Complexity: O(gates x MAX_TERMS) time, O(lines + Toffolis)
//! memory.

use super::{layout, Circuit, Control, Gate, Kind};
use smallvec::SmallVec;
use std::collections::HashMap;

/// Most symbols a line's form keeps before it is replaced by a fresh one.
pub const MAX_TERMS: usize = 16;

/// An affine form over GF(2): XOR of `syms` (sorted, distinct) and `one`.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
struct Form {
    syms: SmallVec<[u32; 4]>,
    one: bool,
}

impl Form {
    fn zero() -> Form {
        Form {
            syms: SmallVec::new(),
            one: false,
        }
    }
    fn sym(s: u32) -> Form {
        Form {
            syms: SmallVec::from_slice(&[s]),
            one: false,
        }
    }
    fn is_zero(&self) -> bool {
        self.syms.is_empty() && !self.one
    }
    /// `self XOR other`, or `None` past [`MAX_TERMS`].
    fn xor(&self, other: &Form) -> Option<Form> {
        let (a, b) = (&self.syms, &other.syms);
        let mut out = SmallVec::new();
        let (mut i, mut j) = (0, 0);
        while i < a.len() || j < b.len() {
            if j == b.len() || (i < a.len() && a[i] < b[j]) {
                out.push(a[i]);
                i += 1;
            } else if i == a.len() || b[j] < a[i] {
                out.push(b[j]);
                j += 1;
            } else {
                i += 1;
                j += 1;
            }
        }
        (out.len() <= MAX_TERMS).then_some(Form {
            syms: out,
            one: self.one ^ other.one,
        })
    }
    fn literal(&self, c: &Control) -> Form {
        let mut f = self.clone();
        f.one ^= !c.positive;
        f
    }
}

/// What [`measure_uncomputes`] did.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Rewritten {
    /// Toffolis now measured uncomputes.
    pub measured: usize,
    /// Toffolis now temporary ANDs.
    pub temporary: usize,
}

/// Rewrites every provable uncompute of an AND as a measured uncompute and
/// its compute as a temporary AND (see the module docs).
pub fn measure_uncomputes(circuit: &mut Circuit) -> Rewritten {
    rewrite(circuit, true)
}

/// Marks as temporary ANDs the Toffolis that compute an AND into a clean
/// line which a measured uncompute already in the circuit clears: what
/// [`measure_uncomputes`] would make of them, for circuits read from a file.
pub fn mark_temporary_ands(circuit: &mut Circuit) -> usize {
    rewrite(circuit, false).temporary
}

fn rewrite(circuit: &mut Circuit, measure: bool) -> Rewritten {
    let width = circuit.width();
    let anc: Vec<bool> = circuit
        .lines()
        .iter()
        .map(|l| l.register == layout::ANCILLAE)
        .collect();
    let mut form: Vec<Option<Form>> = (0..width)
        .map(|i| {
            Some(if anc[i] {
                Form::zero()
            } else {
                Form::sym(i as u32)
            })
        })
        .collect();
    let mut next = width as u32;
    let mut fresh = || {
        next = next.checked_add(1).expect("fewer than 2^32 symbols");
        next - 1
    };
    // Symbol -> (its two literal forms, sorted; the gate that computed it).
    let mut defs: HashMap<u32, ([Form; 2], usize)> = HashMap::new();
    let mut gates = circuit.take_gates();
    let mut out = Rewritten::default();
    for k in 0..gates.len() {
        let g = &gates[k];
        let t = g.target().index();
        let cs = g.controls();
        let lits: Option<Vec<Form>> = cs
            .iter()
            .map(|c| form[c.line.index()].as_ref().map(|f| f.literal(c)))
            .collect();
        match (g.kind(), cs.len(), lits) {
            (Kind::Flip, 0, _) => {
                if let Some(f) = form[t].as_mut() {
                    f.one = !f.one;
                }
            }
            (Kind::Flip, 1, Some(l)) => {
                let s = fresh();
                form[t] = Some(
                    form[t]
                        .as_ref()
                        .and_then(|f| f.xor(&l[0]))
                        .unwrap_or_else(|| Form::sym(s)),
                );
            }
            (_, 2, Some(mut l)) => {
                l.sort_by(|a, b| (&a.syms[..], a.one).cmp(&(&b.syms[..], b.one)));
                let pair = [l[0].clone(), l[1].clone()];
                let held = form[t]
                    .as_ref()
                    .filter(|f| f.syms.len() == 1 && !f.one)
                    .and_then(|f| defs.get(&f.syms[0]))
                    .filter(|(d, _)| *d == pair)
                    .map(|(_, at)| *at);
                match (g.kind(), held) {
                    (Kind::Measured, Some(at)) | (Kind::Flip, Some(at))
                        if measure || g.is_measured() =>
                    {
                        if g.is_flip() {
                            let c = g.controls();
                            gates[k] = Gate::measured(c[0], c[1], g.target())
                                .expect("the lines of a Toffoli are distinct");
                            out.measured += 1;
                        }
                        let maker = &gates[at];
                        if maker.is_flip() {
                            let c = maker.controls();
                            gates[at] = Gate::temporary_and(c[0], c[1], maker.target())
                                .expect("the lines of a Toffoli are distinct");
                            out.temporary += 1;
                        }
                        form[t] = Some(Form::zero());
                    }
                    (Kind::Measured, _) => form[t] = Some(Form::zero()),
                    _ if form[t].as_ref().is_some_and(Form::is_zero) => {
                        let s = fresh();
                        defs.insert(s, (pair, k));
                        form[t] = Some(Form::sym(s));
                    }
                    _ => {
                        let s = fresh();
                        form[t] = Some(
                            form[t]
                                .as_ref()
                                .and_then(|f| f.xor(&Form::sym(s)))
                                .unwrap_or_else(|| Form::sym(s)),
                        );
                    }
                }
            }
            (Kind::Measured, _, _) => form[t] = Some(Form::zero()),
            _ => {
                let s = fresh();
                form[t] = Some(
                    form[t]
                        .as_ref()
                        .and_then(|f| f.xor(&Form::sym(s)))
                        .unwrap_or_else(|| Form::sym(s)),
                );
            }
        }
    }
    circuit.set_gates(gates);
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::{Line, LineInfo, Role};

    fn lines(data: usize, anc: usize) -> Vec<LineInfo> {
        (0..data + anc)
            .map(|i| LineInfo {
                register: if i < data { "q" } else { layout::ANCILLAE }.into(),
                index: if i < data { i } else { i - data } as u32,
                role: if i < data { Role::Data } else { Role::Ancilla },
                label: String::new(),
            })
            .collect()
    }

    // The ladder of a 4-control NOT on 2 clean ancillae (Barenco et al.,
    // PRA 52, 3457, 1995: 2k - 3 = 5 Toffolis) keeps k - 1 = 3 Toffoli-like
    // gates and uncomputes k - 2 = 2 by measurement, the count of Gidney
    // 2018, Sec. 3 ("k - 1 ANDs for a k-control NOT").
    #[test]
    fn a_ladder_keeps_k_minus_1_ands_and_measures_the_rest() {
        let g = |a, b, t| Gate::toffoli(a, b, t);
        let mut c = Circuit::from_parts(
            lines(5, 2),
            vec![g(0, 1, 5), g(5, 2, 6), g(6, 3, 4), g(5, 2, 6), g(0, 1, 5)],
        )
        .unwrap();
        let before = c.clone();
        let r = measure_uncomputes(&mut c);
        assert_eq!(
            r,
            Rewritten {
                measured: 2,
                temporary: 2
            }
        );
        let kinds: Vec<Kind> = c.gates().iter().map(Gate::kind).collect();
        assert_eq!(
            kinds,
            [
                Kind::And,
                Kind::And,
                Kind::Flip,
                Kind::Measured,
                Kind::Measured
            ]
        );
        // Same function on every state with the ancillae at 0.
        for s in 0..32u64 {
            assert_eq!(c.simulate(s), before.simulate(s));
        }
    }

    // Not rewritten: a control changed between compute and uncompute (so the
    // ancilla no longer holds the AND of the current controls), a target that
    // was not clean, and an uncompute with the other polarity.
    #[test]
    fn nothing_is_rewritten_that_does_not_clear_the_line() {
        let moved = vec![
            Gate::toffoli(0, 1, 3),
            Gate::cnot(2, 0),
            Gate::toffoli(0, 1, 3),
        ];
        let dirty = vec![Gate::toffoli(0, 1, 2), Gate::toffoli(0, 1, 2)];
        let flipped = vec![
            Gate::toffoli(0, 1, 3),
            Gate::new(vec![Control::neg(0), Control::pos(1)], Line(3)).unwrap(),
        ];
        for gates in [moved, dirty, flipped] {
            let mut c = Circuit::from_parts(lines(3, 1), gates.clone()).unwrap();
            assert_eq!(measure_uncomputes(&mut c), Rewritten::default());
            assert_eq!(c.gates(), &gates[..]);
        }
        // Restored controls (CNOTs and NOTs that cancel between) and mixed
        // polarities conjugated by NOTs are recognised.
        let restored = vec![
            Gate::not(0),
            Gate::toffoli(0, 1, 3),
            Gate::not(0),
            Gate::cnot(2, 1),
            Gate::not(2),
            Gate::cnot(2, 1),
            Gate::not(2),
            Gate::not(1),
            Gate::new(vec![Control::neg(0), Control::pos(1)], Line(3)).unwrap(),
        ];
        let mut c = Circuit::from_parts(lines(3, 1), restored).unwrap();
        assert_eq!(
            measure_uncomputes(&mut c),
            Rewritten {
                measured: 1,
                temporary: 1
            }
        );
        assert!(c.gates()[8].is_measured());
        assert!(c.gates()[1].is_temporary_and());
    }
}
