//! `oraculum cost`: the cost report of an OpenQASM 2 or 3 circuit, or the
//! streaming gate count of an arithmetic spec's generated circuit.

use crate::cli::files::{load_circuit, load_spec};
use crate::cli::{code, Failure};
use oraculum::{Cost, SpecBody};
use std::path::Path;

pub fn run(circuit: &Path, json: bool, max_gates: usize) -> Result<i32, Failure> {
    if circuit.extension().is_some_and(|e| e == "toml") {
        return run_spec(circuit, json);
    }
    let c = load_circuit(circuit, max_gates)?;
    // An OpenQASM 3 file may hold unlowered gates (ctrl(k) @ x): its cost
    // is that of the circuit lowered as synth lowers it.
    let unlowered = c.max_controls() > 2
        || c.gates()
            .iter()
            .any(|g| g.is_flip() && g.controls().iter().any(|x| !x.positive));
    let cost = if unlowered {
        Cost::measure(&c, &oraculum::lower(&c))
    } else {
        Cost::measure(&c, &c)
    };
    if json {
        outln!(
            "{}",
            serde_json::to_string_pretty(&cost).unwrap_or_default()
        );
    } else {
        outln!("{}\n{cost}", circuit.display());
    }
    Ok(code::DONE)
}

/// Counts the gates of the structural generator as they are generated,
/// keeping none, so that the largest arithmetic (a 2048-bit `power`) is
/// counted without building it. Depth needs the circuit and is not given.
fn run_spec(path: &Path, json: bool) -> Result<i32, Failure> {
    let spec = load_spec(path)?;
    let SpecBody::Arithmetic(a) = &spec.body else {
        return Err(Failure::bad(
            "cost of a spec counts arithmetic specs only; synth the others and cost the circuit",
        ));
    };
    let start = std::time::Instant::now();
    let (t, lines) = oraculum::synth::arithmetic_tally(a);
    let qubits = lines + t.max_controls.saturating_sub(2);
    let seconds = start.elapsed().as_secs_f64();
    let construction = oraculum::synth::construction(a);
    if json {
        let v = serde_json::json!({
            "spec": path.display().to_string(),
            "qubits": qubits,
            "toffoli_at_most": t.toffoli,
            "gates_before_lowering": t.gates,
            "by_controls": t.by_controls,
            "construction": construction,
            "seconds": seconds,
        });
        outln!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        outln!(
            "{}: streaming count of the structural circuit (no depth: it needs the built circuit)\n  qubits {qubits}    toffoli at most {}  (lowered gate by gate, before the pair-cancelling pass)\n  before lowering: {} gates (count x controls: {}x0, {}x1, {}x2, {}x3+)\n  counted in {seconds:.2} s",
            path.display(),
            t.toffoli,
            t.gates,
            t.by_controls[0],
            t.by_controls[1],
            t.by_controls[2],
            t.by_controls[3]
        );
        if let Some(c) = construction {
            outln!("  construction: {c}");
        }
    }
    Ok(code::DONE)
}
