//! Synthesis methods, one file each, and the choice between them.

mod arith;
mod bennett;
mod esop;
mod esop_exact;
mod exact;
mod exact4;
mod reed_muller;
mod transform;

pub use arith::{arith_lines, arithmetic, Registers};
pub use bennett::{bennett, bennett_counts, hierarchical, network_of, PIECE_INPUTS};
pub use esop::{
    esop_circuit, esop_of, exorlink_minimize, minimize_tables, EXORLINK_MAX_TERMS, EXORLINK_WORK,
};
pub use esop_exact::{exact_esop, EsopTable, ExactEsop, EXACT_ESOP_MAX_INPUTS};
pub use exact::{library, Exact3};
pub use exact4::{
    cache_path, BuildProgress, Exact4, Exact4Result, Level, DEFAULT_DEPTH, MAX_DEPTH, WINDOW_DEPTH,
};
pub use reed_muller::{reed_muller, reed_muller_coefficients};
pub use transform::{
    transform, transform_function, transform_with, xor_embedding, TRANSFORM_MAX_LINES,
};

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
    /// Bidirectional transformation-based synthesis.
    TransformBidir,
    /// Optimal circuits (at most 3 lines).
    Exact,
    /// Structural generators for arithmetic specs.
    Structural,
    /// ESOP extraction and exorlink minimization, one gate per cube and output.
    Esop,
    /// Minimum ESOP (at most 5 inputs), one gate per cube and output.
    EsopExact,
    /// Logic network computed into ancillae, copied out, uncomputed.
    Bennett,
    /// Network cut into small pieces, each from its minimum ESOP, glued by Bennett.
    Hierarchical,
}

impl Method {
    /// Every method with its name and what it takes.
    pub const ALL: [(Method, &'static str, &'static str); 10] = [
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
            Method::Esop,
            "esop",
            "functions: minimized exclusive-or sum of products, one gate per cube",
        ),
        (
            Method::EsopExact,
            "esop-exact",
            "functions of at most 5 inputs: minimum exclusive-or sum of products",
        ),
        (
            Method::Bennett,
            "bennett",
            "functions: logic network computed, copied, uncomputed; --max-qubits schedules recomputation",
        ),
        (
            Method::Hierarchical,
            "hierarchical",
            "functions: network cut into pieces of at most 4 leaves, each a minimum ESOP, glued by Bennett",
        ),
        (
            Method::Transform,
            "transform",
            "permutations (and functions of at most 16 lines through their xor embedding): transformation-based synthesis, output side",
        ),
        (
            Method::TransformBidir,
            "transform-bidir",
            "as transform, fixing each row from whichever side is closer",
        ),
        (
            Method::Exact,
            "exact",
            "permutations of at most 4 lines (and functions through their xor embedding): a minimum circuit (4 lines: from a cached table, within --exact-seconds, else a proven bound)",
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
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SynthLimits {
    /// Most inputs a truth-table method will expand (default 24; `--max-inputs`).
    pub max_table_inputs: usize,
    /// Most gates a circuit may have before lowering (default 2,000,000; `--max-gates`).
    pub max_gates: usize,
    /// Seconds an exact method may search before it returns its best circuit
    /// with a proven bound (default 30; `--exact-seconds`).
    pub exact_seconds: f64,
    /// Most qubits the circuit may use, ancillae included (`--max-qubits`); a
    /// method that can trade Toffolis for qubits schedules to fit.
    pub max_qubits: Option<usize>,
}

impl Default for SynthLimits {
    fn default() -> Self {
        SynthLimits {
            max_table_inputs: 24,
            max_gates: 2_000_000,
            exact_seconds: 30.0,
            max_qubits: None,
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
    /// No schedule fits the qubit budget.
    #[error("no circuit fits in {budget} qubits; {needed} qubits would work (--max-qubits)")]
    Budget {
        /// The budget asked for.
        budget: usize,
        /// A budget that works.
        needed: usize,
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

/// A synthesized circuit of MCT gates and what the method wants the user to know.
#[derive(Clone, Debug)]
pub struct Synthesis {
    /// The circuit, not yet lowered.
    pub circuit: Circuit,
    /// Statements about the result (for example a bound an exact method proved).
    pub notes: Vec<String>,
}

impl From<Circuit> for Synthesis {
    fn from(circuit: Circuit) -> Self {
        Synthesis {
            circuit,
            notes: Vec::new(),
        }
    }
}

/// Every method that applies to `spec`, cheapest first; `thorough` adds the
/// slow ones (used by `compare`).
pub fn candidates(spec: &Spec, thorough: bool) -> Vec<Method> {
    match &spec.body {
        SpecBody::Function(f) => {
            let n = f.inputs.len();
            let mut v = vec![
                Method::ReedMuller,
                Method::Esop,
                Method::Bennett,
                Method::Hierarchical,
            ];
            let instant = n <= 4 && f.outputs.len() == 1;
            if instant || (thorough && n <= EXACT_ESOP_MAX_INPUTS) {
                v.push(Method::EsopExact);
            }
            // The xor embedding of at most 4 lines has an exact optimum.
            if n + f.outputs.len() <= 4 {
                v.push(Method::Exact);
            }
            v
        }
        SpecBody::Permutation(p) if p.width() <= 4 => {
            vec![Method::Transform, Method::TransformBidir, Method::Exact]
        }
        SpecBody::Permutation(_) => vec![Method::Transform, Method::TransformBidir],
        SpecBody::Arithmetic(_) => vec![Method::Structural],
    }
}

/// Synthesizes a circuit of MCT gates (not yet lowered) for `spec` with one
/// method (`auto` is resolved by the pipeline, which tries the candidates).
pub fn synthesize(
    spec: &Spec,
    method: Method,
    limits: &SynthLimits,
) -> Result<Synthesis, SynthError> {
    match (&spec.body, method) {
        (SpecBody::Function(f), Method::ReedMuller) => Ok(reed_muller(f, limits)?.into()),
        (SpecBody::Function(f), Method::Esop) => Ok(esop::esop(f, limits)?.into()),
        (SpecBody::Function(f), Method::EsopExact) => esop_exact_circuit(f, limits),
        (SpecBody::Function(f), Method::Hierarchical) => {
            let s = hierarchical(f, limits)?;
            check_gates(&s.circuit, limits)?;
            Ok(s)
        }
        (SpecBody::Function(f), Method::Bennett) => {
            let s = bennett(f, limits)?;
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
        (SpecBody::Permutation(p), Method::Exact) => {
            exact_circuit(p.images(), p.width(), permutation_lines(p.width()), limits)
        }
        (SpecBody::Function(f), Method::Exact) => {
            let (n, m) = (f.inputs.len(), f.outputs.len());
            if n + m > 4 {
                return Err(exact_refused());
            }
            exact_circuit(&transform::xor_embedding(f), n + m, function_lines(f), limits)
        }
        (SpecBody::Function(f), Method::Transform | Method::TransformBidir) => {
            let c = transform_function(f, method == Method::TransformBidir)?;
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (SpecBody::Arithmetic(a), Method::Structural) => {
            let c = arithmetic(a);
            check_gates(&c, limits)?;
            Ok(c.into())
        }
        (_, Method::Auto) => {
            // The first candidate that yields a circuit (the pipeline's auto
            // compares them all; this is for callers of synthesis alone).
            let mut first_error = None;
            for m in candidates(spec, false) {
                match synthesize(spec, m, limits) {
                    Ok(s) => return Ok(s),
                    Err(e) => {
                        first_error.get_or_insert(e);
                    }
                }
            }
            Err(first_error.expect("every spec kind has a candidate"))
        }
        (SpecBody::Function(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "function",
            hint: "use reed-muller, esop, esop-exact, bennett, hierarchical, transform, transform-bidir or auto",
        }),
        (SpecBody::Permutation(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "permutation",
            hint: "use transform, transform-bidir or auto",
        }),
        (SpecBody::Arithmetic(_), m) => Err(SynthError::NotApplicable {
            method: m.name(),
            kind: "arithmetic",
            hint: "use structural or auto",
        }),
    }
}

fn exact_refused() -> SynthError {
    SynthError::NotApplicable {
        method: "exact",
        kind: "more than 4 lines",
        hint: "exact covers at most 4 lines; use transform-bidir",
    }
}

/// What the 4-line exact search reports while it works.
#[derive(Clone, Copy, Debug)]
pub enum Exact4Progress {
    /// Building the table.
    Build(BuildProgress),
    /// Searching past the table.
    Search {
        /// The gate count being tried.
        gates: usize,
        /// The part of that count's search done, from 0 to 1.
        fraction: f64,
    },
    /// The search is over (found, bounded or out of time).
    Done,
}

type ProgressHook = Box<dyn Fn(Exact4Progress) + Send + Sync>;
static EXACT4_PROGRESS: std::sync::OnceLock<ProgressHook> = std::sync::OnceLock::new();

/// Sets, once per process, where the 4-line table's build and long searches
/// report progress (the command line draws a bar on a terminal).
pub fn set_exact4_progress(hook: impl Fn(Exact4Progress) + Send + Sync + 'static) {
    let _ = EXACT4_PROGRESS.set(Box::new(hook));
}

fn exact4_report(p: Exact4Progress) {
    if let Some(hook) = EXACT4_PROGRESS.get() {
        hook(p);
    }
}

/// The 4-line table: the deepest intact one of depth [`DEFAULT_DEPTH`] or
/// more in the cache folder, else one of [`DEFAULT_DEPTH`] built now and
/// cached. The text says which, once.
pub fn exact4_table() -> (&'static Exact4, Option<String>) {
    static TABLE: std::sync::OnceLock<(Exact4, String)> = std::sync::OnceLock::new();
    static TOLD: std::sync::atomic::AtomicBool = std::sync::atomic::AtomicBool::new(false);
    let (t, how) = TABLE.get_or_init(|| {
        let t0 = std::time::Instant::now();
        for d in (DEFAULT_DEPTH..=MAX_DEPTH).rev() {
            let path = cache_path(d);
            if let Some(t) = Exact4::load(&path) {
                let how = format!(
                    "exact: loaded the 4-line table of depth {d} from {} in {:.1} s",
                    path.display(),
                    t0.elapsed().as_secs_f64()
                );
                return (t, how);
            }
        }
        let t = Exact4::build(DEFAULT_DEPTH, &|p| exact4_report(Exact4Progress::Build(p)));
        let path = cache_path(DEFAULT_DEPTH);
        let saved = match t.save(&path) {
            Ok(()) => format!("cached it at {}", path.display()),
            Err(e) => format!("could not cache it at {}: {e}", path.display()),
        };
        let how = format!(
            "exact: built the 4-line table of depth {DEFAULT_DEPTH} in {:.1} s and {saved}",
            t0.elapsed().as_secs_f64()
        );
        (t, how)
    });
    let first = !TOLD.swap(true, std::sync::atomic::Ordering::Relaxed);
    (t, first.then(|| how.clone()))
}

/// The optimal circuit of a function of at most 4 lines, placed on `lines`.
fn exact_circuit(
    images: &[u64],
    width: usize,
    lines: Vec<LineInfo>,
    limits: &SynthLimits,
) -> Result<Synthesis, SynthError> {
    if width > 4 {
        return Err(exact_refused());
    }
    if width == 4 {
        let (table, how) = exact4_table();
        let mut notes: Vec<String> = how.into_iter().collect();
        let budget = std::time::Duration::from_secs_f64(limits.exact_seconds.max(0.0));
        let r = table.solve_with(images, budget, &|gates, fraction| {
            exact4_report(Exact4Progress::Search { gates, fraction })
        });
        exact4_report(Exact4Progress::Done);
        let mut c = Circuit::new(lines);
        if r.minimal {
            for g in r.gates {
                c.push(g);
            }
            notes.push(format!(
                "exact: {} gates, proven minimal over the 32-gate library",
                c.gates().len()
            ));
        } else {
            let p = crate::logic::Permutation::new(4, images.to_vec()).expect("a permutation");
            let mut h = transform_with(&p, true);
            crate::opt::optimize(&mut h);
            for g in h.gates() {
                c.push(g.clone());
            }
            let why = if r.lower_bound > table.reach() {
                format!(
                    "the table of depth {} proves minima of at most {} gates (a deeper one: `oraculum table --depth {MAX_DEPTH}`)",
                    table.depth(),
                    table.reach()
                )
            } else {
                "the search stopped at --exact-seconds".to_string()
            };
            notes.push(format!(
                "exact: NOT proven minimal: no circuit of fewer than {} gates exists, and {why}; this {}-gate circuit from transform-bidir is at most {} gates above the minimum",
                r.lower_bound,
                c.gates().len(),
                c.gates().len().saturating_sub(r.lower_bound)
            ));
        }
        return Ok(Synthesis { circuit: c, notes });
    }
    let gates = Exact3::for_width(width).circuit(images);
    let mut c = Circuit::new(lines);
    for g in gates {
        c.push(g);
    }
    Ok(Synthesis {
        notes: vec![format!(
            "exact: {} gates, minimum over NOT, CNOT and Toffoli",
            c.gates().len()
        )],
        circuit: c,
    })
}

fn esop_exact_circuit(f: &FunctionSpec, limits: &SynthLimits) -> Result<Synthesis, SynthError> {
    let n = f.inputs.len();
    if n > EXACT_ESOP_MAX_INPUTS {
        return Err(SynthError::NotApplicable {
            method: "esop-exact",
            kind: "function",
            hint: "it takes at most 5 inputs; use esop",
        });
    }
    let tables: Vec<_> = (0..f.outputs.len())
        .map(|j| f.table(j).expect("at most 5 inputs"))
        .collect();
    let budget = std::time::Duration::from_secs_f64(limits.exact_seconds.max(0.0));
    let r = exact_esop(&tables, budget);
    let mut notes = Vec::new();
    if r.is_minimal() {
        notes.push(format!(
            "esop-exact: {} cubes, proven minimal",
            r.esop.cubes()
        ));
    } else {
        notes.push(format!(
            "esop-exact: {} cubes, NOT proven minimal: the search stopped at the time budget with a proven lower bound of {} cubes (raise --exact-seconds)",
            r.esop.cubes(),
            r.lower_bound
        ));
    }
    Ok(Synthesis {
        circuit: esop_circuit(f, &r.esop),
        notes,
    })
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

/// Refuses a truth-table method past `--max-inputs` (and the table limit).
pub(crate) fn check_table_inputs(n: usize, limits: &SynthLimits) -> Result<(), SynthError> {
    let limit = limits.max_table_inputs.min(crate::logic::MAX_TABLE_VARS);
    if n > limit {
        return Err(SynthError::Limit {
            what: "the number of inputs for a truth-table method",
            value: n,
            limit,
            flag: "--max-inputs",
        });
    }
    Ok(())
}

fn check_gates(c: &Circuit, limits: &SynthLimits) -> Result<(), SynthError> {
    check_gate_count(c.gates().len(), limits)
}

/// Refuses a circuit of more than `--max-gates` gates before lowering.
pub(crate) fn check_gate_count(gates: usize, limits: &SynthLimits) -> Result<(), SynthError> {
    if gates > limits.max_gates {
        return Err(SynthError::Limit {
            what: "the gate count before lowering",
            value: gates,
            limit: limits.max_gates,
            flag: "--max-gates",
        });
    }
    Ok(())
}
