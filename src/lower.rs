//! Lowering: MCT gates with mixed polarities become NOT, CNOT and Toffoli gates on clean ancillae.
//!
//! A gate with `k >= 3` positive controls computes the AND of its controls along
//! a chain of `k - 2` clean ancillae, applies one Toffoli onto the target, and
//! uncomputes the chain: `2k - 3` Toffolis (Barenco et al., Phys. Rev. A 52, 3457,
//! 1995). A negative control is conjugated with NOT gates. Every gate draws on one
//! shared pool of ancillae, sized for the widest gate, and each ancilla is back at
//! 0 after every gate. A final [`cancel_pairs`] pass removes the NOT pairs and the
//! uncompute/recompute pairs that neighbouring gates share.

use crate::circuit::rewrite::cancel_pairs;
use crate::circuit::{Circuit, Control, Gate, Line};

/// Lowers `circuit` to gates with at most two positive controls, adding the
/// ancilla lines it needs to the `anc` register.
pub fn lower(circuit: &Circuit) -> Circuit {
    let need = circuit.max_controls().saturating_sub(2);
    let mut out = circuit.without_gates();
    let pool: Vec<Line> = (0..need).map(|_| out.add_ancilla()).collect();
    let mut gates = Vec::with_capacity(lowered_len(circuit));
    for g in circuit.gates() {
        if !g.is_flip() {
            // Already two controls, of either polarity (its OpenQASM form
            // conjugates a negative one).
            gates.push(g.clone());
            continue;
        }
        let negatives: Vec<Line> = g
            .controls()
            .iter()
            .filter(|c| !c.positive)
            .map(|c| c.line)
            .collect();
        for &l in &negatives {
            gates.push(Gate::not(l.0));
        }
        let c: Vec<u32> = g.controls().iter().map(|c| c.line.0).collect();
        let t = g.target().0;
        match c.len() {
            0 => gates.push(Gate::not(t)),
            1 => gates.push(Gate::cnot(c[0], t)),
            2 => gates.push(Gate::toffoli(c[0], c[1], t)),
            k => {
                let mut chain = vec![Gate::toffoli(c[0], c[1], pool[0].0)];
                for i in 1..k - 2 {
                    chain.push(Gate::toffoli(pool[i - 1].0, c[i + 1], pool[i].0));
                }
                gates.extend(chain.iter().cloned());
                gates.push(
                    Gate::new(
                        vec![Control::pos(pool[k - 3].0), Control::pos(c[k - 1])],
                        Line(t),
                    )
                    .expect("ancilla, control and target are distinct"),
                );
                gates.extend(chain.into_iter().rev());
            }
        }
        for &l in &negatives {
            gates.push(Gate::not(l.0));
        }
    }
    out.set_gates(gates);
    cancel_pairs(&mut out);
    out
}

/// The number of gates [`lower`] makes before cancellation: NOT pairs around
/// each negative control, and `2k - 3` Toffolis for `k >= 3` controls.
pub fn lowered_len(circuit: &Circuit) -> usize {
    circuit
        .gates()
        .iter()
        .map(|g| {
            if !g.is_flip() {
                return 1;
            }
            let k = g.controls().len();
            let neg = g.controls().iter().filter(|c| !c.positive).count();
            2 * neg + if k >= 3 { 2 * k - 3 } else { 1 }
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    use crate::circuit::test_lines as lines;

    // A k-control NOT costs 2k - 3 Toffolis with k - 2 clean ancillae
    // (Barenco et al. 1995, as cited in checks.md).
    #[test]
    fn k_controls_cost_2k_minus_3_toffolis() {
        for k in 3..=8u32 {
            let controls = (0..k).map(Control::pos).collect();
            let g = Gate::new(controls, Line(k)).unwrap();
            let c = Circuit::from_parts(lines(k as usize + 1), vec![g.clone()]).unwrap();
            let low = lower(&c);
            assert_eq!(low.width(), (k + 1 + k - 2) as usize);
            assert_eq!(low.gates().len(), (2 * k - 3) as usize);
            assert!(low.gates().iter().all(|g| g.controls().len() == 2));
            // Simulate every basis state of the data lines; ancillae start at 0.
            for s in 0..1u64 << (k + 1) {
                let out = low.simulate(s);
                assert_eq!(out, g.apply(s), "k={k} state {s:b}");
            }
        }
    }

    #[test]
    fn negative_controls_are_conjugated() {
        let g = Gate::new(
            vec![Control::neg(0), Control::pos(1), Control::neg(2)],
            Line(3),
        )
        .unwrap();
        let c = Circuit::from_parts(lines(4), vec![g.clone()]).unwrap();
        let low = lower(&c);
        assert_eq!(
            low.gates()
                .iter()
                .filter(|g| g.controls().is_empty())
                .count(),
            4
        );
        for s in 0..16 {
            assert_eq!(low.simulate(s), g.apply(s));
        }
    }
}
