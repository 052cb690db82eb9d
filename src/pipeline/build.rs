//! One method through the whole job: synthesize, optimize, lower, measure, verify.

use super::{BuildError, BuildOptions, Outcome, Timings, Verification};
use crate::circuit::layout::OUTPUTS;
use crate::circuit::{Circuit, Cost};
use crate::lower::lower;
use crate::opt::optimize;
use crate::progress::Progress;
use crate::spec::{OracleForm, Spec};
use crate::synth::{synthesize, Method};
use crate::verify::{verify_inverse_with_progress, verify_with_progress};
use std::time::Instant;

/// Most gates for which the optimizer runs.
pub const OPTIMIZE_MAX_GATES: usize = 50_000;

/// The circuit after [`optimize`] (which never makes it worse once lowered),
/// and its lowered form.
fn optimized(mut mct: Circuit) -> (Circuit, Circuit) {
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
    progress: &dyn Progress,
) -> Result<Outcome, BuildError> {
    let t0 = Instant::now();
    let synthesis = synthesize(spec, method, &opts.limits, progress)?;
    let t1 = Instant::now();
    let (mct, mut lowered) = optimized(synthesis.circuit);
    if spec.form == OracleForm::Phase {
        lowered.set_phase(lowered.register(OUTPUTS).first().copied());
    }
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
        stop: synthesis.stop,
        form: spec.form,
        inverse: false,
        grover: None,
    })
}

/// The inverse of a built oracle (its gates in reverse order, before and
/// after lowering, with the same cost), verified against the inverse of the
/// spec's map when `opts` asks for verification. Inverting twice gives the
/// oracle back.
pub fn invert(
    out: Outcome,
    spec: &Spec,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<Outcome, BuildError> {
    let t0 = Instant::now();
    let mct = out.mct.inverse();
    let lowered = out.lowered.inverse();
    let inverse = !out.inverse;
    let verification = match &opts.verify {
        Some(v) if inverse => {
            Verification::Ran(verify_inverse_with_progress(&lowered, spec, v, progress)?)
        }
        Some(v) => Verification::Ran(verify_with_progress(&lowered, spec, v, progress)?),
        None => Verification::Skipped { verdict: "skipped" },
    };
    let cost = Cost::measure(&mct, &lowered);
    Ok(Outcome {
        mct,
        lowered,
        cost,
        verification,
        timings: Timings {
            verify: out.timings.verify + t0.elapsed().as_secs_f64(),
            ..out.timings
        },
        inverse,
        ..out
    })
}
