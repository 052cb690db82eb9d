//! The reader of the Clifford+T form (`synth --format clifford-t`): it takes
//! exactly the statement sequences the writer emits, each read back as the
//! one gate it stands for, and refuses anything else at its line and column.
//!
//! - `x q;` is a NOT and `cx a,b;` a CNOT.
//! - The 7-T Toffoli of T-depth 3 (Amy, Maslov, Mosca, Roetteler, IEEE TCAD
//!   32, 2013, Fig. 13), `h c;` around the phase polynomial of a doubly
//!   controlled Z, is a Toffoli of `a`, `b` into `c`.
//! - The 4-T temporary AND (Jones, PRA 87, 022328, 2013, Fig. 1; Gidney,
//!   Quantum 2, 74, 2018, Fig. 3) is a temporary AND: the verifier then
//!   requires its target to be 0, the only state on which the construction
//!   is a Toffoli.
//! - The measured uncompute, `h t; measure t -> m[0];` and the `if(m==1)`
//!   steps, is a measured uncompute: the verifier requires its target to hold
//!   the AND of its controls.
//! - A phase oracle's wrapper, `x p; h p;` first and `h p; x p;` last.
//!
//! Negative controls are `x` statements around a Toffoli or temporary AND, as
//! the writer puts them, and are read as the NOT gates they are (the plain
//! reader does the same). The sequences are this file's own; that they mean
//! the gates above is checked by state-vector simulation in
//! `tests/clifford_t.rs`, and that the writer emits them by reading back
//! every demo circuit in `tests/clifford_t_read.rs`.

use super::qasm2::{parse_decl, parse_index, parse_operands, strip_comments, Reg, Regs};
use super::{ReadError, ReadLimits};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo, Role};
use crate::source::{LocatedError, Source};

/// The statements the form is made of.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Op {
    X,
    Cx,
    H,
    S,
    T,
    Tdg,
    Cz,
    Measure,
}

impl Op {
    fn word(self) -> &'static str {
        match self {
            Op::X => "x",
            Op::Cx => "cx",
            Op::H => "h",
            Op::S => "s",
            Op::T => "t",
            Op::Tdg => "tdg",
            Op::Cz => "cz",
            Op::Measure => "measure",
        }
    }
}

/// One statement of the body: its operation, its qubits (lines), whether it
/// is under `if(m==1)`, and the offset where it starts.
struct Stmt {
    op: Op,
    q: Vec<u32>,
    cond: bool,
    at: usize,
}

/// The 7-T Toffoli of `a` (0), `b` (1) into `c` (2), statement by statement.
const TOFFOLI: &[(Op, &[usize])] = &[
    (Op::H, &[2]),
    (Op::T, &[0]),
    (Op::T, &[1]),
    (Op::T, &[2]),
    (Op::Cx, &[0, 1]),
    (Op::Cx, &[1, 2]),
    (Op::Cx, &[2, 0]),
    (Op::Tdg, &[0]),
    (Op::Tdg, &[1]),
    (Op::T, &[2]),
    (Op::Cx, &[1, 0]),
    (Op::Tdg, &[0]),
    (Op::Cx, &[1, 0]),
    (Op::Cx, &[2, 0]),
    (Op::Cx, &[1, 2]),
    (Op::Cx, &[0, 1]),
    (Op::H, &[2]),
];

/// The 4-T temporary AND of `a` (0), `b` (1) into the clean `t` (2).
const AND: &[(Op, &[usize])] = &[
    (Op::H, &[2]),
    (Op::T, &[2]),
    (Op::Cx, &[0, 2]),
    (Op::Cx, &[1, 2]),
    (Op::Cx, &[2, 0]),
    (Op::Cx, &[2, 1]),
    (Op::Tdg, &[0]),
    (Op::Tdg, &[1]),
    (Op::T, &[2]),
    (Op::Cx, &[2, 0]),
    (Op::Cx, &[2, 1]),
    (Op::H, &[2]),
    (Op::S, &[2]),
];

/// Reads a file in Clifford+T form into a circuit, within `limits`.
pub fn read_clifford_t_with(
    path: &str,
    text: &str,
    limits: &ReadLimits,
) -> Result<Circuit, ReadError> {
    let src = Source { path, text };
    let (lines, stmts) = statements(&src, limits)?;
    let name = |l: u32| {
        let i = &lines[l as usize];
        format!("{}[{}]", i.register, i.index)
    };
    let reader = Reader {
        src: &src,
        stmts: &stmts,
        name: &name,
        max_gates: limits.max_gates,
    };
    // The phase wrapper, when the body starts with `x p; h p;` and ends with
    // `h p; x p;` and what lies between reads as gates; else the whole body.
    let n = stmts.len();
    let plain = |s: &Stmt, op: Op| !s.cond && s.op == op && s.q.len() == 1;
    let wrapped = n >= 4
        && plain(&stmts[0], Op::X)
        && plain(&stmts[1], Op::H)
        && plain(&stmts[n - 2], Op::H)
        && plain(&stmts[n - 1], Op::X)
        && [1, n - 2, n - 1].iter().all(|&k| stmts[k].q == stmts[0].q);
    let (gates, phase) = if wrapped {
        match reader.gates(2, n - 2) {
            Ok(g) => (g, Some(Line(stmts[0].q[0]))),
            Err((k, e)) => match reader.gates(0, n) {
                Ok(g) => (g, None),
                // The error of the reading that went further.
                Err((k2, e2)) => return Err(if k2 > k { e2 } else { e }),
            },
        }
    } else {
        (reader.gates(0, n).map_err(|(_, e)| e)?, None)
    };
    let mut c = Circuit::from_parts(lines, gates)
        .expect("operands were resolved against declared registers");
    c.set_phase(phase);
    Ok(c)
}

/// The declarations as lines and the body as statements.
fn statements(src: &Source, limits: &ReadLimits) -> Result<(Vec<LineInfo>, Vec<Stmt>), ReadError> {
    let clean = strip_comments(src.text);
    let mut regs = Regs::default();
    let mut creg: Option<String> = None;
    let mut lines: Vec<LineInfo> = Vec::new();
    let mut stmts: Vec<Stmt> = Vec::new();
    let mut seen_version = false;
    let mut start = 0usize;
    while start < clean.len() {
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
        let raw = &clean[start..end];
        let at = start + (raw.len() - raw.trim_start().len());
        let stmt = raw.trim();
        start = end + 1;
        if stmt.is_empty() {
            continue;
        }
        let (word, rest, rest_at) = split_word(stmt, at);
        if !seen_version {
            if word == "OPENQASM" && rest.trim() == "2.0" {
                seen_version = true;
                continue;
            }
            return Err(src
                .error(at, "an OpenQASM 2 file starts with 'OPENQASM 2.0;'")
                .into());
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
                let (name, size) = parse_decl(src, rest, rest_at)?;
                if regs.find(&name).is_some() || creg.as_deref() == Some(name.as_str()) {
                    return Err(src
                        .error(rest_at, format!("register '{name}' is declared twice"))
                        .into());
                }
                if word == "creg" {
                    if creg.is_some() || size != 1 {
                        return Err(src
                            .error(rest_at, "the Clifford+T form declares one classical register, of 1 bit, for its measured uncomputes")
                            .into());
                    }
                    creg = Some(name);
                    continue;
                }
                if lines.len() + size as usize > limits.max_qubits {
                    return Err(ReadError::Limit {
                        file: src.path.to_string(),
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
            _ => {
                // A gate is at most 17 statements, so past 17 statements
                // per gate of the budget the gates are over it: counted
                // before the list grows.
                if stmts.len() / 17 >= limits.max_gates {
                    return Err(ReadError::Limit {
                        file: src.path.to_string(),
                        what: "the number of gates",
                        value: stmts.len() as u64 / 17 + 1,
                        limit: limits.max_gates,
                        kind: crate::limit::Limit::Gates,
                    });
                }
                stmts.push(statement(src, &regs, creg.as_deref(), stmt, at)?);
            }
        }
    }
    if !seen_version {
        return Err(src
            .error(0, "an OpenQASM 2 file starts with 'OPENQASM 2.0;'")
            .into());
    }
    Ok((lines, stmts))
}

/// The leading word of `stmt` (at `at`), the rest, and where the rest starts.
fn split_word(stmt: &str, at: usize) -> (&str, &str, usize) {
    let len = stmt
        .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
        .unwrap_or(stmt.len());
    (&stmt[..len], &stmt[len..], at + len)
}

/// One body statement, `if(m==1)` and `measure q -> m[0]` included.
fn statement(
    src: &Source,
    regs: &Regs,
    creg: Option<&str>,
    stmt: &str,
    at: usize,
) -> Result<Stmt, LocatedError> {
    let (word, rest, rest_at) = split_word(stmt, at);
    if word == "if" {
        let Some(m) = creg else {
            return Err(src.error(at, "'if' before any classical register is declared"));
        };
        let body = rest.trim_start();
        let body_at = rest_at + (rest.len() - body.len());
        let close = body
            .find(')')
            .ok_or_else(|| src.error(body_at, "a condition is '(m==1)'"))?;
        let cond: String = body[..close]
            .chars()
            .filter(|c| !c.is_whitespace())
            .collect();
        if cond != format!("({m}==1") {
            return Err(src.error(
                body_at,
                format!("the only condition of the Clifford+T form is '({m}==1)'"),
            ));
        }
        let inner = &body[close + 1..];
        let inner_at = body_at + close + 1;
        let lead = inner.len() - inner.trim_start().len();
        if split_word(inner.trim(), 0).0 == "if" {
            return Err(src.error(inner_at + lead, "one condition per statement"));
        }
        let mut s = statement(src, regs, creg, inner.trim(), inner_at + lead)?;
        if s.op == Op::Measure {
            return Err(src.error(
                inner_at + lead,
                "this cannot be classically controlled here",
            ));
        }
        s.cond = true;
        s.at = at;
        return Ok(s);
    }
    let op = match word {
        "x" => Op::X,
        "cx" => Op::Cx,
        "h" => Op::H,
        "s" => Op::S,
        "t" => Op::T,
        "tdg" => Op::Tdg,
        "cz" => Op::Cz,
        "measure" => Op::Measure,
        "" => {
            return Err(src.error(
                at,
                format!("unexpected '{}'", stmt.chars().next().unwrap_or(' ')),
            ))
        }
        other => {
            return Err(src
                .error(at, format!("'{other}' is not part of the Clifford+T form"))
                .with_hint("the form holds x, cx, the 7-T Toffoli, the 4-T temporary AND and the measured uncompute, as synth --format clifford-t writes them"))
        }
    };
    let (operands, operands_at) = if op == Op::Measure {
        let (left, right) = rest
            .split_once("->")
            .ok_or_else(|| src.error(rest_at, "a measurement is 'measure q -> m[0]'"))?;
        let right_at = rest_at + left.len() + 2;
        let (name, bit) = parse_index(src, right, right_at)?;
        if creg != Some(name.as_str()) || bit != Some(0) {
            return Err(src.error(
                right_at,
                "a measurement goes to bit 0 of the declared 1-bit classical register",
            ));
        }
        (left, rest_at)
    } else {
        (rest, rest_at)
    };
    let ops = parse_operands(src, regs, operands, operands_at)?;
    let operands_at = operands_at + (operands.len() - operands.trim_start().len());
    let arity = match op {
        Op::Cx | Op::Cz => 2,
        _ => 1,
    };
    if ops.len() != arity || ops.iter().any(|o| o.1.is_some()) {
        return Err(src.error(
            operands_at,
            format!(
                "'{word}' takes {arity} qubit(s), each one named with its index, in the Clifford+T form"
            ),
        ));
    }
    let q: Vec<u32> = ops.iter().map(|o| o.0).collect();
    if arity == 2 && q[0] == q[1] {
        return Err(src.error(operands_at, format!("'{word}' uses the same qubit twice")));
    }
    Ok(Stmt {
        op,
        q,
        cond: false,
        at,
    })
}

struct Reader<'a> {
    src: &'a Source<'a>,
    stmts: &'a [Stmt],
    name: &'a dyn Fn(u32) -> String,
    max_gates: usize,
}

/// A failure and the statement it is at (to pick the reading that went furthest).
type Fail = (usize, ReadError);

impl Reader<'_> {
    fn fail(&self, k: usize, msg: String) -> Fail {
        let at = self
            .stmts
            .get(k)
            .map_or(self.src.text.len().saturating_sub(1), |s| s.at);
        (k, self.src.error(at, msg).into())
    }

    /// The gates of statements `from..to`.
    fn gates(&self, from: usize, to: usize) -> Result<Vec<Gate>, Fail> {
        let mut gates = Vec::new();
        let mut k = from;
        while k < to {
            if gates.len() >= self.max_gates {
                return Err((
                    k,
                    ReadError::Limit {
                        file: self.src.path.to_string(),
                        what: "the number of gates",
                        value: gates.len() as u64 + 1,
                        limit: self.max_gates,
                        kind: crate::limit::Limit::Gates,
                    },
                ));
            }
            let s = &self.stmts[k];
            let next = self.stmts[..to].get(k + 1);
            let (gate, used) = match (s.op, s.cond) {
                (Op::X, false) => (Gate::not(s.q[0]), 1),
                (Op::Cx, false) => (Gate::cnot(s.q[0], s.q[1]), 1),
                (Op::H, false) => match next {
                    Some(n) if n.op == Op::Measure && !n.cond => self.gadget(k, to)?,
                    Some(n) if n.op == Op::T && !n.cond && n.q == s.q => {
                        let v = self.template(k, to, AND, "4-T temporary AND")?;
                        let g = Gate::temporary_and(Control::pos(v[0]), Control::pos(v[1]), Line(v[2]))
                            .expect("distinct lines, checked");
                        (g, AND.len())
                    }
                    _ => {
                        let v = self.template(k, to, TOFFOLI, "7-T Toffoli")?;
                        (Gate::toffoli(v[0], v[1], v[2]), TOFFOLI.len())
                    }
                },
                (Op::Measure, _) => {
                    return Err(self.fail(
                        k,
                        "a measurement is read only as part of a measured uncompute: 'h t; measure t -> m[0];' and its 'if(m==1)' steps".into(),
                    ))
                }
                (op, cond) => {
                    return Err(self.fail(
                        k,
                        format!(
                            "'{}{}' does not start a gate of the Clifford+T form: x, cx, or 'h' on the target of a Toffoli, temporary AND or measured uncompute",
                            if cond { "if(..) " } else { "" },
                            op.word()
                        ),
                    ))
                }
            };
            gates.push(gate);
            k += used;
        }
        Ok(gates)
    }

    /// Matches `template` at statement `k` (before `to`), binding its lines;
    /// the lines of the template are distinct.
    fn template(
        &self,
        k: usize,
        to: usize,
        template: &[(Op, &[usize])],
        what: &str,
    ) -> Result<[u32; 3], Fail> {
        let mut v: [Option<u32>; 3] = [None; 3];
        let start_line = self.src.locate(self.stmts[k].at).line;
        for (step, (op, vars)) in template.iter().enumerate() {
            let expected = |v: &[Option<u32>; 3]| {
                let names: Vec<String> = vars
                    .iter()
                    .map(|&i| v[i].map_or_else(|| "a new qubit".to_string(), |l| (self.name)(l)))
                    .collect();
                format!(
                    "expected '{} {}', step {} of the {what} that starts at line {start_line}",
                    op.word(),
                    names.join(","),
                    step + 1
                )
            };
            let j = k + step;
            let Some(s) = self.stmts[..to].get(j) else {
                return Err(self.fail(j, format!("the file ends early: {}", expected(&v))));
            };
            if s.cond || s.op != *op {
                return Err(self.fail(j, expected(&v)));
            }
            for (&var, &line) in vars.iter().zip(&s.q) {
                match v[var] {
                    Some(l) if l == line => {}
                    None if !v.contains(&Some(line)) => v[var] = Some(line),
                    _ => return Err(self.fail(j, expected(&v))),
                }
            }
        }
        Ok(v.map(|l| l.expect("every line is bound by the template")))
    }

    /// The measured uncompute at statement `k`: `h t; measure t -> m[0];`,
    /// `if(m==1) x` on each negative control (in control order), `if(m==1)
    /// cz a,b;`, the same `x` again, `if(m==1) x t;`.
    fn gadget(&self, k: usize, to: usize) -> Result<(Gate, usize), Fail> {
        let t = self.stmts[k].q[0];
        let start_line = self.src.locate(self.stmts[k].at).line;
        let hint = |what: &str| {
            format!(
                "expected {what}, in the measured uncompute that starts at line {start_line} (after 'measure t -> m[0];': 'if(m==1) x' on each negative control, 'if(m==1) cz a,b;', the same 'x', then 'if(m==1) x t;')"
            )
        };
        let get = |j: usize, what: &str| -> Result<&Stmt, Fail> {
            self.stmts[..to]
                .get(j)
                .ok_or_else(|| self.fail(j, format!("the file ends early: {}", hint(what))))
        };
        let m = get(k + 1, "the measurement")?;
        if m.q != [t] {
            return Err(self.fail(
                k + 1,
                hint(&format!("'measure {} -> m[0]'", (self.name)(t))),
            ));
        }
        let mut j = k + 2;
        let mut pre: Vec<u32> = Vec::new();
        let (a, b) = loop {
            let s = get(j, "'if(m==1) x' or 'if(m==1) cz'")?;
            j += 1;
            match (s.cond, s.op, s.q.as_slice()) {
                (true, Op::X, &[l]) if l != t && pre.len() < 2 && !pre.contains(&l) => pre.push(l),
                (true, Op::Cz, &[a, b]) if a != t && b != t => break (a, b),
                _ => {
                    return Err(self.fail(
                        j - 1,
                        hint("'if(m==1) x' on a control or 'if(m==1) cz a,b'"),
                    ))
                }
            }
        };
        // The negative controls, in the order the controls are written.
        let order: Vec<u32> = [a, b].into_iter().filter(|l| pre.contains(l)).collect();
        if order != pre {
            return Err(self.fail(
                j - 1,
                hint("a cz on the qubits conjugated by x before it, in their order"),
            ));
        }
        for &n in &pre {
            let s = get(j, "'if(m==1) x' on a negative control")?;
            if !(s.cond && s.op == Op::X && s.q == [n]) {
                return Err(self.fail(j, hint(&format!("'if(m==1) x {}'", (self.name)(n)))));
            }
            j += 1;
        }
        let s = get(j, "'if(m==1) x' on the ancilla")?;
        if !(s.cond && s.op == Op::X && s.q == [t]) {
            return Err(self.fail(j, hint(&format!("'if(m==1) x {}'", (self.name)(t)))));
        }
        let lit = |l: u32| Control {
            line: Line(l),
            positive: !pre.contains(&l),
        };
        let g = Gate::measured(lit(a), lit(b), Line(t)).expect("distinct lines, checked");
        Ok((g, j + 1 - k))
    }
}
