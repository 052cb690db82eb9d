//! OpenQASM 3 reader for the subset oraculum writes: `qubit[n]` (and
//! `qreg`) registers, `bit` declarations, `x`, `cx`, `CX`, `ccx` with
//! `ctrl(k) @` and `negctrl(k) @` modifiers, `barrier`, `gate` definitions
//! of those, subroutines (`def NAME(qubit a, ...) { ... }` of the same
//! statements, local `bit` declarations and measured-uncompute gadgets,
//! called as `NAME(q[0], ...);`), the `h` pair of a phase oracle and the measured-uncompute
//! gadget (`h t; m = measure t; if (m) { cz a, b; x t; }`, negative
//! controls conjugated by `x` inside the block). Its own tokenizer and
//! checks: it shares nothing with the writer.
//!
//! A register named `NAME_` where `NAME` is a word OpenQASM reserves (`x_`,
//! `y_`, `ctrl_`) is read as `NAME`, the name the library and the verifier
//! use.

use super::qasm2::{ReadError, ReadLimits};
use crate::circuit::layout::{ANCILLAE, QASM_WORDS};
use crate::circuit::{Circuit, Control, Gate, Line, LineInfo, Role};
use crate::limit::Limit;
use crate::source::{LocatedError, Source};
use std::collections::HashMap;

#[derive(Clone, Debug, PartialEq)]
enum T {
    Ident(String),
    Num(String),
    Str(String),
    Sym(&'static str),
}

#[derive(Clone, Debug)]
struct Tok {
    t: T,
    at: usize,
}

fn tokenize(src: &Source) -> Result<Vec<Tok>, LocatedError> {
    let b = src.text.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        if c.is_ascii_whitespace() {
            i += 1;
        } else if b[i..].starts_with(b"//") {
            while i < b.len() && b[i] != b'\n' {
                i += 1;
            }
        } else if b[i..].starts_with(b"/*") {
            let end = src.text[i + 2..]
                .find("*/")
                .ok_or_else(|| src.error(i, "this comment has no closing '*/'"))?;
            i += end + 4;
        } else if c.is_ascii_alphabetic() || c == b'_' {
            let s = i;
            while i < b.len() && (b[i].is_ascii_alphanumeric() || b[i] == b'_') {
                i += 1;
            }
            out.push(Tok {
                t: T::Ident(src.text[s..i].to_string()),
                at: s,
            });
        } else if c.is_ascii_digit() {
            let s = i;
            while i < b.len() && (b[i].is_ascii_digit() || b[i] == b'.') {
                i += 1;
            }
            out.push(Tok {
                t: T::Num(src.text[s..i].to_string()),
                at: s,
            });
        } else if c == b'"' {
            let end = src.text[i + 1..]
                .find('"')
                .ok_or_else(|| src.error(i, "this string has no closing '\"'"))?;
            out.push(Tok {
                t: T::Str(src.text[i + 1..i + 1 + end].to_string()),
                at: i,
            });
            i += end + 2;
        } else {
            let two = [("==", "=="), ("->", "->")]
                .iter()
                .find(|(p, _)| b[i..].starts_with(p.as_bytes()))
                .map(|(_, s)| *s);
            let sym = match two {
                Some(s) => s,
                None => match c {
                    b';' => ";",
                    b',' => ",",
                    b'[' => "[",
                    b']' => "]",
                    b'(' => "(",
                    b')' => ")",
                    b'{' => "{",
                    b'}' => "}",
                    b'@' => "@",
                    b'=' => "=",
                    _ => {
                        let ch = src.text[i..].chars().next().unwrap_or(' ');
                        return Err(src.error(i, format!("unexpected '{ch}'")));
                    }
                },
            };
            out.push(Tok {
                t: T::Sym(sym),
                at: i,
            });
            i += sym.len();
        }
    }
    Ok(out)
}

/// One statement of a gate body, on argument positions.
enum Call {
    Flip(Vec<(u32, bool)>, u32),
    Def(usize, Vec<u32>),
    /// A gate of a subroutine body (a flip or a measured uncompute), its
    /// lines the argument positions.
    Gate(Gate),
}

struct Def {
    name: String,
    arity: usize,
    body: Vec<Call>,
    size: u64,
    /// A `def` subroutine (called as `NAME(a, b);`), not a `gate`.
    subroutine: bool,
}

/// The subroutine body being read: its arguments, calls and size so far.
struct Body {
    name: String,
    args: Vec<String>,
    calls: Vec<Call>,
    size: u64,
}

/// An operand: a qubit, or a whole register (first line, size).
#[derive(Clone, Copy, PartialEq)]
enum Operand {
    One(u32),
    All(u32, u32),
}

struct Reader<'a> {
    src: &'a Source<'a>,
    path: &'a str,
    toks: Vec<Tok>,
    i: usize,
    limits: ReadLimits,
    regs: HashMap<String, (u32, u32)>,
    bits: HashMap<String, u32>,
    lines: Vec<LineInfo>,
    gates: Vec<Gate>,
    defs: Vec<Def>,
    /// `h` statements: (gate position, line, offset).
    hadamards: Vec<(usize, u32, usize)>,
    /// Inside a subroutine body: operands are its arguments, and gates go
    /// into the body instead of the circuit.
    body: Option<Body>,
}

/// The register name the library uses for a name read from a file.
fn library_name(name: &str) -> String {
    match name.strip_suffix('_') {
        Some(stem) if QASM_WORDS.contains(&stem) => stem.to_string(),
        _ => name.to_string(),
    }
}

impl<'a> Reader<'a> {
    fn end_at(&self) -> usize {
        self.src.text.len()
    }

    fn at(&self) -> usize {
        self.toks.get(self.i).map_or(self.end_at(), |t| t.at)
    }

    fn err(&self, at: usize, msg: impl Into<String>) -> ReadError {
        self.src.error(at, msg).into()
    }

    fn peek(&self) -> Option<&T> {
        self.toks.get(self.i).map(|t| &t.t)
    }

    fn is_sym(&self, s: &str) -> bool {
        matches!(self.peek(), Some(T::Sym(x)) if *x == s)
    }

    fn expect_sym(&mut self, s: &str) -> Result<usize, ReadError> {
        let at = self.at();
        if self.is_sym(s) {
            self.i += 1;
            Ok(at)
        } else {
            Err(self.err(at, format!("expected '{s}'")))
        }
    }

    fn ident(&mut self) -> Result<(String, usize), ReadError> {
        let at = self.at();
        match self.peek() {
            Some(T::Ident(s)) => {
                let s = s.clone();
                self.i += 1;
                Ok((s, at))
            }
            _ => Err(self.err(at, "expected a name")),
        }
    }

    fn int(&mut self) -> Result<u32, ReadError> {
        let at = self.at();
        match self.peek() {
            Some(T::Num(n)) => {
                let v = n
                    .parse()
                    .map_err(|_| self.err(at, "expected a whole number"))?;
                self.i += 1;
                Ok(v)
            }
            _ => Err(self.err(at, "expected a whole number")),
        }
    }

    fn gate_limit(&self, total: u64) -> Result<(), ReadError> {
        if total > self.limits.max_gates as u64 {
            return Err(ReadError::Limit {
                file: self.path.to_string(),
                what: "the number of gates",
                value: total,
                limit: self.limits.max_gates,
                kind: Limit::Gates,
            });
        }
        Ok(())
    }

    fn declare(&mut self, name: String, size: u32, at: usize) -> Result<(), ReadError> {
        if size == 0 {
            return Err(self.err(at, "a register has at least 1 qubit"));
        }
        if self.regs.contains_key(&name) || self.bits.contains_key(&name) {
            return Err(self.err(at, format!("register '{name}' is declared twice")));
        }
        let total = self.lines.len() + size as usize;
        if total > self.limits.max_qubits {
            return Err(ReadError::Limit {
                file: self.path.to_string(),
                what: "the number of qubits declared",
                value: total as u64,
                limit: self.limits.max_qubits,
                kind: Limit::Qubits,
            });
        }
        let first = self.lines.len() as u32;
        let reg = library_name(&name);
        for i in 0..size {
            self.lines.push(LineInfo {
                register: reg.clone(),
                index: i,
                role: if reg == ANCILLAE {
                    Role::Ancilla
                } else {
                    Role::Data
                },
                label: format!("{reg}[{i}]"),
            });
        }
        self.regs.insert(name, (first, size));
        Ok(())
    }

    /// `name` or `name[i]` against the declared registers.
    fn operand(&mut self) -> Result<(Operand, usize), ReadError> {
        let (name, at) = self.ident()?;
        if let Some(b) = &self.body {
            let k = b.args.iter().position(|a| *a == name).ok_or_else(|| {
                self.err(at, format!("'{name}' is not an argument of '{}'", b.name))
            })?;
            if self.is_sym("[") {
                return Err(self.err(
                    at,
                    "inside a subroutine, operands are its qubit arguments, without an index",
                ));
            }
            return Ok((Operand::One(k as u32), at));
        }
        let &(first, size) = self
            .regs
            .get(&name)
            .ok_or_else(|| self.err(at, format!("register '{name}' is not declared")))?;
        if self.is_sym("[") {
            self.i += 1;
            let idx_at = self.at();
            let k = self.int()?;
            self.expect_sym("]")?;
            if k >= size {
                return Err(self.err(
                    idx_at,
                    format!("{name}[{k}] is past the end of '{name}', which has {size} qubits"),
                ));
            }
            return Ok((Operand::One(first + k), at));
        }
        Ok((
            if size == 1 {
                Operand::One(first)
            } else {
                Operand::All(first, size)
            },
            at,
        ))
    }

    fn operands(&mut self) -> Result<Vec<(Operand, usize)>, ReadError> {
        let mut ops = vec![self.operand()?];
        while self.is_sym(",") {
            self.i += 1;
            ops.push(self.operand()?);
        }
        Ok(ops)
    }

    /// `ctrl(k) @`, `negctrl(k) @`, ...: the polarity of each leading operand.
    fn modifiers(&mut self) -> Result<Vec<bool>, ReadError> {
        let mut pol = Vec::new();
        while let Some(T::Ident(w)) = self.peek() {
            let positive = match w.as_str() {
                "ctrl" => true,
                "negctrl" => false,
                _ => break,
            };
            self.i += 1;
            let mut n = 1;
            if self.is_sym("(") {
                self.i += 1;
                let at = self.at();
                n = self.int()?;
                if n == 0 || n > 1 << 16 {
                    return Err(self.err(at, "a control count is at least 1"));
                }
                self.expect_sym(")")?;
            }
            self.expect_sym("@")?;
            pol.extend(std::iter::repeat_n(positive, n as usize));
        }
        Ok(pol)
    }

    /// The controls a standard gate brings (`cx` one, `ccx` two) and its name.
    fn base_arity(name: &str) -> Option<usize> {
        match name {
            "x" => Some(0),
            "cx" | "CX" => Some(1),
            "ccx" => Some(2),
            _ => None,
        }
    }

    fn def_index(&self, name: &str) -> Option<usize> {
        self.defs.iter().position(|d| d.name == name)
    }

    /// The gates emitted so far where the next one goes: the subroutine
    /// body being read, or the circuit.
    fn emitted(&self) -> u64 {
        self.body
            .as_ref()
            .map_or(self.gates.len() as u64, |b| b.size)
    }

    /// Emits one gate, its lines argument positions inside a subroutine.
    fn emit(&mut self, g: Gate) {
        match &mut self.body {
            Some(b) => {
                b.calls.push(Call::Gate(g));
                b.size = b.size.saturating_add(1);
            }
            None => self.gates.push(g),
        }
    }

    /// Applies definition `k` to `lines`: a call in the subroutine body
    /// being read, or expanded into the circuit (checked against the gate
    /// budget first).
    fn apply_def(&mut self, k: usize, lines: Vec<u32>) -> Result<(), ReadError> {
        let size = self.defs[k].size;
        self.gate_limit(self.emitted().saturating_add(size))?;
        match &mut self.body {
            Some(b) => {
                b.calls.push(Call::Def(k, lines));
                b.size = b.size.saturating_add(size);
            }
            None => self.expand(k, lines),
        }
        Ok(())
    }

    /// `gate NAME a, b, ... { body }`.
    fn definition(&mut self) -> Result<(), ReadError> {
        let (name, at) = self.ident()?;
        if self.is_sym("(") {
            return Err(self.err(
                self.at(),
                format!("gate '{name}' takes parameters, which oraculum does not read"),
            ));
        }
        if QASM_WORDS.contains(&name.as_str()) || self.def_index(&name).is_some() {
            return Err(self.err(at, format!("gate '{name}' is already defined")));
        }
        let mut args: Vec<String> = Vec::new();
        while !self.is_sym("{") {
            let (a, a_at) = self.ident()?;
            if args.contains(&a) {
                return Err(self.err(a_at, format!("argument '{a}' is named twice")));
            }
            args.push(a);
            if self.is_sym(",") {
                self.i += 1;
            }
        }
        self.expect_sym("{")?;
        let mut body = Vec::new();
        let mut size = 0u64;
        while !self.is_sym("}") {
            if self.peek().is_none() {
                return Err(self.err(at, "this gate body has no closing '}'"));
            }
            let s_at = self.at();
            let pol = self.modifiers()?;
            let (g, g_at) = self.ident()?;
            if g == "barrier" && pol.is_empty() {
                while !self.is_sym(";") {
                    let (a, a_at) = self.ident()?;
                    if !args.contains(&a) {
                        return Err(
                            self.err(a_at, format!("'{a}' is not an argument of gate '{name}'"))
                        );
                    }
                    if self.is_sym(",") {
                        self.i += 1;
                    }
                }
                self.expect_sym(";")?;
                continue;
            }
            let mut ops = Vec::new();
            loop {
                let (a, a_at) = self.ident()?;
                if self.is_sym("[") {
                    return Err(self.err(
                        a_at,
                        "inside a gate body, operands are the gate's arguments, without an index",
                    ));
                }
                let k = args.iter().position(|x| *x == a).ok_or_else(|| {
                    self.err(a_at, format!("'{a}' is not an argument of gate '{name}'"))
                })? as u32;
                if ops.contains(&k) {
                    return Err(self.err(a_at, format!("'{g}' uses argument '{a}' twice")));
                }
                ops.push(k);
                if !self.is_sym(",") {
                    break;
                }
                self.i += 1;
            }
            self.expect_sym(";")?;
            if let Some(base) = Self::base_arity(&g) {
                if ops.len() != pol.len() + base + 1 {
                    return Err(self.err(
                        s_at,
                        format!(
                            "this '{g}' takes {} operand(s), found {}",
                            pol.len() + base + 1,
                            ops.len()
                        ),
                    ));
                }
                let t = *ops.last().expect("at least one");
                let mut controls: Vec<(u32, bool)> = ops[..pol.len()]
                    .iter()
                    .copied()
                    .zip(pol.iter().copied())
                    .collect();
                controls.extend(ops[pol.len()..ops.len() - 1].iter().map(|&o| (o, true)));
                body.push(Call::Flip(controls, t));
                size = size.saturating_add(1);
            } else if let Some(k) = self
                .def_index(&g)
                .filter(|&k| pol.is_empty() && !self.defs[k].subroutine)
            {
                if ops.len() != self.defs[k].arity {
                    return Err(self.err(
                        s_at,
                        format!(
                            "gate '{g}' takes {} qubit(s), found {}",
                            self.defs[k].arity,
                            ops.len()
                        ),
                    ));
                }
                size = size.saturating_add(self.defs[k].size);
                body.push(Call::Def(k, ops));
            } else {
                return Err(self
                    .err(g_at, format!("'{g}' is not read inside a gate definition"))
                    .with_hint_text("a gate body may use x, cx, CX, ccx (with ctrl/negctrl modifiers), barrier and gates defined before it"));
            }
        }
        self.expect_sym("}")?;
        self.defs.push(Def {
            name,
            arity: args.len(),
            body,
            size,
            subroutine: false,
        });
        Ok(())
    }

    /// Applies definition `k` to lines `args`, by an explicit stack.
    fn expand(&mut self, k: usize, args: Vec<u32>) {
        let mut stack: Vec<(usize, Vec<u32>, usize)> = vec![(k, args, 0)];
        while let Some((d, a, pc)) = stack.pop() {
            let Some(call) = self.defs[d].body.get(pc) else {
                continue;
            };
            match call {
                Call::Flip(cs, t) => {
                    let controls = cs
                        .iter()
                        .map(|&(l, p)| Control {
                            line: Line(a[l as usize]),
                            positive: p,
                        })
                        .collect();
                    let g = Gate::new(controls, Line(a[*t as usize]))
                        .expect("distinct arguments, checked in the definition and the call");
                    self.gates.push(g);
                    stack.push((d, a, pc + 1));
                }
                Call::Def(inner, ia) => {
                    let mapped = ia.iter().map(|&x| a[x as usize]).collect();
                    let inner = *inner;
                    stack.push((d, a, pc + 1));
                    stack.push((inner, mapped, 0));
                }
                Call::Gate(g) => {
                    let map = |c: &Control| Control {
                        line: Line(a[c.line.index()]),
                        positive: c.positive,
                    };
                    let t = Line(a[g.target().index()]);
                    let cs = g.controls();
                    let g = if g.is_measured() {
                        Gate::measured(map(&cs[0]), map(&cs[1]), t)
                    } else {
                        Gate::new(cs.iter().map(map).collect(), t)
                    }
                    .expect("distinct arguments, checked in the definition and the call");
                    self.gates.push(g);
                    stack.push((d, a, pc + 1));
                }
            }
        }
    }

    /// After `h t;`: `m = measure t;` (or `bit m = measure t;`) and `if (m) { [x n;] cz a, b; [x n;] x t; }`.
    fn gadget(&mut self, t: u32, h_at: usize) -> Result<bool, ReadError> {
        let save = self.i;
        let mut creg = None;
        match (
            self.toks.get(self.i).map(|x| x.t.clone()),
            self.toks.get(self.i + 1).map(|x| x.t.clone()),
        ) {
            (Some(T::Ident(b)), Some(T::Ident(m)))
                if b == "bit" && self.toks.get(self.i + 2).map(|x| &x.t) == Some(&T::Sym("=")) =>
            {
                let at = self.at();
                self.i += 3;
                self.declare_bit(m.clone(), 1, at)?;
                creg = Some(m);
            }
            (Some(T::Ident(m)), Some(T::Sym("="))) if self.bits.contains_key(&m) => {
                self.i += 2;
                creg = Some(m);
            }
            _ => {}
        }
        let Some(creg) = creg else {
            self.i = save;
            return Ok(false);
        };
        let (w, w_at) = self.ident()?;
        if w != "measure" {
            return Err(self.err(w_at, "expected 'measure'"));
        }
        let (op, op_at) = self.operand()?;
        if op != Operand::One(t) {
            return Err(self.err(
                op_at,
                "the measurement of a measured uncompute is on the qubit of the 'h' before",
            ));
        }
        self.expect_sym(";")?;
        let fail = |r: &Self, at: usize, why: &str| -> ReadError {
            r.src
                .error(at, format!("this is not a measured uncompute: {why}"))
                .with_hint(format!("h t; {creg} = measure t; if ({creg}) {{ x on each negative control; cz a, b; the same x; x t; }}"))
                .into()
        };
        let (w, w_at) = self
            .ident()
            .map_err(|_| fail(self, self.at(), "no 'if' after the measurement"))?;
        if w != "if" {
            return Err(fail(self, w_at, "no 'if' after the measurement"));
        }
        self.expect_sym("(")?;
        let (c, c_at) = self.ident()?;
        if c != creg {
            return Err(fail(
                self,
                c_at,
                "the condition is not the bit just measured",
            ));
        }
        if self.is_sym("==") {
            self.i += 1;
            let at = self.at();
            let ok = match self.peek() {
                Some(T::Num(n)) => n == "1",
                Some(T::Ident(b)) => b == "true",
                _ => false,
            };
            if !ok {
                return Err(fail(self, at, "the condition is not 'bit == 1'"));
            }
            self.i += 1;
        }
        self.expect_sym(")")?;
        self.expect_sym("{")?;
        let mut steps: Vec<(String, Vec<u32>, usize)> = Vec::new();
        while !self.is_sym("}") {
            let (g, g_at) = self.ident()?;
            let ops = self.operands()?;
            self.expect_sym(";")?;
            let ls: Vec<u32> = ops
                .iter()
                .map(|(o, _)| match o {
                    Operand::One(l) => Ok(*l),
                    Operand::All(..) => Err(fail(self, g_at, "a whole-register operand")),
                })
                .collect::<Result<_, _>>()?;
            steps.push((g, ls, g_at));
        }
        self.expect_sym("}")?;
        let n = steps.len();
        let cz = steps.iter().position(|(g, _, _)| g == "cz");
        let Some(cz) = cz.filter(|&k| n == 2 * k + 2) else {
            return Err(fail(
                self,
                h_at,
                "the block is not x on the negative controls, cz, the same x, x on the ancilla",
            ));
        };
        let (a, b) = match steps[cz].1.as_slice() {
            [a, b] if a != b && *a != t && *b != t => (*a, *b),
            _ => {
                return Err(fail(
                    self,
                    steps[cz].2,
                    "cz is on two controls other than the ancilla",
                ))
            }
        };
        let pre: Vec<u32> = steps[..cz]
            .iter()
            .map(|s| s.1.first().copied().unwrap_or(u32::MAX))
            .collect();
        let post: Vec<u32> = steps[cz + 1..n - 1]
            .iter()
            .map(|s| s.1.first().copied().unwrap_or(u32::MAX))
            .collect();
        let all_x = steps
            .iter()
            .enumerate()
            .all(|(k, s)| k == cz || (s.0 == "x" && s.1.len() == 1));
        let last = &steps[n - 1];
        if !all_x
            || pre != post
            || last.1 != [t]
            || pre.iter().any(|p| *p != a && *p != b)
            || (pre.len() == 2 && pre[0] == pre[1])
        {
            return Err(fail(
                self,
                h_at,
                "the block is not x on the negative controls, cz, the same x, x on the ancilla",
            ));
        }
        self.gate_limit(self.emitted() + 1)?;
        let lit = |l: u32| Control {
            line: Line(l),
            positive: !pre.contains(&l),
        };
        self.emit(Gate::measured(lit(a), lit(b), Line(t)).expect("distinct, checked"));
        Ok(true)
    }

    fn declare_bit(&mut self, name: String, size: u32, at: usize) -> Result<(), ReadError> {
        let argument = self.body.as_ref().is_some_and(|b| b.args.contains(&name));
        if argument || self.regs.contains_key(&name) || self.bits.contains_key(&name) {
            return Err(self.err(at, format!("register '{name}' is declared twice")));
        }
        self.bits.insert(name, size);
        Ok(())
    }

    /// `def NAME(qubit a, qubit b, ...) { body }`: a subroutine of the
    /// statements a circuit may hold (flips, calls of earlier gates and
    /// subroutines, measured-uncompute gadgets on local bits), on its qubit
    /// arguments; kept as calls, like a gate, and counted before expansion.
    fn subroutine(&mut self, def_at: usize) -> Result<(), ReadError> {
        if self.body.is_some() {
            return Err(self.err(def_at, "a subroutine is defined at the top level"));
        }
        let (name, at) = self.ident()?;
        if QASM_WORDS.contains(&name.as_str())
            || self.def_index(&name).is_some()
            || self.regs.contains_key(&name)
            || self.bits.contains_key(&name)
        {
            return Err(self.err(at, format!("'{name}' is already defined")));
        }
        self.expect_sym("(")?;
        let mut args: Vec<String> = Vec::new();
        while !self.is_sym(")") {
            let (ty, ty_at) = self.ident()?;
            if ty != "qubit" || self.is_sym("[") {
                return Err(self.err(
                    ty_at,
                    "a subroutine argument is read as one qubit: 'qubit NAME'",
                ));
            }
            let (a, a_at) = self.ident()?;
            if args.contains(&a) {
                return Err(self.err(a_at, format!("argument '{a}' is named twice")));
            }
            args.push(a);
            if !self.is_sym(",") {
                break;
            }
            self.i += 1;
        }
        self.expect_sym(")")?;
        if self.is_sym("->") {
            return Err(self.err(self.at(), "a subroutine that returns a value is not read"));
        }
        self.expect_sym("{")?;
        // The body sees its arguments and its own bits, not the file's.
        let outer_bits = std::mem::take(&mut self.bits);
        self.body = Some(Body {
            name: name.clone(),
            args,
            calls: Vec::new(),
            size: 0,
        });
        let read = self.subroutine_body(at);
        self.bits = outer_bits;
        let body = self.body.take().expect("set above");
        read?;
        self.defs.push(Def {
            name,
            arity: body.args.len(),
            body: body.calls,
            size: body.size,
            subroutine: true,
        });
        Ok(())
    }

    /// The statements of a subroutine, up to its closing `}`.
    fn subroutine_body(&mut self, at: usize) -> Result<(), ReadError> {
        loop {
            let s_at = self.at();
            let word = match self.peek() {
                Some(T::Sym("}")) => {
                    self.i += 1;
                    return Ok(());
                }
                Some(T::Sym(";")) => {
                    self.i += 1;
                    continue;
                }
                Some(T::Ident(w)) => w.clone(),
                None => return Err(self.err(at, "this subroutine body has no closing '}'")),
                Some(_) => return Err(self.err(s_at, "expected a statement")),
            };
            match word.as_str() {
                "bit" => {
                    self.i += 1;
                    let (name, n_at) = self.ident()?;
                    if self.is_sym("=") {
                        return Err(self.err(n_at, "a measurement is read only as part of a measured uncompute, after the 'h' on its ancilla"));
                    }
                    self.expect_sym(";")?;
                    self.declare_bit(name, 1, n_at)?;
                }
                "h" => {
                    self.i += 1;
                    let (op, _) = self.operand()?;
                    self.expect_sym(";")?;
                    let Operand::One(l) = op else {
                        unreachable!("a subroutine's operands are single arguments")
                    };
                    if !self.gadget(l, s_at)? {
                        return Err(self
                            .err(s_at, "inside a subroutine, 'h' is read only as the start of a measured uncompute")
                            .with_hint_text("h t; m = measure t; if (m) { x on each negative control; cz a, b; the same x; x t; }"));
                    }
                }
                "barrier" => {
                    self.i += 1;
                    if !self.is_sym(";") {
                        self.operands()?;
                    }
                    self.expect_sym(";")?;
                }
                "qubit" | "qreg" | "creg" | "gate" | "def" | "include" | "measure" | "reset"
                | "if" | "for" | "while" | "let" | "const" | "input" | "output" | "return" => {
                    return Err(self
                        .err(s_at, format!("'{word}' is not read inside a subroutine"))
                        .with_hint_text("a subroutine body may hold bit declarations, x, cx, CX, ccx (with ctrl/negctrl modifiers), barrier, earlier gates and subroutines, and measured-uncompute gadgets"));
                }
                _ if self.is_call() => self.call()?,
                _ => self.application(s_at)?,
            }
        }
    }

    /// Whether the statement at hand is `NAME(...)` of a subroutine.
    fn is_call(&self) -> bool {
        match (
            self.toks.get(self.i).map(|t| &t.t),
            self.toks.get(self.i + 1).map(|t| &t.t),
        ) {
            (Some(T::Ident(n)), Some(T::Sym("("))) => {
                self.def_index(n).is_some_and(|k| self.defs[k].subroutine)
            }
            _ => false,
        }
    }

    /// `NAME(q, r, ...);`: a call of a subroutine on distinct single qubits.
    fn call(&mut self) -> Result<(), ReadError> {
        let (g, g_at) = self.ident()?;
        let k = self.def_index(&g).expect("checked by is_call");
        self.expect_sym("(")?;
        let ops = if self.is_sym(")") {
            Vec::new()
        } else {
            self.operands()?
        };
        self.expect_sym(")")?;
        self.expect_sym(";")?;
        let lines = self.distinct_qubits(&g, g_at, k, &ops)?;
        self.apply_def(k, lines)
    }

    /// The operands of an application of definition `k`: as many as it
    /// takes, single qubits, none twice.
    fn distinct_qubits(
        &self,
        g: &str,
        g_at: usize,
        k: usize,
        ops: &[(Operand, usize)],
    ) -> Result<Vec<u32>, ReadError> {
        let arity = self.defs[k].arity;
        if ops.len() != arity {
            return Err(self.err(
                g_at,
                format!("'{g}' takes {arity} qubit(s), found {}", ops.len()),
            ));
        }
        let mut lines = Vec::with_capacity(arity);
        for (o, o_at) in ops {
            let Operand::One(l) = o else {
                return Err(self.err(*o_at, format!("'{g}' takes single qubits")));
            };
            if lines.contains(l) {
                return Err(self.err(*o_at, format!("'{g}' uses the same qubit twice")));
            }
            lines.push(*l);
        }
        Ok(lines)
    }

    /// `[ctrl/negctrl modifiers] gate operands;` at the top level.
    fn application(&mut self, at: usize) -> Result<(), ReadError> {
        let pol = self.modifiers()?;
        let (g, g_at) = self.ident()?;
        let ops = self.operands()?;
        self.expect_sym(";")?;
        if let Some(base) = Self::base_arity(&g) {
            let arity = pol.len() + base + 1;
            if ops.len() != arity {
                return Err(self.err(
                    g_at,
                    format!("this '{g}' takes {arity} operand(s), found {}", ops.len()),
                ));
            }
            let sizes: Vec<u32> = ops
                .iter()
                .filter_map(|(o, _)| match o {
                    Operand::All(_, s) => Some(*s),
                    Operand::One(_) => None,
                })
                .collect();
            let reps = sizes.first().copied().unwrap_or(1);
            if sizes.iter().any(|&s| s != reps) {
                return Err(self.err(g_at, "whole-register operands differ in size"));
            }
            self.gate_limit(self.emitted() + reps as u64)?;
            for r in 0..reps {
                let q: Vec<u32> = ops
                    .iter()
                    .map(|(o, _)| match o {
                        Operand::All(first, _) => first + r,
                        Operand::One(l) => *l,
                    })
                    .collect();
                let t = *q.last().expect("arity at least 1");
                let controls = q[..q.len() - 1]
                    .iter()
                    .enumerate()
                    .map(|(k, &l)| Control {
                        line: Line(l),
                        positive: pol.get(k).copied().unwrap_or(true),
                    })
                    .collect();
                let gate = Gate::new(controls, Line(t))
                    .ok_or_else(|| self.err(g_at, format!("'{g}' uses the same qubit twice")))?;
                self.emit(gate);
            }
            return Ok(());
        }
        if self.def_index(&g).is_some_and(|k| self.defs[k].subroutine) {
            return Err(self.err(
                g_at,
                format!("'{g}' is a subroutine: call it as {g}(a, b, ...);"),
            ));
        }
        if let Some(k) = self.def_index(&g).filter(|_| pol.is_empty()) {
            let lines = self.distinct_qubits(&g, g_at, k, &ops)?;
            return self.apply_def(k, lines);
        }
        Err(self
            .err(at, format!("'{g}' is not read by oraculum"))
            .with_hint_text("oraculum reads qubit, bit, x, cx, CX, ccx with ctrl/negctrl modifiers, barrier, gate definitions of those, h around a phase oracle and the measured-uncompute gadget"))
    }

    fn run(&mut self) -> Result<(), ReadError> {
        match (
            self.toks.first().map(|t| &t.t),
            self.toks.get(1).map(|t| &t.t),
        ) {
            (Some(T::Ident(w)), Some(T::Num(v)))
                if w == "OPENQASM" && (v == "3" || v.starts_with("3.")) =>
            {
                self.i = 2;
                self.expect_sym(";")?;
            }
            _ => return Err(self.err(0, "an OpenQASM 3 file starts with 'OPENQASM 3.0;'")),
        }
        while self.i < self.toks.len() {
            let at = self.at();
            let word = match self.peek() {
                Some(T::Ident(w)) => w.clone(),
                Some(T::Sym(";")) => {
                    self.i += 1;
                    continue;
                }
                _ => return Err(self.err(at, "expected a statement")),
            };
            match word.as_str() {
                "include" => {
                    self.i += 1;
                    let s_at = self.at();
                    match self.peek() {
                        Some(T::Str(s)) if s == "stdgates.inc" => self.i += 1,
                        _ => return Err(self.err(s_at, "only \"stdgates.inc\" can be included")),
                    }
                    self.expect_sym(";")?;
                }
                "qubit" | "bit" => {
                    self.i += 1;
                    let mut size = 1;
                    if self.is_sym("[") {
                        self.i += 1;
                        size = self.int()?;
                        self.expect_sym("]")?;
                    }
                    let (name, n_at) = self.ident()?;
                    if word == "bit" && self.is_sym("=") {
                        return Err(self.err(n_at, "a measurement is read only as part of a measured uncompute, after the 'h' on its ancilla"));
                    }
                    self.expect_sym(";")?;
                    if word == "bit" {
                        self.declare_bit(name, size, n_at)?;
                    } else {
                        self.declare(name, size, n_at)?;
                    }
                }
                "qreg" | "creg" => {
                    self.i += 1;
                    let (name, n_at) = self.ident()?;
                    self.expect_sym("[")?;
                    let size = self.int()?;
                    self.expect_sym("]")?;
                    self.expect_sym(";")?;
                    if word == "creg" {
                        self.declare_bit(name, size, n_at)?;
                    } else {
                        self.declare(name, size, n_at)?;
                    }
                }
                "gate" => {
                    self.i += 1;
                    self.definition()?;
                }
                "def" => {
                    self.i += 1;
                    self.subroutine(at)?;
                }
                "barrier" => {
                    self.i += 1;
                    if !self.is_sym(";") {
                        self.operands()?;
                    }
                    self.expect_sym(";")?;
                }
                "h" => {
                    self.i += 1;
                    let ops = self.operands()?;
                    self.expect_sym(";")?;
                    let [(Operand::One(l), _)] = ops.as_slice() else {
                        return Err(self.err(at, "'h' is read on one qubit"));
                    };
                    let l = *l;
                    if !self.gadget(l, at)? {
                        self.hadamards.push((self.gates.len(), l, at));
                    }
                }
                "measure" | "reset" | "if" | "for" | "while" | "let" | "const" | "input"
                | "output" => {
                    return Err(self
                        .err(at, format!("'{word}' is not read: oraculum proves circuits of x, cx and ccx gates (and the measured-uncompute gadget after an 'h')"))
                        .with_hint_text("measure after the oracle, in the circuit that uses it"));
                }
                _ if self.is_call() => self.call()?,
                _ => self.application(at)?,
            }
        }
        Ok(())
    }
}

trait HintText {
    fn with_hint_text(self, hint: &str) -> ReadError;
}

impl HintText for ReadError {
    fn with_hint_text(self, hint: &str) -> ReadError {
        match self {
            ReadError::Malformed(e) => ReadError::Malformed(e.with_hint(hint)),
            e => e,
        }
    }
}

/// Reads an OpenQASM 3 file of the subset above into a circuit, within
/// `limits` (whole-register statements and gate applications are counted
/// before they are expanded).
pub fn read_qasm3_with(path: &str, text: &str, limits: &ReadLimits) -> Result<Circuit, ReadError> {
    let src = Source { path, text };
    let toks = tokenize(&src)?;
    let mut r = Reader {
        src: &src,
        path,
        toks,
        i: 0,
        limits: *limits,
        regs: HashMap::new(),
        bits: HashMap::new(),
        lines: Vec::new(),
        gates: Vec::new(),
        defs: Vec::new(),
        hadamards: Vec::new(),
        body: None,
    };
    r.run()?;
    let mut gates = std::mem::take(&mut r.gates);
    let mut phase = None;
    if let Some(&(_, _, at)) = r.hadamards.first() {
        let wrapped = match r.hadamards.as_slice() {
            [(1, q, _), (k, q2, _)] => {
                q == q2
                    && *k + 1 == gates.len()
                    && gates[0] == Gate::not(*q)
                    && gates[gates.len() - 1] == Gate::not(*q)
            }
            _ => false,
        };
        if !wrapped {
            return Err(ReadError::Malformed(
                src.error(at, "'h' is read only as the wrapper of a phase oracle")
                    .with_hint(
                        "x q; h q; at the start and h q; x q; at the end, on the same qubit",
                    ),
            ));
        }
        phase = Some(Line(r.hadamards[0].1));
        gates = gates[1..gates.len() - 1].to_vec();
    }
    let mut c = Circuit::from_parts(std::mem::take(&mut r.lines), gates)
        .expect("operands were resolved against declared registers");
    c.set_phase(phase);
    if c.measured_count() > 0 {
        crate::circuit::measure::mark_temporary_ands(&mut c);
    }
    Ok(c)
}

/// Reads an OpenQASM 2 or 3 file, by its version statement (an OpenQASM 2
/// file marked as the Clifford+T form by that form's reader).
pub fn read_circuit_with(
    path: &str,
    text: &str,
    limits: &ReadLimits,
) -> Result<Circuit, ReadError> {
    if is_qasm3(text) {
        read_qasm3_with(path, text, limits)
    } else if super::is_clifford_t(text) {
        super::read_clifford_t_with(path, text, limits)
    } else {
        super::qasm2::read_qasm_with(path, text, limits)
    }
}

/// Whether the text's first statement is `OPENQASM 3...` (comments skipped).
pub fn is_qasm3(text: &str) -> bool {
    let mut rest = text;
    loop {
        rest = rest.trim_start();
        if let Some(r) = rest.strip_prefix("//") {
            rest = r.split_once('\n').map_or("", |(_, b)| b);
        } else if let Some(r) = rest.strip_prefix("/*") {
            rest = r.split_once("*/").map_or("", |(_, b)| b);
        } else {
            break;
        }
    }
    rest.strip_prefix("OPENQASM")
        .is_some_and(|r| r.trim_start().starts_with('3'))
}
