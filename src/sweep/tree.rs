//! A variant's YAML tree without parsing the whole variant again.
//!
//! A variant is the plan's text with a few values spliced in. Its tree is
//! the plan's tree with the spans after each splice moved by what the
//! splice added or removed, except in the entries a splice falls in: a
//! part, a net, a mode (the entries of a top-level section written in block
//! style, each from its own line), or a whole top-level section otherwise.
//! Those entries are parsed again from the variant's text with every other
//! byte turned into a space, so their spans are the variant's own. The
//! result is the tree `syntax::parse` gives for the whole variant (a unit
//! test compares the two on every example plan); anything this cannot
//! vouch for (aliases, tabs, CR line breaks, several documents, a splice
//! across entries, a parse error) gives `None`, and the caller parses the
//! whole text.

use super::Splice;
use crate::syntax::{self, Node, NodeKind, SourceId};

/// Where the plan's top-level sections and their entries sit in its text.
#[derive(Debug)]
pub(super) struct Layout {
    sections: Vec<Section>,
    /// The end of the line (its break included) starting at each entry's
    /// and section's key line.
    line_ends: std::collections::HashMap<usize, usize>,
}

#[derive(Debug)]
struct Section {
    /// The section's key, as written.
    key: String,
    /// From the start of the key's line to the start of the next
    /// section's key line (the text's end for the last).
    start: usize,
    end: usize,
    /// The end of the key's line (its line break included).
    key_line_end: usize,
    /// Where each entry's lines start, when the value is a block mapping
    /// whose entries each begin a line; `None` re-parses the whole section.
    entries: Option<Vec<usize>>,
}

/// The start of the line `at` is on.
fn line_start(text: &str, at: usize) -> usize {
    text[..at].rfind('\n').map_or(0, |i| i + 1)
}

/// Just past the line break ending the line `at` is on (the text's end).
fn line_end(text: &str, at: usize) -> usize {
    text[at..].find('\n').map_or(text.len(), |i| at + i + 1)
}

/// Whether only spaces stand before `at` on its line.
fn begins_line(text: &str, at: usize) -> bool {
    text[line_start(text, at)..at].bytes().all(|b| b == b' ')
}

impl Layout {
    /// The layout of a plan's text and tree; `None` when the text is of a
    /// kind this does not handle.
    pub(super) fn of(text: &str, root: &Node) -> Option<Layout> {
        let awkward = text.contains(['&', '*', '\r', '\t'])
            || text
                .lines()
                .any(|l| l.starts_with("---") || l.starts_with("...") || l.starts_with('%'));
        if awkward {
            return None;
        }
        let entries = root.as_map()?;
        let mut sections = Vec::new();
        for (i, (key, value)) in entries.iter().enumerate() {
            if !begins_line(text, key.span.start)
                || line_start(text, key.span.start) != key.span.start
            {
                return None;
            }
            let start = key.span.start;
            let end = entries
                .get(i + 1)
                .map_or(text.len(), |(next, _)| next.span.start);
            let inner = match &value.kind {
                NodeKind::Map(items)
                    if !items.is_empty()
                        && !text[value.span.start..].starts_with('{')
                        && items.iter().all(|(k, _)| {
                            k.span.start > start
                                && begins_line(text, k.span.start)
                                && line_start(text, k.span.start) >= line_end(text, start)
                        }) =>
                {
                    Some(
                        items
                            .iter()
                            .map(|(k, _)| line_start(text, k.span.start))
                            .collect(),
                    )
                }
                _ => None,
            };
            sections.push(Section {
                key: key.as_scalar()?.to_string(),
                start,
                end,
                key_line_end: line_end(text, start),
                entries: inner,
            });
        }
        let mut line_ends = std::collections::HashMap::new();
        for section in &sections {
            line_ends.insert(section.start, section.key_line_end);
            for &at in section.entries.iter().flatten() {
                line_ends.insert(at, line_end(text, at));
            }
        }
        Some(Layout {
            sections,
            line_ends,
        })
    }
}

/// What a variant re-parses: a whole section, or some of its entries.
#[derive(Clone, Debug, PartialEq)]
enum Region {
    Whole,
    Entries(Vec<usize>),
}

/// The variant's tree: `base` with `splices` (in the base text's positions,
/// not overlapping) made, `variant` the text they give. `None` when only a
/// whole parse will do.
pub(super) fn variant_tree(
    layout: &Layout,
    base: &Node,
    splices: &[Splice],
    variant: &str,
) -> Option<Node> {
    let mut regions: Vec<Option<Region>> = vec![None; layout.sections.len()];
    for splice in splices {
        let k = layout
            .sections
            .iter()
            .position(|s| s.start <= splice.start && splice.start < s.end.max(s.start + 1))
            .or_else(|| {
                // An insertion at the very end of the text belongs to the
                // last section.
                let last = layout.sections.len().checked_sub(1)?;
                (splice.start == layout.sections[last].end).then_some(last)
            })?;
        let section = &layout.sections[k];
        if splice.end > section.end {
            return None;
        }
        // A line the splice starts at the left margin is a new section.
        let new_section = splice
            .text
            .split('\n')
            .skip(1)
            .any(|line| !line.is_empty() && !line.starts_with(' '));
        let entry = section
            .entries
            .as_ref()
            .filter(|_| !new_section)
            .and_then(|starts| {
                let i = starts.iter().rposition(|&s| s <= splice.start)?;
                let end = starts.get(i + 1).copied().unwrap_or(section.end);
                (splice.end <= end && splice.start >= section.key_line_end).then_some(i)
            });
        regions[k] = match (regions[k].take(), entry) {
            (Some(Region::Whole), _) | (_, None) => Some(Region::Whole),
            (Some(Region::Entries(mut list)), Some(i)) => {
                if !list.contains(&i) {
                    list.push(i);
                }
                Some(Region::Entries(list))
            }
            (None, Some(i)) => Some(Region::Entries(vec![i])),
        };
    }
    // Where a position of the base text is in the variant.
    let shift = |at: usize| -> usize {
        let mut moved = at as isize;
        for s in splices {
            if s.start < at {
                moved += s.text.len() as isize - (s.end - s.start) as isize;
            }
        }
        moved as usize
    };
    // The variant with everything but the re-parsed lines blanked.
    let mut keep = vec![false; variant.len()];
    let mut mark = |from: usize, to: usize| {
        for flag in &mut keep[from.min(variant.len())..to.min(variant.len())] {
            *flag = true;
        }
    };
    // Each kept stretch keeps the line after it too (the next entry's or
    // section's key): a value's span reaches the next token (a folded
    // scalar's takes the blank lines after it), so that token must stay
    // where it is. What that line holds is read and left out below.
    let base_text_len = layout.sections.last().map_or(0, |s| s.end);
    let next_line = |at: usize| -> usize {
        if at >= base_text_len {
            at
        } else {
            layout.line_ends.get(&at).copied().unwrap_or(at)
        }
    };
    for (section, region) in layout.sections.iter().zip(&regions) {
        match region {
            None => {}
            Some(Region::Whole) => {
                mark(shift(section.start), shift(next_line(section.end)));
            }
            Some(Region::Entries(list)) => {
                mark(shift(section.start), shift(section.key_line_end));
                let starts = section.entries.as_ref()?;
                for &i in list {
                    let end = starts.get(i + 1).copied().unwrap_or(section.end);
                    mark(shift(starts[i]), shift(next_line(end)));
                }
            }
        }
    }
    let blanked: Vec<u8> = variant
        .bytes()
        .zip(&keep)
        .map(|(b, &k)| if k || b == b'\n' { b } else { b' ' })
        .collect();
    let blanked = String::from_utf8(blanked).ok()?;
    let parsed = syntax::parse(SourceId(0), &blanked).ok()?;
    let parsed = parsed.as_map()?;

    let mut tree = base.clone();
    tree.for_each_span_mut(&mut |span| {
        span.start = shift(span.start);
        span.end = shift(span.end);
    });
    let NodeKind::Map(top) = &mut tree.kind else {
        return None;
    };
    let mut whole = Vec::with_capacity(top.len());
    for ((section, region), mut entry) in layout.sections.iter().zip(&regions).zip(top.drain(..)) {
        let Some(region) = region else {
            whole.push(entry);
            continue;
        };
        let (from, to) = (shift(section.start), shift(section.end));
        match region {
            Region::Whole => {
                // The section, and a section a splice added after it.
                whole.extend(
                    parsed
                        .iter()
                        .filter(|(k, _)| (from..to).contains(&k.span.start))
                        .cloned(),
                );
                continue;
            }
            Region::Entries(list) => {
                let (_, value) = parsed
                    .iter()
                    .find(|(k, _)| k.as_scalar() == Some(section.key.as_str()))?;
                let starts = section.entries.as_ref()?;
                let fresh = value.as_map()?;
                let NodeKind::Map(old) = &mut entry.1.kind else {
                    return None;
                };
                let mut rebuilt = Vec::with_capacity(old.len());
                for (i, kept) in old.iter().enumerate() {
                    if !list.contains(&i) {
                        rebuilt.push(kept.clone());
                        continue;
                    }
                    let from = shift(starts[i]);
                    let to = shift(starts.get(i + 1).copied().unwrap_or(section.end));
                    for pair in fresh
                        .iter()
                        .filter(|(k, _)| (from..to).contains(&k.span.start))
                    {
                        rebuilt.push(pair.clone());
                    }
                }
                if list.contains(&0) {
                    entry.1.span = value.span;
                }
                *old = rebuilt;
            }
        }
        whole.push(entry);
    }
    *top = whole;
    Some(tree)
}
