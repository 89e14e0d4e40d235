//! The format reference (`docs/format.md`) keeps in step with the code: its
//! tables of keys, classes, roles, mode states and rules are generated from
//! the format's declaration and the rule catalogue, and the committed text
//! must equal a fresh generation.

use std::path::PathBuf;

#[test]
fn generated_tables_in_the_format_reference_are_fresh() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("docs/format.md");
    let committed = std::fs::read_to_string(&path).expect("docs/format.md");
    let tables = railcheck::report::format_tables(railcheck::rules::RULES);
    let fresh = railcheck::report::fill_generated_blocks(&committed, &tables)
        .unwrap_or_else(|e| panic!("docs/format.md: {e}"));
    if std::env::var_os("RAILCHECK_UPDATE_DOCS").is_some() {
        std::fs::write(&path, &fresh).expect("write docs/format.md");
        return;
    }
    assert!(
        committed == fresh,
        "docs/format.md's generated tables are stale: run \
         `RAILCHECK_UPDATE_DOCS=1 cargo test --test format_reference` and read the diff"
    );
}

#[test]
fn every_class_field_and_rule_appears_in_the_reference() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("docs/format.md");
    let text = std::fs::read_to_string(&path).expect("docs/format.md");
    for class in railcheck::model::format::CLASSES {
        assert!(
            text.contains(&format!("`{}`: ", class.name)),
            "{}",
            class.name
        );
        for field in class.fields {
            assert!(
                text.contains(&format!("| `{}` |", field.key)),
                "{}",
                field.key
            );
        }
    }
    for rule in railcheck::rules::RULES {
        assert!(text.contains(&format!("| `{}` |", rule.id)), "{}", rule.id);
    }
}

#[test]
fn a_block_without_its_table_is_an_error() {
    let tables = vec![("limits".to_string(), "| t |\n".to_string())];
    let unknown = "<!-- generated: nothing -->\n<!-- /generated -->\n";
    assert!(railcheck::report::fill_generated_blocks(unknown, &tables).is_err());
    let unplaced = "no blocks here\n";
    assert!(railcheck::report::fill_generated_blocks(unplaced, &tables).is_err());
    let filled = railcheck::report::fill_generated_blocks(
        "a\n<!-- generated: limits -->\nold\n<!-- /generated -->\nb\n",
        &tables,
    )
    .expect("fills");
    assert_eq!(
        filled,
        "a\n<!-- generated: limits -->\n| t |\n<!-- /generated -->\nb\n"
    );
}
