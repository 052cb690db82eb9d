//! The `exact` method: a minimum circuit for a permutation of at most 4 lines,
//! or a function through its xor embedding, from the exact tables.
//!
//! Three lines and fewer: a lookup in the breadth-first table of Shende,
//! Prasad, Markov and Hayes (2003). Four lines: the symmetry-reduced table and
//! meet in the middle of Golubitsky and Maslov (2012), within the search
//! budget; a search that stops early gives transform-bidir's circuit,
//! optimized, with the lower bound proven so far.

use super::{transform_with, xor_embedding, SynthError, SynthLimits, Synthesis};
use crate::circuit::{Circuit, LineInfo};
use crate::exact::Tables;
use crate::limit::{Limit, Stop};
use crate::logic::Permutation;
use crate::progress::{Event, Progress};
use crate::spec::{permutation_layout, FunctionSpec};

/// The minimum circuit of a permutation of at most 4 lines.
pub(super) fn permutation(
    p: &Permutation,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    circuit(
        p.images(),
        p.width(),
        permutation_layout(p.width()).lines(),
        limits,
        progress,
    )
}

/// The minimum circuit of a function's xor embedding of at most 4 lines.
pub(super) fn function(
    f: &FunctionSpec,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    let (n, m) = (f.inputs.len(), f.outputs.len());
    if n + m > 4 {
        return Err(refused());
    }
    circuit(
        &xor_embedding(f),
        n + m,
        f.layout().lines(),
        limits,
        progress,
    )
}

fn refused() -> SynthError {
    SynthError::NotApplicable {
        method: "exact",
        kind: "more than 4 lines",
        hint: "exact covers at most 4 lines; use transform-bidir",
    }
}

/// The optimal circuit of a function of at most 4 lines, placed on `lines`.
fn circuit(
    images: &[u64],
    width: usize,
    lines: Vec<LineInfo>,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    if width > 4 {
        return Err(refused());
    }
    let tables = Tables::get();
    if width < 4 {
        let gates = tables.exact3(width).circuit(images);
        let mut c = Circuit::new(lines);
        for g in gates {
            c.push(g);
        }
        return Ok(Synthesis {
            notes: vec![format!(
                "exact: {} gates, minimum over NOT, CNOT and Toffoli",
                c.gates().len()
            )],
            circuit: c,
            stop: None,
        });
    }
    let (table, how) = tables.four(&|p| progress.event(Event::TableBuild(p)));
    let mut notes: Vec<String> = how.into_iter().collect();
    let budget = std::time::Duration::from_secs_f64(limits.exact_seconds.max(0.0));
    let r = table.solve_with(images, budget, &|gates, fraction| {
        progress.event(Event::Search { gates, fraction });
        !progress.cancelled()
    });
    progress.event(Event::SearchDone);
    if progress.cancelled() {
        return Err(SynthError::Cancelled);
    }
    let mut c = Circuit::new(lines);
    if r.minimal {
        for g in r.gates {
            c.push(g);
        }
        notes.push(format!(
            "exact: {} gates, proven minimal over the 32-gate library",
            c.gates().len()
        ));
        return Ok(Synthesis {
            circuit: c,
            notes,
            stop: None,
        });
    }
    let p = Permutation::new(4, images.to_vec()).expect("a permutation");
    let mut h = transform_with(&p, true);
    crate::opt::optimize(&mut h);
    for g in h.gates() {
        c.push(g.clone());
    }
    let past_reach = r.lower_bound > table.reach();
    let why = if past_reach {
        format!(
            "the table of depth {} proves minima of at most {} gates",
            table.depth(),
            table.reach()
        )
    } else {
        "the search stopped at its time budget".to_string()
    };
    notes.push(format!(
        "exact: NOT proven minimal: no circuit of fewer than {} gates exists, and {why}; this {}-gate circuit from transform-bidir is at most {} gates above the minimum",
        r.lower_bound,
        c.gates().len(),
        c.gates().len().saturating_sub(r.lower_bound)
    ));
    Ok(Synthesis {
        circuit: c,
        notes,
        stop: Some(Stop {
            limit: (!past_reach).then_some(Limit::SearchSeconds),
            bound: r.lower_bound,
            unit: "gates",
        }),
    })
}
