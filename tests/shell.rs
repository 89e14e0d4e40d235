//! `railcheck` in its users' shell: plans on standard input, the diagram on
//! standard output, colour and width, `--quiet`, exit codes in `--help`,
//! completions and the manual page, and write errors that name the target.
//!
//! The conventions checked here are published ones: the `-` operand for
//! standard input and output (POSIX Utility Syntax Guidelines, guideline 13),
//! NO_COLOR (no-color.org: a non-empty value disables colour), CLICOLOR_FORCE
//! (bixense.com/clicolors), `TERM=dumb` (terminfo: a terminal with no
//! capabilities), ECMA-48 for the escape sequences that colour text, and
//! man(7) for the manual page's `.TH` title line.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::Path;

const ROVER: &str = "examples/orchard-rover.yaml";
const DRAFT: &str = "examples/first-draft.yaml";

/// ECMA-48 Control Sequence Introducer: every SGR colour starts with it.
const CSI: &str = "\u{1b}[";

fn manifest_dir() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The command with the colour environment cleared, so the caller's shell
/// settings do not leak into the test.
fn railcheck() -> Command {
    let mut command = Command::cargo_bin("railcheck").expect("the railcheck binary is built");
    command
        .current_dir(manifest_dir())
        .env_remove("NO_COLOR")
        .env_remove("CLICOLOR")
        .env_remove("CLICOLOR_FORCE")
        .env("TERM", "xterm-256color");
    command
}

fn read(path: &str) -> String {
    std::fs::read_to_string(manifest_dir().join(path)).expect("the example exists")
}

fn stdout_of(command: &mut Command) -> String {
    String::from_utf8(command.output().expect("railcheck runs").stdout).expect("UTF-8 output")
}

// ----- plans on standard input -------------------------------------------------

#[test]
fn a_dash_reads_the_plan_from_standard_input() {
    railcheck()
        .args(["check", "-"])
        .write_stdin(read(ROVER))
        .assert()
        .code(0)
        .stdout(predicate::str::contains("<stdin>: 0 errors, 0 warnings"));
    railcheck()
        .args(["check", "-"])
        .write_stdin(read(DRAFT))
        .assert()
        .code(1);
    railcheck()
        .args(["budget", "-"])
        .write_stdin(read(ROVER))
        .assert()
        .code(0)
        .stdout(predicate::str::contains("Power budget for <stdin>"));
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rover.svg");
    railcheck()
        .args(["draw", "-", "-o"])
        .arg(&out)
        .write_stdin(read(ROVER))
        .assert()
        .code(0);
    roxmltree::Document::parse(&std::fs::read_to_string(&out).unwrap()).expect("an SVG");
}

#[test]
fn problems_in_a_plan_from_standard_input_name_it_stdin() {
    let output = railcheck()
        .args(["check", "--format", "json", "-"])
        .write_stdin("railcheck: 1\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n")
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    let document: serde_json::Value = serde_json::from_slice(&output.stdout).expect("JSON");
    assert_eq!(document["file"], "<stdin>", "{document}");
    railcheck()
        .args(["check", "-"])
        .write_stdin("railcheck: 1\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n")
        .assert()
        .code(2)
        .stdout(predicate::str::contains("<stdin>:3"));
}

#[test]
fn a_plan_above_the_ceiling_is_refused_from_a_file() {
    let dir = tempfile::tempdir().unwrap();
    let huge = dir.path().join("huge.yaml");
    // Sparse: 64 MiB + 1 byte without writing them.
    let file = std::fs::File::create(&huge).unwrap();
    file.set_len(railcheck::MAX_PLAN_BYTES + 1).unwrap();
    railcheck()
        .arg("check")
        .arg(&huge)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("larger than 64 MiB"));
}

#[test]
fn a_plan_above_the_ceiling_is_refused_from_standard_input() {
    // A pipe has no size to look at: the reading itself must stop.
    let binary = assert_cmd::cargo::cargo_bin("railcheck");
    let script = format!(
        "head -c {} /dev/zero | '{}' check -",
        railcheck::MAX_PLAN_BYTES + 1,
        binary.display()
    );
    let output = std::process::Command::new("sh")
        .args(["-c", &script])
        .output()
        .expect("sh runs");
    assert_eq!(output.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(stderr.contains("<stdin> is larger than 64 MiB"), "{stderr}");
}

// ----- the diagram on standard output -------------------------------------------

#[test]
fn draw_to_a_dash_writes_only_the_svg_to_standard_output() {
    let output = railcheck()
        .args(["draw", ROVER, "-o", "-"])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0));
    let svg = String::from_utf8(output.stdout).unwrap();
    let document = roxmltree::Document::parse(&svg).expect("stdout is one SVG document");
    assert_eq!(document.root_element().tag_name().name(), "svg");
    assert!(
        !String::from_utf8_lossy(&output.stderr).contains("wrote"),
        "nothing was written to a file"
    );
}

#[test]
fn draw_to_a_dash_keeps_input_problems_off_standard_output() {
    railcheck()
        .args(["draw", "-", "-o", "-"])
        .write_stdin("railcheck: 1\nparts:\n  pack: { use: battery/no-such-pack }\nnets: {}\n")
        .assert()
        .code(2)
        .stdout(predicate::str::is_empty())
        .stderr(predicate::str::contains("no-such-pack"));
}

#[test]
fn draw_says_what_it_wrote_on_standard_error() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rover.svg");
    let output = railcheck()
        .args(["draw", ROVER, "-o"])
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(0));
    assert!(output.stdout.is_empty());
    let size = std::fs::metadata(&out).unwrap().len();
    let stderr = String::from_utf8(output.stderr).unwrap();
    assert_eq!(
        stderr.trim_end(),
        format!("wrote {} ({size} bytes)", out.display())
    );
}

#[test]
fn draw_without_a_target_is_a_usage_error_that_names_all_three() {
    railcheck().args(["draw", ROVER]).assert().code(2).stderr(
        predicate::str::contains("--output")
            .and(predicate::str::contains("--png"))
            .and(predicate::str::contains("--pdf")),
    );
    railcheck()
        .args(["draw", "--help"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains(
            "One of `-o/--output`, `--png` and `--pdf` is required",
        ));
}

// ----- colour and width -----------------------------------------------------------

#[test]
fn colour_follows_the_flag_first() {
    let always = stdout_of(railcheck().args(["check", "--color", "always", DRAFT]));
    assert!(always.contains(CSI), "--color always colours a pipe");
    // NO_COLOR yields to an explicit request (no-color.org: user-level
    // configuration and command-line arguments take precedence).
    let overridden = stdout_of(
        railcheck()
            .env("NO_COLOR", "1")
            .args(["--color", "always", "check", DRAFT]),
    );
    assert!(
        overridden.contains(CSI),
        "the flag before the subcommand works too"
    );
    let never = stdout_of(
        railcheck()
            .env("CLICOLOR_FORCE", "1")
            .args(["check", "--color", "never", DRAFT]),
    );
    assert!(!never.contains(CSI));
}

#[test]
fn colour_in_auto_follows_the_environment() {
    let piped = stdout_of(railcheck().args(["check", DRAFT]));
    assert!(!piped.contains(CSI), "a pipe is not coloured by default");
    let forced = stdout_of(
        railcheck()
            .env("CLICOLOR_FORCE", "1")
            .args(["check", DRAFT]),
    );
    assert!(
        forced.contains(CSI),
        "CLICOLOR_FORCE colours a pipe in auto"
    );
    let no_color = stdout_of(
        railcheck()
            .env("CLICOLOR_FORCE", "1")
            .env("NO_COLOR", "1")
            .args(["check", DRAFT]),
    );
    assert!(!no_color.contains(CSI), "a non-empty NO_COLOR wins in auto");
    let empty_no_color = stdout_of(
        railcheck()
            .env("CLICOLOR_FORCE", "1")
            .env("NO_COLOR", "")
            .args(["check", DRAFT]),
    );
    assert!(empty_no_color.contains(CSI), "an empty NO_COLOR is not set");
    let dumb = stdout_of(
        railcheck()
            .env("CLICOLOR_FORCE", "1")
            .env("TERM", "dumb")
            .args(["check", DRAFT]),
    );
    assert!(!dumb.contains(CSI), "a dumb terminal gets no escape codes");
}

#[test]
fn a_pipe_gets_the_fixed_width_of_100_columns() {
    let report = stdout_of(railcheck().args(["check", DRAFT]));
    // Quoted plan lines are shown as written; the text around them wraps.
    let quoted = |line: &str| {
        let line = line.trim_start();
        let digits = line.chars().take_while(char::is_ascii_digit).count();
        digits > 0 && line[digits..].starts_with(" │")
    };
    let widest = report
        .lines()
        .filter(|l| !quoted(l))
        .map(|l| l.chars().count())
        .max()
        .unwrap();
    assert!(widest <= 100, "a line is {widest} columns wide");
    assert!(widest > 90, "the report uses the width: widest {widest}");
}

// ----- --quiet ------------------------------------------------------------------------

#[test]
fn quiet_prints_only_the_summary_with_the_same_exit_code() {
    let output = railcheck()
        .args(["check", "--quiet", DRAFT])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(1));
    let text = String::from_utf8(output.stdout).unwrap();
    assert_eq!(text.lines().count(), 1, "{text}");
    // The counts agree with the findings of the JSON report (contract §8).
    let json = railcheck()
        .args(["check", "--format", "json", DRAFT])
        .output()
        .unwrap();
    let document: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    let count = |severity: &str| {
        document["findings"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|f| f["severity"] == severity)
            .count()
    };
    let (errors, warnings) = (count("error"), count("warning"));
    assert!(errors > 1 && warnings > 1);
    assert!(
        text.starts_with(&format!(
            "{DRAFT}: {errors} errors, {warnings} warnings, 0 notes"
        )),
        "{text}"
    );
    // The safety cautions are pointed at, not silently dropped.
    assert!(text.contains("caution"), "{text}");

    railcheck()
        .args(["check", "-q", "--strict", ROVER])
        .assert()
        .code(0)
        .stdout(predicate::str::starts_with(format!(
            "{ROVER}: 0 errors, 0 warnings"
        )));
}

#[test]
fn quiet_budget_is_one_line_per_battery() {
    let text = stdout_of(railcheck().args(["budget", "-q", ROVER]));
    assert_eq!(text.lines().count(), 1, "{text}");
    // The rover's pack: 5 Ah at 30C = 150 A by the C-rate definition
    // (IEC 61434 "It"), its rating in the line.
    assert!(text.contains("of 150 A"), "{text}");
    assert!(text.contains("runtime"), "{text}");
}

// ----- exit codes, completions, manual -------------------------------------------------

#[test]
fn help_lists_the_exit_codes() {
    for args in [&["--help"][..], &["check", "--help"][..]] {
        let help = stdout_of(railcheck().args(args));
        assert!(help.contains("Exit codes:"), "{args:?}: {help}");
        for code in [
            "  0  no errors",
            "  1  errors",
            "  2  the plan could not be read",
        ] {
            assert!(help.contains(code), "{args:?} lacks {code:?}");
        }
    }
}

#[test]
fn usage_errors_exit_2() {
    railcheck().arg("check").assert().code(2);
    railcheck()
        .args(["check", ROVER, "--no-such-flag"])
        .assert()
        .code(2);
    railcheck()
        .args(["check", "--color", "sometimes", ROVER])
        .assert()
        .code(2);
}

const SUBCOMMANDS: [&str; 8] = [
    "check",
    "draw",
    "budget",
    "rules",
    "init",
    "parts",
    "completions",
    "man",
];

#[test]
fn completions_know_every_subcommand() {
    let bash = stdout_of(railcheck().args(["completions", "bash"]));
    assert!(bash.contains("complete"), "a bash completion script");
    for name in SUBCOMMANDS {
        assert!(bash.contains(name), "bash completion lacks {name}");
    }
    for shell in ["zsh", "fish", "elvish", "powershell"] {
        let script = stdout_of(railcheck().args(["completions", shell]));
        assert!(script.contains("budget"), "{shell} completion lacks budget");
    }
    railcheck()
        .args(["completions", "tcsh-or-so"])
        .assert()
        .code(2);
}

#[test]
fn the_manual_page_is_roff_with_every_subcommand() {
    let page = stdout_of(railcheck().arg("man"));
    // man(7): the title line.
    assert!(page.contains(".TH railcheck 1"), "{page}");
    assert!(page.contains(".SH NAME"));
    for name in SUBCOMMANDS {
        assert!(page.contains(name), "the manual lacks {name}");
    }
}

// ----- write errors name the target --------------------------------------------------

fn assert_names_target(output: std::process::Output, target: &Path) {
    assert_eq!(output.status.code(), Some(2));
    let stderr = String::from_utf8(output.stderr).unwrap();
    let prefix = format!("railcheck: cannot write {}: ", target.display());
    let reason = stderr
        .strip_prefix(&prefix)
        .unwrap_or_else(|| panic!("{stderr}"));
    // tempfile names its files `.tmpXXXXXX` and says `at path` before them.
    assert!(
        !reason.contains(".tmp") && !reason.contains("path"),
        "a temporary name leaked: {stderr}"
    );
    assert_eq!(reason.lines().count(), 1, "{stderr}");
}

#[test]
fn a_target_in_a_missing_folder_is_named_in_the_error() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("no-such-folder/rover.svg");
    let output = railcheck()
        .args(["draw", ROVER, "-o"])
        .arg(&target)
        .output()
        .unwrap();
    assert_names_target(output, &target);
    assert!(!target.exists());
}

#[test]
fn a_target_where_nothing_can_be_written_is_named_in_the_error() {
    // /proc is not writable, even for root (proc(5)).
    let target = Path::new("/proc/railcheck-rover.svg");
    let output = railcheck()
        .args(["draw", ROVER, "-o"])
        .arg(target)
        .output()
        .unwrap();
    assert_names_target(output, target);
}

#[test]
fn a_target_in_a_read_only_folder_is_named_in_the_error() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let folder = dir.path().join("locked");
    std::fs::create_dir(&folder).unwrap();
    std::fs::set_permissions(&folder, std::fs::Permissions::from_mode(0o555)).unwrap();
    // Permission bits do not bind a privileged user: nothing to test then.
    let probe = folder.join("probe");
    if std::fs::write(&probe, b"").is_ok() {
        std::fs::remove_file(&probe).unwrap();
        eprintln!("skipped: this user can write into a read-only folder");
        return;
    }
    let target = folder.join("rover.svg");
    let output = railcheck()
        .args(["draw", ROVER, "--png"])
        .arg(&target)
        .output()
        .unwrap();
    std::fs::set_permissions(&folder, std::fs::Permissions::from_mode(0o755)).unwrap();
    assert_names_target(output, &target);
}
