//! The independent verifier: exhaustive bit-sliced simulation of every basis state.
//!
//! This module shares no code with synthesis, optimization or lowering. It reads
//! only the circuit's gate list and register names and the spec's data (tables,
//! expressions, images), keeps its own simulator and its own expression evaluator,
//! and binds lines to spec variables by register name, exactly as it would for a
//! circuit read from a file written by anyone.
//!
//! Basis states are numbered by the free lines (inputs and targets): for a
//! function spec, state bit `j < n` is `x[j]` and bit `n + k` is `y[k]`; for a
//! permutation, bit `j` is `x[j]`. Ancillae start at 0. Each machine word holds
//! 64 states; a block of [`BLOCK_WORDS`] words runs through the whole gate list
//! before the next block, and blocks run in parallel.

mod bind;
mod count;
mod eval;
mod exhaustive;
mod fused;
mod kernel;
mod models;
mod program;
mod reference;
mod ripple;
mod sat;
mod shard;
mod sweep;
mod verdict;

pub use bind::free_lines;
pub use count::count_marked;
pub use models::{count_models, CountStop, MODEL_COUNT_MAX_NODES, MODEL_COUNT_MAX_WORK};
pub use sat::{circuits_equivalent, sat_equivalence, SatError, SatOutcome, SAT_MAX_TABLE_INPUTS};
pub use shard::{
    fingerprint, merge_shards, verify_shard, ShardError, ShardResult, MAX_SHARDS, SHARD_FORMAT,
};
pub use verdict::{Counterexample, RegisterValue, Verdict};

use crate::circuit::{Circuit, Gate, Kind};
use crate::limit::Limit;
use crate::progress::Progress;
use crate::spec::Spec;

/// Words (of 64 basis states) per block: 8,192 states. The gate loop is
/// fastest at 128 words a row while a block's rows stay in the L1 data cache
/// (up to about 32 lines) and no slower than at 64 words up to 64 lines
/// (`benches/limit.rs`, gate rows).
pub const BLOCK_WORDS: usize = 128;

/// Default for [`VerifyOptions::max_states`]: 2^30 basis states.
pub const DEFAULT_MAX_STATES: u64 = 1 << 30;

/// How to prove a circuit.
#[derive(
    Clone,
    Copy,
    Debug,
    Default,
    PartialEq,
    Eq,
    strum::EnumIter,
    strum::IntoStaticStr,
    strum::EnumString,
)]
#[strum(serialize_all = "kebab-case")]
pub enum Route {
    /// Exhaustive simulation within `max_states`, SAT past it.
    #[default]
    Auto,
    /// Exhaustive simulation only.
    Exhaustive,
    /// SAT equivalence only.
    Sat,
}

impl Route {
    /// Every route.
    pub fn all() -> impl Iterator<Item = Route> {
        <Route as strum::IntoEnumIterator>::iter()
    }

    /// The user-visible name.
    pub fn name(self) -> &'static str {
        self.into()
    }

    /// Looks a route up by name.
    pub fn from_name(name: &str) -> Option<Route> {
        name.parse().ok()
    }
}

/// Default for [`VerifyOptions::sat_seconds`].
pub const DEFAULT_SAT_SECONDS: f64 = 300.0;

/// Options of a verification run.
#[derive(Clone, Copy, Debug)]
pub struct VerifyOptions {
    /// The most basis states to simulate; past it the run is refused or goes to
    /// SAT (`--max-states`).
    pub max_states: u64,
    /// Which proof to use.
    pub route: Route,
    /// Seconds the SAT solver may take (`--sat-seconds`).
    pub sat_seconds: f64,
}

impl Default for VerifyOptions {
    fn default() -> Self {
        VerifyOptions {
            max_states: DEFAULT_MAX_STATES,
            route: Route::Auto,
            sat_seconds: DEFAULT_SAT_SECONDS,
        }
    }
}

/// Why a verification could not run.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum VerifyError {
    /// Too many basis states for the exhaustive check.
    #[error("exhaustive verification needs 2^{bits} basis states, over the limit of {limit} (nothing was verified)")]
    TooLarge {
        /// Free lines, so `2^bits` states.
        bits: u32,
        /// The limit in force.
        limit: u64,
    },
    /// The circuit's registers do not fit the spec.
    #[error("the circuit does not fit the spec: {0}")]
    Binding(String),
    /// The SAT solver ran out of time.
    #[error("the SAT check did not finish within {0} s (nothing was verified)")]
    SatTimeout(f64),
    /// SAT cannot encode this spec or confirm its answer.
    #[error(transparent)]
    Sat(#[from] SatError),
    /// The caller stopped the check.
    #[error("the check was stopped before it ended (nothing was verified)")]
    Cancelled,
}

impl VerifyError {
    /// The budget that stopped the check, when a budget (not the input) did.
    pub fn limit(&self) -> Option<Limit> {
        match self {
            VerifyError::TooLarge { .. } => Some(Limit::States),
            VerifyError::SatTimeout(_) => Some(Limit::SatSeconds),
            _ => None,
        }
    }

    /// True when a resource limit, not the input, stopped the check.
    pub fn is_limit(&self) -> bool {
        self.limit().is_some()
    }
}

/// Proves or refutes that `circuit` realizes `spec` on every basis state.
pub fn verify(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
) -> Result<Verdict, VerifyError> {
    verify_with_progress(circuit, spec, opts, &())
}

/// [`verify`], reporting states done as blocks finish (from several threads;
/// the reports are not ordered).
pub fn verify_with_progress(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    progress: &dyn Progress,
) -> Result<Verdict, VerifyError> {
    let free_bits = free_lines(circuit, spec)?;
    if let Some(problem) = bind::form_mismatch(circuit, spec) {
        return Ok(Verdict::form_refuted(problem));
    }
    let fits = free_bits < 63 && (1u64 << free_bits) <= opts.max_states;
    let use_sat = match opts.route {
        Route::Sat => true,
        Route::Exhaustive => false,
        Route::Auto => !fits,
    };
    if !use_sat {
        let words = if free_bits < 63 {
            (1u64 << free_bits).div_ceil(64)
        } else {
            u64::MAX
        };
        return exhaustive::verify_words(circuit, spec, opts, progress, 0, words);
    }
    let budget = std::time::Duration::from_secs_f64(opts.sat_seconds.max(0.0));
    match sat_equivalence(circuit, spec, budget, progress) {
        Ok(SatOutcome::Equivalent) => Ok(Verdict::Proven {
            by: "sat",
            free_bits,
            states: 0,
            outside_domain: 0,
        }),
        Ok(SatOutcome::Counterexample(c)) => Ok(Verdict::Refuted {
            counterexample: Box::new(c),
        }),
        Ok(SatOutcome::Timeout) if progress.cancelled() => Err(VerifyError::Cancelled),
        Ok(SatOutcome::Timeout) => Err(VerifyError::SatTimeout(opts.sat_seconds)),
        Err(SatError::Unsupported(why)) if opts.route == Route::Auto => {
            let _ = why;
            Err(VerifyError::TooLarge {
                bits: free_bits,
                limit: opts.max_states,
            })
        }
        Err(e) => Err(e.into()),
    }
}

/// Proves or refutes that `circuit` realizes the inverse of `spec`'s map.
///
/// The verifier runs the circuit backwards (its own reversal of the gate
/// list; x, cx and ccx are their own inverses, and a phase wrapper is the same
/// both ways) and proves that against the map itself. That is a proof of the
/// inverse: every spec's map is a bijection of the free lines' basis states
/// with the ancillae at 0 (an xor oracle is its own inverse, a permutation and
/// an arithmetic op are bijections, `add_mod`'s domain is mapped onto
/// itself), so `C` backwards equals `f` on those states exactly when `C`
/// equals `f^-1` on them. A refutation names a state of the backward run.
pub fn verify_inverse_with_progress(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    progress: &dyn Progress,
) -> Result<Verdict, VerifyError> {
    let mut backwards = circuit.without_gates();
    // Backwards, a measured uncompute is the temporary AND it undoes and a
    // temporary AND the uncompute of the AND it made (each requires what the
    // other ensures).
    backwards.set_gates(
        circuit
            .gates()
            .iter()
            .rev()
            .map(|g| {
                let c = g.controls();
                match g.kind() {
                    Kind::Measured => Gate::temporary_and(c[0], c[1], g.target()),
                    Kind::And => Gate::measured(c[0], c[1], g.target()),
                    Kind::Flip => Some(g.clone()),
                }
                .expect("the gate's lines are distinct")
            })
            .collect(),
    );
    let mut v = verify_with_progress(&backwards, spec, opts, progress)?;
    if let Verdict::Refuted { counterexample } = &mut v {
        if counterexample.state.is_some() {
            counterexample.problem = format!(
                "run backwards, the circuit takes 'input' to 'actual', so it takes 'actual' to 'input' where the inverse map takes 'expected' there: {}",
                counterexample.problem
            );
        }
    }
    Ok(v)
}

/// Proves or refutes that circuits `a` and `b` act alike on every basis
/// state of their registers (ancillae start at 0 and must end alike), by a
/// SAT miter within `opts.sat_seconds`.
pub fn verify_against(
    a: &Circuit,
    b: &Circuit,
    opts: &VerifyOptions,
) -> Result<Verdict, VerifyError> {
    let budget = std::time::Duration::from_secs_f64(opts.sat_seconds.max(0.0));
    let free_bits = a
        .registers()
        .iter()
        .filter(|(n, _)| n != crate::circuit::layout::ANCILLAE)
        .map(|(_, s)| *s as u32)
        .sum();
    if a.phase().is_some() != b.phase().is_some()
        || a.phase()
            .map(|l| &a.lines()[l.index()])
            .map(|i| (&i.register, i.index))
            != b.phase()
                .map(|l| &b.lines()[l.index()])
                .map(|i| (&i.register, i.index))
    {
        return Ok(Verdict::form_refuted(
            "the two circuits differ in oracle form: phase wrappers on different lines, or on one only"
                .into(),
        ));
    }
    match circuits_equivalent(a, b, budget)? {
        SatOutcome::Equivalent => Ok(Verdict::Proven {
            by: "sat",
            free_bits,
            states: 0,
            outside_domain: 0,
        }),
        SatOutcome::Counterexample(c) => Ok(Verdict::Refuted {
            counterexample: Box::new(c),
        }),
        SatOutcome::Timeout => Err(VerifyError::SatTimeout(opts.sat_seconds)),
    }
}
