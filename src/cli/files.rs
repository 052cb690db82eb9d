//! Files: reading inputs with their names in messages, writing outputs atomically, the cache folder.

use super::{code, render, Failure};
use oraculum::export::{read_circuit_with, ReadError, ReadLimits};
use oraculum::netlist::{read_netlist, ReadError as NetError, ReadLimits as NetLimits};
use oraculum::spec::{netlist_function, parse_spec_with, SpecLoadError};
use oraculum::{Circuit, OracleForm, Spec, SpecBody};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

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

/// Reads a spec: a TOML spec (a `kind = "netlist"` spec's `file` taken
/// from the spec's folder when relative), or a design file (`.blif`,
/// `.aag`, `.aig`, `.pla`, `.cnf`) taken as an xor oracle of its outputs.
pub fn load_spec(path: &Path) -> Result<Spec, Failure> {
    if is_design_file(path) {
        return load_design(path);
    }
    let text = read_text(path)?;
    let folder = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let mut read = |file: &str| {
        let p = folder.join(file);
        std::fs::read(&p)
            .map(|b| (p.display().to_string(), b))
            .map_err(|e| e.to_string())
    };
    parse_spec_with(
        &path.display().to_string(),
        &text,
        &mut read,
        &NetLimits::default(),
    )
    .map_err(|e| match e {
        SpecLoadError::Spec(e) => Failure::from(e),
        SpecLoadError::Design(e) => design_failure(e),
    })
}

/// A design file's read error: malformed at its place (exit 2), or over a
/// reader limit (exit 3).
fn design_failure(e: NetError) -> Failure {
    match e {
        NetError::Malformed(e) => Failure::from(e),
        e @ NetError::Limit { .. } => Failure::with_code(code::LIMIT, e.to_string()),
    }
}

/// Whether `path` names a design file by its extension (case ignored).
fn is_design_file(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase())
        .is_some_and(|e| matches!(e.as_str(), "blif" | "aag" | "aig" | "pla" | "cnf"))
}

/// Reads a design file into a function spec (see `netlist_function`):
/// inputs `x` and outputs `y` in the file's order, named as in the file.
fn load_design(path: &Path) -> Result<Spec, Failure> {
    let name = path.display().to_string();
    let bytes =
        std::fs::read(path).map_err(|e| Failure::bad(format!("{name}: cannot read: {e}")))?;
    let netlist = read_netlist(&name, &bytes, &NetLimits::default()).map_err(|e| match e {
        e @ NetError::Limit { .. } => Failure::with_code(code::LIMIT, format!("{name}: {e}")),
        e => design_failure(e),
    })?;
    let f = netlist_function(&netlist, None).map_err(|e| Failure::bad(format!("{name}: {e}")))?;
    Ok(Spec {
        name: path.file_stem().map(|s| s.to_string_lossy().into_owned()),
        body: SpecBody::Function(f),
        form: OracleForm::Xor,
        registers: Vec::new(),
        controlled: false,
    })
}

/// Parses `--registers OWN=STD,...`: a file's register names and the
/// standard names they stand for.
pub fn parse_register_map(text: &str) -> Result<Vec<(String, String)>, Failure> {
    let mut out = Vec::new();
    for part in text.split(',') {
        let Some((from, to)) = part.split_once('=') else {
            return Err(Failure::bad(format!(
                "--registers takes NAME=REGISTER pairs separated by commas, for example key=x,flag=y; got '{part}'"
            )));
        };
        let (from, to) = (from.trim(), to.trim());
        for name in [from, to] {
            if name.is_empty() || !name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
                return Err(Failure::bad(format!(
                    "--registers: '{name}' is not a register name"
                )));
            }
        }
        if out.iter().any(|(f, _): &(String, String)| f == from) {
            return Err(Failure::bad(format!(
                "--registers: '{from}' is mapped twice"
            )));
        }
        out.push((from.to_string(), to.to_string()));
    }
    Ok(out)
}

/// Renames the registers of a circuit read from `path` to the standard names
/// the verifier binds by: the spec's `[registers]` backwards for the names the
/// file has, then `extra` (from `--registers`), which must name registers the
/// file has. Refuses a renaming that gives two registers one name.
pub fn standard_names(
    path: &Path,
    c: Circuit,
    spec: &Spec,
    extra: &[(String, String)],
) -> Result<Circuit, Failure> {
    let present: Vec<String> = c.registers().into_iter().map(|(n, _)| n).collect();
    for (from, _) in extra {
        if !present.contains(from) {
            return Err(Failure::bad(format!(
                "{}: --registers names '{from}', which is not a register of the file (it has {})",
                path.display(),
                present.join(", ")
            )));
        }
    }
    let mut map: Vec<(String, String)> = extra.to_vec();
    for (own, std) in spec.registers_back() {
        if present.contains(&own) && !map.iter().any(|(f, _)| *f == own) {
            map.push((own, std));
        }
    }
    if map.is_empty() {
        return Ok(c);
    }
    let mut finals: Vec<&str> = Vec::new();
    for name in &present {
        let to = map
            .iter()
            .find(|(f, _)| f == name)
            .map_or(name.as_str(), |(_, t)| t.as_str());
        if finals.contains(&to) {
            return Err(Failure::bad(format!(
                "{}: renaming the registers would give two of them the name '{to}'",
                path.display()
            )));
        }
        finals.push(to);
    }
    Ok(c.with_registers_renamed(&map))
}

/// Reads an OpenQASM 2 or 3 file within `max_gates` gates.
pub fn load_circuit(path: &Path, max_gates: usize) -> Result<Circuit, Failure> {
    let text = read_text(path)?;
    parse_circuit(path, &text, max_gates)
}

/// Parses OpenQASM 2 or 3 text read from `path`.
pub fn parse_circuit(path: &Path, text: &str, max_gates: usize) -> Result<Circuit, Failure> {
    let limits = ReadLimits {
        max_gates,
        ..ReadLimits::default()
    };
    read_circuit_with(&path.display().to_string(), text, &limits).map_err(|e| match e {
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

/// Temporary files being written, removed by the signal handler when the
/// run is interrupted (SIGKILL cannot be caught: a stray `.oraculum-*` file
/// may then remain beside the output).
static PENDING: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// Removes the temporary files of an interrupted run and exits with the
/// conventional code of a death by signal. Installed once at start-up.
pub fn clean_up_on_signal() {
    let _ = ctrlc::set_handler(|| {
        let pending = PENDING.lock().unwrap_or_else(|e| e.into_inner());
        for p in pending.iter() {
            let _ = std::fs::remove_file(p);
        }
        std::process::exit(130);
    });
}

fn pending(path: &Path, add: bool) {
    let mut list = PENDING.lock().unwrap_or_else(|e| e.into_inner());
    if add {
        list.push(path.to_path_buf());
    } else {
        list.retain(|p| p != path);
    }
}

/// Writes `contents` to `path`, never destroying what is there:
///
/// - `-` is standard output;
/// - a symbolic link is followed and its target replaced (the link stays);
/// - a device, FIFO or socket is written directly, never replaced;
/// - a regular file is replaced atomically by a temporary file in its own
///   folder, renamed over it, with the old file's permission bits;
/// - a path that is one of `protect` (the run's inputs) is refused.
///
/// The temporary file is removed on every error and on SIGINT and SIGTERM.
pub fn write_atomic(path: &Path, contents: &str, protect: &[&Path]) -> Result<(), Failure> {
    let fail = |e: std::io::Error| Failure::bad(format!("{}: cannot write: {e}", path.display()));
    if path == Path::new("-") {
        let mut out = std::io::stdout().lock();
        return out
            .write_all(contents.as_bytes())
            .and_then(|_| out.flush())
            .map_err(fail);
    }
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
    let target = resolve_links(path).map_err(fail)?;
    let permissions = match std::fs::metadata(&target) {
        Ok(m) if m.is_dir() => {
            return Err(Failure::bad(format!("{}: is a folder", path.display())))
        }
        Ok(m) if !m.is_file() => {
            // A device, FIFO or socket: write into it, never replace it.
            let mut f = std::fs::OpenOptions::new()
                .write(true)
                .open(&target)
                .map_err(fail)?;
            return f.write_all(contents.as_bytes()).map_err(fail);
        }
        Ok(m) => Some(m.permissions()),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => None,
        Err(e) => return Err(fail(e)),
    };
    let dir = match target.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let mut tmp = tempfile::Builder::new()
        .prefix(".oraculum-")
        .tempfile_in(&dir)
        .map_err(fail)?;
    pending(tmp.path(), true);
    let written = tmp
        .write_all(contents.as_bytes())
        .and_then(|_| tmp.as_file().sync_all())
        .and_then(|_| match &permissions {
            Some(p) => std::fs::set_permissions(tmp.path(), p.clone()),
            None => Ok(()),
        });
    let tmp_path = tmp.path().to_path_buf();
    let result = match written {
        Ok(()) => tmp.persist(&target).map(|_| ()).map_err(|e| fail(e.error)),
        // Dropping the temporary file removes it.
        Err(e) => Err(fail(e)),
    };
    pending(&tmp_path, false);
    result
}

/// `path` with every symbolic link along its last component followed (a
/// dangling link gives the path it points to, which is then created).
fn resolve_links(path: &Path) -> std::io::Result<PathBuf> {
    let mut p = path.to_path_buf();
    for _ in 0..40 {
        match std::fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let to = std::fs::read_link(&p)?;
                p = match p.parent() {
                    Some(dir) if to.is_relative() => dir.join(to),
                    _ => to,
                };
            }
            _ => return Ok(p),
        }
    }
    Err(std::io::Error::other("too many levels of symbolic links"))
}
