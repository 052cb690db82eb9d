//! Function specs: input and output names, `[table]` and `[expr]` outputs,
//! and `[let]` definitions parsed once into the spec's shared graph.

use super::error::SpecErrorKind;
use super::raw::{Names as RawNames, RawFunction};
use super::{FunctionSpec, Output, OutputDef, SpecError, Validator, MAX_EXPR_NODES};
use crate::logic::{
    identifiers, list_names, parse_into, Dag, Leaf, Names, NodeId, TruthTable, MAX_TABLE_VARS,
};
use std::collections::HashMap;
use std::ops::Range;
use toml::Spanned;

fn is_identifier(s: &str) -> bool {
    let mut chars = s.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

/// The names expressions may use: inputs, and definitions already parsed.
struct Scope<'a> {
    inputs: &'a [String],
    index: HashMap<&'a str, Leaf>,
}

impl Names for Scope<'_> {
    fn resolve(&self, name: &str) -> Option<Leaf> {
        self.index.get(name).copied()
    }

    fn describe(&self) -> String {
        list_names(self.inputs.iter().map(String::as_str))
    }
}

impl Validator<'_> {
    /// A list of names, each an identifier not taken yet.
    fn names(
        &self,
        list: &Option<RawNames>,
        key: &'static str,
        kind_span: &Range<usize>,
        taken: &mut HashMap<String, ()>,
    ) -> Result<Vec<String>, SpecError> {
        let list = list.as_ref().ok_or_else(|| {
            self.err(
                kind_span,
                SpecErrorKind::Missing {
                    key,
                    needed_by: "a function spec".into(),
                },
            )
        })?;
        if list.get_ref().is_empty() {
            return Err(self.err(&list.span(), SpecErrorKind::Empty(key)));
        }
        let mut out = Vec::with_capacity(list.get_ref().len());
        for n in list.get_ref() {
            out.push(self.new_name(n, taken)?);
        }
        Ok(out)
    }

    fn new_name(
        &self,
        n: &Spanned<String>,
        taken: &mut HashMap<String, ()>,
    ) -> Result<String, SpecError> {
        let s = n.get_ref();
        if !is_identifier(s) {
            return Err(self.err(&n.span(), SpecErrorKind::BadName(s.clone())));
        }
        if taken.insert(s.clone(), ()).is_some() {
            return Err(self.err(&n.span(), SpecErrorKind::NameTwice(s.clone())));
        }
        Ok(s.clone())
    }

    pub(super) fn function(&self, raw: &RawFunction) -> Result<FunctionSpec, SpecError> {
        let kind_span = raw.kind.span();
        let mut taken = HashMap::new();
        let inputs = self.names(&raw.inputs, "inputs", &kind_span, &mut taken)?;
        let output_names = self.names(&raw.outputs, "outputs", &kind_span, &mut taken)?;
        let output_spans: Vec<Range<usize>> = raw
            .outputs
            .as_ref()
            .map(|o| o.get_ref().iter().map(|n| n.span()).collect())
            .unwrap_or_default();
        let n = inputs.len();
        let mut dag = Dag::new();
        let mut scope = Scope {
            inputs: &inputs,
            index: inputs
                .iter()
                .enumerate()
                .map(|(j, s)| (s.as_str(), Leaf::Input(j as u32)))
                .collect(),
        };
        self.lets(raw, &mut taken, &mut scope, &mut dag)?;
        let position: HashMap<&str, usize> = output_names
            .iter()
            .enumerate()
            .map(|(k, s)| (s.as_str(), k))
            .collect();
        let mut defs: Vec<Option<OutputDef>> = vec![None; output_names.len()];
        let mut sources: Vec<Option<&'static str>> = vec![None; output_names.len()];
        let sections: [(&'static str, _); 2] = [("table", &raw.table), ("expr", &raw.expr)];
        for (section, map) in sections {
            let Some(map) = map else { continue };
            for (key, value) in map.get_ref() {
                let k = *position.get(key.get_ref().as_str()).ok_or_else(|| {
                    self.err(
                        &key.span(),
                        SpecErrorKind::NotAnOutput {
                            name: key.get_ref().clone(),
                            section,
                            outputs: list_names(output_names.iter().map(String::as_str)),
                        },
                    )
                })?;
                if let Some(first) = sources[k] {
                    return Err(self.err(
                        &key.span(),
                        SpecErrorKind::OutputTwice {
                            name: key.get_ref().clone(),
                            first,
                            again: section,
                        },
                    ));
                }
                sources[k] = Some(section);
                let text = value.get_ref();
                let span = value.span();
                let at = |inner: usize| self.src.offset_in_string(&span, text, inner);
                defs[k] = Some(if section == "table" {
                    if n > MAX_TABLE_VARS {
                        return Err(self.err(
                            &(at(0)..at(0) + 1),
                            SpecErrorKind::TableTooWide {
                                inputs: n,
                                limit: MAX_TABLE_VARS,
                            },
                        ));
                    }
                    OutputDef::Table(TruthTable::parse(text, n).map_err(|e| {
                        self.err(
                            &(at(e.offset)..at(e.offset) + 1),
                            SpecErrorKind::Table(e.message),
                        )
                    })?)
                } else {
                    OutputDef::Expr(self.expression(&mut dag, text, &span, &scope)?)
                });
            }
        }
        let mut outputs = Vec::with_capacity(defs.len());
        for (k, (name, def)) in output_names.into_iter().zip(defs).enumerate() {
            let def = def.ok_or_else(|| {
                self.err(&output_spans[k], SpecErrorKind::OutputMissing(name.clone()))
            })?;
            outputs.push(Output { name, def });
        }
        Ok(FunctionSpec {
            inputs,
            outputs,
            dag,
        })
    }

    /// One expression, parsed into the shared graph within the node cap.
    fn expression(
        &self,
        dag: &mut Dag,
        text: &str,
        span: &Range<usize>,
        scope: &Scope,
    ) -> Result<NodeId, SpecError> {
        parse_into(dag, text, scope, MAX_EXPR_NODES).map_err(|e| {
            if e.too_many_nodes {
                return self.err(span, SpecErrorKind::TooManyNodes(MAX_EXPR_NODES));
            }
            let at = self.src.offset_in_string(span, text, e.offset);
            self.err(&(at..at + 1), SpecErrorKind::Expr(e.message))
        })
    }

    /// `[let]`: named definitions over the inputs and each other, in any
    /// order, without cycles. Each is parsed once, after everything it
    /// depends on, into the shared graph, and becomes a name of `scope`.
    fn lets<'a>(
        &self,
        raw: &'a RawFunction,
        taken: &mut HashMap<String, ()>,
        scope: &mut Scope<'a>,
        dag: &mut Dag,
    ) -> Result<(), SpecError> {
        let Some(map) = &raw.lets else {
            return Ok(());
        };
        let entries: Vec<(&Spanned<String>, &Spanned<String>)> = map.get_ref().iter().collect();
        let mut index: HashMap<&str, usize> = HashMap::with_capacity(entries.len());
        for (i, (key, _)) in entries.iter().enumerate() {
            self.new_name(key, taken)?;
            index.insert(key.get_ref().as_str(), i);
        }
        // What each definition uses of the others, found before parsing.
        let deps: Vec<Vec<usize>> = entries
            .iter()
            .map(|(_, value)| {
                identifiers(value.get_ref())
                    .into_iter()
                    .filter_map(|(name, _)| index.get(name).copied())
                    .collect()
            })
            .collect();
        // Depth-first order with an explicit stack; 1 = in progress, 2 = done.
        let k = entries.len();
        let mut state = vec![0u8; k];
        for start in 0..k {
            if state[start] == 2 {
                continue;
            }
            let mut stack = vec![(start, 0usize)];
            state[start] = 1;
            while let Some(&mut (i, ref mut next)) = stack.last_mut() {
                if let Some(&j) = deps[i].get(*next) {
                    *next += 1;
                    match state[j] {
                        0 => {
                            state[j] = 1;
                            stack.push((j, 0));
                        }
                        1 => {
                            return Err(self.err(
                                &entries[j].0.span(),
                                SpecErrorKind::Cycle(entries[j].0.get_ref().clone()),
                            ))
                        }
                        _ => {}
                    }
                    continue;
                }
                let (key, value) = entries[i];
                let root = self.expression(dag, value.get_ref(), &value.span(), scope)?;
                scope.index.insert(key.get_ref().as_str(), Leaf::Node(root));
                state[i] = 2;
                stack.pop();
            }
        }
        Ok(())
    }
}
