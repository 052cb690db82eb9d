//! Grover facts of a predicate oracle: how many inputs it marks, how many
//! Grover iterations to run, and the chance that a measurement then finds a
//! marked input (Boyer, Brassard, Hoyer, Tapp, "Tight bounds on quantum
//! searching", Fortschritte der Physik 46, 1998, section 3).

use super::BuildError;
use crate::progress::Progress;
use crate::spec::Spec;
use crate::verify::{count_marked, VerifyError};
use serde::Serialize;
use std::fmt;

/// A figure, or `"unknown"` when it could not be had within the limits.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Fact<T> {
    /// The figure.
    Known(T),
    /// Always "unknown".
    Unknown(&'static str),
}

/// The Grover facts of a spec with one output.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Grover {
    /// Inputs `x` with `f(x) = 1` (M), out of `2^input_bits` (N).
    pub marked: Fact<u64>,
    /// The number of inputs' bits, n (N = 2^n).
    pub input_bits: u32,
    /// k = floor(pi / (4 theta)) with theta = asin(sqrt(M / N)); 0 when M = 0.
    pub grover_iterations: Fact<u64>,
    /// sin^2((2k + 1) theta): a measurement after k iterations finds a
    /// marked input with this probability; 0 when M = 0.
    pub success_probability: Fact<f64>,
}

/// The iteration count and success probability for `marked` of `2^bits`
/// inputs (Boyer, Brassard, Hoyer, Tapp 1998: with theta = asin(sqrt(M/N)),
/// k iterations leave the marked inputs with probability sin^2((2k+1) theta),
/// and k = floor(pi / (4 theta)) brings it within M/N of 1).
pub fn iterations(marked: u64, bits: u32) -> (u64, f64) {
    if marked == 0 {
        return (0, 0.0);
    }
    let n = 2f64.powi(bits as i32);
    let theta = (marked as f64 / n).sqrt().min(1.0).asin();
    let k = (std::f64::consts::PI / (4.0 * theta)).floor();
    let p = ((2.0 * k + 1.0) * theta).sin().powi(2);
    (k as u64, p)
}

/// The Grover facts of `spec`, `None` when it is not a one-output function
/// spec; the marked inputs are counted by the verifier on every input within
/// `max_states`, and every figure is unknown past it.
pub fn grover_facts(
    spec: &Spec,
    max_states: u64,
    progress: &dyn Progress,
) -> Result<Option<Grover>, BuildError> {
    let bits = match &spec.body {
        crate::spec::SpecBody::Function(f) if f.outputs.len() == 1 => f.inputs.len() as u32,
        _ => return Ok(None),
    };
    let unknown = Grover {
        marked: Fact::Unknown("unknown"),
        input_bits: bits,
        grover_iterations: Fact::Unknown("unknown"),
        success_probability: Fact::Unknown("unknown"),
    };
    match count_marked(spec, max_states, progress) {
        Ok(Some(m)) => {
            let (k, p) = iterations(m, bits);
            Ok(Some(Grover {
                marked: Fact::Known(m),
                input_bits: bits,
                grover_iterations: Fact::Known(k),
                success_probability: Fact::Known(p),
            }))
        }
        Ok(None) => Ok(None),
        Err(VerifyError::TooLarge { .. }) => Ok(Some(unknown)),
        Err(e) => Err(e.into()),
    }
}

impl fmt::Display for Grover {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (
            self.marked,
            self.grover_iterations,
            self.success_probability,
        ) {
            (Fact::Known(m), Fact::Known(k), Fact::Known(p)) => write!(
                f,
                "  grover: {m} of 2^{} inputs marked, {k} iteration{}, success probability {p:.4}",
                self.input_bits,
                if k == 1 { "" } else { "s" }
            ),
            _ => write!(
                f,
                "  grover: marked inputs unknown (2^{} inputs, past --max-states)",
                self.input_bits
            ),
        }
    }
}
