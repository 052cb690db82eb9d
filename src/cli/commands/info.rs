//! `oraculum methods`, `completions` and `man`: what the tool offers, from its own definitions.

use crate::cli::args::Cli;
use crate::cli::{code, Failure};
use oraculum::export::json::{MethodRow, MethodsReport};
use oraculum::Method;

/// `auto` first, then every method, with what each takes and does.
fn rows() -> Vec<MethodRow> {
    std::iter::once(MethodRow {
        method: "auto",
        about: "the best method that applies to the spec",
    })
    .chain(Method::all().map(|m| MethodRow {
        method: m.name(),
        about: m.about(),
    }))
    .collect()
}

pub fn methods(json: bool) -> Result<i32, Failure> {
    let methods = rows();
    if json {
        outln!(
            "{}",
            serde_json::to_string_pretty(&MethodsReport { methods }).unwrap_or_default()
        );
    } else {
        for r in methods {
            outln!("{:<14} {}", r.method, r.about);
        }
    }
    Ok(code::DONE)
}

pub fn completions(shell: clap_complete::Shell) -> Result<i32, Failure> {
    let mut cmd = <Cli as clap::CommandFactory>::command();
    let mut script = Vec::new();
    clap_complete::generate(shell, &mut cmd, "oraculum", &mut script);
    out!("{}", String::from_utf8_lossy(&script));
    Ok(code::DONE)
}

pub fn man() -> Result<i32, Failure> {
    let cmd = <Cli as clap::CommandFactory>::command();
    let mut out = Vec::new();
    clap_mangen::Man::new(cmd)
        .render(&mut out)
        .map_err(|e| Failure::bad(format!("cannot render the manual: {e}")))?;
    out!("{}", String::from_utf8_lossy(&out));
    Ok(code::DONE)
}
