//! OpenQASM 2 (Cross, Bishop, Smolin, Gambetta 2017): write lowered circuits (plain or in gate form), read `x`/`cx`/`ccx` files and gate definitions of them.

use crate::circuit::{Circuit, Control, Cost, Gate, Line, LineInfo, Role};
use crate::source::{LocatedError, Source};
use std::fmt::Write as _;

/// What goes into the header comments.
#[derive(Clone, Debug, Default)]
pub struct QasmHeader {
    /// The spec's name.
    pub name: Option<String>,
    /// The synthesis method.
    pub method: Option<String>,
    /// The cost report.
    pub cost: Option<Cost>,
    /// The circuit is the inverse of the spec's map.
    pub inverse: bool,
}

/// A circuit that OpenQASM 2 with `qelib1.inc` cannot express as is.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum WriteError {
    /// More than two controls or a negative control: lower first.
    #[error("gate {0} has more than two controls or a negative control; lower the circuit first")]
    NotLowered(usize),
    /// A register name that OpenQASM 2 does not allow.
    #[error("register name '{0}' is not an OpenQASM 2 identifier")]
    BadRegister(String),
    /// A gate name that is not an identifier, or is taken by OpenQASM 2, `qelib1.inc` or a register.
    #[error("'{0}' cannot name the gate: it must start with a lowercase letter, hold only letters, digits and '_', and not be an OpenQASM 2 word, a qelib1.inc gate or a register's name")]
    BadGateName(String),
    /// An OpenQASM 2 gate definition cannot measure: a circuit with measured
    /// uncomputes has no OpenQASM 2 gate form (OpenQASM 3 writes a `def`).
    #[error("gate {0} is a measured uncompute, which an OpenQASM 2 gate definition cannot hold; write it with --format qasm3 (a subroutine), without --as-gate, or with --uncompute toffoli")]
    MeasuredInGate(usize),
}

pub(super) fn role_word(r: Role) -> &'static str {
    match r {
        Role::Input => "input",
        Role::Output => "output",
        Role::Data => "data",
        Role::Ancilla => "ancilla, starts and ends at 0",
    }
}

/// The name of the 1-bit classical register of the measured uncomputes: `m`,
/// or the first of `m1`, `m2`, ... that no quantum register has.
pub(super) fn creg_name(registers: &[(String, usize)]) -> String {
    let taken = |n: &str| registers.iter().any(|(r, _)| r == n);
    std::iter::once("m".to_string())
        .chain((1..).map(|i| format!("m{i}")))
        .find(|n| !taken(n))
        .expect("some name is free")
}

/// A register name both formats accept: a lowercase letter, then letters,
/// digits and `_`.
pub(super) fn check_register(name: &str) -> Result<(), WriteError> {
    let mut chars = name.chars();
    let ok = matches!(chars.next(), Some(ch) if ch.is_ascii_lowercase())
        && chars.all(|ch| ch.is_ascii_alphanumeric() || ch == '_');
    if ok {
        Ok(())
    } else {
        Err(WriteError::BadRegister(name.to_string()))
    }
}

/// The comments that open a written file, after its version line: who wrote
/// it, the spec, method, inverse and cost of the header.
pub(super) fn header_comments(s: &mut String, header: &QasmHeader) {
    let _ = writeln!(s, "// written by oraculum {}", env!("CARGO_PKG_VERSION"));
    if let Some(n) = &header.name {
        let _ = writeln!(s, "// spec: {}", n.replace('\n', " "));
    }
    if let Some(m) = &header.method {
        let _ = writeln!(s, "// method: {m}");
    }
    if header.inverse {
        s.push_str(
            "// inverse: this circuit undoes the spec's map (check it with verify --inverse)\n",
        );
    }
    if let Some(cost) = &header.cost {
        let _ = writeln!(
            s,
            "// cost: qubits {}, toffoli {}, cnot {}, not {}, depth {}, toffoli depth {}, t-count {}",
            cost.qubits, cost.toffoli, cost.cnot, cost.not, cost.depth, cost.toffoli_depth, cost.t_count
        );
        if cost.temporary_and + cost.measured > 0 {
            let _ = writeln!(
                s,
                "// fault-tolerant cost: temporary and {} (4 T each), measured uncomputes {} (no T), toffoli-equivalent {}",
                cost.temporary_and, cost.measured, cost.toffoli_equivalent
            );
        }
    }
}

/// The phase line's comment and the line map, each register named by
/// `register` (the file's spelling of it).
pub(super) fn line_comments(s: &mut String, c: &Circuit, register: &dyn Fn(&str) -> String) {
    if let Some(p) = c.phase() {
        let l = &c.lines()[p.index()];
        let _ = writeln!(
            s,
            "// phase oracle: {}[{}] is prepared in |-> (x, h) and restored, so the gates between apply (-1)^f(x)",
            register(&l.register),
            l.index
        );
    }
    s.push_str("// lines:\n");
    for l in c.lines() {
        let label = if l.label.is_empty() || l.role == Role::Ancilla {
            String::new()
        } else {
            format!(" = {}", l.label.replace('\n', " "))
        };
        let _ = writeln!(
            s,
            "//   {}[{}]{label} ({})",
            register(&l.register),
            l.index,
            role_word(l.role)
        );
    }
}

/// Writes a lowered circuit as OpenQASM 2 with `x`, `cx` and `ccx`, and, for
/// a measured uncompute of the AND of `a` and `b` held by the ancilla `t`,
/// the gadget of Jones (PRA 87, 022328, 2013, Fig. 3) and Gidney (Quantum
/// 2, 74, 2018, Fig. 3) on one 1-bit classical register `m`:
///
/// ```text
/// h t;
/// measure t -> m[0];
/// if(m==1) x a;      // for a negative control only, then the same after cz
/// if(m==1) cz a,b;
/// if(m==1) x t;
/// ```
///
/// The outcome 0 leaves `t` at 0 and the state as it was; the outcome 1
/// leaves `t` at 1 and the phase `(-1)^(a AND b)`, which the CZ undoes, and
/// the X returns `t` to 0. A temporary AND is written as `ccx` (conjugated
/// by `x` for a negative control): it acts as one on its clean target.
pub fn write_qasm(c: &Circuit, header: &QasmHeader) -> Result<String, WriteError> {
    write_with(c, header, None)
}

pub(super) fn write_with(
    c: &Circuit,
    header: &QasmHeader,
    gate: Option<&str>,
) -> Result<String, WriteError> {
    let mut s = String::new();
    s.push_str("OPENQASM 2.0;\ninclude \"qelib1.inc\";\n");
    header_comments(&mut s, header);
    line_comments(&mut s, c, &|r| r.to_string());
    let registers = c.registers();
    for (name, size) in &registers {
        check_register(name)?;
        let _ = writeln!(s, "qreg {name}[{size}];");
    }
    let creg = creg_name(&registers);
    if c.measured_count() > 0 {
        let _ = writeln!(s, "creg {creg}[1];");
    }
    let q = |l: Line| {
        let info = &c.lines()[l.index()];
        format!("{}[{}]", info.register, info.index)
    };
    let mut body = String::new();
    let args = super::gatedef::argument_names(c);
    let name = |l: Line| match gate {
        Some(_) => args[l.index()].clone(),
        None => q(l),
    };
    let indent = if gate.is_some() { "  " } else { "" };
    for (k, g) in c.gates().iter().enumerate() {
        if g.is_measured() {
            let t = name(g.target());
            let cs = g.controls();
            let negatives: Vec<String> = cs
                .iter()
                .filter(|c| !c.positive)
                .map(|c| name(c.line))
                .collect();
            let _ = writeln!(body, "h {t};\nmeasure {t} -> {creg}[0];");
            for n in &negatives {
                let _ = writeln!(body, "if({creg}==1) x {n};");
            }
            let _ = writeln!(
                body,
                "if({creg}==1) cz {},{};",
                name(cs[0].line),
                name(cs[1].line)
            );
            for n in &negatives {
                let _ = writeln!(body, "if({creg}==1) x {n};");
            }
            let _ = writeln!(body, "if({creg}==1) x {t};");
            continue;
        }
        if g.is_temporary_and() {
            let cs = g.controls();
            let negatives: Vec<String> = cs
                .iter()
                .filter(|c| !c.positive)
                .map(|c| name(c.line))
                .collect();
            for n in &negatives {
                let _ = writeln!(body, "{indent}x {n};");
            }
            let _ = writeln!(
                body,
                "{indent}ccx {},{},{};",
                name(cs[0].line),
                name(cs[1].line),
                name(g.target())
            );
            for n in &negatives {
                let _ = writeln!(body, "{indent}x {n};");
            }
            continue;
        }
        if g.controls().iter().any(|c| !c.positive) {
            return Err(WriteError::NotLowered(k));
        }
        let ctl: Vec<String> = g.controls().iter().map(|c| name(c.line)).collect();
        let t = name(g.target());
        let _ = match ctl.len() {
            0 => writeln!(body, "{indent}x {t};"),
            1 => writeln!(body, "{indent}cx {},{t};", ctl[0]),
            2 => writeln!(body, "{indent}ccx {},{},{t};", ctl[0], ctl[1]),
            _ => return Err(WriteError::NotLowered(k)),
        };
    }
    if let Some(g) = gate {
        // The definition goes before the declarations, which OpenQASM 2 allows.
        let decl_at = s.find("qreg ").unwrap_or(s.len());
        let def = format!(
            "// gate {g}: argument k is line k above; the ancillae are arguments (a gate body cannot allocate) that enter at |0> and leave at |0>\ngate {g} {} {{\n{body}}}\n",
            args.join(",")
        );
        s.insert_str(decl_at, &def);
        let all: Vec<String> = (0..c.width() as u32).map(|k| q(Line(k))).collect();
        body = format!("{g} {};\n", all.join(","));
    }
    if let Some(p) = c.phase() {
        let _ = writeln!(s, "x {};\nh {};", q(p), q(p));
    }
    s.push_str(&body);
    if let Some(p) = c.phase() {
        let _ = writeln!(s, "h {};\nx {};", q(p), q(p));
    }
    Ok(s)
}

impl crate::pipeline::Outcome {
    fn header(&self) -> QasmHeader {
        QasmHeader {
            name: self.name.clone(),
            method: Some(self.method.name().to_string()),
            cost: Some(self.cost.clone()),
            inverse: self.inverse,
        }
    }

    /// The lowered circuit as OpenQASM 2, with the header of design.md.
    pub fn qasm(&self) -> Result<String, WriteError> {
        write_qasm(&self.lowered, &self.header())
    }

    /// The lowered circuit in Clifford+T form ([`super::write_clifford_t`]).
    pub fn clifford_t(&self) -> Result<String, WriteError> {
        super::clifford_t::write_clifford_t(&self.lowered, &self.header())
    }

    /// The lowered circuit as OpenQASM 2 in gate form ([`super::write_qasm_gate`]).
    pub fn qasm_gate(&self, name: &str) -> Result<String, WriteError> {
        super::gatedef::write_qasm_gate(&self.lowered, &self.header(), name)
    }
}

/// Blanks out `//` comments, keeping every byte offset.
pub(super) fn strip_comments(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut in_comment = false;
    let mut prev_slash = false;
    for ch in text.chars() {
        if in_comment {
            if ch == '\n' {
                in_comment = false;
                out.push('\n');
            } else {
                out.extend(std::iter::repeat_n(' ', ch.len_utf8()));
            }
            continue;
        }
        if ch == '/' && prev_slash {
            out.pop();
            out.push_str("  ");
            in_comment = true;
            prev_slash = false;
            continue;
        }
        prev_slash = ch == '/';
        out.push(ch);
    }
    out
}

pub(super) struct Reg {
    pub(super) first: u32,
    pub(super) size: u32,
}

/// The declared quantum registers, found by name in constant time.
#[derive(Default)]
pub(super) struct Regs {
    pub(super) by_name: std::collections::HashMap<String, Reg>,
}

impl Regs {
    pub(super) fn find(&self, name: &str) -> Option<&Reg> {
        self.by_name.get(name)
    }
}

/// Budgets of the reader, checked before the work they limit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ReadLimits {
    /// Most gates the file may hold once whole-register statements are expanded.
    pub max_gates: usize,
    /// Most qubits the file may declare.
    pub max_qubits: usize,
}

impl Default for ReadLimits {
    fn default() -> Self {
        ReadLimits {
            max_gates: DEFAULT_MAX_GATES,
            max_qubits: 1 << 20,
        }
    }
}

/// Default for [`ReadLimits::max_gates`]: 16,777,216 gates.
pub const DEFAULT_MAX_GATES: usize = 1 << 24;

/// Why a file was not read.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum ReadError {
    /// The text is not a circuit this reader takes.
    #[error("{0}")]
    Malformed(LocatedError),
    /// The file asks for more than a budget allows (nothing was built).
    #[error("{file}: {what} is {value}, over the limit of {limit}")]
    Limit {
        /// The file.
        file: String,
        /// Which quantity.
        what: &'static str,
        /// Its value.
        value: u64,
        /// The limit in force.
        limit: usize,
        /// The budget.
        kind: crate::limit::Limit,
    },
}

impl From<LocatedError> for ReadError {
    fn from(e: LocatedError) -> Self {
        ReadError::Malformed(e)
    }
}

impl ReadError {
    /// The located error, when the text was malformed.
    pub fn located(&self) -> Option<&LocatedError> {
        match self {
            ReadError::Malformed(e) => Some(e),
            ReadError::Limit { .. } => None,
        }
    }
}

/// Reads an OpenQASM 2 file of `x`, `cx`, `CX` and `ccx` gates into a
/// circuit, within the default [`ReadLimits`].
pub fn read_qasm(path: &str, text: &str) -> Result<Circuit, ReadError> {
    read_qasm_with(path, text, &ReadLimits::default())
}

/// Reads an OpenQASM 2 file of `x`, `cx`, `CX` and `ccx` gates into a circuit.
///
/// `qreg`s become registers (a register named `anc` holds ancillae); `creg`
/// declarations and `barrier`s are read (their operands must be declared);
/// a register operand without an index applies the gate across the
/// register, as OpenQASM 2 defines, and the expansion is counted against
/// `limits` before it is made. `gate` definitions whose bodies hold `x`,
/// `cx`, `CX`, `ccx`, `barrier` and earlier definitions are expanded where
/// they are applied, after their arity, their arguments (distinct, declared)
/// and the gate budget are checked. A phase oracle's wrapper, `x q; h q;` before
/// every gate and `h q; x q;` after them on one qubit, is read as the
/// circuit's phase line ([`Circuit::phase`]); the verifier then checks that it
/// is the line the spec names. Measurement, reset and classical control are
/// refused with their line: the verifier proves unitary circuits of these
/// gates and would not know what a measurement does to the rest.
pub fn read_qasm_with(path: &str, text: &str, limits: &ReadLimits) -> Result<Circuit, ReadError> {
    let src = Source { path, text };
    let clean = strip_comments(text);
    let mut regs = Regs::default();
    let mut cregs: std::collections::HashMap<String, u32> = Default::default();
    // A measured uncompute being read, and the `h` statement just before.
    let mut gadget: Option<Gadget> = None;
    let mut prev_h: Option<(u32, usize)> = None;
    let mut lines: Vec<LineInfo> = Vec::new();
    let mut gates: Vec<Gate> = Vec::new();
    // Positions (in `gates`) and lines of `h` statements, with their offsets.
    let mut hadamards: Vec<(usize, u32, usize)> = Vec::new();
    let mut seen_version = false;
    let mut defs = super::gatedef::Defs::default();
    let mut start = 0usize;
    while start < clean.len() {
        let def_at = start + (clean[start..].len() - clean[start..].trim_start().len());
        if seen_version
            && clean[def_at..].starts_with("gate")
            && clean[def_at + 4..].starts_with(|c: char| c.is_whitespace())
        {
            start = super::gatedef::read_definition(&src, &clean, def_at, &mut defs)?;
            continue;
        }
        let end = match clean[start..].find(';') {
            Some(k) => start + k,
            None => {
                let rest = clean[start..].trim_start();
                if rest.is_empty() {
                    break;
                }
                let at = clean.len() - rest.len();
                return Err(src.error(at, "this statement has no closing ';'").into());
            }
        };
        let stmt_raw = &clean[start..end];
        let lead = stmt_raw.len() - stmt_raw.trim_start().len();
        let at = start + lead;
        let stmt = stmt_raw.trim();
        start = end + 1;
        if stmt.is_empty() {
            continue;
        }
        let word_len = stmt
            .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
            .unwrap_or(stmt.len());
        let word = &stmt[..word_len];
        let rest = &stmt[word_len..];
        let rest_at = at + word_len;
        if !seen_version {
            if word == "OPENQASM" && rest.trim() == "2.0" {
                seen_version = true;
                continue;
            }
            return Err(src
                .error(at, "an OpenQASM 2 file starts with 'OPENQASM 2.0;'")
                .into());
        }
        let after_h = prev_h.take();
        if let Some(gd) = &gadget {
            if word != "if" {
                return Err(src
                    .error(at, "the measured uncompute before this statement is not complete")
                    .with_hint(format!(
                        "it started at the 'h' on line {}; it ends with 'if({}==1) x' on its ancilla",
                        src.locate(gd.at).line,
                        gd.creg
                    ))
                    .into());
            }
        }
        match word {
            "include" => {
                if rest.trim() != "\"qelib1.inc\"" {
                    return Err(src
                        .error(rest_at, "only \"qelib1.inc\" can be included")
                        .into());
                }
            }
            "qreg" | "creg" => {
                let (name, size) = parse_decl(&src, rest, rest_at)?;
                if regs.find(&name).is_some() || cregs.contains_key(&name) {
                    return Err(src
                        .error(rest_at, format!("register '{name}' is declared twice"))
                        .into());
                }
                if word == "creg" {
                    cregs.insert(name, size);
                    continue;
                }
                if lines.len() + size as usize > limits.max_qubits {
                    return Err(ReadError::Limit {
                        file: path.to_string(),
                        what: "the number of qubits declared",
                        value: (lines.len() + size as usize) as u64,
                        limit: limits.max_qubits,
                        kind: crate::limit::Limit::Qubits,
                    });
                }
                let first = lines.len() as u32;
                for i in 0..size {
                    lines.push(LineInfo {
                        register: name.clone(),
                        index: i,
                        role: if name == crate::circuit::layout::ANCILLAE {
                            Role::Ancilla
                        } else {
                            Role::Data
                        },
                        label: format!("{name}[{i}]"),
                    });
                }
                regs.by_name.insert(name, Reg { first, size });
            }
            "barrier" => {
                parse_operands(&src, &regs, rest, rest_at)?;
            }
            "measure" if after_h.is_some() => {
                let (h_line, h_at) = after_h.expect("checked");
                let (left, right) = rest
                    .split_once("->")
                    .ok_or_else(|| src.error(rest_at, "a measurement is 'measure q -> c[0]'"))?;
                let ops = parse_operands(&src, &regs, left, rest_at)?;
                let right_at = rest_at + left.len() + 2;
                let (creg, bit) = parse_index(&src, right, right_at)?;
                let one_bit = cregs.get(&creg) == Some(&1) && bit == Some(0);
                if ops.as_slice() != [(h_line, None)] || !one_bit {
                    return Err(src
                        .error(at, "a measurement is read only as the start of a measured uncompute")
                        .with_hint("h t; measure t -> m[0]; with m a 1-bit creg, on the qubit of the 'h' before")
                        .into());
                }
                hadamards.pop();
                gadget = Some(Gadget {
                    target: h_line,
                    creg,
                    at: h_at,
                    pre: Vec::new(),
                    cz: None,
                    post: 0,
                });
            }
            "if" if gadget.is_some() => {
                let gd = gadget.as_mut().expect("checked");
                let fail = |why: &str| -> ReadError {
                    src.error(at, format!("this is not part of a measured uncompute: {why}"))
                        .with_hint(format!(
                            "after 'measure t -> {c}[0];': 'if({c}==1) x' on each negative control, 'if({c}==1) cz a,b;', the same 'x', then 'if({c}==1) x t;'",
                            c = gd.creg
                        ))
                        .into()
                };
                let body = rest.trim_start();
                let close = body.find(')').ok_or_else(|| fail("no ')'"))?;
                let cond: String = body[..close]
                    .chars()
                    .filter(|c| !c.is_whitespace())
                    .collect();
                if cond != format!("({}==1", gd.creg) {
                    return Err(fail(
                        "the condition is not on the register just measured, equal to 1",
                    ));
                }
                let inner = body[close + 1..].trim_start();
                let inner_at = at + (stmt.len() - inner.len());
                let op_len = inner
                    .find(|c: char| !c.is_ascii_alphanumeric())
                    .unwrap_or(inner.len());
                let ops = parse_operands(&src, &regs, &inner[op_len..], inner_at + op_len)?;
                let lines: Vec<u32> = ops
                    .iter()
                    .map(|o| if o.1.is_none() { Some(o.0) } else { None })
                    .collect::<Option<_>>()
                    .ok_or_else(|| fail("a whole-register operand"))?;
                match (&inner[..op_len], lines.as_slice(), gd.cz) {
                    ("x", [l], None)
                        if *l != gd.target && gd.pre.len() < 2 && !gd.pre.contains(l) =>
                    {
                        gd.pre.push(*l)
                    }
                    ("cz", [a, b], None)
                        if a != b
                            && *a != gd.target
                            && *b != gd.target
                            && gd.pre.iter().all(|p| p == a || p == b) =>
                    {
                        gd.cz = Some((*a, *b))
                    }
                    ("x", [l], Some(_)) if gd.post < gd.pre.len() && *l == gd.pre[gd.post] => {
                        gd.post += 1
                    }
                    ("x", [l], Some((a, b))) if gd.post == gd.pre.len() && *l == gd.target => {
                        let lit = |line: u32| Control {
                            line: Line(line),
                            positive: !gd.pre.contains(&line),
                        };
                        let g = Gate::measured(lit(a), lit(b), Line(gd.target))
                            .expect("three distinct lines, checked");
                        if gates.len() >= limits.max_gates {
                            return Err(ReadError::Limit {
                                file: path.to_string(),
                                what: "the number of gates",
                                value: gates.len() as u64 + 1,
                                limit: limits.max_gates,
                                kind: crate::limit::Limit::Gates,
                            });
                        }
                        gates.push(g);
                        gadget = None;
                    }
                    _ => return Err(fail("not the next step of the gadget")),
                }
            }
            "measure" | "reset" | "if" => {
                return Err(src
                    .error(at, format!("'{word}' is not read: oraculum proves circuits of x, cx and ccx gates, and a {} in the middle of them is not something it can prove", match word {
                        "measure" => "measurement",
                        "reset" => "reset",
                        _ => "classically controlled gate",
                    }))
                    .with_hint("measure after the oracle, in the circuit that uses it")
                    .into());
            }
            "h" => {
                let ops = parse_operands(&src, &regs, rest, rest_at)?;
                match ops.as_slice() {
                    [(line, None)] => {
                        hadamards.push((gates.len(), *line, at));
                        prev_h = Some((*line, at));
                    }
                    _ => return Err(src.error(rest_at, "'h' is read on one qubit").into()),
                }
            }
            "x" | "cx" | "CX" | "ccx" => {
                let arity = match word {
                    "x" => 1,
                    "ccx" => 3,
                    _ => 2,
                };
                let ops = parse_operands(&src, &regs, rest, rest_at)?;
                if ops.len() != arity {
                    return Err(src
                        .error(
                            rest_at,
                            format!("'{word}' takes {arity} operand(s), found {}", ops.len()),
                        )
                        .into());
                }
                // A whole-register operand repeats the gate across the register.
                let sizes: Vec<u32> = ops.iter().filter_map(|o| o.1).collect();
                let reps = sizes.first().copied().unwrap_or(1);
                if sizes.iter().any(|&s| s != reps) {
                    return Err(src
                        .error(rest_at, "whole-register operands differ in size")
                        .into());
                }
                let total = gates.len() as u64 + reps as u64;
                if total > limits.max_gates as u64 {
                    return Err(ReadError::Limit {
                        file: path.to_string(),
                        what: "the number of gates",
                        value: total,
                        limit: limits.max_gates,
                        kind: crate::limit::Limit::Gates,
                    });
                }
                for r in 0..reps {
                    let q: Vec<u32> = ops
                        .iter()
                        .map(|(first, size)| if size.is_some() { first + r } else { *first })
                        .collect();
                    let t = *q.last().expect("arity at least 1");
                    let controls = q[..q.len() - 1].iter().map(|&c| Control::pos(c)).collect();
                    let g = Gate::new(controls, Line(t)).ok_or_else(|| {
                        src.error(rest_at, format!("'{word}' uses the same qubit twice"))
                    })?;
                    gates.push(g);
                }
            }
            name if defs.find(name).is_some() => {
                let ops = parse_operands(&src, &regs, rest, rest_at)?;
                super::gatedef::apply(&src, &defs, name, &ops, rest_at, &mut gates, limits)?;
            }
            "" => {
                return Err(src
                    .error(
                        at,
                        format!("unexpected '{}'", stmt.chars().next().unwrap_or(' ')),
                    )
                    .into());
            }
            other => {
                return Err(src
                    .error(at, format!("'{other}' is not read by oraculum"))
                    .with_hint("oraculum reads qreg, creg, x, cx, CX, ccx, barrier, gate definitions of those, and h around a phase oracle")
                    .into());
            }
        }
    }
    if !seen_version {
        return Err(src
            .error(0, "an OpenQASM 2 file starts with 'OPENQASM 2.0;'")
            .into());
    }
    if let Some(gd) = &gadget {
        return Err(src
            .error(
                gd.at,
                "this measured uncompute is not complete at the end of the file",
            )
            .into());
    }
    let mut phase = None;
    if let Some(&(_, _, at)) = hadamards.first() {
        // Only the wrapper of a phase oracle: x q; h q; ... h q; x q;
        let wrapped = match hadamards.as_slice() {
            [(1, q, _), (k, q2, _)] => {
                *q == *q2
                    && *k + 1 == gates.len()
                    && gates[0] == Gate::not(*q)
                    && gates[gates.len() - 1] == Gate::not(*q)
            }
            _ => false,
        };
        if !wrapped {
            return Err(src
                .error(at, "'h' is read only as the wrapper of a phase oracle")
                .with_hint("x q; h q; at the start and h q; x q; at the end, on the same qubit")
                .into());
        }
        phase = Some(Line(hadamards[0].1));
        gates = gates[1..gates.len() - 1].to_vec();
    }
    let mut c = Circuit::from_parts(lines, gates)
        .expect("operands were resolved against declared registers");
    c.set_phase(phase);
    if c.measured_count() > 0 {
        crate::circuit::measure::mark_temporary_ands(&mut c);
    }
    Ok(c)
}

/// A measured uncompute being read: its ancilla, register, the offset of its
/// `h`, the `x` before its `cz`, the `cz`, and how many `x` after it.
struct Gadget {
    target: u32,
    creg: String,
    at: usize,
    pre: Vec<u32>,
    cz: Option<(u32, u32)>,
    post: usize,
}

pub(super) fn parse_index(
    src: &Source,
    text: &str,
    at: usize,
) -> Result<(String, Option<u32>), LocatedError> {
    let t = text.trim();
    let lead = at + (text.len() - text.trim_start().len());
    let (name, index) = match t.find('[') {
        Some(k) => {
            let close = t
                .rfind(']')
                .filter(|&c| c == t.len() - 1)
                .ok_or_else(|| src.error(lead + k, "expected ']' at the end of the operand"))?;
            let idx: u32 = t[k + 1..close]
                .trim()
                .parse()
                .map_err(|_| src.error(lead + k + 1, "an index is a whole number"))?;
            (t[..k].trim(), Some(idx))
        }
        None => (t, None),
    };
    let mut chars = name.chars();
    let ok = matches!(chars.next(), Some(c) if c.is_ascii_alphabetic())
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_');
    if !ok {
        return Err(src.error(lead, format!("'{name}' is not a register name")));
    }
    Ok((name.to_string(), index))
}

pub(super) fn parse_decl(
    src: &Source,
    text: &str,
    at: usize,
) -> Result<(String, u32), LocatedError> {
    let (name, size) = parse_index(src, text, at)?;
    match size {
        Some(s) if s > 0 => Ok((name, s)),
        _ => Err(src.error(
            at,
            "a register is declared as name[size] with size at least 1",
        )),
    }
}

/// Operands as (first line, Some(size) for a whole register).
pub(super) fn parse_operands(
    src: &Source,
    regs: &Regs,
    text: &str,
    at: usize,
) -> Result<Vec<(u32, Option<u32>)>, LocatedError> {
    let mut out = Vec::new();
    let mut offset = 0;
    for part in text.split(',') {
        let part_at = at + offset;
        offset += part.len() + 1;
        let (name, index) = parse_index(src, part, part_at)?;
        let lead = part_at + (part.len() - part.trim_start().len());
        let reg = regs
            .find(&name)
            .ok_or_else(|| src.error(lead, format!("register '{name}' is not declared")))?;
        match index {
            Some(i) if i >= reg.size => {
                return Err(src.error(
                    lead,
                    format!(
                        "{name}[{i}] is past the end of '{name}', which has {} qubits",
                        reg.size
                    ),
                ))
            }
            Some(i) => out.push((reg.first + i, None)),
            None => out.push((reg.first, Some(reg.size))),
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    // The gadget of Jones (PRA 87, 022328, 2013, Fig. 3) and Gidney (Quantum
    // 2, 74, 2018, Fig. 3) is written and read back as the same gate, with
    // a negative control conjugated by x; the compute before it is read as a
    // temporary AND. A measurement outside the gadget is refused at its line.
    #[test]
    fn the_measured_uncompute_is_written_and_read_back() {
        let lines: Vec<LineInfo> = (0..3)
            .map(|i| LineInfo {
                register: if i < 2 {
                    "q"
                } else {
                    crate::circuit::layout::ANCILLAE
                }
                .into(),
                index: if i < 2 { i } else { 0 } as u32,
                role: if i < 2 { Role::Data } else { Role::Ancilla },
                label: String::new(),
            })
            .collect();
        let a = Control::neg(0);
        let b = Control::pos(1);
        let gates = vec![
            Gate::temporary_and(a, b, Line(2)).unwrap(),
            Gate::measured(a, b, Line(2)).unwrap(),
        ];
        let c = Circuit::from_parts(lines, gates.clone()).unwrap();
        let text = write_qasm(&c, &QasmHeader::default()).unwrap();
        assert!(text.contains("creg m[1];"), "{text}");
        assert!(text.contains("measure anc[0] -> m[0];"), "{text}");
        assert!(text.contains("if(m==1) cz q[0],q[1];"), "{text}");
        let back = read_qasm("g.qasm", &text).unwrap();
        // The temporary AND comes back as x; ccx; x, the uncompute as itself.
        assert_eq!(back.gates().last(), gates.last());
        assert_eq!(
            back.gates().iter().filter(|g| g.is_temporary_and()).count(),
            1
        );
        for s in 0..4u64 {
            assert_eq!(back.simulate(s), c.simulate(s));
        }

        let stray = "OPENQASM 2.0;\ninclude \"qelib1.inc\";\nqreg q[2];\ncreg m[1];\nmeasure q[0] -> m[0];\n";
        let e = read_qasm("s.qasm", stray).unwrap_err();
        assert_eq!(e.located().unwrap().location.line, 5, "{e}");
        // The cz on the wrong pair ends the gadget with an error at its line.
        let wrong = text.replace("cz q[0],q[1]", "cz q[0],anc[0]");
        let e = read_qasm("w.qasm", &wrong).unwrap_err();
        let line = wrong
            .lines()
            .position(|l| l.contains("cz q[0],anc[0]"))
            .unwrap()
            + 1;
        assert_eq!(e.located().unwrap().location.line, line, "{e}");
    }
}
