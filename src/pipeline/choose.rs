//! The choice of method (`auto`), in one place: which methods apply to a
//! spec, how verified circuits are ranked, and the runs of `compare` and the
//! qubit trade-off curve that use the same ranking.

use super::build::build_one;
use super::grover::grover_facts;
use super::{BuildError, BuildOptions, Outcome, Verification};
use crate::progress::Progress;
use crate::spec::{Spec, SpecBody};
use crate::synth::{network_of, Method, SynthError, EXACT_ESOP_MAX_INPUTS};
use crate::verify::{Verdict, VerifyError};

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
            vec![Method::Transform, Method::TransformBidir, Method::Exact]
        }
        SpecBody::Permutation(_) => vec![Method::Transform, Method::TransformBidir],
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
    let grover = grover_facts(spec, max_states(opts), &());
    candidates(spec, true)
        .into_iter()
        .map(|m| {
            let r = build_one(spec, m, opts, &()).and_then(|mut o| {
                o.grover = grover.clone()?;
                Ok(o)
            });
            (m, r)
        })
        .collect()
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
pub const TRADEOFF_MAX_NODES: usize = 200;

/// Bennett's qubit/Toffoli trade-off for a function spec: plain Bennett, then
/// one qubit fewer at a time until no schedule fits (or a network too large to
/// schedule, past [`TRADEOFF_MAX_NODES`] nodes, stops it: [`tradeoff_note`]
/// says so). Each point is verified as `opts` says. Only the points no
/// smaller point beats are kept: along the curve, more qubits always buy
/// fewer Toffolis (a circuit within fewer qubits fits a larger budget too).
pub fn tradeoff(spec: &Spec, opts: &BuildOptions) -> Vec<Outcome> {
    let SpecBody::Function(f) = &spec.body else {
        return Vec::new();
    };
    let Ok(net) = network_of(f) else {
        return Vec::new();
    };
    if net.gates() > TRADEOFF_MAX_NODES {
        return Vec::new();
    }
    let mut points = Vec::new();
    let mut o = *opts;
    o.limits.max_qubits = None;
    let Ok(plain) = build_one(spec, Method::Bennett, &o, &()) else {
        return points;
    };
    let mut q = plain.cost.qubits;
    points.push(plain);
    while q > 1 {
        q -= 1;
        o.limits.max_qubits = Some(q);
        match build_one(spec, Method::Bennett, &o, &()) {
            Ok(p) => {
                q = p.cost.qubits;
                points.push(p);
            }
            Err(_) => break,
        }
    }
    // From the fewest qubits up, keep a point only when it beats every
    // point below it.
    let mut front: Vec<Outcome> = Vec::with_capacity(points.len());
    for p in points.into_iter().rev() {
        if front.last().is_none_or(|b| p.cost.toffoli < b.cost.toffoli) {
            front.push(p);
        }
    }
    front.reverse();
    front
}

/// Why [`tradeoff`] gives no curve for `spec`, when the reason is a limit.
pub fn tradeoff_note(spec: &Spec) -> Option<String> {
    let SpecBody::Function(f) = &spec.body else {
        return None;
    };
    let net = network_of(f).ok()?;
    (net.gates() > TRADEOFF_MAX_NODES).then(|| {
        format!(
            "the qubit trade-off curve is skipped: the network has {} nodes, more than {TRADEOFF_MAX_NODES}",
            net.gates()
        )
    })
}

/// The ranking of `auto` and `compare`: within the qubit budget, then
/// verified, then fewest Toffolis, qubits and gates before lowering.
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
