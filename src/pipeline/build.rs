//! One method through the whole job: synthesize, optimize, lower, measure, verify.

use super::{BuildError, BuildOptions, Outcome, Timings, Verification};
use crate::circuit::layout::OUTPUTS;
use crate::circuit::measure::measure_uncomputes;
use crate::circuit::{Circuit, Cost, Uncompute};
use crate::limit::Limit;
use crate::lower::{lower, lowered_len};
use crate::opt::optimize;
use crate::progress::Progress;
use crate::spec::{OracleForm, Spec};
use crate::synth::{synthesize_in, Method, SynthError};
use crate::verify::{verify_inverse_with_progress, verify_with_progress};
use std::time::Instant;

/// Most gates for which the optimizer runs.
pub const OPTIMIZE_MAX_GATES: usize = 50_000;

/// Lowering may make at most this many gates per gate the gate limit allows
/// (16,000,000 lowered gates at the default of 2,000,000, about 0.6 GB).
pub const LOWERED_PER_GATE: usize = 8;

/// The circuit after [`optimize`] (which never makes it worse once lowered),
/// and its lowered form. The lowered size is counted, and refused past
/// [`LOWERED_PER_GATE`] times the gate limit, before any lowered gate is built.
fn optimized(mut mct: Circuit, max_gates: usize) -> Result<(Circuit, Circuit), SynthError> {
    if mct.gates().len() <= OPTIMIZE_MAX_GATES {
        optimize(&mut mct);
    }
    let limit = max_gates.saturating_mul(LOWERED_PER_GATE);
    let value = lowered_len(&mct);
    if value > limit {
        return Err(SynthError::Limit {
            what: "the lowered gate count",
            value,
            limit,
            kind: Limit::Gates,
        });
    }
    let lowered = lower(&mct);
    Ok((mct, lowered))
}

/// Synthesizes with one method, optimizes, lowers, measures, and verifies.
pub fn build_one(
    spec: &Spec,
    method: Method,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<Outcome, BuildError> {
    let t0 = Instant::now();
    let synthesis = synthesize_in(spec, method, &opts.limits, opts.uncompute, progress)?;
    let t1 = Instant::now();
    let (mut mct, mut lowered) = optimized(synthesis.circuit, opts.limits.max_gates)?;
    if opts.uncompute == Uncompute::Measure {
        // After optimization (which leaves circuits with measured gates
        // alone) and lowering, so that the chains lowering adds are measured
        // too; the circuit before lowering gets the same rewrite for drawings.
        measure_uncomputes(&mut lowered);
        measure_uncomputes(&mut mct);
    }
    if spec.form == OracleForm::Phase {
        lowered.set_phase(lowered.register(OUTPUTS).first().copied());
    }
    let mut notes = synthesis.notes;
    if spec.controlled && !matches!(spec.body, crate::spec::SpecBody::Arithmetic(_)) {
        // The control's cost: the same circuit lowered without it.
        let plain = lower(&crate::synth::control::without_control(&mct));
        let toffolis = |c: &Circuit| c.gates().iter().filter(|g| g.controls().len() == 2).count();
        let (with, without) = (toffolis(&lowered), toffolis(&plain));
        notes.push(format!(
            "the control costs {} Toffoli(s): {with} with it, {without} without",
            with.saturating_sub(without)
        ));
    }
    let t2 = Instant::now();
    let mut cost = Cost::measure(&mct, &lowered);
    cost.mode = cost.mode.max(opts.uncompute);
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
        notes,
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
    let mut cost = Cost::measure(&mct, &lowered);
    cost.mode = cost.mode.max(out.cost.mode);
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
