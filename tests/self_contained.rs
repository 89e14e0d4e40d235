//! The repository stands on its own: no tracked file points at a path outside it.
//!
//! Every file `git ls-files` lists is read as text (binary files are skipped) and
//! searched for a relative path that climbs out of the repository (`../…` resolved
//! from the file's own folder), an absolute path into the machine's work tree, and
//! mentions of reference notes kept outside the repository. A source
//! is cited by its own published name instead (standard, handbook, law), and the
//! format by the format reference, `docs/format.md`.
//!
//! Not for: checking web links (none are followed) or spelling.

use std::path::{Component, Path, PathBuf};
use std::process::Command;

fn repository() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The tracked files, from git itself; failing to list them fails the test, so the
/// check can never pass by finding nothing.
fn tracked_files(root: &Path) -> Vec<PathBuf> {
    let output = Command::new("git")
        .arg("ls-files")
        .arg("-z")
        .current_dir(root)
        .output()
        .expect("git runs: this test needs git to list the tracked files");
    assert!(
        output.status.success(),
        "git ls-files failed: {}",
        String::from_utf8_lossy(&output.stderr)
    );
    let listing = String::from_utf8(output.stdout).expect("git lists paths as UTF-8");
    let files: Vec<PathBuf> = listing
        .split('\0')
        .filter(|p| !p.is_empty())
        .map(PathBuf::from)
        .collect();
    assert!(files.len() > 50, "git listed only {} files", files.len());
    files
}

/// Names of notes kept outside the repository that a tracked file must not cite
/// (split in two so that this file does not cite them itself).
const OUTSIDE_NOTES: [&str; 4] = [
    concat!("published", "-values"),
    concat!("netlist", "-format"),
    concat!("failure", "-modes"),
    concat!("crates", ".md"),
];

/// The notes folder beside the repository, wherever the path to it starts.
const SHARED_NOTES: &str = concat!("../", "shared");

/// The machine's work tree, outside the repository.
const WORK_TREE: &str = concat!("/wo", "rk/");

/// The `../` paths in `text` whose target, taken from `folder` (relative to the
/// repository root), lies outside the repository.
fn paths_leaving(folder: &Path, text: &str) -> Vec<String> {
    let mut leaving = Vec::new();
    let mut rest = text;
    while let Some(at) = rest.find("../") {
        // The path starts where the run of path characters before `../` starts.
        let before = &rest[..at];
        let start = before
            .rfind(|c: char| !(c.is_alphanumeric() || matches!(c, '.' | '/' | '_' | '-')))
            .map_or(0, |i| {
                i + before[i..].chars().next().map_or(1, char::len_utf8)
            });
        let after = &rest[at..];
        let end = after
            .find(|c: char| !(c.is_alphanumeric() || matches!(c, '.' | '/' | '_' | '-')))
            .unwrap_or(after.len());
        let written = &rest[start..at + end];
        if climbs_out(folder, written) {
            leaving.push(written.to_string());
        }
        rest = &rest[at + 3..];
    }
    leaving
}

/// Whether `written`, resolved from `folder`, names something outside the repository
/// root. A bare `../` names nothing (prose that speaks of such paths).
fn climbs_out(folder: &Path, written: &str) -> bool {
    let names_something = Path::new(written)
        .components()
        .any(|c| matches!(c, Component::Normal(_)));
    if !names_something {
        return false;
    }
    let mut depth: i64 = folder.components().count() as i64;
    for component in Path::new(written).components() {
        match component {
            Component::ParentDir => depth -= 1,
            Component::Normal(_) => depth += 1,
            _ => {}
        }
        if depth < 0 {
            return true;
        }
    }
    false
}

#[test]
fn no_tracked_file_points_outside_the_repository() {
    let root = repository();
    let mut problems = Vec::new();
    for file in tracked_files(&root) {
        let Ok(text) = std::fs::read_to_string(root.join(&file)) else {
            continue; // not UTF-8 text: a picture or other binary file
        };
        let folder = file.parent().unwrap_or(Path::new(""));
        for (number, line) in text.lines().enumerate() {
            let place = format!("{}:{}", file.display(), number + 1);
            for path in paths_leaving(folder, line) {
                problems.push(format!("{place}: `{path}` leads outside the repository"));
            }
            if line.contains(SHARED_NOTES) {
                problems.push(format!(
                    "{place}: cites the shared notes folder {SHARED_NOTES}"
                ));
            }
            if line.contains(WORK_TREE) {
                problems.push(format!("{place}: an absolute path into {WORK_TREE}"));
            }
            let lower = line.to_lowercase();
            for note in OUTSIDE_NOTES {
                if lower.contains(note) {
                    problems.push(format!(
                        "{place}: cites `{note}`, which is not in the repository; \
                         name the published source (or docs/format.md) instead"
                    ));
                }
            }
        }
    }
    assert!(problems.is_empty(), "{}", problems.join("\n"));
}

#[test]
fn climbing_paths_are_judged_from_the_file_that_holds_them() {
    // `benches/check.rs` may reach `../tests/common/generate.rs`: it stays inside.
    assert!(paths_leaving(Path::new("benches"), "#[path = \"../tests/common/x.rs\"]").is_empty());
    // From the root, any `../` leaves; from one folder down, `../../` does.
    assert_eq!(
        paths_leaving(Path::new(""), "see `../notes/x.md`."),
        ["../notes/x.md"]
    );
    assert_eq!(
        paths_leaving(Path::new("docs"), concat!("[base](../", "../base.yaml)")),
        [concat!("../", "../base.yaml")]
    );
    assert!(paths_leaving(Path::new("docs"), "[readme](../README.md)").is_empty());
    // Prose about such paths names no file.
    assert!(paths_leaving(Path::new(""), "a `../` path").is_empty());
}
