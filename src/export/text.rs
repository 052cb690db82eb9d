//! A plain text listing of a circuit, one gate per line, for reading and diffing.

use crate::circuit::Circuit;
use std::fmt::Write as _;

/// Lists the lines, then every gate as `controls -> target` with `!` on negative controls.
pub fn listing(c: &Circuit) -> String {
    let mut s = String::new();
    let name = |i: usize| {
        let l = &c.lines()[i];
        format!("{}[{}]", l.register, l.index)
    };
    for (i, l) in c.lines().iter().enumerate() {
        let _ = writeln!(
            s,
            "line {i:>4}  {:<10} {:<8} {}",
            name(i),
            format!("{:?}", l.role).to_lowercase(),
            l.label
        );
    }
    for (k, g) in c.gates().iter().enumerate() {
        let controls: Vec<String> = g
            .controls()
            .iter()
            .map(|ctl| {
                format!(
                    "{}{}",
                    if ctl.positive { "" } else { "!" },
                    name(ctl.line.index())
                )
            })
            .collect();
        let _ = writeln!(
            s,
            "gate {k:>4}  [{}] -> {}",
            controls.join(" "),
            name(g.target().index())
        );
    }
    s
}
