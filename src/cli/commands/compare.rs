//! `oraculum compare`: every method that applies, verified, in one table, and the qubit trade-off curve.

use crate::cli::args::LimitArgs;
use crate::cli::files::load_spec;
use crate::cli::render::stop_hint;
use crate::cli::render::Bars;
use crate::cli::{code, Failure};
use oraculum::export::json::CompareReport;
use oraculum::pipeline::{best_of, compare_with_progress, tradeoff_with_progress};
use oraculum::{Uncompute, Verdict, Verification};
use std::path::Path;

pub fn run(spec_path: &Path, json: bool, limits: &LimitArgs) -> Result<i32, Failure> {
    let spec = load_spec(spec_path)?;
    let opts = limits.build_options(None, true);
    let bars = Bars::new(json);
    let rows = compare_with_progress(&spec, &opts, &bars);
    let best = best_of(&rows);
    let curve = tradeoff_with_progress(&spec, &opts, &bars);
    let refuted = rows.iter().any(|(_, r)| {
        matches!(r, Ok(o) if matches!(o.verification, Verification::Ran(Verdict::Refuted { .. })))
    });
    if json {
        let report = CompareReport::new(
            spec_path.display().to_string(),
            spec.name.as_deref(),
            &rows,
            best,
            &curve,
        );
        outln!(
            "{}",
            serde_json::to_string_pretty(&report).unwrap_or_default()
        );
    } else {
        let measure = opts.uncompute == Uncompute::Measure;
        outln!("uncompute: {}", opts.uncompute.name());
        outln!(
            "{:<17} {:>8} {:>8} {:>8} {:>7} {:>8} {:>9}  verified",
            "method",
            "mct",
            if measure { "toff-eq" } else { "toffoli" },
            "cnot",
            "qubits",
            "t-count",
            "seconds"
        );
        for (m, r) in &rows {
            match r {
                Ok(o) => {
                    let secs = o.timings.synth + o.timings.lower + o.timings.verify;
                    let v = match &o.verification {
                        Verification::Ran(v) => v.summary(),
                        _ => "no".into(),
                    };
                    let mark = if Some(*m) == best { "*" } else { " " };
                    outln!(
                        "{:<17} {:>8} {:>8} {:>8} {:>7} {:>8} {:>9.3}  {v}",
                        format!("{m}{mark}"),
                        o.cost.mct_total(),
                        o.cost.toffoli_equivalent,
                        o.cost.cnot,
                        o.cost.qubits,
                        o.cost.t_count,
                        secs
                    );
                    for n in &o.notes {
                        outln!("{:<17} note: {n}", "");
                    }
                    if let Some(stop) = &o.stop {
                        outln!("{:<17} note: {}", "", stop_hint(stop));
                    }
                }
                Err(e) => outln!("{:<17} no circuit: {e}", m.name()),
            }
        }
        if let Some(m) = best {
            let (what, flag) = if measure {
                ("Toffoli-equivalents", " --uncompute measure")
            } else {
                ("Toffolis", "")
            };
            outln!(
                "* fewest {what} among verified circuits: {m} (synth --method {m}{flag} writes it)"
            );
        }
        if curve.points.len() > 1 {
            outln!("\nqubits against Toffolis, bennett with --max-qubits:");
            for o in &curve.points {
                let v = if o.verification.is_proven() {
                    "verified"
                } else {
                    "NOT verified"
                };
                outln!(
                    "  {:>5} qubits  {:>6} {}  {v}",
                    o.cost.qubits,
                    o.cost.toffoli_equivalent,
                    if measure {
                        "toffoli-equivalent"
                    } else {
                        "toffoli"
                    }
                );
            }
        }
        for note in &curve.notes {
            outln!("\nnote: {note}");
        }
    }
    Ok(if refuted { code::REFUTED } else { code::DONE })
}
