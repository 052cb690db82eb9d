//! The TOML schema, one struct per kind of spec: every key is declared once,
//! here, with its type; serde reads the file into these structs with the
//! place of every value.

use serde::de::{self, Deserialize, Deserializer, Visitor};
use std::collections::BTreeMap;
use toml::Spanned;

/// A table of names to strings (`[table]`, `[expr]`, `[let]`).
pub type Section = Spanned<BTreeMap<Spanned<String>, Spanned<String>>>;
/// A list of names.
pub type Names = Spanned<Vec<Spanned<String>>>;

/// `[oracle]`.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawOracle {
    /// `xor` or `phase`.
    pub form: Option<Spanned<String>>,
}

/// `kind = "function"`.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawFunction {
    pub kind: Spanned<String>,
    pub name: Option<Spanned<String>>,
    pub oracle: Option<Spanned<RawOracle>>,
    /// `[registers]`: own names for the standard registers.
    pub registers: Option<Section>,
    /// `controlled = true`: a `ctrl[1]` register gates the whole map.
    pub controlled: Option<Spanned<bool>>,
    pub inputs: Option<Names>,
    pub outputs: Option<Names>,
    pub table: Option<Section>,
    pub expr: Option<Section>,
    #[serde(rename = "let")]
    pub lets: Option<Section>,
}

/// `kind = "permutation"`.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPermutation {
    pub kind: Spanned<String>,
    pub name: Option<Spanned<String>>,
    pub oracle: Option<Spanned<RawOracle>>,
    /// `[registers]`: own names for the standard registers.
    pub registers: Option<Section>,
    /// `controlled = true`: a `ctrl[1]` register gates the whole map.
    pub controlled: Option<Spanned<bool>>,
    pub width: Option<Spanned<i64>>,
    pub images: Option<Spanned<Vec<Spanned<i64>>>>,
}

/// `kind = "arithmetic"`.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawArithmetic {
    pub kind: Spanned<String>,
    pub name: Option<Spanned<String>>,
    pub oracle: Option<Spanned<RawOracle>>,
    /// `[registers]`: own names for the standard registers.
    pub registers: Option<Section>,
    pub op: Option<Spanned<String>>,
    pub width: Option<Spanned<i64>>,
    pub relation: Option<Spanned<String>>,
    pub constant: Option<Spanned<Number>>,
    pub modulus: Option<Spanned<Number>>,
    pub carry_out: Option<Spanned<bool>>,
    pub exponent_bits: Option<Spanned<i64>>,
    pub exponent_window: Option<Spanned<i64>>,
    pub multiply_window: Option<Spanned<i64>>,
    pub controlled: Option<Spanned<bool>>,
    pub data: Option<Spanned<Vec<Spanned<i64>>>>,
    pub data_width: Option<Spanned<i64>>,
}

/// `kind = "netlist"`.
#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawNetlist {
    pub kind: Spanned<String>,
    pub name: Option<Spanned<String>>,
    pub oracle: Option<Spanned<RawOracle>>,
    pub file: Option<Spanned<String>>,
    pub outputs: Option<Names>,
    /// `controlled = true`: a `ctrl[1]` register gates the whole map.
    pub controlled: Option<Spanned<bool>>,
    /// `[registers]`: own names for the standard registers.
    pub registers: Option<Section>,
}

/// A whole number written as a TOML integer or, past the range of TOML
/// integers, as a string in decimal, `0x` hex or `0b` binary.
#[derive(serde::Deserialize)]
#[serde(untagged)]
pub enum Number {
    Int(i64),
    Text(String),
}

/// The keys a struct of this schema takes, as serde's derive declares them.
pub fn keys<'de, T: Deserialize<'de>>() -> &'static [&'static str] {
    struct Capture(Option<&'static [&'static str]>);
    #[derive(Debug)]
    struct Done;
    impl std::fmt::Display for Done {
        fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("keys captured")
        }
    }
    impl std::error::Error for Done {}
    impl de::Error for Done {
        fn custom<M: std::fmt::Display>(_: M) -> Self {
            Done
        }
    }
    impl<'de> Deserializer<'de> for &mut Capture {
        type Error = Done;
        fn deserialize_any<V: Visitor<'de>>(self, _: V) -> Result<V::Value, Done> {
            Err(Done)
        }
        fn deserialize_struct<V: Visitor<'de>>(
            self,
            _: &'static str,
            fields: &'static [&'static str],
            _: V,
        ) -> Result<V::Value, Done> {
            self.0 = Some(fields);
            Err(Done)
        }
        serde::forward_to_deserialize_any! {
            bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string
            bytes byte_buf option unit unit_struct newtype_struct seq tuple
            tuple_struct map enum identifier ignored_any
        }
    }
    let mut c = Capture(None);
    let _ = T::deserialize(&mut c);
    c.0.unwrap_or(&[])
}
