//! Sharded exhaustive verification: one slice of the state space per job, and a
//! merge that accepts only a complete, consistent set of slices.

use super::exhaustive::verify_words;
use super::{Counterexample, Verdict, VerifyError, VerifyOptions};
use crate::circuit::Circuit;
use crate::progress::Progress;
use crate::spec::Spec;
use serde::{Deserialize, Serialize};

/// The `format` field of every shard result file.
pub const SHARD_FORMAT: &str = "oraculum-shard-1";

/// The result of one shard, as written to its file.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardResult {
    /// Always [`SHARD_FORMAT`].
    pub format: String,
    /// FNV-1a hash of the circuit file's bytes.
    pub circuit_hash: String,
    /// FNV-1a hash of the spec file's bytes.
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

/// FNV-1a, 64 bits, as hex: a fingerprint for matching shard files to inputs.
pub fn fingerprint(bytes: &[u8]) -> String {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    format!("{h:016x}")
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
    let words = (1u64 << bits).div_ceil(64);
    let first = (words as u128 * shard as u128 / of as u128) as u64;
    let end = (words as u128 * (shard + 1) as u128 / of as u128) as u64;
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
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum ShardError {
    /// No results given.
    #[error("no shard results to merge")]
    Empty,
    /// Results of different circuits, specs or splits.
    #[error("shard results do not belong together: {0}")]
    Mismatch(String),
    /// Some shards are missing.
    #[error("shards missing: {0:?} of 0..{1}; nothing is proven until every shard is in")]
    Missing(Vec<u64>, u64),
    /// A shard appears twice.
    #[error("shard {0} appears more than once")]
    Duplicate(u64),
}

/// Combines the results of all `of` shards into one verdict. Refuses a set with
/// gaps, overlaps, or results of other inputs.
pub fn merge_shards(results: &[ShardResult]) -> Result<Verdict, ShardError> {
    let first = results.first().ok_or(ShardError::Empty)?;
    for r in results {
        if r.format != SHARD_FORMAT {
            return Err(ShardError::Mismatch(format!(
                "unknown format '{}'",
                r.format
            )));
        }
        if (&r.circuit_hash, &r.spec_hash, r.of, r.free_bits)
            != (
                &first.circuit_hash,
                &first.spec_hash,
                first.of,
                first.free_bits,
            )
        {
            return Err(ShardError::Mismatch(format!(
                "shard {} was made from another circuit, spec or split than shard {}",
                r.shard, first.shard
            )));
        }
        if r.shard >= r.of {
            return Err(ShardError::Mismatch(format!(
                "shard {} of {}",
                r.shard, r.of
            )));
        }
    }
    let of = first.of;
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
    let words = (1u64 << first.free_bits).div_ceil(64);
    let mut at = 0;
    for r in &sorted {
        if r.first_word != at || r.end_word < r.first_word {
            return Err(ShardError::Mismatch(format!(
                "shard {} covers words {}..{}, expected to start at {at}",
                r.shard, r.first_word, r.end_word
            )));
        }
        at = r.end_word;
    }
    if at != words {
        return Err(ShardError::Mismatch(format!(
            "the shards cover {at} of {words} words"
        )));
    }
    if let Some(r) = sorted.iter().find(|r| !r.proven) {
        let c = r.counterexample.clone().ok_or_else(|| {
            ShardError::Mismatch(format!(
                "shard {} is refuted without a counterexample",
                r.shard
            ))
        })?;
        return Ok(Verdict::Refuted {
            counterexample: Box::new(c),
        });
    }
    Ok(Verdict::Proven {
        by: "exhaustive",
        free_bits: first.free_bits,
        states: sorted.iter().map(|r| r.states).sum(),
        outside_domain: sorted.iter().map(|r| r.outside_domain).sum(),
    })
}
