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
//! // Majority has one AND, (a ^ c)(b ^ c) ^ c: computed, copied, uncomputed.
//! assert_eq!(out.cost.toffoli, 2);
//! let qasm = out.qasm().unwrap();
//! assert!(qasm.starts_with("OPENQASM 2.0;"));
//! ```
#![deny(missing_docs)]
// Errors are rare and carry their place in the file (name, line, text);
// boxing them would add noise to every reader for no measurable gain.
#![allow(clippy::result_large_err)]

pub mod circuit;
pub mod exact;
pub mod export;
pub mod limit;
pub mod logic;
pub mod lower;
pub mod mutate;
pub mod netlist;
pub mod opt;
pub mod pipeline;
pub mod progress;
pub mod source;
pub mod spec;
pub mod synth;
pub mod verify;
pub mod xag;

pub use circuit::{Circuit, Control, Cost, Gate, Line, LineInfo, Role, Uncompute};
pub use exact::Tables;
pub use export::{read_qasm, write_qasm, QasmHeader};
pub use limit::{Limit, Stop};
pub use lower::lower;
pub use pipeline::{
    build, build_with_progress, compare, invert, BuildError, BuildOptions, Outcome, Verification,
};
pub use progress::{Event, Progress, Task};
pub use source::{LocatedError, Location};
pub use spec::{
    parse_spec, ArithOp, ArithSpec, BigUint, FunctionSpec, OracleForm, Relation, Spec, SpecBody,
};
pub use synth::{Method, SynthError, SynthLimits};
pub use verify::{
    verify, verify_inverse_with_progress, verify_with_progress, Counterexample, Route, Verdict,
    VerifyError, VerifyOptions,
};
