//! Label text for the diagram: cleaning user text into something an XML file
//! can carry, and estimating how much room a label takes so the layout can
//! keep labels apart. Not for escaping (the `svg` crate escapes markup) and
//! not for measuring real glyphs: the estimate is deliberately generous.

use unicode_width::UnicodeWidthChar;

/// The font the diagram asks for: the generic monospace family, so every
/// viewer picks its own monospaced face and a label's width stays a matter
/// of counting characters.
pub(crate) const FONT_FAMILY: &str = "monospace";

/// Advance of one character cell as a share of the font size. Monospace faces
/// advance 0.60 em (common practice); 0.62 leaves room for a fallback face.
pub(crate) const ADVANCE_EM: f64 = 0.62;
/// Room above the baseline, as a share of the font size (ascenders and
/// accents stay below 1 em in common faces).
pub(crate) const ASCENT_EM: f64 = 1.0;
/// Room below the baseline for descenders.
pub(crate) const DESCENT_EM: f64 = 0.25;

/// User text made safe to put in XML and on one line: characters XML 1.0
/// does not allow (control characters, U+FFFE, U+FFFF) and the invisible
/// direction overrides that could make a label read differently from what it
/// is are dropped; line breaks and tabs become spaces; runs of spaces shrink
/// to one.
pub(crate) fn clean(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut last_space = true;
    for c in text.chars() {
        let c = match c {
            '\t' | '\n' | '\r' => ' ',
            c if is_dropped(c) => continue,
            c => c,
        };
        if c == ' ' {
            if last_space {
                continue;
            }
            last_space = true;
        } else {
            last_space = false;
        }
        out.push(c);
    }
    while out.ends_with(' ') {
        out.pop();
    }
    out
}

fn is_dropped(c: char) -> bool {
    // XML 1.0 §2.2 `Char`: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] |
    // [#x10000-#x10FFFF]; C1 controls are allowed but discouraged there.
    let code = u32::from(c);
    code < 0x20
        || (0x7f..=0x9f).contains(&code)
        || code == 0xfffe
        || code == 0xffff
        // Bidirectional embeddings, overrides and isolates.
        || (0x202a..=0x202e).contains(&code)
        || (0x2066..=0x2069).contains(&code)
}

/// How many character cells a text takes: wide East Asian characters and
/// emoji take two, combining marks none (Unicode East Asian Width, via
/// `unicode-width`). Counted character by character, the measure `textwrap`
/// wraps by, so a wrapped line never measures wider than its limit.
pub(crate) fn cells(text: &str) -> usize {
    text.chars().map(char_cells).sum()
}

fn char_cells(c: char) -> usize {
    // Control characters have no width; `clean` drops them anyway.
    UnicodeWidthChar::width(c).unwrap_or(0)
}

/// Width of a label at a font size.
pub(crate) fn width(text: &str, size: f64) -> f64 {
    cells(text) as f64 * ADVANCE_EM * size
}

/// The text cut to at most `max_cells` cells, ending in `…` when cut.
pub(crate) fn truncate(text: &str, max_cells: usize) -> String {
    if cells(text) <= max_cells {
        return text.to_string();
    }
    let mut out = String::new();
    let mut used = 0;
    for c in text.chars() {
        let w = char_cells(c);
        if used + w + 1 > max_cells {
            break;
        }
        used += w;
        out.push(c);
    }
    out.push('…');
    out
}

/// The text broken into lines of at most `max_cells` cells (never fewer than
/// eight), at spaces where possible; a word longer than a line is cut.
pub(crate) fn wrap(text: &str, max_cells: usize) -> Vec<String> {
    // First fit works in time linear in the text, whatever its words; the
    // optimal fit would weigh every break against every other.
    let options = textwrap::Options::new(max_cells.max(8))
        .wrap_algorithm(textwrap::WrapAlgorithm::FirstFit)
        .word_separator(textwrap::WordSeparator::AsciiSpace)
        // Breaks only at spaces: `buck-5v-3a` stays one word.
        .word_splitter(textwrap::WordSplitter::NoHyphenation)
        .break_words(true);
    textwrap::wrap(text.trim_start(), options)
        .into_iter()
        .map(std::borrow::Cow::into_owned)
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn clean_keeps_only_characters_xml_allows() {
        // XML 1.0 §2.2: U+0001 and U+FFFF are not characters a document may hold.
        assert_eq!(clean("a\u{1}b\u{ffff}c"), "abc");
        assert_eq!(clean("two\nlines\tand  tabs "), "two lines and tabs");
        assert_eq!(clean("rail \u{202e}V5"), "rail V5");
        assert_eq!(clean("5 V ±2 % µA Ω"), "5 V ±2 % µA Ω");
    }

    #[test]
    fn wide_characters_take_two_cells() {
        // Unicode East Asian Width: CJK ideographs are Wide.
        assert_eq!(cells("ab"), 2);
        assert_eq!(cells("电池"), 4);
    }

    #[test]
    fn wrap_breaks_at_spaces_and_cuts_long_words() {
        assert_eq!(wrap("one two three", 7), vec!["one two", "three"]);
        assert_eq!(wrap("abcdefghijkl", 8), vec!["abcdefgh", "ijkl"]);
        for line in wrap("a fairly long sentence that wraps around twice", 12) {
            assert!(cells(&line) <= 12, "{line}");
        }
    }

    #[test]
    fn wrap_counts_wide_characters_as_two_cells() {
        // Unicode East Asian Width: each ideograph is Wide, so eight fit in
        // sixteen cells and the ninth starts a new line.
        let lines = wrap(&"电".repeat(9), 16);
        assert_eq!(lines, vec!["电".repeat(8), "电".to_string()]);
    }

    #[test]
    fn wrap_keeps_the_text_and_drops_only_spaces() {
        assert_eq!(wrap("", 10), vec![String::new()]);
        let text = "rail tags show voltage from empty to full battery";
        let lines = wrap(text, 10);
        assert_eq!(lines.join(" "), text);
        assert!(
            lines
                .iter()
                .all(|l| !l.starts_with(' ') && !l.ends_with(' '))
        );
        assert_eq!(wrap("  indented", 10), vec!["indented"]);
        assert_eq!(
            wrap("part regulator/buck-5v-3a", 20),
            vec!["part", "regulator/buck-5v-3a"]
        );
    }

    #[test]
    fn wrap_cuts_a_word_of_a_million_letters_into_full_lines() {
        // 2^20 letters at 40 cells a line: 26,214 full lines and one of 16.
        let word = "w".repeat(1 << 20);
        let lines = wrap(&word, 40);
        assert_eq!(lines.len(), 26_215);
        assert!(lines[..26_214].iter().all(|l| cells(l) == 40));
        assert_eq!(cells(&lines[26_214]), 16);
        assert_eq!(lines.concat(), word);
    }

    #[test]
    fn truncate_marks_the_cut() {
        assert_eq!(truncate("short", 10), "short");
        let cut = truncate("a_very_long_part_name", 10);
        assert_eq!(cells(&cut), 10);
        assert!(cut.ends_with('…'));
    }
}
