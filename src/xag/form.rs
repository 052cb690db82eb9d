//! The small XOR-AND graph: AND gates over affine forms, evaluated on truth tables.
//!
//! A [`SmallXag`] has inputs `x0 .. x(k-1)` (at most [`XAG_MAX_INPUTS`]), AND
//! gates `g0 .. g(m-1)` (at most [`XAG_MAX_ANDS`]) and outputs (at most
//! [`XAG_MAX_OUTPUTS`]). Each AND gate multiplies two [`Affine`] forms, each the
//! XOR of a set of inputs and earlier gates plus a constant; each output is an
//! affine form too. XORs and NOTs are free, so the cost of the graph is its
//! number of AND gates: an upper bound on the multiplicative complexity of
//! what it computes (the minimum number of AND gates over the basis AND, XOR,
//! NOT; see Boyar, Peralta and Pochuev, "On the multiplicative complexity of
//! Boolean functions over the basis (∧, ⊕, 1)", Theoretical Computer Science
//! 235, 2000).
//!
//! The graph is a plain `Copy` value of fixed size (no heap), so a database
//! can hand one out per query.

use std::fmt;
use std::ops::{BitXor, BitXorAssign, Not};

/// Most inputs a [`SmallXag`] has (a truth table of its function fits a `u64`).
pub const XAG_MAX_INPUTS: usize = 6;
/// Most AND gates a [`SmallXag`] holds.
pub const XAG_MAX_ANDS: usize = 16;
/// Most outputs a [`SmallXag`] has.
pub const XAG_MAX_OUTPUTS: usize = 8;

/// Bit of the first gate in an [`Affine`] mask: inputs take bits 0..6.
const GATE_SHIFT: u32 = XAG_MAX_INPUTS as u32;
const INPUT_BITS: u32 = (1 << XAG_MAX_INPUTS) - 1;
const GATE_BITS: u32 = ((1 << XAG_MAX_ANDS) - 1) << GATE_SHIFT;
/// Bit of the constant 1; signal slot 31 holds all ones during evaluation.
const CONSTANT_BIT: u32 = 1 << 31;

/// Truth table of input `i` over 6 inputs (row `r` is bit `r`).
pub(crate) const PROJECTIONS: [u64; 6] = [
    0xaaaa_aaaa_aaaa_aaaa,
    0xcccc_cccc_cccc_cccc,
    0xf0f0_f0f0_f0f0_f0f0,
    0xff00_ff00_ff00_ff00,
    0xffff_0000_ffff_0000,
    0xffff_ffff_0000_0000,
];

/// The rows of a truth table over `inputs` inputs, as a mask of a `u64`.
pub(crate) fn row_mask(inputs: usize) -> u64 {
    if inputs >= 6 {
        u64::MAX
    } else {
        (1u64 << (1 << inputs)) - 1
    }
}

/// An affine form over GF(2): the XOR of some inputs, some AND gates and
/// possibly the constant 1.
///
/// Build one from [`Affine::input`], [`Affine::gate`], [`Affine::ONE`] and `^`.
/// Forms are compared bit for bit (they are the same form, not merely the same
/// function).
#[derive(Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct Affine(u32);

impl Affine {
    /// The constant 0 (the empty XOR).
    pub const ZERO: Affine = Affine(0);
    /// The constant 1.
    pub const ONE: Affine = Affine(CONSTANT_BIT);

    /// Input `x_i`.
    ///
    /// # Panics
    /// When `i >= XAG_MAX_INPUTS` (a programming error, like an index out of range).
    pub const fn input(i: usize) -> Affine {
        assert!(i < XAG_MAX_INPUTS, "input index out of range");
        Affine(1 << i)
    }

    /// The output of AND gate `g_j` (0-based, in the order the gates were added).
    ///
    /// # Panics
    /// When `j >= XAG_MAX_ANDS`.
    pub const fn gate(j: usize) -> Affine {
        assert!(j < XAG_MAX_ANDS, "gate index out of range");
        Affine(1 << (GATE_SHIFT + j as u32))
    }

    /// The form with input set `inputs` (bit `i` for `x_i`), gate set `gates`
    /// (bit `j` for `g_j`) and `constant`; `None` when a set names an input at
    /// or past [`XAG_MAX_INPUTS`] or a gate at or past [`XAG_MAX_ANDS`].
    pub fn from_parts(inputs: u32, gates: u32, constant: bool) -> Option<Affine> {
        if inputs > INPUT_BITS || gates >= 1 << XAG_MAX_ANDS {
            return None;
        }
        Some(Affine(
            inputs | gates << GATE_SHIFT | if constant { CONSTANT_BIT } else { 0 },
        ))
    }

    /// The inputs in the form: bit `i` stands for `x_i`.
    pub fn inputs(self) -> u32 {
        self.0 & INPUT_BITS
    }

    /// The AND gates in the form: bit `j` stands for `g_j`.
    pub fn gates(self) -> u32 {
        (self.0 & GATE_BITS) >> GATE_SHIFT
    }

    /// Whether the form adds the constant 1.
    pub fn constant(self) -> bool {
        self.0 & CONSTANT_BIT != 0
    }

    /// Whether the form is a constant (no input and no gate).
    pub fn is_constant(self) -> bool {
        self.0 & !CONSTANT_BIT == 0
    }

    /// The form with every gate `g_j` renamed `g_(j + by)`; the caller checks
    /// that the renamed gates stay below [`XAG_MAX_ANDS`].
    fn shift_gates(self, by: usize) -> Affine {
        let g = self.0 & GATE_BITS;
        Affine((self.0 & !GATE_BITS) | (g << by) & GATE_BITS)
    }

    /// The value of the form, 64 rows at once, given every signal's word
    /// (`values[b]` for mask bit `b`; slot 31 holds all ones).
    #[inline]
    fn value(self, values: &[u64; 32]) -> u64 {
        let mut m = self.0;
        let mut acc = 0u64;
        while m != 0 {
            acc ^= values[m.trailing_zeros() as usize];
            m &= m - 1;
        }
        acc
    }
}

impl BitXor for Affine {
    type Output = Affine;
    fn bitxor(self, rhs: Affine) -> Affine {
        Affine(self.0 ^ rhs.0)
    }
}

impl BitXorAssign for Affine {
    fn bitxor_assign(&mut self, rhs: Affine) {
        self.0 ^= rhs.0;
    }
}

impl Not for Affine {
    type Output = Affine;
    fn not(self) -> Affine {
        Affine(self.0 ^ CONSTANT_BIT)
    }
}

impl fmt::Display for Affine {
    /// `x0 ^ g1 ^ 1`; the empty form is `0`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut terms: Vec<String> = (0..XAG_MAX_INPUTS)
            .filter(|i| self.inputs() >> i & 1 == 1)
            .map(|i| format!("x{i}"))
            .collect();
        terms.extend(
            (0..XAG_MAX_ANDS)
                .filter(|j| self.gates() >> j & 1 == 1)
                .map(|j| format!("g{j}")),
        );
        if self.constant() {
            terms.push("1".into());
        }
        if terms.is_empty() {
            write!(f, "0")
        } else {
            write!(f, "{}", terms.join(" ^ "))
        }
    }
}

impl fmt::Debug for Affine {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Affine({self})")
    }
}

/// What went wrong building, evaluating or synthesizing a [`SmallXag`].
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum XagError {
    /// More inputs than [`XAG_MAX_INPUTS`].
    #[error("{inputs} inputs: a small XAG has at most {XAG_MAX_INPUTS}")]
    TooManyInputs {
        /// The number asked for.
        inputs: usize,
    },
    /// More AND gates than [`XAG_MAX_ANDS`].
    #[error("the XAG would need more than {XAG_MAX_ANDS} AND gates")]
    TooManyAnds,
    /// More outputs than [`XAG_MAX_OUTPUTS`].
    #[error("the XAG would have more than {XAG_MAX_OUTPUTS} outputs")]
    TooManyOutputs,
    /// A form names an input the graph does not have, or a gate not yet added.
    #[error(
        "the form {form} names a signal that is not there ({inputs} inputs, {ands} AND gates)"
    )]
    UnknownSignal {
        /// The offending form.
        form: Affine,
        /// The graph's inputs.
        inputs: usize,
        /// The graph's AND gates so far.
        ands: usize,
    },
    /// The number of input words or forms does not match the number of inputs.
    #[error("{given} input values given for {expected} inputs")]
    InputCount {
        /// How many were given.
        given: usize,
        /// How many inputs the graph has.
        expected: usize,
    },
    /// A truth table has bits set past its `2^inputs` rows.
    #[error("truth table {table:#x} has bits past its {rows} rows")]
    TableTooWide {
        /// The table.
        table: u64,
        /// `2^inputs`.
        rows: usize,
    },
    /// An output index past the graph's outputs.
    #[error("output {output} does not exist ({outputs} outputs)")]
    NoSuchOutput {
        /// The index asked for.
        output: usize,
        /// The graph's outputs.
        outputs: usize,
    },
}

/// A small XOR-AND graph: see the module documentation.
///
/// Invariant: every form refers only to the graph's inputs and to gates added
/// before it (for outputs: to any gate), so evaluation is one pass.
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
pub struct SmallXag {
    inputs: u8,
    ands: u8,
    outputs: u8,
    gates: [[Affine; 2]; XAG_MAX_ANDS],
    outs: [Affine; XAG_MAX_OUTPUTS],
}

impl SmallXag {
    /// An empty graph on `inputs` inputs (at most [`XAG_MAX_INPUTS`]).
    pub fn new(inputs: usize) -> Result<SmallXag, XagError> {
        if inputs > XAG_MAX_INPUTS {
            return Err(XagError::TooManyInputs { inputs });
        }
        Ok(SmallXag {
            inputs: inputs as u8,
            ands: 0,
            outputs: 0,
            gates: [[Affine::ZERO; 2]; XAG_MAX_ANDS],
            outs: [Affine::ZERO; XAG_MAX_OUTPUTS],
        })
    }

    /// A graph on `inputs` inputs with one output, the affine form `f` of them.
    pub fn affine(inputs: usize, f: Affine) -> Result<SmallXag, XagError> {
        let mut x = SmallXag::new(inputs)?;
        x.add_output(f)?;
        Ok(x)
    }

    fn check(&self, form: Affine, gates: usize) -> Result<(), XagError> {
        let inputs_ok = form.inputs() >> self.inputs == 0;
        let gates_ok = form.gates() >> gates == 0;
        if inputs_ok && gates_ok {
            Ok(())
        } else {
            Err(XagError::UnknownSignal {
                form,
                inputs: self.inputs as usize,
                ands: self.ands as usize,
            })
        }
    }

    /// Adds the AND gate `a & b` over the inputs and the gates added so far,
    /// and returns its output as a form.
    pub fn add_and(&mut self, a: Affine, b: Affine) -> Result<Affine, XagError> {
        let j = self.ands as usize;
        if j >= XAG_MAX_ANDS {
            return Err(XagError::TooManyAnds);
        }
        self.check(a, j)?;
        self.check(b, j)?;
        self.gates[j] = [a, b];
        self.ands += 1;
        Ok(Affine::gate(j))
    }

    /// Adds an output: the affine form `f` of the inputs and gates.
    pub fn add_output(&mut self, f: Affine) -> Result<(), XagError> {
        let o = self.outputs as usize;
        if o >= XAG_MAX_OUTPUTS {
            return Err(XagError::TooManyOutputs);
        }
        self.check(f, self.ands as usize)?;
        self.outs[o] = f;
        self.outputs += 1;
        Ok(())
    }

    /// XORs the form `f` (of the inputs and gates) into output `output`.
    pub fn xor_into_output(&mut self, output: usize, f: Affine) -> Result<(), XagError> {
        if output >= self.outputs as usize {
            return Err(XagError::NoSuchOutput {
                output,
                outputs: self.outputs as usize,
            });
        }
        self.check(f, self.ands as usize)?;
        self.outs[output] ^= f;
        Ok(())
    }

    /// The number of inputs.
    pub fn inputs(&self) -> usize {
        self.inputs as usize
    }

    /// The number of AND gates: the cost (one Toffoli, or 4 T gates, each).
    pub fn and_count(&self) -> usize {
        self.ands as usize
    }

    /// The number of outputs.
    pub fn output_count(&self) -> usize {
        self.outputs as usize
    }

    /// The AND gates in order: gate `j` is `gates()[j][0] & gates()[j][1]`.
    pub fn gates(&self) -> &[[Affine; 2]] {
        &self.gates[..self.ands as usize]
    }

    /// The output forms.
    pub fn outputs(&self) -> &[Affine] {
        &self.outs[..self.outputs as usize]
    }

    /// Bit-parallel simulation: `inputs[i]` holds 64 values of `x_i` (one per
    /// bit); the answer holds the matching 64 values of each output. Linear in
    /// the size of the graph.
    pub fn evaluate(&self, inputs: &[u64]) -> Result<Vec<u64>, XagError> {
        if inputs.len() != self.inputs as usize {
            return Err(XagError::InputCount {
                given: inputs.len(),
                expected: self.inputs as usize,
            });
        }
        let mut words = [0u64; XAG_MAX_INPUTS];
        words[..inputs.len()].copy_from_slice(inputs);
        let out = self.evaluate_words(&words);
        Ok(out[..self.outputs as usize].to_vec())
    }

    /// [`SmallXag::evaluate`] without checks or allocation: unused input slots
    /// are ignored, unused output slots are 0.
    pub fn evaluate_words(&self, inputs: &[u64; XAG_MAX_INPUTS]) -> [u64; XAG_MAX_OUTPUTS] {
        let mut values = [0u64; 32];
        values[..XAG_MAX_INPUTS].copy_from_slice(inputs);
        values[31] = u64::MAX;
        for (j, [a, b]) in self.gates().iter().enumerate() {
            values[GATE_SHIFT as usize + j] = a.value(&values) & b.value(&values);
        }
        let mut out = [0u64; XAG_MAX_OUTPUTS];
        for (o, f) in self.outputs().iter().enumerate() {
            out[o] = f.value(&values);
        }
        out
    }

    /// The truth table of every output over the graph's inputs (row `r` in
    /// bit `r`; bits past the `2^inputs` rows are 0).
    pub fn truth_tables(&self) -> Vec<u64> {
        let mask = row_mask(self.inputs as usize);
        let out = self.evaluate_words(&PROJECTIONS);
        out[..self.outputs as usize]
            .iter()
            .map(|w| w & mask)
            .collect()
    }

    /// The truth table of output `output` (see [`SmallXag::truth_tables`]).
    pub fn truth_table(&self, output: usize) -> Result<u64, XagError> {
        if output >= self.outputs as usize {
            return Err(XagError::NoSuchOutput {
                output,
                outputs: self.outputs as usize,
            });
        }
        Ok(self.evaluate_words(&PROJECTIONS)[output] & row_mask(self.inputs as usize))
    }

    /// Appends a copy of `other` to this graph, its input `i` fed by the form
    /// `inputs[i]` of this graph's signals, and returns `other`'s outputs as
    /// forms of this graph (the caller makes them outputs or gate operands).
    /// This is how a cut's replacement is spliced in.
    pub fn append(&mut self, other: &SmallXag, inputs: &[Affine]) -> Result<Vec<Affine>, XagError> {
        if inputs.len() != other.inputs as usize {
            return Err(XagError::InputCount {
                given: inputs.len(),
                expected: other.inputs as usize,
            });
        }
        for &f in inputs {
            self.check(f, self.ands as usize)?;
        }
        if self.ands as usize + other.ands as usize > XAG_MAX_ANDS {
            return Err(XagError::TooManyAnds);
        }
        let base = self.ands as usize;
        let map = |f: Affine| -> Affine {
            let mut g = Affine(f.0 & CONSTANT_BIT) ^ Affine(f.0 & GATE_BITS).shift_gates(base);
            let mut m = f.inputs();
            while m != 0 {
                g ^= inputs[m.trailing_zeros() as usize];
                m &= m - 1;
            }
            g
        };
        for &[a, b] in other.gates() {
            let (a, b) = (map(a), map(b));
            self.add_and(a, b)?;
        }
        Ok(other.outputs().iter().map(|&f| map(f)).collect())
    }

    /// The same graph with input `i` replaced everywhere by `forms[i]`, a form
    /// over `inputs` new inputs (no gates): the circuit of `f(A x + b)` from the
    /// circuit of `f`, when `forms[i]` is row `i` of `A x + b`.
    pub fn substitute_inputs(&self, inputs: usize, forms: &[Affine]) -> Result<SmallXag, XagError> {
        let mut out = SmallXag::new(inputs)?;
        let outs = out.append(self, forms)?;
        for f in outs {
            out.add_output(f)?;
        }
        Ok(out)
    }
}

impl SmallXag {
    /// The same graph with input `i` replaced by `forms[i]` (forms of inputs
    /// only, over the same number of inputs; the caller guarantees both), in
    /// place and without checks: the database's query path.
    pub(crate) fn replace_inputs(&mut self, forms: &[Affine; XAG_MAX_INPUTS]) {
        let map = |f: Affine| -> Affine {
            let mut g = Affine(f.0 & (GATE_BITS | CONSTANT_BIT));
            let mut m = f.inputs();
            while m != 0 {
                g ^= forms[m.trailing_zeros() as usize];
                m &= m - 1;
            }
            g
        };
        for j in 0..self.ands as usize {
            self.gates[j] = [map(self.gates[j][0]), map(self.gates[j][1])];
        }
        for o in 0..self.outputs as usize {
            self.outs[o] = map(self.outs[o]);
        }
    }

    /// XORs `f` into output `output` without checks (the caller guarantees both).
    pub(crate) fn xor_output_unchecked(&mut self, output: usize, f: Affine) {
        self.outs[output] ^= f;
    }
}

impl fmt::Display for SmallXag {
    /// One line per gate and output: `g0 = (x0 ^ x2) & (x1 ^ x2)`, `f0 = g0 ^ x2`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut first = true;
        for (j, [a, b]) in self.gates().iter().enumerate() {
            if !first {
                writeln!(f)?;
            }
            first = false;
            write!(f, "g{j} = ({a}) & ({b})")?;
        }
        for (o, g) in self.outputs().iter().enumerate() {
            if !first {
                writeln!(f)?;
            }
            first = false;
            write!(f, "f{o} = {g}")?;
        }
        Ok(())
    }
}

impl fmt::Debug for SmallXag {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "SmallXag({} inputs; {self})", self.inputs)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const X: [Affine; 3] = [Affine::input(0), Affine::input(1), Affine::input(2)];

    // Majority of three with one AND: (a ^ c)(b ^ c) ^ c (common practice).
    #[test]
    fn majority_of_three() {
        let mut m = SmallXag::new(3).unwrap();
        let g = m.add_and(X[0] ^ X[2], X[1] ^ X[2]).unwrap();
        m.add_output(g ^ X[2]).unwrap();
        let brute = (0..8).fold(0u64, |t, r: u64| t | ((r.count_ones() >= 2) as u64) << r);
        assert_eq!(m.truth_tables(), vec![brute]);
        assert_eq!(brute, 0xe8);
        assert_eq!(m.and_count(), 1);
        assert_eq!(m.to_string(), "g0 = (x0 ^ x2) & (x1 ^ x2)\nf0 = x2 ^ g0");
    }

    #[test]
    fn forms_refer_only_to_existing_signals() {
        let mut m = SmallXag::new(2).unwrap();
        assert!(matches!(
            m.add_and(X[2], X[0]),
            Err(XagError::UnknownSignal { .. })
        ));
        assert!(m.add_and(Affine::gate(0), X[0]).is_err());
        let g = m.add_and(X[0], X[1]).unwrap();
        assert!(m.add_output(g ^ Affine::gate(1)).is_err());
        assert!(m.add_output(!g).is_ok());
        assert_eq!(m.truth_table(0).unwrap(), 0x7);
        assert!(SmallXag::new(7).is_err());
        assert!(m.evaluate(&[1]).is_err());
        assert!(m.truth_table(1).is_err());
    }

    #[test]
    fn evaluation_is_bit_parallel() {
        let mut m = SmallXag::new(2).unwrap();
        let g = m.add_and(X[0], !X[1]).unwrap();
        m.add_output(g).unwrap();
        m.add_output(X[0] ^ X[1] ^ Affine::ONE).unwrap();
        let a = 0x0123_4567_89ab_cdefu64;
        let b = 0xfedc_ba98_7654_3210u64;
        assert_eq!(m.evaluate(&[a, b]).unwrap(), vec![a & !b, !(a ^ b)]);
    }

    #[test]
    fn substitution_composes_with_an_affine_map() {
        // f(y) = y0 y1; substitute y0 = x0 ^ x1, y1 = x2 ^ 1.
        let mut m = SmallXag::new(2).unwrap();
        let g = m.add_and(X[0], X[1]).unwrap();
        m.add_output(g).unwrap();
        let s = m.substitute_inputs(3, &[X[0] ^ X[1], !X[2]]).unwrap();
        let want = (0..8).fold(0u64, |t, r: u64| {
            let v = ((r ^ r >> 1) & 1) & (!(r >> 2) & 1);
            t | v << r
        });
        assert_eq!(s.truth_tables(), vec![want]);
        assert!(m.substitute_inputs(3, &[Affine::gate(0), X[0]]).is_err());
    }

    #[test]
    fn form_parts_round_trip() {
        let f = Affine::from_parts(0b101, 0b10, true).unwrap();
        assert_eq!((f.inputs(), f.gates(), f.constant()), (0b101, 0b10, true));
        assert_eq!(f.to_string(), "x0 ^ x2 ^ g1 ^ 1");
        assert!(Affine::from_parts(1 << 6, 0, false).is_none());
        assert!(Affine::from_parts(0, 1 << 16, false).is_none());
        assert_eq!(Affine::ZERO.to_string(), "0");
        assert!((!Affine::ZERO).is_constant());
    }
}
