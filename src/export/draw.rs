//! Circuit drawings: Unicode text for the terminal, SVG for papers and slides.
//!
//! Lines are labelled with register, index, spec name and role; ancillae are
//! drawn below a labelled gap with a dotted wire. A filled dot is a control on
//! 1, a hollow one a control on 0, a circled plus the target, and a vertical
//! bar joins them. A temporary AND's target is `∧`, a measured uncompute's
//! `M`. A phase oracle's wrapper is drawn on its line: `X`, `H` before the
//! gates and `H`, `X` after. The terminal drawing has one column per gate;
//! the SVG puts gates whose spans (the rows from their highest to their
//! lowest line) are disjoint in one column, as early as the gates before
//! them allow, and ends with a legend of its symbols.

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

/// One column of a drawing: a gate, or a step of the phase wrapper (`X` or
/// `H` on the phase line).
enum Column<'a> {
    Gate(&'a Gate),
    Wrap(char),
}

/// The columns in order: the wrapper's `X`, `H`, the gates, `H`, `X`.
fn columns(c: &Circuit) -> Vec<Column<'_>> {
    let wrap = c.phase().is_some();
    let mut v = Vec::with_capacity(c.gates().len() + 4);
    if wrap {
        v.extend([Column::Wrap('X'), Column::Wrap('H')]);
    }
    v.extend(c.gates().iter().map(Column::Gate));
    if wrap {
        v.extend([Column::Wrap('H'), Column::Wrap('X')]);
    }
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
    let gates = columns(c);
    let phase_row = c.phase().map(|p| row_of[p.index()]);
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
            // Numbered by gate: the wrapper's columns are not gates.
            let before = |k: usize| {
                gates[..k]
                    .iter()
                    .filter(|c| matches!(c, Column::Gate(_)))
                    .count()
            };
            let _ = writeln!(
                out,
                "gates {}-{} of {}",
                before(from) + 1,
                before(to),
                c.gates().len()
            );
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
            for col in &gates[from..to] {
                let g = match col {
                    Column::Gate(g) => *g,
                    Column::Wrap(w) => {
                        line.push(wire);
                        line.push(if Some(r) == phase_row { *w } else { wire });
                        line.push(wire);
                        gap.push_str("   ");
                        continue;
                    }
                };
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
    let (column, used) = layers(c, &rows);
    let legend = legend(c);
    let width = (left + gap * (used as f64 + 1.0) + 20.0).max(legend.1);
    let legend_y = y + 14.0;
    let height = legend_y + 24.0;
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
    let wrap = |s: &mut String, col: usize, word: char| {
        let Some(p) = c.phase() else { return };
        let (x, yy) = (left + gap * (col as f64 + 1.0), y_of[p.index()]);
        let _ = writeln!(
            s,
            "  <g class=\"wrap\"><rect x=\"{:.0}\" y=\"{:.0}\" width=\"18\" height=\"18\" fill=\"#fdfcf8\" stroke=\"#222\"/><text x=\"{x:.0}\" y=\"{:.0}\" text-anchor=\"middle\">{word}</text></g>",
            x - 9.0,
            yy - 9.0,
            yy + 4.0
        );
    };
    let lead = if c.phase().is_some() { 2 } else { 0 };
    wrap(&mut s, 0, 'X');
    wrap(&mut s, 1, 'H');
    for (k, g) in c.gates().iter().enumerate() {
        let x = left + gap * ((lead + column[k]) as f64 + 1.0);
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
    let end = lead + used.saturating_sub(2 * lead);
    wrap(&mut s, end, 'H');
    wrap(&mut s, end + 1, 'X');
    let _ = writeln!(
        s,
        "  <g class=\"legend\" transform=\"translate(12 {legend_y:.0})\" font-size=\"11\" fill=\"#333\">\n{}  </g>",
        legend.0
    );
    s.push_str("</svg>\n");
    s
}

/// The column of each gate and the number of columns (the phase wrapper's
/// four included): a gate goes in the first column after every earlier gate
/// whose span of rows meets its own, so gates on disjoint spans share one.
fn layers(c: &Circuit, rows: &[usize]) -> (Vec<usize>, usize) {
    let mut row_of = vec![0; c.width()];
    for (r, &l) in rows.iter().enumerate() {
        row_of[l] = r;
    }
    let mut free = vec![0usize; rows.len()];
    let mut column = Vec::with_capacity(c.gates().len());
    let mut used = 0;
    for g in c.gates() {
        let (lo, hi) = span(g, &row_of);
        let k = free[lo..=hi].iter().copied().max().unwrap_or(0);
        free[lo..=hi].iter_mut().for_each(|f| *f = k + 1);
        column.push(k);
        used = used.max(k + 1);
    }
    let wrap = if c.phase().is_some() { 4 } else { 0 };
    (column, used + wrap)
}

/// The legend's SVG elements (one symbol and its meaning each, for the
/// symbols the drawing uses) and the width it takes.
fn legend(c: &Circuit) -> (String, f64) {
    let kinds = |k: crate::circuit::Kind| c.gates().iter().any(|g| g.kind() == k);
    let mut items: Vec<(&str, &str)> = vec![
        ("●", "control on 1"),
        ("○", "control on 0"),
        ("⊕", "target (flip)"),
    ];
    if kinds(crate::circuit::Kind::And) {
        items.push(("∧", "temporary AND"));
    }
    if kinds(crate::circuit::Kind::Measured) {
        items.push(("M", "measured uncompute"));
    }
    if c.phase().is_some() {
        items.push(("X H", "phase wrapper"));
    }
    if c.lines().iter().any(|l| l.role == Role::Ancilla) {
        items.push(("┄", "ancilla, starts and ends at 0"));
    }
    let mut s = String::new();
    let mut x = 0.0;
    for (mark, meaning) in items {
        let _ = writeln!(
            s,
            "    <text x=\"{x:.0}\" y=\"0\"><tspan font-size=\"13\">{mark}</tspan> {}</text>",
            escape(meaning)
        );
        x += 7.0 * (mark.chars().count() + meaning.chars().count() + 4) as f64;
    }
    (s, x + 24.0)
}
