//! `railcheck parts`: the library listed with each part's class, key ratings
//! and the start of its notes; one part shown whole; unknown ids refused with
//! a suggestion; user folders listed beside the built-in parts.
//!
//! Expectations come from the part files themselves (read here as plain
//! YAML text, not through railcheck) and from published definitions named
//! beside each check.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::{Path, PathBuf};

fn railcheck() -> Command {
    let mut command = Command::cargo_bin("railcheck").expect("the railcheck binary is built");
    command.env("NO_COLOR", "1");
    command
}

fn stdout_of(command: &mut Command) -> String {
    let output = command.output().expect("railcheck runs");
    assert_eq!(output.status.code(), Some(0), "{output:?}");
    String::from_utf8(output.stdout).unwrap()
}

/// Runs of spaces and line breaks made one space, so wrapped text compares.
fn flat(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Every `parts/**/*.yaml` file with its id (path without `.yaml`).
fn builtin_files() -> Vec<(String, PathBuf)> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("parts");
    let mut out = Vec::new();
    for folder in std::fs::read_dir(&root).unwrap() {
        let folder = folder.unwrap().path();
        if !folder.is_dir() {
            continue;
        }
        for file in std::fs::read_dir(&folder).unwrap() {
            let file = file.unwrap().path();
            if file.extension().is_some_and(|e| e == "yaml") {
                let id = file
                    .strip_prefix(&root)
                    .unwrap()
                    .with_extension("")
                    .to_string_lossy()
                    .replace('\\', "/");
                out.push((id, file));
            }
        }
    }
    out.sort();
    out
}

/// The value of a top-level `key: value` line of a part file.
fn top_level(text: &str, key: &str) -> Option<String> {
    text.lines()
        .find_map(|l| l.strip_prefix(&format!("{key}: ")))
        .map(str::to_string)
}

#[test]
fn the_list_names_every_part_with_its_class_and_where_its_numbers_come_from() {
    let list = stdout_of(railcheck().arg("parts"));
    let files = builtin_files();
    assert!(files.len() > 40, "the library has its parts");
    let flat_list = flat(&list);
    for (id, file) in &files {
        let text = std::fs::read_to_string(file).unwrap();
        let class = top_level(&text, "class").expect("a class line");
        let line = list
            .lines()
            .find(|l| l.split_whitespace().next() == Some(id.as_str()))
            .unwrap_or_else(|| panic!("{id} is not listed"));
        assert_eq!(
            line.split_whitespace().nth(1),
            Some(class.as_str()),
            "{line}"
        );
        // The first sentence of the notes, as the file has it.
        let notes = flat(&text[text.find("notes:").unwrap() + "notes: >-".len()..]);
        let first = &notes[..notes.find(". ").map_or(notes.len(), |e| e + 1)];
        assert!(flat_list.contains(first), "{id}: {first:?} not shown");
    }
    assert!(list.contains(&format!("{} parts.", files.len())));
}

#[test]
fn the_list_shows_key_ratings() {
    let list = stdout_of(railcheck().arg("parts"));
    let line = |id: &str| {
        list.lines()
            .find(|l| l.starts_with(&format!("{id} ")))
            .unwrap_or_else(|| panic!("{id} is listed"))
            .to_string()
    };
    // 30C × 5 Ah = 150 A: the C-rate definition (IEC 61434 "It").
    assert!(line("battery/lipo-3s").contains("3S lipo, 5 Ah, max 30C (150 A)"));
    // ISO 8820-3 blade fuses: 32 V rated; the 7.5 A rating by the SAE J1284 series.
    assert!(line("fuse/blade-7a5").contains("7.5 A, 32 V, fast"));
    // The buck's file: output 5 V ±2 % (4.9–5.1 V), 3 A, input 6–28 V.
    assert!(line("regulator/buck-5v-3a").contains("buck 4.9 V–5.1 V, 3 A, in 6 V–28 V"));
    assert!(line("switch/estop-20a").contains("20 A, 24 V, stop"));
    assert!(line("driver/mosfet-dual-hbridge").contains("10 A per channel (30 A peak)"));
    assert!(line("board/mcu-3v3").contains("vin 4.5 V–5.5 V 30 mA (peak 60 mA)"));
}

#[test]
fn one_part_shows_every_field_pin_and_the_notes_in_full() {
    let sheet = stdout_of(railcheck().args(["parts", "regulator/buck-5v-3a"]));
    assert!(
        sheet.starts_with("regulator/buck-5v-3a (regulator)\n"),
        "{sheet}"
    );
    for field in [
        "topology",
        "output",
        "current",
        "dropout",
        "efficiency",
        "quiescent",
        "theta_ja",
        "tj_max",
    ] {
        assert!(
            sheet.lines().any(|l| l.trim_start().starts_with(field)),
            "{field} missing:\n{sheet}"
        );
    }
    // The input window is the vin pin's operating range; 30 V its maximum.
    assert!(
        sheet.contains("vin   supply-in   range 6 V–28 V, max 30 V"),
        "{sheet}"
    );
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("parts/regulator/buck-5v-3a.yaml"),
    )
    .unwrap();
    let notes = flat(&text[text.find("notes: >-").unwrap() + "notes: >-".len()..]);
    assert!(flat(&sheet).contains(&notes), "the notes in full");

    // A pack's window is cells × the chemistry's cell window (Linden & Reddy,
    // Handbook of Batteries: 4.2 / 3.7 / 3.0 V per lithium-polymer cell).
    let pack = stdout_of(railcheck().args(["parts", "battery/lipo-3s"]));
    assert!(pack.contains("12.6 V / 11.1 V / 9 V"), "{pack}");
    // Values as the checker reads them: `5 mohm` in the file is 5 mΩ.
    let driver = stdout_of(railcheck().args(["parts", "driver/mosfet-dual-hbridge"]));
    assert!(driver.contains("rds_on           5 mΩ"), "{driver}");
    assert!(driver.contains("out2b   bridge-out  channel 2"), "{driver}");
}

#[test]
fn an_unknown_id_is_refused_with_a_suggestion() {
    railcheck()
        .args(["parts", "battery/lipo3s"])
        .assert()
        .code(2)
        .stdout(predicate::str::is_empty())
        .stderr(predicate::str::contains(
            "no part `battery/lipo3s` in the library; did you mean `battery/lipo-3s`?",
        ));
    railcheck()
        .args(["parts", "nothing/like-it-at-all"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("did you mean").not());
}

#[test]
fn a_user_folder_adds_and_shadows_parts() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir(dir.path().join("fuse")).unwrap();
    std::fs::write(
        dir.path().join("fuse/blade-3a.yaml"),
        "class: fuse\nrating: 4 A\nvoltage: 58 V\nspeed: slow\nnotes: >-\n  A bench fuse of our own. Values from its label.\n",
    )
    .unwrap();
    std::fs::write(
        dir.path().join("fuse/cartridge-2a.yaml"),
        "class: fuse\nrating: 2 A\nvoltage: 250 V\nspeed: slow\nnotes: >-\n  A glass cartridge fuse. From its label.\n",
    )
    .unwrap();
    let list = stdout_of(railcheck().arg("parts").arg("--parts").arg(dir.path()));
    assert!(list.contains("fuse/cartridge-2a"), "added");
    assert!(list.contains("4 A, 58 V, slow"), "shadowed:\n{list}");
    assert!(list.contains("A bench fuse of our own."));
    let sheet = stdout_of(
        railcheck()
            .args(["parts", "fuse/blade-3a", "--parts"])
            .arg(dir.path()),
    );
    assert!(sheet.contains("rating   4 A"), "{sheet}");
    assert!(sheet.contains(&dir.path().join("fuse/blade-3a.yaml").display().to_string()));
}
