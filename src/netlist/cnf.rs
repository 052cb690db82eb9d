//! DIMACS CNF reader: one output that is 1 exactly on the formula's satisfying assignments.

use super::{lines, text_error, tokens, Budget, Edge, Netlist, NodeKind, ReadError, ReadLimits};

/// The name of the one output of a netlist read from CNF.
const SATISFIED: &str = "satisfied";

/// Reads a DIMACS CNF formula (the DIMACS challenge format, "Satisfiability
/// Suggested Format", 1993) into a [`Netlist`] whose inputs are the variables
/// `1..=V` in order (named `x1 .. xV`) and whose one output, `satisfied`, is
/// the AND of one OR node per clause.
///
/// Accepted: `c` comment lines anywhere, one `p cnf V C` line before the
/// clauses, clauses of nonzero literals each ended by `0` (a clause may span
/// lines and a line may hold several), and a line `%` that ends the formula
/// early (as in the SATLIB files, common practice). Repeated and
/// complementary literals in a clause are kept as written.
///
/// Errors, each at its line and column: a missing or malformed `p` line, a
/// literal that is not an integer or whose variable exceeds `V`, more clauses
/// than `C` (at the first extra one), fewer (at the `p` line), a last clause
/// not ended by `0` (at the end of the file).
///
/// Time and memory O(size of the text); [`ReadLimits`]: `V` against the
/// inputs and `C + 1` against the nodes at the `p` line, literals against
/// the fanins as they come.
pub fn read_cnf(path: &str, text: &str, limits: &ReadLimits) -> Result<Netlist, ReadError> {
    let err = |offset: usize, msg: String| text_error(path, text, offset, msg);
    let mut budget = Budget::new(limits);
    // (V, C, offset of the `p` line)
    let mut header: Option<(usize, usize, usize)> = None;
    let mut net = Netlist::default();
    let mut clause: Vec<Edge> = Vec::new();
    let mut clause_start = 0;
    let mut clauses = 0usize;
    for (start, line) in lines(text) {
        let trimmed = line.trim_start();
        if trimmed.starts_with('c') {
            continue;
        }
        if trimmed.starts_with('%') {
            break;
        }
        if trimmed.starts_with('p') {
            let at = start + (line.len() - trimmed.len());
            if header.is_some() {
                return Err(err(at, "a second `p` line".into()));
            }
            let t: Vec<(usize, &str)> = tokens(text, line).collect();
            if t.len() < 2 || t[0].1 != "p" || t[1].1 != "cnf" {
                return Err(err(at, "expected `p cnf VARIABLES CLAUSES`".into()));
            }
            let number = |k: usize| -> Result<usize, ReadError> {
                let Some(&(o, s)) = t.get(k) else {
                    return Err(err(
                        start + line.len(),
                        "expected `p cnf VARIABLES CLAUSES`".into(),
                    ));
                };
                s.parse::<usize>()
                    .map_err(|_| err(o, format!("expected a count, found `{s}`")))
            };
            let (v, c) = (number(2)?, number(3)?);
            if let Some(&(o, s)) = t.get(4) {
                return Err(err(o, format!("unexpected `{s}` after the clause count")));
            }
            budget.inputs(v)?;
            budget.charge(c.saturating_add(1), 0)?;
            net = Netlist::new((1..=v).map(|k| format!("x{k}")).collect());
            net.reserve(c.saturating_add(1), 0);
            header = Some((v, c, at));
            continue;
        }
        for (o, tok) in tokens(text, line) {
            let Some((v, c, _)) = header else {
                return Err(err(o, "a clause before the `p cnf` line".into()));
            };
            let lit: i64 = tok.parse().map_err(|_| {
                err(
                    o,
                    format!("expected a literal (a nonzero integer or 0), found `{tok}`"),
                )
            })?;
            if clause.is_empty() {
                clause_start = o;
            }
            if lit == 0 {
                if clauses == c {
                    return Err(err(
                        clause_start,
                        format!("more clauses than the {c} of the `p` line"),
                    ));
                }
                budget.charge(0, clause.len())?;
                net.add_node(NodeKind::Or, &clause);
                clause.clear();
                clauses += 1;
                continue;
            }
            let var = lit.unsigned_abs();
            if var > v as u64 {
                return Err(err(
                    o,
                    format!("variable {var} is past the {v} of the `p` line"),
                ));
            }
            if clause.is_empty() && clauses == c {
                return Err(err(o, format!("more clauses than the {c} of the `p` line")));
            }
            clause.push(Edge::new(var as usize, lit < 0));
            // A clause longer than the fanin budget is refused before it grows.
            if budget.fanins + clause.len() > budget.max_fanins {
                budget.charge(0, clause.len())?;
            }
        }
    }
    let Some((_, c, at)) = header else {
        return Err(err(text.len(), "no `p cnf` line".into()));
    };
    if !clause.is_empty() {
        return Err(err(text.len(), "the last clause is not ended by 0".into()));
    }
    if clauses != c {
        return Err(err(
            at,
            format!("the `p` line announces {c} clauses, the file has {clauses}"),
        ));
    }
    budget.charge(0, c)?;
    let all: Vec<Edge> = (0..c)
        .map(|k| Edge::new(net.node_signal(k), false))
        .collect();
    let sat = net.add_node(NodeKind::And, &all);
    net.add_output(SATISFIED.to_string(), sat, None);
    Ok(net)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn error_at(text: &str) -> (usize, usize, String) {
        match read_cnf("t.cnf", text, &ReadLimits::default()) {
            Err(ReadError::Malformed(e)) => (e.location.line, e.location.column, e.message()),
            other => panic!("expected an error, got {other:?}"),
        }
    }

    #[test]
    #[allow(clippy::nonminimal_bool)] // the expected value is written clause by clause
    fn clauses_become_one_or_each() {
        // (x1 | !x2) & (x2 | x3) & x1 x1 ... with a clause across two lines.
        let n = read_cnf(
            "t.cnf",
            "c hi\np cnf 3 3\n1 -2 0 2\n 3 0\n1 1 0\n",
            &ReadLimits::default(),
        )
        .unwrap();
        assert_eq!(n.node_count(), 4);
        assert_eq!(
            n.node(2),
            (
                NodeKind::Or,
                &[Edge::new(1, false), Edge::new(1, false)][..]
            )
        );
        for m in 0..8u32 {
            let x = [m & 1 == 1, m & 2 == 2, m & 4 == 4];
            let want = (x[0] || !x[1]) && (x[1] || x[2]) && x[0];
            assert_eq!(n.eval(&x), vec![want]);
        }
        // SATLIB ending.
        let n = read_cnf("t.cnf", "p cnf 1 1\n-1 0\n%\n0\n", &ReadLimits::default()).unwrap();
        assert_eq!(n.eval(&[false]), vec![true]);
        // No clauses: always satisfied; an empty clause: never.
        let n = read_cnf("t.cnf", "p cnf 2 0\n", &ReadLimits::default()).unwrap();
        assert_eq!(n.eval(&[false, true]), vec![true]);
        let n = read_cnf("t.cnf", "p cnf 2 1\n0\n", &ReadLimits::default()).unwrap();
        assert_eq!(n.eval(&[true, true]), vec![false]);
    }

    #[test]
    fn malformed_formulas_are_located() {
        let cases: &[(&str, (usize, usize), &str)] = &[
            ("1 0\n", (1, 1), "before the `p cnf`"),
            ("p dnf 1 1\n", (1, 1), "expected `p cnf"),
            ("p cnf 1\n", (1, 8), "expected `p cnf"),
            ("p cnf x 1\n", (1, 7), "expected a count"),
            ("p cnf 1 1 9\n", (1, 11), "unexpected `9`"),
            ("p cnf 2 1\n1 3 0\n", (2, 3), "variable 3 is past the 2"),
            ("p cnf 2 1\n1 a 0\n", (2, 3), "expected a literal"),
            ("p cnf 2 1\n1 0\n 2 0\n", (3, 2), "more clauses than the 1"),
            ("p cnf 2 1\n1 0 0\n", (2, 5), "more clauses than the 1"),
            (
                "p cnf 2 3\n1 0\n",
                (1, 1),
                "announces 3 clauses, the file has 1",
            ),
            ("p cnf 2 1\n1 2", (2, 4), "not ended by 0"),
            ("c only\n", (2, 1), "no `p cnf` line"),
            ("p cnf 1 1\np cnf 1 1\n", (2, 1), "a second `p` line"),
        ];
        for &(text, (line, col), msg) in cases {
            let (l, c, m) = error_at(text);
            assert_eq!((l, c), (line, col), "{text:?}: {m}");
            assert!(m.contains(msg), "{text:?}: {m}");
        }
    }

    #[test]
    fn header_counts_are_limited_before_allocation() {
        let l = ReadLimits {
            max_inputs: 10,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_cnf("t", "p cnf 1000000000000 1\n", &l),
            Err(ReadError::Limit { what: "inputs", .. })
        ));
        let l = ReadLimits {
            max_nodes: 10,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_cnf("t", "p cnf 1 99999999999999\n", &l),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        let l = ReadLimits {
            max_fanins: 3,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_cnf("t", "p cnf 2 1\n1 2 1 2 0\n", &l),
            Err(ReadError::Limit { what: "fanins", .. })
        ));
    }
}
