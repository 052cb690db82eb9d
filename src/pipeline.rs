//! The whole job in one call: synthesize, lower, measure, verify.

use crate::circuit::{Circuit, Cost};
use crate::export::{write_qasm, QasmHeader, WriteError};
use crate::lower::lower;
use crate::opt::optimize;
use crate::spec::OracleForm;
use crate::spec::SpecBody;
use crate::synth::{candidates, network_of, synthesize, Method, SynthError, SynthLimits};
use crate::verify::{verify_with_progress, Verdict, VerifyError, VerifyOptions};
use crate::Spec;
use serde::Serialize;
use std::time::Instant;

/// Everything a build run needs besides the spec.
#[derive(Clone, Copy, Debug, Default)]
pub struct BuildOptions {
    /// The synthesis method.
    pub method: Method,
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
    /// The oracle form to export.
    pub form: OracleForm,
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
                matches!(e, SynthError::Limit { .. } | SynthError::Budget { .. })
            }
            BuildError::Verify(e) => e.is_limit(),
        }
    }
}

/// Synthesizes, lowers, measures and (unless told not to) verifies `spec`.
pub fn build(spec: &Spec, opts: &BuildOptions) -> Result<Outcome, BuildError> {
    build_with_progress(spec, opts, &|_, _| {})
}

/// [`build`] with a progress callback for verification (see
/// [`crate::verify::verify_with_progress`]).
///
/// With [`Method::Auto`] every cheap method that applies is run and verified,
/// and the verified circuit with the fewest Toffolis (then qubits, then gates)
/// is returned; the notes say what was tried.
pub fn build_with_progress(
    spec: &Spec,
    opts: &BuildOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> Result<Outcome, BuildError> {
    if opts.method != Method::Auto {
        return build_one(spec, opts.method, opts, progress);
    }
    let tried: Vec<(Method, Result<Outcome, BuildError>)> = candidates(spec, false)
        .into_iter()
        .map(|m| (m, build_one(spec, m, opts, progress)))
        .collect();
    pick_best(tried, opts.limits.max_qubits)
}

/// Runs every method that applies (the slow ones too), each verified when
/// `opts.verify` asks for it; for `oraculum compare`.
pub fn compare(spec: &Spec, opts: &BuildOptions) -> Vec<(Method, Result<Outcome, BuildError>)> {
    candidates(spec, true)
        .into_iter()
        .map(|m| (m, build_one(spec, m, opts, &|_, _| {})))
        .collect()
}

/// Bennett's qubit/Toffoli trade-off for a function spec: plain Bennett, then
/// one qubit fewer at a time until no schedule fits (or a network too large to
/// schedule, past 200 nodes, stops it). Each point is verified as `opts` says.
pub fn tradeoff(spec: &Spec, opts: &BuildOptions) -> Vec<Outcome> {
    let SpecBody::Function(f) = &spec.body else {
        return Vec::new();
    };
    let Ok(net) = network_of(f) else {
        return Vec::new();
    };
    if net.gates() > 200 {
        return Vec::new();
    }
    let mut points = Vec::new();
    let mut o = *opts;
    o.limits.max_qubits = None;
    let Ok(plain) = build_one(spec, Method::Bennett, &o, &|_, _| {}) else {
        return points;
    };
    let mut q = plain.cost.qubits;
    points.push(plain);
    while q > 1 {
        q -= 1;
        o.limits.max_qubits = Some(q);
        match build_one(spec, Method::Bennett, &o, &|_, _| {}) {
            Ok(p) => {
                q = p.cost.qubits;
                points.push(p);
            }
            Err(_) => break,
        }
    }
    points
}

fn rank(o: &Outcome, max_qubits: Option<usize>) -> (u8, u8, usize, usize, usize) {
    let verdict = match &o.verification {
        Verification::Ran(Verdict::Proven { .. }) | Verification::Skipped { .. } => 0,
        Verification::Ran(Verdict::Refuted { .. }) => 1,
    };
    let over = max_qubits.is_some_and(|q| o.cost.qubits > q) as u8;
    (
        over,
        verdict,
        o.cost.toffoli,
        o.cost.qubits,
        o.cost.mct_total(),
    )
}

fn pick_best(
    tried: Vec<(Method, Result<Outcome, BuildError>)>,
    max_qubits: Option<usize>,
) -> Result<Outcome, BuildError> {
    let summary: Vec<String> = tried
        .iter()
        .map(|(m, r)| match r {
            Ok(o) => format!("{m} ({} Toffoli)", o.cost.toffoli),
            Err(e) => format!("{m} (no circuit: {e})"),
        })
        .collect();
    let mut first_error = None;
    let mut best: Option<Outcome> = None;
    for (_, r) in tried {
        match r {
            Ok(o) => {
                if best
                    .as_ref()
                    .is_none_or(|b| rank(&o, max_qubits) < rank(b, max_qubits))
                {
                    best = Some(o);
                }
            }
            Err(e) => {
                first_error.get_or_insert(e);
            }
        }
    }
    if let (Some(q), Some(o)) = (max_qubits, &best) {
        if o.cost.qubits > q {
            return Err(first_error.unwrap_or(BuildError::Synth(SynthError::Budget {
                budget: q,
                needed: o.cost.qubits,
            })));
        }
    }
    match best {
        Some(mut o) => {
            o.notes.push(format!(
                "auto: tried {}; picked {}",
                summary.join(", "),
                o.method
            ));
            Ok(o)
        }
        None => Err(first_error.expect("at least one method applies to every spec")),
    }
}

/// Most gates for which the optimizer runs.
pub const OPTIMIZE_MAX_GATES: usize = 50_000;

/// The circuit after [`optimize`] (which never makes it worse once lowered),
/// and its lowered form.
fn optimized(mut mct: crate::Circuit) -> (crate::Circuit, crate::Circuit) {
    if mct.gates().len() <= OPTIMIZE_MAX_GATES {
        optimize(&mut mct);
    }
    let lowered = lower(&mct);
    (mct, lowered)
}

/// Synthesizes with one method, optimizes, lowers, measures, and verifies.
pub fn build_one(
    spec: &Spec,
    method: Method,
    opts: &BuildOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> Result<Outcome, BuildError> {
    if method == Method::Auto {
        let auto = BuildOptions {
            method: Method::Auto,
            ..*opts
        };
        return build_with_progress(spec, &auto, progress);
    }
    let t0 = Instant::now();
    let synthesis = synthesize(spec, method, &opts.limits)?;
    let t1 = Instant::now();
    let (mct, lowered) = optimized(synthesis.circuit);
    let t2 = Instant::now();
    let cost = Cost::measure(&mct, &lowered);
    let verification = match &opts.verify {
        Some(v) => Verification::Ran(verify_with_progress(&lowered, spec, v, progress)?),
        None => Verification::Skipped { verdict: "skipped" },
    };
    let t3 = Instant::now();
    Ok(Outcome {
        name: spec.name.clone(),
        method,
        mct,
        lowered,
        cost,
        verification,
        timings: Timings {
            synth: (t1 - t0).as_secs_f64(),
            lower: (t2 - t1).as_secs_f64(),
            verify: (t3 - t2).as_secs_f64(),
        },
        notes: synthesis.notes,
        form: spec.form,
    })
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
}

impl Outcome {
    /// The JSON-ready report.
    pub fn report(&self) -> Report<'_> {
        Report {
            name: self.name.as_deref(),
            method: self.method.name(),
            cost: &self.cost,
            verification: &self.verification,
            seconds: self.timings,
            notes: &self.notes,
        }
    }

    /// The lowered circuit as OpenQASM 2, with the header of design.md.
    pub fn qasm(&self) -> Result<String, WriteError> {
        write_qasm(
            &self.lowered,
            &QasmHeader {
                name: self.name.clone(),
                method: Some(self.method.name().to_string()),
                cost: Some(self.cost.clone()),
                phase: (self.form == OracleForm::Phase)
                    .then(|| self.lowered.register("y").first().copied())
                    .flatten(),
            },
        )
    }
}
