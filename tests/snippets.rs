//! Every YAML example in the README and in `docs/*.md` is run through `railcheck check`
//! and must end with the exit code written beside it, so the documentation cannot drift
//! from what the tool accepts.
//!
//! The marker is the block's first line (see DEVELOPERS.md):
//!
//! - `# railcheck: exit N` — the block is a whole plan; `railcheck check` must exit `N`
//!   (0 no errors, 1 errors, 2 the plan cannot be read).
//! - `# railcheck: fragment of PATH, exit N` — the block is merged into the plan at `PATH`
//!   (relative to the repository root) first: each top-level mapping of the fragment
//!   (`parts`, `nets`, `modes`, `limits`) adds its entries to the base's, replacing entries
//!   of the same name; any other top-level key (`name`, `ambient`, `links`, `profile`)
//!   replaces the base's value whole; an empty value removes the key.
//! - `# railcheck: not a plan (WHAT)` — YAML that is no plan (a CI step, say): it must
//!   still be valid YAML, and is not run.
//!
//! A ```yaml block without a marker fails the test, so no example escapes.
//!
//! Not for: checking what a plan's findings say (the rule and report tests do that).

use assert_cmd::Command;
use railcheck::syntax::{self, Node, NodeKind, Sources};
use std::path::{Path, PathBuf};

/// What a block declares about itself.
#[derive(Debug, PartialEq)]
enum Expectation {
    Plan {
        exit: i32,
    },
    Fragment {
        base: String,
        exit: i32,
    },
    /// Other YAML shown in the docs: only read as YAML.
    NotAPlan,
}

#[derive(Debug)]
struct Snippet {
    /// `README.md:42`, the line of the opening fence.
    place: String,
    text: String,
    expectation: Result<Expectation, String>,
}

fn repository() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The documents whose examples are checked: the README and every `docs/*.md`.
fn documents() -> Vec<PathBuf> {
    let root = repository();
    let mut files = vec![root.join("README.md")];
    let docs = std::fs::read_dir(root.join("docs")).expect("the docs/ folder is readable");
    let mut markdown: Vec<PathBuf> = docs
        .map(|entry| entry.expect("a docs/ entry").path())
        .filter(|path| path.extension().is_some_and(|e| e == "md"))
        .collect();
    markdown.sort();
    files.extend(markdown);
    files
}

/// Every ```yaml block of a Markdown text, with its marker read.
fn yaml_blocks(name: &str, markdown: &str) -> Vec<Snippet> {
    let mut snippets = Vec::new();
    let mut lines = markdown.lines().enumerate();
    while let Some((number, line)) = lines.next() {
        let trimmed = line.trim_start();
        let indent = line.len() - trimmed.len();
        let Some(info) = trimmed.strip_prefix("```") else {
            continue;
        };
        let is_yaml = matches!(info.trim(), "yaml" | "yml");
        let mut body = Vec::new();
        for (_, inner) in lines.by_ref() {
            if inner.trim_start().starts_with("```") {
                break;
            }
            // A block indented inside a list item keeps its own indentation only.
            body.push(inner.get(indent..).unwrap_or(inner.trim_start()));
        }
        if is_yaml {
            let text = body.join("\n") + "\n";
            snippets.push(Snippet {
                place: format!("{name}:{}", number + 1),
                expectation: marker(body.first().copied().unwrap_or("")),
                text,
            });
        }
    }
    snippets
}

/// Reads the marker line `# railcheck: exit N` or `# railcheck: fragment of PATH, exit N`.
fn marker(first_line: &str) -> Result<Expectation, String> {
    let missing = || {
        format!(
            "no marker: start the block with `# railcheck: exit N` or \
             `# railcheck: fragment of PATH, exit N` (found `{first_line}`)"
        )
    };
    let rest = first_line
        .trim()
        .strip_prefix('#')
        .map(str::trim)
        .and_then(|r| r.strip_prefix("railcheck:"))
        .map(str::trim)
        .ok_or_else(missing)?;
    let exit_code = |text: &str| -> Result<i32, String> {
        match text.trim().strip_prefix("exit").map(str::trim) {
            Some(code @ ("0" | "1" | "2")) => Ok(code.parse().expect("a digit")),
            _ => Err(format!(
                "`{}` is not `exit 0`, `exit 1` or `exit 2`",
                text.trim()
            )),
        }
    };
    if rest.starts_with("not a plan") {
        return Ok(Expectation::NotAPlan);
    }
    match rest.strip_prefix("fragment of") {
        Some(fragment) => {
            let (base, exit) = fragment
                .split_once(',')
                .ok_or_else(|| "a fragment marker reads `fragment of PATH, exit N`".to_string())?;
            Ok(Expectation::Fragment {
                base: base.trim().to_string(),
                exit: exit_code(exit)?,
            })
        }
        None => Ok(Expectation::Plan {
            exit: exit_code(rest)?,
        }),
    }
}

fn parse(name: &str, text: &str) -> Result<Node, String> {
    let mut sources = Sources::default();
    let id = sources.add(name, text);
    syntax::parse(id, text).map_err(|e| format!("{name} is not YAML: {}", e.message))
}

/// The base plan with the fragment's top-level keys merged in (see the module comment).
fn merge(base: &Node, fragment: &Node) -> Result<Node, String> {
    let (NodeKind::Map(base_entries), NodeKind::Map(fragment_entries)) =
        (&base.kind, &fragment.kind)
    else {
        return Err("a base plan and a fragment are both mappings".into());
    };
    let mut merged = base_entries.clone();
    for (key, value) in fragment_entries {
        let position = merged
            .iter()
            .position(|(k, _)| k.as_scalar().is_some() && k.as_scalar() == key.as_scalar());
        match (position, &value.kind) {
            (Some(i), NodeKind::Null) => {
                merged.remove(i);
            }
            (None, NodeKind::Null) => {}
            (Some(i), NodeKind::Map(entries))
                if matches!(merged[i].1.kind, NodeKind::Map(_))
                    && !matches!(key.as_scalar(), Some("profile")) =>
            {
                let NodeKind::Map(target) = &mut merged[i].1.kind else {
                    unreachable!("matched as a mapping above");
                };
                for (name, entry) in entries {
                    match target
                        .iter_mut()
                        .find(|(n, _)| n.as_scalar() == name.as_scalar())
                    {
                        Some(slot) => slot.1 = entry.clone(),
                        None => target.push((name.clone(), entry.clone())),
                    }
                }
            }
            (Some(i), _) => merged[i].1 = value.clone(),
            (None, _) => merged.push((key.clone(), value.clone())),
        }
    }
    Ok(Node {
        kind: NodeKind::Map(merged),
        span: base.span,
    })
}

/// Writes a tree back as flow-style YAML, every scalar double-quoted (JSON string
/// escapes are valid YAML), so nothing is re-interpreted on the way.
fn to_yaml(node: &Node, out: &mut String) {
    match &node.kind {
        NodeKind::Null => out.push_str("null"),
        NodeKind::Scalar(text) => {
            out.push_str(&serde_json::to_string(text).expect("a string serialises"))
        }
        NodeKind::Seq(items) => {
            out.push('[');
            for (i, item) in items.iter().enumerate() {
                if i > 0 {
                    out.push_str(", ");
                }
                to_yaml(item, out);
            }
            out.push(']');
        }
        NodeKind::Map(entries) => {
            out.push('{');
            for (i, (key, value)) in entries.iter().enumerate() {
                if i > 0 {
                    out.push_str(",\n");
                }
                to_yaml(key, out);
                out.push_str(": ");
                to_yaml(value, out);
            }
            out.push('}');
        }
    }
}

/// The plan text a snippet stands for, and the exit code it must give;
/// `None` for YAML that is no plan (once it reads as YAML).
fn plan_of(snippet: &Snippet) -> Result<Option<(String, i32)>, String> {
    match snippet.expectation.as_ref().map_err(Clone::clone)? {
        Expectation::NotAPlan => parse(&snippet.place, &snippet.text).map(|_| None),
        Expectation::Plan { exit } => Ok(Some((snippet.text.clone(), *exit))),
        Expectation::Fragment { base, exit } => {
            let base_path = repository().join(base);
            let base_text = std::fs::read_to_string(&base_path)
                .map_err(|e| format!("cannot read the base plan {base}: {e}"))?;
            let merged = merge(
                &parse(base, &base_text)?,
                &parse("the fragment", &snippet.text)?,
            )?;
            let mut text = String::new();
            to_yaml(&merged, &mut text);
            Ok(Some((text + "\n", *exit)))
        }
    }
}

/// `railcheck check` on a plan text: the exit code and what it printed.
fn run_check(folder: &Path, text: &str) -> (i32, String) {
    let file = folder.join("snippet.yaml");
    std::fs::write(&file, text).expect("the temporary plan is written");
    let output = Command::cargo_bin("railcheck")
        .expect("the railcheck binary is built")
        .arg("check")
        .arg(&file)
        .env("NO_COLOR", "1")
        .output()
        .expect("railcheck runs");
    let printed = String::from_utf8_lossy(&output.stdout).into_owned()
        + &String::from_utf8_lossy(&output.stderr);
    (output.status.code().unwrap_or(-1), printed)
}

#[test]
fn every_yaml_example_in_the_docs_exits_as_declared() {
    let folder = tempfile::tempdir().expect("a temporary folder");
    let root = repository();
    let mut problems = Vec::new();
    let mut checked = 0;
    for path in documents() {
        let markdown = std::fs::read_to_string(&path).expect("the document is readable");
        let name = path
            .strip_prefix(&root)
            .unwrap_or(&path)
            .display()
            .to_string();
        for snippet in yaml_blocks(&name, &markdown) {
            let (plan, expected) = match plan_of(&snippet) {
                Ok(Some(found)) => found,
                Ok(None) => continue,
                Err(problem) => {
                    problems.push(format!("{}: {problem}", snippet.place));
                    continue;
                }
            };
            let (code, printed) = run_check(folder.path(), &plan);
            checked += 1;
            if code != expected {
                let excerpt: String = printed.lines().take(40).collect::<Vec<_>>().join("\n");
                problems.push(format!(
                    "{}: declared exit {expected}, `railcheck check` exited {code}:\n{excerpt}",
                    snippet.place
                ));
            }
        }
    }
    assert!(
        problems.is_empty(),
        "{} of the documentation's YAML examples are wrong:\n\n{}",
        problems.len(),
        problems.join("\n\n")
    );
    // The format reference alone has a dozen examples; finding none means the
    // extractor broke, not that the docs are clean.
    assert!(
        checked >= 10,
        "only {checked} YAML examples found in the docs"
    );
}

#[test]
fn a_block_without_a_marker_is_reported() {
    let markdown = "Text.\n\n```yaml\nrailcheck: 1\n```\n\n```yaml\n# railcheck: exit 3\n```\n";
    let blocks = yaml_blocks("doc.md", markdown);
    assert_eq!(blocks.len(), 2);
    assert!(blocks[0].expectation.is_err(), "{:?}", blocks[0]);
    assert!(
        blocks[1].expectation.is_err(),
        "exit 3 is not an exit code railcheck gives"
    );
    assert_eq!(blocks[0].place, "doc.md:3");
}

#[test]
fn markers_are_read_as_written() {
    assert_eq!(
        marker("# railcheck: exit 2"),
        Ok(Expectation::Plan { exit: 2 })
    );
    assert_eq!(
        marker("#railcheck: fragment of docs/base-plan.yaml, exit 1"),
        Ok(Expectation::Fragment {
            base: "docs/base-plan.yaml".into(),
            exit: 1
        })
    );
    assert!(marker("# railcheck: fragment of docs/base-plan.yaml").is_err());
    assert!(marker("railcheck: 1").is_err());
}

#[test]
fn a_fragment_adds_and_replaces_entries_and_replaces_other_keys_whole() {
    let base = parse(
        "base",
        "railcheck: 1\nparts: { a: { use: x }, b: { use: y } }\nprofile: { p: 50 %, q: 50 % }\n\
         ambient: 30 degC\n",
    )
    .unwrap();
    let fragment = parse(
        "fragment",
        "parts: { b: { use: z }, c: { use: w } }\nprofile: { r: 100 % }\nambient:\n",
    )
    .unwrap();
    let merged = merge(&base, &fragment).unwrap();
    let mut text = String::new();
    to_yaml(&merged, &mut text);
    assert_eq!(
        text,
        "{\"railcheck\": \"1\",\n\"parts\": {\"a\": {\"use\": \"x\"},\n\"b\": {\"use\": \"z\"},\n\
         \"c\": {\"use\": \"w\"}},\n\"profile\": {\"r\": \"100 %\"}}"
    );
}
