//! The expression language of specs: `!` or `~` (not), `&`, `^`, `|`,
//! parentheses, the constants 0 and 1, and names; precedence from high to
//! low is `!`, `&`, `^`, `|`, as in C. Expressions are parsed into a [`Dag`],
//! names resolving to inputs or to nodes already there (named definitions).

use super::expr::{Dag, NodeId};

/// A parse error; `offset` is a byte offset into the expression text.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct ExprError {
    /// Byte offset of the problem.
    pub offset: usize,
    /// What is wrong.
    pub message: String,
    /// Whether the graph's node cap, not the text, stopped the parse.
    pub too_many_nodes: bool,
}

/// What a name in an expression stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Leaf {
    /// Input `j`.
    Input(u32),
    /// A node already in the graph (a named definition).
    Node(NodeId),
}

/// The names an expression may use.
pub trait Names {
    /// What `name` stands for, if it is known.
    fn resolve(&self, name: &str) -> Option<Leaf>;
    /// A short list of the known names, for messages.
    fn describe(&self) -> String;
}

impl Names for [String] {
    fn resolve(&self, name: &str) -> Option<Leaf> {
        self.iter()
            .position(|n| n == name)
            .map(|j| Leaf::Input(j as u32))
    }

    fn describe(&self) -> String {
        list_names(self.iter().map(String::as_str))
    }
}

/// At most a dozen names, joined, then how many more.
pub fn list_names<'a>(names: impl Iterator<Item = &'a str>) -> String {
    let all: Vec<&str> = names.collect();
    if all.len() <= 12 {
        all.join(", ")
    } else {
        format!("{}, and {} more", all[..12].join(", "), all.len() - 12)
    }
}

/// Parses `text` over the inputs `names` (input `j` is `names[j]`) into a
/// graph of its own; returns the graph and the expression's node.
pub fn parse_expr(text: &str, names: &[String]) -> Result<(Dag, NodeId), ExprError> {
    let mut dag = Dag::new();
    let root = parse_into(&mut dag, text, names, usize::MAX)?;
    Ok((dag, root))
}

/// Parses `text` into `dag`, resolving names with `names`, adding at most
/// `max_nodes` nodes to the graph in all (an error past it); returns the
/// expression's node.
pub fn parse_into(
    dag: &mut Dag,
    text: &str,
    names: &(impl Names + ?Sized),
    max_nodes: usize,
) -> Result<NodeId, ExprError> {
    let mut p = Parser {
        text,
        pos: 0,
        names: &Dyn(names),
        depth: 0,
        dag,
        max_nodes,
    };
    p.skip_space();
    if p.pos == text.len() {
        return Err(p.error(0, "the expression is empty"));
    }
    let e = p.or()?;
    p.skip_space();
    if p.pos < text.len() {
        let c = p.peek().unwrap_or(' ');
        let msg = if c == ')' {
            "this ')' has no matching '('".to_string()
        } else {
            format!("expected an operator (& ^ |) here, found '{c}'")
        };
        return Err(p.error(p.pos, &msg));
    }
    Ok(e)
}

/// The identifiers of `text` with their byte offsets, in order (for finding
/// what a definition depends on before parsing it).
pub fn identifiers(text: &str) -> Vec<(&str, usize)> {
    let mut out = Vec::new();
    let mut chars = text.char_indices().peekable();
    while let Some((i, c)) = chars.next() {
        if c.is_alphabetic() || c == '_' {
            let mut end = i + c.len_utf8();
            while let Some(&(j, d)) = chars.peek() {
                if d.is_alphanumeric() || d == '_' {
                    end = j + d.len_utf8();
                    chars.next();
                } else {
                    break;
                }
            }
            out.push((&text[i..end], i));
        } else if c.is_ascii_digit() {
            while chars
                .peek()
                .is_some_and(|&(_, d)| d.is_ascii_alphanumeric() || d == '_')
            {
                chars.next();
            }
        }
    }
    out
}

/// Deepest nesting of parentheses and negations accepted, to keep the stack bounded.
const MAX_DEPTH: usize = 256;

struct Dyn<'a, N: ?Sized>(&'a N);

impl<N: Names + ?Sized> Dyn<'_, N> {
    fn resolve(&self, name: &str) -> Option<Leaf> {
        self.0.resolve(name)
    }
    fn describe(&self) -> String {
        self.0.describe()
    }
}

struct Parser<'a, 'd, N: ?Sized> {
    text: &'a str,
    pos: usize,
    names: &'a Dyn<'a, N>,
    depth: usize,
    dag: &'d mut Dag,
    max_nodes: usize,
}

impl<N: Names + ?Sized> Parser<'_, '_, N> {
    fn error(&self, offset: usize, message: &str) -> ExprError {
        ExprError {
            offset,
            message: message.to_string(),
            too_many_nodes: false,
        }
    }

    fn room(&self, at: usize) -> Result<(), ExprError> {
        if self.dag.len() >= self.max_nodes {
            let mut e = self.error(
                at,
                &format!(
                    "the expressions have more than {} nodes",
                    fmt_count(self.max_nodes)
                ),
            );
            e.too_many_nodes = true;
            return Err(e);
        }
        Ok(())
    }

    fn peek(&self) -> Option<char> {
        self.text[self.pos..].chars().next()
    }

    fn skip_space(&mut self) {
        while let Some(c) = self.peek() {
            if c.is_whitespace() {
                self.pos += c.len_utf8();
            } else {
                break;
            }
        }
    }

    fn eat(&mut self, op: char) -> bool {
        self.skip_space();
        if self.peek() == Some(op) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    fn chain(
        &mut self,
        op: char,
        next: fn(&mut Self) -> Result<NodeId, ExprError>,
        build: fn(&mut Dag, &[NodeId]) -> NodeId,
    ) -> Result<NodeId, ExprError> {
        let at = self.pos;
        let mut terms = vec![next(self)?];
        while self.eat(op) {
            terms.push(next(self)?);
        }
        if terms.len() == 1 {
            return Ok(terms[0]);
        }
        self.room(at)?;
        Ok(build(self.dag, &terms))
    }

    fn or(&mut self) -> Result<NodeId, ExprError> {
        self.chain('|', Self::xor, Dag::or)
    }

    fn xor(&mut self) -> Result<NodeId, ExprError> {
        self.chain('^', Self::and, Dag::xor)
    }

    fn and(&mut self) -> Result<NodeId, ExprError> {
        self.chain('&', Self::unary, Dag::and)
    }

    fn unary(&mut self) -> Result<NodeId, ExprError> {
        self.skip_space();
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return Err(self.error(self.pos, "the expression nests too deeply"));
        }
        let e = match self.peek() {
            Some('!') | Some('~') => {
                let at = self.pos;
                self.pos += 1;
                let a = self.unary()?;
                self.room(at)?;
                self.dag.not(a)
            }
            _ => self.atom()?,
        };
        self.depth -= 1;
        Ok(e)
    }

    fn atom(&mut self) -> Result<NodeId, ExprError> {
        self.skip_space();
        let start = self.pos;
        match self.peek() {
            None => Err(self.error(start, "the expression ends where a term was expected")),
            Some('(') => {
                self.pos += 1;
                let e = self.or()?;
                if !self.eat(')') {
                    let at = self.pos;
                    return Err(match self.peek() {
                        None => self.error(start, "this '(' is never closed"),
                        Some(c) => self.error(at, &format!("expected ')' here, found '{c}'")),
                    });
                }
                Ok(e)
            }
            Some(c) if c.is_ascii_digit() => {
                let end = self.scan(|c| c.is_ascii_alphanumeric() || c == '_');
                let value = match &self.text[start..end] {
                    "0" => false,
                    "1" => true,
                    other => {
                        return Err(self.error(
                            start,
                            &format!("'{other}' is not a constant; only 0 and 1 are"),
                        ))
                    }
                };
                self.room(start)?;
                Ok(self.dag.constant(value))
            }
            Some(c) if c.is_alphabetic() || c == '_' => {
                let end = self.scan(|c| c.is_alphanumeric() || c == '_');
                let name = &self.text[start..end];
                match self.names.resolve(name) {
                    Some(Leaf::Input(j)) => {
                        self.room(start)?;
                        Ok(self.dag.var(j))
                    }
                    Some(Leaf::Node(id)) => Ok(id),
                    None => Err(self.error(
                        start,
                        &format!(
                            "unknown identifier '{name}'; the inputs are {}",
                            self.names.describe()
                        ),
                    )),
                }
            }
            Some(c) => Err(self.error(
                start,
                &format!("unexpected '{c}'; expected a name, 0, 1, '!' or '('"),
            )),
        }
    }

    fn scan(&mut self, keep: impl Fn(char) -> bool) -> usize {
        while let Some(c) = self.peek() {
            if keep(c) {
                self.pos += c.len_utf8();
            } else {
                break;
            }
        }
        self.pos
    }
}

/// `1000000` as `1,000,000`.
pub fn fmt_count(n: usize) -> String {
    let s = n.to_string();
    let mut out = String::new();
    for (i, c) in s.chars().enumerate() {
        if i > 0 && (s.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(list: &[&str]) -> Vec<String> {
        list.iter().map(|s| s.to_string()).collect()
    }

    fn table(text: &str, vars: &[&str]) -> u64 {
        let (dag, root) = parse_expr(text, &names(vars)).unwrap();
        (0..1u64 << vars.len()).fold(0, |acc, i| acc | (dag.eval(root, i) as u64) << i)
    }

    // Precedence ! & ^ | as in C (ISO C, 6.5.10-6.5.12; a fact of the trade).
    #[test]
    fn precedence_follows_c() {
        // a | b & c == a | (b & c)
        assert_eq!(
            table("a | b & c", &["a", "b", "c"]),
            table("a | (b & c)", &["a", "b", "c"])
        );
        assert_ne!(
            table("a | b & c", &["a", "b", "c"]),
            table("(a | b) & c", &["a", "b", "c"])
        );
        // a ^ b & c == a ^ (b & c); a | b ^ c == a | (b ^ c)
        assert_eq!(
            table("a ^ b & c", &["a", "b", "c"]),
            table("a ^ (b & c)", &["a", "b", "c"])
        );
        assert_eq!(
            table("a | b ^ c", &["a", "b", "c"]),
            table("a | (b ^ c)", &["a", "b", "c"])
        );
        assert_ne!(
            table("a | b ^ c", &["a", "b", "c"]),
            table("(a | b) ^ c", &["a", "b", "c"])
        );
        // !a & b == (!a) & b
        assert_eq!(table("!a & b", &["a", "b"]), 0b0100);
        assert_eq!(table("~(a & b)", &["a", "b"]), 0b0111);
    }

    #[test]
    fn majority_and_parity() {
        assert_eq!(table("a & b | a & c | b & c", &["a", "b", "c"]), 0xe8);
        assert_eq!(table("a ^ b ^ c", &["a", "b", "c"]), 0x96);
        assert_eq!(table("1 ^ a", &["a"]), 0b01);
        assert_eq!(table("0 | a", &["a"]), 0b10);
    }

    #[test]
    fn errors_point_at_the_column() {
        let n = names(&["a", "b"]);
        let at = |t: &str| parse_expr(t, &n).unwrap_err().offset;
        assert_eq!(at("a & c"), 4);
        assert_eq!(at("a & "), 4);
        assert_eq!(at("(a & b"), 0);
        assert_eq!(at("a b"), 2);
        assert_eq!(at("a + b"), 2);
        assert_eq!(at("a & 2"), 4);
        assert_eq!(at("a)"), 1);
        assert_eq!(at("  "), 0);
        let deep = "!".repeat(100_000) + "a";
        assert!(parse_expr(&deep, &n).is_err());
    }

    #[test]
    fn the_node_cap_is_checked_while_parsing() {
        let n = names(&["a", "b"]);
        let mut dag = Dag::new();
        let e = parse_into(&mut dag, "a & b & !a", &n[..], 4).unwrap_err();
        assert!(e.message.contains("more than 4 nodes"), "{e}");
        assert!(dag.len() <= 4);
    }

    #[test]
    fn identifiers_are_found_with_their_offsets() {
        assert_eq!(
            identifiers("a1 & (_b ^ 10) | héé"),
            vec![("a1", 0), ("_b", 6), ("héé", 17)]
        );
    }

    #[test]
    fn counts_are_grouped_by_thousands() {
        assert_eq!(fmt_count(1_000_000), "1,000,000");
        assert_eq!(fmt_count(999), "999");
    }
}
