//! The cost report every circuit gets: qubits, gate counts, depth, Toffoli depth, T-count.

use super::Circuit;
use serde::Serialize;
use std::collections::BTreeMap;
use std::fmt;

/// T gates in one Toffoli with the 7-T decomposition (Amy, Maslov, Mosca, Roetteler 2013).
pub const T_PER_TOFFOLI: usize = 7;

/// T gates in one temporary AND (an AND computed into a clean ancilla and
/// later uncomputed by measurement): Jones, PRA 87, 022328 (2013), Fig. 1;
/// Gidney, Quantum 2, 74 (2018), Fig. 3. The measured uncompute costs none.
pub const T_PER_TEMPORARY_AND: usize = 4;

/// T layers of one Toffoli in the Clifford+T form: 3 (Amy, Maslov, Mosca,
/// Roetteler, IEEE TCAD 32, 2013, Fig. 13).
pub const T_DEPTH_PER_TOFFOLI: usize = 3;

/// T layers of one temporary AND alone in the Clifford+T form: 2 (the T
/// that makes `T|+>` on the target, then one layer of three; Gidney 2018,
/// Fig. 3). The first overlaps earlier layers on the controls.
pub const T_DEPTH_PER_TEMPORARY_AND: usize = 2;

/// How ANDs computed into clean ancillae are uncomputed: by a second
/// Toffoli (`toffoli`, pure NOT/CNOT/Toffoli output) or by measurement
/// (`measure`: a temporary AND and a measured uncompute, Jones 2013 and
/// Gidney 2018).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Uncompute {
    /// Every uncompute is a Toffoli.
    #[default]
    Toffoli,
    /// Every provable uncompute of an AND is a measurement.
    Measure,
}

impl Uncompute {
    /// The mode's name, as `--uncompute` takes it.
    pub fn name(self) -> &'static str {
        match self {
            Uncompute::Toffoli => "toffoli",
            Uncompute::Measure => "measure",
        }
    }

    /// The mode named `name`.
    pub fn from_name(name: &str) -> Option<Uncompute> {
        match name {
            "toffoli" => Some(Uncompute::Toffoli),
            "measure" => Some(Uncompute::Measure),
            _ => None,
        }
    }
}

/// Cost of a circuit before and after lowering, as design.md defines it.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Cost {
    /// How uncomputes are made: `measure` when the circuit has a measured
    /// uncompute or a temporary AND (or was built in that mode), else `toffoli`.
    pub mode: Uncompute,
    /// All lines of the lowered circuit, ancillae included.
    pub qubits: usize,
    /// Gates before lowering, keyed by number of controls.
    pub mct: BTreeMap<usize, usize>,
    /// Two-control flips (Toffoli gates) after lowering.
    pub toffoli: usize,
    /// Temporary ANDs: ANDs computed into a clean ancilla and later
    /// uncomputed by measurement (4 T each).
    pub temporary_and: usize,
    /// Measured uncomputes (no T gate, no Toffoli).
    pub measured: usize,
    /// Toffolis plus temporary ANDs: the non-Clifford gates, each one
    /// Toffoli-like.
    pub toffoli_equivalent: usize,
    /// One-control gates after lowering.
    pub cnot: usize,
    /// Zero-control gates after lowering.
    pub not: usize,
    /// Layers after lowering; gates on disjoint lines share a layer.
    pub depth: usize,
    /// Layers counting only Toffoli gates.
    pub toffoli_depth: usize,
    /// 7 per Toffoli, 4 per temporary AND.
    pub t_count: usize,
    /// T-depth of the Clifford+T form: 3 T layers per Toffoli, 2 per
    /// temporary AND (the first on its fresh target alone), none for Clifford
    /// gates and measured uncomputes, in the order of the gates on each line.
    pub t_depth: usize,
}

impl Cost {
    /// Measures a circuit: `mct` from `before`, everything else from `lowered`.
    ///
    /// Gates of `lowered` with three or more controls (there are none after
    /// [`crate::lower()`]) count in none of `toffoli`, `cnot` and `not`.
    pub fn measure(before: &Circuit, lowered: &Circuit) -> Cost {
        let mut mct = BTreeMap::new();
        for g in before.gates() {
            *mct.entry(g.controls().len()).or_insert(0) += 1;
        }
        let count = |k: usize| {
            lowered
                .gates()
                .iter()
                .filter(|g| g.is_flip() && g.controls().len() == k)
                .count()
        };
        let toffoli = count(2);
        let temporary_and = lowered
            .gates()
            .iter()
            .filter(|g| g.is_temporary_and())
            .count();
        let (depth, toffoli_depth) = depths(lowered);
        let t_depth = t_depth(lowered);
        let mode = if lowered.special_count() > 0 {
            Uncompute::Measure
        } else {
            Uncompute::Toffoli
        };
        Cost {
            mode,
            qubits: lowered.width(),
            mct,
            toffoli,
            temporary_and,
            measured: lowered.measured_count(),
            toffoli_equivalent: toffoli + temporary_and,
            cnot: count(1),
            not: count(0),
            depth,
            toffoli_depth,
            t_count: toffoli * T_PER_TOFFOLI + temporary_and * T_PER_TEMPORARY_AND,
            t_depth,
        }
    }

    /// Gates before lowering, in all.
    pub fn mct_total(&self) -> usize {
        self.mct.values().sum()
    }
}

/// The T-depth of the Clifford+T form (`export::clifford_t`), layer by layer
/// as that form places its T gates: each line keeps the number of T layers
/// before it, a CNOT or CZ passes the larger of its two lines on, a Toffoli
/// ends all three lines at their largest plus [`T_DEPTH_PER_TOFFOLI`]; a
/// temporary AND makes its first T on the fresh target (its level plus 1),
/// then one layer on all three lines: `max(a, b, t + 1) + 1`; a measured
/// uncompute (no T) joins its two controls by its CZ.
fn t_depth(c: &Circuit) -> usize {
    let mut level = vec![0usize; c.width()];
    let mut depth = 0;
    for g in c.gates() {
        let t = g.target().index();
        let cs: Vec<usize> = g.controls().iter().map(|x| x.line.index()).collect();
        let top = cs.iter().map(|&i| level[i]).max().unwrap_or(0);
        match (g.kind(), cs.len()) {
            (crate::circuit::Kind::Measured, _) => {
                for &i in &cs {
                    level[i] = top;
                }
            }
            (crate::circuit::Kind::And, _) => {
                let l = top.max(level[t] + 1) + (T_DEPTH_PER_TEMPORARY_AND - 1);
                for &i in &cs {
                    level[i] = l;
                }
                level[t] = l;
            }
            (_, 2) => {
                let l = top.max(level[t]) + T_DEPTH_PER_TOFFOLI;
                for &i in &cs {
                    level[i] = l;
                }
                level[t] = l;
            }
            (_, 1) => {
                let l = top.max(level[t]);
                level[cs[0]] = l;
                level[t] = l;
            }
            _ => {}
        }
        depth = depth.max(level[t]).max(top);
    }
    depth
}

/// Greedy layering: each gate goes one layer after the latest gate on any of
/// its lines; Toffolis and temporary ANDs count in the Toffoli depth.
fn depths(c: &Circuit) -> (usize, usize) {
    let mut level = vec![0usize; c.width()];
    let mut tlevel = vec![0usize; c.width()];
    let (mut depth, mut tdepth) = (0, 0);
    for g in c.gates() {
        let lines = g
            .controls()
            .iter()
            .map(|x| x.line.index())
            .chain(std::iter::once(g.target().index()));
        let (mut l, mut t) = (0, 0);
        for i in lines.clone() {
            l = l.max(level[i]);
            t = t.max(tlevel[i]);
        }
        l += 1;
        if g.controls().len() == 2 && !g.is_measured() {
            t += 1;
        }
        for i in lines {
            level[i] = l;
            tlevel[i] = t;
        }
        depth = depth.max(l);
        tdepth = tdepth.max(t);
    }
    (depth, tdepth)
}

impl fmt::Display for Cost {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mct: Vec<String> = self.mct.iter().map(|(k, n)| format!("{n}x{k}")).collect();
        writeln!(
            f,
            "  qubits {:<6} toffoli {:<7} cnot {:<7} not {:<6}",
            self.qubits, self.toffoli, self.cnot, self.not
        )?;
        writeln!(
            f,
            "  depth {:<7} toffoli depth {:<5} t-count {:<7} t-depth {}",
            self.depth, self.toffoli_depth, self.t_count, self.t_depth
        )?;
        if self.temporary_and + self.measured > 0 || self.mode == Uncompute::Measure {
            writeln!(
                f,
                "  uncompute {} temporary and {:<5} measured {:<6} toffoli-equivalent {}",
                self.mode.name(),
                self.temporary_and,
                self.measured,
                self.toffoli_equivalent
            )?;
        }
        write!(
            f,
            "  before lowering: {} gates (count x controls: {})",
            self.mct_total(),
            if mct.is_empty() {
                "none".to_string()
            } else {
                mct.join(", ")
            }
        )
    }
}
