//! Files: reading inputs with their names in messages, writing outputs atomically, the cache folder.

use super::{code, render, Failure};
use oraculum::export::{read_qasm_with, ReadError, ReadLimits};
use oraculum::{parse_spec, Circuit, Spec};
use std::io::Write;
use std::path::{Path, PathBuf};

/// The folder of the exact tables: `$ORACULUM_CACHE`, else the user's cache
/// folder (`$XDG_CACHE_HOME` or `~/.cache` on Linux) with `oraculum` in it,
/// else the system's temporary folder.
pub fn cache_dir() -> PathBuf {
    std::env::var_os("ORACULUM_CACHE")
        .map(PathBuf::from)
        .or_else(|| dirs::cache_dir().map(|d| d.join("oraculum")))
        .unwrap_or_else(|| std::env::temp_dir().join("oraculum"))
}

pub fn read_text(path: &Path) -> Result<String, Failure> {
    std::fs::read_to_string(path)
        .map_err(|e| Failure::bad(format!("{}: cannot read: {e}", path.display())))
}

pub fn load_spec(path: &Path) -> Result<Spec, Failure> {
    let text = read_text(path)?;
    Ok(parse_spec(&path.display().to_string(), &text)?)
}

/// Reads an OpenQASM 2 file within `max_gates` gates.
pub fn load_circuit(path: &Path, max_gates: usize) -> Result<Circuit, Failure> {
    let text = read_text(path)?;
    parse_circuit(path, &text, max_gates)
}

/// Parses OpenQASM 2 text read from `path`.
pub fn parse_circuit(path: &Path, text: &str, max_gates: usize) -> Result<Circuit, Failure> {
    let limits = ReadLimits {
        max_gates,
        ..ReadLimits::default()
    };
    read_qasm_with(&path.display().to_string(), text, &limits).map_err(|e| match e {
        ReadError::Malformed(e) => Failure::from(e),
        ReadError::Limit { kind, .. } => Failure::with_code(
            code::LIMIT,
            format!(
                "{e}; raise it with {}",
                render::flag(kind, render::Context::Verify)
            ),
        ),
    })
}

/// Writes `contents` to a temporary file beside `path`, then renames it into place.
pub fn write_atomic(path: &Path, contents: &str, protect: &[&Path]) -> Result<(), Failure> {
    for p in protect {
        if let (Ok(a), Ok(b)) = (path.canonicalize(), p.canonicalize()) {
            if a == b {
                return Err(Failure::bad(format!(
                    "{}: refusing to overwrite an input file",
                    path.display()
                )));
            }
        }
    }
    let name = path
        .file_name()
        .ok_or_else(|| Failure::bad(format!("{}: not a file name", path.display())))?;
    let tmp = path.with_file_name(format!(
        ".{}.tmp-{}",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = std::fs::File::create(&tmp)
        .and_then(|mut f| {
            f.write_all(contents.as_bytes())?;
            f.sync_all()
        })
        .and_then(|_| std::fs::rename(&tmp, path));
    result.map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        Failure::bad(format!("{}: cannot write: {e}", path.display()))
    })
}
