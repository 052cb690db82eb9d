//! Command-line front end: arguments, files, printing and exit codes. No circuit logic lives here.

/// Prints to standard output; a closed pipe (`oraculum ... | head -1`) ends
/// the run quietly with exit 0 instead of a panic.
macro_rules! outln {
    ($($t:tt)*) => { $crate::cli::emit(format_args!($($t)*), true, false) };
}

/// [`outln!`] without the line break.
macro_rules! out {
    ($($t:tt)*) => { $crate::cli::emit(format_args!($($t)*), false, false) };
}

/// Prints to standard error, ignoring a closed stream.
macro_rules! errln {
    ($($t:tt)*) => { $crate::cli::emit(format_args!($($t)*), true, true) };
}

/// [`errln!`] without the line break.
macro_rules! err {
    ($($t:tt)*) => { $crate::cli::emit(format_args!($($t)*), false, true) };
}

mod args;
mod commands;
mod files;
mod render;

use args::{Cli, Command};
use clap::Parser;
use oraculum::source::{ErrorKind, SourceError};
use oraculum::Tables;

/// Exit codes, as docs/design.md lists them.
pub mod code {
    /// Done (and verified, unless verification was skipped on request).
    pub const DONE: i32 = 0;
    /// Verification refuted the circuit.
    pub const REFUTED: i32 = 1;
    /// Bad input or usage.
    pub const BAD_INPUT: i32 = 2;
    /// A resource limit refused the job.
    pub const LIMIT: i32 = 3;
}

/// Writes to standard output or error. Output that cannot be written (the
/// reader went away) ends the run with exit 0: whatever it asked for was
/// either written to files already or is no longer wanted.
pub fn emit(args: std::fmt::Arguments, newline: bool, to_stderr: bool) {
    use std::io::Write;
    let result = if to_stderr {
        let mut e = std::io::stderr().lock();
        e.write_fmt(args)
            .and_then(|_| if newline { e.write_all(b"\n") } else { Ok(()) })
    } else {
        let mut o = std::io::stdout().lock();
        o.write_fmt(args)
            .and_then(|_| if newline { o.write_all(b"\n") } else { Ok(()) })
            .and_then(|_| o.flush())
    };
    if result.is_err() && !to_stderr {
        std::process::exit(code::DONE);
    }
}

/// A reason to stop, with its exit code.
pub struct Failure {
    pub code: i32,
    pub message: String,
    /// Whether `message` is a rendered report that already says "error".
    pub rendered: bool,
}

impl Failure {
    pub fn bad(message: impl Into<String>) -> Self {
        Failure {
            code: code::BAD_INPUT,
            message: message.into(),
            rendered: false,
        }
    }

    pub fn with_code(code: i32, message: impl Into<String>) -> Self {
        Failure {
            code,
            message: message.into(),
            rendered: false,
        }
    }
}

impl<K: ErrorKind> From<SourceError<K>> for Failure {
    fn from(e: SourceError<K>) -> Self {
        Failure {
            code: code::BAD_INPUT,
            message: render::source_error(&e),
            rendered: true,
        }
    }
}

/// Runs the command line and returns the exit code.
pub fn run() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return if e.use_stderr() {
                code::BAD_INPUT
            } else {
                code::DONE
            };
        }
    };
    // The exact tables live in the user's cache folder; the library itself
    // reads no environment and writes no file.
    let _ = Tables::stored(files::cache_dir()).install();
    files::clean_up_on_signal();
    match dispatch(cli.command) {
        Ok(c) => c,
        Err(f) => {
            if f.rendered {
                errln!("{}", f.message);
            } else {
                errln!("error: {}", f.message);
            }
            f.code
        }
    }
}

fn dispatch(cmd: Command) -> Result<i32, Failure> {
    match cmd {
        Command::Synth {
            spec,
            output,
            method,
            json,
            no_verify,
            form,
            limits,
        } => commands::synth::run(
            &spec,
            output.as_deref(),
            method.0,
            json,
            no_verify,
            &form,
            &limits,
        ),
        Command::Verify {
            circuit,
            spec,
            against,
            inverse,
            registers,
            json,
            max_states,
            method,
            sat_seconds,
            shard,
            output,
            max_gates,
        } => {
            let opts = oraculum::VerifyOptions {
                max_states,
                route: method,
                sat_seconds,
            };
            let names = match &registers {
                Some(text) => files::parse_register_map(text)?,
                None => Vec::new(),
            };
            match (spec, against) {
                (_, Some(other)) => {
                    commands::verify::against(&circuit, &other, json, &opts, max_gates)
                }
                (Some(spec), None) => match shard {
                    Some(k) => commands::verify::shard(
                        &circuit,
                        &spec,
                        &k,
                        output.as_deref(),
                        &opts,
                        (max_gates, &names),
                    ),
                    None => commands::verify::file(
                        &circuit,
                        &spec,
                        json,
                        inverse,
                        &opts,
                        (max_gates, &names),
                    ),
                },
                (None, None) => Err(Failure::bad("verify needs --spec or --against")),
            }
        }
        Command::Merge {
            results,
            circuit,
            spec,
            json,
        } => commands::verify::merge(&results, &circuit, &spec, json),
        Command::Cost {
            circuit,
            json,
            max_gates,
        } => commands::cost::run(&circuit, json, max_gates),
        Command::Compare { spec, json, limits } => commands::compare::run(&spec, json, &limits),
        Command::Table {
            depth,
            rebuild,
            json,
        } => commands::table::run(depth, rebuild, json),
        Command::Methods { json } => commands::info::methods(json),
        Command::Draw {
            input,
            svg,
            width,
            lowered,
            method,
            json,
            uncompute,
            max_gates,
        } => commands::draw::run(
            &input,
            svg.as_deref(),
            width,
            lowered,
            uncompute,
            method.0,
            json,
            max_gates,
        ),
        Command::Completions { shell } => commands::info::completions(shell),
        Command::Man { dir } => commands::info::man(dir.as_deref()),
    }
}
