//! `oraculum verify` (against a spec, a shard of it, or another circuit) and `oraculum merge`.

use crate::cli::files::{
    load_circuit, load_spec, parse_circuit, read_text, standard_names, write_atomic,
};
use crate::cli::render::{verify_failure, Bars};
use crate::cli::{code, Failure};
use oraculum::export::json::VerifyReport;
use oraculum::verify::{merge_shards, verify_against, verify_shard, ShardResult};
use oraculum::{
    parse_spec, verify_inverse_with_progress, verify_with_progress, Verdict, VerifyOptions,
};
use std::path::{Path, PathBuf};
use std::time::Instant;

fn exit(v: &Verdict) -> i32 {
    if matches!(v, Verdict::Refuted { .. }) {
        code::REFUTED
    } else {
        code::DONE
    }
}

fn print_json<T: serde::Serialize>(value: &T) {
    outln!(
        "{}",
        serde_json::to_string_pretty(value).unwrap_or_default()
    );
}

/// `verify CIRCUIT --spec SPEC`.
pub fn file(
    circuit: &Path,
    spec: &Path,
    json: bool,
    inverse: bool,
    opts: &VerifyOptions,
    (max_gates, names): (usize, &[(String, String)]),
) -> Result<i32, Failure> {
    let s = load_spec(spec)?;
    let c = standard_names(circuit, load_circuit(circuit, max_gates)?, &s, names)?;
    let t = Instant::now();
    let bars = Bars::new(json);
    let verdict = if inverse {
        verify_inverse_with_progress(&c, &s, opts, &bars)
    } else {
        verify_with_progress(&c, &s, opts, &bars)
    }
    .map_err(|e| verify_failure(circuit, e))?;
    let against_what = if inverse {
        format!("the inverse of {}", spec.display())
    } else {
        spec.display().to_string()
    };
    let seconds = t.elapsed().as_secs_f64();
    if json {
        print_json(&VerifyReport {
            verdict: &verdict,
            circuit: circuit.display().to_string(),
            spec: Some(spec.display().to_string()),
            against: None,
            seconds: Some(seconds),
            inverse,
        });
    } else {
        match &verdict {
            Verdict::Proven { .. } => outln!(
                "{}: {} against {against_what}",
                circuit.display(),
                verdict.summary(),
            ),
            Verdict::Refuted { counterexample } => outln!(
                "{}: refuted against {against_what}\n{counterexample}",
                circuit.display(),
            ),
        }
    }
    Ok(exit(&verdict))
}

/// `verify CIRCUIT --against OTHER`.
pub fn against(
    circuit: &Path,
    other: &Path,
    json: bool,
    opts: &VerifyOptions,
    max_gates: usize,
) -> Result<i32, Failure> {
    let a = load_circuit(circuit, max_gates)?;
    let b = load_circuit(other, max_gates)?;
    let verdict = verify_against(&a, &b, opts).map_err(|e| verify_failure(circuit, e))?;
    if json {
        print_json(&VerifyReport {
            verdict: &verdict,
            circuit: circuit.display().to_string(),
            spec: None,
            against: Some(other.display().to_string()),
            seconds: None,
            inverse: false,
        });
    } else {
        match &verdict {
            Verdict::Proven { .. } => outln!(
                "{}: equivalent to {}, {}",
                circuit.display(),
                other.display(),
                verdict.summary()
            ),
            Verdict::Refuted { counterexample } => outln!(
                "{}: differs from {}\n{counterexample}",
                circuit.display(),
                other.display()
            ),
        }
    }
    Ok(exit(&verdict))
}

fn parse_shard(text: &str) -> Result<(u64, u64), Failure> {
    let bad = || {
        Failure::bad(format!(
            "--shard takes K/N with 0 <= K < N, for example 3/16; got '{text}'"
        ))
    };
    let (k, n) = text.split_once('/').ok_or_else(bad)?;
    let k: u64 = k.trim().parse().map_err(|_| bad())?;
    let n: u64 = n.trim().parse().map_err(|_| bad())?;
    if n == 0 || k >= n || n > 1 << 20 {
        return Err(bad());
    }
    Ok((k, n))
}

/// `verify CIRCUIT --spec SPEC --shard K/N`.
pub fn shard(
    circuit: &Path,
    spec: &Path,
    shard: &str,
    output: Option<&Path>,
    opts: &VerifyOptions,
    (max_gates, names): (usize, &[(String, String)]),
) -> Result<i32, Failure> {
    let (k, n) = parse_shard(shard)?;
    let circuit_text = read_text(circuit)?;
    let spec_text = read_text(spec)?;
    let s = parse_spec(&spec.display().to_string(), &spec_text)?;
    let c = standard_names(
        circuit,
        parse_circuit(circuit, &circuit_text, max_gates)?,
        &s,
        names,
    )?;
    let r = verify_shard(
        &c,
        &s,
        opts,
        k,
        n,
        circuit_text.as_bytes(),
        spec_text.as_bytes(),
        &Bars::new(output.is_none()),
    )
    .map_err(|e| verify_failure(circuit, e))?;
    let text = serde_json::to_string_pretty(&r).unwrap_or_default() + "\n";
    match output {
        Some(p) => {
            write_atomic(p, &text, &[circuit, spec])?;
            outln!(
                "shard {k}/{n}: {} states checked, {}; wrote {}",
                r.states,
                if r.proven { "all correct" } else { "REFUTED" },
                p.display()
            );
        }
        None => out!("{text}"),
    }
    Ok(if r.proven { code::DONE } else { code::REFUTED })
}

/// `merge RESULT... --circuit C --spec S`.
pub fn merge(paths: &[PathBuf], circuit: &Path, spec: &Path, json: bool) -> Result<i32, Failure> {
    let circuit_text = read_text(circuit)?;
    let spec_text = read_text(spec)?;
    let s = parse_spec(&spec.display().to_string(), &spec_text)?;
    let c = standard_names(
        circuit,
        parse_circuit(circuit, &circuit_text, oraculum::export::DEFAULT_MAX_GATES)?,
        &s,
        &[],
    )?;
    let mut results = Vec::new();
    for p in paths {
        let text = read_text(p)?;
        let r: ShardResult = serde_json::from_str(&text).map_err(|e| {
            Failure::bad(format!(
                "{}:{}:{}: not a shard result file: {e}",
                p.display(),
                e.line(),
                e.column()
            ))
        })?;
        results.push(r);
    }
    let v = merge_shards(
        &results,
        &c,
        &s,
        circuit_text.as_bytes(),
        spec_text.as_bytes(),
    )
    .map_err(|e| Failure::bad(e.to_string()))?;
    if json {
        print_json(&v);
    } else {
        match &v {
            Verdict::Proven { .. } => outln!("{} shards: {}", results.len(), v.summary()),
            Verdict::Refuted { counterexample } => {
                outln!("{} shards: refuted\n{counterexample}", results.len())
            }
        }
    }
    Ok(exit(&v))
}
