//! OpenQASM 3 (Cross et al., "OpenQASM 3: a broader and deeper quantum
//! assembly language", ACM TQC 2022) writer: `qubit[n]` registers over
//! `stdgates.inc`, the gate form as a `gate` (or, when the circuit holds
//! measured uncomputes, as a subroutine `def NAME(qubit a, ...)` with a
//! local `bit`: a gate body is unitary), the measured uncompute as a
//! `measure` and an `if` block, and, with `keep_mct`, unlowered
//! multi-controlled NOTs as `ctrl(k) @ x` with `negctrl` for controls on 0.
//!
//! OpenQASM 3 keeps one namespace for gates, registers and keywords, so a
//! register whose name the language or `stdgates.inc` takes (`x`, `y`,
//! `ctrl`, ...) is written with a trailing `_` (`x_`, `y_`, `ctrl_`); the
//! reader ([`super::read_qasm3`]) reads such a name back as the stem.

use super::qasm2::{
    check_register, creg_name, header_comments, line_comments, QasmHeader, WriteError,
};
use crate::circuit::layout::QASM_WORDS;
use crate::circuit::{Circuit, Gate, Line};
use std::fmt::Write as _;

/// How the OpenQASM 3 writer shapes the circuit.
#[derive(Clone, Debug, Default)]
pub struct Qasm3Options {
    /// Write the circuit as `gate NAME ...` and one application of it.
    pub gate: Option<String>,
    /// The circuit holds unlowered gates: write them as `ctrl(k) @ x`.
    pub keep_mct: bool,
}

/// The name register `name` has in an OpenQASM 3 file.
pub fn qasm3_register_name(name: &str) -> String {
    if QASM_WORDS.contains(&name) {
        format!("{name}_")
    } else {
        name.to_string()
    }
}

/// Writes `c` as OpenQASM 3 (see the module's comment). Without
/// `keep_mct` the circuit must be lowered (at most two positive controls
/// per flip).
pub fn write_qasm3(
    c: &Circuit,
    header: &QasmHeader,
    opts: &Qasm3Options,
) -> Result<String, WriteError> {
    let regs: Vec<(String, usize)> = c
        .registers()
        .into_iter()
        .map(|(n, s)| (qasm3_register_name(&n), s))
        .collect();
    for (name, _) in &regs {
        check_register(name)?;
    }
    if let Some(g) = &opts.gate {
        if !super::gatedef::valid_gate_name(g) || regs.iter().any(|(r, _)| r == g) {
            return Err(WriteError::BadGateName(g.clone()));
        }
    }
    // A `gate` body is unitary: a circuit with measured uncomputes is written
    // as a subroutine (`def`), which may measure and branch on a local bit.
    let subroutine = opts.gate.is_some() && c.measured_count() > 0;
    let mut s = String::from("OPENQASM 3.0;\ninclude \"stdgates.inc\";\n");
    header_comments(&mut s, header);
    if header.cost.is_some() && opts.keep_mct {
        s.push_str("// the gates below are not lowered (ctrl(k) @ x); the cost is of the lowered circuit\n");
    }
    s.push_str(
        "// registers whose names OpenQASM 3 reserves carry a trailing '_' (x_, y_, ctrl_)\n",
    );
    let q = |l: Line| {
        let info = &c.lines()[l.index()];
        format!("{}[{}]", qasm3_register_name(&info.register), info.index)
    };
    line_comments(&mut s, c, &qasm3_register_name);
    let args = super::gatedef::argument_names(c);
    let name = |l: Line| match &opts.gate {
        Some(_) => args[l.index()].clone(),
        None => q(l),
    };
    let indent = if opts.gate.is_some() { "  " } else { "" };
    let mut body = String::new();
    let creg = creg_name(&regs);
    if subroutine {
        let _ = writeln!(body, "{indent}bit {creg};");
    }
    for (k, g) in c.gates().iter().enumerate() {
        write_gate(&mut body, g, k, &name, indent, &creg, opts.keep_mct)?;
    }
    if let (Some(g), true) = (&opts.gate, subroutine) {
        let params: Vec<String> = args.iter().map(|a| format!("qubit {a}")).collect();
        let _ = writeln!(
            s,
            "// def {g}: argument k is line k above; the ancillae are arguments that enter at |0> and leave at |0>; a subroutine, not a gate, because its measured uncomputes measure into the local bit {creg}\ndef {g}({}) {{\n{body}}}",
            params.join(", ")
        );
        let all: Vec<String> = (0..c.width() as u32).map(|k| q(Line(k))).collect();
        body = format!("{g}({});\n", all.join(", "));
    } else if let Some(g) = &opts.gate {
        let _ = writeln!(
            s,
            "// gate {g}: argument k is line k above; the ancillae are arguments (a gate body cannot allocate) that enter at |0> and leave at |0>\ngate {g} {} {{\n{body}}}",
            args.join(", ")
        );
        let all: Vec<String> = (0..c.width() as u32).map(|k| q(Line(k))).collect();
        body = format!("{g} {};\n", all.join(", "));
    }
    for (name, size) in &regs {
        let _ = writeln!(s, "qubit[{size}] {name};");
    }
    if c.measured_count() > 0 && !subroutine {
        let _ = writeln!(s, "bit {creg};");
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

/// One gate as OpenQASM 3 statements.
fn write_gate(
    out: &mut String,
    g: &Gate,
    k: usize,
    name: &dyn Fn(Line) -> String,
    indent: &str,
    creg: &str,
    keep_mct: bool,
) -> Result<(), WriteError> {
    let cs = g.controls();
    let negatives: Vec<String> = cs
        .iter()
        .filter(|c| !c.positive)
        .map(|c| name(c.line))
        .collect();
    let t = name(g.target());
    if g.is_measured() {
        // The gadget of Jones (PRA 87, 022328, 2013, Fig. 3) and Gidney
        // (Quantum 2, 74, 2018, Fig. 3), as in the OpenQASM 2 writer.
        let _ = writeln!(out, "{indent}h {t};\n{indent}{creg} = measure {t};");
        let mut block = String::new();
        for n in &negatives {
            let _ = write!(block, " x {n};");
        }
        let _ = write!(block, " cz {}, {};", name(cs[0].line), name(cs[1].line));
        for n in &negatives {
            let _ = write!(block, " x {n};");
        }
        let _ = writeln!(out, "{indent}if ({creg}) {{{block} x {t}; }}");
        return Ok(());
    }
    if g.is_temporary_and() || (!keep_mct && cs.len() <= 2) {
        if !g.is_temporary_and() && !negatives.is_empty() {
            return Err(WriteError::NotLowered(k));
        }
        for n in &negatives {
            let _ = writeln!(out, "{indent}x {n};");
        }
        let ctl: Vec<String> = cs.iter().map(|c| name(c.line)).collect();
        let _ = match ctl.len() {
            0 => writeln!(out, "{indent}x {t};"),
            1 => writeln!(out, "{indent}cx {}, {t};", ctl[0]),
            _ => writeln!(out, "{indent}ccx {}, {}, {t};", ctl[0], ctl[1]),
        };
        for n in &negatives {
            let _ = writeln!(out, "{indent}x {n};");
        }
        return Ok(());
    }
    if !keep_mct {
        return Err(WriteError::NotLowered(k));
    }
    let pos: Vec<String> = cs
        .iter()
        .filter(|c| c.positive)
        .map(|c| name(c.line))
        .collect();
    let mut ops: Vec<String> = pos.clone();
    ops.extend(negatives.iter().cloned());
    ops.push(t);
    let modifier = |word: &str, n: usize| match n {
        0 => String::new(),
        1 => format!("{word} @ "),
        n => format!("{word}({n}) @ "),
    };
    let stmt = match (pos.len(), negatives.len()) {
        (0, 0) => format!("x {}", ops.join(", ")),
        (1, 0) => format!("cx {}", ops.join(", ")),
        (2, 0) => format!("ccx {}", ops.join(", ")),
        (p, n) => format!(
            "{}{}x {}",
            modifier("ctrl", p),
            modifier("negctrl", n),
            ops.join(", ")
        ),
    };
    let _ = writeln!(out, "{indent}{stmt};");
    Ok(())
}

impl crate::pipeline::Outcome {
    /// The circuit as OpenQASM 3: the lowered circuit, or with `keep_mct`
    /// the circuit before lowering (on the phase line of the lowered one).
    pub fn qasm3(&self, opts: &Qasm3Options) -> Result<String, WriteError> {
        let header = QasmHeader {
            name: self.name.clone(),
            method: Some(self.method.name().to_string()),
            cost: Some(self.cost.clone()),
            inverse: self.inverse,
        };
        if opts.keep_mct {
            let mut mct = self.mct.clone();
            let phase = self.lowered.phase().map(|p| {
                let info = &self.lowered.lines()[p.index()];
                mct.lines()
                    .iter()
                    .position(|l| l.register == info.register && l.index == info.index)
                    .map(|i| Line(i as u32))
                    .expect("the phase line is a register line of both")
            });
            mct.set_phase(phase);
            return write_qasm3(&mct, &header, opts);
        }
        write_qasm3(&self.lowered, &header, opts)
    }
}
