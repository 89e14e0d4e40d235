//! Suggestions for misspelt words: which of the words a place accepts the
//! user most likely meant to write. The plan reader uses it for keys, classes
//! and part, pin and net names; the quantity parser for unit spellings. Not a
//! fuzzy search: a word only finds a candidate a few edits away.

/// Longest word, in characters, that is taken for a typo. Keys, units and
/// part names are far shorter; a longer word is not a slip of a short one,
/// and skipping it keeps hostile input (a name of many thousand letters)
/// from costing time in proportion to its length squared.
pub(crate) const LONGEST_TYPO: usize = 64;

/// The candidate `word` most likely stands for, if one is close enough to be
/// a typo: at most a third of the word's length in edits (at least one).
/// Swapping two neighbouring letters is one edit (optimal string alignment),
/// so `nest` is one step from `nets`; letter case counts only between
/// candidates equally close otherwise, so `mv` finds `mV` before `mA`.
/// Remaining ties go to the earlier candidate: callers list candidates in a
/// fixed order (declaration order, or likeliest first), never a hash map's.
pub(crate) fn closest<'c>(
    word: &str,
    candidates: impl IntoIterator<Item = &'c str>,
) -> Option<&'c str> {
    let folded = word.to_lowercase();
    let length = folded.chars().count();
    if length > LONGEST_TYPO {
        return None;
    }
    let limit = (length / 3).max(1);
    candidates
        .into_iter()
        .enumerate()
        .filter_map(|(position, candidate)| {
            // Lowercasing never shortens a text, so a candidate already too
            // long is skipped before it is copied; the length difference is a
            // lower bound of the distance, so one beyond the limit cannot match.
            if candidate.chars().take(length + limit + 1).count() > length + limit {
                return None;
            }
            let candidate_folded = candidate.to_lowercase();
            if candidate_folded.chars().count().abs_diff(length) > limit {
                return None;
            }
            let distance = strsim::osa_distance(&folded, &candidate_folded);
            let case_distance = strsim::osa_distance(word, candidate);
            (distance <= limit).then_some((distance, case_distance, position, candidate))
        })
        .min()
        .map(|(_, _, _, candidate)| candidate)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn typos_find_their_intended_word() {
        // One dropped letter, and one swap of neighbours (a single edit in
        // optimal string alignment).
        assert_eq!(closest("capacty", ["capacity", "cells"]), Some("capacity"));
        assert_eq!(closest("nest", ["parts", "nets"]), Some("nets"));
        assert_eq!(closest("zzz", ["capacity", "cells"]), None);
    }

    #[test]
    fn letter_case_breaks_ties() {
        assert_eq!(closest("mv", ["mA", "mV", "V"]), Some("mV"));
        assert_eq!(closest("VIN", ["gnd", "vin"]), Some("vin"));
    }

    #[test]
    fn ties_go_to_the_earlier_candidate() {
        assert_eq!(closest("cat", ["cab", "car"]), Some("cab"));
        assert_eq!(closest("cat", ["car", "cab"]), Some("car"));
    }

    #[test]
    fn candidates_of_a_distant_length_are_not_matched() {
        // `ab` → `abcd` takes two insertions, beyond the one edit allowed.
        assert_eq!(closest("ab", ["abcd"]), None);
        assert_eq!(closest("ab", ["abc"]), Some("abc"));
    }

    #[test]
    fn very_long_words_get_no_suggestion() {
        let long = "a".repeat(LONGEST_TYPO + 1);
        let candidate = "a".repeat(LONGEST_TYPO);
        assert_eq!(closest(&long, [candidate.as_str()]), None);
        let longest = "a".repeat(LONGEST_TYPO);
        assert_eq!(
            closest(&longest, [candidate.as_str()]),
            Some(candidate.as_str())
        );
        // A 60,000-letter word against a 60,000-letter candidate: no table of
        // their product is built.
        let huge = "q".repeat(60_000);
        let other = format!("{}r", "q".repeat(59_999));
        assert_eq!(closest(&huge, [other.as_str()]), None);
    }
}
