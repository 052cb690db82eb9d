//! The choice of method (`auto`), in one place: which methods apply to a
//! spec, how verified circuits are ranked, and the runs of `compare` and the
//! qubit trade-off curve that use the same ranking.

use super::build::build_one;
use super::grover::grover_facts;
use super::{BuildError, BuildOptions, Outcome, Verification};
use crate::progress::{Event, Progress, Task};
use crate::spec::{Spec, SpecBody};
use crate::synth::{network_of, Method, SynthError, EXACT_ESOP_MAX_INPUTS, PEBBLE_SAT_MAX_NODES};
use crate::verify::{Verdict, VerifyError};

/// Widest permutation for which `auto` also tries method `xag` (out of
/// place through two xor oracles); `--method xag` takes up to 16 lines.
pub const AUTO_OUT_OF_PLACE_MAX_LINES: usize = 10;

/// Every method that applies to `spec`, cheapest first; `thorough` adds the
/// slow ones (used by `compare`).
pub fn candidates(spec: &Spec, thorough: bool) -> Vec<Method> {
    match &spec.body {
        SpecBody::Function(f) => {
            let n = f.inputs.len();
            let mut v = vec![
                Method::ReedMuller,
                Method::Esop,
                Method::Bennett,
                Method::Xag,
                Method::Hierarchical,
            ];
            let instant = n <= 4 && f.outputs.len() == 1;
            if instant || (thorough && n <= EXACT_ESOP_MAX_INPUTS) {
                v.push(Method::EsopExact);
            }
            // The xor embedding of at most 4 lines has an exact optimum.
            if n + f.outputs.len() <= 4 {
                v.push(Method::Exact);
            }
            v
        }
        SpecBody::Permutation(p) if p.width() <= 4 => {
            vec![
                Method::Transform,
                Method::TransformBidir,
                Method::Exact,
                Method::Linear,
            ]
        }
        // Out of place through two xor oracles (`xag`) from 5 lines, up to
        // the width where its two decompositions stay under a few seconds.
        SpecBody::Permutation(p) if p.width() <= AUTO_OUT_OF_PLACE_MAX_LINES => vec![
            Method::Transform,
            Method::TransformBidir,
            Method::Linear,
            Method::Xag,
        ],
        SpecBody::Permutation(_) => vec![Method::Transform, Method::TransformBidir, Method::Linear],
        // Small registers: the same map as a table, by permutation synthesis.
        SpecBody::Arithmetic(a)
            if a.layout().sizes().iter().map(|s| s.1).sum::<usize>()
                <= crate::synth::TABLE_MAX_LINES =>
        {
            let mut v = vec![
                Method::Structural,
                Method::Transform,
                Method::TransformBidir,
            ];
            // An op that writes an output register is also a function of
            // its other lines.
            if crate::synth::arith_function(a).is_some() {
                v.extend([Method::ReedMuller, Method::Esop, Method::Bennett]);
            }
            v
        }
        SpecBody::Arithmetic(_) => vec![Method::Structural],
    }
}

/// Synthesizes, lowers, measures and (unless told not to) verifies `spec`.
pub fn build(spec: &Spec, opts: &BuildOptions) -> Result<Outcome, BuildError> {
    build_with_progress(spec, opts, &())
}

/// [`build`] reporting long work to `progress`.
///
/// Without a method (`auto`) every cheap method that applies is run and
/// verified, and the verified circuit with the fewest Toffolis (then qubits,
/// then gates) is returned; the notes say what was tried.
pub fn build_with_progress(
    spec: &Spec,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<Outcome, BuildError> {
    let mut out = match opts.method {
        Some(m) => build_one(spec, m, opts, progress)?,
        None => build_auto(spec, opts, progress)?,
    };
    out.grover = grover_facts(spec, max_states(opts), progress)?;
    Ok(out)
}

/// The states the verifier may simulate, also the budget of its count of marked inputs.
fn max_states(opts: &BuildOptions) -> u64 {
    opts.verify
        .map_or(crate::verify::DEFAULT_MAX_STATES, |v| v.max_states)
}

fn build_auto(
    spec: &Spec,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<Outcome, BuildError> {
    let mut tried: Vec<(Method, Result<Outcome, BuildError>)> = Vec::new();
    for m in candidates(spec, false) {
        if progress.cancelled() {
            return Err(BuildError::Synth(SynthError::Cancelled));
        }
        tried.push((m, build_one(spec, m, opts, progress)));
    }
    pick_best(tried, opts.limits.max_qubits)
}

/// Runs every method that applies (the slow ones too), each verified when
/// `opts.verify` asks for it; for `oraculum compare`.
pub fn compare(spec: &Spec, opts: &BuildOptions) -> Vec<(Method, Result<Outcome, BuildError>)> {
    compare_with_progress(spec, opts, &())
}

/// [`compare`] reporting long work to `progress`; once it is cancelled, the
/// methods not yet run are not started and their rows say so.
pub fn compare_with_progress(
    spec: &Spec,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Vec<(Method, Result<Outcome, BuildError>)> {
    let grover = grover_facts(spec, max_states(opts), progress);
    let methods = candidates(spec, true);
    let total = methods.len() as u64;
    let rows = methods
        .into_iter()
        .enumerate()
        .map(|(i, m)| {
            if progress.cancelled() {
                return (m, Err(BuildError::Synth(SynthError::Cancelled)));
            }
            progress.event(Event::Stage {
                task: Task::Compare(m.name()),
                done: i as u64,
                total,
            });
            let r = build_one(spec, m, opts, progress).and_then(|mut o| {
                o.grover = grover.clone()?;
                Ok(o)
            });
            (m, r)
        })
        .collect();
    progress.event(Event::Stage {
        task: Task::Compare(""),
        done: total,
        total,
    });
    rows
}

/// The method whose verified circuit ranks first among `rows`, as `auto`
/// ranks them.
pub fn best_of(rows: &[(Method, Result<Outcome, BuildError>)]) -> Option<Method> {
    rows.iter()
        .filter_map(|(m, r)| r.as_ref().ok().map(|o| (m, o)))
        .filter(|(_, o)| o.verification.is_proven())
        .min_by_key(|(_, o)| rank(o, None))
        .map(|(m, _)| *m)
}

/// Most network nodes for which [`tradeoff`] schedules.
pub const TRADEOFF_MAX_NODES: usize = 2000;

/// Most qubit budgets [`tradeoff`] builds below plain Bennett; past that it
/// steps several qubits at a time.
pub const TRADEOFF_MAX_POINTS: usize = 128;

/// Bennett's qubit/Toffoli trade-off: the points kept, and what cut the
/// curve short or coarse (a limit, or the SAT share running out).
#[derive(Clone, Debug, Default)]
pub struct Curve {
    /// From the most qubits to the fewest; more qubits always buy fewer Toffolis.
    pub points: Vec<Outcome>,
    /// What was cut short, and why.
    pub notes: Vec<String>,
}

/// Bennett's qubit/Toffoli trade-off for a function spec: see [`tradeoff_with_progress`].
pub fn tradeoff(spec: &Spec, opts: &BuildOptions) -> Curve {
    tradeoff_with_progress(spec, opts, &())
}

/// Bennett's qubit/Toffoli trade-off for a function spec: plain Bennett, then
/// fewer qubits a step at a time (one qubit, or more when that would take
/// more than [`TRADEOFF_MAX_POINTS`] builds) until no schedule fits. Networks
/// past [`TRADEOFF_MAX_NODES`] nodes get no curve. The SAT pebbling of all the
/// points together gets `opts.limits.exact_seconds` (each point at most a
/// quarter of it); once spent, the points are checkpoint schedules, and a
/// note says from which budget. Each point is verified as `opts` says. Only
/// the points no smaller point beats are kept: along the curve, more qubits
/// always buy fewer Toffolis (a circuit within fewer qubits fits a larger
/// budget too).
pub fn tradeoff_with_progress(spec: &Spec, opts: &BuildOptions, progress: &dyn Progress) -> Curve {
    let mut curve = Curve::default();
    let SpecBody::Function(f) = &spec.body else {
        return curve;
    };
    let Ok(net) = network_of(f) else {
        return curve;
    };
    if net.gates() > TRADEOFF_MAX_NODES {
        curve.notes.push(format!(
            "the qubit trade-off curve is skipped: the network has {} nodes, more than {TRADEOFF_MAX_NODES}",
            net.gates()
        ));
        return curve;
    }
    let mut o = *opts;
    o.limits.max_qubits = None;
    let plain = match build_one(spec, Method::Bennett, &o, progress) {
        Ok(p) => p,
        Err(e) => {
            curve
                .notes
                .push(format!("the qubit trade-off curve is skipped: {e}"));
            return curve;
        }
    };
    // Below `floor` qubits only the registers would be left.
    let floor = f.inputs.len() + f.outputs.len();
    let top = plain.cost.qubits;
    let span = top.saturating_sub(floor);
    let step = span.div_ceil(TRADEOFF_MAX_POINTS).max(1);
    if step > 1 {
        curve.notes.push(format!(
            "the curve steps {step} qubits at a time (at most {TRADEOFF_MAX_POINTS} budgets)"
        ));
    }
    // Synthesis time counts against the SAT share only where SAT pebbling runs.
    let sat = net.gates() <= PEBBLE_SAT_MAX_NODES;
    let share = opts.limits.exact_seconds.max(0.0);
    let mut left = share;
    let mut spent_at = None;
    let mut points = vec![plain];
    let mut q = top;
    while q > floor + 1 {
        if progress.cancelled() {
            curve.notes.push("the curve was cancelled".into());
            break;
        }
        progress.event(Event::Stage {
            task: Task::Curve,
            done: (top - q) as u64,
            total: span as u64,
        });
        q = q.saturating_sub(step).max(floor + 1);
        o.limits.max_qubits = Some(q);
        o.limits.exact_seconds = left.clamp(0.0, share / 4.0);
        if sat && left <= 0.0 && spent_at.is_none() {
            spent_at = Some(q);
        }
        match build_one(spec, Method::Bennett, &o, progress) {
            Ok(p) => {
                if sat {
                    left -= p.timings.synth;
                }
                q = p.cost.qubits;
                points.push(p);
            }
            Err(BuildError::Synth(SynthError::Budget { .. })) => break,
            // SAT had no time left and no checkpoint schedule fits.
            Err(BuildError::Synth(SynthError::OutOfTime { .. })) if spent_at.is_some() => {
                curve.notes.push(format!(
                    "the curve stops at {q} qubits: no checkpoint schedule fits and the SAT share is spent"
                ));
                break;
            }
            Err(e) => {
                curve
                    .notes
                    .push(format!("the curve stops at {q} qubits: {e}"));
                break;
            }
        }
    }
    progress.event(Event::Stage {
        task: Task::Curve,
        done: span as u64,
        total: span as u64,
    });
    if let Some(q) = spent_at {
        curve.notes.push(format!(
            "SAT pebbling spent the curve's {share} s (--exact-seconds) before {q} qubits: from there on the points are checkpoint schedules"
        ));
    }
    // From the fewest qubits up, keep a point only when it beats every
    // point below it.
    let mut front: Vec<Outcome> = Vec::with_capacity(points.len());
    for p in points.into_iter().rev() {
        if front
            .last()
            .is_none_or(|b| p.cost.toffoli_equivalent < b.cost.toffoli_equivalent)
        {
            front.push(p);
        }
    }
    front.reverse();
    curve.points = front;
    curve
}

/// The ranking of `auto` and `compare`: within the qubit budget, then
/// verified, then fewest Toffoli-equivalents (Toffolis, plus temporary ANDs
/// in `measure` mode; in `toffoli` mode there are none), T-count, qubits
/// and gates before lowering.
fn rank(o: &Outcome, max_qubits: Option<usize>) -> (u8, u8, usize, usize, usize, usize) {
    let verdict = match &o.verification {
        Verification::Ran(Verdict::Proven { .. }) | Verification::Skipped { .. } => 0,
        Verification::Ran(Verdict::Refuted { .. }) => 1,
    };
    let over = max_qubits.is_some_and(|q| o.cost.qubits > q) as u8;
    (
        over,
        verdict,
        o.cost.toffoli_equivalent,
        // Ties in Toffoli-equivalents go to fewer T gates (in measure mode a
        // temporary AND costs 4 T where a Toffoli costs 7).
        o.cost.t_count,
        o.cost.qubits,
        o.cost.mct_total(),
    )
}

/// Which failure says most when no method made a circuit: a budget of the
/// verifier that stopped them, then a qubit budget, a search budget, another
/// limit, and last a method that does not apply at all.
fn telling(e: &BuildError) -> u8 {
    match e {
        BuildError::Synth(SynthError::Cancelled) | BuildError::Verify(VerifyError::Cancelled) => 0,
        BuildError::Verify(v) if v.is_limit() => 0,
        BuildError::Synth(SynthError::Budget { .. }) => 1,
        BuildError::Synth(SynthError::OutOfTime { .. }) => 2,
        BuildError::Synth(SynthError::Limit { .. }) => 3,
        BuildError::Verify(_) => 4,
        BuildError::Synth(SynthError::NotApplicable { .. }) => 5,
    }
}

fn pick_best(
    tried: Vec<(Method, Result<Outcome, BuildError>)>,
    max_qubits: Option<usize>,
) -> Result<Outcome, BuildError> {
    let summary: Vec<String> = tried
        .iter()
        .map(|(m, r)| match r {
            Ok(o) if o.cost.temporary_and > 0 => {
                format!("{m} ({} Toffoli-equivalent)", o.cost.toffoli_equivalent)
            }
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
                if first_error
                    .as_ref()
                    .is_none_or(|f| telling(&e) < telling(f))
                {
                    first_error = Some(e);
                }
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
