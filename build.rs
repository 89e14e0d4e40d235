//! Parses the built-in parts (`parts/**/*.yaml`) when railcheck is built, with
//! the same YAML reader a run uses, and writes their trees in a compact binary
//! form to `$OUT_DIR/parts.trees`: a run decodes a part's tree instead of
//! parsing its YAML (on a small plan, parsing the parts it uses was a third
//! of the work). A file that does not parse is left out; a run parses it and
//! reports the error as it would for any library file.

use std::path::Path;

#[allow(dead_code)]
#[path = "src/syntax.rs"]
mod syntax;

fn main() {
    println!("cargo:rerun-if-changed=parts");
    println!("cargo:rerun-if-changed=src/syntax.rs");
    let root = Path::new("parts");
    let mut files = Vec::new();
    collect(root, &mut files);
    files.sort();
    let mut trees: Vec<(String, Vec<u8>)> = Vec::new();
    for path in files {
        let text = std::fs::read_to_string(&path)
            .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
        let Ok(tree) = syntax::parse(syntax::SourceId(0), &text) else {
            continue;
        };
        let id = path
            .strip_prefix(root)
            .expect("under parts/")
            .with_extension("")
            .to_string_lossy()
            .replace('\\', "/");
        let bytes = postcard::to_allocvec(&tree).expect("a tree encodes");
        trees.push((id, bytes));
    }
    let out =
        Path::new(&std::env::var_os("OUT_DIR").expect("cargo sets OUT_DIR")).join("parts.trees");
    let bytes = postcard::to_allocvec(&trees).expect("the trees encode");
    std::fs::write(&out, bytes).unwrap_or_else(|e| panic!("cannot write {}: {e}", out.display()));
}

/// Every `.yaml` file below `dir`.
fn collect(dir: &Path, files: &mut Vec<std::path::PathBuf>) {
    let entries =
        std::fs::read_dir(dir).unwrap_or_else(|e| panic!("cannot list {}: {e}", dir.display()));
    for entry in entries {
        let path = entry.expect("a directory entry").path();
        if path.is_dir() {
            collect(&path, files);
        } else if path.extension().and_then(|e| e.to_str()) == Some("yaml") {
            files.push(path);
        }
    }
}
