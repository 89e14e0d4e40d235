//! The built-in parts library: every part reads cleanly, documents where its
//! numbers come from, and holds the classes the format reference names.

use railcheck::model::{Class, Library};

#[test]
fn every_builtin_part_reads_without_input_errors() {
    let library = Library::builtin();
    let ids: Vec<String> = library.ids().map(str::to_string).collect();
    assert!(ids.len() >= 40, "only {} parts", ids.len());
    for id in ids {
        let text = format!("railcheck: 1\nparts:\n  x: {{ use: {id} }}\nnets: {{}}\n");
        if let Err(failure) = railcheck::read("plan.yaml", &text, &library) {
            let messages: Vec<String> = failure
                .errors
                .iter()
                .map(|e| {
                    let (line, column) = failure.sources.line_column(e.span);
                    format!(
                        "{}:{line}:{column}: {}",
                        failure.sources.name(e.span.source),
                        e.message
                    )
                })
                .collect();
            panic!("{id} does not read:\n{}", messages.join("\n"));
        }
    }
}

#[test]
fn every_builtin_part_says_where_its_numbers_come_from() {
    let library = Library::builtin();
    for id in library.ids() {
        let text =
            std::fs::read_to_string(format!("{}/parts/{id}.yaml", env!("CARGO_MANIFEST_DIR")))
                .expect("part file exists on disk");
        assert!(text.contains("\nnotes:"), "{id} has no notes");
    }
}

#[test]
fn battery_parts_match_their_ids() {
    // Format reference §3: a battery's window is cells × the chemistry's cell window;
    // the id names the cell count, so the two must agree.
    let library = Library::builtin();
    for (id, cells) in [
        ("battery/lipo-2s", 2),
        ("battery/lipo-3s", 3),
        ("battery/lipo-4s", 4),
        ("battery/lipo-6s", 6),
        ("battery/li-ion-4s", 4),
        ("battery/lifepo4-4s", 4),
        ("battery/nimh-8cell", 8),
        ("battery/lead-acid-12v", 6),
    ] {
        let text = format!("railcheck: 1\nparts:\n  x: {{ use: {id} }}\nnets: {{}}\n");
        let (_, _, plan) =
            railcheck::read("plan.yaml", &text, &library).unwrap_or_else(|_| panic!("{id} reads"));
        match &plan.parts[0].class {
            Class::Battery(b) => assert_eq!(b.cells, Some(cells), "{id}"),
            _ => panic!("{id} is not a battery"),
        }
    }
}
