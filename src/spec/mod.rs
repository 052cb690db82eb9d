//! The TOML spec file, version 1: what a spec says, parsed and validated with
//! the place of every mistake.
//!
//! Reading goes in three steps: the TOML text becomes a table with spans;
//! its `kind` chooses one struct of [`raw`] (where every key is declared
//! once), which serde fills; the kind's validator turns that into a [`Spec`].

mod arith;
mod error;
mod function;
mod layout;
mod netlist;
mod raw;

pub use arith::{inverse_mod, MAX_EXPONENT_BITS};
pub use error::{SpecError, SpecErrorKind};
pub use layout::{permutation_layout, weight_bits};
pub use netlist::{netlist_function, DesignIssue, FileReader, SpecLoadError};

use crate::logic::{program, Dag, NodeId, Permutation, PermutationError, TruthTable};
use crate::netlist::ReadLimits;
use crate::source::Source;
pub use num_bigint::BigUint;
use raw::{RawArithmetic, RawFunction, RawNetlist, RawOracle, RawPermutation};
use std::ops::Range;
use toml::Spanned;

/// A parsed and validated spec.
#[derive(Clone, Debug, PartialEq)]
pub struct Spec {
    /// The optional `name`, copied into outputs.
    pub name: Option<String>,
    /// What to build.
    pub body: SpecBody,
    /// `[oracle] form`.
    pub form: OracleForm,
    /// `[registers]`: (standard name, own name) of every renamed register,
    /// for the files written and read; the library works on the standard
    /// names (`x`, `y`, `anc`, `a`, ...) throughout.
    pub registers: Vec<(String, String)>,
    /// `controlled = true`: `ctrl[1]` first, the map applies where it is 1
    /// (arithmetic: also [`ArithSpec::controlled`]; other kinds: [`crate::synth::control`]).
    pub controlled: bool,
}

impl Spec {
    /// The own name of the standard register `name` (itself when not renamed).
    pub fn register_name<'a>(&'a self, name: &'a str) -> &'a str {
        self.registers
            .iter()
            .find(|(std, _)| std == name)
            .map_or(name, |(_, own)| own)
    }

    /// The map from own names back to standard ones, for a file written with
    /// the spec's names.
    pub fn registers_back(&self) -> Vec<(String, String)> {
        self.registers
            .iter()
            .map(|(std, own)| (own.clone(), std.clone()))
            .collect()
    }
}

/// How the oracle acts on its output.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum OracleForm {
    /// `|x>|y> -> |x>|y XOR f(x)>`.
    #[default]
    Xor,
    /// `|x> -> (-1)^f(x) |x>`, one output, with the output qubit prepared in
    /// the minus state and restored.
    Phase,
}

/// The three kinds of spec.
#[derive(Clone, Debug, PartialEq)]
pub enum SpecBody {
    /// `kind = "function"`: an oracle `|x>|y> -> |x>|y XOR f(x)>`.
    Function(FunctionSpec),
    /// `kind = "permutation"`: a reversible function in place.
    Permutation(Permutation),
    /// `kind = "arithmetic"`: a structural generator.
    Arithmetic(ArithSpec),
}

/// A multi-output Boolean function.
#[derive(Clone, Debug, PartialEq)]
pub struct FunctionSpec {
    /// Input names; input `j` is bit `j` of the input index.
    pub inputs: Vec<String>,
    /// Outputs in `outputs` order.
    pub outputs: Vec<Output>,
    /// Every expression of the spec and its definitions, sharing nodes.
    pub dag: Dag,
}

/// One output and how it is given.
#[derive(Clone, Debug, PartialEq)]
pub struct Output {
    /// The output's name.
    pub name: String,
    /// Its definition.
    pub def: OutputDef,
}

/// An output given by `[table]` or by `[expr]`.
#[derive(Clone, Debug, PartialEq)]
pub enum OutputDef {
    /// A truth table over all inputs.
    Table(TruthTable),
    /// A node of the spec's expression graph.
    Expr(NodeId),
}

impl FunctionSpec {
    /// The truth table of output `j` (expressions are evaluated); `None` past
    /// [`crate::logic::MAX_TABLE_VARS`] inputs.
    pub fn table(&self, j: usize) -> Option<TruthTable> {
        let n = self.inputs.len();
        match &self.outputs[j].def {
            OutputDef::Table(t) => Some(t.clone()),
            OutputDef::Expr(root) if n <= crate::logic::MAX_TABLE_VARS => {
                program::tables(n, &self.dag, &[*root]).pop()
            }
            OutputDef::Expr(_) => None,
        }
    }
}

/// Arithmetic operations of the spec schema: a few verbs whose keys combine
/// (`constant`, `modulus`, `relation`, `carry_out`, `exponent_bits`,
/// `controlled`).
#[derive(
    Clone,
    Copy,
    Debug,
    PartialEq,
    Eq,
    Hash,
    strum::EnumIter,
    strum::IntoStaticStr,
    strum::EnumString,
)]
#[strum(serialize_all = "snake_case")]
pub enum ArithOp {
    /// `b = a + b`; with `constant`, `a = a + c` in place; with `modulus`,
    /// mod N for inputs below N.
    Add,
    /// `b = b - a`; with `constant`, `a = a - c` in place; with `modulus`,
    /// mod N for inputs below N.
    Subtract,
    /// `y ^= (a relation b)` or `y ^= (a relation c)`.
    Compare,
    /// `p ^= a * b` (`p[2w]`), `p ^= a * c` (`p[w + bits(c)]`), or with
    /// `constant` and `modulus`, `x -> c * x mod N` in place.
    Multiply,
    /// `e, x -> e, x * c^e mod N`.
    Power,
    /// `y ^= popcount(a)`, `y[bits(w)]`.
    Weight,
    /// `address, data -> address, data XOR table[address]`.
    Lookup,
}

impl ArithOp {
    /// Every op.
    pub fn all() -> impl Iterator<Item = ArithOp> {
        <ArithOp as strum::IntoEnumIterator>::iter()
    }

    /// The spec name.
    pub fn name(self) -> &'static str {
        self.into()
    }
}

/// The relation of `op = "compare"`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, strum::EnumIter)]
pub enum Relation {
    /// `<`
    Less,
    /// `<=`
    LessEq,
    /// `>`
    Greater,
    /// `>=`
    GreaterEq,
    /// `==`
    Equal,
    /// `!=`
    NotEqual,
}

impl Relation {
    /// Every relation.
    pub fn all() -> impl Iterator<Item = Relation> {
        <Relation as strum::IntoEnumIterator>::iter()
    }

    /// As written in a spec.
    pub fn symbol(self) -> &'static str {
        match self {
            Relation::Less => "<",
            Relation::LessEq => "<=",
            Relation::Greater => ">",
            Relation::GreaterEq => ">=",
            Relation::Equal => "==",
            Relation::NotEqual => "!=",
        }
    }

    /// The relation written `text`.
    pub fn parse(text: &str) -> Option<Relation> {
        Relation::all().find(|r| r.symbol() == text)
    }
}

/// An arithmetic spec.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ArithSpec {
    /// The operation.
    pub op: ArithOp,
    /// Register width in bits: of `a` (and `b`), of `x` for the modular
    /// multiply and `power`, the address width for `lookup`.
    pub width: usize,
    /// `relation` of `compare`.
    pub relation: Option<Relation>,
    /// `constant`, of any width.
    pub constant: Option<BigUint>,
    /// `modulus`, of any width.
    pub modulus: Option<BigUint>,
    /// `carry_out` for `add`.
    pub carry_out: bool,
    /// `exponent_bits` of `power` (0 for every other op).
    pub exponent_bits: usize,
    /// `controlled`: a `ctrl[1]` register gates the whole map.
    pub controlled: bool,
    /// `data` words for `lookup`, one per address.
    pub data: Vec<u64>,
    /// `data_width` for `lookup`.
    pub data_width: usize,
}

impl ArithSpec {
    /// Whether the map is promised only on register values below the
    /// modulus (`add`/`subtract` with `modulus`, the modular multiply, `power`).
    pub fn is_modular(&self) -> bool {
        self.modulus.is_some()
    }

    /// The registers whose values must lie below the modulus (the domain
    /// promise), by name.
    pub fn below_modulus(&self) -> &'static [&'static str] {
        if self.modulus.is_none() {
            return &[];
        }
        match (self.op, self.constant.is_some()) {
            (ArithOp::Add | ArithOp::Subtract, false) => &["a", "b"],
            (ArithOp::Add | ArithOp::Subtract, true) => &["a"],
            (ArithOp::Multiply | ArithOp::Power, _) => &["x"],
            _ => &[],
        }
    }
}

/// The bits of `v`: 0 for 0.
pub fn bits_of(v: &BigUint) -> usize {
    v.bits() as usize
}

/// Most nodes the expressions of one spec may have, definitions included
/// (each definition counts once, however often it is used).
pub const MAX_EXPR_NODES: usize = 1_000_000;

/// Most lines of a permutation spec: every method that takes permutations
/// takes at most this many (`transform`, with its 2^16-row table).
pub const MAX_PERMUTATION_LINES: usize = 16;

/// Widest arithmetic register accepted.
pub const MAX_ARITH_WIDTH: usize = 1 << 16;

/// The kinds of spec and the struct that reads each.
const KINDS: [&str; 4] = ["function", "permutation", "arithmetic", "netlist"];

fn kind_keys(kind: &str) -> &'static [&'static str] {
    match kind {
        "function" => raw::keys::<RawFunction>(),
        "permutation" => raw::keys::<RawPermutation>(),
        "netlist" => raw::keys::<RawNetlist>(),
        _ => raw::keys::<RawArithmetic>(),
    }
}

/// Parses and validates a spec. `path` is only used in messages. A
/// `kind = "netlist"` spec is refused here ([`SpecErrorKind::NoFileReader`]):
/// the library reads no files; [`parse_spec_with`] takes a reader.
pub fn parse_spec(path: &str, text: &str) -> Result<Spec, SpecError> {
    parse_spec_with(
        path,
        text,
        &mut |_| Err(String::new()),
        &ReadLimits::default(),
    )
    .map_err(|e| match e {
        SpecLoadError::Spec(e) => e,
        SpecLoadError::Design(_) => unreachable!("no file is read"),
    })
}

/// Parses and validates a spec; a `kind = "netlist"` spec's design file is
/// read through `read` (an empty reason means no files can be read) and
/// parsed within `limits`.
pub fn parse_spec_with(
    path: &str,
    text: &str,
    read: &mut FileReader<'_>,
    limits: &ReadLimits,
) -> Result<Spec, SpecLoadError> {
    let src = Source { path, text };
    let toml_error = |e: toml::de::Error| {
        let span = e.span().unwrap_or(0..0);
        src.error_at(
            span,
            SpecErrorKind::Toml(e.message().trim_end().to_string()),
        )
    };
    let table = toml::de::DeTable::parse(text).map_err(toml_error)?;
    let kind = table
        .get_ref()
        .iter()
        .find(|(k, _)| k.get_ref() == "kind")
        .map(|(_, v)| v);
    let Some(kind) = kind else {
        return Err(src.error_at(0..0, SpecErrorKind::NoKind).into());
    };
    let kind_name = match kind.get_ref() {
        toml::de::DeValue::String(s) => s.to_string(),
        _ => {
            return Err(src
                .error_at(
                    kind.span(),
                    SpecErrorKind::Toml("'kind' is a string".into()),
                )
                .into())
        }
    };
    if !KINDS.contains(&kind_name.as_str()) {
        return Err(src
            .error_at(kind.span(), SpecErrorKind::UnknownKind(kind_name))
            .into());
    }
    // Keys of another kind get a message of their own; unknown keys list the kind's.
    let keys = kind_keys(&kind_name);
    for (key, _) in table.get_ref().iter() {
        let k = key.get_ref();
        if keys.contains(&k.as_ref()) {
            continue;
        }
        let elsewhere = KINDS
            .iter()
            .any(|other| kind_keys(other).contains(&k.as_ref()));
        let error = if elsewhere {
            SpecErrorKind::KeyNotForKind {
                key: k.to_string(),
                kind: kind_name.clone(),
            }
        } else {
            SpecErrorKind::UnknownKey {
                key: k.to_string(),
                kind: kind_name.clone(),
                keys: keys.to_vec(),
            }
        };
        return Err(src.error_at(key.span(), error).into());
    }
    let de = toml::de::Deserializer::from(table);
    let v = Validator { src: &src };
    match kind_name.as_str() {
        "function" => {
            let raw: RawFunction = serde::Deserialize::deserialize(de).map_err(toml_error)?;
            let form = v.form(&raw.oracle, raw.outputs.as_ref().map(|o| o.get_ref().len()))?;
            let mut spec = Spec {
                name: raw.name.as_ref().map(|n| n.get_ref().clone()),
                body: SpecBody::Function(v.function(&raw)?),
                form,
                registers: Vec::new(),
                controlled: raw.controlled.is_some_and(|c| c.into_inner()),
            };
            spec.registers = v.registers(&raw.registers, &spec)?;
            Ok(spec)
        }
        "permutation" => {
            let raw: RawPermutation = serde::Deserialize::deserialize(de).map_err(toml_error)?;
            let form = v.form(&raw.oracle, None)?;
            let mut spec = Spec {
                name: raw.name.as_ref().map(|n| n.get_ref().clone()),
                body: SpecBody::Permutation(v.permutation(&raw)?),
                form,
                registers: Vec::new(),
                controlled: raw.controlled.is_some_and(|c| c.into_inner()),
            };
            spec.registers = v.registers(&raw.registers, &spec)?;
            Ok(spec)
        }
        "netlist" => {
            let raw: RawNetlist = serde::Deserialize::deserialize(de).map_err(toml_error)?;
            v.netlist_spec(&raw, read, limits)
        }
        _ => {
            let raw: RawArithmetic = serde::Deserialize::deserialize(de).map_err(toml_error)?;
            // A comparison has one output bit, so it may be a phase oracle.
            let compare = raw.op.as_ref().is_some_and(|o| o.get_ref() == "compare");
            let form = v.form(&raw.oracle, compare.then_some(1))?;
            let arith = v.arithmetic(&raw)?;
            let controlled = arith.controlled;
            let mut spec = Spec {
                name: raw.name.as_ref().map(|n| n.get_ref().clone()),
                body: SpecBody::Arithmetic(arith),
                form,
                registers: Vec::new(),
                controlled,
            };
            spec.registers = v.registers(&raw.registers, &spec)?;
            Ok(spec)
        }
    }
}

/// Turns the raw structs into a spec, with the file for placing errors.
struct Validator<'a> {
    src: &'a Source<'a>,
}

impl Validator<'_> {
    fn err(&self, span: &Range<usize>, kind: SpecErrorKind) -> SpecError {
        self.src.error_at(span.clone(), kind)
    }

    /// `[oracle] form`; `outputs` is the output count of a function spec.
    fn form(
        &self,
        oracle: &Option<Spanned<RawOracle>>,
        outputs: Option<usize>,
    ) -> Result<OracleForm, SpecError> {
        let Some(f) = oracle.as_ref().and_then(|o| o.get_ref().form.as_ref()) else {
            return Ok(OracleForm::Xor);
        };
        match f.get_ref().as_str() {
            "xor" => Ok(OracleForm::Xor),
            "phase" if outputs == Some(1) => Ok(OracleForm::Phase),
            "phase" => Err(self.err(&f.span(), SpecErrorKind::PhaseNeedsOneOutput)),
            other => Err(self.err(&f.span(), SpecErrorKind::UnknownForm(other.to_string()))),
        }
    }

    /// `[registers]`: each key a register of the spec (or `anc`), each value
    /// a usable name, and no two registers named alike once renamed.
    fn registers(
        &self,
        raw: &Option<raw::Section>,
        spec: &Spec,
    ) -> Result<Vec<(String, String)>, SpecError> {
        let Some(section) = raw else {
            return Ok(Vec::new());
        };
        let mut standard: Vec<&str> = spec.layout().sizes().iter().map(|(n, _)| *n).collect();
        standard.push(crate::circuit::layout::ANCILLAE);
        let mut out = Vec::new();
        for (key, value) in section.get_ref() {
            if !standard.contains(&key.get_ref().as_str()) {
                return Err(self.err(
                    &key.span(),
                    SpecErrorKind::NotARegister {
                        name: key.get_ref().clone(),
                        registers: standard.join(", "),
                    },
                ));
            }
            if !crate::circuit::layout::usable_register_name(value.get_ref()) {
                return Err(self.err(
                    &value.span(),
                    SpecErrorKind::BadRegisterName(value.get_ref().clone()),
                ));
            }
            out.push((key.get_ref().clone(), value.get_ref().clone()));
        }
        // Every register's final name, renamed or not, once.
        let mut finals: Vec<&str> = Vec::new();
        for std in &standard {
            let own = out
                .iter()
                .find(|(s, _)| s == std)
                .map_or(*std, |(_, o)| o.as_str());
            if finals.contains(&own) {
                // At this register's own value, or at the renaming it clashes with.
                let span = section
                    .get_ref()
                    .iter()
                    .find(|(k, _)| k.get_ref() == std)
                    .or_else(|| section.get_ref().iter().find(|(_, v)| v.get_ref() == own))
                    .map_or(section.span(), |(_, v)| v.span());
                return Err(self.err(&span, SpecErrorKind::RegisterNameTwice(own.to_string())));
            }
            finals.push(own);
        }
        Ok(out)
    }

    fn nonneg(&self, v: &Spanned<i64>, key: &'static str) -> Result<u64, SpecError> {
        u64::try_from(*v.get_ref()).map_err(|_| self.err(&v.span(), SpecErrorKind::Negative(key)))
    }

    fn permutation(&self, raw: &RawPermutation) -> Result<Permutation, SpecError> {
        let kind_span = raw.kind.span();
        let missing = |key| SpecErrorKind::Missing {
            key,
            needed_by: "a permutation spec".into(),
        };
        let width = raw
            .width
            .as_ref()
            .ok_or_else(|| self.err(&kind_span, missing("width")))?;
        let w = self.nonneg(width, "width")? as usize;
        if w == 0 || w > MAX_PERMUTATION_LINES {
            return Err(self.err(
                &width.span(),
                SpecErrorKind::OutOfRange {
                    key: "width",
                    rule: format!(
                        "must be between 1 and {MAX_PERMUTATION_LINES} (the most lines a permutation method takes)"
                    ),
                },
            ));
        }
        let images = raw
            .images
            .as_ref()
            .ok_or_else(|| self.err(&kind_span, missing("images")))?;
        let mut values = Vec::with_capacity(images.get_ref().len());
        for v in images.get_ref() {
            values.push(self.nonneg(v, "images")?);
        }
        Permutation::new(w, values).map_err(|e| {
            let span = match &e {
                PermutationError::TooWide(_) => width.span(),
                PermutationError::WrongCount { .. } => images.span(),
                PermutationError::OutOfRange { index, .. }
                | PermutationError::Repeated { index, .. } => images.get_ref()[*index].span(),
            };
            self.err(&span, SpecErrorKind::Permutation(e.to_string()))
        })
    }
}

#[cfg(test)]
mod tests;
