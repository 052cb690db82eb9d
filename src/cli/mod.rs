//! Command-line front end: arguments, files, printing and exit codes. No circuit logic lives here.

use clap::{Parser, Subcommand, ValueEnum};
use indicatif::{ProgressBar, ProgressStyle};
use oraculum::{
    build_with_progress, listing, parse_spec, read_qasm, verify_with_progress, BuildOptions,
    Circuit, Cost, LocatedError, Method, Route, Spec, SynthLimits, Verdict, VerifyError,
    VerifyOptions, DEFAULT_MAX_STATES, DEFAULT_SAT_SECONDS,
};
use oraculum::{cache_path, Exact4, Exact4Progress, DEFAULT_DEPTH, MAX_DEPTH};
use serde_json::json;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::time::Instant;

/// Exit codes, as design.md lists them.
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

const AFTER_HELP: &str = "Exit codes: 0 done and verified, 1 verification refuted the circuit, \
2 bad input or usage, 3 a resource limit refused the job.";

#[derive(Parser)]
#[command(
    name = "oraculum",
    version,
    about = "Turns classical functions into verified reversible oracles, written as OpenQASM 2.",
    after_help = AFTER_HELP
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Clone, Copy, ValueEnum)]
enum Format {
    /// OpenQASM 2 with x, cx and ccx.
    Qasm,
    /// A plain listing of lines and gates.
    Text,
}

#[derive(Subcommand)]
enum Command {
    /// Synthesize a spec, lower it to Toffoli gates, verify it, and write it.
    Synth {
        /// The spec file (TOML).
        spec: PathBuf,
        /// Where to write the circuit; without it the circuit goes to standard output.
        #[arg(short, long)]
        output: Option<PathBuf>,
        /// Synthesis method (see `oraculum methods`).
        #[arg(short, long, default_value = "auto")]
        method: String,
        /// Print the report as one JSON object.
        #[arg(long)]
        json: bool,
        /// Skip verification; the report says the circuit was not checked.
        #[arg(long)]
        no_verify: bool,
        /// Output format of the circuit.
        #[arg(long, value_enum, default_value = "qasm")]
        format: Format,
        #[command(flatten)]
        limits: LimitArgs,
    },
    /// Verify an OpenQASM 2 circuit against a spec.
    Verify {
        /// The circuit (OpenQASM 2 with x, cx, ccx).
        circuit: PathBuf,
        /// The spec it should realize.
        #[arg(long, required_unless_present = "against", conflicts_with = "against")]
        spec: Option<PathBuf>,
        /// Another circuit it should be equivalent to (proven by SAT).
        #[arg(long)]
        against: Option<PathBuf>,
        /// Print the verdict as one JSON object.
        #[arg(long)]
        json: bool,
        /// Most basis states to simulate (for --shard: in this shard).
        #[arg(long, default_value_t = DEFAULT_MAX_STATES)]
        max_states: u64,
        /// How to prove it: auto (exhaustive within --max-states, SAT past it), exhaustive, sat.
        #[arg(long, default_value = "auto")]
        method: String,
        /// Seconds the SAT solver may take.
        #[arg(long, default_value_t = DEFAULT_SAT_SECONDS)]
        sat_seconds: f64,
        /// Check only slice K of N equal slices of the state space (K from 0), e.g. 3/16.
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// With --shard: write the shard's result file here (else to standard output).
        #[arg(short, long)]
        output: Option<PathBuf>,
    },
    /// Merge the result files of every shard into one verdict.
    Merge {
        /// The shard result files.
        #[arg(required = true)]
        results: Vec<PathBuf>,
        /// Print the verdict as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Print the cost report of an OpenQASM 2 circuit.
    Cost {
        /// The circuit (OpenQASM 2 with x, cx, ccx).
        circuit: PathBuf,
        /// Print the report as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Run every method that applies, verify each, and print one table.
    Compare {
        /// The spec file (TOML).
        spec: PathBuf,
        /// Print the table as one JSON object.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        limits: LimitArgs,
    },
    /// Draw a circuit (an OpenQASM 2 file, or a spec, synthesized first) in the terminal or as SVG.
    Draw {
        /// A circuit (.qasm) or a spec (.toml).
        input: PathBuf,
        /// Write an SVG drawing here instead of drawing in the terminal.
        #[arg(long, value_name = "OUT.svg")]
        svg: Option<PathBuf>,
        /// Columns to fit (default: the terminal's, else 100).
        #[arg(long)]
        width: Option<usize>,
        /// For a spec: draw the circuit after lowering to Toffoli gates.
        #[arg(long)]
        lowered: bool,
        /// For a spec: the synthesis method.
        #[arg(short, long, default_value = "auto")]
        method: String,
        /// Print the circuit's lines and gates as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Build the 4-line exact table (or load it from the cache) and print its figures.
    Table {
        /// Gate count the table covers: 7 takes seconds and 0.3 GB, 8 about a minute and 4.3 GB.
        #[arg(long, default_value_t = DEFAULT_DEPTH)]
        depth: u8,
        /// Build it even when an intact cached copy exists.
        #[arg(long)]
        rebuild: bool,
        /// Print the figures as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// List the synthesis methods.
    Methods {
        /// Print them as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff), for `man -l -` or a man folder.
    Man,
}

#[derive(clap::Args)]
struct LimitArgs {
    /// Most basis states the verifier simulates (default 2^30).
    #[arg(long, default_value_t = DEFAULT_MAX_STATES)]
    max_states: u64,
    /// Most inputs a truth-table method expands.
    #[arg(long, default_value_t = SynthLimits::default().max_table_inputs)]
    max_inputs: usize,
    /// Most gates before lowering.
    #[arg(long, default_value_t = SynthLimits::default().max_gates)]
    max_gates: usize,
    /// Seconds an exact method searches before it returns its best circuit with a proven bound.
    #[arg(long, default_value_t = SynthLimits::default().exact_seconds)]
    exact_seconds: f64,
    /// How to prove the circuit: auto (exhaustive within --max-states, SAT past it), exhaustive, sat.
    #[arg(long, default_value = "auto")]
    verify_method: String,
    /// Seconds the SAT solver may take.
    #[arg(long, default_value_t = DEFAULT_SAT_SECONDS)]
    sat_seconds: f64,
    /// Most qubits the circuit may use, ancillae included; bennett recomputes to fit.
    #[arg(long)]
    max_qubits: Option<usize>,
}

fn route(name: &str) -> Result<Route, Failure> {
    Route::from_name(name).ok_or_else(|| {
        Failure::bad(format!(
            "unknown verification method '{name}'; the methods are auto, exhaustive, sat"
        ))
    })
}

impl LimitArgs {
    fn build_options(&self, method: Method, verify: bool) -> Result<BuildOptions, Failure> {
        Ok(BuildOptions {
            method,
            limits: SynthLimits {
                max_table_inputs: self.max_inputs,
                max_gates: self.max_gates,
                exact_seconds: self.exact_seconds,
                max_qubits: self.max_qubits,
            },
            verify: verify.then_some(VerifyOptions {
                max_states: self.max_states,
                route: route(&self.verify_method)?,
                sat_seconds: self.sat_seconds,
            }),
        })
    }
}

/// A reason to stop, with its exit code.
struct Failure {
    code: i32,
    message: String,
}

impl Failure {
    fn bad(message: impl Into<String>) -> Self {
        Failure {
            code: code::BAD_INPUT,
            message: message.into(),
        }
    }
}

impl From<LocatedError> for Failure {
    fn from(e: LocatedError) -> Self {
        Failure::bad(e.to_string())
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
    if std::io::stderr().is_terminal() {
        oraculum::set_exact4_progress(exact4_bar());
    }
    match dispatch(cli.command) {
        Ok(c) => c,
        Err(f) => {
            eprintln!("error: {}", f.message);
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
            format,
            limits,
        } => synth(
            &spec,
            output.as_deref(),
            &method,
            json,
            no_verify,
            format,
            &limits,
        ),
        Command::Verify {
            circuit,
            spec,
            against,
            json,
            max_states,
            method,
            sat_seconds,
            shard,
            output,
        } => {
            let opts = VerifyOptions {
                max_states,
                route: route(&method)?,
                sat_seconds,
            };
            match (spec, against) {
                (_, Some(other)) => verify_against(&circuit, &other, json, &opts),
                (Some(spec), None) => match shard {
                    Some(k) => verify_shard_file(&circuit, &spec, &k, output.as_deref(), &opts),
                    None => verify_file(&circuit, &spec, json, &opts),
                },
                (None, None) => Err(Failure::bad("verify needs --spec or --against")),
            }
        }
        Command::Merge { results, json } => merge(&results, json),
        Command::Cost { circuit, json } => cost(&circuit, json),
        Command::Compare { spec, json, limits } => compare_methods(&spec, json, &limits),
        Command::Table {
            depth,
            rebuild,
            json,
        } => table(depth, rebuild, json),
        Command::Methods { json } => {
            if json {
                let list: Vec<serde_json::Value> = Method::ALL
                    .iter()
                    .map(|(_, name, about)| json!({ "method": name, "about": about }))
                    .collect();
                println!(
                    "{}",
                    serde_json::to_string_pretty(&json!({ "methods": list })).unwrap_or_default()
                );
            } else {
                for (_, name, about) in Method::ALL {
                    println!("{name:<14} {about}");
                }
            }
            Ok(code::DONE)
        }
        Command::Draw {
            input,
            svg,
            width,
            lowered,
            method,
            json,
        } => draw(&input, svg.as_deref(), width, lowered, &method, json),
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            clap_complete::generate(shell, &mut cmd, "oraculum", &mut std::io::stdout());
            Ok(code::DONE)
        }
        Command::Man => {
            let cmd = <Cli as clap::CommandFactory>::command();
            let mut out = Vec::new();
            clap_mangen::Man::new(cmd)
                .render(&mut out)
                .map_err(|e| Failure::bad(format!("cannot render the manual: {e}")))?;
            std::io::stdout()
                .write_all(&out)
                .map_err(|e| Failure::bad(format!("cannot write the manual: {e}")))?;
            Ok(code::DONE)
        }
    }
}

fn read_text(path: &Path) -> Result<String, Failure> {
    std::fs::read_to_string(path)
        .map_err(|e| Failure::bad(format!("{}: cannot read: {e}", path.display())))
}

fn load_spec(path: &Path) -> Result<Spec, Failure> {
    let text = read_text(path)?;
    Ok(parse_spec(&path.display().to_string(), &text)?)
}

fn load_circuit(path: &Path) -> Result<Circuit, Failure> {
    let text = read_text(path)?;
    Ok(read_qasm(&path.display().to_string(), &text)?)
}

/// A progress bar on standard error for runs of many states, only on a terminal.
fn progress_bar(json: bool) -> impl Fn(u64, u64) + Sync {
    let show = !json && std::io::stderr().is_terminal();
    let bar: std::sync::OnceLock<ProgressBar> = std::sync::OnceLock::new();
    let start = Instant::now();
    move |done: u64, total: u64| {
        if !show || total < 1 << 24 {
            return;
        }
        let b = bar.get_or_init(|| {
            let b = ProgressBar::new(total);
            if let Ok(style) = ProgressStyle::with_template(
                "verifying {bar:40} {percent}% of {len} basis states, {eta} left",
            ) {
                b.set_style(style);
            }
            b
        });
        b.set_position(done.max(b.position()));
        if done >= total {
            b.finish_and_clear();
        }
        let _ = start;
    }
}

/// Progress of the 4-line table's build and of long exact searches, drawn on
/// standard error (installed only when it is a terminal).
fn exact4_bar() -> impl Fn(Exact4Progress) + Send + Sync {
    let bar = std::sync::Mutex::new(None::<(String, ProgressBar)>);
    move |p: Exact4Progress| {
        let (label, done, total) = match p {
            Exact4Progress::Build(b) => (
                format!("building the 4-line table: {} of {} gates", b.depth, b.of),
                b.done,
                b.total,
            ),
            Exact4Progress::Search { gates, fraction } => (
                format!("exact: trying {gates} gates"),
                (fraction * 1000.0) as u64,
                1000,
            ),
            Exact4Progress::Done => {
                let mut slot = bar.lock().unwrap_or_else(|e| e.into_inner());
                if let Some((_, old)) = slot.take() {
                    old.finish_and_clear();
                }
                return;
            }
        };
        let mut slot = bar.lock().unwrap_or_else(|e| e.into_inner());
        if slot.as_ref().is_none_or(|(l, _)| *l != label) {
            if let Some((_, old)) = slot.take() {
                old.finish_and_clear();
            }
            let b = ProgressBar::new(total);
            if let Ok(style) = ProgressStyle::with_template("{msg} {bar:40} {percent}%, {eta} left")
            {
                b.set_style(style);
            }
            b.set_message(label.clone());
            *slot = Some((label, b));
        }
        if let Some((_, b)) = slot.as_ref() {
            b.set_position(done.max(b.position()));
            if done >= total {
                b.finish_and_clear();
            }
        }
    }
}

/// `oraculum table`: builds or loads the 4-line table and prints its figures.
fn table(depth: u8, rebuild: bool, json: bool) -> Result<i32, Failure> {
    if !(1..=MAX_DEPTH).contains(&depth) {
        return Err(Failure::bad(format!(
            "--depth {depth}: the table covers 1 to {MAX_DEPTH} gates"
        )));
    }
    let path = cache_path(depth);
    let t0 = Instant::now();
    let cached = if rebuild { None } else { Exact4::load(&path) };
    let (t, action) = match cached {
        Some(t) => (t, "loaded"),
        None => {
            let bar = std::io::stderr().is_terminal().then(exact4_bar);
            let t = Exact4::build(depth, &|p| {
                if let Some(bar) = &bar {
                    bar(Exact4Progress::Build(p))
                }
            });
            t.save(&path).map_err(|e| {
                Failure::bad(format!("{}: cannot write the table: {e}", path.display()))
            })?;
            (t, "built")
        }
    };
    let seconds = t0.elapsed().as_secs_f64();
    let levels: Vec<serde_json::Value> = t
        .levels()
        .iter()
        .enumerate()
        .map(|(k, l)| json!({ "gates": k, "classes": l.classes, "functions": l.functions }))
        .collect();
    if json {
        let out = json!({
            "path": path.display().to_string(),
            "action": action,
            "seconds": seconds,
            "depth": t.depth(),
            "reach": t.reach(),
            "levels": levels,
        });
        println!("{}", serde_json::to_string_pretty(&out).unwrap_or_default());
    } else {
        println!(
            "{action} the 4-line table of depth {} in {seconds:.1} s: {}",
            t.depth(),
            path.display()
        );
        println!(
            "exact proves minima of up to {} gates with it (longer searches are bounded by --exact-seconds)",
            t.reach()
        );
        println!("{:>5} {:>12} {:>15}", "gates", "classes", "functions");
        for (k, l) in t.levels().iter().enumerate() {
            println!("{k:>5} {:>12} {:>15}", l.classes, l.functions);
        }
    }
    Ok(code::DONE)
}

/// Writes `contents` to a temporary file beside `path`, then renames it into place.
fn write_atomic(path: &Path, contents: &str, protect: &[&Path]) -> Result<(), Failure> {
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

fn verdict_failure(e: oraculum::BuildError) -> Failure {
    Failure {
        code: if e.is_limit() {
            code::LIMIT
        } else {
            code::BAD_INPUT
        },
        message: e.to_string(),
    }
}

fn synth(
    spec_path: &Path,
    output: Option<&Path>,
    method: &str,
    json: bool,
    no_verify: bool,
    format: Format,
    limits: &LimitArgs,
) -> Result<i32, Failure> {
    let method = Method::from_name(method).ok_or_else(|| {
        let names: Vec<&str> = Method::ALL.iter().map(|(_, n, _)| *n).collect();
        Failure::bad(format!(
            "unknown method '{method}'; the methods are {}",
            names.join(", ")
        ))
    })?;
    let spec = load_spec(spec_path)?;
    let opts = limits.build_options(method, !no_verify)?;
    let bar = progress_bar(json);
    let out = build_with_progress(&spec, &opts, &bar).map_err(verdict_failure)?;
    if let oraculum::Verification::Ran(Verdict::Refuted { counterexample }) = &out.verification {
        if json {
            println!(
                "{}",
                serde_json::to_string_pretty(&out.report()).unwrap_or_default()
            );
        }
        return Err(Failure {
            code: code::REFUTED,
            message: format!(
                "the synthesized circuit failed verification; nothing was written\n{counterexample}"
            ),
        });
    }
    let text = match format {
        Format::Qasm => out
            .qasm()
            .map_err(|e| Failure::bad(format!("cannot write OpenQASM 2: {e}")))?,
        Format::Text => listing(&out.lowered),
    };
    if let Some(path) = output {
        write_atomic(path, &text, &[spec_path])?;
    }
    let label = out
        .name
        .clone()
        .unwrap_or_else(|| spec_path.display().to_string());
    if json {
        let mut v = serde_json::to_value(out.report()).unwrap_or_default();
        if let Some(obj) = v.as_object_mut() {
            match output {
                Some(p) => obj.insert("output".into(), json!(p.display().to_string())),
                None => obj.insert("circuit".into(), json!(text)),
            };
        }
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
        return Ok(code::DONE);
    }
    let verdict = match &out.verification {
        oraculum::Verification::Ran(v) => v.summary(),
        _ => "NOT verified (--no-verify)".to_string(),
    };
    let mut summary = format!("{label}: method {}, {verdict}\n{}\n", out.method, out.cost);
    for n in &out.notes {
        summary.push_str(&format!("  note: {n}\n"));
    }
    match output {
        Some(p) => {
            print!("{summary}");
            println!("wrote {}", p.display());
        }
        None => {
            print!("{text}");
            eprint!("{summary}");
        }
    }
    Ok(code::DONE)
}

fn draw(
    input: &Path,
    svg: Option<&Path>,
    width: Option<usize>,
    lowered: bool,
    method: &str,
    json: bool,
) -> Result<i32, Failure> {
    let is_qasm = input.extension().is_some_and(|e| e == "qasm");
    let (circuit, title) = if is_qasm {
        (load_circuit(input)?, input.display().to_string())
    } else {
        let m = Method::from_name(method)
            .ok_or_else(|| Failure::bad(format!("unknown method '{method}'")))?;
        let spec = load_spec(input)?;
        let out = oraculum::build(
            &spec,
            &BuildOptions {
                method: m,
                ..BuildOptions::default()
            },
        )
        .map_err(verdict_failure)?;
        let title = format!(
            "{} ({}{})",
            spec.name
                .clone()
                .unwrap_or_else(|| input.display().to_string()),
            out.method,
            if lowered { ", lowered" } else { "" }
        );
        (if lowered { out.lowered } else { out.mct }, title)
    };
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&circuit).unwrap_or_default()
        );
        return Ok(code::DONE);
    }
    if let Some(p) = svg {
        write_atomic(p, &oraculum::draw_svg(&circuit, &title), &[input])?;
        println!("wrote {} ({} gates)", p.display(), circuit.gates().len());
        return Ok(code::DONE);
    }
    let cols = width
        .or_else(|| std::env::var("COLUMNS").ok().and_then(|c| c.parse().ok()))
        .unwrap_or(100);
    println!("{title}");
    print!("{}", oraculum::draw_text(&circuit, cols));
    Ok(code::DONE)
}

fn compare_methods(spec_path: &Path, json: bool, limits: &LimitArgs) -> Result<i32, Failure> {
    let spec = load_spec(spec_path)?;
    let opts = limits.build_options(Method::Auto, true)?;
    let rows = oraculum::compare(&spec, &opts);
    let best = rows
        .iter()
        .filter_map(|(m, r)| r.as_ref().ok().map(|o| (m, o)))
        .filter(|(_, o)| o.verification.is_proven())
        .min_by_key(|(_, o)| (o.cost.toffoli, o.cost.qubits, o.cost.mct_total()))
        .map(|(m, _)| *m);
    let curve = oraculum::tradeoff(&spec, &opts);
    let refuted = rows.iter().any(|(_, r)| {
        matches!(r, Ok(o) if matches!(o.verification, oraculum::Verification::Ran(Verdict::Refuted { .. })))
    });
    if json {
        let list: Vec<serde_json::Value> = rows
            .iter()
            .map(|(m, r)| match r {
                Ok(o) => serde_json::to_value(o.report()).unwrap_or_default(),
                Err(e) => json!({ "method": m.name(), "error": e.to_string() }),
            })
            .collect();
        let v = json!({
            "spec": spec_path.display().to_string(),
            "name": spec.name,
            "methods": list,
            "best": best.map(|m| m.name()),
            "tradeoff": curve.iter().map(|o| json!({
                "qubits": o.cost.qubits,
                "toffoli": o.cost.toffoli,
                "verified": o.verification.is_proven(),
            })).collect::<Vec<_>>(),
        });
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        println!(
            "{:<17} {:>8} {:>8} {:>8} {:>7} {:>8} {:>9}  verified",
            "method", "mct", "toffoli", "cnot", "qubits", "t-count", "seconds"
        );
        for (m, r) in &rows {
            match r {
                Ok(o) => {
                    let secs = o.timings.synth + o.timings.lower + o.timings.verify;
                    let v = match &o.verification {
                        oraculum::Verification::Ran(v) => v.summary(),
                        _ => "no".into(),
                    };
                    let mark = if Some(*m) == best { "*" } else { " " };
                    println!(
                        "{:<17} {:>8} {:>8} {:>8} {:>7} {:>8} {:>9.3}  {v}",
                        format!("{m}{mark}"),
                        o.cost.mct_total(),
                        o.cost.toffoli,
                        o.cost.cnot,
                        o.cost.qubits,
                        o.cost.t_count,
                        secs
                    );
                    for n in &o.notes {
                        println!("{:<17} note: {n}", "");
                    }
                }
                Err(e) => println!("{:<17} no circuit: {e}", m.name()),
            }
        }
        if let Some(m) = best {
            println!(
                "* fewest Toffolis among verified circuits: {m} (synth --method {m} writes it)"
            );
        }
        if curve.len() > 1 {
            println!("\nqubits against Toffolis, bennett with --max-qubits:");
            for o in &curve {
                let v = if o.verification.is_proven() {
                    "verified"
                } else {
                    "NOT verified"
                };
                println!(
                    "  {:>5} qubits  {:>6} toffoli  {v}",
                    o.cost.qubits, o.cost.toffoli
                );
            }
        }
    }
    Ok(if refuted { code::REFUTED } else { code::DONE })
}

fn verify_failure(circuit: &Path, e: VerifyError) -> Failure {
    Failure {
        code: if e.is_limit() {
            code::LIMIT
        } else {
            code::BAD_INPUT
        },
        message: format!("{}: {e}", circuit.display()),
    }
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

fn verify_shard_file(
    circuit: &Path,
    spec: &Path,
    shard: &str,
    output: Option<&Path>,
    opts: &VerifyOptions,
) -> Result<i32, Failure> {
    let (k, n) = parse_shard(shard)?;
    let circuit_text = read_text(circuit)?;
    let spec_text = read_text(spec)?;
    let c = read_qasm(&circuit.display().to_string(), &circuit_text)?;
    let s = parse_spec(&spec.display().to_string(), &spec_text)?;
    let bar = progress_bar(output.is_none());
    let r = oraculum::verify_shard(
        &c,
        &s,
        opts,
        k,
        n,
        circuit_text.as_bytes(),
        spec_text.as_bytes(),
        &bar,
    )
    .map_err(|e| verify_failure(circuit, e))?;
    let text = serde_json::to_string_pretty(&r).unwrap_or_default() + "\n";
    match output {
        Some(p) => {
            write_atomic(p, &text, &[circuit, spec])?;
            println!(
                "shard {k}/{n}: {} states checked, {}; wrote {}",
                r.states,
                if r.proven { "all correct" } else { "REFUTED" },
                p.display()
            );
        }
        None => print!("{text}"),
    }
    Ok(if r.proven { code::DONE } else { code::REFUTED })
}

fn merge(paths: &[PathBuf], json: bool) -> Result<i32, Failure> {
    let mut results = Vec::new();
    for p in paths {
        let text = read_text(p)?;
        let r: oraculum::ShardResult = serde_json::from_str(&text).map_err(|e| {
            Failure::bad(format!(
                "{}:{}:{}: not a shard result file: {e}",
                p.display(),
                e.line(),
                e.column()
            ))
        })?;
        results.push(r);
    }
    let v = oraculum::merge_shards(&results).map_err(|e| Failure::bad(e.to_string()))?;
    if json {
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        match &v {
            Verdict::Proven { .. } => println!("{} shards: {}", results.len(), v.summary()),
            Verdict::Refuted { counterexample } => {
                println!("{} shards: refuted\n{counterexample}", results.len())
            }
        }
    }
    Ok(if matches!(v, Verdict::Refuted { .. }) {
        code::REFUTED
    } else {
        code::DONE
    })
}

fn verify_against(
    circuit: &Path,
    other: &Path,
    json: bool,
    opts: &VerifyOptions,
) -> Result<i32, Failure> {
    let a = load_circuit(circuit)?;
    let b = load_circuit(other)?;
    let budget = std::time::Duration::from_secs_f64(opts.sat_seconds.max(0.0));
    let free_bits = a
        .registers()
        .iter()
        .filter(|(n, _)| n != "anc")
        .map(|(_, s)| *s as u32)
        .sum();
    let verdict = match oraculum::circuits_equivalent(&a, &b, budget) {
        Ok(oraculum::SatOutcome::Equivalent) => Verdict::Proven {
            by: "sat",
            free_bits,
            states: 0,
            outside_domain: 0,
        },
        Ok(oraculum::SatOutcome::Counterexample(c)) => Verdict::Refuted {
            counterexample: Box::new(c),
        },
        Ok(oraculum::SatOutcome::Timeout) => {
            return Err(verify_failure(
                circuit,
                VerifyError::SatTimeout(opts.sat_seconds),
            ))
        }
        Err(e) => return Err(verify_failure(circuit, e.into())),
    };
    if json {
        let mut v = serde_json::to_value(&verdict).unwrap_or_default();
        if let Some(obj) = v.as_object_mut() {
            obj.insert("circuit".into(), json!(circuit.display().to_string()));
            obj.insert("against".into(), json!(other.display().to_string()));
        }
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        match &verdict {
            Verdict::Proven { .. } => println!(
                "{}: equivalent to {}, {}",
                circuit.display(),
                other.display(),
                verdict.summary()
            ),
            Verdict::Refuted { counterexample } => println!(
                "{}: differs from {}\n{counterexample}",
                circuit.display(),
                other.display()
            ),
        }
    }
    Ok(if matches!(verdict, Verdict::Refuted { .. }) {
        code::REFUTED
    } else {
        code::DONE
    })
}

fn verify_file(
    circuit: &Path,
    spec: &Path,
    json: bool,
    opts: &VerifyOptions,
) -> Result<i32, Failure> {
    let c = load_circuit(circuit)?;
    let s = load_spec(spec)?;
    let bar = progress_bar(json);
    let t = Instant::now();
    let verdict =
        verify_with_progress(&c, &s, opts, &bar).map_err(|e| verify_failure(circuit, e))?;
    let seconds = t.elapsed().as_secs_f64();
    let refuted = matches!(verdict, Verdict::Refuted { .. });
    if json {
        let mut v = serde_json::to_value(&verdict).unwrap_or_default();
        if let Some(obj) = v.as_object_mut() {
            obj.insert("circuit".into(), json!(circuit.display().to_string()));
            obj.insert("spec".into(), json!(spec.display().to_string()));
            obj.insert("seconds".into(), json!(seconds));
        }
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        match &verdict {
            Verdict::Proven { .. } => println!(
                "{}: {} against {}",
                circuit.display(),
                verdict.summary(),
                spec.display()
            ),
            Verdict::Refuted { counterexample } => println!(
                "{}: refuted against {}\n{counterexample}",
                circuit.display(),
                spec.display()
            ),
        }
    }
    Ok(if refuted { code::REFUTED } else { code::DONE })
}

fn cost(circuit: &Path, json: bool) -> Result<i32, Failure> {
    let c = load_circuit(circuit)?;
    if c.max_controls() > 2 {
        return Err(Failure::bad(
            "the circuit has gates with more than two controls",
        ));
    }
    let cost = Cost::measure(&c, &c);
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&cost).unwrap_or_default()
        );
    } else {
        println!("{}\n{cost}", circuit.display());
    }
    Ok(code::DONE)
}
