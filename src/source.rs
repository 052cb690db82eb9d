//! Places in input files: byte offsets turned into file, line and column,
//! and errors that carry their kind as data together with where they are.
//!
//! The library never draws an error; the command line renders a
//! [`SourceError`] with the offending line and a marker under its span.

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

/// What an error kind can say beside its message.
pub trait ErrorKind: fmt::Display {
    /// A suggestion, where one helps.
    fn hint(&self) -> Option<String> {
        None
    }
}

/// An error of kind `K` at a span of a source file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SourceError<K> {
    /// What is wrong, as data.
    pub kind: K,
    /// Where the span starts.
    pub location: Location,
    /// The byte range of the span in the file (at least one byte where the
    /// file has one).
    pub span: Range<usize>,
    /// The text of the line where the span starts.
    pub line_text: String,
    /// The byte offset of that line in the file.
    pub line_start: usize,
}

impl<K: ErrorKind> SourceError<K> {
    /// The message alone, without the place.
    pub fn message(&self) -> String {
        self.kind.to_string()
    }
}

impl<K: ErrorKind> fmt::Display for SourceError<K> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let l = &self.location;
        write!(f, "{}:{}:{}: {}", l.file, l.line, l.column, self.kind)?;
        if let Some(h) = self.kind.hint() {
            write!(f, " (hint: {h})")?;
        }
        Ok(())
    }
}

impl<K: ErrorKind + fmt::Debug> std::error::Error for SourceError<K> {}

/// A message with an optional hint, for readers whose errors are not yet
/// sorted into kinds.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Text {
    /// What is wrong.
    pub message: String,
    /// A suggestion.
    pub hint: Option<String>,
}

impl fmt::Display for Text {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl ErrorKind for Text {
    fn hint(&self) -> Option<String> {
        self.hint.clone()
    }
}

/// An error of a reader whose message is free text.
pub type LocatedError = SourceError<Text>;

impl LocatedError {
    /// Adds a hint.
    pub fn with_hint(mut self, hint: impl Into<String>) -> Self {
        self.kind.hint = Some(hint.into());
        self
    }
}

impl Source<'_> {
    /// The location of byte `offset` (clamped to the text).
    pub fn locate(&self, offset: usize) -> Location {
        let offset = self.boundary(offset);
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

    fn boundary(&self, offset: usize) -> usize {
        let mut offset = offset.min(self.text.len());
        while !self.text.is_char_boundary(offset) {
            offset -= 1;
        }
        offset
    }

    /// An error of `kind` over the bytes `span`.
    pub fn error_at<K>(&self, span: Range<usize>, kind: K) -> SourceError<K> {
        let start = self.boundary(span.start);
        let location = self.locate(start);
        let line_start = self.text[..start].rfind('\n').map_or(0, |i| i + 1);
        let line_end = self.text[start..]
            .find('\n')
            .map_or(self.text.len(), |i| start + i);
        let end = self.boundary(span.end.max(start)).min(line_end.max(start));
        SourceError {
            kind,
            location,
            span: start..end,
            line_text: self.text[line_start..line_end]
                .trim_end_matches('\r')
                .to_string(),
            line_start,
        }
    }

    /// A free-text error at byte `offset`.
    pub fn error(&self, offset: usize, message: impl Into<String>) -> LocatedError {
        self.error_at(
            offset..offset + 1,
            Text {
                message: message.into(),
                hint: None,
            },
        )
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
        let at = src.text.rfind('=').unwrap();
        assert_eq!(src.locate(at).column, 4);
        let e = src.error(at, "here");
        assert_eq!(e.to_string(), "f.toml:2:4: here");
        assert_eq!(e.line_text, "bé = \"x & y\"");
        assert_eq!(e.line_start, 6);
        assert_eq!(e.span, at..at + 1);
    }

    #[test]
    fn spans_stay_on_their_line() {
        let src = Source {
            path: "s",
            text: "ab\ncd",
        };
        let e = src.error_at(
            0..5,
            Text {
                message: "m".into(),
                hint: Some("h".into()),
            },
        );
        assert_eq!(e.span, 0..2);
        assert_eq!(e.to_string(), "s:1:1: m (hint: h)");
        // Past the end: clamped, never a panic.
        let e = src.error_at(
            99..120,
            Text {
                message: "m".into(),
                hint: None,
            },
        );
        assert_eq!((e.location.line, e.location.column), (2, 3));
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
