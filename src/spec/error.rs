//! The classes of mistake a spec can hold, as data: each variant carries what
//! the message needs, and [`SpecError`] adds where it is.

use crate::source::{ErrorKind, SourceError};
use std::fmt;

/// A spec error at its place in the file.
pub type SpecError = SourceError<SpecErrorKind>;

/// What is wrong with a spec.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SpecErrorKind {
    /// The TOML reader refused the text (syntax, or a value of the wrong type).
    Toml(String),
    /// `kind` is missing.
    NoKind,
    /// `kind` names no kind of spec.
    UnknownKind(String),
    /// A key that no spec has.
    UnknownKey {
        /// The key.
        key: String,
        /// The spec's kind.
        kind: String,
        /// The keys that kind takes.
        keys: Vec<&'static str>,
    },
    /// A key of another kind of spec.
    KeyNotForKind {
        /// The key.
        key: String,
        /// The spec's kind.
        kind: String,
    },
    /// A key the spec needs is missing.
    Missing {
        /// The key.
        key: &'static str,
        /// Who needs it: `a function spec`, `op 'lookup'`, ...
        needed_by: String,
    },
    /// `[oracle] form` names no form.
    UnknownForm(String),
    /// A phase oracle asked of a spec that is not a one-output function.
    PhaseNeedsOneOutput,
    /// A list that must not be empty is.
    Empty(&'static str),
    /// A name that is not an identifier.
    BadName(String),
    /// A name used twice among inputs, outputs and definitions.
    NameTwice(String),
    /// A `[table]` or `[expr]` key that is not an output.
    NotAnOutput {
        /// The key.
        name: String,
        /// `table` or `expr`.
        section: &'static str,
        /// The outputs, listed.
        outputs: String,
    },
    /// An output given in both sections.
    OutputTwice {
        /// The output.
        name: String,
        /// Where it was first given.
        first: &'static str,
        /// Where it was given again.
        again: &'static str,
    },
    /// An output given in neither section.
    OutputMissing(String),
    /// A truth table for more inputs than tables take.
    TableTooWide {
        /// The spec's inputs.
        inputs: usize,
        /// The most a table takes.
        limit: usize,
    },
    /// A malformed table string.
    Table(String),
    /// A malformed expression.
    Expr(String),
    /// A definition that depends on itself.
    Cycle(String),
    /// The expressions have more nodes than the cap.
    TooManyNodes(usize),
    /// A number that must not be negative is.
    Negative(&'static str),
    /// A number written as text that is not a whole number in range.
    NotANumber(&'static str),
    /// A number outside its range.
    OutOfRange {
        /// The key.
        key: &'static str,
        /// The rule it breaks, in words (`must be at least 1`).
        rule: String,
    },
    /// A value that does not fit in its register.
    DoesNotFit {
        /// What (`constant 300`, `data word 9`).
        what: String,
        /// The register's bits.
        bits: usize,
    },
    /// The width of a modular op cannot hold the modulus minus one.
    WidthBelowModulus {
        /// The width.
        width: usize,
        /// The modulus, in decimal.
        modulus: String,
    },
    /// An op name of the first schema, with the form that replaces it.
    RenamedOp {
        /// What was written.
        old: String,
        /// The keys that say it now.
        new: &'static str,
    },
    /// `relation` names no relation.
    UnknownRelation(String),
    /// The images of a permutation are not a bijection of the right size.
    Permutation(String),
    /// `op` names no arithmetic op.
    UnknownOp {
        /// What was written.
        op: String,
        /// The ops.
        ops: Vec<&'static str>,
    },
    /// A key that the op does not take.
    KeyNotForOp {
        /// The key.
        key: &'static str,
        /// The op.
        op: &'static str,
    },
    /// A `[registers]` key that is not a register of the spec.
    NotARegister {
        /// The key.
        name: String,
        /// The spec's registers, listed.
        registers: String,
    },
    /// A `[registers]` value that cannot name a register.
    BadRegisterName(String),
    /// Two registers would have one name.
    RegisterNameTwice(String),
    /// A lookup table with too many address bits.
    LookupTooWide(usize),
    /// A lookup table whose data has the wrong number of words.
    DataCount {
        /// Address bits.
        width: usize,
        /// Words found.
        found: usize,
    },
    /// A `kind = "netlist"` spec read where no design file can be read.
    NoFileReader,
    /// The design file named by `file` could not be read.
    CannotRead {
        /// The file.
        file: String,
        /// Why.
        reason: String,
    },
    /// The design file was read but cannot be built as asked.
    Design(String),
}

impl fmt::Display for SpecErrorKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        use SpecErrorKind::*;
        match self {
            Toml(m) => f.write_str(m),
            NoKind => f.write_str("a spec needs 'kind'"),
            UnknownKind(k) => write!(f, "unknown kind '{k}'"),
            UnknownKey { key, kind, .. } => {
                write!(f, "unknown key '{key}' in a spec of kind '{kind}'")
            }
            KeyNotForKind { key, kind } => {
                write!(f, "'{key}' does not belong in a spec of kind '{kind}'")
            }
            Missing { key, needed_by } => match *key {
                "inputs" | "outputs" => write!(f, "{needed_by} needs an '{key}' list"),
                _ => write!(f, "{needed_by} needs '{key}'"),
            },
            UnknownForm(x) => write!(f, "unknown oracle form '{x}'"),
            PhaseNeedsOneOutput => {
                f.write_str("a phase oracle is a function spec with exactly one output, or an arithmetic compare")
            }
            Empty(key) => write!(f, "'{key}' is empty"),
            BadName(n) => write!(f, "'{n}' is not a usable name"),
            NameTwice(n) => write!(f, "the name '{n}' is used twice"),
            NotAnOutput {
                name,
                section,
                outputs,
            } => write!(
                f,
                "'{name}' in [{section}] is not an output; the outputs are {outputs}"
            ),
            OutputTwice { name, first, again } => write!(
                f,
                "output '{name}' is given twice: in [{first}] and in [{again}]"
            ),
            OutputMissing(n) => write!(f, "output '{n}' is given neither in [table] nor in [expr]"),
            TableTooWide { inputs, limit } => write!(
                f,
                "a truth table takes at most {limit} inputs; use [expr] for {inputs} inputs"
            ),
            Table(m) | Expr(m) | Permutation(m) => f.write_str(m),
            Cycle(n) => write!(f, "definition '{n}' depends on itself"),
            TooManyNodes(cap) => write!(
                f,
                "the expressions and their definitions have more than {} nodes",
                crate::logic::fmt_count(*cap)
            ),
            Negative(key) => write!(f, "'{key}' must be 0 or more"),
            NotANumber(key) => write!(
                f,
                "'{key}' must be a whole number of at most 65,536 bits (a TOML integer, or a string in decimal, 0x hex or 0b binary)"
            ),
            OutOfRange { key, rule } => write!(f, "'{key}' {rule}"),
            DoesNotFit { what, bits } => write!(f, "{what} does not fit in {bits} bits"),
            WidthBelowModulus { width, modulus } => write!(
                f,
                "width {width} cannot hold the modulus {modulus} minus 1"
            ),
            RenamedOp { old, new } => {
                write!(f, "op '{old}' is no longer a name of the schema; write {new}")
            }
            UnknownRelation(r) => write!(f, "unknown relation '{r}'"),
            UnknownOp { op, .. } => write!(f, "unknown op '{op}'"),
            KeyNotForOp { key, op } => write!(f, "'{key}' does not apply to op '{op}'"),
            NotARegister { name, registers } => write!(
                f,
                "'{name}' in [registers] is not a register of this spec; its registers are {registers}"
            ),
            BadRegisterName(n) => write!(f, "'{n}' cannot name a register"),
            RegisterNameTwice(n) => write!(f, "two registers would be named '{n}'"),
            LookupTooWide(limit) => {
                write!(f, "a lookup table takes at most {limit} address bits")
            }
            DataCount { width, found } => write!(
                f,
                "{width} address bits need {} data words, found {found}",
                1usize << width
            ),
            NoFileReader => {
                f.write_str("a netlist spec names a file, and this caller reads no files")
            }
            CannotRead { file, reason } => write!(f, "cannot read '{file}': {reason}"),
            Design(m) => f.write_str(m),
        }
    }
}

impl ErrorKind for SpecErrorKind {
    fn hint(&self) -> Option<String> {
        use SpecErrorKind::*;
        match self {
            UnknownKind(_) | NoKind => {
                Some("kind is one of function, permutation, arithmetic, netlist".into())
            }
            UnknownKey { kind, keys, .. } => {
                Some(format!("a {kind} spec takes {}", keys.join(", ")))
            }
            UnknownForm(_) => Some("form is xor or phase".into()),
            CannotRead { .. } => {
                Some("a relative path is taken from the spec file's folder".into())
            }
            BadName(_) => {
                Some("names start with a letter or '_' and hold letters, digits and '_'".into())
            }
            UnknownOp { ops, .. } => Some(format!("op is one of {}", ops.join(", "))),
            UnknownRelation(_) => Some("relation is one of <, <=, >, >=, ==, !=".into()),
            BadRegisterName(_) => Some(
                "a register name starts with a lowercase letter, holds letters, digits and '_', and is not an OpenQASM word or standard gate".into(),
            ),
            _ => None,
        }
    }
}
