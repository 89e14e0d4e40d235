//! The parts library: generic parts that plans name with `use:`.
//!
//! Built-in parts are the YAML files under `parts/`, compiled into the binary so
//! nothing is needed at run time. A user folder (`--parts DIR`) is read by the
//! binary and handed in as texts; its ids shadow built-in ones. A built-in
//! part's tree is parsed when railcheck is built (`build.rs`, with the same
//! reader) and decoded the first time a plan uses it; a user file is parsed
//! then. Either is done once: the tree is kept for the next plan (a sweep
//! reads the same parts for every variant).

use super::{Part, Plan};
use crate::syntax::{self, Node, Sources, Span};
use include_dir::{Dir, include_dir};
use std::collections::BTreeMap;
use std::sync::OnceLock;

static BUILTIN: Dir<'static> = include_dir!("$CARGO_MANIFEST_DIR/parts");

/// The built-in parts' trees, parsed when railcheck was built (`build.rs`):
/// each part's id with its tree in `postcard`'s encoding.
static PREBUILT: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/parts.trees"));

#[derive(Clone, Debug)]
struct Entry {
    /// Shown in diagnostics: `parts/battery/lipo-3s.yaml` or the user's path.
    file_name: String,
    /// The file's text, or why it could not be read: a file that is too
    /// large or not UTF-8 is reported only when a plan uses it.
    text: Result<String, String>,
    /// The file's tree, parsed the first time a plan uses it (`None` when
    /// it is not valid YAML): a sweep reads the same parts thousands of
    /// times and parses each once.
    parsed: OnceLock<Option<Node>>,
    /// A built-in part's tree as parsed when railcheck was built, decoded
    /// instead of parsing the text.
    prebuilt: Option<&'static [u8]>,
}

/// All known part ids and their YAML texts.
#[derive(Clone, Debug, Default)]
pub struct Library {
    entries: BTreeMap<String, Entry>,
}

/// A library part file that is not valid YAML.
#[derive(Clone, Debug, PartialEq)]
pub struct LibraryError {
    /// What is wrong with the file's YAML.
    pub message: String,
    /// Where in the part file it is.
    pub span: Span,
    /// The file could not be read at all: the span is empty and the plan's
    /// `use:` is the place to report.
    pub unreadable: bool,
}

impl Library {
    /// The parts shipped with railcheck.
    pub fn builtin() -> Library {
        let mut library = Library::default();
        collect_builtin(&BUILTIN, &mut library);
        // An index that does not decode (it always does: it is written by
        // the same build) only means every part is parsed from its text.
        let prebuilt: Vec<(&str, &[u8])> = postcard::from_bytes(PREBUILT).unwrap_or_default();
        for (id, tree) in prebuilt {
            if let Some(entry) = library.entries.get_mut(id) {
                entry.prebuilt = Some(tree);
            }
        }
        library
    }

    /// Adds (or shadows) a part. `id` is the path below the parts folder
    /// without `.yaml`, with `/` separators.
    pub fn insert(&mut self, id: String, file_name: String, text: String) {
        self.entries.insert(
            id,
            Entry {
                file_name,
                text: Ok(text),
                parsed: OnceLock::new(),
                prebuilt: None,
            },
        );
    }

    /// Adds (or shadows) a part whose file could not be read, and why; a
    /// plan that uses it gets the reason as an input error.
    pub fn insert_unreadable(&mut self, id: String, file_name: String, reason: String) {
        self.entries.insert(
            id,
            Entry {
                file_name,
                text: Err(reason),
                parsed: OnceLock::new(),
                prebuilt: None,
            },
        );
    }

    /// Every known part id (`battery/lipo-3s`), sorted.
    pub fn ids(&self) -> impl Iterator<Item = &str> {
        self.entries.keys().map(String::as_str)
    }

    /// Whether a part of this id is known.
    pub fn contains(&self, id: &str) -> bool {
        self.entries.contains_key(id)
    }

    /// The file a part comes from, as diagnostics name it.
    pub fn file_name(&self, id: &str) -> Option<&str> {
        self.entries.get(id).map(|e| e.file_name.as_str())
    }

    /// The known id closest to a mistyped one, if it is close enough to be a
    /// typo.
    pub fn closest_id(&self, id: &str) -> Option<&str> {
        crate::spelling::closest(id, self.ids())
    }

    /// A plan holding this one part and no nets, read exactly as a plan's
    /// `use:` reads it: the values are the ones the checker works with.
    /// `None` for an unknown id; `Err` with the first problem ("file:line:
    /// message") for a part file that does not read.
    pub fn part_plan(&self, id: &str) -> Option<Result<Plan, String>> {
        if !self.contains(id) {
            return None;
        }
        // A JSON string is a valid YAML double-quoted scalar: any id is safe.
        let quoted = serde_json::Value::String(id.to_string()).to_string();
        let text = format!("railcheck: 1\nparts:\n  part: {{ use: {quoted} }}\nnets: {{}}\n");
        Some(match crate::read("<library>", &text, self) {
            Ok((_, _, plan)) => Ok(plan),
            Err(failure) => Err(failure.errors.first().map_or_else(
                || format!("library part `{id}` could not be read"),
                |e| {
                    let (line, _) = failure.sources.line_column(e.span);
                    format!(
                        "{}:{line}: {}",
                        failure.sources.name(e.span.source),
                        e.message
                    )
                },
            )),
        })
    }

    /// A library part as a plan's `use:` reads it (see `part_plan`).
    pub fn read_part(&self, id: &str) -> Option<Result<Part, String>> {
        self.part_plan(id).map(|plan| {
            plan.and_then(|mut plan| {
                plan.parts
                    .pop()
                    .ok_or_else(|| format!("library part `{id}` could not be read"))
            })
        })
    }

    /// The part file's `notes:`, with the folding of the YAML block undone.
    pub fn notes(&self, id: &str) -> Option<String> {
        let entry = self.entries.get(id)?;
        let text = entry.text.as_ref().ok()?;
        let mut sources = Sources::default();
        let source = sources.add(entry.file_name.clone(), text.as_str());
        let root = syntax::parse(source, text).ok()?;
        let notes = root.get("notes")?.as_scalar()?;
        Some(notes.split_whitespace().collect::<Vec<_>>().join(" "))
    }

    /// Parses a part's file into `sources`.
    pub fn load(&self, id: &str, sources: &mut Sources) -> Option<Result<Node, LibraryError>> {
        let entry = self.entries.get(id)?;
        let text = match &entry.text {
            Ok(text) => text,
            Err(reason) => {
                let source = sources.add(entry.file_name.clone(), "");
                return Some(Err(LibraryError {
                    message: format!(
                        "library part `{id}` cannot be read from {}: {reason}",
                        entry.file_name
                    ),
                    span: Span::new(source, 0, 0),
                    unreadable: true,
                }));
            }
        };
        let source = sources.add(entry.file_name.clone(), text.as_str());
        let parsed = entry.parsed.get_or_init(|| {
            entry
                .prebuilt
                .and_then(|tree| postcard::from_bytes::<Node>(tree).ok())
                .or_else(|| syntax::parse(source, text).ok())
        });
        if let Some(tree) = parsed {
            let mut tree = tree.clone();
            // The kept tree (from the build, or parsed for another plan)
            // is pointed into this plan's sources.
            tree.for_each_span_mut(&mut |span| span.source = source);
            return Some(Ok(tree));
        }
        Some(syntax::parse(source, text).map_err(|e| LibraryError {
            message: e.message,
            span: e.span,
            unreadable: false,
        }))
    }
}

fn collect_builtin(dir: &Dir<'static>, library: &mut Library) {
    for file in dir.files() {
        let path = file.path();
        if path.extension().and_then(|e| e.to_str()) != Some("yaml") {
            continue;
        }
        let Some(text) = file.contents_utf8() else {
            continue;
        };
        let id = path.with_extension("").to_string_lossy().replace('\\', "/");
        library.insert(
            id,
            format!("parts/{}", path.to_string_lossy()),
            text.to_string(),
        );
    }
    for sub in dir.dirs() {
        collect_builtin(sub, library);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::SourceId;

    /// Every built-in part carries the tree `build.rs` parsed, and it is the
    /// tree this build's reader gives for the part's text: a part added,
    /// renamed or edited without the build picking it up would differ.
    #[test]
    fn every_builtin_part_decodes_to_the_tree_of_its_text() {
        let library = Library::builtin();
        assert!(library.entries.len() > 20);
        for (id, entry) in &library.entries {
            let text = entry.text.as_ref().expect("built-in parts are readable");
            let parsed = syntax::parse(SourceId(0), text).expect("built-in parts parse");
            let tree = entry
                .prebuilt
                .unwrap_or_else(|| panic!("`{id}` has no tree from the build"));
            let decoded: Node = postcard::from_bytes(tree).expect("the tree decodes");
            assert_eq!(decoded, parsed, "`{id}`");
        }
    }
}
