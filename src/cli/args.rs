//! The command line's flags, as clap derives them; help, completions and the manual come from here.

use clap::builder::{PossibleValuesParser, TypedValueParser};
use clap::{Parser, Subcommand, ValueEnum};
use oraculum::{Method, Route, SynthLimits, Uncompute, VerifyOptions};
use std::path::PathBuf;

pub const AFTER_HELP: &str =
    "Exit codes: 0 done and verified, 1 verification refuted the circuit, \
2 bad input or usage, 3 a resource limit refused the job.";

#[derive(Parser)]
#[command(
    name = "oraculum",
    version,
    about = "Turns classical functions into verified reversible oracles, written as OpenQASM 2 or 3.",
    after_help = AFTER_HELP
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Clone, Copy, ValueEnum)]
pub enum Format {
    /// OpenQASM 2 with x, cx and ccx.
    Qasm,
    /// OpenQASM 3 with stdgates.inc (x, cx, ccx; ctrl(k) @ x with --keep-mct).
    Qasm3,
    /// A plain listing of lines and gates.
    Text,
    /// OpenQASM 2 in Clifford+T (h, s, sdg, t, tdg, x, cx, cz, measure, if); verify does not read it.
    CliffordT,
}

/// `--method`: `auto` (`None`) or a method.
#[derive(Clone, Copy)]
pub struct Choice(pub Option<Method>);

/// `auto` or a method's name, offered by completions.
fn method_parser() -> impl TypedValueParser<Value = Choice> {
    let names: Vec<&'static str> = std::iter::once("auto")
        .chain(Method::all().map(Method::name))
        .collect();
    PossibleValuesParser::new(names).map(|s| Choice(Method::from_name(&s)))
}

fn uncompute_parser() -> impl TypedValueParser<Value = Uncompute> {
    PossibleValuesParser::new(["toffoli", "measure"])
        .map(|s| Uncompute::from_name(&s).unwrap_or_default())
}

fn route_parser() -> impl TypedValueParser<Value = Route> {
    PossibleValuesParser::new(Route::all().map(Route::name).collect::<Vec<_>>())
        .map(|s| Route::from_name(&s).unwrap_or_default())
}

#[derive(Subcommand)]
pub enum Command {
    /// Synthesize a spec, lower it to Toffoli gates, verify it, and write it.
    Synth {
        /// The spec file (TOML).
        spec: PathBuf,
        /// Where to write the circuit; without it the circuit goes to standard output.
        #[arg(short, long)]
        output: Option<PathBuf>,
        /// Synthesis method (see `oraculum methods`).
        #[arg(short, long, default_value = "auto", value_parser = method_parser())]
        method: Choice,
        /// Print the report as one JSON object.
        #[arg(long)]
        json: bool,
        /// Skip verification; the report says the circuit was not checked.
        #[arg(long)]
        no_verify: bool,
        #[command(flatten)]
        form: FormArgs,
        #[command(flatten)]
        limits: LimitArgs,
    },
    /// Verify an OpenQASM 2 or 3 circuit against a spec.
    Verify {
        /// The circuit (OpenQASM 2 or 3 with x, cx, ccx).
        circuit: PathBuf,
        /// The spec it should realize.
        #[arg(long, required_unless_present = "against", conflicts_with = "against")]
        spec: Option<PathBuf>,
        /// Another circuit it should be equivalent to (proven by SAT).
        #[arg(long)]
        against: Option<PathBuf>,
        /// Prove the circuit realizes the inverse of the spec's map.
        #[arg(long, requires = "spec", conflicts_with = "shard")]
        inverse: bool,
        /// The file's register names and the spec's registers they stand for, e.g. key=x,flag=y (the spec's [registers] are applied too).
        #[arg(long, value_name = "NAME=REGISTER,...", requires = "spec")]
        registers: Option<String>,
        /// Print the verdict as one JSON object.
        #[arg(long)]
        json: bool,
        /// Most basis states to simulate (for --shard: in this shard).
        #[arg(long, default_value_t = oraculum::verify::DEFAULT_MAX_STATES)]
        max_states: u64,
        /// How to prove it: auto (exhaustive within --max-states, SAT past it), exhaustive, sat.
        #[arg(long, default_value = "auto", value_parser = route_parser())]
        method: Route,
        /// Seconds the SAT solver may take.
        #[arg(long, default_value_t = oraculum::verify::DEFAULT_SAT_SECONDS)]
        sat_seconds: f64,
        /// Check only slice K of N equal slices of the state space (K from 0), e.g. 3/16.
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// With --shard: write the shard's result file here (else to standard output).
        #[arg(short, long)]
        output: Option<PathBuf>,
        /// Most gates a circuit file may hold, whole-register statements expanded.
        #[arg(long, default_value_t = oraculum::export::DEFAULT_MAX_GATES)]
        max_gates: usize,
    },
    /// Merge the result files of every shard into one verdict, rechecking them against the circuit and spec.
    Merge {
        /// The shard result files.
        #[arg(required = true)]
        results: Vec<PathBuf>,
        /// The circuit the shards checked.
        #[arg(long)]
        circuit: PathBuf,
        /// The spec they checked it against.
        #[arg(long)]
        spec: PathBuf,
        /// Print the verdict as one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Print the cost report of an OpenQASM 2 or 3 circuit, or count the gates
    /// of an arithmetic spec's structural circuit by streaming (a `.toml` file).
    Cost {
        /// The circuit (OpenQASM 2 or 3 with x, cx, ccx), or an arithmetic spec (.toml).
        circuit: PathBuf,
        /// Print the report as one JSON object.
        #[arg(long)]
        json: bool,
        /// Most gates the file may hold, whole-register statements expanded.
        #[arg(long, default_value_t = oraculum::export::DEFAULT_MAX_GATES)]
        max_gates: usize,
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
    /// Draw a circuit (an OpenQASM 2 or 3 file, or a spec, synthesized first) in the terminal or as SVG.
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
        #[arg(short, long, default_value = "auto", value_parser = method_parser())]
        method: Choice,
        /// Print the circuit's lines and gates as one JSON object.
        #[arg(long)]
        json: bool,
        /// For a spec: uncompute ANDs by Toffoli gates or by measurement.
        #[arg(long, default_value = "toffoli", value_parser = uncompute_parser())]
        uncompute: Uncompute,
        /// For a circuit file: most gates it may hold, whole-register statements expanded.
        #[arg(long, default_value_t = oraculum::export::DEFAULT_MAX_GATES)]
        max_gates: usize,
    },
    /// Build the 4-line exact table (or load it from the cache) and print its figures.
    Table {
        /// Gate count the table covers: 7 takes seconds and 0.3 GB, 8 about a minute and 4.3 GB.
        #[arg(long, default_value_t = oraculum::exact::DEFAULT_DEPTH)]
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
    /// Print the manual page (roff), for `man -l -`, or with --dir write one page per subcommand into a folder.
    Man {
        /// Write `oraculum.1` and one `oraculum-COMMAND.1` per subcommand into this folder (made if missing), instead of printing the main page.
        #[arg(long, value_name = "DIR")]
        dir: Option<PathBuf>,
    },
}

/// How `synth` shapes the circuit it writes.
#[derive(clap::Args)]
pub struct FormArgs {
    /// Output format of the circuit.
    #[arg(long, value_enum, default_value = "qasm")]
    pub format: Format,
    /// Write the circuit as an OpenQASM gate definition named NAME (every line an argument, ancillae entering and leaving at |0>) and one application of it.
    #[arg(long, value_name = "NAME")]
    pub as_gate: Option<String>,
    /// Write the inverse circuit (the gates in reverse order), verified against the inverse of the spec's map.
    #[arg(long)]
    pub inverse: bool,
    /// With --format qasm3: write the gates before lowering, as ctrl(k) @ x (negctrl for controls on 0), for compilers that lower them.
    #[arg(long)]
    pub keep_mct: bool,
}

#[derive(clap::Args)]
pub struct LimitArgs {
    /// Most basis states the verifier simulates (default 2^30).
    #[arg(long, default_value_t = oraculum::verify::DEFAULT_MAX_STATES)]
    pub max_states: u64,
    /// Most inputs a truth-table method expands.
    #[arg(long, default_value_t = SynthLimits::default().max_table_inputs)]
    pub max_inputs: usize,
    /// Most gates before lowering.
    #[arg(long, default_value_t = SynthLimits::default().max_gates)]
    pub max_gates: usize,
    /// Seconds an exact method searches before it returns its best circuit with a proven bound.
    #[arg(long, default_value_t = SynthLimits::default().exact_seconds)]
    pub exact_seconds: f64,
    /// How to prove the circuit: auto (exhaustive within --max-states, SAT past it), exhaustive, sat.
    #[arg(long, default_value = "auto", value_parser = route_parser())]
    pub verify_method: Route,
    /// Seconds the SAT solver may take.
    #[arg(long, default_value_t = oraculum::verify::DEFAULT_SAT_SECONDS)]
    pub sat_seconds: f64,
    /// Most qubits the circuit may use, ancillae included; bennett recomputes to fit.
    #[arg(long)]
    pub max_qubits: Option<usize>,
    /// Most clauses a SAT encoding of synthesis (pebbling, esop-exact) may have.
    #[arg(long, default_value_t = SynthLimits::default().max_clauses)]
    pub max_clauses: usize,
    /// Uncompute each AND held by a clean ancilla by a second Toffoli (toffoli: NOT/CNOT/Toffoli only) or by measurement (measure: a 4-T temporary AND, then a measurement and a classically controlled CZ; auto ranks by Toffoli-equivalents).
    #[arg(long, default_value = "toffoli", value_parser = uncompute_parser())]
    pub uncompute: Uncompute,
}

impl LimitArgs {
    /// The library's options for one build.
    pub fn build_options(&self, method: Option<Method>, verify: bool) -> oraculum::BuildOptions {
        oraculum::BuildOptions {
            method,
            limits: SynthLimits {
                max_table_inputs: self.max_inputs,
                max_gates: self.max_gates,
                exact_seconds: self.exact_seconds,
                max_qubits: self.max_qubits,
                max_clauses: self.max_clauses,
            },
            verify: verify.then_some(VerifyOptions {
                max_states: self.max_states,
                route: self.verify_method,
                sat_seconds: self.sat_seconds,
            }),
            uncompute: self.uncompute,
        }
    }
}
