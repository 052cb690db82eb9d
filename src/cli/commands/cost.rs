//! `oraculum cost`: the cost report of an OpenQASM 2 circuit.

use crate::cli::files::load_circuit;
use crate::cli::{code, Failure};
use oraculum::Cost;
use std::path::Path;

pub fn run(circuit: &Path, json: bool, max_gates: usize) -> Result<i32, Failure> {
    let c = load_circuit(circuit, max_gates)?;
    if c.max_controls() > 2 {
        return Err(Failure::bad(
            "the circuit has gates with more than two controls",
        ));
    }
    let cost = Cost::measure(&c, &c);
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
