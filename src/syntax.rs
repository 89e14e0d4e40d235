//! YAML text to a tree of nodes, each carrying the byte span it came from.
//!
//! This is the only place that knows about YAML. It does not know what a part or
//! a net is: the `model` stage reads the tree, so that every input problem can be
//! collected in one pass instead of stopping at serde's first error. Scalars keep
//! the text as written (a plain `y` stays `y`, not a YAML 1.1 boolean), so names
//! and quantities reach the model exactly as the user typed them.

use serde::de::{self, DeserializeSeed, Deserializer, MapAccess, SeqAccess, Visitor};
use std::borrow::Cow;
use std::fmt;
use std::sync::{Arc, OnceLock};

/// Which loaded text a span points into (the plan, or a library part file).
#[derive(
    Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize,
)]
pub struct SourceId(pub u32);

/// A byte range in one source text.
#[derive(
    Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize,
)]
pub struct Span {
    /// The text it points into.
    pub source: SourceId,
    /// The byte offset of its first byte.
    pub start: usize,
    /// The byte offset just past its last byte.
    pub end: usize,
}

impl Span {
    /// The span of bytes `start..end` of a source; an `end` before `start` is taken
    /// as `start` (an empty span).
    pub fn new(source: SourceId, start: usize, end: usize) -> Self {
        Span {
            source,
            start,
            end: end.max(start),
        }
    }

    /// A span inside this one, from byte offsets relative to its start.
    pub fn within(self, range: std::ops::Range<usize>) -> Span {
        let start = (self.start + range.start).min(self.end);
        let end = (self.start + range.end).clamp(start, self.end.max(start));
        Span::new(self.source, start, end)
    }
}

/// Every text the run has read, so spans can be turned into lines and snippets.
#[derive(Clone, Debug, Default)]
pub struct Sources {
    entries: Vec<Entry>,
}

#[derive(Clone, Debug)]
struct Entry {
    name: String,
    text: Arc<str>,
    /// Built on the first position lookup, then shared by every diagnostic:
    /// a lookup is a binary search, not a scan of the text.
    lines: OnceLock<LineIndex>,
}

impl Sources {
    /// Keeps a text under the name reports show for it (the plan's file name, a
    /// part's `parts/…` path) and returns its id.
    pub fn add(&mut self, name: impl Into<String>, text: impl Into<Arc<str>>) -> SourceId {
        self.entries.push(Entry {
            name: name.into(),
            text: text.into(),
            lines: OnceLock::new(),
        });
        SourceId(self.entries.len() as u32 - 1)
    }

    /// The name a text was added under. Panics for an id from another `Sources`.
    pub fn name(&self, id: SourceId) -> &str {
        &self.entries[id.0 as usize].name
    }

    /// The text itself. Panics for an id from another `Sources`.
    pub fn text(&self, id: SourceId) -> &Arc<str> {
        &self.entries[id.0 as usize].text
    }

    /// Where each line of a source starts.
    pub fn lines(&self, id: SourceId) -> &LineIndex {
        let entry = &self.entries[id.0 as usize];
        entry.lines.get_or_init(|| LineIndex::new(&entry.text))
    }

    /// 1-based line and column (in characters) of a span's start.
    pub fn line_column(&self, span: Span) -> (usize, usize) {
        self.line_column_at(span.source, span.start)
    }

    /// 1-based line and column (in characters) of a byte offset in a source.
    pub fn line_column_at(&self, id: SourceId, offset: usize) -> (usize, usize) {
        self.lines(id).line_column(self.text(id), offset)
    }
}

/// The start of every line of a text. Lines end at `\n`, `\r\n` or a lone
/// `\r` (the YAML line breaks), so a file saved with old Mac line endings
/// is numbered as its editor shows it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LineIndex {
    starts: Vec<usize>,
}

impl LineIndex {
    /// Index the line starts of `text` once, so every later position lookup
    /// is a binary search.
    pub fn new(text: &str) -> LineIndex {
        let bytes = text.as_bytes();
        let mut starts = vec![0];
        let mut i = 0;
        while i < bytes.len() {
            match bytes[i] {
                b'\n' => starts.push(i + 1),
                b'\r' if bytes.get(i + 1) == Some(&b'\n') => {
                    starts.push(i + 2);
                    i += 1;
                }
                b'\r' => starts.push(i + 1),
                _ => {}
            }
            i += 1;
        }
        LineIndex { starts }
    }

    /// How many lines the text has (an empty text has one).
    pub fn count(&self) -> usize {
        self.starts.len()
    }

    /// The 0-based line holding a byte offset.
    pub fn line_of(&self, offset: usize) -> usize {
        self.starts.partition_point(|&start| start <= offset) - 1
    }

    /// Byte range of a 0-based line without its line break.
    pub fn line_range(&self, text: &str, line: usize) -> std::ops::Range<usize> {
        let start = self.starts[line.min(self.starts.len() - 1)];
        let next = self.starts.get(line + 1).copied().unwrap_or(text.len());
        let bytes = text.as_bytes();
        let mut end = next;
        if end > start && bytes[end - 1] == b'\n' {
            end -= 1;
        }
        if end > start && bytes[end - 1] == b'\r' {
            end -= 1;
        }
        start..end
    }

    /// 1-based line and column (in characters) of a byte offset, clamped
    /// into the text.
    pub fn line_column(&self, text: &str, offset: usize) -> (usize, usize) {
        let offset = floor_char_boundary(text, offset);
        let line = self.line_of(offset);
        let start = self.starts[line];
        (line + 1, text[start..offset].chars().count() + 1)
    }

    /// Byte offset of a 1-based line and column (in characters), clamped
    /// into the text.
    pub fn offset_of(&self, text: &str, line: usize, column: usize) -> usize {
        let Some(&start) = self.starts.get(line.max(1) - 1) else {
            return text.len();
        };
        let rest = &text[start..];
        start
            + rest
                .char_indices()
                .nth(column.saturating_sub(1))
                .map_or(rest.len(), |(i, _)| i)
    }
}

/// 1-based line and column (in characters) of a byte offset, clamped into the
/// text. Scans the text: for one lookup; `Sources::line_column` keeps an index.
pub fn line_column(text: &str, offset: usize) -> (usize, usize) {
    LineIndex::new(text).line_column(text, offset)
}

/// Whether a character must not reach a terminal as it is: control codes
/// (C0 but tab and line feed, DEL, C1) can move the cursor, clear the screen
/// or retitle the window; bidirectional marks, embeddings, overrides and
/// isolates reorder what is shown around them.
pub fn is_unsafe_on_terminal(c: char) -> bool {
    (c.is_control() && c != '\n' && c != '\t')
        || matches!(
            c,
            '\u{061C}' | '\u{200E}' | '\u{200F}' | '\u{202A}'..='\u{202E}' | '\u{2066}'..='\u{2069}'
        )
}

/// Text as a terminal may show it: every character `is_unsafe_on_terminal`
/// becomes a visible escape (`\u{1b}`), everything else stays as written.
pub fn visible(text: &str) -> Cow<'_, str> {
    if !text.chars().any(is_unsafe_on_terminal) {
        return Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        if is_unsafe_on_terminal(c) {
            out.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

/// The largest offset at or before `offset` (clamped into the text) that falls
/// on a character boundary, so a byte offset can always slice the text.
pub fn floor_char_boundary(text: &str, mut offset: usize) -> usize {
    offset = offset.min(text.len());
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    offset
}

/// A YAML node with its span.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Node {
    /// What value it holds.
    pub kind: NodeKind,
    /// Where it is written.
    pub span: Span,
}

/// The kinds of YAML value.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum NodeKind {
    /// An empty value (`key:` with nothing after it).
    Null,
    /// The scalar as written (quotes removed for quoted scalars).
    Scalar(String),
    /// A list, in file order.
    Seq(Vec<Node>),
    /// A mapping's key-value pairs, in file order.
    Map(Vec<(Node, Node)>),
}

impl Node {
    /// Calls `f` on the span of this node and of every node below it (a
    /// tree taken into other sources, or to other offsets).
    pub fn for_each_span_mut(&mut self, f: &mut impl FnMut(&mut Span)) {
        f(&mut self.span);
        match &mut self.kind {
            NodeKind::Map(entries) => {
                for (key, value) in entries {
                    key.for_each_span_mut(f);
                    value.for_each_span_mut(f);
                }
            }
            NodeKind::Seq(items) => {
                for item in items {
                    item.for_each_span_mut(f);
                }
            }
            NodeKind::Scalar(_) | NodeKind::Null => {}
        }
    }

    /// The text of a scalar; `None` for any other kind.
    pub fn as_scalar(&self) -> Option<&str> {
        match &self.kind {
            NodeKind::Scalar(s) => Some(s),
            _ => None,
        }
    }

    /// The entries of a mapping; `None` for any other kind.
    pub fn as_map(&self) -> Option<&[(Node, Node)]> {
        match &self.kind {
            NodeKind::Map(entries) => Some(entries),
            _ => None,
        }
    }

    /// The items of a list; `None` for any other kind.
    pub fn as_seq(&self) -> Option<&[Node]> {
        match &self.kind {
            NodeKind::Seq(items) => Some(items),
            _ => None,
        }
    }

    /// The value under a scalar key of a mapping.
    pub fn get(&self, key: &str) -> Option<&Node> {
        self.as_map()?
            .iter()
            .find(|(k, _)| k.as_scalar() == Some(key))
            .map(|(_, v)| v)
    }

    /// What kind of YAML value this is, for messages ("a list", "a mapping").
    pub fn describe(&self) -> &'static str {
        match self.kind {
            NodeKind::Null => "an empty value",
            NodeKind::Scalar(_) => "a single value",
            NodeKind::Seq(_) => "a list",
            NodeKind::Map(_) => "a mapping",
        }
    }
}

/// A YAML syntax error: the text is not YAML, so nothing further can be read.
#[derive(Clone, Debug, PartialEq)]
pub struct SyntaxError {
    /// What is wrong, from the YAML reader.
    pub message: String,
    /// Where the reader stopped.
    pub span: Span,
}

/// How a size-limit message begins (see `SyntaxError::is_size_limit`).
const TOO_LARGE: &str = "the plan is too large";

impl SyntaxError {
    /// Whether the text was refused for its size rather than its syntax.
    pub fn is_size_limit(&self) -> bool {
        self.message.starts_with(TOO_LARGE)
    }
}

/// Fewest YAML nodes (mappings, lists and values) the reader accepts, for
/// any input: covers a plan of about 95,000 parts.
const MIN_NODES: usize = 2_000_000;
/// Bytes of input that buy one more node beyond `MIN_NODES`. Written out, a
/// plan spends 6 to 10 bytes per node and no YAML node takes fewer than 2
/// (`a,`), so a plan written out in full never reaches the budget; only
/// aliases (`*name`) that repeat large parts can, and they cannot make a
/// small file take unbounded memory.
const BYTES_PER_NODE: usize = 2;
/// Nesting depth. A plan needs about eight levels (parts → part → pins →
/// pin → draw); the reader recurses once per level, so the limit keeps deep
/// hostile nesting far from any thread's stack limit.
const MAX_DEPTH: usize = 24;

/// The most YAML nodes a text of this many bytes may hold.
pub fn node_limit(text_bytes: usize) -> usize {
    MIN_NODES.max(text_bytes / BYTES_PER_NODE)
}

/// The reader's settings for one text: the node budget scales with its size.
pub fn reader_options(text: &str) -> serde_saphyr::Options {
    let mut budget = serde_saphyr::Budget::default();
    budget.max_nodes = node_limit(text.len());
    budget.max_events = 4 * budget.max_nodes;
    budget.max_depth = MAX_DEPTH;
    let mut options = serde_saphyr::Options::default();
    options.budget = Some(budget);
    options.with_snippet = false;
    // Numbers too large for a float, `.inf` and `.nan` stay text: the model
    // then reports them as values, with the rest of the plan still read.
    options.non_finite_float_policy = serde_saphyr::NonFiniteFloatPolicy::AsString;
    options
}

/// Parses one YAML document into a spanned tree.
pub fn parse(source: SourceId, text: &str) -> Result<Node, SyntaxError> {
    let options = reader_options(text);
    let lines = OnceLock::new();
    let seed = NodeSeed {
        source,
        text,
        lines: &lines,
    };
    match serde_saphyr::with_deserializer_from_str_with_options(text, options, |d| {
        seed.deserialize(d)
    }) {
        Ok(root) => Ok(root),
        Err(error) => {
            let full = error.to_string();
            if let Some(message) = size_limit_message(&full, text) {
                // A size limit: the position where the count ran out says
                // nothing about the plan, so the report points at its start.
                return Err(SyntaxError {
                    message,
                    span: Span::new(source, 0, 0),
                });
            }
            let offset = error
                .location()
                .map(|loc| offset_of(text, &OnceLock::new(), &loc))
                .unwrap_or(0);
            let message = plain_message(&error.to_string());
            let offset = if message.contains("more than one YAML document") {
                document_marker_before(text, offset)
            } else {
                offset
            };
            let end = next_char_end(text, offset);
            Err(SyntaxError {
                message,
                span: Span::new(source, offset, end),
            })
        }
    }
}

/// The message for a reader limit on the size of what a text expands to
/// (nodes, events, aliases and what they repeat, text of values): the plan
/// is too large, with the limit and the file's size. `None` for any other
/// error, nesting depth included (that one has a place in the file).
fn size_limit_message(error: &str, text: &str) -> Option<String> {
    let breach = error.split("budget breached: ").nth(1)?;
    let name = breach.split([' ', '{', '(']).next().unwrap_or("");
    let budget = reader_options(text).budget.unwrap_or_default();
    let bytes = text.len();
    let (limit, what) = match name {
        "Nodes" => (budget.max_nodes, "YAML nodes"),
        "Events" => (budget.max_events, "YAML events"),
        "Aliases" => (budget.max_aliases, "aliases (`*name`)"),
        "Anchors" => (budget.max_anchors, "anchors (`&name`)"),
        "RecordedAnchorEvents" => (
            budget.max_recorded_anchor_events,
            "YAML events repeated by aliases",
        ),
        "RecordedAnchorBytes" => (
            budget.max_recorded_anchor_bytes,
            "bytes repeated by aliases",
        ),
        "ScalarBytes" => (budget.max_total_scalar_bytes, "bytes of values"),
        "MergeKeys" => (budget.max_merge_keys, "merge keys (`<<`)"),
        "Documents" => (budget.max_documents, "YAML documents"),
        _ => return None,
    };
    Some(format!(
        "{TOO_LARGE}: it expands to more than {limit} {what}, the most a file of {bytes} bytes may hold"
    ))
}

/// The reader reports a second document where its content begins; the user
/// wants the `---` (or `...`) line that started it.
fn document_marker_before(text: &str, offset: usize) -> usize {
    let lines = LineIndex::new(text);
    let last = lines.line_of(offset.min(text.len()));
    (0..=last)
        .rev()
        .map(|line| lines.line_range(text, line))
        .find(|range| {
            let line = &text[range.clone()];
            (line.starts_with("---") || line.starts_with("..."))
                && line[3..].chars().next().is_none_or(char::is_whitespace)
        })
        .map_or(offset, |range| range.start)
}

fn next_char_end(text: &str, offset: usize) -> usize {
    text[offset..]
        .chars()
        .next()
        .map_or(offset, |c| offset + c.len_utf8())
}

/// The reader's message in the plan's terms: no position (the report shows
/// it), no names of the reader's own settings, at most one short line.
fn plain_message(message: &str) -> String {
    let line = message.lines().next().unwrap_or(message).trim();
    let line = line.strip_prefix("error:").unwrap_or(line).trim();
    let line = match line.find(": ") {
        Some(i) if line[..i].starts_with("line ") => &line[i + 2..],
        _ => line,
    };
    let line = match line.rfind(" at line ") {
        Some(i) => &line[..i],
        None => line,
    };
    let known = if let Some(rest) = line.strip_prefix("duplicate mapping key: ") {
        let key = rest.split(',').next().unwrap_or(rest).trim();
        format!("`{key}` is given twice in the same mapping; keep one of them")
    } else if line.contains("multiple YAML documents") || line.contains("from_str_multiple") {
        "the file holds more than one YAML document (`---`); keep one plan per file".to_string()
    } else if line.contains("budget breached") || line.contains("Depth") {
        "the file is nested too deeply or is too large to be a wiring plan".to_string()
    } else if line.contains("recursive") || line.contains("alias") {
        "an alias (`*name`) is used in a way a plan cannot hold".to_string()
    } else if line.is_empty() {
        "the file is not valid YAML".to_string()
    } else {
        line.to_string()
    };
    // A pathological scalar must not turn into a megabyte-long message.
    const LIMIT: usize = 200;
    if known.chars().count() > LIMIT {
        let cut: String = known.chars().take(LIMIT).collect();
        format!("{cut}…")
    } else {
        known
    }
}

/// A location's byte offset; from its line and column (through an index
/// built once per parse) when the reader gave none.
fn offset_of(text: &str, lines: &OnceLock<LineIndex>, location: &serde_saphyr::Location) -> usize {
    let span = location.span();
    if let Some(byte) = span.byte_offset()
        && (byte as usize) <= text.len()
        && text.is_char_boundary(byte as usize)
    {
        return byte as usize;
    }
    lines.get_or_init(|| LineIndex::new(text)).offset_of(
        text,
        location.line() as usize,
        location.column() as usize,
    )
}

/// serde-saphyr's protocol for a value read with its position, the one its
/// `Spanned<T>` uses (serde-saphyr is pinned to one version in Cargo.toml):
/// asked for a newtype struct of this name, the reader hands over a map of
/// the marker, the value, where it is referenced and where it is defined.
/// Reading it through a seed builds each [`Node`] as its value is read, with
/// no intermediate tree; a reader that did not honour the name would hand
/// over the plain value, which `PlacedVisitor` refuses.
const SPANNED: &str = "__yaml_spanned";
/// The first key of that map.
const SPANNED_MARKER: &str = "__serde_saphyr_private_spanned";

/// Builds one [`Node`] (and everything under it) from the reader.
#[derive(Clone, Copy)]
struct NodeSeed<'t> {
    source: SourceId,
    text: &'t str,
    lines: &'t OnceLock<LineIndex>,
}

impl NodeSeed<'_> {
    /// A node from its value and where the reader says it is written.
    fn node(self, value: Value, referenced: &serde_saphyr::Location) -> Node {
        let text = self.text;
        let start = offset_of(text, self.lines, referenced);
        let declared_len = referenced
            .span()
            .byte_len()
            .filter(|len| referenced.span().byte_offset().is_some() && *len < u32::MAX as u64)
            .map_or(0, |len| len as usize);
        let end = floor_char_boundary(text, (start + declared_len).min(text.len()));
        let kind = match value {
            Value::Null => NodeKind::Null,
            Value::Scalar(value) => NodeKind::Scalar(scalar_as_written(&text[start..end], value)),
            Value::Seq(items) => NodeKind::Seq(items),
            Value::Map(entries) => NodeKind::Map(entries),
        };
        Node {
            kind,
            span: Span::new(self.source, start, end),
        }
    }
}

impl<'de> de::DeserializeSeed<'de> for NodeSeed<'_> {
    type Value = Node;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Node, D::Error> {
        d.deserialize_newtype_struct(SPANNED, SpannedVisitor(self))
    }
}

struct SpannedVisitor<'t>(NodeSeed<'t>);

impl<'de> Visitor<'de> for SpannedVisitor<'_> {
    type Value = Node;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any YAML value")
    }
    fn visit_newtype_struct<D: Deserializer<'de>>(self, d: D) -> Result<Node, D::Error> {
        d.deserialize_any(PlacedVisitor(self.0))
    }
}

/// The keys of the reader's map for a value with its position.
enum Field {
    Marker,
    Value,
    Referenced,
    Other,
}

struct FieldSeed;

impl<'de> de::DeserializeSeed<'de> for FieldSeed {
    type Value = Field;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Field, D::Error> {
        d.deserialize_identifier(self)
    }
}

impl Visitor<'_> for FieldSeed {
    type Value = Field;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a field of a value with its position")
    }
    fn visit_str<E: de::Error>(self, v: &str) -> Result<Field, E> {
        Ok(match v {
            SPANNED_MARKER => Field::Marker,
            "value" => Field::Value,
            "referenced" => Field::Referenced,
            _ => Field::Other,
        })
    }
}

struct PlacedVisitor<'t>(NodeSeed<'t>);

impl<'de> Visitor<'de> for PlacedVisitor<'_> {
    type Value = Node;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any YAML value")
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Node, A::Error> {
        let mut marked = false;
        let mut value = None;
        let mut referenced = None;
        while let Some(field) = map.next_key_seed(FieldSeed)? {
            match field {
                Field::Marker => {
                    marked = true;
                    map.next_value::<de::IgnoredAny>()?;
                }
                Field::Value if marked => value = Some(map.next_value_seed(ValueSeed(self.0))?),
                Field::Referenced if marked => {
                    referenced = Some(map.next_value::<serde_saphyr::Location>()?);
                }
                _ if !marked => {
                    return Err(de::Error::custom(
                        "the YAML reader gave a value without its position",
                    ));
                }
                // `defined`: where an alias's anchor is; the node's span is
                // where it is used.
                _ => {
                    map.next_value::<serde_saphyr::Location>()?;
                }
            }
        }
        match (value, referenced) {
            (Some(value), Some(referenced)) => Ok(self.0.node(value, &referenced)),
            _ => Err(de::Error::custom(
                "the YAML reader gave a value without its position",
            )),
        }
    }
}

/// A node's value as the reader hands it over: its children already
/// [`Node`]s, a scalar as the reader interpreted it (its written text is
/// taken once its span is known).
enum Value {
    Null,
    Scalar(String),
    Seq(Vec<Node>),
    Map(Vec<(Node, Node)>),
}

struct ValueSeed<'t>(NodeSeed<'t>);

impl<'de> de::DeserializeSeed<'de> for ValueSeed<'_> {
    type Value = Value;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for ValueSeed<'_> {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any YAML value")
    }
    fn visit_str<E: de::Error>(self, v: &str) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_string<E: de::Error>(self, v: String) -> Result<Value, E> {
        Ok(Value::Scalar(v))
    }
    fn visit_i64<E: de::Error>(self, v: i64) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_u64<E: de::Error>(self, v: u64) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_i128<E: de::Error>(self, v: i128) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_u128<E: de::Error>(self, v: u128) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_bool<E: de::Error>(self, v: bool) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_char<E: de::Error>(self, v: char) -> Result<Value, E> {
        Ok(Value::Scalar(v.to_string()))
    }
    fn visit_unit<E: de::Error>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_none<E: de::Error>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_some<D: Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        d.deserialize_any(self)
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Value, A::Error> {
        let mut items = Vec::new();
        while let Some(item) = seq.next_element_seed(self.0)? {
            items.push(item);
        }
        Ok(Value::Seq(items))
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Value, A::Error> {
        let mut entries = Vec::new();
        while let Some(entry) = map.next_entry_seed(self.0, self.0)? {
            entries.push(entry);
        }
        Ok(Value::Map(entries))
    }
}

/// Plain scalars are taken from the source text so that YAML's type guessing
/// (`y` as a boolean, `1.10` as 1.1) never changes what the user wrote.
fn scalar_as_written(raw: &str, interpreted: String) -> String {
    let raw = raw.trim();
    let quoted_or_block = raw.starts_with(['\'', '"', '|', '>', '*', '&', '!']);
    if raw.is_empty() || quoted_or_block || raw == interpreted {
        interpreted
    } else {
        raw.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const SRC: SourceId = SourceId(0);

    fn text_at(text: &str, node: &Node) -> String {
        text[node.span.start..node.span.end].to_string()
    }

    #[test]
    fn scalars_keep_their_written_text_and_span() {
        let text = "parts:\n  y: { use: battery/lipo-3s }\n  x: 1.10\n";
        let root = parse(SRC, text).unwrap();
        let parts = root.get("parts").unwrap().as_map().unwrap();
        assert_eq!(parts[0].0.as_scalar(), Some("y"));
        assert_eq!(line_column(text, parts[0].0.span.start), (2, 3));
        assert_eq!(parts[1].1.as_scalar(), Some("1.10"));
        let used = parts[0].1.get("use").unwrap();
        assert_eq!(text_at(text, used), "battery/lipo-3s");
        assert_eq!(line_column(text, used.span.start), (2, 13));
    }

    #[test]
    fn quoted_scalars_lose_their_quotes() {
        let text = "name: 'Orchard \"scout\"'\n";
        let root = parse(SRC, text).unwrap();
        assert_eq!(
            root.get("name").unwrap().as_scalar(),
            Some("Orchard \"scout\"")
        );
    }

    #[test]
    fn syntax_errors_point_at_their_line() {
        let text = "name: x\nparts: [a, b\n";
        let error = parse(SRC, text).unwrap_err();
        assert_eq!(line_column(text, error.span.start).0, 2);
        assert!(!error.message.starts_with("error"), "{}", error.message);
    }

    #[test]
    fn duplicate_keys_are_refused() {
        let text = "a: 1\na: 2\n";
        let error = parse(SRC, text).unwrap_err();
        assert_eq!(line_column(text, error.span.start), (2, 1));
    }

    #[test]
    fn a_second_document_is_reported_at_its_marker() {
        let text = "railcheck: 1\nparts: {}\n---\nfoo: 1\n";
        let error = parse(SRC, text).unwrap_err();
        assert_eq!(line_column(text, error.span.start), (3, 1));
    }

    #[test]
    fn every_yaml_line_break_starts_a_line() {
        // YAML 1.2 §5.4: a line break is LF, CR LF or a lone CR.
        let text = "a: 1\rb: 2\r\nc: 3\nd: 4";
        let index = LineIndex::new(text);
        assert_eq!(index.count(), 4);
        assert_eq!(index.line_column(text, text.find('d').unwrap()), (4, 1));
        assert_eq!(index.line_column(text, text.find('b').unwrap()), (2, 1));
        assert_eq!(index.line_range(text, 1), 5..9);
        assert_eq!(index.offset_of(text, 3, 4), text.find('3').unwrap());
    }

    #[test]
    fn an_error_in_a_cr_only_file_is_at_its_line() {
        let text = "a: 1\rb: [1, 2\r";
        let error = parse(SRC, text).unwrap_err();
        assert_eq!(line_column(text, error.span.start).0, 2);
    }

    #[test]
    fn control_codes_and_bidi_overrides_become_visible() {
        // ECMA-48: ESC (0x1B) starts a control sequence; CSI (U+009B) is its
        // C1 form. Unicode UAX #9: U+202E is RIGHT-TO-LEFT OVERRIDE.
        assert_eq!(visible("a\u{1b}]0;x\u{7}b"), "a\\u{1b}]0;x\\u{7}b");
        assert_eq!(visible("\u{9b}2J \u{202e}cba"), "\\u{9b}2J \\u{202e}cba");
        assert_eq!(visible("tab\tand\nline µ"), "tab\tand\nline µ");
    }

    #[test]
    fn columns_count_characters_not_bytes() {
        assert_eq!(line_column("a: µA\nb", 5), (1, 5));
        assert_eq!(line_column("a: µA\nb", 7), (2, 1));
    }
}
