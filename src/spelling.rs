//! Suggestions for misspelt words: which of the words a place accepts the
//! user most likely meant to write. The plan reader uses it for keys, classes
//! and part, pin and net names; the quantity parser for unit spellings. Not a
//! fuzzy search: a word only finds a candidate a few edits away.

/// Longest word, in characters, that is taken for a typo. Keys, units and
/// part names are far shorter; a longer word is not a slip of a short one,
/// and skipping it keeps hostile input (a name of many thousand letters)
/// from costing time in proportion to its length squared.
pub(crate) const LONGEST_TYPO: usize = 64;

/// The work one plan's suggestions may take, in candidates looked at plus
/// cells of the edit-distance tables filled. Each unknown name is compared
/// with every name declared, so a plan of thousands of misspelt references
/// to thousands of parts would cost the product of the two; with the
/// budget spent, later unknown names are still reported, with the plain
/// hint. About 0.1 s of work: a plan with a few hundred parts and dozens of
/// typos uses a fraction of it.
pub(crate) const SUGGESTION_WORK: u64 = 20_000_000;

/// The suggestion search for one plan, within [`SUGGESTION_WORK`].
pub(crate) struct Speller {
    left: u64,
}

impl Speller {
    pub(crate) fn new() -> Speller {
        Speller::with_budget(SUGGESTION_WORK)
    }

    pub(crate) fn with_budget(work: u64) -> Speller {
        Speller { left: work }
    }

    /// As [`closest`], while work is left; `None` once it is spent. A search
    /// that runs out part way suggests nothing rather than the best of the
    /// candidates it happened to reach.
    pub(crate) fn closest<'c>(
        &mut self,
        word: &str,
        candidates: impl IntoIterator<Item = &'c str>,
    ) -> Option<&'c str> {
        if self.left == 0 {
            return None;
        }
        let found = search(word, candidates, &mut self.left);
        if self.left == 0 { None } else { found }
    }
}

/// The candidate `word` most likely stands for, if one is close enough to be
/// a typo: at most a third of the word's length in edits (at least one).
/// Swapping two neighbouring letters is one edit (optimal string alignment),
/// so `nest` is one step from `nets`; letter case counts only between
/// candidates equally close otherwise, so `mv` finds `mV` before `mA`.
/// Remaining ties go to the earlier candidate: callers list candidates in a
/// fixed order (declaration order, or likeliest first), never a hash map's.
/// Unbudgeted: for short, fixed lists (units, keys, library ids); names a
/// plan declares go through a [`Speller`].
pub(crate) fn closest<'c>(
    word: &str,
    candidates: impl IntoIterator<Item = &'c str>,
) -> Option<&'c str> {
    let mut unlimited = u64::MAX;
    search(word, candidates, &mut unlimited)
}

fn search<'c>(
    word: &str,
    candidates: impl IntoIterator<Item = &'c str>,
    left: &mut u64,
) -> Option<&'c str> {
    let folded = word.to_lowercase();
    let length = folded.chars().count();
    if length > LONGEST_TYPO {
        return None;
    }
    let limit = (length / 3).max(1);
    let mut best = None;
    for (position, candidate) in candidates.into_iter().enumerate() {
        // Looking at a candidate costs one unit, comparing it the cells of
        // the two tables; a search that cannot pay stops.
        if *left == 0 {
            return None;
        }
        *left -= 1;
        // Lowercasing never shortens a text, so a candidate already too
        // long is skipped before it is copied; the length difference is a
        // lower bound of the distance, so one beyond the limit cannot match.
        if candidate.chars().take(length + limit + 1).count() > length + limit {
            continue;
        }
        let candidate_folded = candidate.to_lowercase();
        let candidate_length = candidate_folded.chars().count();
        if candidate_length.abs_diff(length) > limit {
            continue;
        }
        let cells = 2 * ((length + 1) * (candidate_length + 1)) as u64;
        if *left < cells {
            *left = 0;
            return None;
        }
        *left -= cells;
        let distance = strsim::osa_distance(&folded, &candidate_folded);
        if distance > limit {
            continue;
        }
        let key = (distance, strsim::osa_distance(word, candidate), position);
        if best.is_none_or(|(b, _)| key < b) {
            best = Some((key, candidate));
        }
    }
    best.map(|(_, candidate)| candidate)
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

    #[test]
    fn a_spent_budget_suggests_nothing_but_a_fresh_one_does() {
        // `capacty` (7 letters, 2 edits allowed) is compared with `cells`
        // (8 × 6 cells a table) and `capacity` (8 × 9), two tables each, plus
        // one unit per candidate looked at: one unit is left over.
        let mut speller = Speller::with_budget(2 + 2 * 8 * 6 + 2 * 8 * 9 + 1);
        assert_eq!(
            speller.closest("capacty", ["cells", "capacity"]),
            Some("capacity")
        );
        assert_eq!(speller.closest("capacty", ["cells", "capacity"]), None);
        assert_eq!(speller.closest("pak", ["pack"]), None);
        let mut fresh = Speller::new();
        assert_eq!(fresh.closest("pak", ["pack"]), Some("pack"));
    }

    #[test]
    fn a_search_that_runs_out_part_way_suggests_nothing() {
        // Enough to look at `car` and compare it (2 × 4 × 4 cells), not to
        // reach `cat`: the nearer `cat` would win a full search, so a partial
        // one must not offer `car`.
        let mut speller = Speller::with_budget(1 + 2 * 4 * 4 + 1);
        assert_eq!(speller.closest("cat", ["car", "cat"]), None);
        assert_eq!(closest("cat", ["car", "cat"]), Some("cat"));
    }
}
