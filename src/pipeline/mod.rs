//! The whole job in one call: synthesize, optimize, lower, measure, verify,
//! and the one place where a method is chosen for the user (`auto`).

mod build;
mod choose;
mod grover;

pub use build::{build_one, invert, OPTIMIZE_MAX_GATES};
pub use choose::{
    best_of, build, build_with_progress, candidates, compare, tradeoff, tradeoff_note,
    TRADEOFF_MAX_NODES,
};
pub use grover::{grover_facts, iterations, Fact, Grover};

use crate::circuit::{Circuit, Cost};
use crate::limit::Stop;
use crate::spec::OracleForm;
use crate::synth::{Method, SynthError, SynthLimits};
use crate::verify::{Verdict, VerifyError, VerifyOptions};
use serde::Serialize;

/// Everything a build run needs besides the spec.
#[derive(Clone, Copy, Debug, Default)]
pub struct BuildOptions {
    /// The synthesis method; `None` chooses (`auto`).
    pub method: Option<Method>,
    /// Synthesis budgets.
    pub limits: SynthLimits,
    /// `None` skips verification (the report says so).
    pub verify: Option<VerifyOptions>,
}

/// Whether and how the circuit was checked.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(untagged)]
pub enum Verification {
    /// The verifier ran.
    Ran(Verdict),
    /// `--no-verify`: nothing was checked.
    Skipped {
        /// Always "skipped".
        verdict: &'static str,
    },
}

impl Verification {
    /// True when every basis state was checked and correct.
    pub fn is_proven(&self) -> bool {
        matches!(self, Verification::Ran(Verdict::Proven { .. }))
    }
}

/// Seconds spent in each stage.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct Timings {
    /// Synthesis and optimization.
    pub synth: f64,
    /// Optimization and lowering to Toffoli gates.
    pub lower: f64,
    /// Verification.
    pub verify: f64,
}

/// A built oracle.
#[derive(Clone, Debug)]
pub struct Outcome {
    /// The spec's name, if it has one.
    pub name: Option<String>,
    /// The method that ran (never `auto`).
    pub method: Method,
    /// The circuit before lowering.
    pub mct: Circuit,
    /// The circuit of NOT, CNOT and Toffoli gates.
    pub lowered: Circuit,
    /// Its cost.
    pub cost: Cost,
    /// The verdict.
    pub verification: Verification,
    /// Time per stage.
    pub timings: Timings,
    /// What the method or the choice of method wants the user to know.
    pub notes: Vec<String>,
    /// Where the method's search stopped short of a proven optimum.
    pub stop: Option<Stop>,
    /// The oracle form to export.
    pub form: OracleForm,
    /// Whether the circuits are the inverse of the spec's map ([`invert`]).
    pub inverse: bool,
    /// For a one-output function spec: marked inputs, Grover iterations and
    /// the success probability ([`grover_facts`]).
    pub grover: Option<Grover>,
}

/// Why a build stopped before a verdict.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BuildError {
    /// Synthesis refused.
    #[error(transparent)]
    Synth(#[from] SynthError),
    /// Verification could not run.
    #[error(transparent)]
    Verify(#[from] VerifyError),
}

impl BuildError {
    /// True when a resource limit, not the input, stopped the job.
    pub fn is_limit(&self) -> bool {
        match self {
            BuildError::Synth(e) => {
                matches!(
                    e,
                    SynthError::Limit { .. }
                        | SynthError::Budget { .. }
                        | SynthError::OutOfTime { .. }
                )
            }
            BuildError::Verify(e) => e.is_limit(),
        }
    }
}

/// The report of a build, as printed with `--json`.
#[derive(Clone, Debug, Serialize)]
pub struct Report<'a> {
    /// The spec's name.
    pub name: Option<&'a str>,
    /// The method that ran.
    pub method: &'static str,
    /// The cost report.
    pub cost: &'a Cost,
    /// The verdict.
    pub verification: &'a Verification,
    /// Seconds per stage.
    pub seconds: Timings,
    /// Statements about the result.
    pub notes: &'a [String],
    /// Where the method's search stopped short of a proven optimum.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub stopped: Option<&'a Stop>,
    /// Present and true when the circuit is the inverse of the spec's map.
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub inverse: bool,
    /// `marked`, `input_bits`, `grover_iterations`, `success_probability`:
    /// only for one-output function specs.
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    pub grover: Option<&'a Grover>,
}

impl Outcome {
    /// Gives the registers the spec's own names (`[registers]`), before and
    /// after lowering, for the files and drawings made of the outcome.
    pub fn rename_registers(&mut self, map: &[(String, String)]) {
        if !map.is_empty() {
            self.mct = self.mct.with_registers_renamed(map);
            self.lowered = self.lowered.with_registers_renamed(map);
        }
    }

    /// The JSON-ready report.
    pub fn report(&self) -> Report<'_> {
        Report {
            name: self.name.as_deref(),
            method: self.method.name(),
            cost: &self.cost,
            verification: &self.verification,
            seconds: self.timings,
            notes: &self.notes,
            stopped: self.stop.as_ref(),
            inverse: self.inverse,
            grover: self.grover.as_ref(),
        }
    }
}
