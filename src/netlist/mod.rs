//! Raw netlists read from classical design files (BLIF, AIGER, PLA, DIMACS CNF), kept as written.
//!
//! A [`Netlist`] is a plain transcription of a file: no constant folding, no
//! merging of equal nodes, no rewriting. A BLIF or PLA cube becomes one AND
//! node of its literals, a cover one OR node of its cubes (complemented when
//! the cover lists the off-set), an AIGER AND one two-input AND node, a CNF
//! clause one OR node. An independent checker can therefore encode the data
//! directly and trust that it says what the file says.
//!
//! Signals are numbered: 0 is the constant 0, `1..=n` are the primary inputs
//! in file order, and each node adds one signal after them, in topological
//! order (every node after its operands). An [`Edge`] is a signal, possibly
//! complemented.
//!
//! Storage is flat: one array of node records (kind, start, length: 12 bytes
//! a node) and one array of fanin edges (4 bytes each), so a design of 10^6
//! nodes and 3·10^6 fanins takes about 24 MB.

mod aiger;
mod blif;
mod cnf;
mod convert;
mod pla;

pub use aiger::read_aiger;
pub use blif::read_blif;
pub use cnf::read_cnf;
pub use convert::to_network;
pub use pla::read_pla;

use crate::source::{LocatedError, Location, Source};

/// Most signals an [`Edge`] can name (one bit of its 32 holds the complement).
const MAX_SIGNALS: usize = 1 << 31;
/// Hard ceiling on nodes and on inputs, whatever [`ReadLimits`] says, so that
/// constant + inputs + nodes always fits in an [`Edge`].
const HARD_MAX_NODES: usize = (1 << 30) - 1;
/// Hard ceiling on fanins (the fanin array is indexed by `u32`).
const HARD_MAX_FANINS: usize = u32::MAX as usize;

/// A signal, possibly complemented: the operand of a node or the value of an output.
///
/// Packed in 32 bits as `2 * signal + complemented` (the AIGER literal
/// convention), so signals go up to 2^31 - 1.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Edge(u32);

impl Edge {
    /// The constant 0 (signal 0).
    pub const FALSE: Edge = Edge(0);
    /// The constant 1 (signal 0, complemented).
    pub const TRUE: Edge = Edge(1);

    /// Signal `signal`, complemented if `complemented`.
    ///
    /// # Panics
    /// If `signal >= 2^31`.
    pub fn new(signal: usize, complemented: bool) -> Edge {
        assert!(signal < MAX_SIGNALS, "signal {signal} out of range");
        Edge((signal as u32) << 1 | complemented as u32)
    }

    /// The signal.
    pub fn signal(self) -> usize {
        (self.0 >> 1) as usize
    }

    /// Whether the edge complements its signal.
    pub fn complemented(self) -> bool {
        self.0 & 1 == 1
    }

    /// The complement.
    pub fn inverted(self) -> Edge {
        Edge(self.0 ^ 1)
    }

    /// The edge complemented when `c` is true.
    pub fn complemented_if(self, c: bool) -> Edge {
        Edge(self.0 ^ c as u32)
    }

    /// The edge's value in 64 patterns, given every signal's 64 values (as
    /// returned by [`Netlist::simulate_words`]).
    pub fn word(self, signal_words: &[u64]) -> u64 {
        let w = signal_words[self.signal()];
        if self.complemented() {
            !w
        } else {
            w
        }
    }
}

/// What a node computes from its fanins.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum NodeKind {
    /// The AND of the fanins (1 when there are none).
    And,
    /// The OR of the fanins (0 when there are none).
    Or,
    /// The XOR of the fanins (0 when there are none).
    Xor,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct NodeRecord {
    start: u32,
    len: u32,
    kind: NodeKind,
}

/// A primary output: its name, its value, and where its value does not matter.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PrimaryOutput {
    /// The name, from the file or `y0, y1, ...` when the file gives none.
    pub name: String,
    /// The output's value.
    pub edge: Edge,
    /// A signal that is 1 on the input patterns where the output's value does
    /// not matter (a PLA's don't-care set); `None` when it always matters.
    pub dont_care: Option<Edge>,
}

/// A combinational netlist of n-ary AND, OR and XOR nodes over named inputs,
/// exactly as a design file gives it (see the module documentation).
///
/// Nodes are in topological order: node `i` is signal `1 + inputs + i` and
/// reads only smaller signals, so one pass in order evaluates everything.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Netlist {
    inputs: Vec<String>,
    outputs: Vec<PrimaryOutput>,
    nodes: Vec<NodeRecord>,
    fanins: Vec<Edge>,
}

impl Netlist {
    /// A netlist with these primary inputs and no nodes or outputs.
    ///
    /// # Panics
    /// If there are more than 2^30 - 1 inputs.
    pub fn new(inputs: Vec<String>) -> Netlist {
        assert!(inputs.len() <= HARD_MAX_NODES, "too many inputs");
        Netlist {
            inputs,
            outputs: Vec::new(),
            nodes: Vec::new(),
            fanins: Vec::new(),
        }
    }

    /// The primary inputs' names, in file order.
    pub fn inputs(&self) -> &[String] {
        &self.inputs
    }

    /// The primary outputs, in file order.
    pub fn outputs(&self) -> &[PrimaryOutput] {
        &self.outputs
    }

    /// The number of primary inputs.
    pub fn input_count(&self) -> usize {
        self.inputs.len()
    }

    /// The number of nodes.
    pub fn node_count(&self) -> usize {
        self.nodes.len()
    }

    /// The total number of fanin edges over all nodes.
    pub fn fanin_count(&self) -> usize {
        self.fanins.len()
    }

    /// The number of signals: the constant, the inputs and the nodes.
    pub fn signal_count(&self) -> usize {
        1 + self.inputs.len() + self.nodes.len()
    }

    /// Primary input `j` (signal `1 + j`), uncomplemented.
    ///
    /// # Panics
    /// If `j` is not an input.
    pub fn input_edge(&self, j: usize) -> Edge {
        assert!(j < self.inputs.len(), "no input {j}");
        Edge::new(1 + j, false)
    }

    /// The signal of node `i`.
    pub fn node_signal(&self, i: usize) -> usize {
        1 + self.inputs.len() + i
    }

    /// Node `i`: its kind and its fanins.
    ///
    /// # Panics
    /// If `i >= node_count()`.
    pub fn node(&self, i: usize) -> (NodeKind, &[Edge]) {
        let r = self.nodes[i];
        let start = r.start as usize;
        (r.kind, &self.fanins[start..start + r.len as usize])
    }

    /// Appends a node reading `fanins` and returns its signal, uncomplemented.
    /// Amortized O(fanins).
    ///
    /// # Panics
    /// If a fanin names a signal that does not exist yet (which would break
    /// the topological order), or past 2^30 - 1 nodes or 2^32 - 1 fanins.
    pub fn add_node(&mut self, kind: NodeKind, fanins: &[Edge]) -> Edge {
        let signals = self.signal_count();
        assert!(
            fanins.iter().all(|e| e.signal() < signals),
            "a fanin names a signal that is not defined yet"
        );
        assert!(self.nodes.len() < HARD_MAX_NODES, "too many nodes");
        assert!(
            self.fanins.len() + fanins.len() <= HARD_MAX_FANINS,
            "too many fanins"
        );
        let start = self.fanins.len() as u32;
        self.fanins.extend_from_slice(fanins);
        self.nodes.push(NodeRecord {
            start,
            len: fanins.len() as u32,
            kind,
        });
        Edge::new(signals, false)
    }

    /// Appends a primary output.
    ///
    /// # Panics
    /// If `edge` or `dont_care` names a signal that does not exist.
    pub fn add_output(&mut self, name: String, edge: Edge, dont_care: Option<Edge>) {
        let signals = self.signal_count();
        assert!(edge.signal() < signals, "output edge out of range");
        assert!(
            dont_care.is_none_or(|d| d.signal() < signals),
            "don't-care edge out of range"
        );
        self.outputs.push(PrimaryOutput {
            name,
            edge,
            dont_care,
        });
    }

    fn reserve(&mut self, nodes: usize, fanins: usize) {
        self.nodes.reserve(nodes);
        self.fanins.reserve(fanins);
    }

    /// Every signal's value on 64 input patterns at once: `input[j]` holds
    /// input `j`'s bit in each pattern. One pass over the nodes, O(signals +
    /// fanins), no recursion.
    ///
    /// # Panics
    /// If `input.len()` is not the number of inputs.
    pub fn simulate_words(&self, input: &[u64]) -> Vec<u64> {
        assert_eq!(input.len(), self.inputs.len(), "one word per input");
        let mut v = Vec::with_capacity(self.signal_count());
        v.push(0u64);
        v.extend_from_slice(input);
        for r in &self.nodes {
            let start = r.start as usize;
            let fanins = &self.fanins[start..start + r.len as usize];
            let w = match r.kind {
                NodeKind::And => fanins.iter().fold(!0u64, |a, e| a & e.word(&v)),
                NodeKind::Or => fanins.iter().fold(0u64, |a, e| a | e.word(&v)),
                NodeKind::Xor => fanins.iter().fold(0u64, |a, e| a ^ e.word(&v)),
            };
            v.push(w);
        }
        v
    }

    /// The outputs' values on 64 input patterns at once (see
    /// [`Netlist::simulate_words`]).
    ///
    /// # Panics
    /// If `input.len()` is not the number of inputs.
    pub fn eval_words(&self, input: &[u64]) -> Vec<u64> {
        let v = self.simulate_words(input);
        self.outputs.iter().map(|o| o.edge.word(&v)).collect()
    }

    /// The outputs' values on one input pattern.
    ///
    /// # Panics
    /// If `input.len()` is not the number of inputs.
    pub fn eval(&self, input: &[bool]) -> Vec<bool> {
        let words: Vec<u64> = input.iter().map(|&b| b as u64).collect();
        self.eval_words(&words)
            .into_iter()
            .map(|w| w & 1 == 1)
            .collect()
    }
}

/// Size limits for the readers, checked while reading and before the memory
/// they bound is allocated.
///
/// Whatever is set here, a netlist holds at most 2^30 - 1 inputs, 2^30 - 1
/// nodes and 2^32 - 1 fanins.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ReadLimits {
    /// Most nodes (for hierarchical BLIF: after flattening).
    pub max_nodes: usize,
    /// Most fanin edges, summed over all nodes (while flattening
    /// hierarchical BLIF, each `.subckt` instance also counts one per name
    /// of its model and one per input of each of its `.names` lines).
    pub max_fanins: usize,
    /// Most primary inputs.
    pub max_inputs: usize,
}

impl Default for ReadLimits {
    /// 10^7 nodes, 5·10^7 fanins, 10^6 inputs: about 320 MB of netlist at most.
    fn default() -> Self {
        ReadLimits {
            max_nodes: 10_000_000,
            max_fanins: 50_000_000,
            max_inputs: 1_000_000,
        }
    }
}

/// Why a design file could not be read.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum ReadError {
    /// The file is not valid in its format; the error names file, line and column.
    #[error("{0}")]
    Malformed(LocatedError),
    /// The design is larger than a [`ReadLimits`] bound.
    #[error("{what}: {value} is over the limit of {limit}")]
    Limit {
        /// What was counted.
        what: &'static str,
        /// The count reached (or declared by the file's header).
        value: usize,
        /// The bound.
        limit: usize,
    },
}

impl From<LocatedError> for ReadError {
    fn from(e: LocatedError) -> Self {
        ReadError::Malformed(e)
    }
}

/// Running counts of what a reader is about to allocate, against the limits.
struct Budget {
    nodes: usize,
    fanins: usize,
    max_nodes: usize,
    max_fanins: usize,
    max_inputs: usize,
}

impl Budget {
    fn new(limits: &ReadLimits) -> Budget {
        Budget {
            nodes: 0,
            fanins: 0,
            max_nodes: limits.max_nodes.min(HARD_MAX_NODES),
            max_fanins: limits.max_fanins.min(HARD_MAX_FANINS),
            max_inputs: limits.max_inputs.min(HARD_MAX_NODES),
        }
    }

    fn inputs(&self, count: usize) -> Result<(), ReadError> {
        over("inputs", count, self.max_inputs)
    }

    /// Charges `nodes` more nodes and `fanins` more fanins.
    fn charge(&mut self, nodes: usize, fanins: usize) -> Result<(), ReadError> {
        self.nodes = self.nodes.saturating_add(nodes);
        self.fanins = self.fanins.saturating_add(fanins);
        over("nodes", self.nodes, self.max_nodes)?;
        over("fanins", self.fanins, self.max_fanins)
    }
}

fn over(what: &'static str, value: usize, limit: usize) -> Result<(), ReadError> {
    if value > limit {
        Err(ReadError::Limit { what, value, limit })
    } else {
        Ok(())
    }
}

/// The byte offset of `part` inside `whole` (`part` must be a subslice of it).
fn offset_in(whole: &[u8], part: &[u8]) -> usize {
    part.as_ptr() as usize - whole.as_ptr() as usize
}

/// An error at byte `offset` of a file that may not be text (binary AIGER):
/// lines end at `\n`; columns count characters when the line is UTF-8 and
/// bytes otherwise, with unprintable bytes shown as `.`.
fn byte_error(path: &str, bytes: &[u8], offset: usize, message: impl Into<String>) -> LocatedError {
    let offset = offset.min(bytes.len());
    let before = &bytes[..offset];
    let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
    let line_start = before
        .iter()
        .rposition(|&b| b == b'\n')
        .map_or(0, |i| i + 1);
    let line_end = bytes[offset..]
        .iter()
        .position(|&b| b == b'\n')
        .map_or(bytes.len(), |i| offset + i);
    let raw = &bytes[line_start..line_end];
    let raw = raw.strip_suffix(b"\r").unwrap_or(raw);
    let (column, source_line) = match std::str::from_utf8(raw) {
        Ok(s) if s.is_char_boundary((offset - line_start).min(s.len())) => {
            let at = (offset - line_start).min(s.len());
            (s[..at].chars().count() + 1, s.to_string())
        }
        _ => {
            // Shown only up to a little past the column: a binary section can
            // run long without a newline byte.
            let shown = raw.len().min(offset - line_start + 40);
            let s = raw[..shown]
                .iter()
                .map(|&b| {
                    if b == b'\t' || (0x20..0x7f).contains(&b) {
                        b as char
                    } else {
                        '.'
                    }
                })
                .collect();
            (offset - line_start + 1, s)
        }
    };
    let end = (offset + 1).min(line_start + source_line.len()).max(offset);
    LocatedError {
        kind: crate::source::Text {
            message: message.into(),
            hint: None,
        },
        location: Location {
            file: path.to_string(),
            line,
            column,
        },
        span: offset..end,
        line_text: source_line,
        line_start,
    }
}

/// The default name of input `j` when a file gives none.
fn input_name(j: usize) -> String {
    format!("x{j}")
}

/// The default name of output `k` when a file gives none.
fn output_name(k: usize) -> String {
    format!("y{k}")
}

/// The formats [`read_netlist`] knows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Format {
    Blif,
    Aiger,
    Pla,
    Cnf,
}

/// Reads a design file in the format its extension names: `.blif` (see
/// [`read_blif`]), `.aag` or `.aig` (see [`read_aiger`]), `.pla` (see
/// [`read_pla`]), `.cnf` (see [`read_cnf`]); case does not matter. With any
/// other extension the content decides when it opens unmistakably (an
/// `aag`/`aig` header, a `p cnf` line, a BLIF or PLA directive after
/// comments); otherwise the error says which extensions are known.
pub fn read_netlist(path: &str, bytes: &[u8], limits: &ReadLimits) -> Result<Netlist, ReadError> {
    let ext = std::path::Path::new(path)
        .extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase());
    let format = match ext.as_deref() {
        Some("blif") => Format::Blif,
        Some("aag") | Some("aig") => Format::Aiger,
        Some("pla") => Format::Pla,
        Some("cnf") => Format::Cnf,
        _ => sniff(bytes).ok_or_else(|| {
            byte_error(path, bytes, 0, "unknown design file format").with_hint(
                "name the file .blif, .aag, .aig, .pla or .cnf (BLIF, AIGER, PLA, DIMACS CNF)",
            )
        })?,
    };
    if format == Format::Aiger {
        return read_aiger(path, bytes, limits);
    }
    let text = std::str::from_utf8(bytes).map_err(|e| {
        byte_error(
            path,
            bytes,
            e.valid_up_to(),
            "not UTF-8 text (expected a text format)",
        )
    })?;
    match format {
        Format::Blif => read_blif(path, text, limits),
        Format::Pla => read_pla(path, text, limits),
        _ => read_cnf(path, text, limits),
    }
}

/// The format of a file whose first meaningful line leaves no doubt.
fn sniff(bytes: &[u8]) -> Option<Format> {
    if bytes.starts_with(b"aag ") || bytes.starts_with(b"aig ") {
        return Some(Format::Aiger);
    }
    for line in bytes.split(|&b| b == b'\n') {
        let line = std::str::from_utf8(line).ok()?.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        if line.starts_with('c') && !line.starts_with("cnf") {
            continue;
        }
        let first = line.split_ascii_whitespace().next()?;
        return match first {
            "p" if line.split_ascii_whitespace().nth(1) == Some("cnf") => Some(Format::Cnf),
            ".model" | ".inputs" | ".outputs" | ".names" | ".subckt" => Some(Format::Blif),
            ".i" | ".o" | ".ilb" | ".ob" | ".p" | ".type" => Some(Format::Pla),
            _ => None,
        };
    }
    None
}

/// An error at byte `offset` of a text file.
fn text_error(path: &str, text: &str, offset: usize, message: impl Into<String>) -> ReadError {
    ReadError::Malformed(Source { path, text }.error(offset, message))
}

/// The byte offset of `part` in `text` (`part` must be a subslice of it).
fn str_offset(text: &str, part: &str) -> usize {
    offset_in(text.as_bytes(), part.as_bytes())
}

/// The whitespace-separated tokens of `line` (a subslice of the text), each
/// with its byte offset in the text.
fn tokens<'a>(text: &str, line: &'a str) -> impl Iterator<Item = (usize, &'a str)> + use<'a> {
    let base = str_offset(text, line);
    let line_ptr = line.as_ptr() as usize;
    line.split_ascii_whitespace()
        .map(move |t| (base + (t.as_ptr() as usize - line_ptr), t))
}

/// The lines of `text` with the byte offset where each starts; a trailing
/// `\r` is dropped.
fn lines(text: &str) -> impl Iterator<Item = (usize, &str)> {
    let mut pos = 0;
    std::iter::from_fn(move || {
        if pos >= text.len() {
            return None;
        }
        let start = pos;
        let end = text[start..].find('\n').map_or(text.len(), |i| start + i);
        pos = end + 1;
        let line = &text[start..end];
        Some((start, line.strip_suffix('\r').unwrap_or(line)))
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edges_pack_signal_and_complement() {
        let e = Edge::new(5, true);
        assert_eq!((e.signal(), e.complemented()), (5, true));
        assert_eq!(e.inverted(), Edge::new(5, false));
        assert_eq!(Edge::TRUE, Edge::FALSE.inverted());
        assert_eq!(e.complemented_if(true), e.inverted());
    }

    #[test]
    fn node_records_stay_small() {
        // The size target of the design: about 16 bytes a node, 4-8 a fanin.
        assert!(std::mem::size_of::<NodeRecord>() <= 16);
        assert_eq!(std::mem::size_of::<Edge>(), 4);
    }

    #[test]
    fn eval_of_a_hand_netlist() {
        // maj(a, b, c) = ab | ac | bc, and a ^ b ^ !c, checked by brute force.
        let mut n = Netlist::new(vec!["a".into(), "b".into(), "c".into()]);
        let (a, b, c) = (n.input_edge(0), n.input_edge(1), n.input_edge(2));
        let ab = n.add_node(NodeKind::And, &[a, b]);
        let ac = n.add_node(NodeKind::And, &[a, c]);
        let bc = n.add_node(NodeKind::And, &[b, c]);
        let maj = n.add_node(NodeKind::Or, &[ab, ac, bc]);
        let x = n.add_node(NodeKind::Xor, &[a, b, c.inverted()]);
        n.add_output("maj".into(), maj, None);
        n.add_output("x".into(), x, Some(Edge::TRUE));
        let empty_and = n.add_node(NodeKind::And, &[]);
        n.add_output("one".into(), empty_and, None);
        for m in 0..8u32 {
            let bits = [m & 1 == 1, m & 2 == 2, m & 4 == 4];
            let want_maj = bits.iter().filter(|&&b| b).count() >= 2;
            let want_x = bits[0] ^ bits[1] ^ !bits[2];
            assert_eq!(n.eval(&bits), vec![want_maj, want_x, true]);
        }
        assert_eq!(n.node_count(), 6);
        assert_eq!(n.fanin_count(), 12);
    }

    #[test]
    #[should_panic(expected = "not defined yet")]
    fn nodes_must_read_earlier_signals() {
        let mut n = Netlist::new(vec!["a".into()]);
        n.add_node(NodeKind::And, &[Edge::new(2, false)]);
    }

    #[test]
    fn byte_errors_locate_lines_and_columns() {
        let bytes = b"aig 1 1 0 1 0\n2\n\x80\x01xyz";
        let e = byte_error("f.aig", bytes, 17, "here");
        assert_eq!((e.location.line, e.location.column), (3, 2));
        assert_eq!(e.line_text, "..xyz");
        let e = byte_error("f.aig", bytes, 4, "there");
        assert_eq!((e.location.line, e.location.column), (1, 5));
    }

    #[test]
    fn dispatch_by_extension_and_content() {
        let l = ReadLimits::default();
        let cnf = b"p cnf 1 1\n1 0\n";
        assert_eq!(read_netlist("f.CNF", cnf, &l).unwrap().input_count(), 1);
        assert_eq!(read_netlist("f.txt", cnf, &l).unwrap().input_count(), 1);
        let blif = b"# c\n.model m\n.inputs a\n.outputs a\n.end\n";
        assert_eq!(read_netlist("m", blif, &l).unwrap().outputs().len(), 1);
        let pla = b".i 1\n.o 1\n1 1\n.e\n";
        assert_eq!(read_netlist("p.dat", pla, &l).unwrap().outputs().len(), 1);
        let aag = b"aag 1 1 0 1 0\n2\n3\n";
        assert_eq!(read_netlist("x", aag, &l).unwrap().input_count(), 1);
        let Err(ReadError::Malformed(e)) = read_netlist("f.v", b"module m;", &l) else {
            panic!("unknown format accepted")
        };
        assert!(e.to_string().contains("unknown design file format"), "{e}");
        assert!(e.kind.hint.unwrap().contains(".blif"));
        let Err(ReadError::Malformed(e)) = read_netlist("f.blif", b".model \xff\n", &l) else {
            panic!("non-UTF-8 accepted")
        };
        assert_eq!((e.location.line, e.location.column), (1, 8));
    }
}
