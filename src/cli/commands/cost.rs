//! `oraculum cost`: the cost report of an OpenQASM 2 or 3 circuit.

use crate::cli::files::load_circuit;
use crate::cli::{code, Failure};
use oraculum::Cost;
use std::path::Path;

pub fn run(circuit: &Path, json: bool, max_gates: usize) -> Result<i32, Failure> {
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
