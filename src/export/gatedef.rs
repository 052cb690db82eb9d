//! OpenQASM 2 `gate` definitions: the writer's gate form and the reader's expansion.
//!
//! A definition's body holds `x`, `cx`, `CX`, `ccx`, `barrier` and earlier
//! definitions, on the gate's own arguments (OpenQASM 2, section 3: a gate
//! may use only gates defined before it, so there is no recursion). The
//! reader keeps each body as calls and counts the gates it expands to
//! (saturating), so an application is checked against the gate budget before
//! anything is expanded; expansion walks an explicit stack, never the call
//! stack, however deep the nesting.

use super::qasm2::{QasmHeader, ReadError, ReadLimits, WriteError};
use crate::circuit::{Circuit, Control, Gate, Line};
use crate::source::{LocatedError, Source};
use std::collections::HashMap;

/// One statement of a body: a primitive (`def` is `None`; the last argument is
/// the target) or an earlier definition, on argument positions.
struct Call {
    def: Option<usize>,
    args: Vec<u32>,
}

/// A gate definition as read.
pub(super) struct GateDef {
    /// Its number of qubit arguments.
    pub arity: usize,
    body: Vec<Call>,
    /// The gates it expands to, saturating at `u64::MAX`.
    pub size: u64,
}

/// The definitions of one file, by name.
#[derive(Default)]
pub(super) struct Defs {
    by_name: HashMap<String, usize>,
    list: Vec<GateDef>,
}

impl Defs {
    /// The definition named `name`, with its index.
    pub fn find(&self, name: &str) -> Option<(usize, &GateDef)> {
        self.by_name.get(name).map(|&k| (k, &self.list[k]))
    }
}

/// Names a gate definition may not take: the statements and functions of
/// OpenQASM 2 and 3 and their standard gates.
use crate::circuit::layout::QASM_WORDS as RESERVED;

fn is_identifier(s: &str) -> bool {
    let mut chars = s.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic())
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

/// Writes a lowered circuit as OpenQASM 2 in gate form: a `gate NAME ...`
/// definition of `x`, `cx` and `ccx` whose arguments are every line of the
/// circuit in order (the ancillae too: a gate body cannot allocate qubits, so
/// they are arguments that enter at |0> and leave at |0>), then the register
/// declarations and one application of `NAME` on them. A phase oracle's
/// wrapper stays outside the gate, around its application.
pub fn write_qasm_gate(c: &Circuit, header: &QasmHeader, name: &str) -> Result<String, WriteError> {
    if !valid_gate_name(name) || c.registers().iter().any(|(r, _)| r == name) {
        return Err(WriteError::BadGateName(name.to_string()));
    }
    if let Some(k) = c.gates().iter().position(|g| g.is_measured()) {
        return Err(WriteError::MeasuredInGate(k));
    }
    super::qasm2::write_with(c, header, Some(name))
}

/// Whether `name` can name a gate the writer defines.
pub(super) fn valid_gate_name(name: &str) -> bool {
    name.starts_with(|c: char| c.is_ascii_lowercase())
        && is_identifier(name)
        && !RESERVED.contains(&name)
}

/// Reads the definition that starts at byte `at` of `clean` (at the word
/// `gate`) into `defs`; returns the offset just past its closing `}`.
pub(super) fn read_definition(
    src: &Source,
    clean: &str,
    at: usize,
    defs: &mut Defs,
) -> Result<usize, LocatedError> {
    let open = match clean[at..].find(['{', ';']) {
        Some(k) if clean.as_bytes()[at + k] == b'{' => at + k,
        _ => {
            return Err(src.error(
                at,
                "a gate definition has a body in braces: gate name a, b { ... }",
            ))
        }
    };
    let close = match clean[open..].find('}') {
        Some(k) => open + k,
        None => return Err(src.error(open, "this gate body has no closing '}'")),
    };
    let head_at = at + "gate".len();
    let head = &clean[head_at..open];
    let name_start = head_at + (head.len() - head.trim_start().len());
    let head = head.trim();
    let name_len = head
        .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
        .unwrap_or(head.len());
    let name = &head[..name_len];
    let rest = &head[name_len..];
    if !is_identifier(name) {
        return Err(src.error(name_start, "a gate definition needs a name"));
    }
    if rest.trim_start().starts_with('(') {
        return Err(src
            .error(
                name_start + name_len,
                format!("gate '{name}' takes parameters, which oraculum does not read"),
            )
            .with_hint("oraculum reads gates of x, cx and ccx, which take no angles"));
    }
    if RESERVED.contains(&name) || defs.by_name.contains_key(name) {
        return Err(src.error(name_start, format!("gate '{name}' is already defined")));
    }
    let args_at = name_start + name_len;
    let mut args: Vec<&str> = Vec::new();
    let mut offset = 0;
    for part in rest.split(',') {
        let part_at = args_at + offset;
        offset += part.len() + 1;
        let lead = part_at + (part.len() - part.trim_start().len());
        let a = part.trim();
        if !is_identifier(a) {
            return Err(src.error(lead, format!("'{a}' is not an argument name")));
        }
        if args.contains(&a) {
            return Err(src.error(lead, format!("argument '{a}' is named twice")));
        }
        args.push(a);
    }
    let mut body = Vec::new();
    let mut size: u64 = 0;
    let mut start = open + 1;
    while start < close {
        let end = match clean[start..close].find(';') {
            Some(k) => start + k,
            None => {
                let rest = clean[start..close].trim_start();
                if rest.is_empty() {
                    break;
                }
                return Err(src.error(close - rest.len(), "this statement has no closing ';'"));
            }
        };
        let raw = &clean[start..end];
        let s_at = start + (raw.len() - raw.trim_start().len());
        let stmt = raw.trim();
        start = end + 1;
        if stmt.is_empty() {
            continue;
        }
        let wl = stmt
            .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
            .unwrap_or(stmt.len());
        let word = &stmt[..wl];
        let (def, arity) = match word {
            "x" => (None, 1),
            "cx" | "CX" => (None, 2),
            "ccx" => (None, 3),
            "barrier" => (None, 0),
            w => match defs.find(w) {
                Some((k, d)) => (Some(k), d.arity),
                None => return Err(src
                    .error(s_at, format!("'{w}' is not read inside a gate definition"))
                    .with_hint(
                        "a gate body may use x, cx, CX, ccx, barrier and gates defined before it",
                    )),
            },
        };
        let mut ops = Vec::new();
        let mut off = 0;
        let ops_text = &stmt[wl..];
        for part in ops_text.split(',') {
            let part_at = s_at + wl + off;
            off += part.len() + 1;
            let lead = part_at + (part.len() - part.trim_start().len());
            let a = part.trim();
            let k = args.iter().position(|x| *x == a).ok_or_else(|| {
                if a.contains('[') {
                    src.error(
                        lead,
                        "inside a gate body, operands are the gate's arguments, without an index",
                    )
                } else {
                    src.error(lead, format!("'{a}' is not an argument of gate '{name}'"))
                }
            })?;
            if ops.contains(&(k as u32)) {
                return Err(src.error(lead, format!("'{word}' uses argument '{a}' twice")));
            }
            ops.push(k as u32);
        }
        if word == "barrier" {
            continue;
        }
        if ops.len() != arity {
            return Err(src.error(
                s_at + wl,
                format!("'{word}' takes {arity} operand(s), found {}", ops.len()),
            ));
        }
        size = size.saturating_add(match def {
            None => 1,
            Some(k) => defs.list[k].size,
        });
        body.push(Call { def, args: ops });
    }
    defs.by_name.insert(name.to_string(), defs.list.len());
    defs.list.push(GateDef {
        arity: args.len(),
        body,
        size,
    });
    Ok(close + 1)
}

/// Applies definition `name` to the operands `ops` (first qubit, and the size
/// of a whole-register operand), after checking the arity, the sizes, the gate
/// budget (before anything is expanded) and that no qubit is used twice.
pub(super) fn apply(
    src: &Source,
    defs: &Defs,
    name: &str,
    ops: &[(u32, Option<u32>)],
    at: usize,
    gates: &mut Vec<Gate>,
    limits: &ReadLimits,
) -> Result<(), ReadError> {
    let Some((d, def)) = defs.find(name) else {
        return Err(src
            .error(at, format!("gate '{name}' is not defined"))
            .into());
    };
    if ops.len() != def.arity {
        let msg = format!(
            "'{name}' takes {} operand(s), found {}",
            def.arity,
            ops.len()
        );
        return Err(src.error(at, msg).into());
    }
    let sizes: Vec<u32> = ops.iter().filter_map(|o| o.1).collect();
    let reps = sizes.first().copied().unwrap_or(1);
    if sizes.iter().any(|&s| s != reps) {
        return Err(src
            .error(at, "whole-register operands differ in size")
            .into());
    }
    let total = (gates.len() as u64).saturating_add((reps as u64).saturating_mul(def.size));
    if total > limits.max_gates as u64 {
        return Err(ReadError::Limit {
            file: src.path.to_string(),
            what: "the number of gates once gate definitions are expanded",
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
        let mut sorted = q.clone();
        sorted.sort_unstable();
        if sorted.windows(2).any(|w| w[0] == w[1]) {
            let msg = format!("'{name}' uses the same qubit twice");
            return Err(src.error(at, msg).into());
        }
        expand(defs, d, &q, gates);
    }
    Ok(())
}

/// Appends the gates of definition `d` applied to the distinct qubits `qubits`.
pub(super) fn expand(defs: &Defs, d: usize, qubits: &[u32], out: &mut Vec<Gate>) {
    let mut stack: Vec<(usize, Vec<u32>, usize)> = vec![(d, qubits.to_vec(), 0)];
    while let Some((def, map, pc)) = stack.last_mut() {
        let body = &defs.list[*def].body;
        if *pc == body.len() {
            stack.pop();
            continue;
        }
        let call = &body[*pc];
        *pc += 1;
        let q: Vec<u32> = call.args.iter().map(|&a| map[a as usize]).collect();
        match call.def {
            Some(k) => stack.push((k, q, 0)),
            None => {
                let (&t, cs) = q.split_last().expect("primitives have a target");
                // Distinct arguments map to distinct qubits, so this is a gate.
                if let Some(g) = Gate::new(cs.iter().map(|&c| Control::pos(c)).collect(), Line(t)) {
                    out.push(g);
                }
            }
        }
    }
}

/// The qubit arguments of the gate form: line `k` of the circuit is argument `k`,
/// named `register_index`.
pub(super) fn argument_names(c: &Circuit) -> Vec<String> {
    c.lines()
        .iter()
        .map(|l| format!("{}_{}", l.register, l.index))
        .collect()
}
