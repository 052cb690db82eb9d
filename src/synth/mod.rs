//! Synthesis methods, one file each, and the choice between them.

mod arith;
mod reed_muller;
mod transform;

pub use arith::{arith_lines, arithmetic, Registers};
pub use reed_muller::{reed_muller, reed_muller_coefficients};
pub use transform::transform;

use crate::circuit::{Circuit, LineInfo, Role};
use crate::spec::{FunctionSpec, Spec, SpecBody};
use std::fmt;

/// A synthesis method, by its user-visible name.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum Method {
    /// Pick the best method that applies.
    #[default]
    Auto,
    /// Positive-polarity Reed-Muller expansion, one MCT per monomial.
    ReedMuller,
    /// Basic transformation-based synthesis (Miller, Maslov, Dueck 2003).
    Transform,
    /// Structural generators for arithmetic specs.
    Structural,
}

impl Method {
    /// Every method with its name and what it takes.
    pub const ALL: [(Method, &'static str, &'static str); 4] = [
        (
            Method::Auto,
            "auto",
            "the best method that applies to the spec",
        ),
        (
            Method::ReedMuller,
            "reed-muller",
            "functions: positive-polarity Reed-Muller expansion, one gate per monomial",
        ),
        (
            Method::Transform,
            "transform",
            "permutations: transformation-based synthesis, output side",
        ),
        (
            Method::Structural,
            "structural",
            "arithmetic: ripple-carry (MAJ/UMA) and carry-chain generators, any width",
        ),
    ];

    /// Looks a method up by name.
    pub fn from_name(name: &str) -> Option<Method> {
        Method::ALL
            .iter()
            .find(|(_, n, _)| *n == name)
            .map(|(m, _, _)| *m)
    }

    /// The user-visible name.
    pub fn name(self) -> &'static str {
        Method::ALL
            .iter()
            .find(|(m, _, _)| *m == self)
            .map(|(_, n, _)| *n)
            .unwrap_or("?")
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Budgets that synthesis respects; running out is an error that names the flag.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SynthLimits {
    /// Most inputs a truth-table method will expand (default 24; `--max-inputs`).
    pub max_table_inputs: usize,
    /// Most gates a circuit may have before lowering (default 2,000,000; `--max-gates`).
    pub max_gates: usize,
}

impl Default for SynthLimits {
    fn default() -> Self {
        SynthLimits {
            max_table_inputs: 24,
            max_gates: 2_000_000,
        }
    }
}

/// Why synthesis produced no circuit.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SynthError {
    /// The method does not take this kind of spec.
    #[error("method '{method}' does not apply to {kind} specs; {hint}")]
    NotApplicable {
        /// The method asked for.
        method: &'static str,
        /// The spec kind.
        kind: &'static str,
        /// What to use instead.
        hint: &'static str,
    },
    /// A budget would be exceeded.
    #[error("{what} is {value}, over the limit of {limit}; raise it with {flag}")]
    Limit {
        /// Which quantity.
        what: &'static str,
        /// Its value.
        value: usize,
        /// The limit in force.
        limit: usize,
        /// The option that raises it.
        flag: &'static str,
    },
}

/// Lines of a function oracle: `x[n]` inputs, then `y[m]` outputs.
pub fn function_lines(f: &FunctionSpec) -> Vec<LineInfo> {
    let x = f.inputs.iter().enumerate().map(|(i, name)| LineInfo {
        register: "x".into(),
        index: i as u32,
        role: Role::Input,
        label: name.clone(),
    });
    let y = f.outputs.iter().enumerate().map(|(j, o)| LineInfo {
        register: "y".into(),
        index: j as u32,
        role: Role::Output,
        label: o.name.clone(),
    });
    x.chain(y).collect()
}

/// Lines of an in-place permutation: `x[width]`.
pub fn permutation_lines(width: usize) -> Vec<LineInfo> {
    (0..width)
        .map(|i| LineInfo {
            register: "x".into(),
            index: i as u32,
            role: Role::Data,
            label: format!("x{i}"),
        })
        .collect()
}

/// The method `auto` stands for, for this spec.
pub fn resolve(spec: &Spec, method: Method) -> Method {
    match (method, &spec.body) {
        (Method::Auto, SpecBody::Function(_)) => Method::ReedMuller,
        (Method::Auto, SpecBody::Permutation(_)) => Method::Transform,
        (Method::Auto, SpecBody::Arithmetic(_)) => Method::Structural,
        (m, _) => m,
    }
}

/// Synthesizes a circuit of MCT gates (not yet lowered) for `spec`.
pub fn synthesize(
    spec: &Spec,
    method: Method,
    limits: &SynthLimits,
) -> Result<Circuit, SynthError> {
    let method = resolve(spec, method);
    match (&spec.body, method) {
        (SpecBody::Function(f), Method::ReedMuller) => reed_muller(f, limits),
        (SpecBody::Permutation(p), Method::Transform) => {
            let c = transform(p);
            check_gates(&c, limits)?;
            Ok(c)
        }
        (SpecBody::Arithmetic(a), Method::Structural) => {
            let c = arithmetic(a);
            check_gates(&c, limits)?;
            Ok(c)
        }
        (SpecBody::Function(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "function",
            hint: "use reed-muller or auto",
        }),
        (SpecBody::Permutation(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "permutation",
            hint: "use transform or auto",
        }),
        (SpecBody::Arithmetic(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "arithmetic",
            hint: "use structural or auto",
        }),
    }
}

fn check_gates(c: &Circuit, limits: &SynthLimits) -> Result<(), SynthError> {
    if c.gates().len() > limits.max_gates {
        return Err(SynthError::Limit {
            what: "the gate count before lowering",
            value: c.gates().len(),
            limit: limits.max_gates,
            flag: "--max-gates",
        });
    }
    Ok(())
}
