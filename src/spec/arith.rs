//! Arithmetic specs: the op, its register width, and the keys each op takes.
//!
//! One schema of a few verbs (`add`, `subtract`, `compare`, `multiply`,
//! `power`, `weight`, `lookup`) whose keys combine: `constant` replaces a
//! register by a number, `modulus` makes the op modular (a promise on inputs
//! below the modulus), `relation` picks a comparison, `controlled` gates any op.

use super::error::SpecErrorKind;
use super::raw::{Number, RawArithmetic};
use super::MAX_ARITH_WIDTH;
use super::{BigUint, SpecError, Validator};
use num_integer::Integer;
use num_traits::{One, Zero};
use std::ops::Range;
use toml::Spanned;

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
    /// `exponent_window` and `multiply_window` of `power`: the window sizes
    /// of the windowed construction, when the spec fixes them (`None`: the
    /// generator picks the construction and the windows by its cost model).
    pub windows: Option<(usize, usize)>,
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

/// Most address bits of a lookup table.
const MAX_LOOKUP_ADDRESS: usize = 20;

/// Most exponent bits of `power`.
pub const MAX_EXPONENT_BITS: usize = 1 << 16;

/// Largest `exponent_window` and `multiply_window` of `power`: a lookup of
/// the windowed construction reads `2^(exponent_window + multiply_window)`
/// words, at most 2^16.
pub const MAX_WINDOW: usize = 8;

/// Longest number written as text: 65,536 binary digits and a prefix.
const MAX_NUMBER_TEXT: usize = MAX_ARITH_WIDTH + 2 + MAX_ARITH_WIDTH / 4;

/// The op names of the first schema and the form that replaces each.
const RENAMED: [(&str, &str); 7] = [
    ("sub", "op = \"subtract\""),
    ("add_const", "op = \"add\" with constant = C"),
    ("less_than", "op = \"compare\" with relation = \"<\""),
    (
        "less_than_const",
        "op = \"compare\" with relation = \"<\" and constant = C",
    ),
    (
        "equal_const",
        "op = \"compare\" with relation = \"==\" and constant = C",
    ),
    (
        "increment_mod",
        "op = \"add\" with constant = 1 and modulus = N",
    ),
    ("add_mod", "op = \"add\" with modulus = N"),
];

fn parse_number(text: &str) -> Option<BigUint> {
    if text.len() > MAX_NUMBER_TEXT {
        return None;
    }
    let t: String = text.trim().chars().filter(|&c| c != '_').collect();
    let v = if let Some(h) = t.strip_prefix("0x").or_else(|| t.strip_prefix("0X")) {
        BigUint::parse_bytes(h.as_bytes(), 16)
    } else if let Some(b) = t.strip_prefix("0b").or_else(|| t.strip_prefix("0B")) {
        BigUint::parse_bytes(b.as_bytes(), 2)
    } else if !t.is_empty() && t.bytes().all(|c| c.is_ascii_digit()) {
        BigUint::parse_bytes(t.as_bytes(), 10)
    } else {
        None
    }?;
    (bits_of(&v) <= MAX_ARITH_WIDTH).then_some(v)
}

/// `c^-1 mod n` for `gcd(c, n) = 1`, by the extended Euclidean algorithm.
pub fn inverse_mod(c: &BigUint, n: &BigUint) -> Option<BigUint> {
    use num_bigint::BigInt;
    let (mut r0, mut r1) = (BigInt::from(n.clone()), BigInt::from(c % n));
    let (mut t0, mut t1) = (BigInt::zero(), BigInt::one());
    while !r1.is_zero() {
        let q = &r0 / &r1;
        let r2 = &r0 - &q * &r1;
        r0 = std::mem::replace(&mut r1, r2);
        let t2 = &t0 - &q * &t1;
        t0 = std::mem::replace(&mut t1, t2);
    }
    if !r0.is_one() {
        return None;
    }
    let n = BigInt::from(n.clone());
    let t = ((t0 % &n) + &n) % &n;
    t.to_biguint()
}

impl Validator<'_> {
    fn number(&self, v: &Spanned<Number>, key: &'static str) -> Result<BigUint, SpecError> {
        match v.get_ref() {
            Number::Int(i) => u64::try_from(*i)
                .map(BigUint::from)
                .map_err(|_| self.err(&v.span(), SpecErrorKind::Negative(key))),
            Number::Text(t) => {
                parse_number(t).ok_or_else(|| self.err(&v.span(), SpecErrorKind::NotANumber(key)))
            }
        }
    }

    pub(super) fn arithmetic(&self, raw: &RawArithmetic) -> Result<ArithSpec, SpecError> {
        let kind_span = raw.kind.span();
        let op_raw = raw.op.as_ref().ok_or_else(|| {
            self.err(
                &kind_span,
                SpecErrorKind::Missing {
                    key: "op",
                    needed_by: "an arithmetic spec".into(),
                },
            )
        })?;
        if let Some((old, new)) = RENAMED.iter().find(|(old, _)| op_raw.get_ref() == old) {
            return Err(self.err(
                &op_raw.span(),
                SpecErrorKind::RenamedOp {
                    old: old.to_string(),
                    new,
                },
            ));
        }
        let op = op_raw.get_ref().parse::<ArithOp>().map_err(|_| {
            self.err(
                &op_raw.span(),
                SpecErrorKind::UnknownOp {
                    op: op_raw.get_ref().clone(),
                    ops: ArithOp::all().map(ArithOp::name).collect(),
                },
            )
        })?;
        let needs = |key: &'static str, by: String| SpecErrorKind::Missing { key, needed_by: by };
        let by_op = || format!("op '{}'", op.name());
        let has_constant = raw.constant.is_some();
        let has_modulus = raw.modulus.is_some();
        let uses = |key: &str| -> bool {
            use ArithOp::*;
            match key {
                "constant" => matches!(op, Add | Subtract | Compare | Multiply | Power),
                "modulus" => matches!(op, Add | Subtract | Multiply | Power),
                "relation" => op == Compare,
                "carry_out" => op == Add && !has_modulus,
                "exponent_bits" | "exponent_window" | "multiply_window" => op == Power,
                "data" | "data_width" => op == Lookup,
                _ => true,
            }
        };
        let optional: [(&'static str, Option<Range<usize>>); 9] = [
            ("constant", raw.constant.as_ref().map(|v| v.span())),
            ("modulus", raw.modulus.as_ref().map(|v| v.span())),
            ("relation", raw.relation.as_ref().map(|v| v.span())),
            ("carry_out", raw.carry_out.as_ref().map(|v| v.span())),
            (
                "exponent_bits",
                raw.exponent_bits.as_ref().map(|v| v.span()),
            ),
            (
                "exponent_window",
                raw.exponent_window.as_ref().map(|v| v.span()),
            ),
            (
                "multiply_window",
                raw.multiply_window.as_ref().map(|v| v.span()),
            ),
            ("data", raw.data.as_ref().map(|v| v.span())),
            ("data_width", raw.data_width.as_ref().map(|v| v.span())),
        ];
        for (key, span) in optional {
            if let Some(span) = span {
                if !uses(key) {
                    let op_name = if key == "carry_out" && op == ArithOp::Add {
                        "add with modulus"
                    } else {
                        op.name()
                    };
                    return Err(self.err(&span, SpecErrorKind::KeyNotForOp { key, op: op_name }));
                }
            }
        }
        let range = |key: &'static str, rule: String| SpecErrorKind::OutOfRange { key, rule };
        // Keys each op needs.
        if op == ArithOp::Power {
            if !has_constant {
                return Err(self.err(&op_raw.span(), needs("constant", by_op())));
            }
            if !has_modulus {
                return Err(self.err(&op_raw.span(), needs("modulus", by_op())));
            }
            if raw.exponent_bits.is_none() {
                return Err(self.err(&op_raw.span(), needs("exponent_bits", by_op())));
            }
        }
        if op == ArithOp::Multiply && has_modulus && !has_constant {
            let span = raw.modulus.as_ref().map_or(op_raw.span(), |m| m.span());
            return Err(self.err(
                &span,
                needs("constant", "a modular multiply (x -> c * x mod N)".into()),
            ));
        }
        let relation = match &raw.relation {
            Some(r) => Some(Relation::parse(r.get_ref()).ok_or_else(|| {
                self.err(
                    &r.span(),
                    SpecErrorKind::UnknownRelation(r.get_ref().clone()),
                )
            })?),
            None if op == ArithOp::Compare => {
                return Err(self.err(&op_raw.span(), needs("relation", by_op())))
            }
            None => None,
        };
        let modulus = match &raw.modulus {
            Some(m) => {
                let v = self.number(m, "modulus")?;
                if v < BigUint::from(2u32) {
                    return Err(self.err(&m.span(), range("modulus", "must be at least 2".into())));
                }
                Some((v, m.span()))
            }
            None => None,
        };
        let width = match (&raw.width, &modulus) {
            (Some(w), _) => {
                let v = self.nonneg(w, "width")? as usize;
                if v == 0 || v > MAX_ARITH_WIDTH {
                    return Err(self.err(
                        &w.span(),
                        range("width", format!("must be between 1 and {MAX_ARITH_WIDTH}")),
                    ));
                }
                if let Some((m, _)) = &modulus {
                    if bits_of(&(m - 1u32)) > v {
                        return Err(self.err(
                            &w.span(),
                            SpecErrorKind::WidthBelowModulus {
                                width: v,
                                modulus: m.to_string(),
                            },
                        ));
                    }
                }
                v
            }
            (None, Some((m, _))) => bits_of(&(m - 1u32)).max(1),
            (None, None) => {
                return Err(self.err(
                    &kind_span,
                    SpecErrorKind::Missing {
                        key: "width",
                        needed_by: "an arithmetic spec".into(),
                    },
                ))
            }
        };
        let constant = match &raw.constant {
            Some(c) => {
                let v = self.number(c, "constant")?;
                let fits = |bits: usize| {
                    if bits_of(&v) > bits {
                        Err(self.err(
                            &c.span(),
                            SpecErrorKind::DoesNotFit {
                                what: format!("constant {v}"),
                                bits,
                            },
                        ))
                    } else {
                        Ok(())
                    }
                };
                match (&modulus, op) {
                    (Some((m, _)), _) => {
                        if &v >= m {
                            return Err(self.err(
                                &c.span(),
                                range("constant", format!("must be below the modulus {m}")),
                            ));
                        }
                        if matches!(op, ArithOp::Multiply | ArithOp::Power) && !v.gcd(m).is_one() {
                            return Err(self.err(
                                &c.span(),
                                range(
                                    "constant",
                                    format!(
                                        "must share no factor with the modulus {m} (gcd(c, N) = 1), so that the map can be undone"
                                    ),
                                ),
                            ));
                        }
                    }
                    (None, ArithOp::Multiply) => {
                        if v.is_zero() {
                            return Err(
                                self.err(&c.span(), range("constant", "must be at least 1".into()))
                            );
                        }
                        if width + bits_of(&v) > MAX_ARITH_WIDTH {
                            return Err(self.err(
                                &c.span(),
                                range(
                                    "constant",
                                    format!("needs a product register of width + bits(constant) = {} bits, past {MAX_ARITH_WIDTH}", width + bits_of(&v)),
                                ),
                            ));
                        }
                    }
                    _ => fits(width)?,
                }
                Some(v)
            }
            None => None,
        };
        if op == ArithOp::Multiply && constant.is_none() && 2 * width > MAX_ARITH_WIDTH {
            let span = raw.width.as_ref().map_or(kind_span.clone(), |w| w.span());
            return Err(self.err(
                &span,
                range(
                    "width",
                    format!(
                        "of a register product needs a product of 2 * width bits, at most {MAX_ARITH_WIDTH}"
                    ),
                ),
            ));
        }
        let exponent_bits = match &raw.exponent_bits {
            Some(e) => {
                let v = self.nonneg(e, "exponent_bits")? as usize;
                if v == 0 || v > MAX_EXPONENT_BITS {
                    return Err(self.err(
                        &e.span(),
                        range(
                            "exponent_bits",
                            format!("must be between 1 and {MAX_EXPONENT_BITS}"),
                        ),
                    ));
                }
                v
            }
            None => 0,
        };
        let window =
            |key: &'static str, v: &Option<Spanned<i64>>| -> Result<Option<usize>, SpecError> {
                let Some(v) = v else { return Ok(None) };
                let w = self.nonneg(v, key)? as usize;
                if w == 0 || w > MAX_WINDOW {
                    return Err(self.err(
                        &v.span(),
                        range(key, format!("must be between 1 and {MAX_WINDOW}")),
                    ));
                }
                Ok(Some(w))
            };
        let windows = match (
            window("exponent_window", &raw.exponent_window)?,
            window("multiply_window", &raw.multiply_window)?,
        ) {
            (Some(e), Some(m)) => Some((e, m)),
            (None, None) => None,
            (Some(_), None) => {
                let span = raw
                    .exponent_window
                    .as_ref()
                    .map_or(op_raw.span(), |v| v.span());
                return Err(self.err(&span, needs("multiply_window", "exponent_window".into())));
            }
            (None, Some(_)) => {
                let span = raw
                    .multiply_window
                    .as_ref()
                    .map_or(op_raw.span(), |v| v.span());
                return Err(self.err(&span, needs("exponent_window", "multiply_window".into())));
            }
        };
        let (mut data, mut data_width) = (Vec::new(), 0);
        if op == ArithOp::Lookup {
            if width > MAX_LOOKUP_ADDRESS {
                let span = raw.width.as_ref().map_or(kind_span.clone(), |w| w.span());
                return Err(self.err(&span, SpecErrorKind::LookupTooWide(MAX_LOOKUP_ADDRESS)));
            }
            let dw = raw
                .data_width
                .as_ref()
                .ok_or_else(|| self.err(&op_raw.span(), needs("data_width", by_op())))?;
            data_width = self.nonneg(dw, "data_width")? as usize;
            if data_width == 0 || data_width > 64 {
                return Err(self.err(
                    &dw.span(),
                    range("data_width", "must be between 1 and 64".into()),
                ));
            }
            let words = raw
                .data
                .as_ref()
                .ok_or_else(|| self.err(&op_raw.span(), needs("data", by_op())))?;
            if words.get_ref().len() != 1 << width {
                return Err(self.err(
                    &words.span(),
                    SpecErrorKind::DataCount {
                        width,
                        found: words.get_ref().len(),
                    },
                ));
            }
            for w in words.get_ref() {
                let v = self.nonneg(w, "data")?;
                if data_width < 64 && v >> data_width != 0 {
                    return Err(self.err(
                        &w.span(),
                        SpecErrorKind::DoesNotFit {
                            what: format!("data word {v}"),
                            bits: data_width,
                        },
                    ));
                }
                data.push(v);
            }
        }
        Ok(ArithSpec {
            op,
            width,
            relation,
            constant,
            modulus: modulus.map(|(m, _)| m),
            carry_out: raw.carry_out.as_ref().is_some_and(|c| *c.get_ref()),
            exponent_bits,
            windows,
            controlled: raw.controlled.as_ref().is_some_and(|c| *c.get_ref()),
            data,
            data_width,
        })
    }
}
