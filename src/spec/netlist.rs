//! A design file as a function spec: `kind = "netlist"` (validation, output selection) and design files given directly.
//!
//! The netlist's nodes become nodes of the spec's expression graph one for
//! one (an n-ary node one n-ary term, a complemented edge one `Not`), so
//! the spec says exactly what the file says; its inputs keep the file's
//! order and names, its outputs the file's order or the order of the spec's
//! `outputs` selection.

use super::raw::RawNetlist;
use super::{
    FunctionSpec, OracleForm, Output, OutputDef, Spec, SpecBody, SpecError, SpecErrorKind,
    Validator,
};
use crate::logic::Dag;
use crate::netlist::{read_netlist, ReadError, ReadLimits};
use crate::netlist::{Netlist, NodeKind};
use std::fmt;

/// Why a read netlist cannot be a function spec.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum DesignIssue {
    /// An output with a don't-care set (a PLA of type `fd` or `fr`); they
    /// are not yet used, and dropping them silently would change the job.
    DontCare(String),
    /// A selected output the file does not have (index into the selection).
    UnknownOutput {
        /// Position in the selection.
        index: usize,
        /// The name asked for.
        name: String,
        /// The file's outputs, listed.
        outputs: String,
    },
    /// An output selected twice (index of the second).
    SelectedTwice {
        /// Position in the selection.
        index: usize,
        /// The name.
        name: String,
    },
    /// The file has no output (or the selection is empty).
    NoOutput,
}

impl fmt::Display for DesignIssue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            DesignIssue::DontCare(o) => write!(
                f,
                "output '{o}' has don't-cares, which are not yet supported (give a type f cover)"
            ),
            DesignIssue::UnknownOutput { name, outputs, .. } => {
                write!(
                    f,
                    "the design has no output '{name}'; its outputs are {outputs}"
                )
            }
            DesignIssue::SelectedTwice { name, .. } => {
                write!(f, "output '{name}' is selected twice")
            }
            DesignIssue::NoOutput => f.write_str("the design has no output to build"),
        }
    }
}

/// The function spec of a netlist: inputs in file order with the file's
/// names; outputs in file order, or the named ones in the order of
/// `select`. Linear in the netlist (one graph node per netlist node and
/// per complemented edge).
pub fn netlist_function(
    netlist: &Netlist,
    select: Option<&[String]>,
) -> Result<FunctionSpec, DesignIssue> {
    let all = netlist.outputs();
    let chosen: Vec<usize> = match select {
        None => (0..all.len()).collect(),
        Some(names) => {
            let mut chosen = Vec::with_capacity(names.len());
            for (index, name) in names.iter().enumerate() {
                let Some(k) = all.iter().position(|o| &o.name == name) else {
                    let mut list: Vec<&str> = all.iter().map(|o| o.name.as_str()).take(8).collect();
                    if all.len() > 8 {
                        list.push("...");
                    }
                    return Err(DesignIssue::UnknownOutput {
                        index,
                        name: name.clone(),
                        outputs: list.join(", "),
                    });
                };
                if chosen.contains(&k) {
                    return Err(DesignIssue::SelectedTwice {
                        index,
                        name: name.clone(),
                    });
                }
                chosen.push(k);
            }
            chosen
        }
    };
    if chosen.is_empty() {
        return Err(DesignIssue::NoOutput);
    }
    if let Some(&k) = chosen.iter().find(|&&k| all[k].dont_care.is_some()) {
        return Err(DesignIssue::DontCare(all[k].name.clone()));
    }
    let mut dag = Dag::new();
    let mut id_of = Vec::with_capacity(netlist.signal_count());
    id_of.push(dag.constant(false));
    for j in 0..netlist.input_count() {
        id_of.push(dag.var(j as u32));
    }
    let mut ops = Vec::new();
    for i in 0..netlist.node_count() {
        let (kind, fanins) = netlist.node(i);
        ops.clear();
        for &e in fanins {
            let id = id_of[e.signal()];
            ops.push(if e.complemented() { dag.not(id) } else { id });
        }
        let id = match kind {
            NodeKind::And => dag.and(&ops),
            NodeKind::Or => dag.or(&ops),
            NodeKind::Xor => dag.xor(&ops),
        };
        id_of.push(id);
    }
    let outputs = chosen
        .iter()
        .map(|&k| {
            let o = &all[k];
            let id = id_of[o.edge.signal()];
            let id = if o.edge.complemented() {
                dag.not(id)
            } else {
                id
            };
            Output {
                name: o.name.clone(),
                def: OutputDef::Expr(id),
            }
        })
        .collect();
    Ok(FunctionSpec {
        inputs: netlist.inputs().to_vec(),
        outputs,
        dag,
    })
}

/// Why a spec that may name a design file could not be read.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum SpecLoadError {
    /// The spec itself is wrong (at its place in the spec file).
    #[error("{0}")]
    Spec(SpecError),
    /// The design file it names is malformed (at its place in that file)
    /// or over a reader limit.
    #[error("{0}")]
    Design(ReadError),
}

impl From<SpecError> for SpecLoadError {
    fn from(e: SpecError) -> Self {
        SpecLoadError::Spec(e)
    }
}

/// Reads the bytes of the design file a spec names: given the `file` value
/// as written, the path to show in messages and the contents, or why not.
pub type FileReader<'a> = dyn FnMut(&str) -> Result<(String, Vec<u8>), String> + 'a;

impl Validator<'_> {
    /// A `kind = "netlist"` spec: the oracle form, the design file and the
    /// output selection; without a selection the output count is the
    /// file's, so a phase oracle's single output is checked after reading.
    pub(super) fn netlist_spec(
        &self,
        raw: &RawNetlist,
        read: &mut FileReader<'_>,
        limits: &ReadLimits,
    ) -> Result<Spec, SpecLoadError> {
        let outputs = raw.outputs.as_ref().map_or(1, |o| o.get_ref().len());
        let form = self.form(&raw.oracle, Some(outputs))?;
        let mut spec = Spec {
            name: raw.name.as_ref().map(|n| n.get_ref().clone()),
            body: SpecBody::Function(self.netlist(raw, form, read, limits)?),
            form,
            registers: Vec::new(),
            controlled: raw.controlled.as_ref().is_some_and(|c| *c.get_ref()),
        };
        spec.registers = self.registers(&raw.registers, &spec)?;
        Ok(spec)
    }

    /// `kind = "netlist"`: the design file read through `read`, then the
    /// output selection; a phase oracle needs exactly one output in the end.
    fn netlist(
        &self,
        raw: &RawNetlist,
        form: OracleForm,
        read: &mut FileReader<'_>,
        limits: &ReadLimits,
    ) -> Result<FunctionSpec, SpecLoadError> {
        let file = raw.file.as_ref().ok_or_else(|| {
            self.err(
                &raw.kind.span(),
                SpecErrorKind::Missing {
                    key: "file",
                    needed_by: "a netlist spec".into(),
                },
            )
        })?;
        if let Some(o) = &raw.outputs {
            if o.get_ref().is_empty() {
                return Err(self.err(&o.span(), SpecErrorKind::Empty("outputs")).into());
            }
        }
        let (shown, bytes) = read(file.get_ref()).map_err(|reason| {
            let kind = if reason.is_empty() {
                SpecErrorKind::NoFileReader
            } else {
                SpecErrorKind::CannotRead {
                    file: file.get_ref().clone(),
                    reason,
                }
            };
            self.err(&file.span(), kind)
        })?;
        let netlist = read_netlist(&shown, &bytes, limits).map_err(SpecLoadError::Design)?;
        let select: Option<Vec<String>> = raw
            .outputs
            .as_ref()
            .map(|o| o.get_ref().iter().map(|n| n.get_ref().clone()).collect());
        let f = netlist_function(&netlist, select.as_deref()).map_err(|issue| {
            let span = match &issue {
                DesignIssue::UnknownOutput { index, .. }
                | DesignIssue::SelectedTwice { index, .. } => {
                    raw.outputs.as_ref().expect("a selection").get_ref()[*index].span()
                }
                _ => file.span(),
            };
            self.err(&span, SpecErrorKind::Design(issue.to_string()))
        })?;
        if form == OracleForm::Phase && f.outputs.len() != 1 {
            let span = raw
                .oracle
                .as_ref()
                .and_then(|o| o.get_ref().form.as_ref())
                .map(|f| f.span())
                .unwrap_or_else(|| file.span());
            return Err(self.err(&span, SpecErrorKind::PhaseNeedsOneOutput).into());
        }
        Ok(f)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::netlist::{read_blif, ReadLimits};

    const FULL_ADDER: &str = ".model fa\n.inputs a b c\n.outputs s co\n\
        .names a b c s\n100 1\n010 1\n001 1\n111 1\n\
        .names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n";

    /// A full adder (sum = parity, carry = majority; common practice), whole
    /// and with its outputs selected in another order.
    #[test]
    fn full_adder_and_selection() {
        let n = read_blif("fa.blif", FULL_ADDER, &ReadLimits::default()).unwrap();
        let f = netlist_function(&n, None).unwrap();
        assert_eq!(f.inputs, ["a", "b", "c"]);
        let names: Vec<&str> = f.outputs.iter().map(|o| o.name.as_str()).collect();
        assert_eq!(names, ["s", "co"]);
        assert_eq!(f.table(0).unwrap().to_hex(), "0x96");
        assert_eq!(f.table(1).unwrap().to_hex(), "0xe8");
        let f = netlist_function(&n, Some(&["co".to_string()])).unwrap();
        assert_eq!(f.outputs.len(), 1);
        assert_eq!(f.table(0).unwrap().to_hex(), "0xe8");
        let e = netlist_function(&n, Some(&["s".into(), "z".into()])).unwrap_err();
        assert!(
            matches!(e, DesignIssue::UnknownOutput { index: 1, .. }),
            "{e}"
        );
        let e = netlist_function(&n, Some(&["s".into(), "s".into()])).unwrap_err();
        assert!(
            matches!(e, DesignIssue::SelectedTwice { index: 1, .. }),
            "{e}"
        );
        assert_eq!(netlist_function(&n, Some(&[])), Err(DesignIssue::NoOutput));
    }
}
