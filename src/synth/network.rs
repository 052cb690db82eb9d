//! The logic network of a function spec: expressions as they are written, tables through their minimized ESOP.

use super::{minimize_tables, SynthError};
use crate::logic::{Lit, Network, MAX_TABLE_VARS};
use crate::spec::{FunctionSpec, OutputDef};

/// The network of a function spec: expressions directly, tables through their ESOP.
pub fn network_of(f: &FunctionSpec) -> Result<Network, SynthError> {
    let n = f.inputs.len();
    let mut net = Network::new(n);
    let mut memo = vec![None; f.dag.len()];
    for (j, o) in f.outputs.iter().enumerate() {
        let lit = match &o.def {
            OutputDef::Expr(root) => net.dag(&f.dag, *root, &mut memo),
            OutputDef::Table(_) => {
                if n > MAX_TABLE_VARS {
                    return Err(SynthError::Limit {
                        what: "the number of inputs of a table",
                        value: n,
                        limit: MAX_TABLE_VARS,
                        kind: crate::limit::Limit::TableInputs,
                    });
                }
                let t = f.table(j).expect("table outputs have tables");
                let esop = minimize_tables(&[t]);
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
        };
        net.outputs.push(lit);
    }
    Ok(net)
}
