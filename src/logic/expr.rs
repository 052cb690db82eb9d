//! The expression language of specs: `! ~ & ^ |`, parentheses, constants, input names.
//!
//! Precedence from high to low is `!`/`~`, `&`, `^`, `|`, as in C.

/// A Boolean expression over numbered inputs.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Expr {
    /// `0` or `1`.
    Const(bool),
    /// Input number `j` (bit `j` of the input index).
    Var(usize),
    /// Negation.
    Not(Box<Expr>),
    /// Conjunction of two or more terms.
    And(Vec<Expr>),
    /// Exclusive or of two or more terms.
    Xor(Vec<Expr>),
    /// Disjunction of two or more terms.
    Or(Vec<Expr>),
}

/// A parse error; `offset` is a byte offset into the expression text.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct ExprError {
    /// Byte offset of the problem.
    pub offset: usize,
    /// What is wrong.
    pub message: String,
}

impl Expr {
    /// Value on input index `x`.
    pub fn eval(&self, x: u64) -> bool {
        match self {
            Expr::Const(b) => *b,
            Expr::Var(j) => (x >> j) & 1 == 1,
            Expr::Not(e) => !e.eval(x),
            Expr::And(es) => es.iter().all(|e| e.eval(x)),
            Expr::Xor(es) => es.iter().fold(false, |a, e| a ^ e.eval(x)),
            Expr::Or(es) => es.iter().any(|e| e.eval(x)),
        }
    }

    /// Values on inputs `64 w .. 64 w + 63`, bit `k` for input `64 w + k`.
    pub fn eval_word(&self, w: u64) -> u64 {
        match self {
            Expr::Const(b) => {
                if *b {
                    !0
                } else {
                    0
                }
            }
            Expr::Var(j) if *j < 6 => super::VAR_PATTERN[*j],
            Expr::Var(j) => {
                if (w >> (j - 6)) & 1 == 1 {
                    !0
                } else {
                    0
                }
            }
            Expr::Not(e) => !e.eval_word(w),
            Expr::And(es) => es.iter().fold(!0, |a, e| a & e.eval_word(w)),
            Expr::Xor(es) => es.iter().fold(0, |a, e| a ^ e.eval_word(w)),
            Expr::Or(es) => es.iter().fold(0, |a, e| a | e.eval_word(w)),
        }
    }

    /// The highest input number used, if any.
    pub fn max_var(&self) -> Option<usize> {
        match self {
            Expr::Const(_) => None,
            Expr::Var(j) => Some(*j),
            Expr::Not(e) => e.max_var(),
            Expr::And(es) | Expr::Xor(es) | Expr::Or(es) => {
                es.iter().filter_map(Expr::max_var).max()
            }
        }
    }
}

/// Parses `text`, resolving identifiers with `names` (input `j` is `names[j]`).
pub fn parse_expr(text: &str, names: &[String]) -> Result<Expr, ExprError> {
    let mut p = Parser {
        text,
        pos: 0,
        names,
        depth: 0,
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

/// Deepest nesting of parentheses and negations accepted, to keep the stack bounded.
const MAX_DEPTH: usize = 256;

struct Parser<'a> {
    text: &'a str,
    pos: usize,
    names: &'a [String],
    depth: usize,
}

impl Parser<'_> {
    fn error(&self, offset: usize, message: &str) -> ExprError {
        ExprError {
            offset,
            message: message.to_string(),
        }
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
        next: fn(&mut Self) -> Result<Expr, ExprError>,
        build: fn(Vec<Expr>) -> Expr,
    ) -> Result<Expr, ExprError> {
        let mut terms = vec![next(self)?];
        while self.eat(op) {
            terms.push(next(self)?);
        }
        Ok(if terms.len() == 1 {
            terms.pop().expect("one term")
        } else {
            build(terms)
        })
    }

    fn or(&mut self) -> Result<Expr, ExprError> {
        self.chain('|', Self::xor, Expr::Or)
    }

    fn xor(&mut self) -> Result<Expr, ExprError> {
        self.chain('^', Self::and, Expr::Xor)
    }

    fn and(&mut self) -> Result<Expr, ExprError> {
        self.chain('&', Self::unary, Expr::And)
    }

    fn unary(&mut self) -> Result<Expr, ExprError> {
        self.skip_space();
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return Err(self.error(self.pos, "the expression nests too deeply"));
        }
        let e = match self.peek() {
            Some('!') | Some('~') => {
                self.pos += 1;
                Expr::Not(Box::new(self.unary()?))
            }
            _ => self.atom()?,
        };
        self.depth -= 1;
        Ok(e)
    }

    fn atom(&mut self) -> Result<Expr, ExprError> {
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
                match &self.text[start..end] {
                    "0" => Ok(Expr::Const(false)),
                    "1" => Ok(Expr::Const(true)),
                    other => Err(self.error(
                        start,
                        &format!("'{other}' is not a constant; only 0 and 1 are"),
                    )),
                }
            }
            Some(c) if c.is_alphabetic() || c == '_' => {
                let end = self.scan(|c| c.is_alphanumeric() || c == '_');
                let name = &self.text[start..end];
                match self.names.iter().position(|n| n == name) {
                    Some(j) => Ok(Expr::Var(j)),
                    None => Err(self.error(
                        start,
                        &format!(
                            "unknown identifier '{name}'; the inputs are {}",
                            self.names.join(", ")
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

#[cfg(test)]
mod tests {
    use super::*;

    fn names(list: &[&str]) -> Vec<String> {
        list.iter().map(|s| s.to_string()).collect()
    }

    fn table(text: &str, vars: &[&str]) -> u64 {
        let e = parse_expr(text, &names(vars)).unwrap();
        (0..1u64 << vars.len()).fold(0, |acc, i| acc | (e.eval(i) as u64) << i)
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
        assert_eq!(parse_expr("a & c", &n).unwrap_err().offset, 4);
        assert_eq!(parse_expr("a & ", &n).unwrap_err().offset, 4);
        assert_eq!(parse_expr("(a & b", &n).unwrap_err().offset, 0);
        assert_eq!(parse_expr("a b", &n).unwrap_err().offset, 2);
        assert_eq!(parse_expr("a + b", &n).unwrap_err().offset, 2);
        assert_eq!(parse_expr("a & 2", &n).unwrap_err().offset, 4);
        assert_eq!(parse_expr("a)", &n).unwrap_err().offset, 1);
        assert_eq!(parse_expr("  ", &n).unwrap_err().offset, 0);
        let deep = "!".repeat(100_000) + "a";
        assert!(parse_expr(&deep, &n).is_err());
    }

    #[test]
    fn word_evaluation_matches_pointwise() {
        let vars = names(&["a", "b", "c", "d", "e", "f", "g", "h"]);
        let e = parse_expr("a & !h | (c ^ g) & ~b ^ f", &vars).unwrap();
        for w in 0..4u64 {
            let word = e.eval_word(w);
            for k in 0..64 {
                assert_eq!((word >> k) & 1 == 1, e.eval(w * 64 + k));
            }
        }
    }
}
