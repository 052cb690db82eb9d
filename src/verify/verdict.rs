//! What a verification concludes: proven on every basis state, or refuted on one, shown register by register.

use serde::Serialize;
use std::fmt;

/// The value of one register in a counterexample.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct RegisterValue {
    /// Register name.
    pub register: String,
    /// Bits, most significant first, as `0b...`.
    pub bits: String,
    /// The value as an integer when it fits in 64 bits.
    pub value: Option<u64>,
}

impl RegisterValue {
    pub(super) fn new(register: &str, bits: &[bool]) -> Self {
        let text: String = bits
            .iter()
            .rev()
            .map(|&b| if b { '1' } else { '0' })
            .collect();
        let value = (bits.len() <= 64).then(|| {
            bits.iter()
                .enumerate()
                .fold(0u64, |v, (i, &b)| v | (b as u64) << i)
        });
        RegisterValue {
            register: register.to_string(),
            bits: format!("0b{text}"),
            value,
        }
    }
}

impl fmt::Display for RegisterValue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.value {
            Some(v) => write!(f, "{}={} ({})", self.register, v, self.bits),
            None => write!(f, "{}={}", self.register, self.bits),
        }
    }
}

/// One basis state on which the circuit does not do what the spec says.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct Counterexample {
    /// The basis state's number (see the module docs for the bit order), when
    /// it fits in 64 bits.
    pub state: Option<u64>,
    /// The registers going in.
    pub input: Vec<RegisterValue>,
    /// The registers the spec asks for coming out.
    pub expected: Vec<RegisterValue>,
    /// The registers the circuit gives.
    pub actual: Vec<RegisterValue>,
    /// The first line that differs, in words.
    pub problem: String,
}

impl fmt::Display for Counterexample {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.state.is_none() && self.input.is_empty() && self.actual.is_empty() {
            return write!(f, "{}", self.problem);
        }
        let join = |v: &[RegisterValue]| {
            v.iter()
                .map(|r| r.to_string())
                .collect::<Vec<_>>()
                .join(" ")
        };
        writeln!(f, "input    {}", join(&self.input))?;
        writeln!(f, "expected {}", join(&self.expected))?;
        writeln!(f, "actual   {}", join(&self.actual))?;
        write!(f, "{}", self.problem)
    }
}

/// The outcome of a verification that ran.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(tag = "verdict", rename_all = "lowercase")]
pub enum Verdict {
    /// Every basis state checked and correct.
    Proven {
        /// `exhaustive` or `sat`.
        by: &'static str,
        /// Free lines (inputs and targets): the proof covers `2^free_bits` states.
        free_bits: u32,
        /// How many basis states were simulated and checked (0 for SAT).
        states: u64,
        /// Basis states outside the op's domain (inputs at or above the
        /// modulus of `add_mod`), simulated but not checked.
        #[serde(skip_serializing_if = "is_zero")]
        outside_domain: u64,
    },
    /// A basis state where the circuit is wrong.
    Refuted {
        /// The first failing state found.
        counterexample: Box<Counterexample>,
    },
}

impl Verdict {
    /// A refutation that is about the oracle form, not a basis state.
    pub(super) fn form_refuted(problem: String) -> Verdict {
        Verdict::Refuted {
            counterexample: Box::new(Counterexample {
                state: None,
                input: Vec::new(),
                expected: Vec::new(),
                actual: Vec::new(),
                problem,
            }),
        }
    }

    /// One line for people: how much was proven, or that it was refuted.
    pub fn summary(&self) -> String {
        match self {
            Verdict::Proven {
                by: "sat",
                free_bits,
                ..
            } => format!("verified by SAT equivalence on all 2^{free_bits} basis states"),
            Verdict::Proven {
                states,
                outside_domain: 0,
                ..
            } => format!("verified on all {states} basis states"),
            Verdict::Proven {
                states,
                outside_domain,
                ..
            } => format!(
                "verified on all {states} basis states of the domain ({outside_domain} outside it, where the op promises nothing)"
            ),
            Verdict::Refuted { counterexample } => match counterexample.state {
                Some(s) => format!("refuted on basis state {s}"),
                None => "refuted".to_string(),
            },
        }
    }
}

fn is_zero(v: &u64) -> bool {
    *v == 0
}
