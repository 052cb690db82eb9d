//! Sharded exhaustive verification: one slice of the state space per job, and
//! a merge that trusts nothing in the result files it can recompute.
//!
//! A shard file states its slice, its counts and its verdict. `merge` is given
//! the circuit and spec again and recomputes everything it can: the files'
//! fingerprints (SHA-256), the free lines, every shard's word range from
//! `K/N`, every state count from that range and the op's domain, and each
//! refutation, which it re-checks on its state. A set is proven only when
//! every shard is there once, proven, and consistent with all of that.

use super::exhaustive::verify_words;
use super::reference::states_inside_domain;
use super::{Counterexample, Verdict, VerifyError, VerifyOptions};
use crate::circuit::Circuit;
use crate::progress::Progress;
use crate::spec::Spec;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

/// The `format` field of every shard result file.
pub const SHARD_FORMAT: &str = "oraculum-shard-2";

/// Most shards a state space is split into.
pub const MAX_SHARDS: u64 = 1 << 20;

/// The result of one shard, as written to its file.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardResult {
    /// Always [`SHARD_FORMAT`].
    pub format: String,
    /// SHA-256 of the circuit file's bytes, in hex.
    pub circuit_hash: String,
    /// SHA-256 of the spec file's bytes, in hex.
    pub spec_hash: String,
    /// This shard's number, from 0.
    pub shard: u64,
    /// How many shards in all.
    pub of: u64,
    /// Free lines: the whole space has `2^free_bits` basis states.
    pub free_bits: u32,
    /// First word (64 states) of the slice.
    pub first_word: u64,
    /// One past the last word of the slice.
    pub end_word: u64,
    /// Whether every state of the slice checked out.
    pub proven: bool,
    /// States checked.
    pub states: u64,
    /// States outside the op's domain.
    pub outside_domain: u64,
    /// The first failing state of the slice, if any.
    pub counterexample: Option<Counterexample>,
}

/// SHA-256 of `bytes`, as hex: a fingerprint for matching shard files to inputs.
pub fn fingerprint(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The words `[first, end)` of shard `k` of `of` of a space of `2^bits` states.
fn slice(bits: u32, k: u64, of: u64) -> (u64, u64) {
    let words = (1u64 << bits).div_ceil(64);
    let first = (words as u128 * k as u128 / of as u128) as u64;
    let end = (words as u128 * (k + 1) as u128 / of as u128) as u64;
    (first, end)
}

/// The states in words `[first, end)` of a space of `2^bits` states.
fn span(bits: u32, first: u64, end: u64) -> u64 {
    (end.saturating_mul(64)).min(1u64 << bits) - (first.saturating_mul(64)).min(1u64 << bits)
}

/// Checks slice `shard` of `of` equal slices of the state space exhaustively.
/// `circuit_bytes` and `spec_bytes` are the files' contents, fingerprinted into
/// the result so that `merge` can refuse results of different inputs.
#[allow(clippy::too_many_arguments)]
pub fn verify_shard(
    circuit: &Circuit,
    spec: &Spec,
    opts: &VerifyOptions,
    shard: u64,
    of: u64,
    circuit_bytes: &[u8],
    spec_bytes: &[u8],
    progress: &dyn Progress,
) -> Result<ShardResult, VerifyError> {
    let bits = super::free_lines(circuit, spec)?;
    if bits >= 63 {
        return Err(VerifyError::TooLarge {
            bits,
            limit: opts.max_states,
        });
    }
    let (first, end) = slice(bits, shard, of);
    let v = verify_words(circuit, spec, opts, progress, first, end)?;
    let (proven, states, outside_domain, counterexample) = match v {
        Verdict::Proven {
            states,
            outside_domain,
            ..
        } => (true, states, outside_domain, None),
        Verdict::Refuted { counterexample } => (false, 0, 0, Some(*counterexample)),
    };
    Ok(ShardResult {
        format: SHARD_FORMAT.into(),
        circuit_hash: fingerprint(circuit_bytes),
        spec_hash: fingerprint(spec_bytes),
        shard,
        of,
        free_bits: bits,
        first_word: first,
        end_word: end,
        proven,
        states,
        outside_domain,
        counterexample,
    })
}

/// Why a set of shard results cannot be merged.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ShardError {
    /// No results given.
    #[error("no shard results to merge")]
    Empty,
    /// Results of different circuits, specs or splits, or results that
    /// contradict what the merge recomputes.
    #[error("shard results do not belong together: {0}")]
    Mismatch(String),
    /// Some shards are missing.
    #[error("shards missing: {0:?} of 0..{1}; nothing is proven until every shard is in")]
    Missing(Vec<u64>, u64),
    /// A shard appears twice.
    #[error("shard {0} appears more than once")]
    Duplicate(u64),
    /// The circuit does not bind to the spec.
    #[error(transparent)]
    Verify(#[from] VerifyError),
}

/// Combines the results of all `of` shards of `circuit` against `spec` (the
/// files whose bytes are `circuit_bytes` and `spec_bytes`) into one verdict.
/// Refuses a set with gaps, overlaps, results of other inputs, or any field
/// that differs from what it recomputes.
pub fn merge_shards(
    results: &[ShardResult],
    circuit: &Circuit,
    spec: &Spec,
    circuit_bytes: &[u8],
    spec_bytes: &[u8],
) -> Result<Verdict, ShardError> {
    let mismatch = |m: String| Err(ShardError::Mismatch(m));
    let first = results.first().ok_or(ShardError::Empty)?;
    let of = first.of;
    if of == 0 || of > MAX_SHARDS {
        return mismatch(format!("a split into {of} shards (1 to {MAX_SHARDS})"));
    }
    let circuit_hash = fingerprint(circuit_bytes);
    let spec_hash = fingerprint(spec_bytes);
    let bits = super::free_lines(circuit, spec)?;
    if bits >= 63 {
        return mismatch(format!(
            "2^{bits} basis states cannot be split into shard files"
        ));
    }
    for r in results {
        if r.format != SHARD_FORMAT {
            return mismatch(format!("unknown format '{}'", r.format));
        }
        if r.circuit_hash != circuit_hash || r.spec_hash != spec_hash {
            return mismatch(format!(
                "shard {} was made from another circuit or spec than the ones given",
                r.shard
            ));
        }
        if r.of != of || r.shard >= of {
            return mismatch(format!(
                "shard {} of {} in a split into {of}",
                r.shard, r.of
            ));
        }
        if r.free_bits != bits {
            return mismatch(format!(
                "shard {} says {} free lines; the circuit bound to the spec has {bits}",
                r.shard, r.free_bits
            ));
        }
        let (lo, hi) = slice(bits, r.shard, of);
        if (r.first_word, r.end_word) != (lo, hi) {
            return mismatch(format!(
                "shard {} covers words {}..{}; shard {} of {of} is words {lo}..{hi}",
                r.shard, r.first_word, r.end_word, r.shard
            ));
        }
        match (r.proven, &r.counterexample) {
            (true, None) => {
                let all = span(bits, lo, hi);
                let inside = states_inside_domain(spec, bits, lo * 64, (hi * 64).min(1 << bits));
                if r.states != inside || r.outside_domain != all - inside {
                    return mismatch(format!(
                        "shard {} says {} states checked and {} outside the domain; its slice has {inside} and {}",
                        r.shard,
                        r.states,
                        r.outside_domain,
                        all - inside
                    ));
                }
            }
            (false, Some(c)) => {
                // A refutation is re-checked on its own state.
                let state = c.state.filter(|&s| s >= lo * 64 && s < hi * 64);
                let Some(state) = state else {
                    return mismatch(format!(
                        "shard {} is refuted on a state outside its slice",
                        r.shard
                    ));
                };
                let again = verify_words(
                    circuit,
                    spec,
                    &VerifyOptions::default(),
                    &(),
                    state / 64,
                    state / 64 + 1,
                )?;
                if !matches!(again, Verdict::Refuted { .. }) {
                    return mismatch(format!(
                        "shard {} is refuted on state {state}, which checks out",
                        r.shard
                    ));
                }
            }
            (true, Some(_)) => {
                return mismatch(format!(
                    "shard {} is proven and carries a counterexample",
                    r.shard
                ))
            }
            (false, None) => {
                return mismatch(format!(
                    "shard {} is refuted without a counterexample",
                    r.shard
                ))
            }
        }
    }
    let mut seen = vec![false; of as usize];
    for r in results {
        if seen[r.shard as usize] {
            return Err(ShardError::Duplicate(r.shard));
        }
        seen[r.shard as usize] = true;
    }
    let missing: Vec<u64> = (0..of).filter(|&k| !seen[k as usize]).collect();
    if !missing.is_empty() {
        return Err(ShardError::Missing(missing, of));
    }
    let mut sorted: Vec<&ShardResult> = results.iter().collect();
    sorted.sort_by_key(|r| r.shard);
    if let Some(r) = sorted.iter().find(|r| !r.proven) {
        let c = r.counterexample.clone().expect("checked above");
        return Ok(Verdict::Refuted {
            counterexample: Box::new(c),
        });
    }
    Ok(Verdict::Proven {
        by: "exhaustive",
        free_bits: bits,
        states: sorted.iter().map(|r| r.states).sum(),
        outside_domain: sorted.iter().map(|r| r.outside_domain).sum(),
    })
}
