//! PLA reader (the Berkeley two-level format): cubes, output planes of each `.type`, don't-cares kept apart.

use super::{
    input_name, lines, output_name, over, text_error, tokens, Budget, Edge, Netlist, NodeKind,
    ReadError, ReadLimits,
};

/// What the output plane's characters mean (`.type`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum PlaType {
    F,
    Fd,
    Fr,
    Fdr,
}

impl PlaType {
    fn has_off(self) -> bool {
        matches!(self, PlaType::Fr | PlaType::Fdr)
    }
    fn has_dc(self) -> bool {
        matches!(self, PlaType::Fd | PlaType::Fdr)
    }
    /// Whether output-plane character `c` puts the cube in a set this type reads.
    fn counts(self, c: u8) -> bool {
        match c {
            b'1' => true,
            b'0' => self.has_off(),
            b'-' => self.has_dc(),
            _ => false,
        }
    }
}

/// Reads a PLA file in the Berkeley two-level format (as documented for
/// espresso: R. Rudell, "Multiple-valued logic minimization for PLA
/// synthesis", UC Berkeley, 1986, and the espresso(5) manual page; the
/// meanings below are from memory of that page) into a [`Netlist`].
///
/// Accepted: `.i N`, `.o M` (both before the first cube), `.ilb` and `.ob`
/// names (default `x0 ..` and `y0 ..`), `.p P` (checked against the cubes
/// found), `.type f|fd|fr|fdr` (before the first cube; default `fd`), `.e` or
/// `.end` (the rest of the file is ignored), `#` comments, and cube lines of
/// `N` input characters `0 1 -` then `M` output characters `1 0 - ~` (spaces,
/// tabs and `|` between characters are ignored).
///
/// Each cube line becomes one AND node of its input literals (all cubes come
/// first, in file order). For output `j`, `on` is the OR of the cubes with a
/// `1` at `j`; then by type:
/// - `f`: value `on`; `0`, `-` and `~` mean nothing; no don't-care.
/// - `fd`: value `on`; `-` puts the cube in the don't-care set, whose OR is
///   the don't-care literal (none when no cube has `-`); `0`, `~` mean nothing.
/// - `fr`: value `on`; `0` puts the cube in the off-set `off`; a pattern in
///   neither set is a don't-care: the don't-care literal is `!(on | off)`.
/// - `fdr`: as `fr`, and `-` adds the cube to the don't-care set: the literal
///   is the OR of those cubes and `!(on | off)`.
///
/// Overlaps are not checked: a pattern in the on-set and the don't-care set
/// is a don't-care; one in the on-set and the off-set evaluates to 1.
///
/// Errors, each at its line and column: a repeated or late header, a count
/// that is not a number, `.ilb`/`.ob` with the wrong number of names, a cube
/// before `.i`/`.o`, a cube character not allowed in its plane, a cube with
/// too many or too few characters, an unsupported directive (`.phase`,
/// `.mv`, ...), a `.p` count that differs from the cubes found.
///
/// Time O(size of the text); memory O(size of the text + netlist);
/// [`ReadLimits`]: `.i` against the inputs, `.o` and every cube against the
/// nodes, literals against the fanins, before they are stored.
pub fn read_pla(path: &str, text: &str, limits: &ReadLimits) -> Result<Netlist, ReadError> {
    let err = |offset: usize, msg: String| text_error(path, text, offset, msg);
    let mut budget = Budget::new(limits);
    let mut inputs: Option<usize> = None;
    let mut outputs: Option<usize> = None;
    let mut ilb: Option<Vec<String>> = None;
    let mut ob: Option<Vec<String>> = None;
    let mut declared_cubes: Option<(usize, usize)> = None;
    let mut ty = PlaType::Fd;
    let mut net: Option<Netlist> = None;
    // The output plane of every cube, back to back (M bytes each).
    let mut planes: Vec<u8> = Vec::new();
    let mut cubes = 0usize;
    let mut literals: Vec<Edge> = Vec::new();
    for (start, line) in lines(text) {
        let line = match line.find('#') {
            Some(h) => &line[..h],
            None => line,
        };
        let trimmed = line.trim_start();
        if trimmed.is_empty() {
            continue;
        }
        let at = start + (line.len() - trimmed.len());
        if trimmed.starts_with('.') {
            let t: Vec<(usize, &str)> = tokens(text, line).collect();
            let head = t[0].1;
            let count = || -> Result<usize, ReadError> {
                let Some(&(o, s)) = t.get(1) else {
                    return Err(err(start + line.len(), format!("`{head}` needs a number")));
                };
                if let Some(&(o2, extra)) = t.get(2) {
                    return Err(err(o2, format!("unexpected `{extra}` after the number")));
                }
                s.parse::<usize>()
                    .map_err(|_| err(o, format!("expected a number, found `{s}`")))
            };
            let before_cubes = |what: &str| -> Result<(), ReadError> {
                if cubes > 0 || net.is_some() {
                    Err(err(at, format!("`{what}` must come before the first cube")))
                } else {
                    Ok(())
                }
            };
            match head {
                ".i" => {
                    before_cubes(".i")?;
                    if inputs.is_some() {
                        return Err(err(at, "a second `.i`".into()));
                    }
                    let n = count()?;
                    budget.inputs(n)?;
                    inputs = Some(n);
                }
                ".o" => {
                    before_cubes(".o")?;
                    if outputs.is_some() {
                        return Err(err(at, "a second `.o`".into()));
                    }
                    let m = count()?;
                    // Every output gets at least one node.
                    over("nodes", m, budget.max_nodes)?;
                    outputs = Some(m);
                }
                ".ilb" | ".ob" => {
                    let (want, what, slot) = if head == ".ilb" {
                        (inputs, ".i", &mut ilb)
                    } else {
                        (outputs, ".o", &mut ob)
                    };
                    let Some(want) = want else {
                        return Err(err(at, format!("`{head}` before `{what}`")));
                    };
                    if slot.is_some() {
                        return Err(err(at, format!("a second `{head}`")));
                    }
                    let names = &t[1..];
                    if names.len() != want {
                        let o = names.get(want).map_or(start + line.len(), |n| n.0);
                        return Err(err(
                            o,
                            format!("`{head}` has {} names, `{what}` says {want}", names.len()),
                        ));
                    }
                    *slot = Some(names.iter().map(|n| n.1.to_string()).collect());
                }
                ".p" => {
                    if declared_cubes.is_some() {
                        return Err(err(at, "a second `.p`".into()));
                    }
                    declared_cubes = Some((count()?, at));
                }
                ".type" => {
                    before_cubes(".type")?;
                    ty = match t.get(1).map(|x| x.1) {
                        Some("f") => PlaType::F,
                        Some("fd") => PlaType::Fd,
                        Some("fr") => PlaType::Fr,
                        Some("fdr") => PlaType::Fdr,
                        _ => {
                            let o = t.get(1).map_or(start + line.len(), |x| x.0);
                            return Err(err(o, "expected `.type f`, `fd`, `fr` or `fdr`".into()));
                        }
                    };
                    if let Some(&(o, extra)) = t.get(2) {
                        return Err(err(o, format!("unexpected `{extra}` after the type")));
                    }
                }
                ".e" | ".end" => break,
                _ => return Err(err(at, format!("unsupported PLA directive `{head}`"))),
            }
            continue;
        }
        let (Some(n), Some(m)) = (inputs, outputs) else {
            return Err(err(at, "a cube before `.i` and `.o`".into()));
        };
        let net = net.get_or_insert_with(|| Netlist::new((0..n).map(input_name).collect()));
        literals.clear();
        let mut seen = 0usize;
        let mut counted = 0usize;
        for (i, ch) in line.char_indices() {
            if ch == ' ' || ch == '\t' || ch == '|' {
                continue;
            }
            let o = start + i;
            if seen < n {
                match ch {
                    '1' => literals.push(Edge::new(1 + seen, false)),
                    '0' => literals.push(Edge::new(1 + seen, true)),
                    '-' => {}
                    _ => {
                        return Err(err(
                            o,
                            format!("bad input plane character `{ch}` (expected 0, 1 or -)"),
                        ))
                    }
                }
            } else if seen < n + m {
                if !matches!(ch, '0' | '1' | '-' | '~') {
                    return Err(err(
                        o,
                        format!("bad output plane character `{ch}` (expected 1, 0, - or ~)"),
                    ));
                }
                counted += ty.counts(ch as u8) as usize;
                planes.push(ch as u8);
            } else {
                return Err(err(
                    o,
                    format!("the cube has more than the {n} + {m} characters of `.i` and `.o`"),
                ));
            }
            seen += 1;
        }
        if seen < n + m {
            return Err(err(
                start + line.len(),
                format!("the cube has {seen} characters, `.i` and `.o` say {n} + {m}"),
            ));
        }
        budget.charge(1, literals.len() + counted)?;
        net.add_node(NodeKind::And, &literals);
        cubes += 1;
    }
    let end = text.len();
    let Some(n) = inputs else {
        return Err(err(end, "missing `.i`".into()));
    };
    let Some(m) = outputs else {
        return Err(err(end, "missing `.o`".into()));
    };
    if let Some((p, at)) = declared_cubes {
        if p != cubes {
            return Err(err(
                at,
                format!("`.p` says {p} cubes, the file has {cubes}"),
            ));
        }
    }
    // Nodes and extra fanins (beyond the cubes' plane entries) per output.
    let (nodes, fanins) = match ty {
        PlaType::F => (1, 0),
        PlaType::Fd => (2, 0),
        PlaType::Fr => (3, 2),
        PlaType::Fdr => (4, 3),
    };
    budget.charge(nodes * m, fanins * m)?;
    let mut net = net.unwrap_or_else(|| Netlist::new((0..n).map(input_name).collect()));
    if let Some(names) = ilb {
        net.inputs = names;
    }
    let out_names = ob.unwrap_or_else(|| (0..m).map(output_name).collect());
    let cube = |c: usize| Edge::new(1 + n + c, false);
    let mut fanins: Vec<Edge> = Vec::new();
    let select = |j: usize, ch: u8, fanins: &mut Vec<Edge>| {
        fanins.clear();
        fanins.extend((0..cubes).filter(|&c| planes[c * m + j] == ch).map(cube));
    };
    for (j, name) in out_names.into_iter().enumerate() {
        select(j, b'1', &mut fanins);
        let on = net.add_node(NodeKind::Or, &fanins);
        let dont_care = if ty.has_off() {
            select(j, b'0', &mut fanins);
            let off = net.add_node(NodeKind::Or, &fanins);
            let unspecified = net.add_node(NodeKind::Or, &[on, off]).inverted();
            if ty.has_dc() {
                select(j, b'-', &mut fanins);
                fanins.push(unspecified);
                Some(net.add_node(NodeKind::Or, &fanins))
            } else {
                Some(unspecified)
            }
        } else if ty.has_dc() {
            select(j, b'-', &mut fanins);
            (!fanins.is_empty()).then(|| net.add_node(NodeKind::Or, &fanins))
        } else {
            None
        };
        net.add_output(name, on, dont_care);
    }
    Ok(net)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Netlist {
        read_pla("t.pla", text, &ReadLimits::default()).unwrap()
    }

    fn error_at(text: &str) -> (usize, usize, String) {
        match read_pla("t.pla", text, &ReadLimits::default()) {
            Err(ReadError::Malformed(e)) => (e.location.line, e.location.column, e.message()),
            other => panic!("expected an error, got {other:?}"),
        }
    }

    /// (value, don't-care) of output 0 on each of the 4 patterns of 2 inputs.
    fn table(n: &Netlist) -> Vec<(bool, bool)> {
        let words = [0b1010u64, 0b1100];
        let v = n.simulate_words(&words);
        let o = &n.outputs()[0];
        let val = o.edge.word(&v);
        let dc = o.dont_care.map_or(0, |d| d.word(&v));
        (0..4)
            .map(|p| (val >> p & 1 == 1, dc >> p & 1 == 1))
            .collect()
    }

    #[test]
    fn each_type_means_what_espresso_says() {
        // Cubes: a&b -> 1, !a&b -> 0, a&!b -> -, and !a&!b uncovered.
        // Pattern p: a = bit 0, b = bit 1.
        let body = "11 1\n01 0\n10 -\n.e\n";
        let n = read(&format!(".i 2\n.o 1\n.type f\n{body}"));
        assert_eq!(
            table(&n),
            [
                (false, false),
                (false, false),
                (false, false),
                (true, false)
            ]
        );
        let n = read(&format!(".i 2\n.o 1\n.type fd\n{body}"));
        assert_eq!(
            table(&n),
            [(false, false), (false, true), (false, false), (true, false)]
        );
        let n = read(&format!(".i 2\n.o 1\n.type fr\n{body}"));
        // Care only about on (p=3) and off (p=2).
        assert_eq!(
            table(&n),
            [(false, true), (false, true), (false, false), (true, false)]
        );
        let n = read(&format!(".i 2\n.o 1\n.type fdr\n{body}"));
        assert_eq!(
            table(&n),
            [(false, true), (false, true), (false, false), (true, false)]
        );
        // Default type fd; `~` means nothing.
        let n = read(".i 2\n.o 2\n.ilb a b\n.ob f g\n.p 2\n11 1~\n-0 ~1\n.e\n");
        assert_eq!(n.inputs(), ["a", "b"]);
        assert_eq!(n.outputs()[1].name, "g");
        for p in 0..4u32 {
            let (a, b) = (p & 1 == 1, p & 2 == 2);
            assert_eq!(n.eval(&[a, b]), vec![a && b, !b]);
        }
        // fd without any `-`: no don't-care literal.
        assert_eq!(n.outputs()[0].dont_care, None);
    }

    #[test]
    fn cubes_are_transcribed() {
        let n = read(".i 3\n.o 1\n.type f\n1-0 | 1\n");
        assert_eq!(
            n.node(0),
            (
                NodeKind::And,
                &[Edge::new(1, false), Edge::new(3, true)][..]
            )
        );
        assert_eq!(n.node(1), (NodeKind::Or, &[Edge::new(4, false)][..]));
        assert_eq!(n.inputs(), ["x0", "x1", "x2"]);
        assert_eq!(n.outputs()[0].name, "y0");
    }

    #[test]
    fn malformed_plas_are_located() {
        let cases: &[(&str, (usize, usize), &str)] = &[
            ("11 1\n", (1, 1), "a cube before `.i` and `.o`"),
            (
                ".i 2\n.o 1\n1x 1\n",
                (3, 2),
                "bad input plane character `x`",
            ),
            (
                ".i 2\n.o 1\n11 2\n",
                (3, 4),
                "bad output plane character `2`",
            ),
            (".i 2\n.o 1\n11 11\n", (3, 5), "more than the 2 + 1"),
            (".i 2\n.o 1\n11\n", (3, 3), "the cube has 2 characters"),
            (".i 2\n.o 1\n.ilb a\n", (3, 7), "`.ilb` has 1 names"),
            (".i 2\n.o 1\n.ob a b\n", (3, 7), "`.ob` has 2 names"),
            (".i two\n", (1, 4), "expected a number"),
            (".i\n", (1, 3), "needs a number"),
            (".i 2\n.i 2\n", (2, 1), "a second `.i`"),
            (
                ".i 2\n.o 1\n11 1\n.type fr\n",
                (4, 1),
                "before the first cube",
            ),
            (".i 2\n.o 1\n.type fx\n", (3, 7), "expected `.type f`"),
            (
                ".i 2\n.o 1\n.phase 1\n",
                (3, 1),
                "unsupported PLA directive `.phase`",
            ),
            (
                ".i 2\n.o 1\n.p 2\n11 1\n",
                (3, 1),
                "`.p` says 2 cubes, the file has 1",
            ),
            (".o 1\n", (2, 1), "missing `.i`"),
        ];
        for &(text, (line, col), msg) in cases {
            let (l, c, m) = error_at(text);
            assert_eq!((l, c), (line, col), "{text:?}: {m}");
            assert!(m.contains(msg), "{text:?}: {m}");
        }
    }

    #[test]
    fn limits_hold() {
        let l = ReadLimits {
            max_nodes: 3,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_pla("t", ".i 1\n.o 2\n1 11\n0 11\n", &l),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        assert!(matches!(
            read_pla("t", ".i 1\n.o 99999999999\n", &l),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        let l = ReadLimits {
            max_inputs: 3,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_pla("t", ".i 4\n", &l),
            Err(ReadError::Limit { what: "inputs", .. })
        ));
    }
}
