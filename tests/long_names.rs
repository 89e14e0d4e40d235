//! Misspelt names in a plan: the "did you mean" hint, and what happens when
//! the names are hostile (thousands of letters long). Every unknown name must
//! still be reported at its place; a name far longer than any key or part
//! name people type gets no suggestion, since it is no slip of a short one.
//!
//! Not for: which input problems exist and their positions (the input tests).

use railcheck::model::{InputError, Library};

fn input_errors(text: &str) -> Vec<InputError> {
    match railcheck::check("plan.yaml", text, &Library::builtin()) {
        Ok(_) => panic!("expected input errors, but the plan was read"),
        Err(failure) => failure.errors,
    }
}

fn mentioning<'e>(errors: &'e [InputError], words: &str) -> Vec<&'e InputError> {
    errors
        .iter()
        .filter(|e| e.message.contains(words))
        .collect()
}

#[test]
fn a_short_misspelt_part_name_is_suggested() {
    // One dropped letter: a third of the name's length allows it.
    let plan = "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s }\nnets:\n  VBAT: [pak.pos, pack.neg]\n";
    let errors = input_errors(plan);
    let unknown = mentioning(&errors, "unknown part `pak`");
    assert_eq!(unknown.len(), 1, "{errors:?}");
    assert_eq!(unknown[0].hint.as_deref(), Some("did you mean `pack`?"));
}

#[test]
fn a_key_of_sixty_thousand_letters_is_reported_without_a_suggestion() {
    let key = "k".repeat(60_000);
    // YAML caps implicit keys at 1024 characters; an explicit key (`? `) has no cap.
    let plan = format!("railcheck: 1\nparts: {{}}\n? {key}\n: {{}}\n");
    let errors = input_errors(&plan);
    let unknown = mentioning(&errors, "unknown key `kkk");
    assert_eq!(unknown.len(), 1, "{} errors", errors.len());
    let hint = unknown[0].hint.as_deref().unwrap_or("");
    assert!(!hint.contains("did you mean"), "{hint}");
    assert!(hint.contains("`parts`"), "{hint}");
}

#[test]
fn two_part_names_of_sixty_thousand_letters_are_compared_without_a_table() {
    // Declared and referenced names differ in their last letter only: a
    // suggestion search that built a table of every letter pair would need
    // 60,000² cells.
    let declared = format!("{}a", "p".repeat(59_999));
    let referenced = format!("{}b", "p".repeat(59_999));
    let plan = format!(
        "railcheck: 1\nparts:\n  ? {declared}\n  : {{ use: battery/lipo-3s }}\nnets:\n  VBAT: [{referenced}.pos, {declared}.neg]\n"
    );
    let errors = input_errors(&plan);
    let unknown = mentioning(&errors, "unknown part `ppp");
    assert_eq!(unknown.len(), 1, "{} errors", errors.len());
    assert_eq!(
        unknown[0].hint.as_deref(),
        Some("declare it under `parts:`")
    );
}

#[test]
fn every_one_of_many_long_unknown_part_names_is_reported() {
    const UNKNOWN: usize = 150;
    const LETTERS: usize = 3_000;
    // Explicit keys (`? `): YAML caps implicit ones at 1024 characters.
    let mut plan = String::from("railcheck: 1\nparts:\n");
    for i in 0..UNKNOWN {
        plan.push_str(&format!(
            "  ? {}{i:03}\n  : {{ use: battery/lipo-3s }}\n",
            "d".repeat(LETTERS)
        ));
    }
    plan.push_str("nets:\n");
    for i in 0..UNKNOWN {
        plan.push_str(&format!(
            "  N{i}: [{}{i:03}.pos, {}{i:03}.neg]\n",
            "u".repeat(LETTERS),
            "d".repeat(LETTERS)
        ));
    }
    let errors = input_errors(&plan);
    let unknown = mentioning(&errors, "unknown part `uuu");
    assert_eq!(unknown.len(), UNKNOWN, "{} errors", errors.len());
    assert!(
        unknown
            .iter()
            .all(|e| e.hint.as_deref() == Some("declare it under `parts:`"))
    );
}

#[test]
fn thousands_of_misspelt_references_cost_a_bounded_search() {
    // 1,500 parts and 1,500 references, each one letter from its part
    // (`qart00042` for `part00042`): a search of every declared name per
    // unknown one is 1,500² comparisons. The search has one budget per plan;
    // once it is spent, later unknown names keep their error and get the
    // plain hint.
    const PARTS: usize = 1_500;
    let mut plan = String::from("railcheck: 1\nparts:\n");
    for i in 0..PARTS {
        plan.push_str(&format!("  part{i:05}: {{ use: load/fan-12v }}\n"));
    }
    plan.push_str("nets:\n");
    for i in 0..PARTS {
        plan.push_str(&format!("  N{i}: [qart{i:05}.vin]\n"));
    }
    let errors = input_errors(&plan);
    let unknown = mentioning(&errors, "unknown part `qart");
    assert_eq!(unknown.len(), PARTS, "{} errors", errors.len());
    assert_eq!(
        unknown[0].hint.as_deref(),
        Some("did you mean `part00000`?")
    );
    let suggested = unknown
        .iter()
        .filter(|e| e.hint.as_deref().unwrap_or("").starts_with("did you mean"))
        .count();
    // Each search looks at 1,500 names and fills two tables of 10 × 10
    // cells for each (all have nine letters): about 301,500 units of the
    // 20,000,000, so some 66 searches are paid for.
    assert!((50..100).contains(&suggested), "{suggested} suggested");
    assert_eq!(
        unknown[PARTS - 1].hint.as_deref(),
        Some("declare it under `parts:`")
    );
}
