//! The budgets a job can run into, as data: errors and reports name the
//! budget, and the command line maps each to the option that raises it.

use serde::Serialize;

/// A budget of synthesis or verification.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Limit {
    /// Inputs a truth-table method expands.
    TableInputs,
    /// Gates of a circuit before lowering.
    Gates,
    /// Qubits of a circuit, ancillae included.
    Qubits,
    /// Seconds an exact or SAT-based synthesis search may take.
    SearchSeconds,
    /// Basis states the exhaustive verifier simulates.
    States,
    /// Seconds the SAT verifier may take.
    SatSeconds,
    /// Clauses of a SAT encoding of synthesis.
    Clauses,
}

/// Where a search stopped short of its goal, and what it proved on the way.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Stop {
    /// The budget that ran out, or `None` when the method's reach (a table's
    /// depth) ended the search.
    pub limit: Option<Limit>,
    /// A proven lower bound on the quantity minimized.
    pub bound: usize,
    /// What is counted (`gates`, `cubes`).
    pub unit: &'static str,
}
