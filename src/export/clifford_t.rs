//! Clifford+T form (`synth --format clifford-t`): OpenQASM 2 with only `h`,
//! `s`, `sdg`, `t`, `tdg`, `x`, `cx`, `cz`, `measure` and `if`, from a
//! lowered circuit.
//!
//! - A Toffoli (negative controls conjugated by `x`) is `h` on the target
//!   around a doubly controlled Z written as its phase polynomial: `t` on
//!   `a`, `b`, `c` and `a^b^c`, `tdg` on `a^b`, `b^c`, `a^c`, the parities made
//!   by CNOTs between three layers of T gates: 7 T, T-depth 3 (Amy, Maslov,
//!   Mosca, Roetteler, "A meet-in-the-middle algorithm for fast synthesis of
//!   depth-optimal quantum circuits", IEEE TCAD 32, 2013, Fig. 13).
//! - A temporary AND into a clean target `t` (Jones, PRA 87, 022328, 2013,
//!   Fig. 1; Gidney, Quantum 2, 74, 2018, Fig. 3): `h t; t t;` makes
//!   `T|+>`, CNOTs `a->t`, `b->t`, `t->a`, `t->b`, then `tdg a; tdg b; t t;`
//!   in one layer, the two CNOTs `t->a`, `t->b` again, `h t; s t;` (the `s`
//!   undoes the phase `i^(-ab)` left on the result): 4 T, T-depth 2.
//! - A measured uncompute is the gadget [`super::write_qasm`] writes (no T).
//!
//! `export::read_clifford_t_with` reads exactly these sequences back (so
//! `verify` proves such a file from disk); their meaning is checked by a
//! state-vector simulator in the tests.

use super::qasm2::{write_qasm, QasmHeader, WriteError};
use crate::circuit::{Circuit, Line};
use std::fmt::Write as _;

/// The comment line that marks a file in this form.
pub const CLIFFORD_T_MARK: &str = "// format: clifford+t";

/// Whether `text` is a file written in Clifford+T form.
pub fn is_clifford_t(text: &str) -> bool {
    text.lines().any(|l| l.starts_with(CLIFFORD_T_MARK))
}

/// Writes the lowered circuit `c` in Clifford+T form.
pub fn write_clifford_t(c: &Circuit, header: &QasmHeader) -> Result<String, WriteError> {
    // The header, line map and declarations are those of the plain form.
    let mut plain = c.without_gates();
    plain.set_phase(None);
    let head = write_qasm(&plain, header)?;
    let mut s = String::new();
    for line in head.lines() {
        s.push_str(line);
        s.push('\n');
        if line.starts_with("include ") {
            s.push_str(CLIFFORD_T_MARK);
            s.push_str(
                " (h, s, t, tdg, x, cx, cz, measure, if; read back by verify, cost and draw)\n",
            );
            if let Some(cost) = &header.cost {
                let _ = writeln!(
                    s,
                    "// t-count {}, t-depth {} (7 T and 3 T layers per Toffoli, 4 T and 2 layers per temporary AND)",
                    cost.t_count, cost.t_depth
                );
            }
        }
    }
    let taken = |n: &str| c.registers().iter().any(|(r, _)| r == n);
    let creg = std::iter::once("m".to_string())
        .chain((1..).map(|i| format!("m{i}")))
        .find(|n| !taken(n))
        .expect("some name is free");
    if c.measured_count() > 0 {
        let _ = writeln!(s, "creg {creg}[1];");
    }
    let q = |l: Line| {
        let info = &c.lines()[l.index()];
        format!("{}[{}]", info.register, info.index)
    };
    if let Some(p) = c.phase() {
        let _ = writeln!(s, "x {};\nh {};", q(p), q(p));
    }
    let mut b = String::new();
    for (k, g) in c.gates().iter().enumerate() {
        let cs = g.controls();
        if cs.len() > 2 {
            return Err(WriteError::NotLowered(k));
        }
        let t = q(g.target());
        let neg: Vec<String> = cs
            .iter()
            .filter(|c| !c.positive)
            .map(|c| q(c.line))
            .collect();
        if g.is_measured() {
            let _ = writeln!(b, "h {t};\nmeasure {t} -> {creg}[0];");
            for n in &neg {
                let _ = writeln!(b, "if({creg}==1) x {n};");
            }
            let _ = writeln!(b, "if({creg}==1) cz {},{};", q(cs[0].line), q(cs[1].line));
            for n in &neg {
                let _ = writeln!(b, "if({creg}==1) x {n};");
            }
            let _ = writeln!(b, "if({creg}==1) x {t};");
            continue;
        }
        for n in &neg {
            let _ = writeln!(b, "x {n};");
        }
        match cs {
            [] => {
                let _ = writeln!(b, "x {t};");
            }
            [c0] => {
                let _ = writeln!(b, "cx {},{t};", q(c0.line));
            }
            [c0, c1] if g.is_temporary_and() => and_gates(&mut b, &q(c0.line), &q(c1.line), &t),
            [c0, c1] => toffoli_gates(&mut b, &q(c0.line), &q(c1.line), &t),
            _ => unreachable!("at most two controls"),
        }
        for n in &neg {
            let _ = writeln!(b, "x {n};");
        }
    }
    s.push_str(&b);
    if let Some(p) = c.phase() {
        let _ = writeln!(s, "h {};\nx {};", q(p), q(p));
    }
    Ok(s)
}

/// `h c`, the doubly controlled Z of T-depth 3, `h c`.
fn toffoli_gates(b: &mut String, a: &str, bb: &str, c: &str) {
    let _ = write!(
        b,
        "h {c};\n\
         t {a};\nt {bb};\nt {c};\n\
         cx {a},{bb};\ncx {bb},{c};\ncx {c},{a};\n\
         tdg {a};\ntdg {bb};\nt {c};\n\
         cx {bb},{a};\n\
         tdg {a};\n\
         cx {bb},{a};\ncx {c},{a};\ncx {bb},{c};\ncx {a},{bb};\n\
         h {c};\n"
    );
}

/// The 4-T temporary AND of `a` and `b` into the clean `t`.
fn and_gates(b: &mut String, a: &str, bb: &str, t: &str) {
    let _ = write!(
        b,
        "h {t};\nt {t};\n\
         cx {a},{t};\ncx {bb},{t};\ncx {t},{a};\ncx {t},{bb};\n\
         tdg {a};\ntdg {bb};\nt {t};\n\
         cx {t},{a};\ncx {t},{bb};\n\
         h {t};\ns {t};\n"
    );
}
