//! `oraculum draw`: a circuit or a spec's circuit, in the terminal or as SVG.

use crate::cli::files::{load_spec, parse_circuit, read_text, write_atomic};
use crate::cli::render::build_failure;
use crate::cli::{code, Failure};
use oraculum::export::{draw_svg, draw_text, with_header_labels};
use oraculum::{build, BuildOptions, Method, Uncompute};
use std::path::Path;

#[allow(clippy::too_many_arguments)]
pub fn run(
    input: &Path,
    svg: Option<&Path>,
    width: Option<usize>,
    lowered: bool,
    uncompute: Uncompute,
    method: Option<Method>,
    json: bool,
    max_gates: usize,
) -> Result<i32, Failure> {
    let is_qasm = input.extension().is_some_and(|e| e == "qasm");
    let (circuit, title) = if is_qasm {
        // The header's line map names the lines (a comment: only the
        // drawing reads it).
        let text = read_text(input)?;
        let circuit = parse_circuit(input, &text, max_gates)?;
        (
            with_header_labels(&circuit, &text),
            input.display().to_string(),
        )
    } else {
        let spec = load_spec(input)?;
        let mut out = build(
            &spec,
            &BuildOptions {
                method,
                uncompute,
                ..BuildOptions::default()
            },
        )
        .map_err(build_failure)?;
        out.rename_registers(&spec.registers);
        let title = format!(
            "{} ({}{}{})",
            spec.name
                .clone()
                .unwrap_or_else(|| input.display().to_string()),
            out.method,
            if lowered { ", lowered" } else { "" },
            if uncompute == Uncompute::Measure {
                ", measured uncomputes"
            } else {
                ""
            }
        );
        (if lowered { out.lowered } else { out.mct }, title)
    };
    if json {
        outln!(
            "{}",
            serde_json::to_string_pretty(&circuit).unwrap_or_default()
        );
        return Ok(code::DONE);
    }
    if let Some(p) = svg {
        write_atomic(p, &draw_svg(&circuit, &title), &[input])?;
        outln!("wrote {} ({} gates)", p.display(), circuit.gates().len());
        return Ok(code::DONE);
    }
    // --width, else the terminal's width (when standard output is one),
    // else $COLUMNS, else 100.
    let terminal = || {
        console::Term::stdout()
            .size_checked()
            .map(|(_, cols)| cols as usize)
            .filter(|&c| c > 0)
    };
    let cols = width
        .or_else(terminal)
        .or_else(|| std::env::var("COLUMNS").ok().and_then(|c| c.parse().ok()))
        .unwrap_or(100);
    outln!("{title}");
    out!("{}", draw_text(&circuit, cols));
    Ok(code::DONE)
}
