//! Errors that point into a source file: file, line, column, and the line itself with a caret.

use std::fmt;
use std::ops::Range;

/// A place in a source file; line and column count from 1, columns in characters.
#[derive(Clone, Debug, PartialEq, Eq, serde::Serialize)]
pub struct Location {
    /// The file as the user named it.
    pub file: String,
    /// Line, from 1.
    pub line: usize,
    /// Column in characters, from 1.
    pub column: usize,
}

/// An input file with its name, for turning byte offsets into locations.
#[derive(Clone, Debug)]
pub struct Source<'a> {
    /// The file name as the user gave it.
    pub path: &'a str,
    /// The whole text.
    pub text: &'a str,
}

impl Source<'_> {
    /// The location of byte `offset` (clamped to the text).
    pub fn locate(&self, offset: usize) -> Location {
        let mut offset = offset.min(self.text.len());
        while !self.text.is_char_boundary(offset) {
            offset -= 1;
        }
        let before = &self.text[..offset];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        let column = self.text[line_start..offset].chars().count() + 1;
        Location {
            file: self.path.to_string(),
            line,
            column,
        }
    }

    /// An error at byte `offset`.
    pub fn error(&self, offset: usize, message: impl Into<String>) -> LocatedError {
        let location = self.locate(offset);
        let source_line = self
            .text
            .lines()
            .nth(location.line - 1)
            .unwrap_or("")
            .to_string();
        LocatedError {
            location,
            message: message.into(),
            source_line,
            hint: None,
        }
    }

    /// Byte offset of position `inner` inside the string value whose literal
    /// (quotes included) spans `span`; falls back to the literal's start when
    /// escapes or line breaks make the mapping unsure.
    pub fn offset_in_string(&self, span: &Range<usize>, value: &str, inner: usize) -> usize {
        let raw = self.text.get(span.clone()).unwrap_or("");
        for quote in ["\"", "'"] {
            if raw.len() == value.len() + 2
                && raw.starts_with(quote)
                && raw.ends_with(quote)
                && &raw[1..raw.len() - 1] == value
            {
                return span.start + 1 + inner.min(value.len());
            }
        }
        span.start
    }
}

/// An error with its place in a file, shown as `file:line:column: message` and the
/// offending line with a caret under the column.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub struct LocatedError {
    /// Where.
    pub location: Location,
    /// What is wrong.
    pub message: String,
    /// The text of the offending line.
    pub source_line: String,
    /// A suggestion, where one helps.
    pub hint: Option<String>,
}

impl LocatedError {
    /// Adds a hint line.
    pub fn with_hint(mut self, hint: impl Into<String>) -> Self {
        self.hint = Some(hint.into());
        self
    }
}

impl fmt::Display for LocatedError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let l = &self.location;
        writeln!(f, "{}:{}:{}: {}", l.file, l.line, l.column, self.message)?;
        let gutter = l.line.to_string();
        let pad = " ".repeat(gutter.len());
        writeln!(f, "{pad} |")?;
        writeln!(f, "{gutter} | {}", self.source_line)?;
        let caret_pad: String = self
            .source_line
            .chars()
            .take(l.column.saturating_sub(1))
            .map(|c| if c == '\t' { '\t' } else { ' ' })
            .collect();
        write!(f, "{pad} | {caret_pad}^")?;
        if let Some(h) = &self.hint {
            write!(f, "\n{pad} = hint: {h}")?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locate_counts_lines_and_characters() {
        let src = Source {
            path: "f.toml",
            text: "a = 1\nbé = \"x & y\"\n",
        };
        let l = src.locate(6);
        assert_eq!((l.line, l.column), (2, 1));
        // 'é' is two bytes but one column.
        let at = src
            .text
            .find('=')
            .map(|_| src.text.rfind('=').unwrap())
            .unwrap();
        assert_eq!(src.locate(at).column, 4);
        let e = src.error(at, "here");
        let shown = e.to_string();
        assert!(shown.starts_with("f.toml:2:4: here"), "{shown}");
        assert!(shown.contains("2 | bé = \"x & y\""), "{shown}");
        assert!(shown.ends_with("  |    ^"), "{shown:?}");
    }

    #[test]
    fn offsets_inside_plain_strings() {
        let text = "fan = \"hot & cold\"";
        let src = Source { path: "s", text };
        let start = text.find('"').unwrap();
        let span = start..text.len();
        assert_eq!(src.offset_in_string(&span, "hot & cold", 6), start + 7);
        // With an escape the mapping is unsure: point at the literal.
        let text2 = "fan = \"hot \\u0026 cold\"";
        let src2 = Source {
            path: "s",
            text: text2,
        };
        let start2 = text2.find('"').unwrap();
        assert_eq!(
            src2.offset_in_string(&(start2..text2.len()), "hot & cold", 6),
            start2
        );
    }
}
