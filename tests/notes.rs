//! `railcheck notes`: the build notes a builder keeps, as one
//! self-contained HTML file or as Markdown with its diagram beside it.
//! Every plan-supplied string is escaped; nothing is fetched or run.

use assert_cmd::Command;
use railcheck::model::Library;
use railcheck::report::{NotesPage, notes_html, notes_markdown};

#[path = "common/generate.rs"]
mod generate;

const EXAMPLES: [&str; 3] = [
    "examples/first-draft.yaml",
    "examples/orchard-rover.yaml",
    "examples/greenhouse-picker.yaml",
];

fn checked(path: &str) -> railcheck::Checked {
    let text = std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(path))
        .unwrap();
    railcheck::check(path, &text, &Library::builtin()).expect("reads")
}

#[test]
fn the_html_notes_hold_every_part_finding_fix_and_caution() {
    for example in EXAMPLES {
        let checked = checked(example);
        let html = notes_html(&checked, NotesPage::A4);
        for part in &checked.plan.parts {
            assert!(html.contains(&part.name), "{example}: part {}", part.name);
        }
        for finding in &checked.findings {
            assert!(html.contains(finding.rule), "{example}: {}", finding.rule);
        }
        for caution in railcheck::safety::cautions(&checked.plan) {
            // The notes escape the apostrophe of "parts' own datasheets".
            let escaped = escape(caution);
            assert!(html.contains(&escaped), "{example}: caution {caution}");
        }
        // The deferral to local codes and qualified practice is always there.
        assert!(html.contains("qualified practice take precedence"));
        // Self-contained: no script, nothing loaded from elsewhere.
        assert!(!html.to_lowercase().contains("<script"), "{example}");
        assert!(
            only_namespaces(&html),
            "{example}: a URL other than a namespace"
        );
        assert!(
            !html.contains("@import") && !html.contains("<link"),
            "{example}"
        );
        assert!(html.contains("<svg"), "{example}: the diagram is inline");
    }
}

/// The only URLs allowed are XML namespace names, which nothing fetches.
fn only_namespaces(html: &str) -> bool {
    let urls = html
        .match_indices("http://")
        .chain(html.match_indices("https://"));
    urls.into_iter().all(|(at, _)| {
        let before = &html[at.saturating_sub(8)..at];
        before.ends_with("xmlns=\"") || before.ends_with("xlink=\"")
    })
}

#[test]
fn every_fix_sits_beside_its_finding() {
    // The first draft's fuse finding: its help text (the suggested rating)
    // appears in the notes, after its own message and before the next one.
    let checked = checked("examples/first-draft.yaml");
    let html = notes_html(&checked, NotesPage::A4);
    let mut from = 0;
    for finding in &checked.findings {
        let message = escape(&finding.message);
        let at = html[from..]
            .find(&message)
            .map(|i| from + i)
            .expect("message");
        if let Some(help) = &finding.help {
            let fix = html[at..]
                .find(&escape(help))
                .expect("fix after its message");
            from = at + fix;
        } else {
            from = at;
        }
    }
}

fn escape(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#x27;")
        .replace('/', "&#x2f;")
}

const HOSTILE: &str = "railcheck: 1
name: '</style><script>alert(1)</script><img src=x onerror=alert(2)>'
revision: '\"><svg onload=alert(3)>'
author: '<a href=\"javascript:alert(4)\">me</a> ![x](http://example.invalid/x.png)'
date: 2026-01-31
parts:
  pack: { use: battery/lipo-3s, with: { cutoff: true } }
  fuse: { use: fuse/blade-2a }
  fan: { use: load/fan-12v }
nets:
  BATT+: { pins: [pack.pos, fuse.a], wire: 18 AWG, length: 10 cm, colour: '<b onmouseover=alert(5)>red</b>' }
  FAN: [fuse.b, fan.vin]
  GND: [pack.neg, fan.gnd]
";

#[test]
fn markup_in_plan_text_is_shown_as_text_in_html() {
    let checked = railcheck::check("hostile.yaml", HOSTILE, &Library::builtin()).unwrap();
    let html = notes_html(&checked, NotesPage::Letter);
    for raw in [
        "<script",
        "<img",
        "<svg onload",
        "<a href",
        "<b onmouseover",
        "</style><",
    ] {
        assert!(!html.contains(raw), "raw markup {raw} reached the HTML");
    }
    assert!(
        html.contains("&lt;script&gt;alert(1)&lt;&#x2f;script&gt;")
            || html.contains("&lt;script&gt;")
    );
    assert!(html.contains("size: letter"), "the Letter page rule");
}

#[test]
fn markup_in_plan_text_is_shown_as_text_in_markdown() {
    let checked = railcheck::check("hostile.yaml", HOSTILE, &Library::builtin()).unwrap();
    let md = notes_markdown(&checked, "hostile.svg");
    for raw in ["<script", "<img", "<svg", "<a href", "<b ", "](http"] {
        assert!(!md.contains(raw), "raw markup {raw} reached the Markdown");
    }
    assert!(md.contains("![Block diagram of"));
    assert!(md.contains("(hostile.svg)"));
}

#[test]
fn markdown_notes_write_their_diagram_beside_them() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rover-notes.md");
    let status = Command::cargo_bin("railcheck")
        .unwrap()
        .args([
            "notes",
            "examples/orchard-rover.yaml",
            "--format",
            "markdown",
            "-o",
        ])
        .arg(&out)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert_eq!(status.status.code(), Some(0), "{status:?}");
    let md = std::fs::read_to_string(&out).unwrap();
    let svg = std::fs::read_to_string(dir.path().join("rover-notes.svg")).unwrap();
    assert!(svg.starts_with("<?xml") || svg.starts_with("<svg"));
    assert!(md.contains("(rover-notes.svg)"));
    // The same plan gives the same notes, byte for byte (the date is the
    // plan's, never the clock's).
    let again = Command::cargo_bin("railcheck")
        .unwrap()
        .args(["notes", "examples/orchard-rover.yaml", "-o", "-"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    let twice = Command::cargo_bin("railcheck")
        .unwrap()
        .args(["notes", "examples/orchard-rover.yaml", "-o", "-"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert_eq!(again.stdout, twice.stdout);
    assert!(String::from_utf8_lossy(&again.stdout).contains("2026-11-20"));
}

#[test]
fn notes_never_overwrite_the_plan() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("plan.yaml");
    std::fs::copy(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/orchard-rover.yaml"),
        &plan,
    )
    .unwrap();
    let before = std::fs::read(&plan).unwrap();
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .arg("notes")
        .arg(&plan)
        .arg("-o")
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    assert_eq!(std::fs::read(&plan).unwrap(), before);
}

#[test]
fn committed_example_notes_are_current() {
    // `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test notes` rewrites them,
    // as it does the example diagrams.
    let update = std::env::var_os("RAILCHECK_UPDATE_DIAGRAMS").is_some_and(|v| v == "1");
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let committed_path = root.join("examples/orchard-rover.notes.html");
    let fresh = notes_html(&checked("examples/orchard-rover.yaml"), NotesPage::A4);
    if update {
        std::fs::write(&committed_path, &fresh).unwrap();
        return;
    }
    let committed = std::fs::read_to_string(&committed_path).unwrap_or_else(|_| {
        panic!("examples/orchard-rover.notes.html is missing: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test notes`")
    });
    assert!(
        committed == fresh,
        "examples/orchard-rover.notes.html is stale: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test notes`"
    );
}

#[test]
fn generated_plans_of_10_50_and_200_parts_get_notes_and_a_wire_list() {
    for parts in [10, 50, 200] {
        let text = generate::plan(parts);
        let checked = railcheck::check("generated.yaml", &text, &Library::builtin())
            .unwrap_or_else(|f| panic!("{parts}: {:?}", f.errors));
        let list = railcheck::wirelist::wire_list(&checked);
        // Every net that joins two pins or more is a run to cut, and every
        // USB link a cable.
        let nets = checked
            .plan
            .nets
            .iter()
            .filter(|n| n.pins.len() >= 2)
            .count();
        assert_eq!(
            list.runs.len(),
            nets + checked.plan.links.len(),
            "{parts} parts"
        );
        let html = notes_html(&checked, NotesPage::A4);
        for part in &checked.plan.parts {
            assert!(html.contains(&part.name), "{parts}: {}", part.name);
        }
        let md = notes_markdown(&checked, "generated.svg");
        assert!(md.contains("## Wire list"), "{parts}");
    }
}
