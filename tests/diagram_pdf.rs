//! The diagram's PDF read back by a PDF text tool: `draw --pdf` writes its
//! words as text in embedded fonts, so `pdftotext` (Debian package
//! `poppler-utils`, which `.ci/run` installs) finds every part, every net,
//! the rule of every finding and the safety cautions on the sheets, on one
//! page and cut over several.
//!
//! Without `pdftotext` the test says so and passes only outside CI; with
//! `CI` set it fails.

use assert_cmd::Command;
use std::path::{Path, PathBuf};

const EXAMPLES: [&str; 3] = [
    "examples/first-draft.yaml",
    "examples/orchard-rover.yaml",
    "examples/greenhouse-picker.yaml",
];

fn pdftotext() -> Option<PathBuf> {
    let path = std::env::var_os("PATH")?;
    let found = std::env::split_paths(&path)
        .map(|dir| dir.join("pdftotext"))
        .find(|candidate| candidate.is_file());
    match found {
        Some(tool) => Some(tool),
        None if std::env::var_os("CI").is_some() => {
            panic!("pdftotext is needed (apt-get install poppler-utils; .ci/run installs it)")
        }
        None => {
            eprintln!("diagram PDF text not checked: install poppler-utils");
            None
        }
    }
}

fn squeezed(text: &str) -> String {
    text.chars().filter(|c| !c.is_whitespace()).collect()
}

/// The PDF `draw` writes for `plan` (a path inside the project) with
/// `args`, and the text pdftotext reads from it, one string per page
/// (pdftotext ends each page with a form feed). The plan is named relative
/// to the project's root, as the title block prints it, so the sheets read
/// the same wherever the project is checked out.
fn drawn(tool: &Path, plan: &str, args: &[&str], dir: &Path) -> (Vec<u8>, Vec<String>) {
    let pdf = dir.join("out.pdf");
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .arg("draw")
        .arg(plan)
        .args(args)
        .arg("--pdf")
        .arg(&pdf)
        .timeout(std::time::Duration::from_secs(120))
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0), "{output:?}");
    let bytes = std::fs::read(&pdf).unwrap();
    (bytes, text_of(tool, &pdf))
}

#[test]
fn pdf_text_holds_every_part_net_finding_and_caution() {
    let Some(tool) = pdftotext() else {
        return;
    };
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = tempfile::tempdir().unwrap();
    for example in EXAMPLES {
        let source = std::fs::read_to_string(root.join(example)).unwrap();
        let checked =
            railcheck::check(example, &source, &railcheck::model::Library::builtin()).unwrap();
        for args in [&[][..], &["--page", "a4"][..]] {
            let (bytes, pages) = drawn(&tool, example, args, dir.path());
            let page_objects = String::from_utf8_lossy(&bytes)
                .matches("/Type /Page ")
                .count();
            assert_eq!(pages.len(), page_objects, "{example} {args:?}");
            let flat = squeezed(&pages.concat());
            let lost = |what: &str, name: &str| {
                format!(
                    "{example} {args:?}: {what} {name} not found in\n{}",
                    pages.concat()
                )
            };
            for part in &checked.plan.parts {
                assert!(
                    flat.contains(&squeezed(&part.name)),
                    "{}",
                    lost("part", &part.name)
                );
            }
            for net in &checked.plan.nets {
                assert!(
                    flat.contains(&squeezed(&net.name)),
                    "{}",
                    lost("net", &net.name)
                );
            }
            for finding in &checked.findings {
                assert!(
                    flat.contains(finding.rule),
                    "{}",
                    lost("rule", finding.rule)
                );
            }
            for caution in railcheck::safety::cautions(&checked.plan) {
                assert!(
                    flat.contains(&squeezed(caution)),
                    "{}",
                    lost("caution", caution)
                );
            }
            // Each sheet has its own words: a page of outlines reads empty.
            for (i, page) in pages.iter().enumerate() {
                assert!(
                    page.split_whitespace().count() >= 5,
                    "{example} {args:?}: page {} has no text: {page:?}",
                    i + 1
                );
            }
        }
    }
}

#[test]
fn the_same_plan_gives_the_same_pdf() {
    // No creation date, producer stamp or random identifier: two runs give
    // the same bytes, so the file can be kept under version control.
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = tempfile::tempdir().unwrap();
    let mut runs = Vec::new();
    for name in ["a.pdf", "b.pdf"] {
        let pdf = dir.path().join(name);
        Command::cargo_bin("railcheck")
            .unwrap()
            .arg("draw")
            .arg(root.join("examples/greenhouse-picker.yaml"))
            .args(["--page", "a4", "--pdf"])
            .arg(&pdf)
            .assert()
            .code(0);
        runs.push(std::fs::read(&pdf).unwrap());
    }
    assert_eq!(runs[0], runs[1]);
    let text = String::from_utf8_lossy(&runs[0]);
    assert!(!text.contains("/CreationDate") && !text.contains("/ID"));
}

/// The text pdftotext reads from the PDF at `path`, one string per page
/// (pdftotext ends each page with a form feed). In content order (-raw):
/// the default reading order would join a name that ends a line in a hyphen
/// (BATT-) to the next line's word.
fn text_of(tool: &Path, path: &Path) -> Vec<String> {
    let text = std::process::Command::new(tool)
        .arg("-raw")
        .arg(path)
        .arg("-")
        .output()
        .unwrap();
    assert!(text.status.success(), "{text:?}");
    let text = String::from_utf8(text.stdout).expect("pdftotext writes UTF-8");
    let mut pages: Vec<String> = text.split('\u{c}').map(str::to_string).collect();
    pages.pop();
    pages
}

#[test]
fn the_committed_rover_pdf_is_current() {
    // `examples/orchard-rover.pdf` is the rover's diagram on A4 sheets, as a
    // builder prints it. The glyphs come from the machine's own fonts, so
    // the bytes differ between machines; the sheets and every word on them
    // must not. `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram_pdf`
    // rewrites it.
    let Some(tool) = pdftotext() else {
        return;
    };
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let committed = root.join("examples/orchard-rover.pdf");
    let dir = tempfile::tempdir().unwrap();
    let (bytes, fresh) = drawn(
        &tool,
        "examples/orchard-rover.yaml",
        &["--page", "a4"],
        dir.path(),
    );
    if std::env::var_os("RAILCHECK_UPDATE_DIAGRAMS").is_some_and(|v| v == "1") {
        std::fs::write(&committed, bytes).unwrap();
        return;
    }
    assert!(
        committed.exists(),
        "{} is missing: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram_pdf`",
        committed.display()
    );
    let kept = text_of(&tool, &committed);
    assert_eq!(
        kept.len(),
        fresh.len(),
        "{} has {} sheets, a fresh drawing {}: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram_pdf`",
        committed.display(),
        kept.len(),
        fresh.len()
    );
    for (i, (kept, fresh)) in kept.iter().zip(&fresh).enumerate() {
        assert_eq!(
            squeezed(kept),
            squeezed(fresh),
            "sheet {} of {} is stale: run `RAILCHECK_UPDATE_DIAGRAMS=1 cargo test --test diagram_pdf`",
            i + 1,
            committed.display()
        );
    }
}
