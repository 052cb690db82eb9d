//! The JSON reports of the command line, one serializable struct per command
//! (docs/json.md lists their fields; field names are stable).

use crate::circuit::{Cost, Uncompute};
use crate::exact::Level;
use crate::pipeline::{BuildError, Curve, Outcome, Report};
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
    /// Toffolis plus temporary ANDs.
    pub toffoli_equivalent: usize,
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
    /// How uncomputes were made (`toffoli` or `measure`), as every row's cost says.
    pub mode: Uncompute,
    /// One row per method.
    pub methods: Vec<CompareRow<'a>>,
    /// The method `auto` would pick, if any circuit was proven.
    pub best: Option<&'static str>,
    /// Qubits against Toffolis, bennett with a qubit budget.
    pub tradeoff: Vec<TradeoffPoint>,
    /// What cut the trade-off curve short or coarse (a limit, the SAT share).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub tradeoff_notes: Vec<String>,
}

impl<'a> CompareReport<'a> {
    /// The report of `rows` and `curve` for the spec at `spec`.
    pub fn new(
        spec: String,
        name: Option<&'a str>,
        rows: &'a [(Method, Result<Outcome, BuildError>)],
        best: Option<Method>,
        curve: &Curve,
    ) -> Self {
        CompareReport {
            spec,
            name,
            mode: rows
                .iter()
                .filter_map(|(_, r)| r.as_ref().ok().map(|o| o.cost.mode))
                .max()
                .unwrap_or_default(),
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
                .points
                .iter()
                .map(|o| TradeoffPoint {
                    qubits: o.cost.qubits,
                    toffoli: o.cost.toffoli,
                    toffoli_equivalent: o.cost.toffoli_equivalent,
                    verified: o.verification.is_proven(),
                })
                .collect(),
            tradeoff_notes: curve.notes.clone(),
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

/// One row of the table `compare` prints, flat, for callers that show it as a
/// table (the Python package's `compare`): the columns of `oraculum compare`.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CompareTableRow {
    /// The method.
    pub method: &'static str,
    /// Whether `auto` would pick this row (fewest Toffolis among verified circuits).
    pub best: bool,
    /// Gates before lowering (`None` when the method made no circuit).
    pub mct: Option<usize>,
    /// Toffoli gates after lowering.
    pub toffoli: Option<usize>,
    /// Toffolis plus temporary ANDs (what `auto` ranks by).
    pub toffoli_equivalent: Option<usize>,
    /// `toffoli` or `measure`.
    pub mode: Option<Uncompute>,
    /// CNOT gates after lowering.
    pub cnot: Option<usize>,
    /// NOT gates after lowering.
    pub not: Option<usize>,
    /// All lines, ancillae included.
    pub qubits: Option<usize>,
    /// 7 per Toffoli, 4 per temporary AND.
    pub t_count: Option<usize>,
    /// Seconds of synthesis, lowering and verification.
    pub seconds: Option<f64>,
    /// True when every basis state was checked and correct.
    pub verified: bool,
    /// The verdict in words (`proven exhaustively ...`, `refuted`, `not verified`).
    pub verdict: Option<String>,
    /// Why the method made no circuit.
    pub error: Option<String>,
    /// The method's notes.
    pub notes: Vec<String>,
}

/// The rows of `compare` as [`CompareTableRow`]s.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CompareTable {
    /// One row per method, in the order they ran.
    pub rows: Vec<CompareTableRow>,
}

impl CompareTable {
    /// The table of `rows`, marking `best` (see [`crate::pipeline::best_of`]).
    pub fn new(rows: &[(Method, Result<Outcome, BuildError>)], best: Option<Method>) -> Self {
        let rows = rows
            .iter()
            .map(|(m, r)| match r {
                Ok(o) => CompareTableRow {
                    method: m.name(),
                    best: Some(*m) == best,
                    mct: Some(o.cost.mct_total()),
                    toffoli: Some(o.cost.toffoli),
                    toffoli_equivalent: Some(o.cost.toffoli_equivalent),
                    mode: Some(o.cost.mode),
                    cnot: Some(o.cost.cnot),
                    not: Some(o.cost.not),
                    qubits: Some(o.cost.qubits),
                    t_count: Some(o.cost.t_count),
                    seconds: Some(o.timings.synth + o.timings.lower + o.timings.verify),
                    verified: o.verification.is_proven(),
                    verdict: Some(match &o.verification {
                        crate::pipeline::Verification::Ran(v) => v.summary(),
                        _ => "not verified".into(),
                    }),
                    error: None,
                    notes: o.notes.clone(),
                },
                Err(e) => CompareTableRow {
                    method: m.name(),
                    best: false,
                    mct: None,
                    toffoli: None,
                    toffoli_equivalent: None,
                    mode: None,
                    cnot: None,
                    not: None,
                    qubits: None,
                    t_count: None,
                    seconds: None,
                    verified: false,
                    verdict: None,
                    error: Some(e.to_string()),
                    notes: Vec::new(),
                },
            })
            .collect();
        CompareTable { rows }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::pipeline::{compare, BuildOptions};
    use crate::spec::parse_spec;

    #[test]
    fn compare_table_marks_the_best_row_and_failed_rows() {
        // Majority of three (0xe8, common practice) is a ^ (a ^ b)(a ^ c):
        // one AND (its multiplicative complexity), so xag's Bennett circuit
        // computes and uncomputes it with two Toffolis; a 3-input 1-output
        // function has no permutation method.
        let spec = parse_spec(
            "vote.toml",
            "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"most\"]\n[table]\nmost = \"0xe8\"\n",
        )
        .unwrap();
        let opts = BuildOptions {
            verify: Some(Default::default()),
            ..Default::default()
        };
        let mut rows = compare(&spec, &opts);
        rows.push((
            Method::Transform,
            Err(BuildError::Synth(crate::synth::SynthError::Cancelled)),
        ));
        let best = crate::pipeline::best_of(&rows);
        let table = CompareTable::new(&rows, best);
        assert_eq!(table.rows.len(), rows.len());
        let marked: Vec<_> = table.rows.iter().filter(|r| r.best).collect();
        assert_eq!(marked.len(), 1);
        assert_eq!(marked[0].toffoli, Some(2));
        assert_eq!(marked[0].t_count, Some(14));
        let fewest = table.rows.iter().filter_map(|r| r.toffoli).min();
        assert_eq!(marked[0].toffoli, fewest);
        let failed = table.rows.last().unwrap();
        assert_eq!(failed.method, "transform");
        assert!(failed.error.is_some() && failed.toffoli.is_none() && !failed.verified);
        assert!(table.rows[..rows.len() - 1].iter().all(|r| r.verified));
    }
}
