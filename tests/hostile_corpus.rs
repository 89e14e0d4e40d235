//! The hostile corpus: every case listed in `tests/hostile/MANIFEST` (small
//! files, committed) and the large and file-system cases built here, each
//! run through the built binary as `check`, `check --format json`, `budget`
//! and `draw`. Every run is killed after `TIME_LIMIT` and runs under an
//! address-space cap of `MEMORY_LIMIT_KIB` (`ulimit -v` in `sh`, which
//! `exec`s the binary: the cap is the binary's own). Each run must:
//!
//! - exit with the code the case declares (a crash or a kill fails);
//! - when the plan is at fault, give the line and column of the problem:
//!   for an input error (exit 2) in the JSON document and in the terminal
//!   report, for each finding in the JSON document;
//! - under `--format json`, print exactly one JSON document;
//! - leave the plan and the parts folder byte for byte as they were;
//! - write nothing but the chosen output (nothing in the working folder,
//!   nothing beside the plan, no temporary file left by the output);
//! - print and write at most `OUTPUT_FACTOR` × the input's size plus
//!   `OUTPUT_SLACK` bytes (docs/reliability.md).
#![cfg(unix)]

use std::collections::BTreeMap;
use std::io::Read;
use std::os::unix::fs::{PermissionsExt, symlink};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

/// A run still going after this is killed and fails its case.
const TIME_LIMIT: Duration = Duration::from_secs(20);
/// The address space a run may take, in KiB (2 GiB).
const MEMORY_LIMIT_KIB: u64 = 2 << 20;
/// Output per byte of input (a JSON error per 25-byte line of a plan with
/// 50,000 unknown parts is about six times that line), plus a constant: the
/// SVG of a one-line plan, the report's cautions and summary.
const OUTPUT_FACTOR: u64 = 8;
const OUTPUT_SLACK: u64 = 1 << 20;

const BASE: &str = include_str!("../docs/base-plan.yaml");

/// What one case expects of each command: exit codes of `check` (with and
/// without `--format json`), `budget` and `draw`.
#[derive(Clone, Copy, Debug)]
struct Expect {
    check: i32,
    budget: i32,
    draw: i32,
}

impl Expect {
    const fn all(code: i32) -> Expect {
        Expect {
            check: code,
            budget: code,
            draw: code,
        }
    }
}

/// One case: a plan (and maybe a parts folder) in a folder of its own.
struct Case {
    name: String,
    /// The plan's bytes; written to `in/plan.yaml` of a fresh folder.
    plan: Vec<u8>,
    /// Builds a parts folder in `in/parts` (which then goes to `--parts`).
    parts: Option<fn(&Path)>,
    expect: Expect,
    /// Whether an input error points at a place in a text. A plan refused
    /// for its size, and a parts folder refused for its shape, are named
    /// with their path instead.
    placed: bool,
}

struct Run {
    code: Option<i32>,
    stdout: Vec<u8>,
    stderr: Vec<u8>,
}

impl Run {
    fn text(&self) -> String {
        format!(
            "{}{}",
            String::from_utf8_lossy(&self.stdout),
            String::from_utf8_lossy(&self.stderr)
        )
    }
}

/// The binary under the memory cap, killed after the time limit.
fn run(args: &[&std::ffi::OsStr], cwd: &Path) -> Result<Run, String> {
    let mut child = Command::new("sh")
        .arg("-c")
        .arg(format!(
            "ulimit -v {MEMORY_LIMIT_KIB} && exec \"$0\" \"$@\""
        ))
        .arg(env!("CARGO_BIN_EXE_railcheck"))
        .args(args)
        .current_dir(cwd)
        .env("NO_COLOR", "1")
        .env("COLUMNS", "100")
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .map_err(|e| format!("cannot start: {e}"))?;
    let drain = |mut pipe: Box<dyn Read + Send>| {
        std::thread::spawn(move || {
            let mut bytes = Vec::new();
            let _ = pipe.read_to_end(&mut bytes);
            bytes
        })
    };
    let stdout = drain(Box::new(child.stdout.take().unwrap()));
    let stderr = drain(Box::new(child.stderr.take().unwrap()));
    let started = Instant::now();
    let status = loop {
        if let Some(status) = child.try_wait().map_err(|e| e.to_string())? {
            break status;
        }
        if started.elapsed() > TIME_LIMIT {
            let _ = child.kill();
            let _ = child.wait();
            return Err(format!("still running after {TIME_LIMIT:?}: killed"));
        }
        std::thread::sleep(Duration::from_millis(5));
    };
    let run = Run {
        code: status.code(),
        stdout: stdout.join().unwrap(),
        stderr: stderr.join().unwrap(),
    };
    if run.code.is_none() {
        // A signal: an abort on a failed allocation, a crash.
        return Err(format!(
            "ended by a signal: {status:?}\n{}",
            tail(&run.text())
        ));
    }
    Ok(run)
}

fn tail(text: &str) -> String {
    let start = text.len().saturating_sub(2_000);
    let start = (start..=text.len())
        .find(|&i| text.is_char_boundary(i))
        .unwrap_or(text.len());
    text[start..].to_string()
}

/// Every file below `dir` (links not followed) with its kind and content.
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Vec<u8>> {
    let mut files = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(folder) = stack.pop() {
        let Ok(entries) = std::fs::read_dir(&folder) else {
            continue;
        };
        for entry in entries.flatten() {
            let path = entry.path();
            let kind = entry.file_type().unwrap();
            let content = if kind.is_symlink() {
                let mut target = b"link:".to_vec();
                target.extend(
                    std::fs::read_link(&path)
                        .unwrap()
                        .as_os_str()
                        .as_encoded_bytes(),
                );
                target
            } else if kind.is_dir() {
                stack.push(path.clone());
                b"folder".to_vec()
            } else if kind.is_file() {
                std::fs::read(&path).unwrap()
            } else {
                b"special".to_vec()
            };
            files.insert(path, content);
        }
    }
    files
}

fn documents(stdout: &[u8]) -> Vec<serde_json::Value> {
    let text = String::from_utf8_lossy(stdout);
    serde_json::Deserializer::from_str(&text)
        .into_iter::<serde_json::Value>()
        .collect::<Result<_, _>>()
        .unwrap_or_default()
}

/// Runs one case through every command; the problems found, if any.
fn exercise(case: &Case) -> Vec<String> {
    let mut problems = Vec::new();
    let dir = tempfile::tempdir().unwrap();
    let (input, work, out) = (
        dir.path().join("in"),
        dir.path().join("work"),
        dir.path().join("out"),
    );
    for d in [&input, &work, &out] {
        std::fs::create_dir(d).unwrap();
    }
    let plan = input.join("plan.yaml");
    std::fs::write(&plan, &case.plan).unwrap();
    let mut input_size = case.plan.len() as u64;
    let mut base: Vec<&std::ffi::OsStr> = vec![plan.as_os_str()];
    let parts = input.join("parts");
    if let Some(build) = case.parts {
        std::fs::create_dir(&parts).unwrap();
        build(&parts);
        input_size += snapshot(&parts)
            .values()
            .map(|c| c.len() as u64)
            .sum::<u64>();
        base.extend(["--parts".as_ref(), parts.as_os_str()]);
    }
    let before = snapshot(&input);
    let bound = OUTPUT_FACTOR * input_size + OUTPUT_SLACK;
    let diagram = out.join("diagram.svg");
    let commands: [(&str, Vec<&std::ffi::OsStr>, i32); 4] = [
        (
            "check --format json",
            vec!["check".as_ref(), "--format".as_ref(), "json".as_ref()],
            case.expect.check,
        ),
        ("check", vec!["check".as_ref()], case.expect.check),
        ("budget", vec!["budget".as_ref()], case.expect.budget),
        (
            "draw",
            vec!["draw".as_ref(), "-o".as_ref(), diagram.as_os_str()],
            case.expect.draw,
        ),
    ];
    let mut position = None;
    for (what, mut args, expected) in commands {
        args.extend(&base);
        let mut fail = |problem: String| problems.push(format!("{}: {what}: {problem}", case.name));
        let run = match run(&args, &work) {
            Ok(run) => run,
            Err(problem) => {
                fail(problem);
                continue;
            }
        };
        if run.code != Some(expected) {
            fail(format!(
                "exit {:?}, declared {expected}\n{}",
                run.code,
                tail(&run.text())
            ));
        }
        let printed = (run.stdout.len() + run.stderr.len()) as u64;
        if printed > bound {
            fail(format!("printed {printed} bytes for {input_size} of input"));
        }
        if what.ends_with("json") {
            let docs = documents(&run.stdout);
            if docs.len() != 1 {
                fail(format!("{} JSON documents on stdout", docs.len()));
            } else if run.code == Some(2) && case.placed {
                let first = &docs[0]["errors"][0];
                match (first["line"].as_u64(), first["column"].as_u64()) {
                    (Some(line), Some(column)) if line >= 1 && column >= 1 => {
                        position = Some((line, column));
                    }
                    _ => fail(format!("no line and column in {first}")),
                }
            } else if let Some(findings) = docs[0]["findings"].as_array() {
                // Each finding is at fault somewhere in the plan (or a part file).
                for finding in findings {
                    let placed = |key: &str| finding[key].as_u64().is_some_and(|n| n >= 1);
                    if !placed("line") || !placed("column") {
                        fail(format!("a finding without its line and column: {finding}"));
                    }
                }
            }
        }
        // The terminal report names the place the JSON document gives.
        if let (Some((line, column)), "check") = (position, what) {
            let text = run.text();
            let framed = format!(":{line}:{column}]");
            let said = format!("line {line}, column {column}");
            if !text.contains(&framed) && !text.contains(&said) {
                fail(format!(
                    "the report does not give line {line}, column {column}\n{}",
                    tail(&text)
                ));
            }
        }
        if what == "draw" {
            match std::fs::read(&diagram) {
                Ok(svg) if run.code == Some(0) => {
                    if svg.len() as u64 > bound {
                        fail(format!("wrote {} bytes for {input_size}", svg.len()));
                    }
                    let text = String::from_utf8(svg).unwrap_or_default();
                    if let Err(e) = roxmltree::Document::parse(&text) {
                        fail(format!("the SVG does not parse: {e}"));
                    }
                }
                Ok(_) => fail("a diagram was written on a failed run".into()),
                Err(_) if run.code == Some(0) => fail("no diagram written".into()),
                Err(_) => {}
            }
            let _ = std::fs::remove_file(&diagram);
        }
        if snapshot(&work).len() + snapshot(&out).len() > 0 {
            fail(format!(
                "wrote outside the chosen output: {:?} {:?}",
                snapshot(&work).keys().collect::<Vec<_>>(),
                snapshot(&out).keys().collect::<Vec<_>>()
            ));
        }
        if snapshot(&input) != before {
            fail("the plan or its parts folder changed".into());
        }
    }
    problems
}

/// The committed cases, from the manifest.
fn committed() -> Vec<Case> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hostile");
    let manifest = std::fs::read_to_string(root.join("MANIFEST")).unwrap();
    let mut cases = Vec::new();
    for line in manifest.lines() {
        if line.starts_with('#') || line.trim().is_empty() {
            continue;
        }
        let fields: Vec<&str> = line.split_whitespace().collect();
        let code = |i: usize| -> i32 {
            fields[i]
                .parse()
                .unwrap_or_else(|_| panic!("MANIFEST: `{line}`"))
        };
        cases.push(Case {
            name: fields[0].to_string(),
            plan: std::fs::read(root.join(fields[0]))
                .unwrap_or_else(|e| panic!("{}: {e}", fields[0])),
            parts: None,
            placed: true,
            expect: Expect {
                check: code(1),
                budget: code(2),
                draw: code(3),
            },
        });
    }
    cases
}

fn plan_with(parts: &str, nets: &str) -> String {
    format!("railcheck: 1\nname: bench\nparts:\n{parts}nets:\n{nets}")
}

const FUSE_PART: &str = include_str!("../parts/fuse/blade-10a.yaml");

/// A parts folder with `mine/fuse.yaml` and the plan that uses it.
fn fuse_plan() -> Vec<u8> {
    plan_with("  f: { use: mine/fuse }\n", "  {}\n").into_bytes()
}

fn with_fuse(parts: &Path) {
    std::fs::create_dir(parts.join("mine")).unwrap();
    std::fs::write(parts.join("mine/fuse.yaml"), FUSE_PART).unwrap();
}

/// The cases too large to commit, and those that need a file system.
fn built() -> Vec<Case> {
    let mut cases = Vec::new();
    let mut add = |name: &str, plan: Vec<u8>, parts: Option<fn(&Path)>, expect: Expect| {
        cases.push(Case {
            name: name.to_string(),
            plan,
            parts,
            expect,
            placed: true,
        })
    };
    // A title of a mebibyte with no space: wrapped in linear time.
    add(
        "built/title-1mib",
        BASE.replace(
            "name: Greenhouse cart",
            &format!("name: {}", "t".repeat(1 << 20)),
        )
        .into_bytes(),
        None,
        Expect::all(0),
    );
    // 150 unknown part names of 3,000 letters each.
    let refs: String = (0..150)
        .map(|i| format!("  N{i}: [{}{i:03}.pos, pack.neg]\n", "u".repeat(3_000)))
        .collect();
    add(
        "built/unknown-names-150x3000",
        plan_with("  pack: { use: battery/lipo-3s }\n", &refs).into_bytes(),
        None,
        Expect::all(2),
    );
    // Two names of 60,000 letters, one letter apart.
    add(
        "built/names-60000-letters",
        plan_with(
            &format!(
                "  ? {}a\n  : {{ use: battery/lipo-3s }}\n",
                "p".repeat(59_999)
            ),
            &format!("  V: [{0}b.pos, {0}a.neg]\n", "p".repeat(59_999)),
        )
        .into_bytes(),
        None,
        Expect::all(2),
    );
    // 5,000 unknown parts, each its own input error.
    let parts: String = (0..5_000)
        .map(|i| format!("  p{i}: {{ use: nope/x }}\n"))
        .collect();
    add(
        "built/errors-5000",
        plan_with(&parts, "  {}\n").into_bytes(),
        None,
        Expect::all(2),
    );
    // A connector of 5,000 pins, all on one net.
    let pins: Vec<String> = (0..5_000)
        .map(|i| format!("p{i}: {{ role: ground }}"))
        .collect();
    let refs: Vec<String> = (0..5_000).map(|i| format!("plug.p{i}")).collect();
    add(
        "built/pins-5000-one-net",
        plan_with(
            &format!(
                "  pack: {{ use: battery/lipo-3s }}\n  plug: {{ class: connector, pins: {{ {} }} }}\n",
                pins.join(", ")
            ),
            &format!("  N: [pack.neg, {}]\n", refs.join(", ")),
        )
        .into_bytes(),
        None,
        Expect::all(0),
    );
    // One line of four mebibytes: a comment, then a sound plan.
    add(
        "built/line-4mib",
        format!("# {}\n{BASE}", "c".repeat(4 << 20)).into_bytes(),
        None,
        Expect::all(0),
    );
    // Past the size a plan may have (64 MiB): refused before it is parsed.
    add(
        "built/plan-over-64mib",
        {
            let mut bytes = BASE.as_bytes().to_vec();
            bytes.resize((64 << 20) + 1, b'\n');
            bytes
        },
        None,
        Expect::all(2),
    );
    // Nine levels of nine aliases: 10^9 nodes if expanded. Built here rather
    // than committed, so the fuzzer's seeds (every committed plan) hold no
    // input that takes seconds to refuse in a debug build.
    let mut laughs = String::from("  a0: &a0 [lol, lol, lol, lol, lol, lol, lol, lol, lol]\n");
    for i in 1..10 {
        let previous = vec![format!("*a{}", i - 1); 9].join(", ");
        laughs.push_str(&format!("  a{i}: &a{i} [{previous}]\n"));
    }
    add(
        "built/billion-laughs",
        format!("{BASE}bomb:\n{laughs}").into_bytes(),
        None,
        Expect::all(2),
    );
    // Parts folders.
    add(
        "built/parts-sound",
        fuse_plan(),
        Some(with_fuse),
        Expect::all(0),
    );
    add(
        "built/parts-link-loop",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            symlink(".", p.join("mine/loop")).unwrap();
            symlink("../..", p.join("mine/up")).unwrap();
        }),
        Expect::all(0),
    );
    add(
        "built/parts-named-pipe",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            let _ = Command::new("mkfifo")
                .arg(p.join("mine/pipe.yaml"))
                .status();
        }),
        Expect::all(0),
    );
    add(
        "built/parts-link-to-device",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            symlink("/dev/zero", p.join("mine/zero.yaml")).unwrap();
            symlink("/dev/urandom", p.join("mine/random.yaml")).unwrap();
        }),
        Expect::all(0),
    );
    add(
        "built/parts-used-link-to-device",
        fuse_plan(),
        Some(|p| {
            std::fs::create_dir(p.join("mine")).unwrap();
            symlink("/dev/zero", p.join("mine/fuse.yaml")).unwrap();
        }),
        Expect::all(2),
    );
    add(
        "built/parts-unused-huge-and-binary",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            std::fs::write(p.join("mine/huge.yaml"), vec![b'#'; 8 << 20]).unwrap();
            std::fs::write(p.join("mine/binary.yaml"), [0xff, 0xfe, 0, 0x80]).unwrap();
        }),
        Expect::all(0),
    );
    add(
        "built/parts-used-huge",
        fuse_plan(),
        Some(|p| {
            std::fs::create_dir(p.join("mine")).unwrap();
            let mut text = FUSE_PART.to_string();
            text.push_str(&format!("# {}\n", "x".repeat(2 << 20)));
            std::fs::write(p.join("mine/fuse.yaml"), text).unwrap();
        }),
        Expect::all(2),
    );
    add(
        "built/parts-used-not-utf8",
        fuse_plan(),
        Some(|p| {
            std::fs::create_dir(p.join("mine")).unwrap();
            let mut bytes = FUSE_PART.as_bytes().to_vec();
            bytes.extend([b'#', b' ', 0xff, b'\n']);
            std::fs::write(p.join("mine/fuse.yaml"), bytes).unwrap();
        }),
        Expect::all(2),
    );
    add(
        "built/parts-used-utf16",
        fuse_plan(),
        Some(|p| {
            std::fs::create_dir(p.join("mine")).unwrap();
            let mut bytes = vec![0xff, 0xfe];
            bytes.extend(FUSE_PART.encode_utf16().flat_map(u16::to_le_bytes));
            std::fs::write(p.join("mine/fuse.yaml"), bytes).unwrap();
        }),
        Expect::all(2),
    );
    add(
        "built/parts-deep-folders",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            let mut deep = p.join("deep");
            for i in 0..64 {
                deep.push(format!("d{i}"));
            }
            std::fs::create_dir_all(&deep).unwrap();
            std::fs::write(deep.join("x.yaml"), FUSE_PART).unwrap();
        }),
        Expect::all(2),
    );
    add(
        "built/parts-many-entries",
        fuse_plan(),
        Some(|p| {
            with_fuse(p);
            let many = p.join("many");
            std::fs::create_dir(&many).unwrap();
            for i in 0..10_001 {
                std::fs::write(many.join(format!("e{i}.txt")), "").unwrap();
            }
        }),
        Expect::all(2),
    );
    for case in &mut cases {
        if [
            "built/plan-over-64mib",
            "built/parts-deep-folders",
            "built/parts-many-entries",
        ]
        .contains(&case.name.as_str())
        {
            case.placed = false;
        }
    }
    cases
}

#[test]
fn every_hostile_case_ends_as_declared_and_bounded() {
    let mut cases = committed();
    assert!(cases.len() >= 60, "{} committed cases", cases.len());
    // Every file in the corpus is a declared case.
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hostile");
    let listed: Vec<PathBuf> = cases.iter().map(|c| root.join(&c.name)).collect();
    for file in snapshot(&root).keys() {
        if file.is_file() && !file.ends_with("MANIFEST") && !file.ends_with(".gitattributes") {
            assert!(
                listed.contains(file),
                "{} is not in MANIFEST",
                file.display()
            );
        }
    }
    cases.extend(built());
    // Two workers: the machine's cores, and the cases are independent.
    let cases = std::sync::Mutex::new(cases);
    let problems = std::sync::Mutex::new(Vec::new());
    std::thread::scope(|scope| {
        for _ in 0..2 {
            scope.spawn(|| {
                loop {
                    let Some(case) = cases.lock().unwrap().pop() else {
                        break;
                    };
                    let started = Instant::now();
                    let found = exercise(&case);
                    eprintln!("{:>8.2?}  {}", started.elapsed(), case.name);
                    problems.lock().unwrap().extend(found);
                }
            });
        }
    });
    let problems = problems.into_inner().unwrap();
    assert!(problems.is_empty(), "{}", problems.join("\n\n"));
}

/// Where `draw` may not write, and what it must leave alone.
#[test]
fn outputs_that_must_not_be_written_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("plan.yaml");
    std::fs::write(&plan, BASE).unwrap();
    let work = dir.path().join("work");
    std::fs::create_dir(&work).unwrap();
    let to_plan = dir.path().join("to-plan.svg");
    symlink(&plan, &to_plan).unwrap();
    let folder = dir.path().join("folder");
    std::fs::create_dir(&folder).unwrap();
    let locked = dir.path().join("locked");
    std::fs::create_dir(&locked).unwrap();
    std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o555)).unwrap();
    // A privileged user writes in a read-only folder anyway: that case is
    // left out for them.
    let locked_binds = std::fs::write(locked.join("probe"), "").is_err();
    let _ = std::fs::remove_file(locked.join("probe"));
    let mut targets: Vec<(PathBuf, &str)> = vec![
        (plan.clone(), "the plan itself"),
        (to_plan.clone(), "a link to the plan"),
        (PathBuf::from("/dev/full"), "a full device"),
        (PathBuf::from("/dev/null"), "a device"),
        (folder.clone(), "a folder"),
        (dir.path().join("missing/out.svg"), "a missing folder"),
    ];
    if locked_binds {
        targets.push((locked.join("out.svg"), "a read-only folder"));
    }
    let before = snapshot(dir.path());
    for (target, what) in &targets {
        for command in ["draw", "check"] {
            let flag = if command == "draw" { "-o" } else { "--diagram" };
            let args: Vec<&std::ffi::OsStr> = vec![
                command.as_ref(),
                plan.as_os_str(),
                "--format".as_ref(),
                "json".as_ref(),
                flag.as_ref(),
                target.as_os_str(),
            ];
            let run = run(&args, &work).unwrap_or_else(|e| panic!("{what}: {e}"));
            assert_eq!(run.code, Some(2), "{command} to {what}: {}", run.text());
            let docs = documents(&run.stdout);
            assert_eq!(docs.len(), 1, "{command} to {what}: {}", run.text());
            assert_eq!(docs[0]["kind"], "input-errors", "{command} to {what}");
            assert_eq!(snapshot(dir.path()), before, "{command} to {what}");
        }
    }
    std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o755)).unwrap();
}
