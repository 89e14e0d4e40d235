//! The command on hostile files and folders: `--parts` folders with link
//! loops, named pipes, devices, huge and non-UTF-8 files; output paths at
//! devices, folders and links; the JSON document on every exit-2 path.
#![cfg(unix)]

use assert_cmd::Command;
use std::os::unix::fs::symlink;
use std::path::{Path, PathBuf};
use std::time::Duration;

const FUSE_PART: &str = include_str!("../parts/fuse/blade-10a.yaml");

fn railcheck() -> Command {
    let mut command = Command::cargo_bin("railcheck").unwrap();
    command.timeout(Duration::from_secs(20));
    command
}

/// A folder with a plan using the user part `mine/fuse`, and the parts folder.
fn setup(uses: &str) -> (tempfile::TempDir, PathBuf, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let parts = dir.path().join("parts");
    std::fs::create_dir_all(parts.join("mine")).unwrap();
    std::fs::write(parts.join("mine/fuse.yaml"), FUSE_PART).unwrap();
    let plan = dir.path().join("plan.yaml");
    std::fs::write(
        &plan,
        format!("railcheck: 1\nname: bench\nparts:\n  f: {{ use: {uses} }}\nnets: {{}}\n"),
    )
    .unwrap();
    (dir, plan, parts)
}

fn check(plan: &Path, parts: &Path) -> std::process::Output {
    railcheck()
        .arg("check")
        .arg(plan)
        .arg("--parts")
        .arg(parts)
        .arg("--format")
        .arg("json")
        .output()
        .expect("the run ends within its timeout")
}

fn json(output: &std::process::Output) -> serde_json::Value {
    serde_json::from_slice(&output.stdout).expect("one JSON document")
}

#[test]
fn a_link_loop_in_the_parts_folder_ends() {
    let (_dir, plan, parts) = setup("mine/fuse");
    symlink(&parts, parts.join("mine/again")).unwrap();
    symlink("..", parts.join("mine/up")).unwrap();
    let out = check(&plan, &parts);
    assert_ne!(
        out.status.code(),
        Some(2),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn a_named_pipe_in_the_parts_folder_is_passed_over() {
    let (_dir, plan, parts) = setup("mine/fuse");
    let fifo = parts.join("mine/pipe.yaml");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    if !made.is_ok_and(|s| s.success()) {
        return; // no mkfifo on this system
    }
    let out = check(&plan, &parts);
    assert_ne!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("pipe.yaml"));
}

#[test]
fn a_link_to_a_device_or_out_of_the_folder_is_not_read() {
    let (dir, plan, parts) = setup("mine/fuse");
    symlink("/dev/zero", parts.join("mine/zero.yaml")).unwrap();
    let secret = dir.path().join("secret.yaml");
    std::fs::write(&secret, "class: fuse\nsecret-line: do not show\n").unwrap();
    symlink(&secret, parts.join("mine/secret.yaml")).unwrap();
    let out = check(&plan, &parts);
    assert_ne!(out.status.code(), Some(2));
    // Used, the linked parts are unknown: never read, never shown.
    for id in ["mine/zero", "mine/secret"] {
        let (_d, plan, _) = setup(id);
        let out = railcheck()
            .arg("check")
            .arg(&plan)
            .arg("--parts")
            .arg(&parts)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2));
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains("unknown library part"), "{text}");
        assert!(!text.contains("do not show"), "{text}");
    }
}

#[test]
fn an_unused_part_file_that_is_not_utf8_or_huge_does_not_stop_the_run() {
    let (_dir, plan, parts) = setup("mine/fuse");
    std::fs::write(
        parts.join("mine/latin1.yaml"),
        b"class: fuse\nname: caf\xe9\n",
    )
    .unwrap();
    let huge = std::fs::File::create(parts.join("mine/huge.yaml")).unwrap();
    huge.set_len(300 * 1024 * 1024).unwrap(); // sparse: no disk used
    let out = check(&plan, &parts);
    assert_ne!(
        out.status.code(),
        Some(2),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
}

#[test]
fn a_used_part_file_that_is_not_utf8_is_reported_with_its_path_and_the_use() {
    let (_dir, plan, parts) = setup("mine/latin1");
    std::fs::write(
        parts.join("mine/latin1.yaml"),
        b"class: fuse\nname: caf\xe9\n",
    )
    .unwrap();
    let out = check(&plan, &parts);
    assert_eq!(out.status.code(), Some(2));
    let doc = json(&out);
    let error = &doc["errors"][0];
    let message = error["message"].as_str().unwrap();
    assert!(
        message.contains("latin1.yaml") && message.contains("UTF-8"),
        "{message}"
    );
    assert_eq!(error["line"], 4);
    assert_eq!(error["column"], 13); // `  f: { use: ` is 12 characters
}

#[test]
fn a_used_part_file_over_the_size_cap_is_reported() {
    let (_dir, plan, parts) = setup("mine/huge");
    let huge = std::fs::File::create(parts.join("mine/huge.yaml")).unwrap();
    huge.set_len(railcheck::MAX_PART_BYTES + 1).unwrap();
    let out = check(&plan, &parts);
    assert_eq!(out.status.code(), Some(2));
    let message = json(&out)["errors"][0]["message"]
        .as_str()
        .unwrap()
        .to_string();
    assert!(message.contains("larger than 1024 KiB"), "{message}");
}

fn draw_to(target: &Path) -> std::process::Output {
    railcheck()
        .arg("draw")
        .arg(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/base-plan.yaml"))
        .arg("-o")
        .arg(target)
        .output()
        .unwrap()
}

#[test]
fn devices_folders_and_pipes_are_refused_as_outputs_by_name() {
    let dir = tempfile::tempdir().unwrap();
    for target in [Path::new("/dev/null"), Path::new("/dev/full"), dir.path()] {
        let out = draw_to(target);
        assert_eq!(out.status.code(), Some(2), "{}", target.display());
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(stderr.contains(&target.display().to_string()), "{stderr}");
    }
    assert!(
        !Path::new("/dev/null")
            .metadata()
            .unwrap()
            .file_type()
            .is_file()
    );
    let fifo = dir.path().join("out.svg");
    if std::process::Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .is_ok_and(|s| s.success())
    {
        let out = draw_to(&fifo);
        assert_eq!(out.status.code(), Some(2));
        assert!(String::from_utf8_lossy(&out.stderr).contains("named pipe"));
    }
}

#[test]
fn an_output_link_is_written_through_and_stays_a_link() {
    let dir = tempfile::tempdir().unwrap();
    let real = dir.path().join("real.svg");
    std::fs::write(&real, "old").unwrap();
    let link = dir.path().join("link.svg");
    symlink("real.svg", &link).unwrap();
    let out = draw_to(&link);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(link.symlink_metadata().unwrap().file_type().is_symlink());
    assert!(std::fs::read_to_string(&real).unwrap().starts_with("<svg"));
}

#[test]
fn an_output_link_to_the_plan_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("plan.yaml");
    let text =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/base-plan.yaml"))
            .unwrap();
    std::fs::write(&plan, &text).unwrap();
    let link = dir.path().join("out.svg");
    symlink(&plan, &link).unwrap();
    let out = railcheck()
        .arg("draw")
        .arg(&plan)
        .arg("-o")
        .arg(&link)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(std::fs::read_to_string(&plan).unwrap(), text);
}

#[test]
fn every_exit_2_under_json_prints_one_document() {
    let base = Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/base-plan.yaml");
    let cases: Vec<Vec<&std::ffi::OsStr>> = vec![
        vec![
            "draw".as_ref(),
            base.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
        ],
        vec![
            "draw".as_ref(),
            base.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
            "-o".as_ref(),
            "-".as_ref(),
            "--png".as_ref(),
            "-".as_ref(),
        ],
        vec![
            "check".as_ref(),
            base.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
            "--diagram".as_ref(),
            "-".as_ref(),
        ],
        vec![
            "check".as_ref(),
            "/nonexistent/plan.yaml".as_ref(),
            "--format=json".as_ref(),
        ],
        vec![
            "check".as_ref(),
            base.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
            "--parts".as_ref(),
            "/nonexistent".as_ref(),
        ],
        vec![
            "check".as_ref(),
            "--format".as_ref(),
            "json".as_ref(),
            "--bogus".as_ref(),
        ],
        vec![
            "draw".as_ref(),
            base.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
            "-o".as_ref(),
            "/dev/null".as_ref(),
        ],
    ];
    for args in cases {
        let out = railcheck().args(&args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let text = String::from_utf8_lossy(&out.stdout);
        let mut documents =
            serde_json::Deserializer::from_str(&text).into_iter::<serde_json::Value>();
        let first = documents
            .next()
            .unwrap_or_else(|| panic!("{args:?}: no document"));
        assert_eq!(first.unwrap()["kind"], "input-errors", "{args:?}");
        assert!(documents.next().is_none(), "{args:?}: one document only");
    }
}

#[test]
fn a_parts_folder_past_its_entry_or_depth_ceiling_is_refused_by_name() {
    // Ceilings of docs/format.md §9: `MAX_PARTS_ENTRIES` files and folders,
    // `MAX_PARTS_DEPTH` folders deep.
    let (_dir, plan, parts) = setup("mine/fuse");
    let many = parts.join("many");
    std::fs::create_dir(&many).unwrap();
    for i in 0..railcheck::MAX_PARTS_ENTRIES {
        std::fs::write(many.join(format!("e{i}.txt")), "").unwrap();
    }
    let out = check(&plan, &parts);
    assert_eq!(out.status.code(), Some(2));
    let message = json(&out)["errors"][0]["message"]
        .as_str()
        .unwrap()
        .to_string();
    assert!(
        message.contains("holds more than 10000 files and folders"),
        "{message}"
    );

    let (_dir, plan, parts) = setup("mine/fuse");
    let mut deep = parts.clone();
    for i in 0..=railcheck::MAX_PARTS_DEPTH {
        deep.push(format!("d{i}"));
    }
    std::fs::create_dir_all(&deep).unwrap();
    let out = check(&plan, &parts);
    assert_eq!(out.status.code(), Some(2));
    let message = json(&out)["errors"][0]["message"]
        .as_str()
        .unwrap()
        .to_string();
    assert!(
        message.contains("nests folders more than 16 deep"),
        "{message}"
    );
}
