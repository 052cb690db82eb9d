//! Synthesis methods, one file each: a spec becomes a circuit of
//! multi-controlled Toffoli gates, not yet optimized or lowered.
//!
//! [`synthesize`] runs one named method; choosing among them (`auto`) is the
//! pipeline's job ([`crate::pipeline`]).

mod arith;
mod bennett;
mod checkpoints;
pub mod control;
mod esop;
mod esop_exact;
mod exact;
mod exorlink;
mod hierarchical;
mod linear;
mod network;
mod out_of_place;
mod pebble;
mod reed_muller;
mod transform;

pub use arith::gidney::gidney_add;
pub use arith::lookup::unary_lookup;
pub use arith::{
    arith_function, arith_images, arith_lines, arithmetic, arithmetic_measured, arithmetic_tally,
    arithmetic_tally_with, arithmetic_with, construction, power_form, Choice, PowerForm, Registers,
    Tally, KARATSUBA_FROM, TABLE_MAX_LINES,
};
pub use bennett::{bennett, bennett_counts, bennett_xag, xag_network, PEBBLE_SAT_MAX_NODES};
pub use esop::{
    esop_circuit, esop_counted, esop_of, minimize_tables, EsopWork, EXORLINK_MAX_TERMS,
    EXORLINK_WORK,
};
pub use esop_exact::{exact_esop, ExactEsop, EXACT_ESOP_MAX_INPUTS};
pub use exorlink::exorlink_minimize;
pub use hierarchical::{hierarchical, PIECE_INPUTS};
pub use network::network_of;
pub use out_of_place::{out_of_place, OUT_OF_PLACE_MAX_LINES};
pub use reed_muller::{reed_muller, reed_muller_coefficients};
pub use transform::{
    transform, transform_function, transform_with, xor_embedding, TRANSFORM_MAX_LINES,
};

use crate::circuit::Circuit;
use crate::limit::{Limit, Stop};
use crate::logic::Permutation;
use crate::progress::Progress;
use crate::spec::{Spec, SpecBody};
use std::fmt;

/// A synthesis method, by its user-visible name (`auto`, the choice among
/// them, is `None` where a method is optional).
#[derive(
    Clone,
    Copy,
    Debug,
    PartialEq,
    Eq,
    Hash,
    PartialOrd,
    Ord,
    strum::EnumIter,
    strum::IntoStaticStr,
    strum::EnumString,
    strum::EnumMessage,
)]
#[strum(serialize_all = "kebab-case")]
pub enum Method {
    /// Positive-polarity Reed-Muller expansion, one MCT per monomial.
    #[strum(
        message = "functions (and small output-writing arithmetic): positive-polarity Reed-Muller expansion, one gate per monomial"
    )]
    ReedMuller,
    /// ESOP extraction and exorlink minimization, one gate per cube and output.
    #[strum(
        message = "functions (and small output-writing arithmetic): minimized exclusive-or sum of products, one gate per cube"
    )]
    Esop,
    /// Minimum ESOP (at most 5 inputs), one gate per cube and output.
    #[strum(message = "functions of at most 5 inputs: minimum exclusive-or sum of products")]
    EsopExact,
    /// Logic network computed into ancillae, copied out, uncomputed.
    #[strum(
        message = "functions (and small output-writing arithmetic): logic network computed, copied, uncomputed; a qubit budget schedules recomputation"
    )]
    Bennett,
    /// The network rewritten to fewer ANDs, then computed, copied, uncomputed;
    /// a permutation out of place through two such xor oracles.
    #[strum(
        message = "functions: logic network rewritten to fewest ANDs (cut rewriting with 4-input AND-minimal circuits), then as bennett; permutations of at most 16 lines: out of place through the xor oracles of P and its inverse, then a swap"
    )]
    Xag,
    /// Network cut into small pieces, each from its minimum ESOP, glued by Bennett.
    #[strum(
        message = "functions: network cut into pieces of at most 4 leaves, each a minimum ESOP, glued by Bennett"
    )]
    Hierarchical,
    /// Basic transformation-based synthesis (Miller, Maslov, Dueck 2003).
    #[strum(
        message = "permutations (and functions of at most 16 lines through their xor embedding): transformation-based synthesis, output side"
    )]
    Transform,
    /// Bidirectional transformation-based synthesis.
    #[strum(message = "as transform, fixing each row from whichever side is closer")]
    TransformBidir,
    /// Optimal circuits (at most 4 lines).
    #[strum(
        message = "permutations of at most 4 lines (and functions through their xor embedding): a minimum circuit (4 lines: from a cached table, within the search budget, else a proven bound)"
    )]
    Exact,
    /// Structural generators for arithmetic specs.
    #[strum(message = "arithmetic: ripple-carry (MAJ/UMA) and carry-chain generators, any width")]
    Structural,
    /// Affine permutations by Gaussian elimination into CNOTs and NOTs.
    #[strum(
        message = "permutations that are affine over GF(2) (x -> A x XOR b): Gaussian elimination, CNOTs and NOTs only"
    )]
    Linear,
}

impl Method {
    /// Every method, in the order `oraculum methods` lists them.
    pub fn all() -> impl Iterator<Item = Method> {
        <Method as strum::IntoEnumIterator>::iter()
    }

    /// Looks a method up by its user-visible name.
    pub fn from_name(name: &str) -> Option<Method> {
        name.parse().ok()
    }

    /// The user-visible name.
    pub fn name(self) -> &'static str {
        self.into()
    }

    /// What the method takes and does, in one line.
    pub fn about(self) -> &'static str {
        strum::EnumMessage::get_message(&self).unwrap_or("")
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Budgets that synthesis respects; running out is an error that names the [`Limit`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SynthLimits {
    /// Most inputs a truth-table method will expand (default 24).
    pub max_table_inputs: usize,
    /// Most gates a circuit may have before lowering (default 2,000,000).
    pub max_gates: usize,
    /// Seconds an exact method may search before it returns its best circuit
    /// with a proven bound (default 30).
    pub exact_seconds: f64,
    /// Most qubits the circuit may use, ancillae included; a method that can
    /// trade Toffolis for qubits schedules to fit.
    pub max_qubits: Option<usize>,
    /// Most clauses a SAT encoding of synthesis may have (default
    /// 10,000,000, about a gigabyte in the solver), checked before it is built.
    pub max_clauses: usize,
}

impl Default for SynthLimits {
    fn default() -> Self {
        SynthLimits {
            max_table_inputs: 24,
            max_gates: 2_000_000,
            exact_seconds: 30.0,
            max_qubits: None,
            max_clauses: 10_000_000,
        }
    }
}

/// Why synthesis produced no circuit.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
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
    /// No schedule fits the qubit budget.
    #[error("no circuit fits in {budget} qubits; {needed} qubits would work")]
    Budget {
        /// The budget asked for.
        budget: usize,
        /// A budget that works.
        needed: usize,
    },
    /// A search ran out of its time budget before it could answer.
    #[error("{what} ran out of time ({seconds} s)")]
    OutOfTime {
        /// What was searched for.
        what: String,
        /// The budget in seconds.
        seconds: f64,
    },
    /// The caller stopped the search.
    #[error("the search was stopped before it ended")]
    Cancelled,
    /// A budget would be exceeded.
    #[error("{what} is {value}, over the limit of {limit}")]
    Limit {
        /// Which quantity.
        what: &'static str,
        /// Its value.
        value: usize,
        /// The limit in force.
        limit: usize,
        /// The budget.
        kind: Limit,
    },
}

/// A synthesized circuit of MCT gates and what the method wants the user to know.
#[derive(Clone, Debug)]
pub struct Synthesis {
    /// The circuit, not yet lowered.
    pub circuit: Circuit,
    /// Statements about the result (for example a bound an exact method proved).
    pub notes: Vec<String>,
    /// Where a search stopped short of a proven optimum, if it did.
    pub stop: Option<Stop>,
}

impl From<Circuit> for Synthesis {
    fn from(circuit: Circuit) -> Self {
        Synthesis {
            circuit,
            notes: Vec::new(),
            stop: None,
        }
    }
}

/// [`synthesize`] in an uncompute mode: in `measure` mode the arithmetic
/// ops with a dedicated construction (Gidney's adder, unary iteration) are
/// built with temporary ANDs and measured uncomputes; everything else is
/// [`synthesize`]'s circuit (the pipeline measures its provable uncomputes).
pub fn synthesize_in(
    spec: &Spec,
    method: Method,
    limits: &SynthLimits,
    uncompute: crate::circuit::Uncompute,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    if let (SpecBody::Arithmetic(a), Method::Structural, crate::circuit::Uncompute::Measure) =
        (&spec.body, method, uncompute)
    {
        if a.op == crate::spec::ArithOp::Lookup {
            // One gate per set data bit and at most four per word: counted
            // before any is built.
            let ones: usize = a.data.iter().map(|w| w.count_ones() as usize).sum();
            check_gate_count(ones.saturating_add(a.data.len().saturating_mul(4)), limits)?;
        }
        if let Some(c) = arithmetic_measured(a) {
            check_gates(&c, limits)?;
            return Ok(c.into());
        }
    }
    synthesize(spec, method, limits, progress)
}

/// Synthesizes a circuit of MCT gates (not yet lowered) for `spec` with one
/// method, reporting long searches to `progress`. A controlled function or
/// permutation spec is synthesized without its control, within one qubit
/// less, and the control is added to the effect gates ([`control`]).
pub fn synthesize(
    spec: &Spec,
    method: Method,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    if !spec.controlled || matches!(spec.body, SpecBody::Arithmetic(_)) {
        return synthesize_plain(spec, method, limits, progress);
    }
    let inner = SynthLimits {
        max_qubits: limits.max_qubits.map(|q| q.saturating_sub(1)),
        ..*limits
    };
    let mut s = synthesize_plain(spec, method, &inner, progress).map_err(|e| match e {
        SynthError::Budget { budget, needed } => SynthError::Budget {
            budget: budget + 1,
            needed: needed + 1,
        },
        e => e,
    })?;
    let k = control::add_control(&s.circuit);
    s.notes.push(format!(
        "controlled: {} gate(s) take the control; {} compute/uncompute gate(s) on ancillae need none",
        k.controlled, k.left
    ));
    s.circuit = k.circuit;
    Ok(s)
}

/// [`synthesize`] of the spec's map without its control.
fn synthesize_plain(
    spec: &Spec,
    method: Method,
    limits: &SynthLimits,
    progress: &dyn Progress,
) -> Result<Synthesis, SynthError> {
    match (&spec.body, method) {
        (SpecBody::Function(f), Method::ReedMuller) => Ok(reed_muller(f, limits)?.into()),
        (SpecBody::Function(f), Method::Esop) => Ok(esop::esop(f, limits, progress)?.into()),
        (SpecBody::Function(f), Method::EsopExact) => esop_exact::esop_exact_circuit(f, limits),
        (SpecBody::Function(f), Method::Hierarchical) => {
            let s = hierarchical(f, limits)?;
            check_gates(&s.circuit, limits)?;
            Ok(s)
        }
        (SpecBody::Function(f), Method::Bennett) => {
            let s = bennett(f, limits, progress)?;
            check_gates(&s.circuit, limits)?;
            Ok(s)
        }
        (SpecBody::Function(f), Method::Xag) => {
            let s = bennett::bennett_xag(f, limits, progress)?;
            check_gates(&s.circuit, limits)?;
            Ok(s)
        }
        (SpecBody::Permutation(p), Method::Transform | Method::TransformBidir) => {
            if p.width() > TRANSFORM_MAX_LINES {
                return Err(SynthError::NotApplicable {
                    method: method.name(),
                    kind: "permutation",
                    hint: "it takes at most 16 lines",
                });
            }
            let c = transform_with(p, method == Method::TransformBidir);
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Permutation(p), Method::Xag) => {
            let s = out_of_place(p, limits, progress)?;
            check_gates(&s.circuit, limits)?;
            Ok(s)
        }
        (SpecBody::Permutation(p), Method::Exact) => exact::permutation(p, limits, progress),
        (SpecBody::Permutation(p), Method::Linear) => {
            let c = linear::linear(p).ok_or(SynthError::NotApplicable {
                method: method.name(),
                kind: "permutation",
                hint: "it takes affine permutations (x -> A x XOR b over GF(2)), and this one is not",
            })?;
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Function(f), Method::Exact) => exact::function(f, limits, progress),
        (SpecBody::Function(f), Method::Transform | Method::TransformBidir) => {
            let c = transform_function(f, method == Method::TransformBidir)?;
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Arithmetic(a), Method::Structural) => {
            if a.op == crate::spec::ArithOp::Lookup {
                // One gate per set data bit: counted before any is built.
                let gates = a.data.iter().map(|w| w.count_ones() as usize).sum();
                check_gate_count(gates, limits)?;
            }
            let c = arithmetic(a);
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Function(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "function",
            hint: "use reed-muller, esop, esop-exact, bennett, xag, hierarchical, transform, transform-bidir or auto",
        }),
        (SpecBody::Permutation(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "permutation",
            hint: "use transform, transform-bidir, xag or auto",
        }),
        (SpecBody::Arithmetic(a), Method::Transform | Method::TransformBidir) => {
            // The same map as a permutation of the registers' lines.
            let images = arith_images(a).ok_or(SynthError::NotApplicable {
                method: method.name(),
                kind: "arithmetic",
                hint: "a table of the map takes at most 16 register lines; use structural",
            })?;
            let p = Permutation::new(images.len().trailing_zeros() as usize, images)
                .expect("an arithmetic map is a bijection of its lines");
            let t = transform_with(&p, method == Method::TransformBidir);
            let mut c = Circuit::new(arith_lines(a).0);
            while c.width() < t.width() {
                c.add_ancilla();
            }
            for g in t.gates() {
                c.push(g.clone());
            }
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Arithmetic(a), m @ (Method::ReedMuller | Method::Esop | Method::Bennett)) => {
            // The same map as a function of the lines it does not write.
            let (f, ins, outs) = arith_function(a).ok_or(SynthError::NotApplicable {
                method: m.name(),
                kind: "arithmetic",
                hint: "a function table of the map takes an op that writes an output register (compare, weight, multiply without modulus, lookup) and at most 16 register lines; use structural",
            })?;
            let mut s: Synthesis = match m {
                Method::ReedMuller => reed_muller(&f, limits)?.into(),
                Method::Esop => esop::esop(&f, limits, progress)?.into(),
                _ => bennett(&f, limits, progress)?,
            };
            // x (inputs), y (outputs), then ancillae: onto the registers.
            let (n, m_out) = (ins.len(), outs.len());
            let mut c = Circuit::new(arith_lines(a).0);
            let base = c.width();
            while c.width() < base + s.circuit.width() - n - m_out {
                c.add_ancilla();
            }
            for g in s.circuit.gates() {
                let g = g
                    .renamed(|l| {
                        let i = l.index();
                        if i < n {
                            ins[i]
                        } else if i < n + m_out {
                            outs[i - n]
                        } else {
                            crate::circuit::Line((base + i - n - m_out) as u32)
                        }
                    })
                    .expect("a one-to-one renaming");
                c.push(g);
            }
            check_gates(&c, limits)?;
            s.circuit = c;
            Ok(s)
        }
        (SpecBody::Arithmetic(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "arithmetic",
            hint: "use structural, transform, transform-bidir, reed-muller, esop, bennett (output-writing ops) or auto",
        }),
    }
}

/// A CaDiCaL solver that gives up after `budget`, and a counter handing out
/// its fresh variables (1, 2, ...), for the SAT encodings of synthesis.
pub(crate) fn sat_solver(
    budget: std::time::Duration,
) -> (cadical::Solver<cadical::Timeout>, impl FnMut() -> i32) {
    let mut s: cadical::Solver<cadical::Timeout> = cadical::Solver::new();
    s.set_callbacks(Some(cadical::Timeout::new(budget.as_secs_f32())));
    let mut next = 0i32;
    (s, move || {
        next += 1;
        next
    })
}

/// Refuses a truth-table method past the input limit (and the table limit).
pub(crate) fn check_table_inputs(n: usize, limits: &SynthLimits) -> Result<(), SynthError> {
    let limit = limits.max_table_inputs.min(crate::logic::MAX_TABLE_VARS);
    if n > limit {
        return Err(SynthError::Limit {
            what: "the number of inputs for a truth-table method",
            value: n,
            limit,
            kind: Limit::TableInputs,
        });
    }
    Ok(())
}

fn check_gates(c: &Circuit, limits: &SynthLimits) -> Result<(), SynthError> {
    check_gate_count(c.gates().len(), limits)
}

/// Refuses a circuit of more than the gate limit before lowering.
pub(crate) fn check_gate_count(gates: usize, limits: &SynthLimits) -> Result<(), SynthError> {
    if gates > limits.max_gates {
        return Err(SynthError::Limit {
            what: "the gate count before lowering",
            value: gates,
            limit: limits.max_gates,
            kind: Limit::Gates,
        });
    }
    Ok(())
}
