//! `oraculum synth`: build, verify and write one spec.

use crate::cli::args::{FormArgs, Format, LimitArgs};
use crate::cli::files::{load_spec, write_atomic};
use crate::cli::render::{build_failure, stop_hint, Bars};
use crate::cli::{code, Failure};
use oraculum::export::json::SynthReport;
use oraculum::export::listing;
use oraculum::{build_with_progress, invert, Method, Verdict, Verification};
use std::path::Path;

pub fn run(
    spec_path: &Path,
    output: Option<&Path>,
    method: Option<Method>,
    json: bool,
    no_verify: bool,
    form: &FormArgs,
    limits: &LimitArgs,
) -> Result<i32, Failure> {
    let format = form.format;
    if form.as_gate.is_some() && matches!(format, Format::Text) {
        return Err(Failure::bad(
            "--as-gate writes OpenQASM; it takes --format qasm or qasm3",
        ));
    }
    if form.keep_mct && !matches!(format, Format::Qasm3) {
        return Err(Failure::bad(
            "--keep-mct writes ctrl(k) @ x, which is OpenQASM 3; it takes --format qasm3",
        ));
    }
    // `-o -` is standard output, as without `-o`.
    let output = output.filter(|p| *p != Path::new("-"));
    let spec = load_spec(spec_path)?;
    let opts = limits.build_options(method, !no_verify);
    let bars = Bars::new(json);
    let mut out = build_with_progress(&spec, &opts, &bars).map_err(build_failure)?;
    if form.inverse && !matches!(out.verification, Verification::Ran(Verdict::Refuted { .. })) {
        out = invert(out, &spec, &opts, &bars).map_err(build_failure)?;
    }
    out.rename_registers(&spec.registers);
    if let Verification::Ran(Verdict::Refuted { counterexample }) = &out.verification {
        if json {
            outln!(
                "{}",
                serde_json::to_string_pretty(&out.report()).unwrap_or_default()
            );
        }
        return Err(Failure::with_code(
            code::REFUTED,
            format!(
                "the synthesized circuit failed verification; nothing was written\n{counterexample}"
            ),
        ));
    }
    let text = match format {
        Format::Qasm => match &form.as_gate {
            Some(name) => out.qasm_gate(name),
            None => out.qasm(),
        }
        .map_err(|e| Failure::bad(format!("cannot write OpenQASM 2: {e}")))?,
        Format::Qasm3 => out
            .qasm3(&oraculum::export::Qasm3Options {
                gate: form.as_gate.clone(),
                keep_mct: form.keep_mct,
            })
            .map_err(|e| Failure::bad(format!("cannot write OpenQASM 3: {e}")))?,
        Format::Text => listing(&out.lowered),
        Format::CliffordT => out
            .clifford_t()
            .map_err(|e| Failure::bad(format!("cannot write OpenQASM 2: {e}")))?,
    };
    if let Some(path) = output {
        write_atomic(path, &text, &[spec_path])?;
    }
    if json {
        let report = SynthReport {
            report: out.report(),
            output: output.map(|p| p.display().to_string()),
            circuit: output.is_none().then(|| text.clone()),
        };
        outln!(
            "{}",
            serde_json::to_string_pretty(&report).unwrap_or_default()
        );
        return Ok(code::DONE);
    }
    let label = out
        .name
        .clone()
        .unwrap_or_else(|| spec_path.display().to_string());
    let verdict = match &out.verification {
        Verification::Ran(v) => v.summary(),
        _ => "NOT verified (--no-verify)".to_string(),
    };
    let what = if out.inverse { " (the inverse)" } else { "" };
    let mut summary = format!(
        "{label}{what}: method {}, {verdict}\n{}\n",
        out.method, out.cost
    );
    if let Some(g) = &out.grover {
        summary.push_str(&format!("{g}\n"));
    }
    for n in &out.notes {
        summary.push_str(&format!("  note: {n}\n"));
    }
    if let Some(stop) = &out.stop {
        summary.push_str(&format!("  note: {}\n", stop_hint(stop)));
    }
    match output {
        Some(p) => {
            out!("{summary}");
            outln!("wrote {}", p.display());
        }
        None => {
            out!("{text}");
            err!("{summary}");
        }
    }
    Ok(code::DONE)
}
