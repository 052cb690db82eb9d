//! The whole job in one call: synthesize, optimize, lower, measure, verify,
//! and the one place where a method is chosen for the user (`auto`).

mod build;
mod choose;
mod grover;

pub use build::{build_one, invert, OPTIMIZE_MAX_GATES};
pub use choose::{
    best_of, build, build_with_progress, candidates, compare, compare_with_progress, tradeoff,
    tradeoff_with_progress, Curve, TRADEOFF_MAX_NODES, TRADEOFF_MAX_POINTS,
};
pub use grover::{grover_facts, iterations, Fact, Grover};

use crate::circuit::{Circuit, Cost, Uncompute};
use crate::limit::{Limit, Stop};
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
    /// How ANDs in clean ancillae are uncomputed (`--uncompute`).
    pub uncompute: Uncompute,
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
    /// The budget that stopped the job, when a budget (not the input) did;
    /// callers map it to the option or argument that raises it.
    pub fn limit(&self) -> Option<Limit> {
        match self {
            BuildError::Synth(SynthError::Limit { kind, .. }) => Some(*kind),
            BuildError::Synth(SynthError::Budget { .. }) => Some(Limit::Qubits),
            BuildError::Synth(SynthError::OutOfTime { .. }) => Some(Limit::SearchSeconds),
            BuildError::Synth(_) => None,
            BuildError::Verify(e) => e.limit(),
        }
    }

    /// True when a resource limit, not the input, stopped the job.
    pub fn is_limit(&self) -> bool {
        self.limit().is_some()
    }

    /// True when the caller stopped the job ([`crate::Progress::cancelled`]).
    pub fn is_cancelled(&self) -> bool {
        matches!(
            self,
            BuildError::Synth(SynthError::Cancelled) | BuildError::Verify(VerifyError::Cancelled)
        )
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::progress::Event;
    use crate::spec::parse_spec;

    /// Majority of three, `0xe8` (common practice).
    fn majority() -> crate::spec::Spec {
        parse_spec(
            "vote.toml",
            "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"most\"]\n[table]\nmost = \"0xe8\"\n",
        )
        .unwrap()
    }

    #[test]
    fn each_budget_is_named_by_the_error_it_causes() {
        let spec = majority();
        let mut opts = BuildOptions {
            method: Some(Method::Bennett),
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        };
        // Three inputs and one output need at least four lines.
        opts.limits.max_qubits = Some(2);
        let e = build(&spec, &opts).unwrap_err();
        assert_eq!(e.limit(), Some(Limit::Qubits), "{e}");
        assert!(e.is_limit() && !e.is_cancelled());
        opts.limits.max_qubits = None;
        opts.limits.max_gates = 1;
        let e = build(&spec, &opts).unwrap_err();
        assert_eq!(e.limit(), Some(Limit::Gates), "{e}");
        opts.limits.max_gates = SynthLimits::default().max_gates;
        // 4 free lines are 16 states.
        opts.verify = Some(VerifyOptions {
            max_states: 8,
            route: crate::verify::Route::Exhaustive,
            ..Default::default()
        });
        let e = build(&spec, &opts).unwrap_err();
        assert_eq!(e.limit(), Some(Limit::States), "{e}");
        // A method that does not take the spec is the input's fault, no budget's.
        opts.method = Some(Method::Structural);
        let e = build(&spec, &opts).unwrap_err();
        assert_eq!(e.limit(), None, "{e}");
        assert!(!e.is_limit());
    }

    struct Stopped;
    impl crate::progress::Progress for Stopped {
        fn event(&self, _: Event) {}
        fn cancelled(&self) -> bool {
            true
        }
    }

    /// Cancelled after the first block it reports.
    struct AfterFirst(std::sync::atomic::AtomicBool);
    impl crate::progress::Progress for AfterFirst {
        fn event(&self, _: Event) {
            self.0.store(true, std::sync::atomic::Ordering::Relaxed);
        }
        fn cancelled(&self) -> bool {
            self.0.load(std::sync::atomic::Ordering::Relaxed)
        }
    }

    #[test]
    fn a_cancelled_exhaustive_check_ends_without_a_verdict() {
        // 2^62 states: the check ends only because it was stopped, and must
        // not pass over the remaining blocks one by one.
        let spec = parse_spec(
            "add.toml",
            "kind = \"arithmetic\"\nop = \"add\"\nwidth = 31\n",
        )
        .unwrap();
        let out = build(&spec, &BuildOptions::default()).unwrap();
        let opts = VerifyOptions {
            max_states: 1 << 62,
            route: crate::verify::Route::Exhaustive,
            ..Default::default()
        };
        let stop = AfterFirst(Default::default());
        let r = crate::verify::verify_with_progress(&out.lowered, &spec, &opts, &stop);
        assert_eq!(r, Err(VerifyError::Cancelled));
    }

    #[test]
    fn a_cancelled_compare_starts_no_method() {
        let spec = majority();
        let opts = BuildOptions {
            verify: Some(VerifyOptions::default()),
            ..Default::default()
        };
        let rows = compare_with_progress(&spec, &opts, &Stopped);
        assert_eq!(rows.len(), candidates(&spec, true).len());
        assert!(rows
            .iter()
            .all(|(_, r)| matches!(r, Err(e) if e.is_cancelled())));
        // Not cancelled, every method makes a circuit of majority.
        let rows = compare(&spec, &opts);
        assert!(rows.iter().all(|(_, r)| r.is_ok()));
    }
}
