//! Lines, multi-controlled Toffoli (MCT) gates with mixed-polarity controls, and circuits.

mod cost;
pub mod layout;
pub mod measure;
pub mod rewrite;

pub use cost::{Cost, Uncompute};

use serde::Serialize;
use smallvec::SmallVec;
use std::fmt;

/// Index of a line (qubit) in a [`Circuit`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub struct Line(pub u32);

impl Line {
    /// The index as a `usize`, for slicing.
    pub fn index(self) -> usize {
        self.0 as usize
    }
}

/// What a line is for; the verifier never reads this, it binds lines by register name.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Role {
    /// Read but left unchanged (`x` of an oracle).
    Input,
    /// Receives `y XOR f(x)`.
    Output,
    /// Transformed in place (a permutation's lines, the sum register of an adder).
    Data,
    /// Starts at 0 and must end at 0.
    Ancilla,
}

/// One line of a circuit: the register it belongs to, its index there, its role and a label.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct LineInfo {
    /// Register name as written to OpenQASM (`x`, `y`, `anc`, `a`, ...).
    pub register: String,
    /// Index inside the register.
    pub index: u32,
    /// What the line is for.
    pub role: Role,
    /// Human label, usually the spec's variable name.
    pub label: String,
}

/// A control of a gate: the gate fires only if `line` has the value `positive`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub struct Control {
    /// The controlling line.
    pub line: Line,
    /// `true` fires on 1, `false` fires on 0.
    pub positive: bool,
}

impl Control {
    /// A control that fires on 1.
    pub fn pos(line: u32) -> Self {
        Control {
            line: Line(line),
            positive: true,
        }
    }
    /// A control that fires on 0.
    pub fn neg(line: u32) -> Self {
        Control {
            line: Line(line),
            positive: false,
        }
    }
}

/// What a gate does to its target.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Kind {
    /// Flips the target when every control holds (a multi-controlled NOT).
    #[default]
    Flip,
    /// Uncompute by measurement: the target is an ancilla that must hold the
    /// AND of the gate's two control literals at this point; it is measured
    /// in the X basis, the phase the outcome 1 leaves is undone by a
    /// classically controlled CZ on the controls, and the ancilla is reset to
    /// 0 (Jones, PRA 87, 022328, 2013; Gidney, Quantum 2, 74, 2018). No T
    /// gate and no Toffoli. Classically: requires `target == AND`, leaves
    /// `target = 0`; where the requirement holds it acts as a Toffoli, and
    /// its inverse is computing the AND into a clean ancilla (a Toffoli).
    Measured,
    /// A temporary AND: the target is an ancilla that must be 0 at this
    /// point and receives the AND of the gate's two control literals; the
    /// inverse of [`Kind::Measured`]. It acts as a Toffoli where its
    /// requirement holds, and a clean target lets it be built with 4 T gates
    /// instead of 7 (Jones 2013, Fig. 1; Gidney 2018, Fig. 3).
    And,
}

/// A multi-controlled NOT: flips `target` when every control holds; or, of
/// [`Kind::Measured`], the measured uncompute of an AND of two literals.
///
/// Controls are kept sorted by line and never include the target, so two gates
/// that act alike compare equal.
#[derive(Clone, Debug, PartialEq, Eq, Hash, Serialize)]
pub struct Gate {
    // Up to three controls inline (every gate after lowering has at most
    // two): a gate is 40 bytes and most need no allocation of their own.
    controls: SmallVec<[Control; 3]>,
    target: Line,
    #[serde(skip_serializing_if = "is_flip")]
    kind: Kind,
}

fn is_flip(k: &Kind) -> bool {
    *k == Kind::Flip
}

impl Gate {
    /// Builds a gate; controls are sorted. Returns `None` when a control is on the
    /// target line or one line is used twice as a control.
    pub fn new(controls: Vec<Control>, target: Line) -> Option<Self> {
        let mut controls: SmallVec<[Control; 3]> = SmallVec::from_vec(controls);
        controls.sort();
        let clash = controls.iter().any(|c| c.line == target)
            || controls.windows(2).any(|w| w[0].line == w[1].line);
        (!clash).then_some(Gate {
            controls,
            target,
            kind: Kind::Flip,
        })
    }

    /// The measured uncompute ([`Kind::Measured`]) of the AND of literals `a`
    /// and `b` held by the ancilla `target`. `None` when the three lines are
    /// not distinct.
    pub fn measured(a: Control, b: Control, target: Line) -> Option<Self> {
        let mut g = Gate::new(vec![a, b], target)?;
        g.kind = Kind::Measured;
        Some(g)
    }

    /// The temporary AND ([`Kind::And`]) of literals `a` and `b` into the
    /// clean ancilla `target`. `None` when the three lines are not distinct.
    pub fn temporary_and(a: Control, b: Control, target: Line) -> Option<Self> {
        let mut g = Gate::new(vec![a, b], target)?;
        g.kind = Kind::And;
        Some(g)
    }

    /// Whether the gate is a temporary AND.
    pub fn is_temporary_and(&self) -> bool {
        self.kind == Kind::And
    }

    /// Whether the gate is a plain flip (NOT, CNOT, Toffoli, MCT).
    pub fn is_flip(&self) -> bool {
        self.kind == Kind::Flip
    }

    /// What the gate does to its target.
    pub fn kind(&self) -> Kind {
        self.kind
    }

    /// Whether the gate is a measured uncompute.
    pub fn is_measured(&self) -> bool {
        self.kind == Kind::Measured
    }

    /// The same controls and target as a flip (a measured uncompute becomes
    /// the Toffoli that acts alike where its requirement holds).
    pub fn as_flip(&self) -> Gate {
        Gate {
            kind: Kind::Flip,
            ..self.clone()
        }
    }

    /// The inverse gate: a flip is its own inverse; a measured uncompute and
    /// a temporary AND are each other's.
    pub fn inverse(&self) -> Gate {
        Gate {
            kind: match self.kind {
                Kind::Flip => Kind::Flip,
                Kind::Measured => Kind::And,
                Kind::And => Kind::Measured,
            },
            ..self.clone()
        }
    }

    /// A NOT gate.
    pub fn not(target: u32) -> Self {
        Gate {
            controls: SmallVec::new(),
            target: Line(target),
            kind: Kind::Flip,
        }
    }

    /// A CNOT gate with a positive control.
    pub fn cnot(control: u32, target: u32) -> Self {
        Gate::new(vec![Control::pos(control)], Line(target)).expect("control differs from target")
    }

    /// A Toffoli gate with two positive controls.
    pub fn toffoli(a: u32, b: u32, target: u32) -> Self {
        Gate::new(vec![Control::pos(a), Control::pos(b)], Line(target))
            .expect("distinct lines in a Toffoli")
    }

    /// The controls, sorted by line.
    pub fn controls(&self) -> &[Control] {
        &self.controls
    }

    /// The target line.
    pub fn target(&self) -> Line {
        self.target
    }

    /// Whether `line` is a control of this gate.
    pub fn has_control(&self, line: Line) -> bool {
        self.controls.iter().any(|c| c.line == line)
    }

    /// Whether the gate touches `line` as control or target.
    pub fn touches(&self, line: Line) -> bool {
        self.target == line || self.has_control(line)
    }

    /// Two gates commute when neither target is a control of the other
    /// (and, for a measured uncompute or a temporary AND, the other does not
    /// touch its target).
    pub fn commutes_with(&self, other: &Gate) -> bool {
        !self.has_control(other.target)
            && !other.has_control(self.target)
            && !((!self.is_flip() || !other.is_flip()) && self.target == other.target)
    }

    /// Returns the same gate with the polarity of control `k` flipped.
    pub fn with_flipped_control(&self, k: usize) -> Gate {
        let mut g = self.clone();
        g.controls[k].positive = !g.controls[k].positive;
        g
    }

    /// The same gate with every line renamed by `map` (controls keep their
    /// polarity, the gate its kind); `None` when `map` sends two of its lines
    /// to one.
    pub fn renamed(&self, map: impl Fn(Line) -> Line) -> Option<Gate> {
        let controls = self
            .controls
            .iter()
            .map(|c| Control {
                line: map(c.line),
                positive: c.positive,
            })
            .collect();
        let mut g = Gate::new(controls, map(self.target))?;
        g.kind = self.kind;
        Some(g)
    }

    /// Applies the gate to a basis state held as a bit mask (line `i` is bit
    /// `i`). A measured uncompute leaves its target at 0 (whether or not the
    /// target held the AND it requires; the verifier checks that it did).
    pub fn apply(&self, state: u64) -> u64 {
        if self.is_measured() {
            return state & !(1u64 << self.target.0);
        }
        let fires = self
            .controls
            .iter()
            .all(|c| ((state >> c.line.0) & 1 == 1) == c.positive);
        if fires {
            state ^ (1u64 << self.target.0)
        } else {
            state
        }
    }
}

/// A reversible circuit: named lines and a gate list applied left to right.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Circuit {
    lines: Vec<LineInfo>,
    gates: Vec<Gate>,
    /// Lines of the ancilla register, so that adding one is constant time.
    #[serde(skip)]
    ancillae: u32,
    /// For a phase oracle: the line prepared in |-> (X then H) before the
    /// gates and restored (H then X) after them, so that the gates, an xor
    /// oracle onto it, apply `(-1)^f(x)`.
    #[serde(skip_serializing_if = "Option::is_none")]
    phase: Option<Line>,
}

/// A gate referred to a line that the circuit does not have.
#[derive(Debug, thiserror::Error, PartialEq, Eq)]
#[error("gate {gate} uses line {line}, but the circuit has {lines} lines")]
pub struct LineOutOfRange {
    /// Index of the offending gate.
    pub gate: usize,
    /// The line it named.
    pub line: u32,
    /// How many lines there are.
    pub lines: usize,
}

impl Circuit {
    /// An empty circuit on the given lines.
    pub fn new(lines: Vec<LineInfo>) -> Self {
        let ancillae = count_ancillae(&lines);
        Circuit {
            lines,
            gates: Vec::new(),
            ancillae,
            phase: None,
        }
    }

    /// Builds a circuit and checks every gate's lines.
    pub fn from_parts(lines: Vec<LineInfo>, gates: Vec<Gate>) -> Result<Self, LineOutOfRange> {
        for (k, g) in gates.iter().enumerate() {
            let worst = g
                .controls
                .iter()
                .map(|c| c.line.0)
                .chain(std::iter::once(g.target.0))
                .max()
                .unwrap_or(0);
            if worst as usize >= lines.len() {
                return Err(LineOutOfRange {
                    gate: k,
                    line: worst,
                    lines: lines.len(),
                });
            }
        }
        let ancillae = count_ancillae(&lines);
        Ok(Circuit {
            lines,
            gates,
            ancillae,
            phase: None,
        })
    }

    /// Appends a gate. Panics in debug builds if it names a missing line.
    pub fn push(&mut self, gate: Gate) {
        debug_assert!(gate.target.index() < self.lines.len());
        debug_assert!(gate
            .controls
            .iter()
            .all(|c| c.line.index() < self.lines.len()));
        self.gates.push(gate);
    }

    /// Adds a line and returns its index.
    pub fn add_line(&mut self, info: LineInfo) -> Line {
        self.ancillae += (info.register == layout::ANCILLAE) as u32;
        self.lines.push(info);
        Line(self.lines.len() as u32 - 1)
    }

    /// The phase oracle's prepared line, if the circuit is one.
    pub fn phase(&self) -> Option<Line> {
        self.phase
    }

    /// Makes the circuit a phase oracle on `line` (prepared in |-> and
    /// restored around the gates), or an xor oracle with `None`.
    pub fn set_phase(&mut self, line: Option<Line>) {
        debug_assert!(line.is_none_or(|l| l.index() < self.lines.len()));
        self.phase = line;
    }

    /// The lines.
    pub fn lines(&self) -> &[LineInfo] {
        &self.lines
    }

    /// The gates in the order they apply.
    pub fn gates(&self) -> &[Gate] {
        &self.gates
    }

    /// Replaces the gate list (same lines).
    pub fn set_gates(&mut self, gates: Vec<Gate>) {
        self.gates = gates;
    }

    /// Takes the gate list out, leaving none (for passes that rebuild it).
    pub fn take_gates(&mut self) -> Vec<Gate> {
        std::mem::take(&mut self.gates)
    }

    /// The same lines (and phase line) with no gates.
    pub fn without_gates(&self) -> Circuit {
        Circuit {
            lines: self.lines.clone(),
            gates: Vec::new(),
            ancillae: self.ancillae,
            phase: self.phase,
        }
    }

    /// Number of lines.
    pub fn width(&self) -> usize {
        self.lines.len()
    }

    /// Lines of one register, in index order.
    pub fn register(&self, name: &str) -> Vec<Line> {
        let mut found: Vec<(u32, Line)> = self
            .lines
            .iter()
            .enumerate()
            .filter(|(_, l)| l.register == name)
            .map(|(i, l)| (l.index, Line(i as u32)))
            .collect();
        found.sort();
        found.into_iter().map(|(_, l)| l).collect()
    }

    /// Register names in order of first appearance, with their sizes.
    pub fn registers(&self) -> Vec<(String, usize)> {
        let mut out: Vec<(String, usize)> = Vec::new();
        for l in &self.lines {
            match out.iter_mut().find(|(n, _)| *n == l.register) {
                Some((_, size)) => *size += 1,
                None => out.push((l.register.clone(), 1)),
            }
        }
        out
    }

    /// Number of measured uncomputes.
    pub fn measured_count(&self) -> usize {
        self.gates.iter().filter(|g| g.is_measured()).count()
    }

    /// Number of gates that are not plain flips (measured uncomputes and
    /// temporary ANDs).
    pub fn special_count(&self) -> usize {
        self.gates.iter().filter(|g| !g.is_flip()).count()
    }

    /// The largest number of controls on any gate.
    pub fn max_controls(&self) -> usize {
        self.gates
            .iter()
            .map(|g| g.controls.len())
            .max()
            .unwrap_or(0)
    }

    /// The inverse circuit: the same lines and phase line, the gates in
    /// reverse order (every MCT gate is its own inverse; a measured uncompute
    /// and a temporary AND are each other's inverse).
    pub fn inverse(&self) -> Circuit {
        let mut c = self.clone();
        c.gates.reverse();
        for g in c.gates.iter_mut() {
            *g = g.inverse();
        }
        c
    }

    /// Runs the circuit on one basis state (at most 64 lines); for tests and small tools.
    pub fn simulate(&self, state: u64) -> u64 {
        self.gates.iter().fold(state, |s, g| g.apply(s))
    }
}

fn count_ancillae(lines: &[LineInfo]) -> u32 {
    lines
        .iter()
        .filter(|l| l.register == layout::ANCILLAE)
        .count() as u32
}

/// `n` data lines `q[0..n]`, for unit tests.
#[cfg(test)]
pub(crate) fn test_lines(n: usize) -> Vec<LineInfo> {
    (0..n)
        .map(|i| LineInfo {
            register: "q".into(),
            index: i as u32,
            role: Role::Data,
            label: String::new(),
        })
        .collect()
}

impl fmt::Display for Gate {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for c in &self.controls {
            write!(f, "{}{} ", if c.positive { "" } else { "!" }, c.line.0)?;
        }
        match self.kind {
            Kind::Measured => return write!(f, "=> {} (measured uncompute)", self.target.0),
            Kind::And => return write!(f, "-> {} (temporary AND)", self.target.0),
            Kind::Flip => {}
        }
        write!(f, "-> {}", self.target.0)
    }
}
