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

/// The main manual page, printed; or, with `dir`, the main page and one page
/// per subcommand (`oraculum-synth.1`, ...) written into `dir`.
pub fn man(dir: Option<&std::path::Path>) -> Result<i32, Failure> {
    let mut cmd = <Cli as clap::CommandFactory>::command();
    cmd.build();
    let render = |c: clap::Command, title: &str| -> Result<String, Failure> {
        let mut out = Vec::new();
        clap_mangen::Man::new(c)
            .title(title.to_uppercase())
            .render(&mut out)
            .map_err(|e| Failure::bad(format!("cannot render the manual: {e}")))?;
        Ok(String::from_utf8_lossy(&out).into_owned())
    };
    let Some(dir) = dir else {
        out!("{}", render(cmd, "oraculum")?);
        return Ok(code::DONE);
    };
    std::fs::create_dir_all(dir)
        .map_err(|e| Failure::bad(format!("{}: cannot make the folder: {e}", dir.display())))?;
    let mut pages = vec![("oraculum".to_string(), cmd.clone())];
    for sub in cmd.get_subcommands().filter(|s| s.get_name() != "help") {
        let name = format!("oraculum-{}", sub.get_name());
        let page = sub
            .clone()
            .bin_name(format!("oraculum {}", sub.get_name()))
            .version(env!("CARGO_PKG_VERSION"));
        pages.push((name, page));
    }
    for (name, page) in &pages {
        let path = dir.join(format!("{name}.1"));
        crate::cli::files::write_atomic(&path, &render(page.clone(), name)?, &[])?;
    }
    outln!("wrote {} manual pages into {}", pages.len(), dir.display());
    Ok(code::DONE)
}
