//! AIGER reader, ASCII (`aag`) and binary (`aig`), combinational: inputs, outputs, ANDs, symbols, comments.

use super::{
    byte_error, input_name, output_name, over, Budget, Edge, Netlist, NodeKind, ReadError,
    ReadLimits,
};

/// Reads a combinational AIGER file, ASCII (`aag`) or binary (`aig`), chosen
/// by its header (A. Biere, "The AIGER And-Inverter Graph (AIG) Format
/// Version 20071012", and the 1.9 additions, Johannes Kepler University
/// Linz) into a [`Netlist`] of two-input AND nodes.
///
/// The header is `aag|aig M I L O A`, optionally followed by the AIGER 1.9
/// counts `B C J F`, which must be 0 (bad-state properties, invariant
/// constraints, justice and fairness are for sequential checking). `L` must
/// be 0: latches are refused. Inputs are signals `1..=I` in file order; each
/// AND becomes one node with its two operands as written; output literals are
/// kept as they are (an output may be a constant, an input or complemented).
/// The symbol table names inputs (`i<k> name`) and outputs (`o<k> name`);
/// unnamed ones get `x<k>` and `y<k>`. The comment section (a `c` line) and
/// everything after it is ignored.
///
/// ASCII: literals may be in any order and need not be dense; ANDs are sorted
/// topologically (iteratively) and a cycle is refused at an AND line on it.
/// Binary: `M` must be `I + A`, ANDs are implicit `2(I+1+k)` with two
/// LEB128-style deltas each; every delta is checked (a zero or underflowing
/// delta, a delta of more than 5 bytes, the file ending inside the section).
///
/// Errors name the line and column of the offending byte (for the binary
/// section, lines are counted by newline bytes and columns in bytes).
///
/// Time O(size of the file + M); memory O(M + netlist); [`ReadLimits`]: `I`
/// against the inputs, `A` against the nodes and `2A` against the fanins,
/// `M` against inputs + nodes, all at the header before anything is allocated.
pub fn read_aiger(path: &str, bytes: &[u8], limits: &ReadLimits) -> Result<Netlist, ReadError> {
    let mut cur = Cursor {
        path,
        bytes,
        pos: 0,
    };
    let Some((_, header)) = cur.line() else {
        return Err(cur.err(0, "empty file: expected an AIGER header `aag M I L O A`"));
    };
    let toks = split(bytes, header);
    let binary = match toks.first().map(|t| t.1) {
        Some(b"aag") => false,
        Some(b"aig") => true,
        _ => {
            return Err(cur.err(
                0,
                "expected an AIGER header `aag M I L O A` or `aig M I L O A`",
            ))
        }
    };
    const FIELDS: [&str; 9] = ["M", "I", "L", "O", "A", "B", "C", "J", "F"];
    if toks.len() < 6 {
        return Err(cur.err(
            offset_after(bytes, header),
            format!(
                "the header needs M I L O A, found {} of them",
                toks.len() - 1
            ),
        ));
    }
    if toks.len() > 10 {
        return Err(cur.err(toks[10].0, "unexpected field after M I L O A B C J F"));
    }
    let mut h = [0u64; 9];
    for (k, &(o, t)) in toks[1..].iter().enumerate() {
        h[k] = number(t).ok_or_else(|| {
            cur.err(
                o,
                format!("expected the count {}, found `{}`", FIELDS[k], show(t)),
            )
        })?;
    }
    let [m, i, l, o, a, ..] = h;
    if l != 0 {
        return Err(cur.err(
            toks[3].0,
            format!("{l} latches: only combinational AIGER (L = 0) is read"),
        ));
    }
    for k in 5..toks.len() - 1 {
        if h[k] != 0 {
            let what = [
                "bad-state properties",
                "invariant constraints",
                "justice properties",
                "fairness constraints",
            ][k - 5];
            return Err(cur.err(
                toks[1 + k].0,
                format!(
                    "{} = {} {what}: only combinational AIGER (0) is read",
                    FIELDS[k], h[k]
                ),
            ));
        }
    }
    let mut budget = Budget::new(limits);
    let size = |x: u64| usize::try_from(x).unwrap_or(usize::MAX);
    budget.inputs(size(i))?;
    budget.charge(size(a), size(a).saturating_mul(2))?;
    if binary && m != i + a {
        return Err(cur.err(
            toks[1].0,
            format!(
                "binary AIGER needs M = I + L + A = {}, found M = {m}",
                i + a
            ),
        ));
    }
    over(
        "AIGER variables (M)",
        size(m),
        budget.max_inputs.saturating_add(budget.max_nodes),
    )?;
    let (m, i, o, a) = (m as usize, i as usize, size(o), a as usize);
    let max_lit = 2 * m as u64 + 1;
    let mut net = Netlist::new((0..i).map(input_name).collect());

    if binary {
        let outputs = read_outputs(&mut cur, o, max_lit)?;
        net.reserve(a, 2 * a);
        for k in 0..a {
            let lhs = 2 * (i + 1 + k) as u64;
            let at = cur.pos;
            let d0 = cur.delta()?;
            if d0 == 0 || d0 > lhs {
                return Err(cur.err(
                    at,
                    format!("AND {k} (literal {lhs}): first delta {d0} must be in 1..={lhs}"),
                ));
            }
            let rhs0 = lhs - d0;
            let at = cur.pos;
            let d1 = cur.delta()?;
            if d1 > rhs0 {
                return Err(cur.err(
                    at,
                    format!("AND {k} (literal {lhs}): second delta {d1} is past the first operand {rhs0}"),
                ));
            }
            let rhs1 = rhs0 - d1;
            // rhs0 < lhs, so both operands are inputs or earlier ANDs, and
            // in binary AIGER variable v is signal v.
            net.add_node(NodeKind::And, &[lit_edge(rhs0), lit_edge(rhs1)]);
        }
        let edges = outputs
            .iter()
            .map(|&(lit, _)| lit_edge(lit as u64))
            .collect();
        finish(&mut cur, net, edges)
    } else {
        // def[v]: 0 undefined, 1 + j input j, 1 + i + k AND k.
        let mut def = vec![0u32; m + 1];
        for j in 0..i {
            let (_, t) = cur.fields(format_args!("input {j} of {i}"), 1)?;
            let lit = literal(&cur, t[0], max_lit)?;
            if lit < 2 || lit & 1 == 1 {
                return Err(cur.err(
                    t[0].0,
                    format!("input literal {lit} must be even and at least 2"),
                ));
            }
            let v = (lit >> 1) as usize;
            if def[v] != 0 {
                return Err(cur.err(t[0].0, format!("variable {v} is defined twice")));
            }
            def[v] = 1 + j as u32;
        }
        let outputs = read_outputs(&mut cur, o, max_lit)?;
        let mut ands: Vec<[u32; 3]> = Vec::with_capacity(a.min(bytes.len() / 6));
        let mut and_line: Vec<usize> = Vec::with_capacity(a.min(bytes.len() / 6));
        for k in 0..a {
            let (ls, t) = cur.fields(format_args!("AND {k} of {a}"), 3)?;
            let lhs = literal(&cur, t[0], max_lit)?;
            let rhs0 = literal(&cur, t[1], max_lit)?;
            let rhs1 = literal(&cur, t[2], max_lit)?;
            if lhs < 2 || lhs & 1 == 1 {
                return Err(cur.err(
                    t[0].0,
                    format!("AND literal {lhs} must be even and at least 2"),
                ));
            }
            let v = (lhs >> 1) as usize;
            if def[v] != 0 {
                return Err(cur.err(t[0].0, format!("variable {v} is defined twice")));
            }
            def[v] = (1 + i + k) as u32;
            ands.push([lhs as u32, rhs0 as u32, rhs1 as u32]);
            and_line.push(ls);
        }
        let undefined = |lit: u32| lit >= 2 && def[(lit >> 1) as usize] == 0;
        for &(lit, at) in &outputs {
            if undefined(lit) {
                return Err(cur.err(
                    at,
                    format!(
                        "output literal {lit}: variable {} is neither an input nor an AND",
                        lit >> 1
                    ),
                ));
            }
        }
        for (k, and) in ands.iter().enumerate() {
            if let Some(side) = (1..3).find(|&s| undefined(and[s])) {
                let line = line_at(bytes, and_line[k]);
                let at = split(bytes, line)[side].0;
                return Err(cur.err(
                    at,
                    format!(
                        "literal {}: variable {} is neither an input nor an AND",
                        and[side],
                        and[side] >> 1
                    ),
                ));
            }
        }
        let order = sort(&cur, &ands, &def, i, &and_line)?;
        // `def` becomes the signal of each variable: input j is already
        // 1 + j, and each AND gets its node's signal in topological order.
        let mut signal = def;
        for s in signal.iter_mut().filter(|s| **s as usize > i) {
            *s = 0;
        }
        net.reserve(a, 2 * a);
        let edge = |signal: &[u32], lit: u32| {
            Edge::new(signal[(lit >> 1) as usize] as usize, lit & 1 == 1)
        };
        for &k in &order {
            let [lhs, r0, r1] = ands[k as usize];
            let e = net.add_node(NodeKind::And, &[edge(&signal, r0), edge(&signal, r1)]);
            signal[(lhs >> 1) as usize] = e.signal() as u32;
        }
        let edges = outputs.iter().map(|&(lit, _)| edge(&signal, lit)).collect();
        finish(&mut cur, net, edges)
    }
}

/// The edge of a binary-AIGER literal (there variable `v` is signal `v`).
fn lit_edge(lit: u64) -> Edge {
    Edge::new((lit >> 1) as usize, lit & 1 == 1)
}

/// The AND indices in topological order, by iterative depth-first search.
fn sort(
    cur: &Cursor,
    ands: &[[u32; 3]],
    def: &[u32],
    inputs: usize,
    and_line: &[usize],
) -> Result<Vec<u32>, ReadError> {
    let and_of = |lit: u32| {
        let d = def[(lit >> 1) as usize] as usize;
        (d > inputs).then(|| (d - 1 - inputs) as u32)
    };
    // 0 new, 1 on the path, 2 done.
    let mut state = vec![0u8; ands.len()];
    let mut order = Vec::with_capacity(ands.len());
    let mut stack: Vec<(u32, u8)> = Vec::new();
    for root in 0..ands.len() {
        if state[root] != 0 {
            continue;
        }
        state[root] = 1;
        stack.push((root as u32, 1));
        while let Some(top) = stack.last_mut() {
            let (k, side) = (top.0 as usize, top.1 as usize);
            if side < 3 {
                top.1 += 1;
                let Some(child) = and_of(ands[k][side]) else {
                    continue;
                };
                match state[child as usize] {
                    0 => {
                        state[child as usize] = 1;
                        stack.push((child, 1));
                    }
                    1 => {
                        let c = child as usize;
                        return Err(cur.err(
                            and_line[c],
                            format!(
                                "combinational cycle through the AND of literal {}",
                                ands[c][0]
                            ),
                        ));
                    }
                    _ => {}
                }
            } else {
                state[k] = 2;
                order.push(k as u32);
                stack.pop();
            }
        }
    }
    Ok(order)
}

/// Reads `count` output lines: each literal with its offset.
fn read_outputs(
    cur: &mut Cursor,
    count: usize,
    max_lit: u64,
) -> Result<Vec<(u32, usize)>, ReadError> {
    let mut outputs = Vec::with_capacity(count.min(cur.bytes.len() / 2));
    for k in 0..count {
        let (_, t) = cur.fields(format_args!("output {k} of {count}"), 1)?;
        let lit = literal(cur, t[0], max_lit)?;
        outputs.push((lit as u32, t[0].0));
    }
    Ok(outputs)
}

/// Reads the symbol table and the comment section, then adds the outputs.
fn finish(cur: &mut Cursor, mut net: Netlist, edges: Vec<Edge>) -> Result<Netlist, ReadError> {
    let mut out_names: Vec<String> = (0..edges.len()).map(output_name).collect();
    let mut named_in = vec![false; net.input_count()];
    let mut named_out = vec![false; edges.len()];
    while let Some((ls, line)) = cur.line() {
        if line.is_empty() {
            continue;
        }
        let kind = line[0];
        if kind == b'c' && line.get(1).is_none_or(|b| !b.is_ascii_digit()) {
            break;
        }
        if !b"iolbcjf".contains(&kind) {
            return Err(cur.err(
                ls,
                "expected a symbol (`i<k> name`, `o<k> name`) or the comment section (`c`)",
            ));
        }
        let digits = line[1..].iter().take_while(|b| b.is_ascii_digit()).count();
        let position = number(&line[1..1 + digits])
            .ok_or_else(|| cur.err(ls + 1, "expected a position after the symbol's kind"))?;
        if line.get(1 + digits) != Some(&b' ') {
            return Err(cur.err(
                ls + 1 + digits,
                "expected a space and a name after the position",
            ));
        }
        let name = String::from_utf8_lossy(&line[2 + digits..]).into_owned();
        let (count, what, names, seen): (
            usize,
            &str,
            Option<&mut Vec<String>>,
            Option<&mut Vec<bool>>,
        ) = match kind {
            b'i' => (
                net.input_count(),
                "input",
                Some(&mut net.inputs),
                Some(&mut named_in),
            ),
            b'o' => (
                edges.len(),
                "output",
                Some(&mut out_names),
                Some(&mut named_out),
            ),
            b'l' => (0, "latches", None, None),
            b'b' => (0, "bad-state properties", None, None),
            b'c' => (0, "invariant constraints", None, None),
            b'j' => (0, "justice properties", None, None),
            _ => (0, "fairness constraints", None, None),
        };
        let (Some(names), Some(seen)) = (names, seen) else {
            return Err(cur.err(
                ls,
                format!("a symbol names one of the {what}, and the file has none"),
            ));
        };
        if position >= count as u64 {
            return Err(cur.err(
                ls + 1,
                format!("there is no {what} {position} (the header declares {count})"),
            ));
        }
        let p = position as usize;
        if std::mem::replace(&mut seen[p], true) {
            return Err(cur.err(ls, format!("a second name for {what} {p}")));
        }
        names[p] = name;
    }
    for (edge, name) in edges.into_iter().zip(out_names) {
        net.add_output(name, edge, None);
    }
    Ok(net)
}

/// The fields of a line, each with its byte offset.
type Fields<'a> = Vec<(usize, &'a [u8])>;

struct Cursor<'a> {
    path: &'a str,
    bytes: &'a [u8],
    pos: usize,
}

impl<'a> Cursor<'a> {
    fn err(&self, offset: usize, message: impl Into<String>) -> ReadError {
        ReadError::Malformed(byte_error(self.path, self.bytes, offset, message))
    }

    /// The next line (without `\n` and a trailing `\r`) and its offset.
    fn line(&mut self) -> Option<(usize, &'a [u8])> {
        if self.pos >= self.bytes.len() {
            return None;
        }
        let start = self.pos;
        let rest = &self.bytes[start..];
        let end = rest
            .iter()
            .position(|&b| b == b'\n')
            .map_or(self.bytes.len(), |i| start + i);
        self.pos = end + 1;
        let line = &self.bytes[start..end];
        Some((start, line.strip_suffix(b"\r").unwrap_or(line)))
    }

    /// The next line, which must hold exactly `count` fields.
    fn fields(
        &mut self,
        what: std::fmt::Arguments,
        count: usize,
    ) -> Result<(usize, Fields<'a>), ReadError> {
        let bytes = self.bytes;
        let Some((ls, line)) = self.line() else {
            return Err(self.err(bytes.len(), format!("the file ends before {what}")));
        };
        let t = split(bytes, line);
        if t.len() != count {
            let at = t.get(count).map_or(offset_after(bytes, line), |f| f.0);
            let s = if count == 1 { "" } else { "s" };
            return Err(self.err(
                at,
                format!("{what}: expected {count} literal{s}, found {}", t.len()),
            ));
        }
        Ok((ls, t))
    }

    /// One delta of the binary AND section (7 bits a byte, low first).
    fn delta(&mut self) -> Result<u64, ReadError> {
        let start = self.pos;
        let mut x = 0u64;
        let mut shift = 0;
        loop {
            let Some(&b) = self.bytes.get(self.pos) else {
                return Err(self.err(self.pos, "the file ends inside the binary AND section"));
            };
            self.pos += 1;
            x |= u64::from(b & 0x7f) << shift;
            if b & 0x80 == 0 {
                return Ok(x);
            }
            shift += 7;
            if shift >= 35 {
                return Err(self.err(start, "a delta longer than 5 bytes"));
            }
        }
    }
}

/// Offset just past `line` (a subslice of `bytes`).
fn offset_after(bytes: &[u8], line: &[u8]) -> usize {
    super::offset_in(bytes, line) + line.len()
}

/// The line that starts at `start`.
fn line_at(bytes: &[u8], start: usize) -> &[u8] {
    let rest = &bytes[start..];
    &rest[..rest.iter().position(|&b| b == b'\n').unwrap_or(rest.len())]
}

/// Fields separated by spaces or tabs, with their offsets in `bytes`.
fn split<'a>(bytes: &[u8], line: &'a [u8]) -> Fields<'a> {
    let base = super::offset_in(bytes, line);
    let mut out = Vec::new();
    let mut k = 0;
    while k < line.len() {
        if line[k] == b' ' || line[k] == b'\t' || line[k] == b'\r' {
            k += 1;
            continue;
        }
        let s = k;
        while k < line.len() && !matches!(line[k], b' ' | b'\t' | b'\r') {
            k += 1;
        }
        out.push((base + s, &line[s..k]));
    }
    out
}

/// A decimal number of at most 19 digits.
fn number(t: &[u8]) -> Option<u64> {
    if t.is_empty() || t.len() > 19 || !t.iter().all(u8::is_ascii_digit) {
        return None;
    }
    Some(t.iter().fold(0u64, |x, &d| x * 10 + u64::from(d - b'0')))
}

fn literal(cur: &Cursor, (at, t): (usize, &[u8]), max_lit: u64) -> Result<u64, ReadError> {
    let lit =
        number(t).ok_or_else(|| cur.err(at, format!("expected a literal, found `{}`", show(t))))?;
    if lit > max_lit {
        return Err(cur.err(at, format!("literal {lit} is past 2M + 1 = {max_lit}")));
    }
    Ok(lit)
}

fn show(t: &[u8]) -> String {
    String::from_utf8_lossy(&t[..t.len().min(40)]).into_owned()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(bytes: &[u8]) -> Result<Netlist, ReadError> {
        read_aiger("t.aag", bytes, &ReadLimits::default())
    }

    fn error_at(bytes: &[u8]) -> (usize, usize, String) {
        match read(bytes) {
            Err(ReadError::Malformed(e)) => (e.location.line, e.location.column, e.message()),
            other => panic!("expected an error, got {other:?}"),
        }
    }

    #[test]
    fn the_and_gate_example() {
        // The AND gate of the AIGER format description: `aag 3 2 0 1 1`,
        // inputs 2 4, output 6, AND 6 2 4, symbols and a comment.
        let n =
            read(b"aag 3 2 0 1 1\n2\n4\n6\n6 2 4\ni0 x\ni1 y\no0 o\nc\nthe and gate\n").unwrap();
        assert_eq!(n.inputs(), ["x", "y"]);
        assert_eq!(n.outputs()[0].name, "o");
        assert_eq!(
            n.node(0),
            (
                NodeKind::And,
                &[Edge::new(1, false), Edge::new(2, false)][..]
            )
        );
        for p in 0..4u32 {
            let (x, y) = (p & 1 == 1, p & 2 == 2);
            assert_eq!(n.eval(&[x, y]), vec![x && y]);
        }
        // The same in binary, where the larger operand comes first: deltas
        // 6 - 4 = 2 and 4 - 2 = 2.
        let b = read(b"aig 3 2 0 1 1\n6\n\x02\x02i0 x\n").unwrap();
        assert_eq!(
            b.node(0),
            (
                NodeKind::And,
                &[Edge::new(2, false), Edge::new(1, false)][..]
            )
        );
        assert_eq!(b.inputs(), ["x", "x1"]);
        assert_eq!(b.outputs()[0].name, "y0");
    }

    #[test]
    fn ascii_order_is_free_and_sorted() {
        // AND 8 uses AND 6 defined after it; output is !8; sparse variables.
        let n = read(b"aag 5 2 0 1 2\n2\n10\n9\n8 6 2\n6 2 11\n").unwrap();
        for p in 0..4u32 {
            let (x, y) = (p & 1 == 1, p & 2 == 2);
            assert_eq!(n.eval(&[x, y]), vec![!x || y]);
        }
        assert_eq!(n.node(0).1, &[Edge::new(1, false), Edge::new(2, true)][..]);
    }

    #[test]
    fn constant_and_input_outputs() {
        let n = read(b"aag 1 1 0 3 0\n2\n0\n1\n3\n").unwrap();
        assert_eq!(n.eval(&[true]), vec![false, true, false]);
        assert_eq!(n.node_count(), 0);
    }

    #[test]
    fn malformed_ascii_is_located() {
        let cases: &[(&[u8], (usize, usize), &str)] = &[
            (b"", (1, 1), "empty file"),
            (b"aig3 1 1 0 1 0\n", (1, 1), "expected an AIGER header"),
            (b"aag 1 1 0\n", (1, 10), "needs M I L O A, found 3"),
            (b"aag 1 1 0 1 x\n", (1, 13), "expected the count A"),
            (b"aag 1 1 1 1 0\n", (1, 9), "latches"),
            (b"aag 1 1 0 1 0 1\n", (1, 15), "B = 1 bad-state"),
            (b"aag 1 1 0 1 0 0 0 0 2\n", (1, 21), "F = 2 fairness"),
            (b"aag 1 1 0 1 0 0 0 0 0 0\n", (1, 23), "unexpected field"),
            (b"aag 1 1 0 1 0\n3\n2\n", (2, 1), "must be even"),
            (b"aag 1 1 0 1 0\n4\n2\n", (2, 1), "past 2M + 1 = 3"),
            (
                b"aag 2 2 0 1 0\n2\n2\n2\n",
                (3, 1),
                "variable 1 is defined twice",
            ),
            (b"aag 1 1 0 1 0\n2\n", (3, 1), "ends before output 0 of 1"),
            (
                b"aag 2 1 0 1 1\n2\n4\n4 2\n",
                (4, 4),
                "expected 3 literals, found 2",
            ),
            (
                b"aag 2 1 0 1 1\n2\n4\n4 2 2 2\n",
                (4, 7),
                "expected 3 literals, found 4",
            ),
            (
                b"aag 3 1 0 1 1\n2\n4\n4 2 6\n",
                (4, 5),
                "variable 3 is neither",
            ),
            (b"aag 3 1 0 1 0\n2\n6\n", (3, 1), "variable 3 is neither"),
            (
                b"aag 3 1 0 1 2\n2\n4\n4 6 2\n6 4 2\n",
                (4, 1),
                "combinational cycle",
            ),
            (
                b"aag 1 1 0 1 0\n2\n2\ni1 x\n",
                (4, 2),
                "there is no input 1",
            ),
            (
                b"aag 1 1 0 1 0\n2\n2\ni0 x\ni0 y\n",
                (5, 1),
                "a second name for input 0",
            ),
            (
                b"aag 1 1 0 1 0\n2\n2\nl0 x\n",
                (4, 1),
                "one of the latches, and the file has none",
            ),
            (
                b"aag 1 1 0 1 0\n2\n2\ni0\n",
                (4, 3),
                "expected a space and a name",
            ),
            (
                b"aag 1 1 0 1 0\n2\n2\nix y\n",
                (4, 2),
                "expected a position",
            ),
            (b"aag 1 1 0 1 0\n2\n2\nzz\n", (4, 1), "expected a symbol"),
        ];
        for &(bytes, (line, col), msg) in cases {
            let (l, c, m) = error_at(bytes);
            assert_eq!(
                (l, c),
                (line, col),
                "{:?}: {m}",
                String::from_utf8_lossy(bytes)
            );
            assert!(m.contains(msg), "{:?}: {m}", String::from_utf8_lossy(bytes));
        }
    }

    #[test]
    fn malformed_binary_is_located() {
        let cases: &[(&[u8], (usize, usize), &str)] = &[
            (
                b"aig 3 2 0 1 2\n6\n\x02\x02",
                (1, 5),
                "needs M = I + L + A = 4",
            ),
            // First delta 0: the AND would read itself.
            (b"aig 3 2 0 1 1\n6\n\x00\x02", (3, 1), "first delta 0"),
            // First delta 7 > lhs 6.
            (b"aig 3 2 0 1 1\n6\n\x07\x02", (3, 1), "first delta 7"),
            // Second delta 5 > rhs0 4.
            (b"aig 3 2 0 1 1\n6\n\x02\x05", (3, 2), "second delta 5"),
            (
                b"aig 3 2 0 1 1\n6\n\x02",
                (3, 2),
                "ends inside the binary AND section",
            ),
            (
                b"aig 3 2 0 1 1\n6\n\x82\x80\x80\x80\x80\x01",
                (3, 1),
                "longer than 5 bytes",
            ),
            (b"aig 3 2 0 1 1\n8\n\x02\x02", (2, 1), "past 2M + 1 = 7"),
        ];
        for &(bytes, (line, col), msg) in cases {
            let (l, c, m) = error_at(bytes);
            assert_eq!(
                (l, c),
                (line, col),
                "{:?}: {m}",
                String::from_utf8_lossy(bytes)
            );
            assert!(m.contains(msg), "{:?}: {m}", String::from_utf8_lossy(bytes));
        }
    }

    #[test]
    fn header_counts_are_limited_first() {
        let l = ReadLimits {
            max_nodes: 5,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_aiger("t", b"aig 1000000000001 1 0 0 1000000000000\n", &l),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        let l = ReadLimits {
            max_inputs: 5,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_aiger("t", b"aag 9 9 0 0 0\n", &l),
            Err(ReadError::Limit { what: "inputs", .. })
        ));
        assert!(matches!(
            read_aiger("t", b"aag 99999999999 1 0 0 0\n", &l),
            Err(ReadError::Limit {
                what: "AIGER variables (M)",
                ..
            })
        ));
    }
}
