//! Files the command line reads and writes: a plan read within its size
//! ceiling, a user's parts folder, and every output written whole — to a
//! temporary file renamed into place, never over the plan it came from,
//! never into a device — with one file per sheet for a paged drawing.
//! Part of the binary: the library does no I/O.

use crate::{emit_bytes, is_stdin, plan_name};
use railcheck::model::Library;
use railcheck::syntax;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};

/// Reads at most `MAX_PLAN_BYTES` from a file or standard input: a larger
/// input is refused before it can take the memory.
pub(crate) fn read_bounded(path: &Path) -> Result<Vec<u8>, String> {
    let name = plan_name(path);
    let ceiling = railcheck::MAX_PLAN_BYTES;
    // With the size when it is known (a file's length); standard input is
    // read no further than one byte past the limit.
    let too_large = |size: Option<u64>| {
        let size = match size {
            Some(bytes) => format!("{bytes} bytes"),
            None => format!("more than {ceiling} bytes"),
        };
        format!(
            "{name} is larger than {} MiB ({ceiling} bytes), the most railcheck reads: it has \
             {size}; a wiring plan is far smaller",
            ceiling / (1024 * 1024)
        )
    };
    let cannot = |e: std::io::Error| format!("cannot read {name}: {e}");
    let mut bytes = Vec::new();
    if is_stdin(path) {
        std::io::stdin()
            .lock()
            .take(ceiling + 1)
            .read_to_end(&mut bytes)
            .map_err(cannot)?;
    } else {
        let file = std::fs::File::open(path).map_err(cannot)?;
        let size = file.metadata().map_err(cannot)?.len();
        if size > ceiling {
            return Err(too_large(Some(size)));
        }
        file.take(ceiling + 1)
            .read_to_end(&mut bytes)
            .map_err(cannot)?;
    }
    if bytes.len() as u64 > ceiling {
        return Err(too_large(None));
    }
    Ok(bytes)
}

/// The files `count` sheets go to: `path` itself for one, else `path` with
/// `-1`, `-2`, … before its extension (`rover.svg` → `rover-1.svg`).
pub(crate) fn sheet_names(path: &Path, count: usize) -> Vec<PathBuf> {
    if count <= 1 {
        return vec![path.to_path_buf()];
    }
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let extension = path
        .extension()
        .map(|e| format!(".{}", e.to_string_lossy()))
        .unwrap_or_default();
    (1..=count)
        .map(|k| path.with_file_name(format!("{stem}-{k}{extension}")))
        .collect()
}

/// Says so when numbered sheets of an earlier, longer run are still beside
/// the `count` just written (they are left alone: they may be wanted).
pub(crate) fn left_over_sheets(path: &Path, count: usize) {
    if is_stdin(path) {
        return;
    }
    let numbered = sheet_names(path, count.max(2) + 8);
    let first = if count == 1 { 0 } else { count };
    let stale: Vec<String> = numbered[first..]
        .iter()
        .take_while(|name| name.is_file())
        .map(|name| syntax::visible(&name.display().to_string()).into_owned())
        .collect();
    if !stale.is_empty() {
        eprintln!(
            "note: {} {} left from an earlier drawing with more sheets",
            stale.join(", "),
            if stale.len() == 1 { "is" } else { "are" }
        );
    }
}

/// Whether `path` may be written: standard output, or a regular file (or
/// new name) that is not the plan.
pub(crate) fn output_allowed(path: &Path, plan: &Path) -> Result<(), String> {
    if is_stdin(path) {
        return Ok(());
    }
    let target = output_target(path)?;
    if is_same_file(&target, plan) {
        return Err(format!(
            "refusing to write the diagram over the plan {}",
            plan.display()
        ));
    }
    Ok(())
}

/// Writes `bytes` to standard output for `-`, else to the file (saying so on
/// standard error).
pub(crate) fn deliver(path: &Path, plan: &Path, bytes: &[u8]) -> Result<(), String> {
    if is_stdin(path) {
        emit_bytes(bytes);
    } else {
        write_output(path, plan, bytes)?;
        wrote(path, bytes.len());
    }
    Ok(())
}

pub(crate) fn wrote(path: &Path, bytes: usize) {
    eprintln!(
        "wrote {} ({bytes} bytes)",
        syntax::visible(&path.display().to_string())
    );
}

/// Writes a file whole or not at all: into a temporary file in the target's
/// folder, then renamed over the target. Never writes over the plan itself.
/// Only a regular file (or a new name) is a target: a folder, device, named
/// pipe or socket is refused by name. A symbolic link is written through: the
/// file it points to is replaced (atomically, in that file's folder) and the
/// link stays.
pub(crate) fn write_output(path: &Path, plan: &Path, bytes: &[u8]) -> Result<(), String> {
    let target = output_target(path)?;
    if is_same_file(&target, plan) {
        return Err(format!(
            "refusing to write the diagram over the plan {}",
            plan.display()
        ));
    }
    write_atomically(&target, bytes, Replace::Allowed).map_err(|message| {
        if target == path {
            message
        } else {
            format!("{message} (the file {} links to)", path.display())
        }
    })
}

/// The file an output path names: itself, or where its links lead. Refuses
/// anything but a regular file or a new name.
pub(crate) fn output_target(path: &Path) -> Result<PathBuf, String> {
    let shown = || syntax::visible(&path.display().to_string()).into_owned();
    let mut target = path.to_path_buf();
    // A chain of links is followed a few steps, as the system would.
    for _ in 0..40 {
        match target.symlink_metadata() {
            Ok(own) if own.file_type().is_symlink() => {
                let next = std::fs::read_link(&target)
                    .map_err(|e| format!("cannot write {}: {e}", shown()))?;
                target = match target.parent() {
                    Some(folder) if next.is_relative() => folder.join(next),
                    _ => next,
                };
            }
            Ok(own) => {
                let kind = own.file_type();
                if kind.is_file() {
                    return Ok(target);
                }
                let what = if kind.is_dir() {
                    "a folder"
                } else {
                    #[cfg(unix)]
                    {
                        use std::os::unix::fs::FileTypeExt;
                        if kind.is_fifo() {
                            "a named pipe"
                        } else if kind.is_socket() {
                            "a socket"
                        } else if kind.is_block_device() || kind.is_char_device() {
                            "a device"
                        } else {
                            "not a regular file"
                        }
                    }
                    #[cfg(not(unix))]
                    {
                        "not a regular file"
                    }
                };
                return Err(format!(
                    "cannot write {}: it is {what}; give the path of a regular file (or `-` for standard output where offered)",
                    shown()
                ));
            }
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(target),
            Err(e) => return Err(format!("cannot write {}: {e}", shown())),
        }
    }
    Err(format!(
        "cannot write {}: too many levels of links",
        shown()
    ))
}

/// Whether an existing file at the target may be replaced.
#[derive(Clone, Copy, PartialEq, Eq)]
pub(crate) enum Replace {
    Allowed,
    Refused,
}

/// The temporary file is written in the target's folder so the final rename
/// stays on one file system and is atomic. Every message names the target,
/// never the temporary file.
pub(crate) fn write_atomically(path: &Path, bytes: &[u8], replace: Replace) -> Result<(), String> {
    let folder = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let cannot = |e: std::io::Error| format!("cannot write {}: {}", path.display(), reason(&e));
    let mut file = tempfile::NamedTempFile::new_in(folder).map_err(cannot)?;
    file.write_all(bytes).map_err(cannot)?;
    // A temporary file is private to its owner; a diagram is for sharing.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        file.as_file()
            .set_permissions(std::fs::Permissions::from_mode(0o644))
            .map_err(cannot)?;
    }
    match replace {
        Replace::Allowed => file.persist(path).map(drop).map_err(|e| cannot(e.error)),
        // Linked into place only if nothing is there: no window in which a
        // file created meanwhile could be replaced.
        Replace::Refused => file.persist_noclobber(path).map(drop).map_err(|e| {
            if e.error.kind() == std::io::ErrorKind::AlreadyExists {
                refuse_existing(path)
            } else {
                cannot(e.error)
            }
        }),
    }
}

/// The operating system's reason for an I/O error, without the temporary
/// file's path that `tempfile` appends (`… at path "/x/.tmpAb12"`): that name
/// means nothing to a user, who asked for the target.
pub(crate) fn reason(error: &std::io::Error) -> String {
    if let Some(code) = error.raw_os_error() {
        return std::io::Error::from_raw_os_error(code).to_string();
    }
    let text = error.to_string();
    match text.find(" at path ") {
        Some(end) => text[..end].to_string(),
        None => text,
    }
}

/// Whether two paths name one file (through links too). A path that does
/// not exist yet names no existing file.
pub(crate) fn is_same_file(a: &Path, b: &Path) -> bool {
    let (Ok(ma), Ok(mb)) = (std::fs::metadata(a), std::fs::metadata(b)) else {
        return false;
    };
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        if ma.dev() == mb.dev() && ma.ino() == mb.ino() {
            return true;
        }
    }
    let _ = (ma, mb);
    matches!((a.canonicalize(), b.canonicalize()), (Ok(x), Ok(y)) if x == y)
}

pub(crate) fn refuse_existing(path: &Path) -> String {
    format!(
        "{} already exists; railcheck init never overwrites a file (choose another name with -o)",
        path.display()
    )
}

/// Reads every `.yaml` file below `dir` into the library, id = relative path
/// without `.yaml`. Only regular files are opened: named pipes, devices and
/// sockets are passed over (they could block or never end). A link is
/// followed only when it points inside the folder; a link out of it, or one
/// back to a folder already walked, is passed over, so the walk ends and
/// never reads a file outside the folder. Each passed-over entry is named on
/// standard error. A part file larger than `MAX_PART_BYTES` or not UTF-8 is
/// not read; a plan that uses it gets the reason.
pub(crate) fn add_user_parts(library: &mut Library, dir: &Path) -> Result<(), String> {
    let shown = dir.display();
    let root = dir
        .canonicalize()
        .map_err(|e| format!("cannot read parts folder {shown}: {e}"))?;
    if !root.is_dir() {
        return Err(format!("the parts folder {shown} is not a folder"));
    }
    let mut walked = std::collections::HashSet::from([root.clone()]);
    let mut stack = vec![(dir.to_path_buf(), 0)];
    let mut files = Vec::new();
    let mut seen = 0;
    let skip = |path: &Path, why: &str| {
        eprintln!(
            "railcheck: passing over {} in the parts folder: {why}",
            syntax::visible(&path.display().to_string())
        );
    };
    while let Some((folder, depth)) = stack.pop() {
        let entries = std::fs::read_dir(&folder)
            .map_err(|e| format!("cannot read parts folder {}: {e}", folder.display()))?;
        for entry in entries {
            seen += 1;
            if seen > railcheck::MAX_PARTS_ENTRIES {
                return Err(format!(
                    "the parts folder {shown} holds more than {} files and folders, the most railcheck reads",
                    railcheck::MAX_PARTS_ENTRIES
                ));
            }
            let path = entry
                .map_err(|e| format!("cannot read {}: {e}", folder.display()))?
                .path();
            let Ok(own) = path.symlink_metadata() else {
                continue;
            };
            let metadata = if own.file_type().is_symlink() {
                match path.canonicalize() {
                    Ok(target) if target.starts_with(&root) => match target.metadata() {
                        Ok(m) => m,
                        Err(_) => continue,
                    },
                    Ok(_) => {
                        skip(&path, "a link out of the folder is not followed");
                        continue;
                    }
                    Err(_) => {
                        skip(&path, "a link that leads nowhere");
                        continue;
                    }
                }
            } else {
                own
            };
            if metadata.is_dir() {
                let canonical = path.canonicalize().unwrap_or_else(|_| path.clone());
                if depth + 1 > railcheck::MAX_PARTS_DEPTH {
                    return Err(format!(
                        "the parts folder {shown} nests folders more than {} deep, the most railcheck reads",
                        railcheck::MAX_PARTS_DEPTH
                    ));
                }
                if walked.insert(canonical) {
                    stack.push((path, depth + 1));
                } else {
                    skip(&path, "a link back to a folder already read");
                }
            } else if path.extension().and_then(|e| e.to_str()) == Some("yaml") {
                if metadata.is_file() {
                    files.push((path, metadata.len()));
                } else {
                    skip(&path, "not a regular file (a named pipe, device or socket)");
                }
            }
        }
    }
    files.sort();
    for (path, len) in files {
        let relative = path.strip_prefix(dir).unwrap_or(&path).with_extension("");
        let id = relative
            .components()
            .map(|c| c.as_os_str().to_string_lossy().into_owned())
            .collect::<Vec<_>>()
            .join("/");
        let name = path.display().to_string();
        match read_part_file(&path, len) {
            Ok(text) => library.insert(id, name, text),
            Err(reason) => library.insert_unreadable(id, name, reason),
        }
    }
    Ok(())
}

/// A part file's text, or why it cannot be read.
pub(crate) fn read_part_file(path: &Path, len: u64) -> Result<String, String> {
    let ceiling = railcheck::MAX_PART_BYTES;
    let too_large = || {
        format!(
            "the file is larger than {} KiB, the most railcheck reads of a part file",
            ceiling / 1024
        )
    };
    if len > ceiling {
        return Err(too_large());
    }
    let mut options = std::fs::OpenOptions::new();
    options.read(true);
    // Opened without waiting: if the file was swapped for a named pipe since
    // it was looked at, the open returns at once and the check below refuses it.
    #[cfg(target_os = "linux")]
    {
        use std::os::unix::fs::OpenOptionsExt;
        const O_NONBLOCK: i32 = 0o4000;
        options.custom_flags(O_NONBLOCK);
    }
    let file = options.open(path).map_err(|e| e.to_string())?;
    if !file.metadata().map_err(|e| e.to_string())?.is_file() {
        return Err("not a regular file".into());
    }
    let mut bytes = Vec::new();
    file.take(ceiling + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| e.to_string())?;
    if bytes.len() as u64 > ceiling {
        return Err(too_large());
    }
    String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        format!("the file is not UTF-8 text (byte {at})")
    })
}
