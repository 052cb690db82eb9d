//! Positive-polarity Reed-Muller synthesis: one MCT gate per monomial of the algebraic normal form.
//!
//! Every Boolean function has a unique XOR-of-ANDs form with uncomplemented
//! literals (Reed 1954; Muller 1954). Its coefficients come from the truth table
//! by the fast Moebius transform in `O(n 2^n)` bit operations (here `O(n 2^n / 64)`
//! word operations). Each monomial `x_i x_j ...` becomes a gate with positive
//! controls `i, j, ...` onto the output line; the constant monomial becomes a NOT.
//!
//! Monomials are emitted in lexicographic order of their sorted control lists, so
//! neighbouring gates share control prefixes and the AND chains of lowering cancel
//! between them.
//!
//! Complexity: `O(n 2^n)` time and `2^n` bits per output. Limits: the table must
//! fit ([`SynthLimits::max_table_inputs`]), and the gate count is at most `2^n` per
//! output, checked against [`SynthLimits::max_gates`].

use super::{SynthError, SynthLimits};
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::logic::{TruthTable, VAR_PATTERN};
use crate::spec::FunctionSpec;

/// The positive-polarity Reed-Muller coefficients of `t`: bit `s` is set when the
/// monomial of the variables in `s` appears.
pub fn reed_muller_coefficients(t: &TruthTable) -> TruthTable {
    let mut c = t.clone();
    let n = c.vars();
    let words = c.words_mut();
    for (i, &pattern) in VAR_PATTERN.iter().enumerate().take(n.min(6)) {
        for w in words.iter_mut() {
            *w ^= (*w << (1 << i)) & pattern;
        }
    }
    for i in 6..n {
        let step = 1usize << (i - 6);
        for j in 0..words.len() {
            if j & step != 0 {
                words[j] ^= words[j ^ step];
            }
        }
    }
    c
}

/// Calls `emit` with every set `s` of `coeffs` in lexicographic order of the sorted
/// member lists (`{}`, `{0}`, `{0,1}`, `{0,1,2}`, ..., `{0,2}`, ...).
fn monomials_in_order(coeffs: &TruthTable, mut emit: impl FnMut(u64)) {
    let n = coeffs.vars();
    // Explicit stack of (set, next element to try).
    let mut stack: Vec<(u64, usize)> = vec![(0, 0)];
    if coeffs.get(0) {
        emit(0);
    }
    while let Some((set, next)) = stack.pop() {
        if next < n {
            stack.push((set, next + 1));
            let child = set | (1 << next);
            if coeffs.get(child as usize) {
                emit(child);
            }
            stack.push((child, next + 1));
        }
    }
}

/// Builds the oracle for `f` from the Reed-Muller form of each output.
pub fn reed_muller(f: &FunctionSpec, limits: &SynthLimits) -> Result<Circuit, SynthError> {
    let n = f.inputs.len();
    super::check_table_inputs(n, limits)?;
    let mut circuit = Circuit::new(f.layout().lines());
    let mut gates = 0usize;
    for j in 0..f.outputs.len() {
        let table = f
            .table(j)
            .expect("the input count is within the table limit, checked above");
        let coeffs = reed_muller_coefficients(&table);
        gates += coeffs.count_ones();
        super::check_gate_count(gates, limits)?;
        let target = Line((n + j) as u32);
        monomials_in_order(&coeffs, |s| {
            let controls = (0..n as u32)
                .filter(|i| (s >> i) & 1 == 1)
                .map(Control::pos)
                .collect();
            circuit.push(
                Gate::new(controls, target).expect("controls are inputs, target is an output"),
            );
        });
    }
    Ok(circuit)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn monomials(t: &TruthTable) -> Vec<u64> {
        let mut v = Vec::new();
        monomials_in_order(&reed_muller_coefficients(t), |s| v.push(s));
        v
    }

    // Majority of three has the Reed-Muller form ab ^ ac ^ bc (a textbook fact
    // of the trade, e.g. any switching-theory text; no single source).
    #[test]
    fn majority_is_ab_ac_bc() {
        let maj = TruthTable::parse("0xe8", 3).unwrap();
        assert_eq!(monomials(&maj), vec![0b011, 0b101, 0b110]);
    }

    // x ^ y ^ z is linear: three single-variable monomials; NOT x is 1 ^ x.
    #[test]
    fn linear_and_affine_forms() {
        assert_eq!(
            monomials(&TruthTable::parse("0x96", 3).unwrap()),
            vec![1, 2, 4]
        );
        assert_eq!(
            monomials(&TruthTable::parse("0b01", 1).unwrap()),
            vec![0, 1]
        );
    }

    #[test]
    fn transform_is_an_involution_on_wide_tables() {
        let t = TruthTable::from_fn(9, |i| (i.wrapping_mul(0x9e37_79b9) >> 7) & 1 == 1);
        let back = reed_muller_coefficients(&reed_muller_coefficients(&t));
        assert_eq!(back, t);
        // The coefficients evaluate back to the function: f(x) = XOR of c[s] for s within x.
        let c = reed_muller_coefficients(&t);
        for x in [0usize, 1, 77, 300, 511] {
            let v = (0..512).filter(|&s| s & !x == 0 && c.get(s)).count() % 2 == 1;
            assert_eq!(v, t.get(x));
        }
    }

    #[test]
    fn order_is_lexicographic_on_control_lists() {
        let mut v = Vec::new();
        monomials_in_order(&TruthTable::from_fn(3, |_| true), |s| v.push(s));
        assert_eq!(v, vec![0, 0b001, 0b011, 0b111, 0b101, 0b010, 0b110, 0b100]);
    }
}
