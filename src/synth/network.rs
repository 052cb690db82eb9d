//! The logic network of a function spec: expressions as they are written,
//! tables through the cheaper in AND nodes of their minimized ESOP and their
//! multi-level decomposition (`xag::tables_into`) after cut rewriting.

use super::{minimize_tables, SynthError};
use crate::logic::{Lit, Network, TruthTable, MAX_TABLE_VARS};
use crate::spec::{FunctionSpec, OutputDef};
use crate::xag::{and_count, minimize_ands, tables_into, Xag4Database, DECOMPOSE_MAX_INPUTS};

/// The network of a function spec: expressions directly; tables through
/// their ESOP or, when it has fewer AND nodes, their decomposition (for at
/// most [`DECOMPOSE_MAX_INPUTS`] inputs) rewritten by `xag::minimize_ands`.
/// Both compute the same function; only the AND count decides.
pub fn network_of(f: &FunctionSpec) -> Result<Network, SynthError> {
    let n = f.inputs.len();
    let tables: Vec<usize> = (0..f.outputs.len())
        .filter(|&j| matches!(f.outputs[j].def, OutputDef::Table(_)))
        .collect();
    if !tables.is_empty() && n > MAX_TABLE_VARS {
        return Err(SynthError::Limit {
            what: "the number of inputs of a table",
            value: n,
            limit: MAX_TABLE_VARS,
            kind: crate::limit::Limit::TableInputs,
        });
    }
    let esop = build(f, None);
    if tables.is_empty() || n > DECOMPOSE_MAX_INPUTS {
        return Ok(esop);
    }
    let dd = build(f, Some(&tables_into));
    let (dd, _) = minimize_ands(&dd, &Xag4Database::build());
    Ok(if and_count(&dd) < and_count(&esop) {
        dd
    } else {
        esop
    })
}

/// The network of `f`, outputs in order, each table through its ESOP; with
/// `together`, the table outputs are built by it in one call after the
/// expressions instead.
type Together<'a> = &'a dyn Fn(&mut Network, &[&TruthTable]) -> Vec<Lit>;

fn build(f: &FunctionSpec, together: Option<Together>) -> Network {
    let mut net = Network::new(f.inputs.len());
    let mut memo = vec![None; f.dag.len()];
    let mut outs = Vec::with_capacity(f.outputs.len());
    let mut given = Vec::new();
    for o in &f.outputs {
        match &o.def {
            OutputDef::Expr(root) => outs.push(Some(net.dag(&f.dag, *root, &mut memo))),
            OutputDef::Table(t) if together.is_none() => outs.push(Some(esop_into(&mut net, t))),
            OutputDef::Table(t) => {
                given.push(t);
                outs.push(None);
            }
        }
    }
    let built = together.map_or_else(Vec::new, |t| t(&mut net, &given));
    let mut built = built.into_iter();
    net.outputs = outs
        .into_iter()
        .map(|o| o.unwrap_or_else(|| built.next().expect("one literal per table")))
        .collect();
    net
}

/// One table through its minimized ESOP: an XOR of AND products.
fn esop_into(net: &mut Network, t: &TruthTable) -> Lit {
    let n = t.vars();
    let esop = minimize_tables(std::slice::from_ref(t));
    let mut acc = Lit::FALSE;
    for (cube, _) in &esop.terms {
        let mut p = Lit::TRUE;
        for i in 0..n as u32 {
            if (cube.care >> i) & 1 == 1 {
                let x = net.input(i as usize);
                let l = if (cube.pol >> i) & 1 == 1 {
                    x
                } else {
                    x.inverted()
                };
                p = net.and(p, l);
            }
        }
        acc = net.xor(acc, p);
    }
    acc
}
