//! The TOML spec file, version 1: schema, parsing and validation with precise locations.

mod error;

pub use error::{LocatedError, Location, Source};

use crate::logic::{parse_expr, Expr, Permutation, PermutationError, TruthTable, MAX_TABLE_VARS};
use serde::Deserialize;
use std::collections::BTreeMap;
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
    /// An expression over the inputs.
    Expr(Expr),
}

impl FunctionSpec {
    /// The truth table of output `j` (expressions are evaluated); `None` past
    /// [`MAX_TABLE_VARS`] inputs.
    pub fn table(&self, j: usize) -> Option<TruthTable> {
        let n = self.inputs.len();
        match &self.outputs[j].def {
            OutputDef::Table(t) => Some(t.clone()),
            OutputDef::Expr(e) if n <= MAX_TABLE_VARS => Some(TruthTable::from_expr(n, e)),
            OutputDef::Expr(_) => None,
        }
    }
}

/// Arithmetic operations of the spec schema.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum ArithOp {
    /// `a, b -> a, (a + b) mod 2^w`.
    Add,
    /// `a, b -> a, (b - a) mod 2^w`.
    Sub,
    /// `a -> (a + constant) mod 2^w`.
    AddConst,
    /// `a, b, y -> a, b, y XOR (a < b)`.
    LessThan,
    /// `a, y -> a, y XOR (a < constant)`.
    LessThanConst,
    /// `a, y -> a, y XOR (a == constant)`.
    EqualConst,
    /// `a -> (a + 1) mod modulus` below the modulus.
    IncrementMod,
    /// `a, b -> a, (a + b) mod modulus` for `a, b < modulus`.
    AddMod,
    /// `address, data -> address, data XOR table[address]`.
    Lookup,
}

impl ArithOp {
    /// Every op with its spec name.
    pub const ALL: [(ArithOp, &'static str); 9] = [
        (ArithOp::Add, "add"),
        (ArithOp::Sub, "sub"),
        (ArithOp::AddConst, "add_const"),
        (ArithOp::LessThan, "less_than"),
        (ArithOp::LessThanConst, "less_than_const"),
        (ArithOp::EqualConst, "equal_const"),
        (ArithOp::IncrementMod, "increment_mod"),
        (ArithOp::AddMod, "add_mod"),
        (ArithOp::Lookup, "lookup"),
    ];

    /// The spec name.
    pub fn name(self) -> &'static str {
        ArithOp::ALL
            .iter()
            .find(|(op, _)| *op == self)
            .map(|(_, n)| *n)
            .unwrap_or("?")
    }
}

/// An arithmetic spec.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ArithSpec {
    /// The operation.
    pub op: ArithOp,
    /// Register width in bits (the address width for `lookup`).
    pub width: usize,
    /// `constant` for the `_const` ops.
    pub constant: Option<u64>,
    /// `modulus` for the `_mod` ops.
    pub modulus: Option<u64>,
    /// `carry_out` for `add`.
    pub carry_out: bool,
    /// `controlled`: a `ctrl[1]` register gates the whole map.
    pub controlled: bool,
    /// `data` words for `lookup`, one per address.
    pub data: Vec<u64>,
    /// `data_width` for `lookup`.
    pub data_width: usize,
}

/// Most nodes an expression may have once `[let]` definitions are substituted.
pub const MAX_EXPR_NODES: usize = 1_000_000;

const TOO_LARGE: &str =
    "with its definitions substituted this expression has more than 1,000,000 nodes";

/// Replaces `Var(j)` for `j >= n` by definition `j - n`.
fn substitute(e: &Expr, n: usize, lets: &[Expr]) -> Expr {
    match e {
        Expr::Var(j) if *j >= n => lets[j - n].clone(),
        Expr::Not(a) => Expr::Not(Box::new(substitute(a, n, lets))),
        Expr::And(v) => Expr::And(v.iter().map(|a| substitute(a, n, lets)).collect()),
        Expr::Or(v) => Expr::Or(v.iter().map(|a| substitute(a, n, lets)).collect()),
        Expr::Xor(v) => Expr::Xor(v.iter().map(|a| substitute(a, n, lets)).collect()),
        other => other.clone(),
    }
}

fn expr_size(e: &Expr) -> usize {
    match e {
        Expr::Not(a) => 1 + expr_size(a),
        Expr::And(v) | Expr::Or(v) | Expr::Xor(v) => 1 + v.iter().map(expr_size).sum::<usize>(),
        _ => 1,
    }
}

/// Widest arithmetic register accepted.
pub const MAX_ARITH_WIDTH: usize = 1 << 16;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSpec {
    kind: Spanned<String>,
    name: Option<Spanned<String>>,
    inputs: Option<Spanned<Vec<Spanned<String>>>>,
    outputs: Option<Spanned<Vec<Spanned<String>>>>,
    table: Option<Spanned<BTreeMap<Spanned<String>, Spanned<String>>>>,
    expr: Option<Spanned<BTreeMap<Spanned<String>, Spanned<String>>>>,
    #[serde(rename = "let")]
    lets: Option<Spanned<BTreeMap<Spanned<String>, Spanned<String>>>>,
    width: Option<Spanned<i64>>,
    images: Option<Spanned<Vec<Spanned<i64>>>>,
    op: Option<Spanned<String>>,
    constant: Option<Spanned<Number>>,
    modulus: Option<Spanned<Number>>,
    carry_out: Option<Spanned<bool>>,
    controlled: Option<Spanned<bool>>,
    data: Option<Spanned<Vec<Spanned<i64>>>>,
    data_width: Option<Spanned<i64>>,
    oracle: Option<Spanned<RawOracle>>,
}

/// A whole number written as a TOML integer or, past the range of TOML
/// integers, as a string in decimal, `0x` hex or `0b` binary.
#[derive(Deserialize)]
#[serde(untagged)]
enum Number {
    Int(i64),
    Text(String),
}

fn parse_number(text: &str) -> Option<u64> {
    let t: String = text.trim().chars().filter(|&c| c != '_').collect();
    if let Some(h) = t.strip_prefix("0x").or_else(|| t.strip_prefix("0X")) {
        u64::from_str_radix(h, 16).ok()
    } else if let Some(b) = t.strip_prefix("0b").or_else(|| t.strip_prefix("0B")) {
        u64::from_str_radix(b, 2).ok()
    } else {
        t.parse().ok()
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawOracle {
    form: Option<Spanned<String>>,
}

/// Parses and validates a spec. `path` is only used in messages.
pub fn parse_spec(path: &str, text: &str) -> Result<Spec, LocatedError> {
    let src = Source { path, text };
    let raw: RawSpec = toml::from_str(text).map_err(|e| {
        let at = e.span().map_or(0, |s| s.start);
        src.error(at, e.message().trim_end().to_string())
    })?;
    Validator { src: &src }.spec(raw)
}

struct Validator<'a> {
    src: &'a Source<'a>,
}

fn is_identifier(s: &str) -> bool {
    let mut chars = s.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

impl Validator<'_> {
    fn err(&self, span: &Range<usize>, message: impl Into<String>) -> LocatedError {
        self.src.error(span.start, message)
    }

    fn spec(&self, raw: RawSpec) -> Result<Spec, LocatedError> {
        let name = raw.name.as_ref().map(|n| n.get_ref().clone());
        let mut form = OracleForm::Xor;
        if let Some(o) = &raw.oracle {
            if let Some(f) = &o.get_ref().form {
                form = match f.get_ref().as_str() {
                    "xor" => OracleForm::Xor,
                    "phase" => {
                        let one_output = raw.kind.get_ref() == "function"
                            && raw.outputs.as_ref().is_some_and(|o| o.get_ref().len() == 1);
                        if !one_output {
                            return Err(self.err(
                                &f.span(),
                                "a phase oracle is a function spec with exactly one output",
                            ));
                        }
                        OracleForm::Phase
                    }
                    other => {
                        return Err(self
                            .err(&f.span(), format!("unknown oracle form '{other}'"))
                            .with_hint("form is xor or phase"))
                    }
                };
            }
        }
        let kind = raw.kind.get_ref().as_str();
        let allowed: &[&str] = match kind {
            "function" => &["inputs", "outputs", "table", "expr", "let"],
            "permutation" => &["width", "images"],
            "arithmetic" => &[
                "op",
                "width",
                "constant",
                "modulus",
                "carry_out",
                "controlled",
                "data",
                "data_width",
            ],
            other => {
                return Err(self
                    .err(&raw.kind.span(), format!("unknown kind '{other}'"))
                    .with_hint("kind is one of function, permutation, arithmetic"))
            }
        };
        let present: [(&str, Option<Range<usize>>); 15] = [
            ("let", raw.lets.as_ref().map(|v| v.span())),
            ("inputs", raw.inputs.as_ref().map(|v| v.span())),
            ("outputs", raw.outputs.as_ref().map(|v| v.span())),
            ("table", raw.table.as_ref().map(|v| v.span())),
            ("expr", raw.expr.as_ref().map(|v| v.span())),
            ("width", raw.width.as_ref().map(|v| v.span())),
            ("images", raw.images.as_ref().map(|v| v.span())),
            ("op", raw.op.as_ref().map(|v| v.span())),
            ("constant", raw.constant.as_ref().map(|v| v.span())),
            ("modulus", raw.modulus.as_ref().map(|v| v.span())),
            ("carry_out", raw.carry_out.as_ref().map(|v| v.span())),
            ("controlled", raw.controlled.as_ref().map(|v| v.span())),
            ("data", raw.data.as_ref().map(|v| v.span())),
            ("data_width", raw.data_width.as_ref().map(|v| v.span())),
            ("oracle", None),
        ];
        for (key, span) in present {
            if let Some(span) = span {
                if !allowed.contains(&key) {
                    return Err(self.err(
                        &span,
                        format!("'{key}' does not belong in a spec of kind '{kind}'"),
                    ));
                }
            }
        }
        let body = match kind {
            "function" => SpecBody::Function(self.function(&raw)?),
            "permutation" => SpecBody::Permutation(self.permutation(&raw)?),
            _ => SpecBody::Arithmetic(self.arithmetic(&raw)?),
        };
        Ok(Spec { name, body, form })
    }

    fn names(
        &self,
        list: &Option<Spanned<Vec<Spanned<String>>>>,
        key: &str,
        kind_span: &Range<usize>,
        taken: &mut Vec<String>,
    ) -> Result<Vec<String>, LocatedError> {
        let list = list
            .as_ref()
            .ok_or_else(|| self.err(kind_span, format!("a function spec needs an '{key}' list")))?;
        if list.get_ref().is_empty() {
            return Err(self.err(&list.span(), format!("'{key}' is empty")));
        }
        let mut out = Vec::new();
        for n in list.get_ref() {
            let s = n.get_ref();
            if !is_identifier(s) {
                return Err(self
                    .err(&n.span(), format!("'{s}' is not a usable name"))
                    .with_hint(
                        "names start with a letter or '_' and hold letters, digits and '_'",
                    ));
            }
            if taken.contains(s) {
                return Err(self.err(&n.span(), format!("the name '{s}' is used twice")));
            }
            taken.push(s.clone());
            out.push(s.clone());
        }
        Ok(out)
    }

    fn function(&self, raw: &RawSpec) -> Result<FunctionSpec, LocatedError> {
        let kind_span = raw.kind.span();
        let mut taken = Vec::new();
        let inputs = self.names(&raw.inputs, "inputs", &kind_span, &mut taken)?;
        let output_names = self.names(&raw.outputs, "outputs", &kind_span, &mut taken)?;
        let output_spans: Vec<Range<usize>> = raw
            .outputs
            .as_ref()
            .map(|o| o.get_ref().iter().map(|n| n.span()).collect())
            .unwrap_or_default();
        let n = inputs.len();
        let (all_names, lets) = self.lets(raw, &inputs, &mut taken)?;
        let mut defs: Vec<Option<OutputDef>> = vec![None; output_names.len()];
        let mut sources: Vec<Option<&str>> = vec![None; output_names.len()];
        let sections = [("table", &raw.table), ("expr", &raw.expr)];
        for (section, map) in sections {
            let Some(map) = map else { continue };
            for (key, value) in map.get_ref() {
                let k = output_names
                    .iter()
                    .position(|o| o == key.get_ref())
                    .ok_or_else(|| {
                        self.err(
                            &key.span(),
                            format!(
                                "'{}' in [{section}] is not an output; the outputs are {}",
                                key.get_ref(),
                                output_names.join(", ")
                            ),
                        )
                    })?;
                if let Some(first) = sources[k] {
                    return Err(self.err(
                        &key.span(),
                        format!(
                            "output '{}' is given twice: in [{first}] and in [{section}]",
                            key.get_ref()
                        ),
                    ));
                }
                sources[k] = Some(section);
                let text = value.get_ref();
                let span = value.span();
                let at = |inner: usize| self.src.offset_in_string(&span, text, inner);
                defs[k] = Some(if section == "table" {
                    if n > MAX_TABLE_VARS {
                        return Err(self.src.error(
                            at(0),
                            format!("a truth table takes at most {MAX_TABLE_VARS} inputs; use [expr] for {n} inputs"),
                        ));
                    }
                    OutputDef::Table(
                        TruthTable::parse(text, n)
                            .map_err(|e| self.src.error(at(e.offset), e.message))?,
                    )
                } else {
                    let e = parse_expr(text, &all_names)
                        .map_err(|e| self.src.error(at(e.offset), e.message))?;
                    let e = substitute(&e, n, &lets);
                    if expr_size(&e) > MAX_EXPR_NODES {
                        return Err(self.err(&span, TOO_LARGE));
                    }
                    OutputDef::Expr(e)
                });
            }
        }
        let mut outputs = Vec::new();
        for (k, (name, def)) in output_names.into_iter().zip(defs).enumerate() {
            let def = def.ok_or_else(|| {
                self.err(
                    &output_spans[k],
                    format!("output '{name}' is given neither in [table] nor in [expr]"),
                )
            })?;
            outputs.push(Output { name, def });
        }
        Ok(FunctionSpec { inputs, outputs })
    }

    fn number(&self, v: &Spanned<Number>, key: &str) -> Result<u64, LocatedError> {
        match v.get_ref() {
            Number::Int(i) => u64::try_from(*i)
                .map_err(|_| self.err(&v.span(), format!("'{key}' must be 0 or more"))),
            Number::Text(t) => parse_number(t).ok_or_else(|| {
                self.err(
                    &v.span(),
                    format!("'{key}' must be a whole number from 0 to 2^64 - 1 (decimal, 0x hex or 0b binary)"),
                )
            }),
        }
    }

    /// Parses `[let]`: named definitions over the inputs and each other, in any
    /// order, without cycles. Returns the names expressions may use (inputs,
    /// then definitions) and each definition with the others substituted.
    fn lets(
        &self,
        raw: &RawSpec,
        inputs: &[String],
        taken: &mut Vec<String>,
    ) -> Result<(Vec<String>, Vec<Expr>), LocatedError> {
        let n = inputs.len();
        let mut all = inputs.to_vec();
        let Some(map) = &raw.lets else {
            return Ok((all, Vec::new()));
        };
        let entries: Vec<(&Spanned<String>, &Spanned<String>)> = map.get_ref().iter().collect();
        for (key, _) in &entries {
            let name = key.get_ref();
            if !is_identifier(name) {
                return Err(self.err(&key.span(), format!("'{name}' is not a usable name")));
            }
            if taken.contains(name) {
                return Err(self.err(&key.span(), format!("the name '{name}' is used twice")));
            }
            taken.push(name.clone());
            all.push(name.clone());
        }
        let mut parsed = Vec::new();
        for (_, value) in &entries {
            let text = value.get_ref();
            let span = value.span();
            let e = parse_expr(text, &all).map_err(|e| {
                self.src
                    .error(self.src.offset_in_string(&span, text, e.offset), e.message)
            })?;
            parsed.push(e);
        }
        // Depth-first resolution; 1 = in progress, 2 = done.
        let k = entries.len();
        let mut state = vec![0u8; k];
        // Placeholders until resolved; a definition is substituted only after
        // everything it depends on.
        let mut resolved: Vec<Expr> = vec![Expr::Const(false); k];
        fn deps(e: &Expr, n: usize, out: &mut Vec<usize>) {
            match e {
                Expr::Var(j) if *j >= n => out.push(j - n),
                Expr::Not(a) => deps(a, n, out),
                Expr::And(v) | Expr::Or(v) | Expr::Xor(v) => v.iter().for_each(|a| deps(a, n, out)),
                _ => {}
            }
        }
        for start in 0..k {
            let mut stack = vec![(start, false)];
            while let Some((i, expanded)) = stack.pop() {
                if expanded {
                    let e = substitute(&parsed[i], n, &resolved);
                    if expr_size(&e) > MAX_EXPR_NODES {
                        return Err(self.err(&entries[i].1.span(), TOO_LARGE));
                    }
                    resolved[i] = e;
                    state[i] = 2;
                    continue;
                }
                match state[i] {
                    2 => continue,
                    1 => {
                        return Err(self.err(
                            &entries[i].0.span(),
                            format!("definition '{}' depends on itself", entries[i].0.get_ref()),
                        ))
                    }
                    _ => {}
                }
                state[i] = 1;
                stack.push((i, true));
                let mut d = Vec::new();
                deps(&parsed[i], n, &mut d);
                for j in d {
                    if state[j] == 1 {
                        return Err(self.err(
                            &entries[j].0.span(),
                            format!("definition '{}' depends on itself", entries[j].0.get_ref()),
                        ));
                    }
                    if state[j] == 0 {
                        stack.push((j, false));
                    }
                }
            }
        }
        Ok((all, resolved))
    }

    fn nonneg(&self, v: &Spanned<i64>, key: &str) -> Result<u64, LocatedError> {
        u64::try_from(*v.get_ref())
            .map_err(|_| self.err(&v.span(), format!("'{key}' must be 0 or more")))
    }

    fn permutation(&self, raw: &RawSpec) -> Result<Permutation, LocatedError> {
        let kind_span = raw.kind.span();
        let width = raw
            .width
            .as_ref()
            .ok_or_else(|| self.err(&kind_span, "a permutation spec needs 'width'"))?;
        let w = self.nonneg(width, "width")? as usize;
        if w == 0 {
            return Err(self.err(&width.span(), "'width' must be at least 1"));
        }
        let images = raw
            .images
            .as_ref()
            .ok_or_else(|| self.err(&kind_span, "a permutation spec needs 'images'"))?;
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
            self.err(&span, e.to_string())
        })
    }

    fn arithmetic(&self, raw: &RawSpec) -> Result<ArithSpec, LocatedError> {
        let kind_span = raw.kind.span();
        let op_raw = raw
            .op
            .as_ref()
            .ok_or_else(|| self.err(&kind_span, "an arithmetic spec needs 'op'"))?;
        let op = ArithOp::ALL
            .iter()
            .find(|(_, n)| n == op_raw.get_ref())
            .map(|(op, _)| *op)
            .ok_or_else(|| {
                let names: Vec<&str> = ArithOp::ALL.iter().map(|(_, n)| *n).collect();
                self.err(&op_raw.span(), format!("unknown op '{}'", op_raw.get_ref()))
                    .with_hint(format!("op is one of {}", names.join(", ")))
            })?;
        let uses = |key: &str| -> bool {
            match key {
                "constant" => matches!(
                    op,
                    ArithOp::AddConst | ArithOp::LessThanConst | ArithOp::EqualConst
                ),
                "modulus" => matches!(op, ArithOp::IncrementMod | ArithOp::AddMod),
                "carry_out" => op == ArithOp::Add,
                "data" | "data_width" => op == ArithOp::Lookup,
                _ => true,
            }
        };
        let optional: [(&str, Option<Range<usize>>); 5] = [
            ("constant", raw.constant.as_ref().map(|v| v.span())),
            ("modulus", raw.modulus.as_ref().map(|v| v.span())),
            ("carry_out", raw.carry_out.as_ref().map(|v| v.span())),
            ("data", raw.data.as_ref().map(|v| v.span())),
            ("data_width", raw.data_width.as_ref().map(|v| v.span())),
        ];
        for (key, span) in optional {
            if let Some(span) = span {
                if !uses(key) {
                    return Err(self.err(
                        &span,
                        format!("'{key}' does not apply to op '{}'", op.name()),
                    ));
                }
            }
        }
        let modulus = match &raw.modulus {
            Some(m) => {
                let v = self.number(m, "modulus")?;
                if v < 2 {
                    return Err(self.err(&m.span(), "'modulus' must be at least 2"));
                }
                Some(v)
            }
            None if uses("modulus") => {
                return Err(self.err(
                    &op_raw.span(),
                    format!("op '{}' needs 'modulus'", op.name()),
                ))
            }
            None => None,
        };
        let width = match (&raw.width, modulus) {
            (Some(w), _) => {
                let v = self.nonneg(w, "width")? as usize;
                if v == 0 || v > MAX_ARITH_WIDTH {
                    return Err(self.err(
                        &w.span(),
                        format!("'width' must be between 1 and {MAX_ARITH_WIDTH}"),
                    ));
                }
                if let Some(m) = modulus {
                    if v < 64 && (m - 1) >> v != 0 {
                        return Err(self.err(
                            &w.span(),
                            format!("width {v} cannot hold {} (modulus {m} minus 1)", m - 1),
                        ));
                    }
                }
                v
            }
            (None, Some(m)) => (64 - (m - 1).leading_zeros() as usize).max(1),
            (None, None) => return Err(self.err(&kind_span, "an arithmetic spec needs 'width'")),
        };
        let constant = match &raw.constant {
            Some(c) => {
                let v = self.number(c, "constant")?;
                if width < 64 && v >> width != 0 {
                    return Err(self.err(
                        &c.span(),
                        format!("constant {v} does not fit in {width} bits"),
                    ));
                }
                Some(v)
            }
            None if uses("constant") => {
                return Err(self.err(
                    &op_raw.span(),
                    format!("op '{}' needs 'constant'", op.name()),
                ))
            }
            None => None,
        };
        let (mut data, mut data_width) = (Vec::new(), 0);
        if op == ArithOp::Lookup {
            if width > 20 {
                return Err(self.err(
                    &raw.width
                        .as_ref()
                        .map(|w| w.span())
                        .unwrap_or(kind_span.clone()),
                    "a lookup table takes at most 20 address bits",
                ));
            }
            let dw = raw
                .data_width
                .as_ref()
                .ok_or_else(|| self.err(&op_raw.span(), "op 'lookup' needs 'data_width'"))?;
            data_width = self.nonneg(dw, "data_width")? as usize;
            if data_width == 0 || data_width > 64 {
                return Err(self.err(&dw.span(), "'data_width' must be between 1 and 64"));
            }
            let words = raw
                .data
                .as_ref()
                .ok_or_else(|| self.err(&op_raw.span(), "op 'lookup' needs 'data'"))?;
            if words.get_ref().len() != 1 << width {
                return Err(self.err(
                    &words.span(),
                    format!(
                        "{width} address bits need {} data words, found {}",
                        1usize << width,
                        words.get_ref().len()
                    ),
                ));
            }
            for w in words.get_ref() {
                let v = self.nonneg(w, "data")?;
                if data_width < 64 && v >> data_width != 0 {
                    return Err(self.err(
                        &w.span(),
                        format!("data word {v} does not fit in {data_width} bits"),
                    ));
                }
                data.push(v);
            }
        }
        Ok(ArithSpec {
            op,
            width,
            constant,
            modulus,
            carry_out: raw.carry_out.as_ref().is_some_and(|c| *c.get_ref()),
            controlled: raw.controlled.as_ref().is_some_and(|c| *c.get_ref()),
            data,
            data_width,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn err(text: &str) -> LocatedError {
        parse_spec("t.toml", text).unwrap_err()
    }

    fn at(e: &LocatedError) -> (usize, usize) {
        (e.location.line, e.location.column)
    }

    #[test]
    fn design_example_parses() {
        let s = parse_spec(
            "t.toml",
            r#"
kind = "function"
name = "greenhouse-vent"
inputs = ["hot", "humid", "night"]
outputs = ["vent", "fan"]

[table]
vent = "0x3e"

[expr]
fan = "hot & !night | humid ^ hot"
"#,
        )
        .unwrap();
        assert_eq!(s.name.as_deref(), Some("greenhouse-vent"));
        let SpecBody::Function(f) = s.body else {
            panic!("function kind")
        };
        assert_eq!(f.inputs, ["hot", "humid", "night"]);
        assert_eq!(f.table(0).unwrap().to_hex(), "0x3e");
        // hot & !night | (humid ^ hot), by precedence.
        let fan = f.table(1).unwrap();
        for i in 0..8 {
            let (hot, humid, night) = (i & 1 == 1, i & 2 == 2, i & 4 == 4);
            assert_eq!(fan.get(i), (hot && !night) || (humid ^ hot));
        }
    }

    #[test]
    fn constants_past_the_toml_integer_range() {
        let s = parse_spec(
            "t.toml",
            "kind = \"arithmetic\"\nop = \"add_const\"\nwidth = 64\nconstant = \"0xffff_ffff_ffff_fffe\"\n",
        )
        .unwrap();
        let SpecBody::Arithmetic(a) = s.body else {
            panic!("arithmetic")
        };
        assert_eq!(a.constant, Some(u64::MAX - 1));
        let e =
            err("kind = \"arithmetic\"\nop = \"add_const\"\nwidth = 8\nconstant = \"twelve\"\n");
        assert_eq!(at(&e), (4, 12), "{e}");
        let e = err("kind = \"arithmetic\"\nop = \"add_const\"\nwidth = 8\nconstant = 300\n");
        assert!(e.message.contains("does not fit"), "{e}");
    }

    #[test]
    fn definitions_resolve_in_any_order_and_cycles_are_refused() {
        let s = parse_spec(
            "t.toml",
            "kind = \"function\"\ninputs = [\"a\", \"b\", \"c\"]\noutputs = [\"f\"]\n[let]\nz = \"y & c\"\ny = \"a ^ b\"\n[expr]\nf = \"z | !y\"\n",
        )
        .unwrap();
        let SpecBody::Function(f) = s.body else {
            panic!()
        };
        let t = f.table(0).unwrap();
        for x in 0..8 {
            let (a, b, c) = (x & 1 == 1, x & 2 == 2, x & 4 == 4);
            assert_eq!(t.get(x), !(a ^ b) || c);
        }
        let e = err("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\np = \"q & a\"\nq = \"p\"\n[expr]\nf = \"p\"\n");
        assert!(e.message.contains("depends on itself"), "{e}");
        assert_eq!(e.location.line, 5);
        let e = err("kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\na = \"1\"\n[expr]\nf = \"a\"\n");
        assert!(e.message.contains("twice"), "{e}");
        // Doubling definitions: 2^25 nodes after substitution is refused, not built.
        let mut text = String::from(
            "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[let]\nd0 = \"a\"\n",
        );
        for i in 1..26 {
            text.push_str(&format!("d{i} = \"d{} ^ d{}\"\n", i - 1, i - 1));
        }
        text.push_str("[expr]\nf = \"d25\"\n");
        assert!(err(&text).message.contains("1,000,000"));
    }

    #[test]
    fn locations_of_common_mistakes() {
        let e = err(
            "kind = \"function\"\ninputs = [\"a\"]\noutputs = [\"f\"]\n[expr]\nf = \"a & b\"\n",
        );
        assert_eq!(at(&e), (5, 10), "{e}");
        let e = err("kind = \"permutation\"\nwidth = 2\nimages = [0, 1, 1, 3]\n");
        assert_eq!(at(&e), (3, 17), "{e}");
        let e = err("kind = \"permutation\"\nwidht = 2\n");
        assert_eq!(at(&e).0, 2, "{e}");
    }
}
