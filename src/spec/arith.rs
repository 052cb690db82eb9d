//! Arithmetic specs: the op, its register width, and the keys each op takes.

use super::error::SpecErrorKind;
use super::raw::{Number, RawArithmetic};
use super::{ArithOp, ArithSpec, SpecError, Validator, MAX_ARITH_WIDTH};
use std::ops::Range;
use toml::Spanned;

/// Most address bits of a lookup table.
const MAX_LOOKUP_ADDRESS: usize = 20;

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

impl Validator<'_> {
    fn number(&self, v: &Spanned<Number>, key: &'static str) -> Result<u64, SpecError> {
        match v.get_ref() {
            Number::Int(i) => {
                u64::try_from(*i).map_err(|_| self.err(&v.span(), SpecErrorKind::Negative(key)))
            }
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
        let op = op_raw.get_ref().parse::<ArithOp>().map_err(|_| {
            self.err(
                &op_raw.span(),
                SpecErrorKind::UnknownOp {
                    op: op_raw.get_ref().clone(),
                    ops: ArithOp::all().map(ArithOp::name).collect(),
                },
            )
        })?;
        let needs = |key: &'static str| SpecErrorKind::Missing {
            key,
            needed_by: format!("op '{}'", op.name()),
        };
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
        let optional: [(&'static str, Option<Range<usize>>); 5] = [
            ("constant", raw.constant.as_ref().map(|v| v.span())),
            ("modulus", raw.modulus.as_ref().map(|v| v.span())),
            ("carry_out", raw.carry_out.as_ref().map(|v| v.span())),
            ("data", raw.data.as_ref().map(|v| v.span())),
            ("data_width", raw.data_width.as_ref().map(|v| v.span())),
        ];
        for (key, span) in optional {
            if let Some(span) = span {
                if !uses(key) {
                    return Err(self.err(&span, SpecErrorKind::KeyNotForOp { key, op: op.name() }));
                }
            }
        }
        let range = |key: &'static str, rule: String| SpecErrorKind::OutOfRange { key, rule };
        let modulus = match &raw.modulus {
            Some(m) => {
                let v = self.number(m, "modulus")?;
                if v < 2 {
                    return Err(self.err(&m.span(), range("modulus", "must be at least 2".into())));
                }
                Some(v)
            }
            None if uses("modulus") => return Err(self.err(&op_raw.span(), needs("modulus"))),
            None => None,
        };
        let width = match (&raw.width, modulus) {
            (Some(w), _) => {
                let v = self.nonneg(w, "width")? as usize;
                if v == 0 || v > MAX_ARITH_WIDTH {
                    return Err(self.err(
                        &w.span(),
                        range("width", format!("must be between 1 and {MAX_ARITH_WIDTH}")),
                    ));
                }
                if let Some(m) = modulus {
                    if v < 64 && (m - 1) >> v != 0 {
                        return Err(self.err(
                            &w.span(),
                            SpecErrorKind::WidthBelowModulus {
                                width: v,
                                modulus: m,
                            },
                        ));
                    }
                }
                v
            }
            (None, Some(m)) => (64 - (m - 1).leading_zeros() as usize).max(1),
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
                if width < 64 && v >> width != 0 {
                    return Err(self.err(
                        &c.span(),
                        SpecErrorKind::DoesNotFit {
                            what: format!("constant {v}"),
                            bits: width,
                        },
                    ));
                }
                Some(v)
            }
            None if uses("constant") => return Err(self.err(&op_raw.span(), needs("constant"))),
            None => None,
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
                .ok_or_else(|| self.err(&op_raw.span(), needs("data_width")))?;
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
                .ok_or_else(|| self.err(&op_raw.span(), needs("data")))?;
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
            constant,
            modulus,
            carry_out: raw.carry_out.as_ref().is_some_and(|c| *c.get_ref()),
            controlled: raw.controlled.as_ref().is_some_and(|c| *c.get_ref()),
            data,
            data_width,
        })
    }
}
