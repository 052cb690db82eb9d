//! Circuit drawings: Unicode text for the terminal, SVG for papers and slides.
//!
//! One column per gate. Lines are labelled with register, index, spec name and
//! role; ancillae are drawn below a labelled gap with a dotted wire. A filled
//! dot is a control on 1, a hollow one a control on 0, a circled plus the
//! target, and a vertical bar joins them. A temporary AND's target is `∧`, a
//! measured uncompute's `M`.

use crate::circuit::{Circuit, Gate, Role};
use std::fmt::Write as _;

fn label(c: &Circuit, i: usize) -> String {
    let l = &c.lines()[i];
    let name = format!("{}[{}]", l.register, l.index);
    let auto = format!("{}{}", l.register, l.index);
    let full = if l.label.is_empty() || l.label == name || l.label == auto {
        name
    } else {
        format!("{name} {}", l.label)
    };
    shorten(full)
}

/// Longest label drawn, in characters; longer ones end in an ellipsis.
const MAX_LABEL: usize = 40;

fn shorten(s: String) -> String {
    if s.chars().count() <= MAX_LABEL {
        return s;
    }
    let mut cut: String = s.chars().take(MAX_LABEL - 1).collect();
    cut.push('…');
    cut
}

/// Lines in drawing order: data lines first, ancillae last.
fn order(c: &Circuit) -> Vec<usize> {
    let mut v: Vec<usize> = (0..c.width())
        .filter(|&i| c.lines()[i].role != Role::Ancilla)
        .collect();
    v.extend((0..c.width()).filter(|&i| c.lines()[i].role == Role::Ancilla));
    v
}

fn span(g: &Gate, row_of: &[usize]) -> (usize, usize) {
    let rows = g
        .controls()
        .iter()
        .map(|c| row_of[c.line.index()])
        .chain(std::iter::once(row_of[g.target().index()]));
    let lo = rows.clone().min().unwrap_or(0);
    let hi = rows.max().unwrap_or(0);
    (lo, hi)
}

/// The circuit as Unicode text no wider than `width` columns (at least one
/// gate per section); long circuits wrap into sections headed by their gate
/// numbers.
pub fn draw_text(c: &Circuit, width: usize) -> String {
    let rows = order(c);
    let mut row_of = vec![0; c.width()];
    for (r, &l) in rows.iter().enumerate() {
        row_of[l] = r;
    }
    let first_ancilla = rows
        .iter()
        .position(|&l| c.lines()[l].role == Role::Ancilla);
    let labels: Vec<String> = rows.iter().map(|&l| label(c, l)).collect();
    let lw = labels.iter().map(|s| s.chars().count()).max().unwrap_or(0) + 1;
    let per = ((width.saturating_sub(lw + 2)) / 3).max(1);
    let gates = c.gates();
    let mut out = String::new();
    if gates.is_empty() {
        for (r, lab) in labels.iter().enumerate() {
            let _ = writeln!(
                out,
                "{lab:<lw$} {}",
                if Some(r) >= first_ancilla && first_ancilla.is_some() {
                    "┄┄┄"
                } else {
                    "───"
                }
            );
        }
        return out;
    }
    let sections = gates.len().div_ceil(per);
    for s in 0..sections {
        let from = s * per;
        let to = ((s + 1) * per).min(gates.len());
        if sections > 1 {
            let _ = writeln!(out, "gates {}-{} of {}", from + 1, to, gates.len());
        }
        for (r, lab) in labels.iter().enumerate() {
            if Some(r) == first_ancilla && r == 0 {
                let _ = writeln!(out, "ancillae");
            }
            let anc = first_ancilla.is_some_and(|a| r >= a);
            let wire = if anc { '┄' } else { '─' };
            let mut line = format!("{lab:<lw$} ");
            let gap_label = if Some(r + 1) == first_ancilla {
                "ancillae"
            } else {
                ""
            };
            let mut gap = format!("{gap_label:<lw$} ");
            for g in &gates[from..to] {
                let (lo, hi) = span(g, &row_of);
                let l = rows[r];
                let mark = if g.target().index() == l {
                    match g.kind() {
                        crate::circuit::Kind::Flip => '⊕',
                        crate::circuit::Kind::And => '∧',
                        crate::circuit::Kind::Measured => 'M',
                    }
                } else if let Some(ctl) = g.controls().iter().find(|x| x.line.index() == l) {
                    if ctl.positive {
                        '●'
                    } else {
                        '○'
                    }
                } else if r > lo && r < hi {
                    '┼'
                } else {
                    wire
                };
                line.push(wire);
                line.push(mark);
                line.push(wire);
                gap.push(' ');
                gap.push(if r >= lo && r < hi { '│' } else { ' ' });
                gap.push(' ');
            }
            let _ = writeln!(out, "{}", line.trim_end());
            if r + 1 < labels.len() {
                let _ = writeln!(out, "{}", gap.trim_end());
            }
        }
        if s + 1 < sections {
            out.push('\n');
        }
    }
    out
}

fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// The circuit as a standalone SVG document: one `<g class="gate">` element per
/// gate, line labels on the left, ancillae set apart with dashed wires.
pub fn draw_svg(c: &Circuit, title: &str) -> String {
    let rows = order(c);
    let mut y_of = vec![0f64; c.width()];
    let first_ancilla = rows
        .iter()
        .position(|&l| c.lines()[l].role == Role::Ancilla);
    let step = 30.0;
    let mut y = 50.0;
    for (r, &l) in rows.iter().enumerate() {
        if Some(r) == first_ancilla {
            y += 22.0;
        }
        y_of[l] = y;
        y += step;
    }
    let labels: Vec<String> = rows.iter().map(|&l| label(c, l)).collect();
    let left = 24.0 + 7.2 * labels.iter().map(|s| s.chars().count()).max().unwrap_or(4) as f64;
    let gap = 28.0;
    let width = left + gap * (c.gates().len() as f64 + 1.0) + 20.0;
    let height = y + 10.0;
    let mut s = String::new();
    let _ = writeln!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{width:.0}\" height=\"{height:.0}\" viewBox=\"0 0 {width:.0} {height:.0}\" font-family=\"monospace\" font-size=\"12\">"
    );
    let _ = writeln!(s, "  <title>{}</title>", escape(title));
    let _ = writeln!(
        s,
        "  <rect width=\"100%\" height=\"100%\" fill=\"#fdfcf8\"/>"
    );
    let _ = writeln!(
        s,
        "  <text x=\"12\" y=\"22\" font-size=\"14\" fill=\"#333\">{}</text>",
        escape(title)
    );
    let colour = |role: Role| match role {
        Role::Input => "#1f5f8b",
        Role::Output => "#a23e1d",
        Role::Data => "#2d6a3e",
        Role::Ancilla => "#8a8a8a",
    };
    if let Some(a) = first_ancilla {
        let yy = y_of[rows[a]] - 26.0;
        let _ = writeln!(
            s,
            "  <text x=\"12\" y=\"{yy:.0}\" font-size=\"11\" fill=\"#8a8a8a\">ancillae</text>"
        );
    }
    for (r, &l) in rows.iter().enumerate() {
        let info = &c.lines()[l];
        let yy = y_of[l];
        let dash = if info.role == Role::Ancilla {
            " stroke-dasharray=\"4 3\""
        } else {
            ""
        };
        let _ = writeln!(
            s,
            "  <text x=\"12\" y=\"{:.0}\" fill=\"{}\">{}</text>",
            yy + 4.0,
            colour(info.role),
            escape(&labels[r])
        );
        let _ = writeln!(
            s,
            "  <line class=\"wire\" x1=\"{left:.0}\" y1=\"{yy:.0}\" x2=\"{:.0}\" y2=\"{yy:.0}\" stroke=\"{}\"{dash}/>",
            width - 10.0,
            colour(info.role)
        );
    }
    for (k, g) in c.gates().iter().enumerate() {
        let x = left + gap * (k as f64 + 1.0);
        let ys: Vec<f64> = g
            .controls()
            .iter()
            .map(|c| y_of[c.line.index()])
            .chain(std::iter::once(y_of[g.target().index()]))
            .collect();
        let lo = ys.iter().cloned().fold(f64::MAX, f64::min);
        let hi = ys.iter().cloned().fold(f64::MIN, f64::max);
        let _ = writeln!(s, "  <g class=\"gate\" data-index=\"{k}\">");
        if hi > lo {
            let _ = writeln!(
                s,
                "    <line x1=\"{x:.0}\" y1=\"{lo:.0}\" x2=\"{x:.0}\" y2=\"{hi:.0}\" stroke=\"#222\"/>"
            );
        }
        for ctl in g.controls() {
            let fill = if ctl.positive { "#222" } else { "#fdfcf8" };
            let _ = writeln!(
                s,
                "    <circle cx=\"{x:.0}\" cy=\"{:.0}\" r=\"4.5\" fill=\"{fill}\" stroke=\"#222\"/>",
                y_of[ctl.line.index()]
            );
        }
        let ty = y_of[g.target().index()];
        let _ = writeln!(
            s,
            "    <circle cx=\"{x:.0}\" cy=\"{ty:.0}\" r=\"9\" fill=\"#fdfcf8\" stroke=\"#222\"/>"
        );
        let word = match g.kind() {
            crate::circuit::Kind::Flip => None,
            crate::circuit::Kind::And => Some("∧"),
            crate::circuit::Kind::Measured => Some("M"),
        };
        if let Some(w) = word {
            let _ = writeln!(
                s,
                "    <text x=\"{x:.0}\" y=\"{:.0}\" text-anchor=\"middle\" font-size=\"12\">{w}</text>",
                ty + 4.0
            );
        } else {
            let _ = writeln!(
                s,
                "    <path d=\"M{:.0} {ty:.0} H{:.0} M{x:.0} {:.0} V{:.0}\" stroke=\"#222\"/>",
                x - 9.0,
                x + 9.0,
                ty - 9.0,
                ty + 9.0
            );
        }
        let _ = writeln!(s, "  </g>");
    }
    s.push_str("</svg>\n");
    s
}
