//! `railcheck sweep`: every combination of design choices checked as a
//! whole plan. Each row must be what `check` says of that variant written
//! out by hand, the same on any number of threads, and the physics of the
//! choices (pack voltage, regulator rating) must show in the verdicts.

#[path = "common/command.rs"]
mod command;

use command::railcheck;
use railcheck::model::Library;
use railcheck::rules::{RatingKind, Severity};
use railcheck::sweep::{Outcome, Row, Sweep, SweepError};
use std::path::Path;

const ROVER: &str = "examples/orchard-rover.yaml";
const PACKS: [&str; 3] = ["battery/lipo-3s", "battery/lipo-4s", "battery/lipo-2s"];
const BUCKS: [&str; 3] = ["2 A", "3 A", "5 A"];
const GAUGES: [&str; 3] = ["18 AWG", "16 AWG", "14 AWG"];

fn rover_text() -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(ROVER)).unwrap()
}

fn vary() -> Vec<String> {
    vec![
        format!("pack={}", PACKS.join(",")),
        format!("buck.current={}", BUCKS.join(",")),
        format!("VMOT.wire={}", GAUGES.join(",")),
    ]
}

fn rover_sweep() -> (Sweep, Library) {
    let library = Library::builtin();
    let checked = railcheck::check(ROVER, &rover_text(), &library).expect("the rover reads");
    let sweep = Sweep::new(&checked, &library, &vary(), 10_000).expect("the keys and values read");
    (sweep, library)
}

/// The rover with one pack, buck rating and motor-supply gauge, written by
/// hand: the pack's `use:` changed, a `with:` added to the buck, the wire
/// of `VMOT` changed.
fn by_hand(pack: &str, buck: &str, gauge: &str) -> String {
    let text = rover_text();
    let edits = [
        (
            "  pack:\n    use: battery/lipo-3s\n",
            format!("  pack:\n    use: {pack}\n"),
        ),
        (
            "  buck: { use: regulator/buck-5v-5a }\n",
            format!("  buck: {{ use: regulator/buck-5v-5a, with: {{ current: {buck} }} }}\n"),
        ),
        (
            "VMOT: { pins: [estop.b, drive.vm], wire: 14 AWG,",
            format!("VMOT: {{ pins: [estop.b, drive.vm], wire: {gauge},"),
        ),
    ];
    let mut text = text;
    for (from, to) in edits {
        assert_eq!(
            text.matches(from).count(),
            1,
            "the rover holds `{from}` once"
        );
        text = text.replacen(from, &to, 1);
    }
    text
}

#[test]
fn every_row_is_what_check_says_of_that_variant_written_out() {
    let (sweep, library) = rover_sweep();
    assert_eq!(sweep.combinations(), Some(27));
    let rows = sweep.run(&library, 2);
    assert_eq!(rows.len(), 27);
    for row in &rows {
        // Odometer order: the last axis changes fastest.
        let (p, b, g) = (row.index / 9, row.index / 3 % 3, row.index % 3);
        assert_eq!(row.values, [PACKS[p], BUCKS[b], GAUGES[g]]);
        let text = by_hand(PACKS[p], BUCKS[b], GAUGES[g]);
        let checked = railcheck::check(ROVER, &text, &library).expect("the variant reads");
        let count = |s: Severity| checked.findings.iter().filter(|f| f.severity == s).count();
        let Outcome::Checked(verdict) = &row.outcome else {
            panic!("row {} did not read: {:?}", row.index, row.outcome);
        };
        assert_eq!(verdict.errors, count(Severity::Error), "{:?}", row.values);
        assert_eq!(
            verdict.warnings,
            count(Severity::Warning),
            "{:?}",
            row.values
        );
        assert_eq!(verdict.notes, count(Severity::Note), "{:?}", row.values);
        let first = checked
            .findings
            .iter()
            .find(|f| f.severity == Severity::Error)
            .map(|f| (f.rule.to_string(), f.message.clone()));
        assert_eq!(verdict.first_error, first, "{:?}", row.values);
        let budget = railcheck::budget::budget(&checked);
        let runtime = budget.batteries[0].runtime.as_ref().map(|r| r.time);
        assert_eq!(verdict.runtime, runtime, "{:?}", row.values);
        assert_eq!(
            verdict.peak_current,
            Some(budget.batteries[0].peak_current),
            "{:?}",
            row.values
        );
        // The tightest margin is the first of the variant's own.
        assert_eq!(
            verdict.margin.as_ref(),
            checked.margins.first(),
            "{:?}",
            row.values
        );
        // The written variant is the hand-made one, byte for byte.
        assert_eq!(sweep.variant(row.index), text, "{:?}", row.values);
    }
}

#[test]
fn threads_do_not_change_the_rows() {
    let (sweep, library) = rover_sweep();
    let serial = sweep.run(&library, 1);
    let parallel = sweep.run(&library, 4);
    assert_eq!(serial, parallel);
}

#[test]
fn the_verdicts_follow_the_physics_of_the_choices() {
    let (sweep, library) = rover_sweep();
    let rows = sweep.run(&library, 2);
    let find = |pack: &str, buck: &str, gauge: &str| -> &Row {
        rows.iter()
            .find(|r| r.values == [pack, buck, gauge])
            .unwrap()
    };
    for gauge in GAUGES {
        // The plan as shipped (3S, 5 A buck) passes with any of the gauges.
        assert!(find(PACKS[0], "5 A", gauge).passes(false));
        // A full 4S lithium-polymer pack is 4 × 4.20 V = 16.8 V (Linden &
        // Reddy, Handbook of Batteries: 4.20 V per cell at full charge), past
        // the 15 V the fan on the bus takes: the rover's first error.
        let Outcome::Checked(v) = &find(PACKS[1], "5 A", gauge).outcome else {
            panic!("4S reads")
        };
        let (rule, message) = v.first_error.as_ref().expect("4S fails");
        assert_eq!(rule, "voltage/over-max");
        assert!(
            message.contains("16.8 V") && message.contains("box_fan"),
            "{message}"
        );
        // The 5 V rail peaks just over 3 A (the computer alone is 2.96 A at
        // peak), so a 3 A or 2 A buck is over its rating on every pack, and
        // the tightest margin is negative.
        for pack in PACKS {
            for buck in ["2 A", "3 A"] {
                let row = find(pack, buck, gauge);
                assert!(!row.passes(false), "{:?}", row.values);
                let Outcome::Checked(v) = &row.outcome else {
                    panic!("reads")
                };
                let margin = v.margin.as_ref().expect("rated parts");
                assert!(margin.left() < 0.0, "{:?}: {margin:?}", row.values);
            }
        }
        // On the 3S pack the 2 A buck is the tightest: 2 A − 3.01 A =
        // −1.01 A, −50 % of its 2 A rating, at the computer's peak.
        let Outcome::Checked(v) = &find(PACKS[0], "2 A", gauge).outcome else {
            panic!("reads")
        };
        let margin = v.margin.as_ref().unwrap();
        assert_eq!(margin.kind, RatingKind::RegulatorCurrent);
        assert_eq!(margin.at, "buck output");
        assert!((margin.limit - 2.0).abs() < 1e-9);
        assert!(
            (margin.share().unwrap() - (-0.503)).abs() < 0.005,
            "{margin:?}"
        );
        assert!((margin.left() - (-1.006)).abs() < 0.01, "{margin:?}");
    }
    // A thinner supply run to the motor driver has more resistance (18 AWG
    // 20.9 mΩ/m against 14 AWG 8.28 mΩ/m, ASTM B258), so the stalled motors
    // see less voltage and the pack's peak current is lower.
    let peak = |gauge: &str| match &find(PACKS[0], "5 A", gauge).outcome {
        Outcome::Checked(v) => v.peak_current.unwrap().value,
        Outcome::Unreadable(_) => panic!("reads"),
    };
    assert!(peak("18 AWG") < peak("16 AWG") && peak("16 AWG") < peak("14 AWG"));
}

#[test]
fn passing_rows_come_first_and_rank_orders_them() {
    let (sweep, library) = rover_sweep();
    let mut rows = sweep.run(&library, 2);
    railcheck::sweep::order(&mut rows, Some(railcheck::sweep::Rank::Runtime), false);
    let passing = rows.iter().take_while(|r| r.passes(false)).count();
    assert!(passing > 0);
    assert!(rows[passing..].iter().all(|r| !r.passes(false)));
    let runtime = |r: &Row| match &r.outcome {
        Outcome::Checked(v) => v.runtime.unwrap().value,
        Outcome::Unreadable(_) => f64::NAN,
    };
    for pair in rows[..passing].windows(2) {
        assert!(runtime(&pair[0]) >= runtime(&pair[1]));
    }
}

#[test]
fn a_bad_value_or_key_is_refused_naming_its_argument_with_the_readers_hint() {
    let library = Library::builtin();
    let checked = railcheck::check(ROVER, &rover_text(), &library).unwrap();
    let refuse =
        |argument: &str| match Sweep::new(&checked, &library, &[argument.to_string()], 10_000) {
            Err(SweepError::Usage(message)) => message,
            other => panic!("{argument}: {other:?}"),
        };
    let message = refuse("buck.current=3 Q");
    assert!(message.contains("`--vary buck.current=3 Q`"), "{message}");
    assert!(
        message.contains("write 3 A") || message.contains("`3 A`"),
        "{message}"
    );
    let message = refuse("VMOTT.wire=16 AWG");
    assert!(message.contains("did you mean `VMOT`?"), "{message}");
    let message = refuse("buck.curent=3 A");
    assert!(message.contains("did you mean `current`?"), "{message}");
    let message = refuse("pack=battery/lipo-5s");
    assert!(message.contains("battery/lipo-5s"), "{message}");
    let message = refuse("modes.clim.lasts=2 s");
    assert!(message.contains("did you mean `climb`?"), "{message}");
    let message = refuse("limits.wire_drop=3 V");
    assert!(message.contains("share"), "{message}");
}

#[test]
fn the_command_refuses_too_many_combinations_and_bad_arguments_with_exit_2() {
    let out = railcheck()
        .args([
            "sweep",
            ROVER,
            "--vary",
            "VMOT.wire=18 AWG,16 AWG,14 AWG",
            "--max",
            "2",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("3 combinations") && err.contains("--max"),
        "{err}"
    );
    let out = railcheck()
        .args(["sweep", ROVER, "--vary", "buck.current=3 Q"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--vary buck.current=3 Q"));
    // Refused before a value is read: a thousand bad values cost nothing.
    let many: Vec<String> = (0..1000).map(|i| format!("{i} Q")).collect();
    let out = railcheck()
        .args(["sweep", ROVER, "--vary"])
        .arg(format!("buck.current={}", many.join(",")))
        .args(["--max", "999"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("1000 combinations"));
    let out = railcheck().args(["sweep", ROVER]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("nothing to vary"));
}

#[test]
fn the_sweep_section_of_a_plan_is_read_and_its_mistakes_placed() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("rover.yaml");
    let good = format!(
        "{}\nsweep:\n  buck.current: [3 A, 5 A]\n  modes.climb.lasts: [2 s, 10 s]\n",
        rover_text().trim_end()
    );
    std::fs::write(&plan, &good).unwrap();
    // `check` takes the section and ignores it.
    railcheck()
        .args(["check", "-q"])
        .arg(&plan)
        .assert()
        .code(0);
    let out = railcheck()
        .args(["sweep", "--format", "csv"])
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    // A header and 2 × 2 rows; stderr says how many before checking.
    assert_eq!(stdout.lines().count(), 5, "{stdout}");
    assert!(String::from_utf8_lossy(&out.stderr).contains("checking 4 combinations"));
    // A value the plan would refuse is placed at its line and column.
    let lines = good.lines().count();
    let bad = good.replace("[3 A, 5 A]", "[3 A, 5 Q]");
    std::fs::write(&plan, &bad).unwrap();
    let out = railcheck()
        .args(["sweep", "--format", "json"])
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(doc["kind"], "input-errors");
    let error = &doc["errors"][0];
    // `  buck.current: [3 A, 5 Q]` is the next-to-last line; as in any
    // plan value the unit is marked: `Q` is at column 25 (2 spaces, 13 for
    // `buck.current:`, ` [3 A, 5 `).
    assert_eq!(error["line"], lines - 1, "{doc:#}");
    assert_eq!(error["column"], 25, "{doc:#}");
    assert!(
        error["hint"].as_str().is_some_and(|h| h.contains("A")),
        "{doc:#}"
    );
}

#[test]
fn write_best_writes_a_plan_that_passes_and_never_the_input() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("rover.yaml");
    std::fs::write(&plan, rover_text()).unwrap();
    let best = dir.path().join("best.yaml");
    let mut args: Vec<String> = vec!["sweep".into(), "--rank".into(), "runtime".into()];
    for v in vary() {
        args.push("--vary".into());
        args.push(v);
    }
    args.push("--write-best".into());
    let out = railcheck()
        .args(&args)
        .arg(&best)
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let written = std::fs::read_to_string(&best).unwrap();
    // The best by runtime is the shipped 3S pack with the 5 A buck; the
    // thinnest motor supply gives the lowest stall current, so the longest
    // runtime.
    assert_eq!(written, by_hand(PACKS[0], "5 A", "18 AWG"));
    railcheck()
        .args(["check", "-q"])
        .arg(&best)
        .assert()
        .code(0);
    // Over the plan itself: refused, the plan untouched.
    let out = railcheck()
        .args(&args)
        .arg(&plan)
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(std::fs::read_to_string(&plan).unwrap(), rover_text());
}

#[test]
fn json_and_csv_carry_every_row() {
    let mut args = vec![
        "sweep".to_string(),
        ROVER.into(),
        "--format".into(),
        "json".into(),
    ];
    for v in vary() {
        args.push("--vary".into());
        args.push(v);
    }
    let out = railcheck().args(&args).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(doc["kind"], "sweep");
    assert_eq!(doc["combinations"], 27);
    assert_eq!(doc["rows"].as_array().unwrap().len(), 27);
    assert_eq!(doc["rows"][0]["passes"], true);
    args[3] = "csv".into();
    args.push("--only-passing".into());
    let out = railcheck().args(&args).output().unwrap();
    let mut reader = csv::Reader::from_reader(&out.stdout[..]);
    let records: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(records.len(), doc["passing"].as_u64().unwrap() as usize);
    assert!(records.iter().all(|r| &r[4] == "true"));
}

#[test]
fn a_value_that_needs_another_axis_is_left_to_the_combinations() {
    // A net with a length needs a wire size too (format reference §4): the
    // length alone would not read, but the sweep also gives the wire.
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("lamp.yaml");
    std::fs::write(
        &plan,
        "railcheck: 1\nparts:\n  pack: { use: battery/lipo-3s }\n  fuse: { use: fuse/blade-15a }\n  \
         lamp:\n    class: load\n    pins:\n      vin: { role: supply-in, range: 9 V..13 V, max: 14 V, draw: 0.5 A }\n      \
         gnd: { role: ground }\nnets:\n  BATT+: [pack.pos, fuse.a]\n  V: [fuse.b, lamp.vin]\n  GND: [pack.neg, lamp.gnd]\n",
    )
    .unwrap();
    let best = dir.path().join("best.yaml");
    railcheck()
        .args([
            "sweep",
            "--vary",
            "V.length=1 m",
            "--vary",
            "V.wire=16 AWG,14 AWG",
        ])
        .arg("--write-best")
        .arg(&best)
        .arg(&plan)
        .assert()
        .code(0);
    // The list-form net became a mapping with both fields; the inline part
    // and everything else are as written.
    let written = std::fs::read_to_string(&best).unwrap();
    assert!(
        written.contains("  V: { pins: [fuse.b, lamp.vin], length: 1 m, wire: 16 AWG }\n"),
        "{written}"
    );
    railcheck()
        .args(["check", "-q"])
        .arg(&best)
        .assert()
        .code(0);
}
