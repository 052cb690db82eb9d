//! Python bindings for oraculum: the Rust library does all the work; this
//! module only converts arguments, results and errors, and runs long calls on
//! a worker thread so that the interpreter stays free and Ctrl-C stops them.
// pyo3 0.22's #[pyfunction] expansion converts its own PyErr into PyErr.
#![allow(clippy::result_large_err, clippy::useless_conversion)]

use oraculum::export::json::CompareTable;
use oraculum::export::{draw_svg, read_circuit_with, Qasm3Options, ReadError, ReadLimits};
use oraculum::logic::TruthTable;
use oraculum::pipeline::{best_of, compare_with_progress};
use oraculum::source::{ErrorKind, SourceError};
use oraculum::verify::Route;
use oraculum::{
    build_with_progress, invert, parse_spec, verify_inverse_with_progress, BuildError,
    BuildOptions, Counterexample, Event, Limit, Method, Outcome, Progress, Spec, SynthLimits,
    Tables, Uncompute, Verdict, Verification, VerifyOptions,
};
use pyo3::create_exception;
use pyo3::exceptions::{PyException, PyRuntimeError, PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyDict, PyFloat, PyInt, PyList, PyString, PyTuple};
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

create_exception!(
    oraculum,
    OraculumError,
    PyException,
    "Every error oraculum raises."
);
create_exception!(
    oraculum,
    SpecError,
    OraculumError,
    "A spec or circuit the reader refused; .file, .line, .column say where (from 1)."
);
create_exception!(
    oraculum,
    Refuted,
    OraculumError,
    "The verifier found a basis state where the circuit is wrong; .counterexample holds it."
);
create_exception!(
    oraculum,
    LimitReached,
    OraculumError,
    "A resource limit refused the work; .keyword names the argument that raises it."
);

/// The keyword argument that raises `limit` (the command line's option, in
/// Python spelling).
fn keyword(limit: Limit) -> &'static str {
    match limit {
        Limit::TableInputs => "max_inputs",
        Limit::Gates => "max_gates",
        Limit::Qubits => "max_qubits",
        Limit::SearchSeconds => "exact_seconds",
        Limit::States => "max_states",
        Limit::SatSeconds => "sat_seconds",
        Limit::Clauses => "max_clauses",
    }
}

fn limit_reached(py: Python<'_>, message: String, limit: Limit) -> PyErr {
    let kw = keyword(limit);
    let err = LimitReached::new_err(format!("{message}; raise it with {kw}="));
    let _ = err.value_bound(py).setattr("keyword", kw);
    err
}

fn located<K: ErrorKind>(py: Python<'_>, e: &SourceError<K>) -> PyErr {
    let err = SpecError::new_err(e.to_string());
    let value = err.value_bound(py);
    let l = &e.location;
    let _ = value.setattr("file", &l.file);
    let _ = value.setattr("line", l.line);
    let _ = value.setattr("column", l.column);
    let _ = value.setattr("text", e.message());
    err
}

fn build_error(py: Python<'_>, e: BuildError) -> PyErr {
    match e.limit() {
        Some(l) => limit_reached(py, e.to_string(), l),
        None if e.is_cancelled() => pyo3::exceptions::PyKeyboardInterrupt::new_err(e.to_string()),
        None => PyValueError::new_err(e.to_string()),
    }
}

/// A spec as the caller gave it: a path, TOML text, or a dict with the TOML
/// schema's keys.
fn load_spec(py: Python<'_>, spec: &Bound<'_, PyAny>) -> PyResult<Spec> {
    let (name, text) = if let Ok(d) = spec.downcast::<PyDict>() {
        let value = to_toml(d.as_any())?;
        let text = toml::to_string(&value)
            .map_err(|e| PyValueError::new_err(format!("spec dict: {e}")))?;
        ("<dict>".to_string(), text)
    } else if let Ok(s) = spec.downcast::<PyString>() {
        let s = s.to_cow()?;
        let path = std::path::Path::new(s.as_ref());
        if !s.contains('\n') && path.is_file() {
            (s.to_string(), read(path)?)
        } else {
            ("<string>".to_string(), s.to_string())
        }
    } else if let Ok(p) = spec.extract::<PathBuf>() {
        (p.display().to_string(), read(&p)?)
    } else {
        return Err(PyTypeError::new_err(
            "spec is a path, a TOML string or a dict",
        ));
    };
    parse_spec(&name, &text).map_err(|e| located(py, &e))
}

fn read(path: &std::path::Path) -> PyResult<String> {
    std::fs::read_to_string(path).map_err(|e| {
        pyo3::exceptions::PyOSError::new_err(format!("{}: cannot read: {e}", path.display()))
    })
}

/// A Python value as TOML (dicts, lists, strings, booleans, integers, floats).
fn to_toml(v: &Bound<'_, PyAny>) -> PyResult<toml::Value> {
    if let Ok(d) = v.downcast::<PyDict>() {
        let mut t = toml::Table::new();
        for (k, v) in d.iter() {
            let k: String = k
                .extract()
                .map_err(|_| PyTypeError::new_err("spec dict keys are strings"))?;
            t.insert(k, to_toml(&v)?);
        }
        Ok(toml::Value::Table(t))
    } else if v.is_instance_of::<PyBool>() {
        Ok(toml::Value::Boolean(v.extract()?))
    } else if v.is_instance_of::<PyInt>() {
        match v.extract::<i64>() {
            Ok(i) => Ok(toml::Value::Integer(i)),
            // Constants and moduli past 64 bits are written as decimal strings.
            Err(_) => Ok(toml::Value::String(v.str()?.to_string())),
        }
    } else if v.is_instance_of::<PyFloat>() {
        Ok(toml::Value::Float(v.extract()?))
    } else if let Ok(s) = v.downcast::<PyString>() {
        Ok(toml::Value::String(s.to_string()))
    } else if v.is_instance_of::<PyList>() || v.is_instance_of::<PyTuple>() {
        let items: PyResult<Vec<_>> = v.iter()?.map(|x| to_toml(&x?)).collect();
        Ok(toml::Value::Array(items?))
    } else {
        Err(PyTypeError::new_err(format!(
            "a spec dict holds dicts, lists, strings, booleans and numbers, not {}",
            v.get_type().name()?
        )))
    }
}

/// Cancellation for the library's long work: set when Python saw Ctrl-C.
struct Cancel(AtomicBool);

impl Progress for Cancel {
    fn event(&self, _: Event) {}
    fn cancelled(&self) -> bool {
        self.0.load(Ordering::Relaxed)
    }
}

/// Runs `work` on a worker thread without the GIL; meanwhile the calling
/// thread checks Python's signals every 50 ms, and on an interrupt asks the
/// work to stop, waits for it, and raises the interrupt.
fn interruptible<T, F>(py: Python<'_>, work: F) -> PyResult<T>
where
    T: Send,
    F: FnOnce(&dyn Progress) -> T + Send,
{
    let cancel = Cancel(AtomicBool::new(false));
    std::thread::scope(|s| {
        let (tx, rx) = std::sync::mpsc::channel();
        let cancel = &cancel;
        let handle = std::thread::Builder::new()
            // The library's readers bound their nesting; this is the main
            // thread's usual stack, so a worker reaches as deep.
            .stack_size(64 << 20)
            .spawn_scoped(s, move || {
                let _ = tx.send(work(cancel));
            })
            .map_err(|e| PyRuntimeError::new_err(format!("cannot start a worker: {e}")))?;
        let mut interrupt = None;
        let mut rx = Some(rx);
        let result = loop {
            // The receiver moves in and out: it may not be shared across threads.
            let (got, back) = py.allow_threads(|| {
                let r = rx.take().expect("the receiver is returned on every pass");
                (r.recv_timeout(Duration::from_millis(50)), r)
            });
            rx = Some(back);
            match got {
                Ok(r) => break Some(r),
                Err(std::sync::mpsc::RecvTimeoutError::Disconnected) => break None,
                Err(std::sync::mpsc::RecvTimeoutError::Timeout) => {
                    if interrupt.is_none() {
                        if let Err(e) = py.check_signals() {
                            cancel.0.store(true, Ordering::Relaxed);
                            interrupt = Some(e);
                        }
                    }
                }
            }
        };
        let joined = py.allow_threads(|| handle.join());
        if let Some(e) = interrupt {
            return Err(e);
        }
        match (result, joined) {
            (Some(r), _) => Ok(r),
            (None, _) => Err(PyRuntimeError::new_err(
                "oraculum stopped on an internal error (a bug: please report it)",
            )),
        }
    })
}

/// Budgets, as keyword arguments with the command line's defaults.
#[derive(Clone, Copy)]
struct Limits {
    max_states: u64,
    max_inputs: usize,
    max_gates: usize,
    exact_seconds: f64,
    verify_method: Route,
    sat_seconds: f64,
    max_qubits: Option<usize>,
    max_clauses: usize,
}

impl Limits {
    #[allow(clippy::too_many_arguments)]
    fn new(
        max_states: Option<u64>,
        max_inputs: Option<usize>,
        max_gates: Option<usize>,
        exact_seconds: Option<f64>,
        verify_method: &str,
        sat_seconds: Option<f64>,
        max_qubits: Option<usize>,
        max_clauses: Option<usize>,
    ) -> PyResult<Self> {
        let s = SynthLimits::default();
        let v = VerifyOptions::default();
        let route = Route::from_name(verify_method).ok_or_else(|| {
            let names: Vec<_> = Route::all().map(Route::name).collect();
            PyValueError::new_err(format!(
                "unknown verify_method {verify_method:?}; one of {}",
                names.join(", ")
            ))
        })?;
        Ok(Limits {
            max_states: max_states.unwrap_or(v.max_states),
            max_inputs: max_inputs.unwrap_or(s.max_table_inputs),
            max_gates: max_gates.unwrap_or(s.max_gates),
            exact_seconds: exact_seconds.unwrap_or(s.exact_seconds),
            verify_method: route,
            sat_seconds: sat_seconds.unwrap_or(v.sat_seconds),
            max_qubits,
            max_clauses: max_clauses.unwrap_or(s.max_clauses),
        })
    }

    fn verify_options(&self) -> VerifyOptions {
        VerifyOptions {
            max_states: self.max_states,
            route: self.verify_method,
            sat_seconds: self.sat_seconds,
        }
    }

    fn build_options(&self, method: Option<Method>, verify: bool) -> BuildOptions {
        BuildOptions {
            method,
            limits: SynthLimits {
                max_table_inputs: self.max_inputs,
                max_gates: self.max_gates,
                exact_seconds: self.exact_seconds,
                max_qubits: self.max_qubits,
                max_clauses: self.max_clauses,
            },
            verify: verify.then(|| self.verify_options()),
            uncompute: Uncompute::Toffoli,
        }
    }
}

fn method_of(name: &str) -> PyResult<Option<Method>> {
    if name == "auto" {
        return Ok(None);
    }
    Method::from_name(name).map(Some).ok_or_else(|| {
        let names: Vec<_> = std::iter::once("auto")
            .chain(Method::all().map(Method::name))
            .collect();
        PyValueError::new_err(format!(
            "unknown method {name:?}; one of {}",
            names.join(", ")
        ))
    })
}

/// A serializable value as Python objects (through the JSON the CLI prints).
fn to_py<'py, T: serde::Serialize>(py: Python<'py>, value: &T) -> PyResult<Bound<'py, PyAny>> {
    let text = serde_json::to_string(value).map_err(|e| PyValueError::new_err(e.to_string()))?;
    py.import_bound("json")?.call_method1("loads", (text,))
}

fn counterexample_dict<'py>(py: Python<'py>, cx: &Counterexample) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new_bound(py);
    d.set_item("state", cx.state)?;
    let int = py.import_bound("builtins")?.getattr("int")?;
    for (key, regs) in [
        ("input", &cx.input),
        ("expected", &cx.expected),
        ("actual", &cx.actual),
    ] {
        let inner = PyDict::new_bound(py);
        for r in regs {
            // Registers past 64 bits have no `value`; their bits are exact.
            let v = int.call1((r.bits.as_str(), 0))?;
            inner.set_item(&r.register, v)?;
        }
        d.set_item(key, inner)?;
    }
    d.set_item("problem", &cx.problem)?;
    Ok(d)
}

fn refuted(py: Python<'_>, what: &str, cx: &Counterexample) -> PyErr {
    let err = Refuted::new_err(format!("{what}\n{cx}"));
    match counterexample_dict(py, cx) {
        Ok(d) => {
            let _ = err.value_bound(py).setattr("counterexample", d);
            err
        }
        Err(e) => e,
    }
}

/// A built and verified oracle.
#[pyclass(module = "oraculum", name = "Oracle", frozen)]
struct Oracle {
    outcome: Outcome,
    /// The OpenQASM 2 text, or why there is none (a gate form with measured
    /// uncomputes has only the OpenQASM 3 subroutine form).
    qasm: Result<String, String>,
    as_gate: Option<String>,
}

#[pymethods]
impl Oracle {
    /// The circuit of NOT, CNOT and Toffoli gates as OpenQASM 2 text (the
    /// text `oraculum synth` writes); a `ValueError` for a gate form with
    /// measured uncomputes, which OpenQASM 2 cannot hold (`qasm3()` writes
    /// it as a subroutine).
    fn qasm(&self) -> PyResult<String> {
        self.qasm.clone().map_err(PyValueError::new_err)
    }

    /// The circuit as OpenQASM 3 text (`oraculum synth --format qasm3`, in
    /// gate form when `as_gate` was given); `keep_mct=True` writes the gates
    /// before lowering as `ctrl(k) @ x` (`--keep-mct`).
    #[pyo3(signature = (keep_mct=false))]
    fn qasm3(&self, keep_mct: bool) -> PyResult<String> {
        self.outcome
            .qasm3(&Qasm3Options {
                gate: self.as_gate.clone(),
                keep_mct,
            })
            .map_err(|e| PyValueError::new_err(format!("cannot write OpenQASM 3: {e}")))
    }

    /// The method that ran (never "auto").
    #[getter]
    fn method(&self) -> &'static str {
        self.outcome.method.name()
    }

    /// The spec's name, if it has one.
    #[getter]
    fn name(&self) -> Option<String> {
        self.outcome.name.clone()
    }

    /// True when every basis state was checked and correct.
    #[getter]
    fn verified(&self) -> bool {
        self.outcome.verification.is_proven()
    }

    /// The cost report as a dict: the `cost` fields of `synth --json`.
    #[getter]
    fn cost<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        to_py(py, &self.outcome.cost)
    }

    /// The whole report of `synth --json` as a dict (cost, verification,
    /// seconds, notes, where a search stopped).
    #[getter]
    fn report<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        to_py(py, &self.outcome.report())
    }

    /// What the method wants the user to know.
    #[getter]
    fn notes(&self) -> Vec<String> {
        self.outcome.notes.clone()
    }

    /// The line map: one dict per qubit in OpenQASM order, with `qubit`
    /// (as in the OpenQASM text), `register`, `index`, `role` and `label`.
    #[getter]
    fn lines<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let list = PyList::empty_bound(py);
        for l in self.outcome.lowered.lines() {
            let d = PyDict::new_bound(py);
            d.set_item("qubit", format!("{}[{}]", l.register, l.index))?;
            d.set_item("register", &l.register)?;
            d.set_item("index", l.index)?;
            d.set_item("role", to_py(py, &l.role)?)?;
            d.set_item("label", &l.label)?;
            list.append(d)?;
        }
        Ok(list)
    }

    /// The circuit before lowering as an SVG document (what `oraculum draw
    /// --svg` writes); `lowered=True` draws the NOT/CNOT/Toffoli circuit.
    #[pyo3(signature = (lowered=false))]
    fn svg(&self, lowered: bool) -> String {
        let o = &self.outcome;
        let title = format!(
            "{} ({}{})",
            o.name.as_deref().unwrap_or("oracle"),
            o.method,
            if lowered { ", lowered" } else { "" }
        );
        draw_svg(if lowered { &o.lowered } else { &o.mct }, &title)
    }

    /// The drawing a notebook shows.
    fn _repr_svg_(&self) -> String {
        self.svg(false)
    }

    fn __repr__(&self) -> String {
        let o = &self.outcome;
        format!(
            "<oraculum.Oracle {}method={} qubits={} toffoli={} verified={}>",
            o.name
                .as_deref()
                .map(|n| format!("{n:?} "))
                .unwrap_or_default(),
            o.method,
            o.cost.qubits,
            o.cost.toffoli,
            if self.verified() { "True" } else { "False" }
        )
    }
}

/// `uncompute="toffoli"` or `"measure"`, as `--uncompute` takes it.
fn uncompute_of(name: &str) -> PyResult<Uncompute> {
    Uncompute::from_name(name).ok_or_else(|| {
        PyValueError::new_err(format!(
            "unknown uncompute {name:?}; one of toffoli, measure"
        ))
    })
}

/// Synthesizes `spec` (a path, TOML text or dict) with `method` ("auto"
/// tries every cheap method and keeps the best verified circuit), lowers and
/// verifies it. Keyword arguments are the command line's limits, and
/// `uncompute` ("toffoli", or "measure" for measured uncomputes ranked by
/// Toffoli-equivalents).
#[pyfunction]
#[pyo3(signature = (
    spec, method="auto", *, verify=true, inverse=false, as_gate=None, max_qubits=None,
    max_states=None, max_inputs=None, max_gates=None, exact_seconds=None, verify_method="auto",
    sat_seconds=None, max_clauses=None, uncompute="toffoli"
))]
#[allow(clippy::too_many_arguments)]
fn synthesize(
    py: Python<'_>,
    spec: &Bound<'_, PyAny>,
    method: &str,
    verify: bool,
    inverse: bool,
    as_gate: Option<String>,
    max_qubits: Option<usize>,
    max_states: Option<u64>,
    max_inputs: Option<usize>,
    max_gates: Option<usize>,
    exact_seconds: Option<f64>,
    verify_method: &str,
    sat_seconds: Option<f64>,
    max_clauses: Option<usize>,
    uncompute: &str,
) -> PyResult<Oracle> {
    let spec = load_spec(py, spec)?;
    let limits = Limits::new(
        max_states,
        max_inputs,
        max_gates,
        exact_seconds,
        verify_method,
        sat_seconds,
        max_qubits,
        max_clauses,
    )?;
    let mut opts = limits.build_options(method_of(method)?, verify);
    opts.uncompute = uncompute_of(uncompute)?;
    // As `oraculum synth [--inverse]`: build, invert a circuit that was not
    // refuted, then give the registers the spec's own names.
    let mut outcome = interruptible(py, |p| {
        let out = build_with_progress(&spec, &opts, p)?;
        if inverse && !matches!(out.verification, Verification::Ran(Verdict::Refuted { .. })) {
            invert(out, &spec, &opts, p)
        } else {
            Ok(out)
        }
    })?
    .map_err(|e| build_error(py, e))?;
    outcome.rename_registers(&spec.registers);
    if let Verification::Ran(Verdict::Refuted { counterexample }) = &outcome.verification {
        return Err(refuted(
            py,
            "the synthesized circuit failed verification",
            counterexample,
        ));
    }
    let qasm = match &as_gate {
        Some(name) => outcome.qasm_gate(name),
        None => outcome.qasm(),
    }
    .map_err(|e| format!("cannot write OpenQASM 2: {e}"));
    Ok(Oracle {
        outcome,
        qasm,
        as_gate,
    })
}

/// Proves OpenQASM 2 or 3 text against `spec`: returns the verdict as a dict
/// (`verdict`, `by`, `free_bits`, `states`); raises `Refuted` with the
/// counterexample when the circuit is wrong.
#[pyfunction]
#[pyo3(signature = (
    qasm, spec, *, inverse=false, max_states=None, verify_method="auto", sat_seconds=None,
    max_gates=None
))]
#[allow(clippy::too_many_arguments)]
fn verify<'py>(
    py: Python<'py>,
    qasm: &str,
    spec: &Bound<'py, PyAny>,
    inverse: bool,
    max_states: Option<u64>,
    verify_method: &str,
    sat_seconds: Option<f64>,
    max_gates: Option<usize>,
) -> PyResult<Bound<'py, PyAny>> {
    let spec = load_spec(py, spec)?;
    let limits = Limits::new(
        max_states,
        None,
        None,
        None,
        verify_method,
        sat_seconds,
        None,
        None,
    )?;
    let read_limits = ReadLimits {
        max_gates: max_gates.unwrap_or(ReadLimits::default().max_gates),
        ..ReadLimits::default()
    };
    let circuit = read_circuit_with("<qasm>", qasm, &read_limits).map_err(|e| match e {
        ReadError::Malformed(e) => located(py, &e),
        ReadError::Limit { kind, .. } => limit_reached(py, e.to_string(), kind),
    })?;
    let circuit = standard_names(circuit, &spec)?;
    let opts = limits.verify_options();
    let verdict = interruptible(py, |p| {
        if inverse {
            verify_inverse_with_progress(&circuit, &spec, &opts, p)
        } else {
            oraculum::verify_with_progress(&circuit, &spec, &opts, p)
        }
    })?
    .map_err(|e| match e.limit() {
        Some(l) => limit_reached(py, e.to_string(), l),
        None => build_error(py, BuildError::Verify(e)),
    })?;
    match &verdict {
        Verdict::Proven { .. } => to_py(py, &verdict),
        Verdict::Refuted { counterexample } => {
            Err(refuted(py, "refuted against the spec", counterexample))
        }
    }
}

/// The circuit with the spec's own register names (`[registers]`) renamed to
/// the standard ones the verifier binds by, as `oraculum verify` does.
fn standard_names(c: oraculum::Circuit, spec: &Spec) -> PyResult<oraculum::Circuit> {
    let present: Vec<String> = c.registers().into_iter().map(|(n, _)| n).collect();
    let map: Vec<(String, String)> = spec
        .registers_back()
        .into_iter()
        .filter(|(own, _)| present.contains(own))
        .collect();
    if map.is_empty() {
        return Ok(c);
    }
    let mut finals: Vec<&str> = Vec::new();
    for name in &present {
        let to = map
            .iter()
            .find(|(f, _)| f == name)
            .map_or(name.as_str(), |(_, t)| t.as_str());
        if finals.contains(&to) {
            return Err(PyValueError::new_err(format!(
                "<qasm>: renaming the registers would give two of them the name '{to}'"
            )));
        }
        finals.push(to);
    }
    Ok(c.with_registers_renamed(&map))
}

/// Every method that applies to `spec`, each verified: a list of dicts, one
/// per method (the columns of `oraculum compare`), easy to turn into a table.
#[pyfunction]
#[pyo3(signature = (
    spec, *, max_qubits=None, max_states=None, max_inputs=None, max_gates=None,
    exact_seconds=None, verify_method="auto", sat_seconds=None, max_clauses=None,
    uncompute="toffoli"
))]
#[allow(clippy::too_many_arguments)]
fn compare<'py>(
    py: Python<'py>,
    spec: &Bound<'py, PyAny>,
    max_qubits: Option<usize>,
    max_states: Option<u64>,
    max_inputs: Option<usize>,
    max_gates: Option<usize>,
    exact_seconds: Option<f64>,
    verify_method: &str,
    sat_seconds: Option<f64>,
    max_clauses: Option<usize>,
    uncompute: &str,
) -> PyResult<Bound<'py, PyAny>> {
    let spec = load_spec(py, spec)?;
    let limits = Limits::new(
        max_states,
        max_inputs,
        max_gates,
        exact_seconds,
        verify_method,
        sat_seconds,
        max_qubits,
        max_clauses,
    )?;
    let mut opts = limits.build_options(None, true);
    opts.uncompute = uncompute_of(uncompute)?;
    let rows = interruptible(py, |p| compare_with_progress(&spec, &opts, p))?;
    if rows
        .iter()
        .any(|(_, r)| matches!(r, Err(e) if e.is_cancelled()))
    {
        return Err(pyo3::exceptions::PyKeyboardInterrupt::new_err(
            "compare was stopped",
        ));
    }
    let best = best_of(&rows);
    to_py(py, &CompareTable::new(&rows, best).rows)
}

/// Tabulates `fn` into a function spec (a dict that `synthesize` takes).
///
/// `inputs` and `outputs` are lists of names (or counts: `3` names them
/// `x0, x1, x2`, outputs `y0, ...`). For each input index `i` from 0 to
/// `2**n - 1`, `fn` is called with `n` arguments, argument `j` being bit `j`
/// of `i` (0 or 1): the first input is the least significant bit, as in a
/// spec's `[table]`. It returns a bool or 0/1 for one output; for several, a
/// sequence with one value per output, or an int whose bit `k` is output `k`.
#[pyfunction]
#[pyo3(signature = (r#fn, inputs, outputs, *, name=None, max_inputs=20))]
fn from_function<'py>(
    py: Python<'py>,
    r#fn: &Bound<'py, PyAny>,
    inputs: &Bound<'py, PyAny>,
    outputs: &Bound<'py, PyAny>,
    name: Option<String>,
    max_inputs: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let inputs = names(inputs, "x")?;
    let outputs = names(outputs, "y")?;
    let n = inputs.len();
    if n > max_inputs {
        return Err(limit_reached(
            py,
            format!("from_function: inputs is {n}, over the limit of {max_inputs}"),
            Limit::TableInputs,
        ));
    }
    if outputs.is_empty() {
        return Err(PyValueError::new_err("from_function: no outputs"));
    }
    let m = outputs.len();
    let size = 1usize << n;
    let mut bits = vec![vec![false; size]; m];
    for i in 0..size {
        let args: Vec<u8> = (0..n).map(|j| ((i >> j) & 1) as u8).collect();
        let r = r#fn.call1(PyTuple::new_bound(py, args))?;
        let bad = || {
            PyValueError::new_err(format!(
                "from_function: fn({}) returned {}; expected {}",
                (0..n)
                    .map(|j| ((i >> j) & 1).to_string())
                    .collect::<Vec<_>>()
                    .join(", "),
                r.repr().map(|s| s.to_string()).unwrap_or_default(),
                if m == 1 {
                    "a bool or 0/1".to_string()
                } else {
                    format!("{m} values or an int below 2**{m}")
                }
            ))
        };
        let bit = |v: &Bound<'py, PyAny>| -> PyResult<bool> {
            match v.extract::<u8>() {
                Ok(b) if b <= 1 => Ok(b == 1),
                _ => Err(bad()),
            }
        };
        if m == 1 {
            bits[0][i] = bit(&r)?;
        } else if r.is_instance_of::<PyInt>() {
            let v: u64 = r.extract().map_err(|_| bad())?;
            if m < 64 && v >> m != 0 {
                return Err(bad());
            }
            for (k, out) in bits.iter_mut().enumerate() {
                out[i] = (v >> k) & 1 == 1;
            }
        } else {
            let values: Vec<Bound<'py, PyAny>> =
                r.iter().map_err(|_| bad())?.collect::<PyResult<_>>()?;
            if values.len() != m {
                return Err(bad());
            }
            for (k, v) in values.iter().enumerate() {
                bits[k][i] = bit(v)?;
            }
        }
    }
    let table = PyDict::new_bound(py);
    for (k, out) in outputs.iter().enumerate() {
        let t = TruthTable::from_fn(n, |i| bits[k][i as usize]);
        table.set_item(out, t.to_hex())?;
    }
    let spec = PyDict::new_bound(py);
    spec.set_item("kind", "function")?;
    if let Some(name) = name {
        spec.set_item("name", name)?;
    }
    spec.set_item("inputs", inputs)?;
    spec.set_item("outputs", outputs)?;
    spec.set_item("table", table)?;
    Ok(spec)
}

fn names(v: &Bound<'_, PyAny>, prefix: &str) -> PyResult<Vec<String>> {
    if let Ok(k) = v.extract::<usize>() {
        return Ok((0..k).map(|i| format!("{prefix}{i}")).collect());
    }
    v.extract::<Vec<String>>()
        .map_err(|_| PyTypeError::new_err("inputs and outputs are lists of names, or counts"))
}

/// Where the exact tables are kept: `$ORACULUM_CACHE`, else the user's cache
/// folder, as for the command line.
fn cache_dir() -> PathBuf {
    std::env::var_os("ORACULUM_CACHE")
        .map(PathBuf::from)
        .or_else(|| dirs::cache_dir().map(|d| d.join("oraculum")))
        .unwrap_or_else(|| std::env::temp_dir().join("oraculum"))
}

#[pymodule]
fn _oraculum(m: &Bound<'_, PyModule>) -> PyResult<()> {
    // The same table cache as the command line, so that both give the same
    // circuits and a table is built once per machine.
    let _ = Tables::stored(cache_dir()).install();
    m.add_class::<Oracle>()?;
    m.add_function(wrap_pyfunction!(synthesize, m)?)?;
    m.add_function(wrap_pyfunction!(verify, m)?)?;
    m.add_function(wrap_pyfunction!(compare, m)?)?;
    m.add_function(wrap_pyfunction!(from_function, m)?)?;
    let py = m.py();
    m.add("OraculumError", py.get_type_bound::<OraculumError>())?;
    m.add("SpecError", py.get_type_bound::<SpecError>())?;
    m.add("Refuted", py.get_type_bound::<Refuted>())?;
    m.add("LimitReached", py.get_type_bound::<LimitReached>())?;
    m.add(
        "METHODS",
        std::iter::once("auto")
            .chain(Method::all().map(Method::name))
            .collect::<Vec<_>>(),
    )?;
    Ok(())
}
