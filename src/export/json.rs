//! The JSON reports of the command line, one serializable struct per command
//! (docs/json.md lists their fields; field names are stable).

use crate::circuit::Cost;
use crate::exact::Level;
use crate::pipeline::{BuildError, Outcome, Report};
use crate::synth::Method;
use crate::verify::Verdict;
use serde::Serialize;

/// `synth --json`: the build report, and where the circuit went.
#[derive(Serialize)]
pub struct SynthReport<'a> {
    /// The build report.
    #[serde(flatten)]
    pub report: Report<'a>,
    /// The file written, when `-o` was given.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub output: Option<String>,
    /// The circuit's text, when it went to standard output.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub circuit: Option<String>,
}

/// `verify --json` (against a spec or another circuit): the verdict and its inputs.
#[derive(Serialize)]
pub struct VerifyReport<'a> {
    /// The verdict.
    #[serde(flatten)]
    pub verdict: &'a Verdict,
    /// The circuit checked.
    pub circuit: String,
    /// The spec it was checked against.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub spec: Option<String>,
    /// The circuit it was checked against.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub against: Option<String>,
    /// Seconds the check took.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub seconds: Option<f64>,
    /// Present and true when the check was against the inverse of the spec's map.
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub inverse: bool,
}

/// One row of `compare --json`: a method's build report, or why it made no circuit.
#[derive(Serialize)]
#[serde(untagged)]
pub enum CompareRow<'a> {
    /// The method's build report.
    Built(Report<'a>),
    /// The method made no circuit.
    Failed {
        /// The method.
        method: &'static str,
        /// Why not.
        error: String,
    },
}

/// One point of the qubit trade-off curve.
#[derive(Serialize)]
pub struct TradeoffPoint {
    /// Qubits of the circuit.
    pub qubits: usize,
    /// Its Toffoli count.
    pub toffoli: usize,
    /// Whether it was proven.
    pub verified: bool,
}

/// `compare --json`.
#[derive(Serialize)]
pub struct CompareReport<'a> {
    /// The spec file.
    pub spec: String,
    /// The spec's name.
    pub name: Option<&'a str>,
    /// One row per method.
    pub methods: Vec<CompareRow<'a>>,
    /// The method `auto` would pick, if any circuit was proven.
    pub best: Option<&'static str>,
    /// Qubits against Toffolis, bennett with a qubit budget.
    pub tradeoff: Vec<TradeoffPoint>,
    /// Why there is no trade-off curve, when a limit skipped it.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub tradeoff_note: Option<String>,
}

impl<'a> CompareReport<'a> {
    /// The report of `rows` and `curve` for the spec at `spec`.
    pub fn new(
        spec: String,
        name: Option<&'a str>,
        rows: &'a [(Method, Result<Outcome, BuildError>)],
        best: Option<Method>,
        curve: &[Outcome],
    ) -> Self {
        CompareReport {
            spec,
            name,
            methods: rows
                .iter()
                .map(|(m, r)| match r {
                    Ok(o) => CompareRow::Built(o.report()),
                    Err(e) => CompareRow::Failed {
                        method: m.name(),
                        error: e.to_string(),
                    },
                })
                .collect(),
            best: best.map(Method::name),
            tradeoff: curve
                .iter()
                .map(|o| TradeoffPoint {
                    qubits: o.cost.qubits,
                    toffoli: o.cost.toffoli,
                    verified: o.verification.is_proven(),
                })
                .collect(),
            tradeoff_note: None,
        }
    }
}

/// One gate count of the 4-line table.
#[derive(Serialize)]
pub struct TableLevel {
    /// The gate count.
    pub gates: usize,
    /// Classes of that minimum size.
    pub classes: u64,
    /// Functions of that minimum size.
    pub functions: u64,
}

/// `table --json`.
#[derive(Serialize)]
pub struct TableReport {
    /// The file of the table.
    pub path: String,
    /// `built` or `loaded`.
    pub action: &'static str,
    /// Seconds it took.
    pub seconds: f64,
    /// The table's depth.
    pub depth: u8,
    /// The largest gate count a query proves.
    pub reach: usize,
    /// Classes and functions per gate count.
    pub levels: Vec<TableLevel>,
}

impl TableReport {
    /// The levels of a table as report rows.
    pub fn levels(levels: &[Level]) -> Vec<TableLevel> {
        levels
            .iter()
            .enumerate()
            .map(|(k, l)| TableLevel {
                gates: k,
                classes: l.classes,
                functions: l.functions,
            })
            .collect()
    }
}

/// One method of `methods --json`.
#[derive(Serialize)]
pub struct MethodRow {
    /// Its name.
    pub method: &'static str,
    /// What it takes and does.
    pub about: &'static str,
}

/// `methods --json`.
#[derive(Serialize)]
pub struct MethodsReport {
    /// Every method, `auto` first.
    pub methods: Vec<MethodRow>,
}

/// `cost --json`: the cost itself.
pub type CostReport = Cost;
