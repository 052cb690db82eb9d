//! Counting the inputs a one-output function spec marks (`f(x) = 1`), on
//! every input, with the verifier's own evaluator of tables and expressions.

use super::exhaustive::nodes_of;
use super::kernel::Dispatch;
use super::program::{Scratch, WordProgram};
use super::{VerifyError, BLOCK_WORDS};
use crate::progress::{Event, Progress};
use crate::spec::{OutputDef, Spec, SpecBody};
use rayon::prelude::*;
use std::sync::atomic::{AtomicU64, Ordering};

const W: usize = BLOCK_WORDS;

/// The number of inputs `x` of `0 .. 2^n` with `f(x) = 1`, for a function
/// spec with one output (an xor or a phase oracle of a predicate); `Ok(None)`
/// for any other spec. A table's ones are counted; an expression is evaluated
/// on every input when `2^n` is within `max_states`, and past it its models
/// are counted ([`super::count_models`], within
/// [`super::MODEL_COUNT_MAX_NODES`] nodes and
/// [`super::MODEL_COUNT_MAX_WORK`]; else [`VerifyError::TooLarge`], nothing
/// counted).
pub fn count_marked(
    spec: &Spec,
    max_states: u64,
    progress: &dyn Progress,
) -> Result<Option<u64>, VerifyError> {
    let SpecBody::Function(f) = &spec.body else {
        return Ok(None);
    };
    let [out] = f.outputs.as_slice() else {
        return Ok(None);
    };
    let n = f.inputs.len() as u32;
    // A table holds its every entry already; an expression is evaluated on
    // every input within the budget, and its models counted past it.
    let table = matches!(out.def, OutputDef::Table(_));
    let too_large = VerifyError::TooLarge {
        bits: n,
        limit: max_states,
    };
    if let (false, OutputDef::Expr(root)) = (n < 63 && (1u64 << n) <= max_states, &out.def) {
        if n >= 128 {
            return Err(too_large);
        }
        let cancelled = || progress.cancelled();
        return match super::models::count_models(
            &nodes_of(&f.dag),
            *root,
            n,
            max_states,
            &cancelled,
        ) {
            Ok(m) => u64::try_from(m).map(Some).map_err(|_| too_large),
            Err(super::models::CountStop::Cancelled) => Err(VerifyError::Cancelled),
            Err(_) => Err(too_large),
        };
    }
    if n >= 63 || (!table && (1u64 << n) > max_states) {
        return Err(too_large);
    }
    let inputs = 1u64 << n;
    // The states of the last word that are inputs (all 64 from 6 inputs on).
    let tail = if n < 6 { (1u64 << inputs) - 1 } else { !0 };
    match &out.def {
        OutputDef::Table(t) => {
            let words = t.words();
            let count = match words.first() {
                Some(&w) if t.len() < 64 => (w & tail).count_ones() as u64,
                _ => words.iter().map(|w| w.count_ones() as u64).sum(),
            };
            Ok(Some(count))
        }
        OutputDef::Expr(root) => {
            let program = WordProgram::compile(&nodes_of(&f.dag), &[*root], W, Dispatch::best())
                .map_err(|e| VerifyError::Binding(format!("the spec's expressions: {e}")))?;
            let words = inputs.div_ceil(64);
            let blocks = words.div_ceil(W as u64);
            let done = AtomicU64::new(0);
            let count: u64 = (0..blocks)
                .into_par_iter()
                .map_init(
                    || (Scratch::<W>::new(), vec![[0u64; W]; 1]),
                    |(scratch, rows), b| {
                        if progress.cancelled() {
                            return 0;
                        }
                        let base = b * W as u64;
                        program
                            .evaluate::<W>(base, scratch, rows)
                            .expect("compiled for this block size");
                        let mut c = 0u64;
                        for (i, w) in rows[0].iter().enumerate() {
                            if base + (i as u64) < words {
                                c += (w & tail).count_ones() as u64;
                            }
                        }
                        let d = done.fetch_add(64 * W as u64, Ordering::Relaxed);
                        progress.event(Event::Verify {
                            done: (d + 64 * W as u64).min(inputs),
                            total: inputs,
                        });
                        c
                    },
                )
                .sum();
            if progress.cancelled() {
                return Err(VerifyError::Cancelled);
            }
            Ok(Some(count))
        }
    }
}
