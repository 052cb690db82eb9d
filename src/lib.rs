//! oraculum turns classical functions into verified reversible oracles.
//!
//! A spec (truth table, expression, permutation or arithmetic op) is
//! synthesized into multi-controlled Toffoli gates, optimized, lowered to NOT,
//! CNOT and Toffoli gates on clean ancillae, verified by an independent
//! exhaustive checker, and written as OpenQASM 2.
//!
//! ```
//! use oraculum::{build, parse_spec, BuildOptions};
//! let spec = parse_spec("vote.toml", r#"
//!     kind = "function"
//!     inputs = ["a", "b", "c"]
//!     outputs = ["most"]
//!     [table]
//!     most = "0xe8"
//! "#).unwrap();
//! let out = build(&spec, &BuildOptions { verify: Some(Default::default()), ..Default::default() }).unwrap();
//! assert!(out.verification.is_proven());
//! assert_eq!(out.cost.toffoli, 3); // ab ^ ac ^ bc
//! let qasm = out.qasm().unwrap();
//! assert!(qasm.starts_with("OPENQASM 2.0;"));
//! ```
#![deny(missing_docs)]

mod circuit;
mod export;
mod logic;
mod lower;
mod mutate;
mod opt;
mod pipeline;
mod spec;
mod synth;
mod verify;

pub use circuit::{Circuit, Control, Cost, Gate, Line, LineInfo, LineOutOfRange, Role};
pub use export::{draw_svg, draw_text, listing, read_qasm, write_qasm, QasmHeader, WriteError};
pub use logic::{
    parse_expr, third, Cube, Esop, Expr, ExprError, Lit, Literal, Network, Node, Permutation,
    PermutationError, TableError, TruthTable, MAX_PERMUTATION_WIDTH, MAX_TABLE_VARS, VAR_PATTERN,
};
pub use lower::{lower, ANCILLA_REGISTER};
pub use mutate::{mutants, Fault};
pub use opt::{
    cancel_pairs, lowered_cost, merge_pairs, optimize, resynthesize_windows, resynthesize_windows4,
    CANCEL_WINDOW, WINDOW4_GATES,
};
pub use pipeline::{
    build, build_one, build_with_progress, compare, tradeoff, BuildError, BuildOptions, Outcome,
    Report, Timings, Verification,
};
pub use spec::{
    parse_spec, ArithOp, ArithSpec, FunctionSpec, LocatedError, Location, OracleForm, Output,
    OutputDef, Source, Spec, SpecBody, MAX_ARITH_WIDTH,
};
pub use synth::{
    arith_lines, arithmetic, bennett, bennett_counts, cache_path, candidates, esop_circuit,
    esop_of, exact4_table, exact_esop, exorlink_minimize, function_lines, hierarchical, library,
    minimize_tables, network_of, permutation_lines, reed_muller, reed_muller_coefficients,
    set_exact4_progress, synthesize, transform, transform_function, transform_with, xor_embedding,
    BuildProgress, EsopTable, Exact3, Exact4, Exact4Progress, Exact4Result, ExactEsop, Level,
    Method, Registers, SynthError, SynthLimits, Synthesis, DEFAULT_DEPTH, EXACT_ESOP_MAX_INPUTS,
    EXORLINK_MAX_TERMS, EXORLINK_WORK, MAX_DEPTH, PIECE_INPUTS, TRANSFORM_MAX_LINES, WINDOW_DEPTH,
};
pub use verify::{
    circuits_equivalent, fingerprint, free_lines, merge_shards, sat_equivalence, verify,
    verify_shard, verify_with_progress, Counterexample, RegisterValue, Route, SatError, SatOutcome,
    ShardError, ShardResult, Verdict, VerifyError, VerifyOptions, BLOCK_WORDS, DEFAULT_MAX_STATES,
    DEFAULT_SAT_SECONDS, SAT_MAX_TABLE_INPUTS, SHARD_FORMAT,
};
