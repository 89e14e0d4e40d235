//! The build notes in a real browser: headless Chromium prints each
//! example's `notes.html` to PDF and takes a screenshot, and loads a plan
//! full of markup to show its DOM runs nothing.
//!
//! Needs `chromium` (Debian package `chromium`) and `pdftotext` (package
//! `poppler-utils`); `.ci/run` installs both when they are missing. Without
//! them the tests say so and pass only outside CI; with `CI` set they fail.

use assert_cmd::Command;
use std::path::{Path, PathBuf};
use std::process::Stdio;
use std::time::{Duration, Instant};

const EXAMPLES: [&str; 3] = [
    "examples/first-draft.yaml",
    "examples/orchard-rover.yaml",
    "examples/greenhouse-picker.yaml",
];

fn on_path(program: &str) -> Option<PathBuf> {
    let path = std::env::var_os("PATH")?;
    std::env::split_paths(&path)
        .map(|dir| dir.join(program))
        .find(|candidate| candidate.is_file())
}

/// The browser and the PDF text tool, or `None` (with the reason printed)
/// when they are missing outside CI.
fn tools() -> Option<(PathBuf, PathBuf)> {
    let browser = std::env::var_os("RAILCHECK_CHROMIUM")
        .map(PathBuf::from)
        .or_else(|| on_path("chromium"))
        .or_else(|| on_path("chromium-browser"));
    let pdftotext = on_path("pdftotext");
    match (browser, pdftotext) {
        (Some(b), Some(p)) => Some((b, p)),
        _ if std::env::var_os("CI").is_some() => panic!(
            "chromium and pdftotext are needed (apt-get install chromium poppler-utils; .ci/run installs them)"
        ),
        _ => {
            eprintln!(
                "browser tests not run: install chromium and poppler-utils (or run .ci/run, which does)"
            );
            None
        }
    }
}

/// Runs a command to completion, killing it after `limit`.
fn run_bounded(command: &mut std::process::Command, limit: Duration) -> std::process::Output {
    let mut child = command
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the tool starts");
    let started = Instant::now();
    loop {
        if child.try_wait().expect("wait").is_some() {
            return child.wait_with_output().expect("output");
        }
        if started.elapsed() > limit {
            let _ = child.kill();
            panic!("{command:?} ran over {limit:?}");
        }
        std::thread::sleep(Duration::from_millis(50));
    }
}

fn chromium(browser: &Path, profile: &Path, args: &[&str], page: &Path) -> std::process::Output {
    let mut command = std::process::Command::new(browser);
    command
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--hide-scrollbars",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .args(args)
        .arg(format!("file://{}", page.display()));
    let output = run_bounded(&mut command, Duration::from_secs(120));
    assert!(
        output.status.success(),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    output
}

fn notes_of(plan: &Path, out: &Path) {
    let output = Command::cargo_bin("railcheck")
        .unwrap()
        .arg("notes")
        .arg(plan)
        .arg("-o")
        .arg(out)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0), "{output:?}");
}

fn squeezed(text: &str) -> String {
    text.chars().filter(|c| !c.is_whitespace()).collect()
}

#[test]
fn printed_notes_hold_every_part_finding_and_caution() {
    let Some((browser, pdftotext)) = tools() else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    for example in EXAMPLES {
        let stem = Path::new(example)
            .file_stem()
            .unwrap()
            .to_string_lossy()
            .into_owned();
        let html = dir.path().join(format!("{stem}.html"));
        notes_of(&root.join(example), &html);
        let pdf = dir.path().join(format!("{stem}.pdf"));
        chromium(
            &browser,
            &dir.path().join("profile"),
            &[
                "--no-pdf-header-footer",
                &format!("--print-to-pdf={}", pdf.display()),
            ],
            &html,
        );
        let bytes = std::fs::read(&pdf).unwrap();
        assert!(bytes.starts_with(b"%PDF-"), "{example}: not a PDF");
        let text = run_bounded(
            std::process::Command::new(&pdftotext).arg(&pdf).arg("-"),
            Duration::from_secs(60),
        );
        let text = String::from_utf8_lossy(&text.stdout).into_owned();
        // pdftotext ends each page with a form feed.
        let pages = text.matches('\u{c}').count();
        assert!((3..=20).contains(&pages), "{example}: {pages} pages");
        let flat = squeezed(&text);
        let text_yaml = std::fs::read_to_string(root.join(example)).unwrap();
        let checked =
            railcheck::check(example, &text_yaml, &railcheck::model::Library::builtin()).unwrap();
        for part in &checked.plan.parts {
            assert!(
                flat.contains(&squeezed(&part.name)),
                "{example}: part {} not printed",
                part.name
            );
        }
        for finding in &checked.findings {
            assert!(
                flat.contains(finding.rule),
                "{example}: rule {} not printed",
                finding.rule
            );
        }
        for caution in railcheck::safety::cautions(&checked.plan) {
            assert!(
                flat.contains(&squeezed(caution)),
                "{example}: caution not printed: {caution}"
            );
        }

        let png = dir.path().join(format!("{stem}.png"));
        chromium(
            &browser,
            &dir.path().join("profile"),
            &[
                "--window-size=1200,1600",
                &format!("--screenshot={}", png.display()),
            ],
            &html,
        );
        let picture = resvg::tiny_skia::Pixmap::load_png(&png).expect("a PNG screenshot");
        let inked = picture
            .pixels()
            .iter()
            .filter(|p| p.red() < 200 || p.green() < 200 || p.blue() < 200)
            .count();
        let share = inked as f64 / picture.pixels().len() as f64;
        assert!(share > 0.01, "{example}: the screenshot is blank ({share})");
    }
}

/// Every start tag in `dom` with an attribute named `on…` (an event
/// handler), and every script element.
fn active_markup(dom: &str) -> Vec<String> {
    let mut found = Vec::new();
    let mut rest = dom;
    while let Some(open) = rest.find('<') {
        let tail = &rest[open + 1..];
        let end = tail.find('>').unwrap_or(tail.len());
        let tag = &tail[..end];
        let lower = tag.to_ascii_lowercase();
        if lower.starts_with("script") {
            found.push(format!("<{tag}>"));
        }
        let mut words = lower.split(|c: char| c.is_whitespace() || c == '/');
        words.next();
        if words.any(|w| w.starts_with("on") && w.contains('=')) {
            found.push(format!("<{tag}>"));
        }
        rest = &tail[end.min(tail.len())..];
    }
    found
}

#[test]
fn a_plan_full_of_markup_gives_a_dom_with_no_script_and_no_handler() {
    let Some((browser, _)) = tools() else {
        return;
    };
    let plan = "railcheck: 1
name: '</style><script>alert(1)</script><img src=x onerror=alert(2)>'
revision: '\"><svg onload=alert(3)>'
author: '<iframe srcdoc=\"<script>alert(4)</script>\"></iframe>'
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
    let dir = tempfile::tempdir().unwrap();
    let plan_path = dir.path().join("hostile.yaml");
    std::fs::write(&plan_path, plan).unwrap();
    let html = dir.path().join("hostile.html");
    notes_of(&plan_path, &html);
    let dom = chromium(
        &browser,
        &dir.path().join("profile"),
        &["--dump-dom"],
        &html,
    );
    let dom = String::from_utf8_lossy(&dom.stdout).into_owned();
    assert!(dom.contains("<svg"), "the DOM was dumped: {dom:.200}");
    let active = active_markup(&dom);
    assert!(active.is_empty(), "{active:?}");
    // The text is there, shown rather than run.
    assert!(dom.contains("alert(1)"));
}

#[test]
fn the_markup_scan_finds_handlers_and_scripts() {
    // The scan above must be able to fail: a handler and a script element.
    let found = active_markup("<p>x</p><img src=a onerror=b><script>c</script><b>on=</b>");
    assert_eq!(
        found,
        vec!["<img src=a onerror=b>".to_string(), "<script>".to_string()]
    );
}
